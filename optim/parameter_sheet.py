"""The parameter sheet of one chosen design: sizes with units, material, mass, model results.

The sheet is one flat, ordered mapping; its keys carry their units (``fin_height_mm``,
``pressure_drop_Pa``). It is written as JSON (an object) and as CSV (a header row of the keys
and one row of values), and reads back from either unchanged.
"""

from __future__ import annotations

import csv
import datetime as _dt
import json
import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

from models.geometry import plate_fin_geometry
from optim.profile_outline import ProfileDims, outline_area

SHEET_FORMAT = "finfront parameter sheet 1"

# Model results taken from the model's table row (models.columns names; key: what it is).
RESULT_KEYS = {
    "sink_resistance_K_per_W": "predicted sink thermal resistance, base to inlet air",
    "pressure_drop_Pa": "pressure drop across the sink at the operating point",
    "flow_m3_per_s": "operating point: air flow through the sink",
    "system_pressure_Pa": "operating point: fan pressure (sink + system impedance)",
    "total_area_m2": "wetted (convective) surface area",
}
# Copied too when the row has them.
OPTIONAL_RESULT_KEYS = (
    "total_resistance_K_per_W",
    "junction_temperature_K",
    "junction_margin_K",
    "base_temperature_K",
    "channel_velocity_m_per_s",
    "approach_velocity_m_per_s",
    "fan_air_power_W",
    "air_temperature_rise_K",
)

_TEXT_KEYS = {"format", "design_id", "study_name", "date", "material"}

MASS_TOLERANCE = 0.01  # relative; the drawn profile and the model's mass must agree this well


@dataclass(frozen=True)
class DesignMeta:
    """What identifies a chosen design and its material.

    ``mass_kg`` is the model's mass (copy it from the model's table row); the exports check it
    against the drawn profile. ``date`` is an ISO date; empty means today.
    """

    design_id: str
    study_name: str
    material: str
    density_kg_per_m3: float
    mass_kg: float
    date: str = field(default="")

    @property
    def date_iso(self) -> str:
        return self.date or _dt.date.today().isoformat()


def profile_mass_kg(dims: ProfileDims, density_kg_per_m3: float) -> float:
    """Mass of the drawn profile: exact outline area x flow length x density (kg)."""
    area_m2 = outline_area(dims.outline(scale=1.0))
    return area_m2 * dims.flow_length_m * density_kg_per_m3


def check_mass(dims: ProfileDims, meta: DesignMeta) -> float:
    """Return the drawn profile's mass; raise if it differs from ``meta.mass_kg`` by > 1 %."""
    drawn = profile_mass_kg(dims, meta.density_kg_per_m3)
    if not (math.isfinite(meta.mass_kg) and abs(drawn - meta.mass_kg) <= MASS_TOLERANCE * drawn):
        raise ValueError(
            f"mass_kg = {meta.mass_kg!r}: expected the mass of the drawn profile, "
            f"{drawn:.6g} kg, within {MASS_TOLERANCE:.0%} (wrong design row or density?)"
        )
    return drawn


def parameter_sheet(dims: ProfileDims, meta: DesignMeta, results: Mapping[str, float]) -> dict:
    """Return the parameter sheet of one design as an ordered, flat dict (sizes in mm).

    ``results`` is this design's row of the model's table (``models.evaluate``; a dict or a
    pandas Series): the sheet copies the columns of :data:`RESULT_KEYS` (all required) and of
    :data:`OPTIONAL_RESULT_KEYS` (when present) under the same names, and ignores the rest.
    Its ``mass_kg``, if present, must equal ``meta.mass_kg``.

    The sheet's mass is the model's mass (``meta.mass_kg``); ``profile_mass_kg`` beside it is
    the drawn outline's exact area x length x density, and the two must agree within 1 %
    (``ValueError`` otherwise, as for a missing result key).
    """
    missing = [k for k in RESULT_KEYS if k not in results]
    if missing:
        raise ValueError(f"results: missing {', '.join(missing)}; expected the keys "
                         f"{', '.join(RESULT_KEYS)} from the model's table row")
    if "mass_kg" in results and not math.isclose(results["mass_kg"], meta.mass_kg,
                                                 rel_tol=1e-9):
        raise ValueError(f"results mass_kg = {results['mass_kg']!r}: expected the same "
                         f"value as meta.mass_kg = {meta.mass_kg!r}")
    drawn_mass = check_mass(dims, meta)
    g = plate_fin_geometry(
        dims.fin_count, dims.fin_thickness_root_m, dims.fin_thickness_tip_m, dims.fin_height_m,
        dims.base_thickness_m, dims.base_width_m, dims.flow_length_m, dims.root_fillet_m,
        dims.tip_radius_m,
    )

    def mm(length_m: float) -> float:  # to mm, without float noise in the 10th digit
        return round(float(length_m) * 1e3, 9)

    sheet: dict = {
        "format": SHEET_FORMAT,
        "design_id": meta.design_id,
        "study_name": meta.study_name,
        "date": meta.date_iso,
        "fin_count": int(dims.fin_count),
        "fin_thickness_root_mm": mm(dims.fin_thickness_root_m),
        "fin_thickness_tip_mm": mm(dims.fin_thickness_tip_m),
        "fin_height_mm": mm(dims.fin_height_m),
        "base_thickness_mm": mm(dims.base_thickness_m),
        "base_width_mm": mm(dims.base_width_m),
        "overall_height_mm": mm(dims.overall_height_m),
        "flow_length_mm": mm(dims.flow_length_m),
        "fin_pitch_mm": mm(g.pitch_m),
        "gap_root_mm": mm(g.gap_root_m),
        "gap_tip_mm": mm(g.gap_tip_m),
        "root_fillet_radius_mm": mm(dims.root_fillet_m),
        "tip_round_radius_mm": mm(dims.tip_radius_m),
        "profile_area_mm2": round(outline_area(dims.outline(scale=1e3)), 9),
        "material": meta.material,
        "density_kg_per_m3": float(meta.density_kg_per_m3),
        "mass_kg": float(meta.mass_kg),
        "profile_mass_kg": drawn_mass,
    }
    for key in RESULT_KEYS:
        sheet[key] = float(results[key])
    for key in OPTIONAL_RESULT_KEYS:
        if key in results:
            sheet[key] = float(results[key])
    return sheet


def write_parameter_sheet(json_path: str | Path, csv_path: str | Path, sheet: Mapping) -> None:
    """Write the sheet as a JSON object and as a two-row CSV (keys, then values)."""
    Path(json_path).write_text(json.dumps(dict(sheet), indent=2) + "\n", encoding="utf-8")
    with open(csv_path, "w", newline="", encoding="utf-8") as f:
        writer = csv.writer(f)
        writer.writerow(list(sheet))
        writer.writerow([repr(v) if isinstance(v, float) else v for v in sheet.values()])


def read_parameter_sheet_csv(csv_path: str | Path) -> dict:
    """Read a sheet written by :func:`write_parameter_sheet` back from its CSV.

    Numbers come back as int or float (floats exactly, being written with ``repr``); other
    values as strings.
    """
    with open(csv_path, newline="", encoding="utf-8") as f:
        rows = list(csv.reader(f))
    if len(rows) != 2 or len(rows[0]) != len(rows[1]):
        raise ValueError(f"{csv_path}: expected a header row and one value row of equal length")
    out: dict = {}
    for key, text in zip(rows[0], rows[1], strict=True):
        out[key] = text if key in _TEXT_KEYS else _number(text)
    return out


def _number(text: str) -> int | float | str:
    for kind in (int, float):
        try:
            return kind(text)
        except ValueError:
            pass
    return text
