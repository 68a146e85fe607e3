"""Hand-off to CAD: write one design's DXF profile, STEP solid and parameter sheet together.

Every file is first written under a hidden temporary name in the output folder; only when all
of them are written are they renamed to their final names, so a failure (a missing CAD extra,
a full disk, an inconsistent mass) leaves no half-written or mismatched set behind.
"""

from __future__ import annotations

import os
import re
import uuid
from collections.abc import Iterable, Mapping
from pathlib import Path

from optim.export_dxf import write_dxf
from optim.parameter_sheet import DesignMeta, parameter_sheet, write_parameter_sheet
from optim.profile_outline import ProfileDims

FORMATS = ("dxf", "step", "json", "csv")
_SUFFIX = {
    "dxf": "_profile.dxf",
    "step": "_solid.step",
    "json": "_parameters.json",
    "csv": "_parameters.csv",
}


def export_paths(out_dir: str | Path, design_id: str) -> dict[str, Path]:
    """Return the file each format is written to, named after the design."""
    stem = re.sub(r"[^A-Za-z0-9._-]+", "_", design_id).strip("._") or "design"
    return {fmt: Path(out_dir) / f"{stem}{suffix}" for fmt, suffix in _SUFFIX.items()}


def export_design(
    out_dir: str | Path,
    dims: ProfileDims,
    meta: DesignMeta,
    results: Mapping[str, float],
    formats: Iterable[str] = FORMATS,
) -> dict[str, Path]:
    """Write the CAD hand-off of one design into ``out_dir``; return {format: path written}.

    ``formats`` is any of ``"dxf"`` (profile drawing, mm), ``"step"`` (extruded solid, mm; needs
    the ``cad`` extra), ``"json"`` and ``"csv"`` (parameter sheet). The sheet is built and
    checked first, whatever the formats: ``results`` must hold the model's results
    (:data:`optim.parameter_sheet.RESULT_KEYS`) and ``meta.mass_kg`` must match the drawn
    profile within 1 %. Files appear under their final names only after all were written.
    """
    formats = tuple(dict.fromkeys(formats))
    unknown = [f for f in formats if f not in FORMATS]
    if unknown or not formats:
        raise ValueError(f"formats = {list(formats)!r}: expected one or more of {list(FORMATS)}")
    sheet = parameter_sheet(dims, meta, results)  # validates before anything is written
    if "step" in formats:
        from optim.export_step import _build123d, write_step

        _build123d()  # fail now, naming the missing extra, rather than after the DXF

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    finals = export_paths(out, meta.design_id)
    temps: dict[str, Path] = {}

    def temp_for(fmt: str) -> Path:  # created by the writer, so it gets the usual permissions
        temps[fmt] = out / f".{finals[fmt].name}.{os.getpid()}.{uuid.uuid4().hex[:8]}.part"
        return temps[fmt]

    try:
        if "dxf" in formats:
            write_dxf(temp_for("dxf"), dims, meta)
        if "step" in formats:
            write_step(temp_for("step"), dims, name=f"{meta.design_id} heat sink profile")
        if "json" in formats or "csv" in formats:
            write_parameter_sheet(temp_for("json"), temp_for("csv"), sheet)
        written: dict[str, Path] = {}
        for fmt in formats:
            os.replace(temps.pop(fmt), finals[fmt])
            written[fmt] = finals[fmt]
        return written
    finally:
        for leftover in temps.values():
            leftover.unlink(missing_ok=True)
