"""The search: NSGA-II / NSGA-III / GA (pymoo), an exhaustive sweep, random sampling.

Every method advances one "generation" per :func:`step` (for the sweep and random sampling a
generation is one batch of designs), so the run loop in ``optim.api`` handles them alike:
records to the run folder, convergence, checkpoint, termination.

- ``nsga2``: two objectives (NSGA-II, Deb et al. 2002); one objective uses pymoo's GA with the
  same operators; three or more objectives switch to ``nsga3``.
- ``nsga3``: reference-direction NSGA-III (Deb & Jain 2014) with Das-Dennis directions.
- ``sweep``: every point of a grid (every integer, every choice, ``sweep_points`` values per
  real) in batches; the yardstick for the others.
- ``random``: uniform random designs, ``population`` per generation.
- ``auto``: the sweep when its grid has no more points than the budget allows evaluations,
  otherwise the genetic algorithm suited to the number of objectives.

Integer and choice variables: uniform integer sampling and a rounding repair after SBX
crossover and polynomial mutation (the usual mixed-integer treatment in pymoo).

The best-so-far Pareto set is kept in an :class:`Archive` of every feasible non-dominated
design ever evaluated (not only the last population).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from pymoo.algorithms.base.genetic import GeneticAlgorithm
from pymoo.core.population import Population
from pymoo.core.termination import NoTermination
from pymoo.indicators.hv import HV
from pymoo.util.nds.non_dominated_sorting import NonDominatedSorting

from optim.problem import (
    Evaluation,
    ExactDuplicates,
    HeatSinkProblem,
    MixedRepair,
    MixedSampling,
    uniform_sample,
)
from optim.study_types import Budget

METHODS = ("auto", "nsga2", "nsga3", "sweep", "random")
SWEEP_BATCH = 500  # designs per sweep "generation" (at least one population)


# ----------------------------------------------------------------------------- hypervolume
def normalised_hypervolume(F: np.ndarray, ideal: np.ndarray, nadir: np.ndarray) -> float:
    """Hypervolume of ``F`` (minimised) after scaling ``ideal -> 0`` and ``nadir -> 1``, with the
    reference point at 1.1 on every axis. Points beyond the reference do not count."""
    F = np.atleast_2d(np.asarray(F, dtype=float))
    if F.size == 0:
        return 0.0
    ideal = np.asarray(ideal, dtype=float)
    span = np.asarray(nadir, dtype=float) - ideal
    span = np.where(span > 0, span, 1.0)
    Z = (F - ideal) / span
    Z = Z[np.all(Z < 1.1, axis=1)]
    if Z.size == 0:
        return 0.0
    return float(HV(ref_point=np.full(F.shape[1], 1.1))(Z))


def non_dominated(F: np.ndarray) -> np.ndarray:
    """Indices of the non-dominated rows of ``F`` (minimised)."""
    if len(F) == 0:
        return np.zeros(0, dtype=np.int64)
    if F.shape[1] == 1:
        return np.flatnonzero(F[:, 0] == F[:, 0].min())[:1]
    return np.asarray(NonDominatedSorting().do(F, only_non_dominated_front=True), dtype=np.int64)


# ----------------------------------------------------------------------------- archive
class Archive:
    """Every feasible, non-dominated design evaluated so far (F, X and its record row).

    The record rows are kept as the chunks they arrived in and joined only when
    :attr:`records` is read (at checkpoints and at the end), so that an update costs numpy
    work only.
    """

    def __init__(self, n_obj: int, n_var: int) -> None:
        self.F = np.zeros((0, n_obj))
        self.X = np.zeros((0, n_var))
        self.ids = np.zeros(0, dtype=np.int64)  # eval_id of each member
        self.worst = np.full(n_obj, -np.inf)  # per objective, the largest feasible F seen
        self._chunks: list[pd.DataFrame] = []
        self._records: pd.DataFrame | None = pd.DataFrame()

    @classmethod
    def empty(cls, n_obj: int, n_var: int) -> Archive:
        return cls(n_obj, n_var)

    def update(self, X: np.ndarray, ev: Evaluation) -> None:
        ok = ev.feasible
        if not ok.any():
            return
        self.worst = np.maximum(self.worst, ev.F[ok].max(axis=0))
        new_ids = ev.records["eval_id"].to_numpy(dtype=np.int64)[ok]
        F = np.vstack([self.F, ev.F[ok]])
        Xa = np.vstack([self.X, X[ok]])
        ids = np.concatenate([self.ids, new_ids])
        # drop repeated designs (same decision vector), keeping the first
        _, first = np.unique(Xa, axis=0, return_index=True)
        first = np.sort(first)
        keep = first[np.sort(non_dominated(F[first]))]
        entered = keep[keep >= len(self.F)] - len(self.F)
        self.F, self.X, self.ids = F[keep], Xa[keep], ids[keep]
        if entered.size:
            self._chunks.append(ev.records.take(np.flatnonzero(ok)[entered]))
            self._records = None

    @property
    def records(self) -> pd.DataFrame:
        """The members' record rows, in the archive's order."""
        if self._records is None:
            allrec = pd.concat(self._chunks, ignore_index=True)
            pos = pd.Series(np.arange(len(allrec)), index=allrec["eval_id"].to_numpy())
            pos = pos[~pos.index.duplicated()]
            self._records = allrec.iloc[pos.loc[self.ids].to_numpy()].reset_index(drop=True)
            self._chunks = [self._records]
        return self._records

    def __getstate__(self) -> dict:
        self.records  # noqa: B018 - join the chunks before pickling
        return dict(self.__dict__)

    @property
    def ideal(self) -> np.ndarray:
        return self.F.min(axis=0)

    @property
    def nadir(self) -> np.ndarray:
        if self.F.shape[1] == 1:  # one objective: scale by the spread of feasible designs
            return self.worst
        return self.F.max(axis=0)


# ----------------------------------------------------------------------------- state
@dataclass
class SearchState:
    """Everything a checkpoint holds besides the problem (pickled as one object)."""

    method: str
    budget: Budget
    seed: int
    algorithm: object | None = None  # pymoo algorithm (nsga2/nsga3/ga)
    grid_next: int = 0  # sweep: index of the next grid point
    rng: np.random.Generator | None = None  # random sampling
    archive: Archive | None = None
    fronts: list[np.ndarray] = field(default_factory=list)  # archive F after each generation
    history: list[dict] = field(default_factory=list)  # per generation: evaluations, ...
    generation: int = 0
    evaluations: int = 0
    elapsed_s: float = 0.0
    stop_reason: str | None = None


def resolve_method(problem: HeatSinkProblem, budget: Budget) -> str:
    """The method to use: ``budget.method`` with 'auto' (and objective counts) resolved."""
    m = budget.method
    n_obj = problem.n_obj
    if m == "auto":
        allowed = _evaluation_allowance(budget)
        if problem.codec.grid_size(budget.sweep_points) <= allowed:
            return "sweep"
        m = "nsga2"
    if m == "nsga2" and n_obj >= 3:
        return "nsga3"
    if m == "nsga3" and n_obj == 1:
        return "nsga2"
    return m


DEFAULT_GENERATIONS = 100  # when a budget sets no limit at all


def generation_limit(budget: Budget) -> int | None:
    """The generation limit; DEFAULT_GENERATIONS when the budget sets no limit of any kind."""
    if budget.generations is not None:
        return budget.generations
    if budget.max_evaluations or budget.wall_time_s or budget.stagnation_generations:
        return None
    return DEFAULT_GENERATIONS


def _evaluation_allowance(budget: Budget) -> float:
    if budget.max_evaluations:
        return float(budget.max_evaluations)
    gens = generation_limit(budget)
    return float(budget.population * (gens or DEFAULT_GENERATIONS))


def reference_directions(n_obj: int, population: int) -> np.ndarray:
    """Das-Dennis directions, with the most partitions that give no more than the population."""
    from math import comb

    from pymoo.util.ref_dirs import get_reference_directions

    p = 1
    while comb(p + 1 + n_obj - 1, n_obj - 1) <= population:
        p += 1
    return get_reference_directions("das-dennis", n_obj, n_partitions=p)


def nsga3_tournament(pop: Population, P: np.ndarray,
                     random_state: np.random.Generator | None = None, **kwargs) -> np.ndarray:
    """NSGA-III's binary tournament (constraint violation, then random), at module level:
    pymoo's own function is wrapped by a decorator that cannot be pickled (checkpoints)."""
    from pymoo.algorithms.moo.nsga3 import comp_by_cv_then_random

    return comp_by_cv_then_random(pop, P, random_state=random_state, **kwargs)


