"""Load a study file (YAML) into a validated :class:`optim.study_types.Study` in SI units.

``load_study(path_or_dict)`` reads the YAML (a YAML 1.2-like reading: ``1e-3`` is a number,
``012`` is twelve, ``no`` is text; a key given twice is an error), validates every section
against :mod:`optim.study_schema`, converts quantities to SI once, checks what needs several
sections at once, and returns the :class:`Study`. Anything wrong raises :class:`StudyError`
whose message is one line: the key path, the bad value, what was expected, and the line of the
file where it is known, e.g.::

    air.fans[1].curve[2].flow: "35 mm" is a length; expected a volumetric flow such as
    "35 CFM" (line 31)

(printed on one line).

``Study.resolved`` is the study as a plain dict with every default filled in; loading it again
gives the same Study.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from pydantic import ValidationError

from optim.study_conditions import study_fans, study_scenarios, study_sources
from optim.study_design_space import decision_variables, design_space
from optim.study_errors import ErrorContext, translate
from optim.study_goals import study_budget, study_constraints, study_objectives
from optim.study_names import column_kind, known_materials, numeric_columns, study_materials
from optim.study_resolved import resolved_study
from optim.study_schema import StudyFile
from optim.study_types import Study
from optim.study_yaml import parse_yaml
from optim.units import StudyError, show

# The loader is spread over one module per job, in the order load_study uses them:
#   study_yaml          YAML 1.2-like reading, duplicate keys, the line of every key path
#   study_schema        one pydantic model per section; quantities to SI field by field
#   study_errors        one-line messages (key path, value, expectation, line)
#   study_names         the materials and result columns a study may name
#   study_conditions    heat sources on the base, fans, scenarios -> Conditions
#   study_design_space  bounds the extruder and envelope allow -> decision variables
#   study_goals         objectives, constraints, budget
#   study_resolved      the study as a plain dict with every default filled in
# Public names are re-exported here (parse_yaml too); import them from optim.study.

__all__ = [
    "StudyError",
    "column_kind",
    "known_materials",
    "load_study",
    "numeric_columns",
]

# ---------------------------------------------------------------- loading


def load_study(source: str | Path | dict) -> Study:
    """Return the validated :class:`Study` (SI) of a study file, YAML text or dict.

    ``source``: a path (``str`` without a newline, or ``Path``) to a YAML file; YAML text (a
    ``str`` with a newline); or the already-parsed dict. Raises :class:`StudyError` with a
    one-line message (key path, bad value, expectation, and the line when read from YAML).
    """
    path: str | None = None
    if isinstance(source, dict):
        data, lines = source, {}
    else:
        if isinstance(source, Path) or "\n" not in source:
            p = Path(source)
            try:
                text = p.read_text(encoding="utf-8")
            except FileNotFoundError:
                raise StudyError(f"{p}: no such file; expected a study file (YAML)") from None
            except (OSError, UnicodeDecodeError) as e:
                raise StudyError(
                    f"{p}: cannot be read ({e}); expected a study file (YAML)"
                ) from None
            path = str(p)
        else:
            text = source
        data, lines = parse_yaml(text)
    ctx = ErrorContext(lines)
    if not isinstance(data, dict):
        raise StudyError(
            f"study file: {show(data) if data is not None else 'empty'}; expected "
            "a mapping with the sections study, envelope, design_space, air, "
            "sources (and optionally material, extruder, surface, constraints, "
            "scenarios)"
        )
    try:
        sf = StudyFile.model_validate(data)
    except ValidationError as e:
        raise translate(e, ctx) from None
    study = _assemble(sf, data, ctx)
    return replace(study, source_path=path)


def _assemble(sf: StudyFile, raw: dict, ctx: ErrorContext) -> Study:
    """The Study of a validated study file: cross-section checks, then the parts, in this order
    (so that of several faults the same one is reported first)."""
    materials = study_materials(sf, raw, ctx)
    sources = study_sources(sf, ctx)
    fans, fan_names = study_fans(sf)
    scenarios, scenario_rows = study_scenarios(sf, ctx, sources, fans)
    spans = design_space(sf, ctx)
    variables, fixed = decision_variables(spans, materials, fan_names)
    objectives = study_objectives(sf, raw, ctx, [s.name for s in sources])
    constraints, limit_rows = study_constraints(sf, ctx, spans, [s.name for s in sources])
    budget = study_budget(sf, ctx)
    study = Study(
        name=sf.study.name,
        seed=sf.study.seed,
        variables=variables,
        fixed=fixed,
        objectives=objectives,
        constraints=constraints,
        budget=budget,
        scenarios=scenarios,
        materials=tuple(materials),
        fan_names=fan_names,
        base_width_m=sf.envelope.base_width,
        flow_length_m=sf.envelope.flow_length,
        max_height_m=sf.envelope.max_height,
        root_fillet_m=sf.extruder.root_fillet,
        tip_radius_m=sf.extruder.tip_round,
    )
    resolved = resolved_study(sf, materials, sources, spans, scenario_rows, budget, limit_rows)
    return replace(study, resolved=resolved)
