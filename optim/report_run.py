"""Read a finished run folder back: its frozen study, its Pareto table, its dates, and the model
designs of its Pareto rows rebuilt exactly as the search built them.

The report (``optim.report``) and the CAD export of a run (``optim.export_run``) both go through
here, so that the numbers they show come from the same designs and the same model.
"""

from __future__ import annotations

import datetime as _dt
import math
import re
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pandas as pd

from models.contract import Design
from models.evaluate import evaluate
from optim.study_types import Study

_STAMP = re.compile(r"^(\d{4}-\d{2}-\d{2})[ T](\d{2}:\d{2}:\d{2})")
# echoed design sizes that a rebuilt design must reproduce (SI columns of pareto.csv)
_ECHO = ("fin_count", "fin_thickness_root_m", "fin_thickness_tip_m", "fin_height_m",
         "base_thickness_m", "base_width_m", "flow_length_m")


class RunMismatchError(ValueError):
    """A run folder whose files disagree (study.yaml does not reproduce pareto.csv)."""


def load_run_study(run_folder: Path) -> Study:
    """The frozen study of a run folder (``study.yaml``), as the run used it."""
    from optim.study import load_study

    path = Path(run_folder) / "study.yaml"
    if not path.is_file():
        raise FileNotFoundError(f"'{run_folder}': no study.yaml; expected a finfront run folder")
    return load_study(path)


def read_pareto(run_folder: Path) -> pd.DataFrame:
    """``pareto.csv`` of a run folder (floats read back exactly as they were written)."""
    path = Path(run_folder) / "pareto.csv"
    if not path.is_file():
        raise FileNotFoundError(f"'{run_folder}': no pareto.csv; expected a finished run folder")
    try:
        return pd.read_csv(path)
    except pd.errors.EmptyDataError:
        return pd.DataFrame(columns=["design_id"])


def run_started(run_folder: Path) -> _dt.datetime | None:
    """When the run started: the first time stamp of ``log.txt`` (None if there is none)."""
    log = Path(run_folder) / "log.txt"
    try:
        with open(log, encoding="utf-8", errors="replace") as fh:
            for line in fh:
                m = _STAMP.match(line)
                if m:
                    return _dt.datetime.fromisoformat(f"{m.group(1)} {m.group(2)}")
    except OSError:
        pass
    return None


def run_date_iso(run_folder: Path) -> str:
    """The run's start date (ISO); the study file's modification date if the log has none."""
    started = run_started(run_folder)
    if started is None:
        path = Path(run_folder) / "study.yaml"
        started = _dt.datetime.fromtimestamp(path.stat().st_mtime) if path.exists() else None
    return started.date().isoformat() if started else _dt.date.today().isoformat()


def find_design(pareto: pd.DataFrame, design_id: str | int) -> int:
    """Row position of a design in the Pareto table, by its ID (``"D012"``, ``"d12"``, ``12``)."""
    ids = pareto["design_id"].astype(str).tolist() if "design_id" in pareto else []
    wanted = str(design_id).strip()
    if wanted in ids:
        return ids.index(wanted)
    m = re.fullmatch(r"[Dd]?0*(\d+)", wanted)
    if m:
        number = int(m.group(1))
        for i, d in enumerate(ids):
            dm = re.fullmatch(r"D0*(\d+)", d)
            if dm and int(dm.group(1)) == number:
                return i
    shown = ", ".join(ids[:3]) + (f", ... {ids[-1]}" if len(ids) > 3 else "")
    raise KeyError(f"design id = {design_id!r}: not in pareto.csv; expected one of "
                   f"{shown or 'nothing (the Pareto front is empty)'}")


def _pool(study: Study, name: str) -> list[str]:
    return [m.name for m in study.materials] if name == "material" else list(study.fan_names)


def designs_from_rows(study: Study, rows: pd.DataFrame) -> Design:
    """The model Design of Pareto rows, built by ``Study.design_from`` from their decision values.

    The decision values are read from the rows in SI (free variables by name; choices by the
    name of the material or fan), exactly as the search passed them to the model; the rebuilt
    sizes are then checked against the sizes the rows echo (``RunMismatchError`` if the frozen
    study does not reproduce them).
    """
    X: dict[str, np.ndarray] = {}
    for v in study.variables:
        if v.name not in rows.columns:
            raise RunMismatchError(f"pareto.csv has no column '{v.name}'; expected one for each "
                                   "free variable of study.yaml")
        col = rows[v.name].to_numpy()
        if v.kind == "choice":
            pool = _pool(study, v.name)
            try:
                X[v.name] = np.array([pool.index(str(c)) for c in col], dtype=np.int64)
            except ValueError:
                raise RunMismatchError(f"pareto.csv {v.name} = {sorted(set(map(str, col)))}; "
                                       f"expected names from study.yaml: {pool}") from None
        elif v.kind == "int":
            X[v.name] = np.rint(col.astype(float)).astype(np.int64)
        else:
            X[v.name] = col.astype(float)
    if not X:  # nothing free: the fixed design, once per row (the key only sets the count)
        X = {"_rows": np.zeros(len(rows))}
    design = study.design_from(X)
    arrays = design.arrays()
    n = len(rows)
    for col in _ECHO:
        if col in rows.columns and n:
            built = np.broadcast_to(arrays[col], (n,)).astype(float)
            given = rows[col].to_numpy(dtype=float)
            if not np.allclose(built, given, rtol=1e-12, atol=0.0):
                i = int(np.argmax(np.abs(built - given)))
                raise RunMismatchError(
                    f"{col} = {given[i]!r} in pareto.csv, but study.yaml rebuilds {built[i]!r}; "
                    "expected the run folder's own study.yaml")
    return design


def take(design: Design, index: Sequence[int] | np.ndarray) -> Design:
    """The designs at ``index`` of a population, as a new population."""
    idx = np.asarray(index, dtype=np.int64)
    arrays = design.arrays()
    return Design(**{k: v[idx] for k, v in arrays.items()})


def evaluate_rows(study: Study, rows: pd.DataFrame, scenario: int = 0) -> pd.DataFrame:
    """Evaluate Pareto rows again with the model in one scenario (0: the nominal one)."""
    if len(rows) == 0:
        return pd.DataFrame()
    design = designs_from_rows(study, rows)
    return evaluate(design, study.scenarios[scenario].conditions).reset_index(drop=True)


def check_same(table: pd.DataFrame, rows: pd.DataFrame, columns: Sequence[str],
               rtol: float = 1e-6) -> None:
    """Raise ``RunMismatchError`` where the model's table differs from pareto.csv's rows."""
    for col in columns:
        if col not in rows.columns or col not in table.columns:
            continue
        a = table[col].to_numpy(dtype=float)
        b = rows[col].to_numpy(dtype=float)
        for i, (x, y) in enumerate(zip(a, b, strict=True)):
            if not (math.isclose(x, y, rel_tol=rtol) or (math.isinf(x) and x == y)):
                who = rows["design_id"].iloc[i] if "design_id" in rows else f"row {i}"
                raise RunMismatchError(
                    f"{who}: {col} = {x!r} from the model now, {y!r} in pareto.csv; expected "
                    f"equal within {rtol:g} (has the model changed since the run?)")
