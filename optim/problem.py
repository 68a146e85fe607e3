"""The pymoo problem of a study: decision vector <-> designs, scenarios, objectives, constraints.

One call evaluates a whole population: the decision matrix becomes one :class:`Design`
(through ``Study.design_from``), every scenario is one ``models.evaluate`` call for the whole
population (through a runner: serial, local processes or Dask, see ``optim.parallel``), and
the tables become

- objectives ``F`` from the first (nominal) scenario, negated where the study maximises;
- inequality constraints ``G <= 0``, one per study constraint, as normalised margins
  ``(value - limit)/|limit|`` for ``<=`` and ``(limit - value)/|limit|`` for ``>=`` (divided by 1
  in the column's SI unit when the limit is 0), the worst over all scenarios; plus one last
  constraint, the fraction of scenarios in which the model flags the design invalid
  (``valid=False``), so that an impossible design is never feasible;
- a record table per design: the nominal scenario's whole table, the decision values, the
  constraint margins (``margin_<label>`` = -G, a fraction of the limit, positive when met),
  the limiting constraint, the worst scenario, and for every further scenario its constrained
  columns as ``<scenario>:<column>``.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd
from pymoo.core.duplicate import DuplicateElimination
from pymoo.core.problem import Problem
from pymoo.core.repair import Repair
from pymoo.core.sampling import Sampling

from models.contract import Conditions, Design
from optim.study_types import Study

# (design, [conditions per scenario]) -> one table per scenario (see optim.parallel)
Runner = Callable[[Design, list[Conditions]], list[pd.DataFrame]]

INVALID_LABEL = "model validity"
PENALTY = 1e30  # objective value given to designs whose objective is NaN (never feasible)


class VariableCodec:
    """Maps pymoo's real decision matrix to named arrays and back.

    Integer variables (``kind='int'``) and choices (``kind='choice'``, an index into the
    variable's ``choices``) are rounded; reals are used as they are.
    """

    def __init__(self, study: Study) -> None:
        self.study = study
        self.variables = tuple(study.variables)
        self.names = tuple(v.name for v in self.variables)
        lo, hi, integer = [], [], []
        for v in self.variables:
            if v.kind == "choice":
                lo.append(0.0)
                hi.append(float(len(v.choices) - 1))
                integer.append(True)
            else:
                lo.append(float(v.lower))
                hi.append(float(v.upper))
                integer.append(v.kind == "int")
        self.xl = np.array(lo, dtype=float)
        self.xu = np.array(hi, dtype=float)
        self.integer = np.array(integer, dtype=bool)
        # choice index -> index into the study's list (materials / fan_names)
        self._choice_maps: dict[str, np.ndarray] = {}
        for v in self.variables:
            if v.kind == "choice":
                pool = self._pool(v.name)
                self._choice_maps[v.name] = np.array([pool.index(c) for c in v.choices])

    def _pool(self, name: str) -> list[str]:
        if name == "material":
            return [m.name for m in self.study.materials]
        if name == "fan":
            return list(self.study.fan_names)
        raise ValueError(f"variables.{name}: a choice variable must be 'material' or 'fan'")

    @property
    def n_var(self) -> int:
        return len(self.variables)

    def repair(self, X: np.ndarray) -> np.ndarray:
        """Clip to the bounds and round the integer and choice columns (a copy)."""
        X = np.clip(np.asarray(X, dtype=float), self.xl, self.xu)
        X[:, self.integer] = np.rint(X[:, self.integer])
        return X

    def decode(self, X: np.ndarray) -> dict[str, np.ndarray]:
        """Named arrays for ``Study.design_from`` (choices as indices into the study's lists)."""
        X = self.repair(np.atleast_2d(X))
        out: dict[str, np.ndarray] = {}
        for j, v in enumerate(self.variables):
            col = X[:, j]
            if v.kind == "choice":
                out[v.name] = self._choice_maps[v.name][col.astype(np.int64)]
            elif v.kind == "int":
                out[v.name] = col.astype(np.int64)
            else:
                out[v.name] = col
        return out

    def labels(self, X: np.ndarray) -> dict[str, np.ndarray]:
        """Decision values for the outputs: numbers, and choice names as text."""
        X = self.repair(np.atleast_2d(X))
        out: dict[str, np.ndarray] = {}
        for j, v in enumerate(self.variables):
            if v.kind == "choice":
                out[v.name] = np.asarray(v.choices, dtype=object)[X[:, j].astype(np.int64)]
            elif v.kind == "int":
                out[v.name] = X[:, j].astype(np.int64)
            else:
                out[v.name] = X[:, j]
        return out

    def grid_axes(self, points: int) -> list[np.ndarray]:
        """Values of each variable in an exhaustive sweep: every integer (thinned to at most
        ``4*points`` values over a wide range), every choice, ``points`` values per real."""
        axes = []
        for j in range(self.n_var):
            if self.integer[j]:
                vals = np.arange(self.xl[j], self.xu[j] + 0.5)
                if vals.size > 4 * points:
                    vals = np.unique(np.rint(np.linspace(self.xl[j], self.xu[j], 4 * points)))
            else:
                vals = np.linspace(self.xl[j], self.xu[j], max(points, 2))
            axes.append(vals.astype(float))
        return axes

    def grid_size(self, points: int) -> int:
        return int(np.prod([a.size for a in self.grid_axes(points)], dtype=np.float64))


@dataclass
class Evaluation:
    """What one population's evaluation gives: pymoo's F and G, and the record table."""

    F: np.ndarray
    G: np.ndarray
    records: pd.DataFrame

    @property
    def feasible(self) -> np.ndarray:
        return np.all(self.G <= 0.0, axis=1)


class HeatSinkProblem(Problem):
    """The pymoo problem of a :class:`Study` (vectorized: one evaluate call per scenario).

    ``runner`` evaluates ``(design, [conditions, ...])`` and returns one table per scenario;
    ``None`` means serial. The runner is not pickled: re-attach it after loading a checkpoint
    with :meth:`attach_runner`.
    """

    def __init__(self, study: Study, runner: Runner | None = None) -> None:
        self.study = study
        self.codec = VariableCodec(study)
        self.runner = runner
        self.pending: list[pd.DataFrame] = []  # records not yet handed to the run folder
        self.model_seconds = 0.0  # wall time spent inside the runner (model + transport)
        self.eval_calls = 0
        super().__init__(
            n_var=self.codec.n_var,
            n_obj=len(study.objectives),
            n_ieq_constr=len(study.constraints) + 1,
            xl=self.codec.xl,
            xu=self.codec.xu,
            vtype=float,
        )

    # ----- pickling: the runner (process pool, Dask client) never goes into a checkpoint
    def __getstate__(self) -> dict:
        state = dict(super().__getstate__())
        state["runner"] = None
        return state

    def attach_runner(self, runner: Runner | None) -> None:
        self.runner = runner

    # ----- evaluation
    def _run_model(self, design: Design) -> list[pd.DataFrame]:
        conditions = [s.conditions for s in self.study.scenarios]
        t0 = time.perf_counter()
        if self.runner is None:
            from models.evaluate import evaluate

            tables = [evaluate(design, c) for c in conditions]
        else:
            tables = self.runner(design, conditions)
        self.model_seconds += time.perf_counter() - t0
        self.eval_calls += 1
        return [t.reset_index(drop=True) for t in tables]

    def evaluate_population(self, X: np.ndarray) -> Evaluation:
        """Evaluate a decision matrix (n, n_var): objectives, constraints and records."""
        X = self.codec.repair(np.atleast_2d(X))
        n = X.shape[0]
        design = self.study.design_from(self.codec.decode(X))
        tables = self._run_model(design)
        nominal = tables[0]
        F = np.empty((n, self.n_obj))
        for i, obj in enumerate(self.study.objectives):
            v = _column(nominal, obj.column, "objective").astype(float)
            F[:, i] = -v if obj.sense == "max" else v
        F = np.where(np.isfinite(F), F, PENALTY)

        cons = self.study.constraints
        n_s = len(tables)
        Gs = np.empty((n_s, n, len(cons)))  # per scenario
        invalid = np.zeros((n_s, n), dtype=bool)
        for s, table in enumerate(tables):
            invalid[s] = ~table["valid"].to_numpy(dtype=bool)
            for j, c in enumerate(cons):
                v = _column(table, c.column, "constraint").astype(float)
                scale = abs(c.limit) if c.limit != 0 else 1.0
                g = (v - c.limit) / scale if c.sense == "<=" else (c.limit - v) / scale
                Gs[s, :, j] = np.where(np.isfinite(g), g, 1.0)
        G_user = Gs.max(axis=0) if cons else np.zeros((n, 0))
        G_valid = invalid.mean(axis=0)
        G = np.column_stack([G_user, G_valid])

        records = self._records(X, tables, Gs, G_user, invalid)
        return Evaluation(F=F, G=G, records=records)

    def _records(self, X, tables, Gs, G_user, invalid) -> pd.DataFrame:
        names = [s.name for s in self.study.scenarios]
        n = X.shape[0]
        nominal = tables[0]
        rec = {}
        for k, v in self.codec.labels(X).items():
            if k not in nominal.columns:
                rec[k] = v
        # choice columns as names even where the table echoes an index
        for idx_col, name_col, pool in (
            ("fan_index", "fan", list(self.study.fan_names)),
        ):
            if name_col not in rec and idx_col in nominal.columns and pool:
                rec[name_col] = np.asarray(pool, dtype=object)[
                    nominal[idx_col].to_numpy(dtype=np.int64)
                ]
        if "material" not in rec:
            fixed = self.study.fixed.get("material")
            if isinstance(fixed, str):
                rec["material"] = np.full(n, fixed, dtype=object)
            elif len(self.study.materials) == 1:
                rec["material"] = np.full(n, self.study.materials[0].name, dtype=object)
        labels = [c.label for c in self.study.constraints]
        back: dict[str, np.ndarray] = {}
        for j, lab in enumerate(labels):
            back[f"margin_{lab}"] = -G_user[:, j]
        bad_any = invalid.any(axis=0)
        if labels:
            worst_j = np.argmax(G_user, axis=1)
            limiting = np.asarray(labels, dtype=object)[worst_j]
            per_scen = Gs[:, np.arange(n), worst_j]  # (n_s, n): the limiting constraint
            worst_s = np.argmax(per_scen, axis=0)
        else:
            limiting = np.full(n, "none", dtype=object)
            worst_s = np.zeros(n, dtype=np.int64)
        first_bad = np.argmax(invalid, axis=0)
        worst_s = np.where(bad_any, first_bad, worst_s)
        reasons = np.empty(n, dtype=object)
        for s, table in enumerate(tables):
            r = table["reason"].astype(str).to_numpy() if "reason" in table else np.full(n, "")
            take = bad_any & (first_bad == s)
            reasons[take] = r[take]
        limiting = np.where(bad_any, np.char.add(f"{INVALID_LABEL}: ", reasons.astype(str)),
                            limiting).astype(object)
        back["limiting_constraint"] = limiting
        back["worst_scenario"] = np.asarray(names, dtype=object)[worst_s]
        back["feasible"] = np.all(G_user <= 0, axis=1) & ~bad_any
        cols = sorted({c.column for c in self.study.constraints})
        for s in range(1, len(tables)):
            for c in cols:
                if c in tables[s]:
                    back[f"{names[s]}:{c}"] = tables[s][c].to_numpy()
            back[f"{names[s]}:valid"] = ~invalid[s]
        return pd.concat([pd.DataFrame(rec), nominal, pd.DataFrame(back)], axis=1)

    def _evaluate(self, X, out, *args, **kwargs) -> None:
        ev = self.evaluate_population(X)
        out["F"] = ev.F
        out["G"] = ev.G
        self.pending.append(ev.records)

    def drain(self) -> pd.DataFrame | None:
        """The records evaluated since the last call (None if there were none)."""
        if not self.pending:
            return None
        df = pd.concat(self.pending, ignore_index=True)
        self.pending = []
        return df


def _column(table: pd.DataFrame, column: str, role: str) -> np.ndarray:
    if column not in table.columns:
        raise KeyError(f"{role} column '{column}' is not in the model's table")
    return table[column].to_numpy()


class MixedRepair(Repair):
    """Rounds the integer and choice columns of a decision matrix and clips to the bounds."""

    def _do(self, problem: HeatSinkProblem, X: np.ndarray, **kwargs) -> np.ndarray:
        return problem.codec.repair(X)


class MixedSampling(Sampling):
    """Uniform sampling: reals uniform in their bounds, integers and choices uniform over
    their values (every value equally likely)."""

    def _do(self, problem: HeatSinkProblem, n_samples: int, *args,
            random_state: np.random.Generator | None = None, **kwargs) -> np.ndarray:
        rng = random_state if random_state is not None else np.random.default_rng()
        return uniform_sample(problem.codec, n_samples, rng)


def uniform_sample(codec: VariableCodec, n: int, rng: np.random.Generator) -> np.ndarray:
    X = codec.xl + rng.random((n, codec.n_var)) * (codec.xu - codec.xl)
    for j in np.flatnonzero(codec.integer):
        X[:, j] = rng.integers(int(codec.xl[j]), int(codec.xu[j]) + 1, size=n)
    return X


class ExactDuplicates(DuplicateElimination):
    """Drops designs whose (repaired) decision vector equals another's, by sorting rows:
    O(n log n), where pymoo's default compares every pair of designs (O(n^2) distances)."""

    def _do(self, pop, other, is_duplicate):
        X = pop.get("X")
        if other is None:
            _, first = np.unique(X, axis=0, return_index=True)
            dup = np.ones(len(X), dtype=bool)
            dup[first] = False
        else:
            Y = other.get("X")
            both = np.vstack([Y, X])
            _, inverse = np.unique(both, axis=0, return_inverse=True)
            inverse = inverse.ravel()
            dup = np.isin(inverse[len(Y):], inverse[: len(Y)])
        is_duplicate[dup] = True
        return is_duplicate
