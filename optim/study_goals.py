"""What the search is asked: the objectives, the constraints it must meet, and its budget.

Constraints are the user's (constraints section, limits on any numeric column in that column's
unit) plus those the extruder and the envelope impose (root gap, height-to-gap ratio, overall
height, and the tip thickness when a taper can make it thinner than the extruder allows).
"""

from __future__ import annotations

from typing import Any

from optim.study_errors import ErrorContext
from optim.study_names import check_column, column_kind
from optim.study_schema import BudgetSection, Span, StudyFile
from optim.study_types import Budget, Constraint, Objective
from optim.study_yaml import Loc
from optim.units import BadValueError, format_quantity, parse_quantity, show

__all__ = ["study_budget", "study_constraints", "study_objectives"]


def study_objectives(
    sf: StudyFile, raw: dict, ctx: ErrorContext, sources: list[str]
) -> tuple[Objective, ...]:
    """The objectives, each a numeric column named once, as the file words them."""
    out = []
    for i, o in enumerate(sf.study.objectives):
        key = "minimise" if o.sense == "min" else "maximise"
        entry = raw["study"]["objectives"][i]
        if isinstance(entry, dict) and len(entry) == 1:
            key = next(iter(entry))
        col = check_column(ctx, ("study", "objectives", i, key), o.column, sources)
        if any(p.column == col for p in out):
            raise ctx.fail(
                ("study", "objectives", i, key),
                f"{show(col)} is already an objective; expected each column once",
            )
        out.append(Objective(col, o.sense))
    return tuple(out)


def study_constraints(
    sf: StudyFile, ctx: ErrorContext, spans: dict[str, Span], sources: list[str]
) -> tuple[tuple[Constraint, ...], list[dict]]:
    """The constraints, and the resolved rows of constraints.limits (their limits as text)."""
    c, ex, env = sf.constraints, sf.extruder, sf.envelope
    out = [
        Constraint(
            "junction_margin_K", ">=", c.min_junction_margin, "constraints.min_junction_margin"
        )
    ]
    if c.max_mass is not None:
        out.append(Constraint("mass_kg", "<=", c.max_mass, "constraints.max_mass"))
    if c.max_pressure_drop is not None:
        out.append(
            Constraint(
                "pressure_drop_Pa", "<=", c.max_pressure_drop, "constraints.max_pressure_drop"
            )
        )
    if c.max_outlet_temperature is not None:
        out.append(
            Constraint(
                "outlet_temperature_K",
                "<=",
                c.max_outlet_temperature,
                "constraints.max_outlet_temperature",
            )
        )
    limit_rows: list[dict] = []
    for i, lim in enumerate(c.limits):
        loc: Loc = ("constraints", "limits", i)
        col = check_column(ctx, loc + ("column",), lim.column, sources)
        kind = column_kind(col)
        row: dict[str, Any] = {"column": col}
        for key, sense in (("at_most", "<="), ("at_least", ">=")):
            value = getattr(lim, key)
            if value is None:
                continue
            try:
                si = parse_quantity(value, kind)[0]
            except BadValueError as e:
                raise ctx.fail(loc + (key,), e.text) from None
            out.append(Constraint(col, sense, si, f"constraints.limits[{i}]"))
            row[key] = format_quantity(si, kind)
        if lim.at_most is not None and lim.at_least is not None:
            lo, hi = out[-1].limit, out[-2].limit
            if lo > hi:
                raise ctx.fail(
                    loc,
                    f"at_least {row['at_least']!r} is above at_most "
                    f"{row['at_most']!r}; expected at_least <= at_most",
                )
        limit_rows.append(row)
    out.append(Constraint("gap_root_m", ">=", ex.min_gap, "extruder.min_gap"))
    out.append(
        Constraint(
            "fin_height_to_gap_ratio", "<=", ex.max_height_to_gap, "extruder.max_height_to_gap"
        )
    )
    out.append(Constraint("overall_height_m", "<=", env.max_height, "envelope.max_height"))
    if "fin_taper_ratio" in spans:
        r, t = spans["fin_taper_ratio"], spans["fin_thickness_root"]
        if r.lower * t.lower < ex.min_fin_thickness * (1 - 1e-12):
            out.append(
                Constraint(
                    "fin_thickness_tip_m",
                    ">=",
                    ex.min_fin_thickness,
                    "extruder.min_fin_thickness",
                )
            )
    return tuple(out), limit_rows


def study_budget(sf: StudyFile, ctx: ErrorContext) -> Budget:
    """The search budget; 100 generations when no stopping rule is given at all."""
    b: BudgetSection = sf.study.budget
    stops = {"generations", "evaluations", "wall_time", "stagnation"} & b.model_fields_set
    generations = b.generations if stops else 100
    if (
        generations is None
        and b.evaluations is None
        and b.wall_time is None
        and (b.stagnation is None)
    ):
        raise ctx.fail(
            ("study", "budget"),
            "has no stopping rule; expected at least one "
            "of generations, evaluations, wall_time or stagnation",
        )
    return Budget(
        method=b.method,
        population=b.population,
        generations=generations,
        max_evaluations=b.evaluations,
        wall_time_s=b.wall_time,
        stagnation_generations=b.stagnation.generations if b.stagnation else None,
        stagnation_tolerance=b.stagnation.tolerance if b.stagnation else 1e-4,
        checkpoint_every=b.checkpoint_every,
        sweep_points=b.sweep_points,
        workers=b.workers,
        dask_scheduler=b.dask_scheduler,
    )
