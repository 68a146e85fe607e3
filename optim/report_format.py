"""How the report shows numbers, units, constraints and colours (no I/O).

SI columns of the model's table become engineering units: mm, degC, m^3/h (and CFM), g or kg,
Pa, K/W, W/(m^2 K). Every shown number is rounded once, here, so that the report's tables, the
picked designs' key numbers and the hover texts agree with each other and with pareto.csv to
the precision shown.
"""

from __future__ import annotations

import html
import math
import re

from optim.runfolder import CFM_PER_M3S

_ABS_T = re.compile(r"^(?:[^:]+:)?(outlet|base|junction)_temperature(_.+)?_K$")

# Okabe & Ito's colour-blind-safe palette (yellow left out: too pale on white)
PALETTE = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000",
           "#7F7F00")
PICK_NAMES = {"knee": "knee of the front"}


def esc(text: object) -> str:
    """HTML-escaped text (quotes too, so it is safe inside attributes)."""
    return html.escape(str(text), quote=True)


def sig(value: float, digits: int = 3) -> str:
    """``value`` with ``digits`` significant figures, never in exponent form; '-' if not finite."""
    v = float(value)
    if not math.isfinite(v):
        return "-"
    if v == 0.0:
        return "0"
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(v))))
    return f"{v:.{decimals}f}"


def fixed(value: float, decimals: int) -> str:
    v = float(value)
    return f"{v:.{decimals}f}" if math.isfinite(v) else "-"


def is_absolute_temperature(column: str) -> bool:
    return bool(_ABS_T.match(column))


def show(column: str, value: float) -> tuple[str, str]:
    """(number text, unit) of an SI value of a model column, in engineering units."""
    try:
        v = float(value)
    except (TypeError, ValueError):
        return str(value), ""
    if is_absolute_temperature(column):
        return fixed(v - 273.15, 1), "°C"
    if column.endswith("_K_per_W"):
        return sig(v), "K/W"
    if column.endswith("_K"):
        return fixed(v, 1), "K"
    if column.endswith("_m3_per_s"):
        return sig(v * 3600.0), "m³/h"
    if column.endswith("_m_per_s"):
        return sig(v), "m/s"
    if column.endswith("_W_per_m2K"):
        return sig(v), "W/(m²·K)"
    if column.endswith("_m2"):
        return sig(v * 1e4), "cm²"
    if column.endswith("_kg"):
        return mass_text(v)
    if column.endswith("_Pa"):
        return sig(v), "Pa"
    if column.endswith("_W"):
        return sig(v), "W"
    if column.endswith("_m"):
        return length_mm(v), "mm"
    if column == "bypass_fraction":
        return fixed(100.0 * v, 1), "%"
    if column == "fin_count":
        return f"{int(round(v))}", ""
    return sig(v), ""


def length_mm(value_m: float) -> str:
    """A length in mm with two decimals (as the DXF drawing dimensions it)."""
    return fixed(float(value_m) * 1e3, 2)


def mass_text(value_kg: float) -> tuple[str, str]:
    """A mass in g (one decimal) below 1 kg, in kg (three decimals) from 1 kg."""
    v = float(value_kg)
    if not math.isfinite(v):
        return "-", "g"
    return (fixed(v * 1e3, 1), "g") if abs(v) < 1.0 else (fixed(v, 3), "kg")


def flow_cfm(value_m3_per_s: float) -> str:
    return sig(float(value_m3_per_s) * CFM_PER_M3S)


def with_unit(column: str, value: float) -> str:
    text, unit = show(column, value)
    return f"{text}\u00a0{unit}" if unit else text


def words(column: str) -> str:
    """A column name in plain words, without its unit suffix."""
    name = column.split(":", 1)[-1]
    for suffix in ("_K_per_W", "_m3_per_s", "_m_per_s", "_W_per_m2K", "_m2", "_kg", "_Pa",
                   "_W", "_K", "_m"):
        if name.endswith(suffix):
            name = name[: -len(suffix)]
            break
    text = name.replace("_", " ")
    return {"fin height to gap ratio": "fin height / gap ratio",
            "total resistance": "thermal resistance, junction to inlet air",
            "sink resistance": "sink thermal resistance",
            "junction margin": "junction temperature margin",
            "gap root": "gap at the root", "gap tip": "gap at the tip",
            "fin thickness root": "fin thickness at the root",
            "fin thickness tip": "fin thickness at the tip"}.get(text, text)


SHORT = {"junction_temperature_K": "junction", "mass_kg": "mass",
         "pressure_drop_Pa": "sink Δp", "flow_m3_per_s": "air flow",
         "total_resistance_K_per_W": "resistance", "outlet_temperature_K": "outlet air",
         "system_pressure_Pa": "fan pressure", "base_temperature_K": "base"}


def short_words(column: str) -> str:
    """A short column heading (for the candidate table)."""
    return SHORT.get(column, words(column))


def unit_of(column: str) -> str:
    return show(column, 1.0)[1]


def axis_title(column: str, sense: str | None = None) -> str:
    """Axis title of a model column with its unit (and 'lower is better' for an objective)."""
    unit = unit_of(column)
    text = words(column) + (f" ({unit})" if unit else " (–)")
    if sense:
        text += ", higher is better" if sense == "max" else ", lower is better"
    return text


_SOURCE_WORDS = {"constraints": "study limit", "extruder": "extruder", "envelope": "envelope",
                 "limits": "study limit"}


def constraint_text(constraint, source: bool = True) -> str:
    """A study constraint in plain words: 'fin height / gap ratio ≤ 10 (extruder)'."""
    sym = "≤" if constraint.sense == "<=" else "≥"
    limit = with_unit(constraint.column, constraint.limit)
    where = _SOURCE_WORDS.get(constraint.label.split(".", 1)[0], constraint.label)
    text = f"{words(constraint.column)} {sym} {limit}"
    return f"{text} ({where})" if source else text


def limiting_text(label: str, constraints, source: bool = True) -> str:
    """Plain words for a value of pareto.csv's ``limiting_constraint`` column."""
    for c in constraints:
        if c.label == label:
            return constraint_text(c, source)
    if str(label).startswith("model validity"):
        return str(label)
    return str(label).replace("_", " ")


def colour_map(labels) -> dict[str, str]:
    """A fixed colour for every limiting constraint (in order of first appearance)."""
    out: dict[str, str] = {}
    for lab in labels:
        if lab not in out:
            out[lab] = PALETTE[len(out) % len(PALETTE)]
    return out


def pick_title(label: str) -> str:
    return PICK_NAMES.get(label, label)


def fan_set_words(curve) -> str:
    """Plain words for a fan set: '1 fan', '2 fans in parallel', '2 fans in series'."""
    n = int(curve.count)
    if n == 1:
        return "1 fan"
    return f"{n} fans in {curve.arrangement}"
