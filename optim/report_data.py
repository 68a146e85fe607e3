"""Everything the report shows, read from a run folder (and the model), in one object.

The Pareto designs are rebuilt from ``pareto.csv`` through the frozen ``study.yaml`` and
evaluated again in every scenario (one vectorized call per scenario): the nominal table must
repeat pareto.csv (a difference is reported at the top of the report), and the other
scenarios give the validity flags that pareto.csv holds only for the nominal one.
"""

from __future__ import annotations

import datetime as _dt
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from models.contract import Design
from optim.profile_outline import ProfileDims
from optim.report_run import (
    RunMismatchError,
    check_same,
    designs_from_rows,
    load_run_study,
    read_pareto,
    run_started,
    take,
)
from optim.study_types import Study

MAX_BACKGROUND = 2500  # other feasible designs drawn behind the front, at most
FLAG_COLUMNS = ("in_range_flow", "in_range_fin", "in_fan_data")
CHECKED = ("mass_kg", "junction_temperature_K", "total_resistance_K_per_W",
           "sink_resistance_K_per_W", "pressure_drop_Pa")


@dataclass
class Pick:
    """One design picked for discussion (knee, best of an objective)."""

    label: str
    index: int  # row position in the Pareto table
    row: pd.Series  # its pareto.csv row
    design: Design  # its model design (one element)
    dims: ProfileDims

    @property
    def design_id(self) -> str:
        return str(self.row.get("design_id", f"row {self.index + 1}"))


@dataclass
class RunData:
    folder: Path
    study: Study
    pareto: pd.DataFrame
    convergence: pd.DataFrame
    picks: list[Pick]
    scenario_tables: list[pd.DataFrame]  # Pareto designs re-evaluated, one per scenario
    designs: Design | None = None  # the model designs of the Pareto rows
    started: _dt.datetime | None = None
    stop_line: str | None = None
    evaluated_count: int | None = None
    background: pd.DataFrame = field(default_factory=pd.DataFrame)
    evaluated_flags: dict[str, int] = field(default_factory=dict)
    evaluated_feasible: int | None = None
    mismatch: str | None = None
    version: str = ""


def _stop_line(folder: Path) -> str | None:
    """The last 'stopped: ...' line of the run's log, without its time stamp."""
    last = None
    try:
        with open(folder / "log.txt", encoding="utf-8", errors="replace") as fh:
            for line in fh:
                m = re.match(r"^\S+ \S+\s+(stopped: .*)$", line.rstrip("\n"))
                if m:
                    last = m.group(1)
    except OSError:
        pass
    return last


def _convergence(folder: Path) -> pd.DataFrame:
    try:
        return pd.read_csv(folder / "convergence.csv")
    except (OSError, pd.errors.EmptyDataError):
        return pd.DataFrame(columns=["generation", "evaluations", "hypervolume",
                                     "feasible_fraction"])


def _evaluated(folder: Path, study: Study) -> tuple[pd.DataFrame, dict[str, int], int | None,
                                                    int | None]:
    """(feasible background sample, flag counts among feasible designs, feasible, total)."""
    path = folder / "evaluated.csv.gz"
    if not path.is_file():
        return pd.DataFrame(), {}, None, None
    wanted = {o.column for o in study.objectives} | set(FLAG_COLUMNS) | {"feasible", "valid"}
    try:
        ev = pd.read_csv(path, usecols=lambda c: c in wanted)
    except (OSError, ValueError, pd.errors.EmptyDataError):
        return pd.DataFrame(), {}, None, None
    total = len(ev)
    if "feasible" in ev:
        ev = ev[ev["feasible"].astype(bool)]
    flags = {c: int((~ev[c].astype(bool)).sum()) for c in FLAG_COLUMNS if c in ev}
    feasible = len(ev)
    if len(ev) > MAX_BACKGROUND:
        ev = ev.sample(MAX_BACKGROUND, random_state=0)
    return ev.reset_index(drop=True), flags, feasible, total


def _picks(pareto: pd.DataFrame, study: Study, design: Design | None) -> list[Pick]:
    if len(pareto) == 0 or design is None:
        return []
    from optim.plots import picked_designs

    out = []
    for label, i in picked_designs(pareto, study):
        one = take(design, [i])
        out.append(Pick(label=label, index=int(i), row=pareto.iloc[i], design=one,
                        dims=ProfileDims.from_design(one, 0)))
    return out


def load_run(run_folder: Path) -> RunData:
    """Read a run folder and evaluate its Pareto designs again (every scenario)."""
    from optim.api import version

    folder = Path(run_folder)
    study = load_run_study(folder)
    pareto = read_pareto(folder)
    tables: list[pd.DataFrame] = []
    design = None
    mismatch = None
    if len(pareto):
        design = designs_from_rows(study, pareto)
        from models.evaluate import evaluate

        tables = [evaluate(design, s.conditions).reset_index(drop=True) for s in study.scenarios]
        try:
            check_same(tables[0], pareto, CHECKED)
        except RunMismatchError as exc:
            mismatch = str(exc)
    background, flags, feasible, total = _evaluated(folder, study)
    conv = _convergence(folder)
    if total is None and len(conv) and "evaluations" in conv:
        total = int(conv["evaluations"].iloc[-1])
    return RunData(
        folder=folder, study=study, pareto=pareto, convergence=conv,
        picks=_picks(pareto, study, design), scenario_tables=tables, designs=design,
        started=run_started(folder), stop_line=_stop_line(folder), evaluated_count=total,
        background=background, evaluated_flags=flags, evaluated_feasible=feasible,
        mismatch=mismatch, version=version(),
    )


def objective_values(table: pd.DataFrame, study: Study) -> np.ndarray:
    """(n, m) objective columns of a table, as stored (SI)."""
    return np.column_stack([table[o.column].to_numpy(dtype=float) for o in study.objectives])
