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

NSGA-II runs as :class:`ArrayNSGA2`: pymoo's NSGA2 generation (binary tournament, SBX,
polynomial mutation, repair, duplicate elimination, rank-and-crowding survival) on plain
arrays, calling pymoo's own operators, sorting and crowding functions with the same random
generator in the same order, so a seed gives the same designs as ``pymoo``'s ``NSGA2``
object -- without its Population of Python objects, which cost several times the model per
generation. The GA (one objective) and NSGA-III run as pymoo objects.

The best-so-far Pareto set is kept in an :class:`Archive` of every feasible non-dominated
design ever evaluated (not only the last population).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from pymoo.algorithms.base.genetic import GeneticAlgorithm
from pymoo.core.population import Population
from pymoo.core.termination import NoTermination
from pymoo.core.variable import get as variable_value
from pymoo.indicators.hv import HV
from pymoo.util.nds.non_dominated_sorting import NonDominatedSorting, find_non_dominated
from pymoo.util.randomized_argsort import randomized_argsort

from optim.problem import (
    Evaluation,
    ExactDuplicates,
    HeatSinkProblem,
    MixedRepair,
    MixedSampling,
    drop_duplicates,
    first_rows,
    uniform_sample,
)
from optim.runfolder import Records
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
    # the rows no other row dominates (ties kept): pymoo's first front, without ranking the rest
    return np.asarray(find_non_dominated(F), dtype=np.int64)


# ----------------------------------------------------------------------------- archive
class Archive:
    """Every feasible, non-dominated design evaluated so far (F, X and its record row).

    ``F``, ``X`` and ``ids`` are replaced by new arrays on a change, never changed in place
    (``SearchState.fronts`` keeps references to past ``F`` arrays).

    The record rows stay in their generations' column batches until :attr:`records` is read
    (checkpoints, outputs) or many batches are held; then the rows of the designs still in
    the archive are taken and joined. An update costs a few numpy calls on F and X.
    """

    JOIN_ROWS = 20000  # join once the batches held have this many rows (bounds memory)

    def __init__(self, n_obj: int, n_var: int) -> None:
        self.F = np.zeros((0, n_obj))
        self.X = np.zeros((0, n_var))
        self.ids = np.zeros(0, dtype=np.int64)  # eval_id of each member
        self.worst = np.full(n_obj, -np.inf)  # per objective, the largest feasible F seen
        self._rows: Records | None = None  # members' rows as of the last join
        self._pending: list[tuple[Records, np.ndarray]] = []  # batch, rows that entered
        self._held = 0  # rows in the pending batches
        self._frame: pd.DataFrame | None = None  # records as a DataFrame, until a change

    @classmethod
    def empty(cls, n_obj: int, n_var: int) -> Archive:
        return cls(n_obj, n_var)

    def update(self, X: np.ndarray, ev: Evaluation) -> None:
        ok = ev.feasible
        if not ok.any():
            return
        self.worst = np.maximum(self.worst, ev.F[ok].max(axis=0))
        cand = np.flatnonzero(ok)
        n_old = len(self.F)
        F = np.vstack([self.F, ev.F[cand]])
        nd = np.sort(non_dominated(F))
        if nd[-1] < n_old:  # no new design is non-dominated: none enters, none leaves
            return
        # drop repeated designs (same decision vector), keeping the first: twins have the same
        # F, so the first of each among the non-dominated is the first of each among all
        Xa = np.vstack([self.X, X[cand]])
        keep = nd[first_rows(Xa[nd])]
        ids = np.concatenate([self.ids, np.asarray(ev.batch["eval_id"], dtype=np.int64)[cand]])
        entered = keep[keep >= n_old] - n_old
        self.F, self.X, self.ids = F[keep], Xa[keep], ids[keep]
        if entered.size:
            self._pending.append((ev.batch, cand[entered]))
            self._held += len(ev.batch)
            self._frame = None
            if self._held > self.JOIN_ROWS:
                self._join()

    def _join(self) -> Records | None:
        """The members' rows in the archive's order (rows of pending batches joined in)."""
        if self._pending or (self._rows is not None and len(self._rows) != len(self.ids)):
            parts = [self._rows] if self._rows is not None else []
            for batch, rows in self._pending:
                alive = rows[np.isin(np.asarray(batch["eval_id"])[rows], self.ids)]
                if alive.size:
                    parts.append(batch.take(alive))
            self._pending, self._held = [], 0
            if not parts:
                self._rows = None
                return None
            rows = Records.concat(parts)
            eid = np.asarray(rows["eval_id"], dtype=np.int64)
            order = np.argsort(eid, kind="stable")  # first row of each eval_id first
            self._rows = rows.take(order[np.searchsorted(eid[order], self.ids)])
        return self._rows

    @property
    def records(self) -> pd.DataFrame:
        """The members' record rows, in the archive's order."""
        if self._frame is None:
            rows = self._join()
            self._frame = rows.frame() if rows is not None else pd.DataFrame()
        return self._frame

    def __getstate__(self) -> dict:
        self._join()  # pickle the members' rows only, not the batches they came in
        return {**self.__dict__, "_frame": None}

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
    # the archive's F after each generation (the same array while the archive is unchanged)
    fronts: list[np.ndarray] = field(default_factory=list)
    history: list[dict] = field(default_factory=list)  # per generation: evaluations, ...
    generation: int = 0
    evaluations: int = 0
    elapsed_s: float = 0.0
    stop_reason: str | None = None
    hv_cache: dict = field(default_factory=dict, repr=False)  # see front_hypervolume


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


