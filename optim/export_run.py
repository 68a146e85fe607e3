"""CAD hand-off of one design of a finished run, chosen by its ID in ``pareto.csv``.

The design is rebuilt from its row through the run's frozen ``study.yaml`` and evaluated again
with ``models.evaluate`` (nominal scenario), so the parameter sheet, the DXF text block and the
STEP solid carry the model's own numbers -- the same as the report's and pareto.csv's (this is
checked: a model that changed since the run raises ``RunMismatchError``).
"""

from __future__ import annotations

from collections.abc import Iterable
from pathlib import Path

from optim.export import FORMATS, export_design
from optim.parameter_sheet import DesignMeta
from optim.profile_outline import ProfileDims
from optim.report_run import (
    check_same,
    designs_from_rows,
    find_design,
    load_run_study,
    read_pareto,
    run_date_iso,
    take,
)

# columns of pareto.csv the re-evaluated design must reproduce (relative tolerance below)
CHECKED_COLUMNS = ("mass_kg", "sink_resistance_K_per_W", "total_resistance_K_per_W",
                   "junction_temperature_K", "pressure_drop_Pa", "flow_m3_per_s")
CHECK_RTOL = 1e-6  # a re-evaluation of one design repeats the run's to ~1e-12 (measured)


def default_export_dir(run_folder: Path) -> Path:
    """Where ``export_from_run`` writes when no folder is given: ``<run>/export``."""
    return Path(run_folder) / "export"


def export_from_run(
    run_folder: Path,
    design_id: str | int,
    out_dir: Path | None = None,
    formats: Iterable[str] = FORMATS,
) -> dict[str, Path]:
    """Export one Pareto design of a run to CAD; return ``{format: path written}``.

    ``design_id`` is the ``design_id`` of ``pareto.csv`` (``"D012"``; ``12`` and ``"d12"``
    work too). ``out_dir`` defaults to ``<run_folder>/export``. ``formats``: any of ``"dxf"``,
    ``"step"`` (needs the ``cad`` extra), ``"json"``, ``"csv"`` (see
    :func:`optim.export.export_design`). The files are named after the design
    (``D012_profile.dxf``, ``D012_solid.step``, ``D012_parameters.json``/``.csv``).

    Raises ``FileNotFoundError`` for a folder without study.yaml or pareto.csv, ``KeyError``
    for an unknown ID, ``RunMismatchError`` if the model no longer reproduces the row,
    ``optim.export_step.MissingCadExtraError`` if STEP is asked for without the extra.
    """
    run_folder = Path(run_folder)
    study = load_run_study(run_folder)
    pareto = read_pareto(run_folder)
    i = find_design(pareto, design_id)
    row = pareto.iloc[[i]].reset_index(drop=True)
    design = take(designs_from_rows(study, row), [0])
    from models.evaluate import evaluate

    table = evaluate(design, study.scenarios[0].conditions).reset_index(drop=True)
    check_same(table, row, CHECKED_COLUMNS, rtol=CHECK_RTOL)
    result = table.iloc[0]
    arrays = design.arrays()
    meta = DesignMeta(
        design_id=str(row["design_id"].iloc[0]),
        study_name=study.name,
        material=str(row["material"].iloc[0]) if "material" in row else _material(study, arrays),
        density_kg_per_m3=float(arrays["density_kg_per_m3"][0]),
        mass_kg=float(result["mass_kg"]),
        date=run_date_iso(run_folder),
    )
    dims = ProfileDims.from_design(design, 0)
    out = Path(out_dir) if out_dir is not None else default_export_dir(run_folder)
    return export_design(out, dims, meta, result.to_dict(), formats=formats)


def _material(study, arrays) -> str:
    rho = float(arrays["density_kg_per_m3"][0])
    k = float(arrays["conductivity_W_per_mK"][0])
    for m in study.materials:
        if m.density_kg_per_m3 == rho and m.conductivity_W_per_mK == k:
            return m.name
    return "unnamed material"
