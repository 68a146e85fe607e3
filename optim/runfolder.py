"""The run folder: what a run leaves on disk, every file written atomically.

::

    <run>/study.yaml          the frozen study (defaults resolved), as run
    <run>/pareto.csv          the feasible Pareto set, one row per design (columns below)
    <run>/evaluated.csv.gz    every evaluated design (SI columns of the model's table + margins)
    <run>/convergence.csv     generation, evaluations, hypervolume, feasible fraction, ...
    <run>/log.txt             plain-text log (never terminal escape codes)
    <run>/checkpoint.pkl      the search state, for ``finfront resume``
    <run>/plots/*.png|svg     figures (optim.plots)
    <run>/parts/              records not yet merged into evaluated.csv.gz (while running;
                              pickled column dicts, see :class:`Records`)

Every column with a dimension carries its unit in its name. ``pareto.csv`` starts with the
columns an engineer reads (sizes in mm, temperatures in degC, flow in m3/h and CFM), then the
objectives, the constraint margins, the limiting constraint and the worst scenario, and ends
with the model's whole table in SI so that nothing is lost.
"""

from __future__ import annotations

import datetime as _dt
import pickle
import re
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
import yaml
from numpy.typing import ArrayLike

from optim.atomic import atomic_write, atomic_write_bytes, atomic_write_text
from optim.study_types import Study

CFM_PER_M3S = 2118.880003  # 1 m3/s in cubic feet per minute (0.3048^3 m3 per ft3, 60 s)
_ABS_T = re.compile(r"^(?:(?P<scen>[^:]+):)?(?P<base>(outlet|base|junction)_temperature(_.+)?)_K$")

# (SI column, shown column, factor) for the readable front block of pareto.csv
_LENGTH_COLS = (
    "fin_thickness_root_m",
    "fin_thickness_tip_m",
    "fin_height_m",
    "base_thickness_m",
    "base_width_m",
    "flow_length_m",
    "pitch_m",
    "gap_root_m",
    "gap_tip_m",
    "overall_height_m",
)
KEY_OUTPUTS = (
    "mass_kg",
    "junction_temperature_K",
    "base_temperature_K",
    "outlet_temperature_K",
    "junction_margin_K",
    "total_resistance_K_per_W",
    "sink_resistance_K_per_W",
    "pressure_drop_Pa",
    "system_pressure_Pa",
    "flow_m3_per_s",
    "approach_velocity_m_per_s",
    "channel_velocity_m_per_s",
    "reynolds_number",
    "fin_efficiency",
    "h_W_per_m2K",
    "fin_height_to_gap_ratio",
    "fan_air_power_W",
    "total_area_m2",
)


# ----------------------------------------------------------------------------- tables
TEXT_COLUMNS = {
    "reason": str,
    "limiting_constraint": str,
    "worst_scenario": str,
    "material": str,
    "fan": str,
    "design_id": str,
}


def read_table(path: Path, **kw: Any) -> pd.DataFrame:
    """Read a run-folder CSV (optionally gzip) with its text columns kept as text."""
    return pd.read_csv(
        path,
        dtype=TEXT_COLUMNS,
        keep_default_na=False,
        na_values=["", "nan", "NaN"],
        low_memory=False,
        **kw,
    )


# ----------------------------------------------------------------------------- atomic writes
def atomic_write_csv(df: pd.DataFrame, path: Path, compression: str | dict | None = None) -> None:
    """Write a CSV (optionally gzip) to a temporary file, then rename it over ``path``."""
    atomic_write(path, lambda tmp: df.to_csv(tmp, index=False, compression=compression))