def ga_tournament(pop: Population, P: np.ndarray,
                  random_state: np.random.Generator | None = None, **kwargs) -> np.ndarray:
    """The GA's binary tournament (constraint violation, then fitness), picklable (as above)."""
    from pymoo.algorithms.soo.nonconvex.ga import comp_by_cv_and_fitness

    return comp_by_cv_and_fitness(pop, P, random_state=random_state, **kwargs)


def make_algorithm(method: str, problem: HeatSinkProblem, budget: Budget,
                   seed: int) -> GeneticAlgorithm:
    """A pymoo algorithm set up on the problem (termination handled by the run loop)."""
    from pymoo.operators.crossover.sbx import SBX
    from pymoo.operators.mutation.pm import PM

    common = dict(
        sampling=MixedSampling(),
        # low distribution indices (wide offspring spread) suit rounded integer variables; tuned
        # on tests/test_search_quality.py's space (eta 15/20, pymoo's default, was less robust)
        crossover=SBX(prob=1.0, eta=5),
        mutation=PM(eta=5),
        repair=MixedRepair(),
        eliminate_duplicates=ExactDuplicates(),
    )
    if method == "nsga3":
        from pymoo.algorithms.moo.nsga3 import NSGA3
        from pymoo.operators.selection.tournament import TournamentSelection

        dirs = reference_directions(problem.n_obj, budget.population)
        algo = NSGA3(ref_dirs=dirs, pop_size=max(budget.population, len(dirs)),
                     selection=TournamentSelection(func_comp=nsga3_tournament), **common)
    elif problem.n_obj == 1:
        from pymoo.algorithms.soo.nonconvex.ga import GA
        from pymoo.operators.selection.tournament import TournamentSelection

        algo = GA(pop_size=budget.population,
                  selection=TournamentSelection(func_comp=ga_tournament), **common)
    else:
        from pymoo.algorithms.moo.nsga2 import NSGA2

        algo = NSGA2(pop_size=budget.population, **common)
    algo.setup(problem, termination=NoTermination(), seed=seed, verbose=False)
    return algo


