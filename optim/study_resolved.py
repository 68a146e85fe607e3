"""The resolved study: the study as a plain dict with every default filled in.

Quantities are written as text in display units that read back exactly
(:func:`optim.units.format_quantity`), so loading the resolved dict again gives the same Study;
it is the frozen study file of a run folder.
"""

from __future__ import annotations

from typing import Any

from models.contract import HeatSource
from optim.study_conditions import emissivity, fin_tips
from optim.study_names import known_materials
from optim.study_schema import Span, StudyFile
from optim.study_types import Budget, Material
from optim.units import format_quantity

__all__ = ["resolved_study", "span_value"]


def resolved_study(
    sf: StudyFile,
    materials: list[Material],
    sources: list[HeatSource],
    spans: dict[str, Span],
    scenario_rows: list[dict],
    budget: Budget,
    limit_rows: list[dict],
) -> dict:
    """The study as a plain dict, defaults filled in, quantities as text that reads back exactly."""
    air, ex, env, c = sf.air, sf.extruder, sf.envelope, sf.constraints
    known = known_materials()
    mats: list[Any] = [
        m.name
        if m.name in known and known[m.name] == m
        else {
            "name": m.name,
            "conductivity": format_quantity(m.conductivity_W_per_mK, "conductivity"),
            "density": format_quantity(m.density_kg_per_m3, "density"),
        }
        for m in materials
    ]
    design = {
        key: span_value(
            span,
            "number" if key in ("fin_count", "fin_taper_ratio") else "length",
            integer=key == "fin_count",
        )
        for key, span in spans.items()
    }
    air_out: dict[str, Any] = {"ambient": format_quantity(air.ambient, "temperature")}
    if air.pressure is not None:
        air_out["pressure"] = format_quantity(air.pressure, "pressure")
    else:
        air_out["altitude"] = format_quantity(air.altitude or 0.0, "length", "m")
    if air.fans is not None:
        air_out["fans"] = [_fan_row(f) for f in air.fans]
        air_out["candidates"] = list(air.candidates or [f.name for f in air.fans])
    elif air.flow is not None:
        air_out["flow"] = format_quantity(air.flow, "flow")
    else:
        air_out["approach_velocity"] = format_quantity(air.approach_velocity, "velocity")
    air_out["system_impedance"] = format_quantity(air.system_impedance, "impedance")
    air_out["bypass_clearance"] = {
        "top": format_quantity(air.bypass_clearance.top, "length"),
        "side": format_quantity(air.bypass_clearance.side, "length"),
    }
    air_out["fin_tips"] = fin_tips(air)
    cons: dict[str, Any] = {}
    for key, kind in (
        ("max_mass", "mass"),
        ("max_pressure_drop", "pressure"),
        ("max_outlet_temperature", "temperature"),
    ):
        if getattr(c, key) is not None:
            cons[key] = format_quantity(getattr(c, key), kind)
    cons["min_junction_margin"] = format_quantity(c.min_junction_margin, "temperature_difference")
    cons["limits"] = limit_rows
    return {
        "study": {
            "name": sf.study.name,
            "seed": sf.study.seed,
            "objectives": [
                {("minimise" if o.sense == "min" else "maximise"): o.column}
                for o in sf.study.objectives
            ],
            "budget": {
                "method": budget.method,
                "population": budget.population,
                "generations": budget.generations,
                "evaluations": budget.max_evaluations,
                "wall_time": (
                    format_quantity(budget.wall_time_s, "time")
                    if budget.wall_time_s is not None
                    else None
                ),
                "stagnation": (
                    {
                        "generations": budget.stagnation_generations,
                        "tolerance": budget.stagnation_tolerance,
                    }
                    if budget.stagnation_generations is not None
                    else None
                ),
                "checkpoint_every": budget.checkpoint_every,
                "sweep_points": budget.sweep_points,
                "workers": budget.workers,
                "dask_scheduler": budget.dask_scheduler,
            },
        },
        "envelope": {
            k: format_quantity(getattr(env, k), "length")
            for k in ("base_width", "flow_length", "max_height")
        },
        "material": mats,
        "design_space": design,
        "extruder": {
            "max_height_to_gap": ex.max_height_to_gap,
            "min_fin_thickness": format_quantity(ex.min_fin_thickness, "length"),
            "min_gap": format_quantity(ex.min_gap, "length"),
            "min_base_thickness": format_quantity(ex.min_base_thickness, "length"),
            "root_fillet": format_quantity(ex.root_fillet, "length"),
            "tip_round": (
                "full" if ex.tip_round is None else format_quantity(ex.tip_round, "length")
            ),
        },
        "air": air_out,
        "surface": {"finish": sf.surface.finish, "emissivity": emissivity(sf)},
        "sources": [
            {
                "name": s.name,
                "power": format_quantity(s.power_W, "power"),
                "footprint": [
                    format_quantity(s.length_m, "length"),
                    format_quantity(s.width_m, "length"),
                ],
                "position": [
                    format_quantity(s.x_m, "length"),
                    format_quantity(s.y_m, "length"),
                ],
                "interface_resistance": format_quantity(
                    s.interface_resistance_K_m2_per_W, "area_resistance"
                ),
                "junction_to_case": format_quantity(
                    s.junction_to_case_K_per_W, "thermal_resistance"
                ),
                "max_junction": format_quantity(s.max_junction_temperature_K, "temperature"),
            }
            for s in sources
        ],
        "constraints": cons,
        "scenarios": scenario_rows,
    }


def span_value(span: Span, kind: str, integer: bool = False) -> Any:
    """A span as the resolved file writes it: one value when fixed, else ``[lower, upper]``."""

    def one(x: float) -> Any:
        return int(x) if integer else format_quantity(x, kind)

    return one(span.lower) if span.fixed else [one(span.lower), one(span.upper)]


def _fan_row(f: Any) -> dict:
    return {
        "name": f.name,
        "curve_units": ["m^3/s", "Pa"],
        "curve": [[q, p] for q, p in f.curve],
        "count": f.count,
        "arrangement": f.arrangement,
        "rated_density": format_quantity(f.rated_density, "density"),
        "power": None if f.power is None else format_quantity(f.power, "power"),
    }
