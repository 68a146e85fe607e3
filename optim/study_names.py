"""What a study may name: the materials finfront knows and the columns of the results.

A material is one of :data:`models.materials.MATERIALS` or a custom ``{name, conductivity,
density}``; an objective or a limit names a numeric column of ``models.evaluate``'s table
(:data:`models.columns.COLUMNS`, plus the per-source columns of :data:`models.columns.PER_SOURCE`).
A name that is not there is refused with a did-you-mean.
"""

from __future__ import annotations

import re

from models.columns import COLUMNS, PER_SOURCE
from models.materials import MATERIALS
from optim.study_errors import ErrorContext
from optim.study_schema import CustomMaterial, StudyFile, did_you_mean
from optim.study_types import Material
from optim.study_yaml import Loc
from optim.units import show

__all__ = [
    "check_column",
    "column_kind",
    "known_materials",
    "numeric_columns",
    "study_materials",
]

# ---------------------------------------------------------------- materials


def known_materials() -> dict[str, Material]:
    """The materials a study may name, from ``models.materials.MATERIALS`` (SI values)."""
    return {
        name: Material(name, m.conductivity_W_per_mK, m.density_kg_per_m3)
        for name, m in MATERIALS.items()
    }


def study_materials(sf: StudyFile, raw: dict, ctx: ErrorContext) -> list[Material]:
    """The candidate materials of the study, in file order; unknown or repeated names refused."""
    known = known_materials()
    as_list = isinstance(raw.get("material"), list)
    out: list[Material] = []
    for i, entry in enumerate(sf.material):
        loc: Loc = ("material", i) if as_list else ("material",)
        if isinstance(entry, CustomMaterial):
            m = Material(entry.name, entry.conductivity, entry.density)
        elif entry in known:
            m = known[entry]
        else:
            names = sorted(known)
            raise ctx.fail(
                loc,
                f"{show(entry)} is not a material finfront knows"
                f"{did_you_mean(entry, names)}; expected one of: "
                f"{', '.join(names)}, or a custom "
                "{name, conductivity, density}",
            )
        if any(o.name == m.name for o in out):
            raise ctx.fail(loc, f"{show(m.name)} is listed twice; expected each material once")
        out.append(m)
    return out


# ---------------------------------------------------------------- columns


def numeric_columns(source_names: list[str] | tuple[str, ...] = ()) -> list[str]:
    """Columns of ``models.evaluate``'s table a study may optimise or limit (not bool/text)."""
    cols = [c for c, d in COLUMNS.items() if not d.endswith(("(bool)", "(text)"))]
    for s in source_names:
        cols += [pattern.format(s=s) for pattern in PER_SOURCE]
    return cols


_ABSOLUTE_T = re.compile(r"^(outlet|base|junction)_temperature(_.+)?_K$")
_SUFFIX_KINDS = (
    ("_K_per_W", "thermal_resistance"),
    ("_W_per_m2K", "htc"),
    ("_m3_per_s", "flow"),
    ("_m_per_s", "velocity"),
    ("_m2", "area"),
    ("_kg", "mass"),
    ("_Pa", "pressure"),
    ("_W", "power"),
    ("_m", "length"),
    ("_K", "temperature_difference"),
)


def column_kind(column: str) -> str:
    """The kind of quantity (:data:`optim.units.KINDS`) of a column, from its unit suffix.

    Absolute temperatures (junction, base, outlet) are ``temperature``; other ``_K`` columns
    (margins, rises, fin tip above the base) are ``temperature_difference``.
    """
    if _ABSOLUTE_T.match(column):
        return "temperature"
    for suffix, kind in _SUFFIX_KINDS:
        if column.endswith(suffix):
            return kind
    return "number"


def check_column(ctx: ErrorContext, loc: Loc, column: str, sources: list[str]) -> str:
    """``column`` when it names a numeric column of the results; else the one-line error."""
    cols = numeric_columns(sources)
    if column not in cols:
        flags = [c for c, d in COLUMNS.items() if d.endswith(("(bool)", "(text)"))]
        why = " (a flag or text, not a number)" if column in flags else " of the results"
        raise ctx.fail(
            loc,
            f"{show(column)} names no numeric column{why}"
            f"{did_you_mean(column, cols)}; expected a column such as "
            "junction_temperature_K, mass_kg or pressure_drop_Pa (see "
            "docs/study-file.md)",
        )
    return column