# ----------------------------------------------------------------------------- record batches
class Records:
    """A record table held as named columns of one length: numpy arrays, and pandas
    Categoricals for coded text (the model's ``reason``).

    The search keeps its rows in this form: taking rows and joining the batches of several
    generations is numpy work per column, where the same on DataFrames costs about a
    millisecond per operation (one pandas block per column). A DataFrame is built only when
    one is read (:meth:`frame`): for the run folder's files, the Pareto table, the plots.
    """

    __slots__ = ("columns",)

    def __init__(self, columns: dict[str, Any]) -> None:
        self.columns = columns

    @classmethod
    def from_frame(cls, df: pd.DataFrame) -> Records:
        """The columns of a DataFrame (views, not copies; the index is dropped)."""
        names = df.columns.tolist()
        if len(set(names)) != len(names):
            raise ValueError(f"record table with repeated column names: {names}")
        get = getattr(df, "_get_column_array", None)  # pandas internals: no Series per column
        if get is not None:
            return cls({c: get(i) for i, c in enumerate(names)})
        cols = {}
        for c in names:
            s = df[c]
            cols[c] = s.to_numpy() if isinstance(s.dtype, np.dtype) else s.array
        return cls(cols)

    def __len__(self) -> int:
        for v in self.columns.values():
            return len(v)
        return 0

    def __contains__(self, name: str) -> bool:
        return name in self.columns

    def __getitem__(self, name: str) -> Any:
        return self.columns[name]

    def take(self, rows: np.ndarray) -> Records:
        """The rows at positions ``rows`` (copies)."""
        rows = np.asarray(rows, dtype=np.int64)
        return Records({k: v[rows] for k, v in self.columns.items()})

    @classmethod
    def concat(cls, batches: list[Records]) -> Records:
        """The batches one after the other (as ``pd.concat(..., ignore_index=True)`` of their
        frames would join them)."""
        batches = [b for b in batches if b is not None]
        if len(batches) == 1:
            return batches[0]
        if not batches:
            return cls({})
        keys = list(batches[0].columns)
        same = all(list(b.columns) == keys for b in batches[1:])
        cols: dict[str, Any] = {}
        for k in keys if same else ():
            parts = [b.columns[k] for b in batches]
            first = parts[0]
            if isinstance(first, np.ndarray):
                if not all(isinstance(p, np.ndarray) and p.dtype == first.dtype for p in parts):
                    same = False
                    break
                cols[k] = np.concatenate(parts)
            elif isinstance(first, pd.api.extensions.ExtensionArray) and all(
                type(p) is type(first) and p.dtype == first.dtype for p in parts
            ):
                cols[k] = type(first)._concat_same_type(parts)  # the ExtensionArray interface
            else:
                same = False
                break
        if not same:  # columns or dtypes differ between batches: pandas' own rules
            return cls.from_frame(pd.concat([b.frame() for b in batches], ignore_index=True))
        return cls(cols)

    def frame(self) -> pd.DataFrame:
        """The records as a DataFrame (index 0..n-1)."""
        return pd.DataFrame(self.columns) if self.columns else pd.DataFrame()


# ----------------------------------------------------------------------------- display units
def display(column: str) -> tuple[str, float, float]:
    """How to show an SI column to an engineer: (label, factor, offset), value*factor+offset.

    Lengths in mm, absolute temperatures in degC, flows in m3/h, areas in cm2; the rest as is.
    """
    name = column
    m = _ABS_T.match(column)
    if m:
        return f"{m.group('base').replace('_', ' ')} (degC)", 1.0, -273.15
    pretty = name.replace("_", " ")
    for suffix, unit, factor in (
        ("_m3_per_s", "m^3/h", 3600.0),
        ("_K_per_W", "K/W", 1.0),
        ("_m_per_s", "m/s", 1.0),
        ("_W_per_m2K", "W/m^2K", 1.0),
        ("_m2", "cm^2", 1e4),
        ("_kg", "g", 1e3),
        ("_Pa", "Pa", 1.0),
        ("_W", "W", 1.0),
        ("_K", "K", 1.0),
        ("_m", "mm", 1e3),
    ):
        if name.endswith(suffix):
            base = name[: -len(suffix)].replace("_", " ")
            if suffix == "_kg":
                return f"{base} (g)", factor, 0.0
            return f"{base} ({unit})", factor, 0.0
    return pretty, 1.0, 0.0


def shown(values: ArrayLike, column: str) -> np.ndarray:
    _, f, o = display(column)
    return np.asarray(values, dtype=float) * f + o


# ----------------------------------------------------------------------------- pareto table
PARETO_MAX = 200  # designs in pareto.csv; the whole archive stays in evaluated.csv.gz


def spread_subset(F: np.ndarray, k: int) -> np.ndarray:
    """Indices of ``k`` rows of ``F`` (objectives, to be minimised) spread evenly over the front.

    Greedy farthest-point selection in objective space scaled to [0, 1] per objective: the best
    design of each objective first, then repeatedly the design farthest from all chosen ones.
    Deterministic (ties go to the lower index). Returns all rows, in order, when k >= len(F).
    """
    n = len(F)
    if n <= k:
        return np.arange(n)
    span = F.max(axis=0) - F.min(axis=0)
    Z = (F - F.min(axis=0)) / np.where(span > 0, span, 1.0)
    chosen = list(dict.fromkeys(int(i) for i in np.argmin(Z, axis=0)))[:k]
    dist = np.full(n, np.inf)
    for i in chosen:
        dist = np.minimum(dist, np.sum((Z - Z[i]) ** 2, axis=1))
    while len(chosen) < k:
        i = int(np.argmax(dist))
        chosen.append(i)
        dist = np.minimum(dist, np.sum((Z - Z[i]) ** 2, axis=1))
    return np.sort(np.array(chosen))