# ----------------------------------------------------------------------------- NSGA-II
class ArrayNSGA2:
    """NSGA-II (Deb et al. 2002) as pymoo 0.6's ``NSGA2`` runs it, on arrays.

    One generation, as in pymoo's ``GeneticAlgorithm``/``Mating``/``RankAndCrowding``:

    - binary tournaments on random permutations of the population: the smaller constraint
      violation wins when either design is infeasible, otherwise Pareto dominance, then the
      larger crowding distance; ties are drawn at random;
    - SBX crossover and polynomial mutation (pymoo's operators), rounding repair, and
      removal of designs repeated among the new offspring or found in the population or in
      the offspring made so far, repeated until the offspring are complete (at most 100
      rounds; a few repeats are usual with integer and choice variables);
    - survival of the population plus offspring: feasible designs by non-dominated rank, the
      split front by crowding distance (random order among equal distances), then infeasible
      designs by constraint violation.

    Every random number comes from one generator in pymoo's order, so a seed gives the very
    designs pymoo's ``NSGA2`` object gives (``make_algorithm(..., pymoo_objects=True)``);
    ``tests/bench_search.py`` checks it. The population lives in arrays (X, F, constraint
    violation CV, crowding distance) instead of pymoo's Population of Individual objects,
    whose per-design Python calls cost several times the model per generation.

    Use: ``X = ask(problem)`` (None when no new design can be made), evaluate, then
    ``tell(F, G)``. Pickles whole (arrays and the generator) for checkpoints.
    """

    n_max_iterations = 100  # mating rounds per generation (pymoo's Mating default)

    def __init__(self, pop_size: int, seed: int, crossover, mutation) -> None:
        if crossover.n_parents != 2 or crossover.n_offsprings != 2:
            raise ValueError("ArrayNSGA2 needs a two-parent, two-offspring crossover")
        self.pop_size = pop_size
        self.n_offsprings = pop_size
        self.crossover = crossover
        self.mutation = mutation
        self.random_state = np.random.default_rng(seed)  # as pymoo's Algorithm.setup
        self.nds = NonDominatedSorting()
        self.initialized = False
        self.X = self.F = self.CV = self.crowding = None  # the population
        self._asked: np.ndarray | None = None

    # ----- ask
    def ask(self, problem: HeatSinkProblem) -> np.ndarray | None:
        """The designs to evaluate next (repaired decision vectors), None if none is new."""
        rng = self.random_state
        codec = problem.codec
        if not self.initialized:  # Initialization: sampling, repair, duplicates
            X = codec.repair(uniform_sample(codec, self.pop_size, rng))
            off = drop_duplicates(X)
        else:
            off = np.zeros((0, problem.n_var))
            for _ in range(self.n_max_iterations):
                n_remaining = self.n_offsprings - len(off)
                new = codec.repair(self._mate(problem, n_remaining))
                new = drop_duplicates(new, self.X, off)
                off = np.concatenate([off, new[:n_remaining]])
                if len(off) >= self.n_offsprings:
                    break
            if len(off) == 0:
                return None
        self._asked = off
        return off

    def _mate(self, problem: HeatSinkProblem, n_offsprings: int) -> np.ndarray:
        rng = self.random_state
        n_matings = math.ceil(n_offsprings / self.crossover.n_offsprings)
        # TournamentSelection(pressure 2) with NSGA2's binary_tournament
        n_pop = len(self.X)
        n_random = n_matings * 2 * 2
        n_perms = math.ceil(n_random / n_pop)
        P = np.concatenate([rng.permutation(n_pop) for _ in range(n_perms)])[:n_random]
        parents = self._tournament(P.reshape(n_matings * 2, 2)).reshape(n_matings, 2)
        # Crossover.do
        X = np.swapaxes(self.X[parents], 0, 1)  # (parents, matings, variables)
        if self.crossover.vtype is not None:
            X = X.astype(self.crossover.vtype)
        Xp = np.empty(X.shape, dtype=X.dtype)
        prob = variable_value(self.crossover.prob, size=n_matings)
        cross = rng.random(n_matings) < prob
        if np.any(cross):
            Q = self.crossover._do(problem, X, random_state=rng)
            Xp[:, cross] = Q[:, cross]
        Xp[:, ~cross] = X[:, ~cross]
        Xp = Xp.reshape(-1, X.shape[-1])
        # Mutation.do
        Xm = self.mutation._do(problem, Xp, random_state=rng)
        prob = variable_value(self.mutation.prob, size=len(Xp))
        mut = rng.random(size=len(Xp)) <= prob
        Xp[mut] = Xm[mut]
        return Xp

    def _tournament(self, P: np.ndarray) -> np.ndarray:
        """pymoo's NSGA2 binary_tournament ('comp_by_dom_and_crowding'), vectorized; the
        random draws for ties happen in tournament order, as in pymoo's loop."""
        a, b = P[:, 0], P[:, 1]
        cva, cvb = self.CV[a], self.CV[b]
        infeasible = (cva > 0.0) | (cvb > 0.0)
        Fa, Fb = self.F[a], self.F[b]
        a_better, b_better = (Fa < Fb).any(axis=1), (Fb < Fa).any(axis=1)
        a_dom, b_dom = a_better & ~b_better, b_better & ~a_better  # Pareto dominance
        cda, cdb = self.crowding[a], self.crowding[b]
        a_wins = np.where(infeasible, cva < cvb, a_dom | (~b_dom & (cda > cdb)))
        b_wins = np.where(infeasible, cva > cvb, b_dom | (~a_dom & (cda < cdb)))
        S = np.where(a_wins, a, b)
        tie = ~a_wins & ~b_wins
        for i in np.flatnonzero(tie):
            S[i] = self.random_state.choice([a[i], b[i]])
        return S

    # ----- tell
    def tell(self, F: np.ndarray, G: np.ndarray) -> None:
        """The objectives and constraints of the designs from :meth:`ask`; survival."""
        X, self._asked = self._asked, None
        if X is None or len(X) != len(F):
            raise RuntimeError("tell() needs the evaluation of the designs from ask()")
        F = np.asarray(F, dtype=np.float64)
        G = np.asarray(G, dtype=np.float64)
        CV = np.maximum(0.0, G - 0.0).sum(axis=1) + 0.0  # pymoo's calc_cv, row by row
        if self.initialized:
            X = np.concatenate([self.X, X])
            F = np.concatenate([self.F, F])
            CV = np.concatenate([self.CV, CV])
            n_survive = self.pop_size
        else:
            n_survive = len(X)
        crowding = np.full(len(X), np.nan)
        keep = self._survival(F, CV, min(n_survive, len(X)), crowding)
        self.X, self.F, self.CV = X[keep], F[keep], CV[keep]
        self.crowding = crowding[keep]
        self.initialized = True

    def _survival(self, F: np.ndarray, CV: np.ndarray, n_survive: int,
                  crowding: np.ndarray) -> np.ndarray:
        """Survival.do with RankAndCrowding: the survivors' indices, in pymoo's order; the
        crowding distance of every ranked feasible design is written into ``crowding``."""
        is_feasible = CV <= 0.0
        feas = np.flatnonzero(is_feasible)
        infeas = np.flatnonzero(~is_feasible)
        infeas = infeas[np.argsort(CV[infeas])]
        picked: list[np.ndarray] = []
        n_picked = 0
        if len(feas):
            Ff = F[feas]
            n_feas = min(len(feas), n_survive)
            fronts = self.nds.do(Ff, n_stop_if_ranked=n_feas)
            for front, cd in zip(fronts, crowding_distances(Ff, fronts), strict=True):
                take = np.arange(len(front))
                if n_picked + len(front) > n_feas:
                    n_remove = n_picked + len(front) - n_feas
                    take = randomized_argsort(cd, order="descending", method="numpy",
                                              random_state=self.random_state)[:-n_remove]
                crowding[feas[front]] = cd
                picked.append(front[take])
                n_picked += len(take)
        keep = feas[np.concatenate(picked).astype(np.int64)] if picked else feas[:0]
        n_remaining = n_survive - len(keep)
        if n_remaining > 0:
            keep = np.concatenate([keep, infeas[:n_remaining]])
        return keep