def new_state(problem: HeatSinkProblem, budget: Budget, seed: int) -> SearchState:
    method = resolve_method(problem, budget)
    state = SearchState(method=method, budget=budget, seed=seed)
    state.archive = Archive.empty(problem.n_obj, problem.n_var)
    if method in ("nsga2", "nsga3"):
        state.algorithm = make_algorithm(method, problem, budget, seed)
    elif method == "random":
        state.rng = np.random.default_rng(seed)
    return state


def sweep_points(problem: HeatSinkProblem, budget: Budget, start: int, count: int) -> np.ndarray:
    """Rows ``start .. start+count`` of the sweep grid (last variable varies fastest)."""
    axes = problem.codec.grid_axes(budget.sweep_points)
    sizes = [a.size for a in axes]
    idx = np.arange(start, start + count)
    cols = []
    for j in range(len(axes) - 1, -1, -1):
        cols.append(axes[j][idx % sizes[j]])
        idx = idx // sizes[j]
    return np.column_stack(cols[::-1]) if cols else np.zeros((count, 0))


# ----------------------------------------------------------------------------- one step
@dataclass
class StepResult:
    X: np.ndarray
    evaluation: Evaluation


def step(state: SearchState, problem: HeatSinkProblem) -> StepResult | None:
    """Advance one generation; None when the method has nothing left (sweep finished)."""
    t0 = time.perf_counter()
    b = state.budget
    if state.method in ("nsga2", "nsga3"):
        algo = state.algorithm
        infills = algo.infill()  # what Algorithm.next() does, with the infills kept at hand
        if infills is None or len(infills) == 0:
            return None
        algo.evaluator.eval(problem, infills, algorithm=algo)
        algo.advance(infills=infills)
        records = problem.drain()
        X = problem.codec.repair(infills.get("X"))
        if records is None or len(records) != len(X):
            raise RuntimeError("evaluation bookkeeping lost track of the population")
        ev = Evaluation(F=infills.get("F"), G=infills.get("G"), records=records)
    else:
        if state.method == "sweep":
            total = problem.codec.grid_size(b.sweep_points)
            if state.grid_next >= total:
                return None
            count = min(max(SWEEP_BATCH, b.population), total - state.grid_next)
            if b.max_evaluations:
                count = min(count, max(b.max_evaluations - state.evaluations, 0))
            if count <= 0:
                return None
            X = sweep_points(problem, b, state.grid_next, count)
            state.grid_next += count
        else:
            X = problem.codec.repair(uniform_sample(problem.codec, b.population, state.rng))
        ev = problem.evaluate_population(X)
    ev.records.insert(0, "generation", state.generation + 1)
    ev.records.insert(0, "eval_id", np.arange(state.evaluations, state.evaluations + len(X)))
    state.generation += 1
    state.evaluations += len(X)
    state.archive.update(X, ev)
    state.fronts.append(state.archive.F.copy())
    state.history.append(
        dict(
            generation=state.generation,
            evaluations=state.evaluations,
            feasible_fraction=float(ev.feasible.mean()) if len(X) else 0.0,
            front_size=len(state.archive.F),
            generation_seconds=time.perf_counter() - t0,
        )
    )
    return StepResult(X=X, evaluation=ev)