def pareto_table(records: pd.DataFrame | None, study: Study) -> pd.DataFrame:
    """The columns of ``pareto.csv`` from archive records (sorted by the first objective).

    A front larger than ``PARETO_MAX`` designs (continuous variables make long, dense fronts)
    is thinned to that many, spread evenly along it (:func:`spread_subset`).
    """
    if records is None or len(records) == 0:
        records = pd.DataFrame(columns=["eval_id"])
    rec = records
    cols = [o.column for o in study.objectives]
    if len(rec) > PARETO_MAX and all(c in rec for c in cols):
        F = np.column_stack(
            [
                rec[o.column].to_numpy(dtype=float) * (1.0 if o.sense == "min" else -1.0)
                for o in study.objectives
            ]
        )
        rec = rec.iloc[spread_subset(F, PARETO_MAX)]
    rec = rec.copy()
    obj0 = study.objectives[0]
    if obj0.column in rec and len(rec):
        rec = rec.sort_values(obj0.column, ascending=obj0.sense == "min", kind="stable")
    rec = rec.reset_index(drop=True)
    out: dict[str, object] = {}
    out["design_id"] = [f"D{i + 1:03d}" for i in range(len(rec))]
    for col in ("eval_id", "generation"):
        if col in rec:
            out[col] = rec[col].to_numpy()
    if "fin_count" in rec:
        out["fin_count"] = rec["fin_count"].to_numpy()
    for col in _LENGTH_COLS:
        if col in rec:
            out[col[:-2] + "_mm"] = rec[col].to_numpy(dtype=float) * 1e3
    for v in study.variables:  # decision values the table does not echo (pitch, taper, ...)
        if v.name in rec and v.name not in out and v.name not in _LENGTH_COLS:
            if v.name.endswith("_m"):
                out[v.name[:-2] + "_mm"] = rec[v.name].to_numpy(dtype=float) * 1e3
            else:
                out[v.name] = rec[v.name].to_numpy()
    for col in ("material", "fan"):
        if col in rec:
            out[col] = rec[col].to_numpy()
    for o in study.objectives:
        if o.column in rec:
            out[o.column] = rec[o.column].to_numpy()
    for c in rec.columns:
        if c.startswith("margin_"):
            out[c] = rec[c].to_numpy()
    for col in ("limiting_constraint", "worst_scenario"):
        if col in rec:
            out[col] = rec[col].to_numpy()
    for col in KEY_OUTPUTS:
        if col in rec and col not in out:
            out[col] = rec[col].to_numpy()
        if col == "flow_m3_per_s" and col in rec:
            out["flow_m3_per_h"] = rec[col].to_numpy(dtype=float) * 3600.0
            out["flow_CFM"] = rec[col].to_numpy(dtype=float) * CFM_PER_M3S
    for c in rec.columns:  # the whole table, SI
        if c not in out:
            out[c] = rec[c].to_numpy()
    table = pd.DataFrame(out)
    return add_degC(table)


def add_degC(table: pd.DataFrame) -> pd.DataFrame:
    """Insert a ``_degC`` column right after every absolute-temperature ``_K`` column."""
    cols = list(table.columns)
    data = {}
    for c in cols:
        data[c] = table[c]
        m = _ABS_T.match(c)
        if m and c[:-2] + "_degC" not in table.columns:
            data[c[:-2] + "_degC"] = pd.to_numeric(table[c], errors="coerce") - 273.15
    return pd.DataFrame(data)


# ----------------------------------------------------------------------------- the folder
class RunFolderError(RuntimeError):
    """A run folder that cannot be created or read."""