def crowding_distances(F: np.ndarray, fronts: list[np.ndarray]) -> list[np.ndarray]:
    """NSGA-II's crowding distance of every front's members, all fronts in one pass.

    The same numbers, bit for bit, as pymoo's ``calc_crowding_distance`` per front (through
    ``get_crowding_function('cd')``): per objective, the members sorted stably, the gaps to
    the neighbours on either side divided by the front's range (infinite at the ends, 0 where
    the range is 0), summed over the objectives and divided by their number; fronts of one or
    two members get infinity.
    """
    if not fronts:
        return []
    sizes = np.array([len(f) for f in fronts])
    idx = np.concatenate(fronts)
    Fc = np.asarray(F, dtype=np.double)[idx]
    n, n_obj = Fc.shape
    fid = np.repeat(np.arange(len(fronts)), sizes)
    end = np.cumsum(sizes)
    start = end - sizes
    cols = np.arange(n_obj)
    order = np.empty((n, n_obj), dtype=np.int64)
    for j in range(n_obj):  # within each front (fronts stay in their blocks), stable by F_j
        order[:, j] = np.lexsort((Fc[:, j], fid))
    Fs = Fc[order, cols]
    with np.errstate(invalid="ignore", divide="ignore"):
        norm = Fs[end - 1] - Fs[start]  # max - min of each front
        norm[norm == 0] = np.nan
        to_last = np.empty_like(Fs)
        to_last[1:] = Fs[1:] - Fs[:-1]
        to_last[start] = np.inf  # F[0] - (-inf)
        to_next = np.empty_like(Fs)
        to_next[:-1] = Fs[1:] - Fs[:-1]
        to_next[end - 1] = np.inf  # inf - F[-1]
        to_last = to_last / norm[fid]
        to_next = to_next / norm[fid]
    to_last[np.isnan(to_last)] = 0.0
    to_next[np.isnan(to_next)] = 0.0
    both = np.empty_like(Fs)
    both[order, cols] = to_last + to_next
    cd = np.sum(both, axis=1) / n_obj
    cd[np.repeat(sizes <= 2, sizes)] = np.inf
    return np.split(cd, end[:-1])


