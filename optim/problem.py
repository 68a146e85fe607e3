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

The records are kept as column arrays (:class:`optim.runfolder.Records`), not DataFrames: a
DataFrame operation costs about a millisecond on the model's table (one pandas block per
column), as much as the model itself on a population of a hundred. ``Evaluation.records``
builds the DataFrame when one is asked for.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from pymoo.core.duplicate import DuplicateElimination
from pymoo.core.problem import Problem
from pymoo.core.repair import Repair
from pymoo.core.sampling import Sampling

from models.contract import Conditions, Design
from optim.runfolder import Records
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

    def decode(self, X: np.ndarray, repaired: bool = False) -> dict[str, np.ndarray]:
        """Named arrays for ``Study.design_from`` (choices as indices into the study's lists);
        ``repaired=True`` skips the repair of an ``X`` that :meth:`repair` gave."""
        X = np.atleast_2d(X) if repaired else self.repair(np.atleast_2d(X))
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

    def labels(self, X: np.ndarray, repaired: bool = False) -> dict[str, np.ndarray]:
        """Decision values for the outputs: numbers, and choice names as text."""
        X = np.atleast_2d(X) if repaired else self.repair(np.atleast_2d(X))
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
    """What one population's evaluation gives: pymoo's F and G, and the record rows (as
    column arrays in ``batch``; ``records`` is the same as a DataFrame)."""

    F: np.ndarray
    G: np.ndarray
    batch: Records
    _feasible: np.ndarray | None = field(default=None, repr=False, compare=False)

    @property
    def feasible(self) -> np.ndarray:
        """Every constraint met (G <= 0), per design."""
        if self._feasible is None:
            self._feasible = np.all(self.G <= 0.0, axis=1)
        return self._feasible

    @property
    def records(self) -> pd.DataFrame:
        """The record table, one row per design (built on each call)."""
        return self.batch.frame()

    def with_leading(self, **columns: np.ndarray) -> None:
        """Put ``columns`` in front of the record columns (eval_id, generation, ...)."""
        clash = set(columns) & set(self.batch.columns)
        if clash:
            raise ValueError(f"record columns given twice: {sorted(clash)}")
        self.batch = Records({**columns, **self.batch.columns})

    @staticmethod
    def concat(parts: list[Evaluation]) -> Evaluation:
        if len(parts) == 1:
            return parts[0]
        return Evaluation(F=np.concatenate([p.F for p in parts]),
                          G=np.concatenate([p.G for p in parts]),
                          batch=Records.concat([p.batch for p in parts]))


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
        self.pending: list[Evaluation] = []  # evaluated through pymoo, not yet drained
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
        return tables

    def evaluate_population(self, X: np.ndarray) -> Evaluation:
        """Evaluate a decision matrix (n, n_var): objectives, constraints and records."""
        X = self.codec.repair(np.atleast_2d(X))
        n = X.shape[0]
        design = self.study.design_from(self.codec.decode(X, repaired=True))
        tables = [Records.from_frame(t) for t in self._run_model(design)]
        for t in tables:
            if len(t) != n:
                raise RuntimeError(f"the model returned {len(t)} rows for {n} designs")
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
        limit, scale, upper = self._limits()
        for s, table in enumerate(tables):
            invalid[s] = ~np.asarray(_column(table, "valid", "validity"), dtype=bool)
            if cons:
                V = np.column_stack([_column(table, c.column, "constraint") for c in cons])
                V = V.astype(float)
                g = np.where(upper, V - limit, limit - V) / scale
                Gs[s] = np.where(np.isfinite(g), g, 1.0)
        G_user = Gs.max(axis=0) if cons else np.zeros((n, 0))
        G_valid = invalid.sum(axis=0, dtype=np.float64) / n_s  # = invalid.mean(axis=0)
        G = np.column_stack([G_user, G_valid])

        batch = self._records(X, tables, Gs, G_user, invalid)
        return Evaluation(F=F, G=G, batch=batch)

    def _limits(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Per constraint: the limit, the margin's scale and whether it is an upper limit."""
        cached = self.__dict__.get("_limits_cache")
        if cached is None:
            cons = self.study.constraints
            limit = np.array([c.limit for c in cons], dtype=float)
            scale = np.where(limit != 0, np.abs(limit), 1.0)
            upper = np.array([c.sense == "<=" for c in cons], dtype=bool)
            cached = self.__dict__["_limits_cache"] = (limit, scale, upper)
        return cached

    def _records(self, X, tables: list[Records], Gs, G_user, invalid) -> Records:
        names = [s.name for s in self.study.scenarios]
        n = X.shape[0]
        nominal = tables[0]
        rec = {}
        for k, v in self.codec.labels(X, repaired=True).items():
            if k not in nominal:
                rec[k] = v
        # choice columns as names even where the table echoes an index
        for idx_col, name_col, pool in (
            ("fan_index", "fan", list(self.study.fan_names)),
        ):
            if name_col not in rec and name_col not in nominal and idx_col in nominal and pool:
                rec[name_col] = np.asarray(pool, dtype=object)[
                    np.asarray(nominal[idx_col], dtype=np.int64)
                ]
        if "material" not in rec and "material" not in nominal:
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
        limiting = limiting.astype(object)
        for s, table in enumerate(tables if bad_any.any() else ()):
            take = np.flatnonzero(bad_any & (first_bad == s))
            if take.size == 0:
                continue
            limiting[take] = [f"{INVALID_LABEL}: {t}" for t in _texts(table, "reason", take)]
        back["limiting_constraint"] = limiting
        back["worst_scenario"] = np.asarray(names, dtype=object)[worst_s]
        back["feasible"] = np.all(G_user <= 0, axis=1) & ~bad_any
        cols = sorted({c.column for c in self.study.constraints})
        for s in range(1, len(tables)):
            for c in cols:
                if c in tables[s]:
                    back[f"{names[s]}:{c}"] = np.asarray(tables[s][c])
            back[f"{names[s]}:valid"] = ~invalid[s]
        out = {**rec, **nominal.columns, **back}
        if len(out) != len(rec) + len(nominal.columns) + len(back):
            raise ValueError("a record column name is used twice (decision, model and margin "
                             "columns must differ)")
        return Records(out)

    def _evaluate(self, X, out, *args, **kwargs) -> None:
        ev = self.evaluate_population(X)
        out["F"] = ev.F
        out["G"] = ev.G
        self.pending.append(ev)

    def drain(self) -> Evaluation | None:
        """What was evaluated through pymoo since the last call (None if nothing)."""
        if not self.pending:
            return None
        ev = Evaluation.concat(self.pending)
        self.pending = []
        return ev


def _texts(table: Records, column: str, rows: np.ndarray) -> list[str]:
    """The text of ``column`` at ``rows`` ('' without the column; a Categorical's codes are
    looked up in its categories, not converted as a whole)."""
    if column not in table:
        return [""] * len(rows)
    col = table[column]
    if isinstance(col, pd.Categorical):
        codes = col.codes[rows]
        names = {int(c): str(col.categories[c]) if c >= 0 else "nan" for c in np.unique(codes)}
        return [names[int(c)] for c in codes]
    return [str(t) for t in np.asarray(col[rows], dtype=object)]


def _column(table: Records, column: str, role: str) -> np.ndarray:
    if column not in table:
        raise KeyError(f"{role} column '{column}' is not in the model's table")
    return np.asarray(table[column])


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


_HASH_MIX: dict[int, np.ndarray] = {}  # odd 64-bit multipliers per row width


def _row_groups(X: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Per row of ``X``: the number of its group of equal rows, and whether it is the group's
    first row. Equality by value, as in ``np.unique(X, axis=0)``, at a fraction of its cost:
    rows are sorted by a 64-bit hash of their bits (one sort key instead of one per column)
    and equal hashes are checked to be equal rows (a collision falls back to a full sort)."""
    X = np.asarray(X, dtype=float)
    n = len(X)
    if X.ndim != 2 or X.shape[1] == 0 or n == 0:
        return np.zeros(n, dtype=np.int64), np.arange(n) == 0
    X = np.ascontiguousarray(X) + 0.0  # -0.0 -> 0.0: equal values, equal bits
    w = X.shape[1]
    mix = _HASH_MIX.get(w)
    if mix is None:
        mix = np.random.default_rng(w).integers(1, 2**62, size=w, dtype=np.uint64) * 2 + 1
        _HASH_MIX[w] = mix
    bits = X.view(np.uint64)
    h = ((bits ^ (bits >> np.uint64(29))) * mix).sum(axis=1, dtype=np.uint64)
    order = np.argsort(h, kind="stable")  # equal rows stay in their original order
    hs = h[order]
    new = np.ones(n, dtype=bool)
    new[1:] = hs[1:] != hs[:-1]
    pair = np.flatnonzero(~new[1:])  # equal hashes: sorted positions pair, pair + 1
    if pair.size and not np.all(X[order[pair]] == X[order[pair + 1]]):
        # a hash collision (rows differ, hashes equal): sort by every column instead
        order = np.lexsort(X.T[::-1])
        S = X[order]
        new[1:] = ~np.all(S[1:] == S[:-1], axis=1)
    group = np.empty(n, dtype=np.int64)
    group[order] = np.cumsum(new) - 1
    first = np.zeros(n, dtype=bool)
    first[order[new]] = True
    return group, first


def repeated_rows(X: np.ndarray) -> np.ndarray:
    """True for every row of ``X`` equal to an earlier row (the first of each stays False)."""
    return ~_row_groups(X)[1]


def first_rows(X: np.ndarray) -> np.ndarray:
    """Indices of the first row of every group of equal rows, ascending."""
    return np.flatnonzero(_row_groups(X)[1])


def rows_in(X: np.ndarray, Y: np.ndarray) -> np.ndarray:
    """True for every row of ``X`` that equals some row of ``Y``."""
    group = _row_groups(np.vstack([Y, X]))[0]
    in_y = np.zeros(len(group), dtype=bool)
    in_y[group[: len(Y)]] = True
    return in_y[group[len(Y):]]


def drop_duplicates(X: np.ndarray, *others: np.ndarray) -> np.ndarray:
    """The rows of ``X`` without repeats (the first stays) and without rows found in
    ``others``: what pymoo's ``DuplicateElimination.do(pop, *others)`` with
    :class:`ExactDuplicates` keeps, in one sort instead of one per array."""
    if len(X) == 0:
        return X
    others = [Y for Y in others if len(Y) > 0]
    n_other = sum(len(Y) for Y in others)
    group, first = _row_groups(np.vstack([*others, X]) if others else X)
    seen = np.zeros(len(group), dtype=bool)
    seen[group[:n_other]] = True
    keep = first[n_other:] & ~seen[group[n_other:]]
    return X[keep]


class ExactDuplicates(DuplicateElimination):
    """Drops designs whose (repaired) decision vector equals another's, by sorting rows:
    O(n log n), where pymoo's default compares every pair of designs (O(n^2) distances)."""

    def _do(self, pop, other, is_duplicate):
        X = pop.get("X")
        dup = repeated_rows(X) if other is None else rows_in(X, other.get("X"))
        is_duplicate[dup] = True
        return is_duplicate