class RunFolder:
    """Paths and writers of one run folder."""

    def __init__(self, path: Path) -> None:
        self.path = Path(path)

    # paths
    study_file = property(lambda self: self.path / "study.yaml")
    pareto_file = property(lambda self: self.path / "pareto.csv")
    evaluated_file = property(lambda self: self.path / "evaluated.csv.gz")
    convergence_file = property(lambda self: self.path / "convergence.csv")
    log_file = property(lambda self: self.path / "log.txt")
    checkpoint_file = property(lambda self: self.path / "checkpoint.pkl")
    parts_dir = property(lambda self: self.path / "parts")
    plots_dir = property(lambda self: self.path / "plots")

    @staticmethod
    def default_path(study_name: str, root: Path | str = "runs") -> Path:
        stamp = _dt.datetime.now().strftime("%Y%m%d-%H%M%S")
        safe = re.sub(r"[^A-Za-z0-9_.-]+", "-", study_name).strip("-") or "study"
        return Path(root) / f"{safe}-{stamp}"

    @classmethod
    def create(cls, path: Path, frozen_study: dict) -> RunFolder:
        """Make a new run folder (it must not exist, or be empty) with the frozen study."""
        path = Path(path)
        if path.exists() and (not path.is_dir() or any(path.iterdir())):
            raise RunFolderError(
                f"--out: '{path}' already exists and is not empty; expected a new folder "
                "(use 'finfront resume' to continue a run)"
            )
        path.mkdir(parents=True, exist_ok=True)
        folder = cls(path)
        folder.parts_dir.mkdir()
        text = yaml.safe_dump(_plain(frozen_study), sort_keys=False, allow_unicode=True)
        atomic_write_text(folder.study_file, text)
        return folder

    @classmethod
    def open(cls, path: Path) -> RunFolder:
        path = Path(path)
        if not path.is_dir():
            raise RunFolderError(f"'{path}': no such run folder")
        folder = cls(path)
        folder.parts_dir.mkdir(exist_ok=True)
        return folder

    # log
    def log(self, message: str) -> None:
        stamp = _dt.datetime.now().strftime("%Y-%m-%d %H:%M:%S")
        with open(self.log_file, "a", encoding="utf-8") as fh:
            for line in str(message).splitlines() or [""]:
                fh.write(f"{stamp}  {line}\n")

    # records
    def write_part(self, generation: int, records: pd.DataFrame | Records) -> None:
        """Records up to ``generation`` since the previous part (a pickle: written often,
        read once by :meth:`merge_evaluated`). :class:`Records` are stored as their plain
        column dict, without building a DataFrame."""
        path = self.parts_dir / f"gen-{generation:06d}.pkl"
        obj = records.columns if isinstance(records, Records) else records
        atomic_write_bytes(path, pickle.dumps(obj, protocol=pickle.HIGHEST_PROTOCOL))

    def _parts(self) -> list[Path]:
        return sorted(self.parts_dir.glob("gen-*.pkl"))

    @staticmethod
    def _read_parts(paths: list[Path]) -> list[pd.DataFrame]:
        """The parts as DataFrames; runs of column-dict parts are joined before the frame is
        built (one DataFrame instead of one per part)."""
        frames: list[pd.DataFrame] = []
        run: list[Records] = []
        for p in paths:
            obj = pd.read_pickle(p)
            if isinstance(obj, dict):
                run.append(Records(obj))
                continue
            if run:
                frames.append(Records.concat(run).frame())
                run = []
            frames.append(obj)
        if run:
            frames.append(Records.concat(run).frame())
        return frames

    def drop_parts_after(self, generation: int) -> None:
        """Forget records of generations after ``generation`` (resume from a checkpoint)."""
        for p in self._parts():
            if int(p.name[4:10]) > generation:
                p.unlink()

    def merge_evaluated(self, up_to_generation: int) -> int:
        """Gather ``evaluated.csv.gz`` (earlier merges + parts) up to a generation; return rows."""
        frames = []
        if self.evaluated_file.exists():
            old = read_table(self.evaluated_file)
            if "generation" in old:
                old = old[old["generation"] <= up_to_generation]
            frames.append(old)
        parts = self._parts()
        frames += self._read_parts([p for p in parts if int(p.name[4:10]) <= up_to_generation])
        frames = [f for f in frames if len(f)]
        if not frames:
            return 0
        df = pd.concat(frames, ignore_index=True)
        if "eval_id" in df:
            df = df.drop_duplicates("eval_id").sort_values("eval_id", kind="stable")
        # gzip level 1: a tenth larger than level 9, and the write takes half the time
        atomic_write_csv(
            df, self.evaluated_file, compression={"method": "gzip", "compresslevel": 1}
        )
        for p in parts:
            p.unlink()
        return len(df)

    def read_evaluated(self) -> pd.DataFrame:
        frames = []
        if self.evaluated_file.exists():
            frames.append(read_table(self.evaluated_file))
        frames += self._read_parts(self._parts())
        return pd.concat(frames, ignore_index=True) if frames else pd.DataFrame()

    def write_pareto(self, table: pd.DataFrame) -> None:
        atomic_write_csv(table, self.pareto_file)

    def write_convergence(self, table: pd.DataFrame) -> None:
        atomic_write_csv(table, self.convergence_file)


def _plain(obj):
    """Make a structure safe for yaml.safe_dump (tuples to lists, numpy scalars to Python)."""
    if isinstance(obj, dict):
        return {str(k): _plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_plain(v) for v in obj]
    if isinstance(obj, np.generic):
        return obj.item()
    if isinstance(obj, Path):
        return str(obj)
    return obj