def _operators() -> tuple:
    from pymoo.operators.crossover.sbx import SBX
    from pymoo.operators.mutation.pm import PM

    # low distribution indices (wide offspring spread) suit rounded integer variables; tuned
    # on tests/test_search_quality.py's space (eta 15/20, pymoo's default, was less robust)
    return SBX(prob=1.0, eta=5), PM(eta=5)


def make_algorithm(method: str, problem: HeatSinkProblem, budget: Budget, seed: int,
                   pymoo_objects: bool = False) -> GeneticAlgorithm | ArrayNSGA2:
    """The algorithm set up on the problem (termination handled by the run loop): NSGA-II
    with two or more objectives as :class:`ArrayNSGA2` (or, with ``pymoo_objects``, as
    pymoo's own ``NSGA2`` object: the same designs, slower), otherwise a pymoo algorithm."""
    crossover, mutation = _operators()
    if method == "nsga2" and problem.n_obj >= 2 and not pymoo_objects:
        return ArrayNSGA2(budget.population, seed, crossover, mutation)
    common = dict(
        sampling=MixedSampling(),
        crossover=crossover,
        mutation=mutation,
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
    if isinstance(state.algorithm, ArrayNSGA2):
        X = state.algorithm.ask(problem)
        if X is None:
            return None
        ev = problem.evaluate_population(X)
        state.algorithm.tell(ev.F, ev.G)
    elif state.method in ("nsga2", "nsga3"):
        algo = state.algorithm
        infills = algo.infill()  # what Algorithm.next() does, with the infills kept at hand
        if infills is None or len(infills) == 0:
            return None
        algo.evaluator.eval(problem, infills, algorithm=algo)
        algo.advance(infills=infills)
        ev = problem.drain()
        X = problem.codec.repair(infills.get("X"))
        if ev is None or len(ev.F) != len(X):
            raise RuntimeError("evaluation bookkeeping lost track of the population")
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
    ev.with_leading(eval_id=np.arange(state.evaluations, state.evaluations + len(X)),
                    generation=np.full(len(X), state.generation + 1, dtype=np.int64))
    state.generation += 1
    state.evaluations += len(X)
    state.archive.update(X, ev)
    state.fronts.append(state.archive.F)  # replaced, never changed in place, by the archive
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
        n = len(state.fronts)
        now, before = front_hypervolume(state, n - 1), front_hypervolume(state, n - 1 - k)
        if now > 0 and (now - before) / now < b.stagnation_tolerance:
            return f"hypervolume stagnation ({k} generations below {b.stagnation_tolerance:g})"
    return None


def front_hypervolume(state: SearchState, i: int) -> float:
    """The hypervolume of the best-so-far front after generation ``i + 1``, scaled by the
    archive's present ideal and nadir points (see :func:`normalised_hypervolume`).

    Values are cached in ``state.hv_cache`` while the scaling stays the same, and a front
    that did not change since the generation before reuses that generation's value, so the
    stagnation test and convergence.csv compute each front's hypervolume about once."""
    a = state.archive
    if a is None or len(a.F) == 0:
        return 0.0
    ideal, nadir = a.ideal, a.nadir
    scale = (ideal.tobytes(), nadir.tobytes())
    cache = state.hv_cache
    if cache.get("scale") != scale:
        cache.clear()
        cache.update(scale=scale, values={})
    values = cache["values"]
    if i not in values:
        F = state.fronts[i]
        if i > 0 and state.fronts[i - 1] is F and i - 1 in values:
            values[i] = values[i - 1]
        else:
            values[i] = normalised_hypervolume(F, ideal, nadir)
    return values[i]


def convergence_table(state: SearchState) -> pd.DataFrame:
    """Per generation: evaluations, hypervolume of the best-so-far front (normalised by the
    final front: ideal 0, nadir 1, reference 1.1), feasible fraction, front size."""
    rows = [dict(h) for h in state.history]
    for i, row in enumerate(rows[: len(state.fronts)]):
        row["hypervolume"] = front_hypervolume(state, i)
    cols = ["generation", "evaluations", "hypervolume", "feasible_fraction", "front_size",
            "generation_seconds"]
    return pd.DataFrame(rows, columns=cols)