# ----------------------------------------------------------------------------- termination
def stop_reason(state: SearchState, problem: HeatSinkProblem, elapsed_s: float) -> str | None:
    """Why the run should stop now, or None to go on."""
    b = state.budget
    if state.method == "sweep":
        if state.grid_next >= problem.codec.grid_size(b.sweep_points):
            return "sweep complete"
    elif (gens := generation_limit(b)) is not None and state.generation >= gens:
        return f"generation limit ({gens})"
    if b.max_evaluations is not None and state.evaluations >= b.max_evaluations:
        return f"evaluation limit ({b.max_evaluations})"
    if b.wall_time_s is not None and elapsed_s >= b.wall_time_s:
        return f"wall-time limit ({b.wall_time_s:g} s)"
    k = b.stagnation_generations
    if k and state.method != "sweep" and len(state.fronts) > k and len(state.archive.F):
        a = state.archive
        now = normalised_hypervolume(state.fronts[-1], a.ideal, a.nadir)
        before = normalised_hypervolume(state.fronts[-1 - k], a.ideal, a.nadir)
        if now > 0 and (now - before) / now < b.stagnation_tolerance:
            return f"hypervolume stagnation ({k} generations below {b.stagnation_tolerance:g})"
    return None


def convergence_table(state: SearchState) -> pd.DataFrame:
    """Per generation: evaluations, hypervolume of the best-so-far front (normalised by the
    final front: ideal 0, nadir 1, reference 1.1), feasible fraction, front size."""
    rows = [dict(h) for h in state.history]
    a = state.archive
    have = a is not None and len(a.F) > 0
    for row, F in zip(rows, state.fronts, strict=False):
        row["hypervolume"] = normalised_hypervolume(F, a.ideal, a.nadir) if have else 0.0
    cols = ["generation", "evaluations", "hypervolume", "feasible_fraction", "front_size",
            "generation_seconds"]
    return pd.DataFrame(rows, columns=cols)
