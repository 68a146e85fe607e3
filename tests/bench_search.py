"""Search benchmark (run by hand, not in the tests): hypervolume against designs evaluated for
NSGA-II, random sampling and the exhaustive sweep on the quickstart study, and the wall-time
split between the model and the framework.

    python tests/bench_search.py            # print the "Search" section
    python tests/bench_search.py --write    # also put it into docs/performance.md

All hypervolumes use one scaling: the ideal and nadir points of the union of every method's
final front (reference point 1.1 on every axis), so the numbers compare across methods.
"""

from __future__ import annotations

import argparse
import platform
import re
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from optim import search  # noqa: E402
from optim.problem import HeatSinkProblem  # noqa: E402
from optim.study import load_study  # noqa: E402
from optim.study_types import Budget  # noqa: E402

STUDY = ROOT / "studies" / "quickstart.yaml"
CHECKPOINTS = (600, 1200, 2400, 4800, 9600)  # designs evaluated at which to read the front


def run(problem: HeatSinkProblem, budget: Budget, seed: int) -> tuple[search.SearchState, float]:
    state = search.new_state(problem, budget, seed)
    t0 = time.perf_counter()
    while search.stop_reason(state, problem, 0.0) is None:
        if search.step(state, problem) is None:
            break
    return state, time.perf_counter() - t0


def front_at(state: search.SearchState, evaluations: int) -> np.ndarray | None:
    """The best-so-far front after the last generation within ``evaluations`` designs."""
    best = None
    for h, F in zip(state.history, state.fronts, strict=True):
        if h["evaluations"] <= evaluations:
            best = F
    return best


def time_split(study, population: int, generations: int, seed: int,
               method: str = "nsga2") -> dict:
    problem = HeatSinkProblem(study)
    budget = Budget(method=method, population=population, generations=generations)
    state, wall = run(problem, budget, seed)
    return dict(population=population, generations=generations, evaluations=state.evaluations,
                wall=wall, model=problem.model_seconds,
                per_gen_ms=1e3 * (wall - problem.model_seconds) / generations)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--write", action="store_true", help="update docs/performance.md")
    ap.add_argument("--sweep-points", type=int, default=6, help="points per real variable")
    ap.add_argument("--seeds", type=int, default=3, help="NSGA-II / random repetitions")
    args = ap.parse_args()

    study = load_study(STUDY)
    problem = HeatSinkProblem(study)
    n_grid = problem.codec.grid_size(args.sweep_points)
    print(f"sweep grid: {n_grid} designs", file=sys.stderr)
    sweep, t_sweep = run(problem, Budget(method="sweep", sweep_points=args.sweep_points,
                                         population=1000), 0)
    states = {"sweep": [sweep]}
    for method in ("nsga2", "random"):
        states[method] = []
        for seed in range(args.seeds):
            b = Budget(method=method, population=60, generations=max(CHECKPOINTS) // 60)
            states[method].append(run(HeatSinkProblem(study), b, seed)[0])
            print(f"{method} seed {seed} done", file=sys.stderr)
    allF = np.vstack([s.archive.F for ss in states.values() for s in ss if len(s.archive.F)])
    ideal, nadir = allF.min(axis=0), allF.max(axis=0)
    F_best = allF[search.non_dominated(allF)]
    nadir = F_best.max(axis=0)

    def hv(F):
        return search.normalised_hypervolume(F, ideal, nadir) if F is not None else 0.0

    hv_sweep = hv(sweep.archive.F)
    lines = [
        "## Search",
        "",
        f"Measured with `python tests/bench_search.py` on {platform.machine()} "
        f"({platform.python_version()}, one core, serial evaluation), study "
        f"`studies/quickstart.yaml` ({problem.n_var} variables, {problem.n_obj} objectives, "
        f"{len(study.constraints)} constraints, {len(study.scenarios)} scenario(s)).",
        "Hypervolume: both objectives scaled by the ideal and nadir points of the best front "
        "found by any method, reference point 1.1 (the largest possible value is 1.21). "
        f"NSGA-II and random sampling: population 60, mean of {args.seeds} seeds.",
        "",
        "| designs evaluated | NSGA-II | random sampling | sweep (full grid) |",
        "| ---: | ---: | ---: | ---: |",
    ]
    for n in CHECKPOINTS:
        ga = np.mean([hv(front_at(s, n)) for s in states["nsga2"]])
        rnd = np.mean([hv(front_at(s, n)) for s in states["random"]])
        lines.append(f"| {n} | {ga:.4f} | {rnd:.4f} | |")
    lines.append(f"| {sweep.evaluations} (grid of {args.sweep_points} points per real) "
                 f"| | | {hv_sweep:.4f} |")
    ga_all = [np.mean([hv(front_at(s, n)) for s in states["nsga2"]]) for n in CHECKPOINTS]
    reach = next((n for n, v in zip(CHECKPOINTS, ga_all, strict=True) if v >= 0.99 * hv_sweep),
                 None)
    lines += [
        "",
        f"The sweep took {t_sweep:.1f} s for {sweep.evaluations} designs "
        f"({sweep.evaluations / t_sweep:.0f} designs/s through the whole framework).",
        "",
        (f"NSGA-II reaches 99 % of the full sweep's hypervolume after {reach} designs "
         f"({100 * reach / sweep.evaluations:.0f} % of the sweep's evaluations) and passes it "
         "later: the sweep is confined to its grid. " if reach else
         "NSGA-II did not reach 99 % of the sweep's hypervolume within the budget. ")
        + "Random sampling stays far below both: most random designs violate a constraint.",
        "",
        "Wall time of the search loop (serial), split between the model "
        "(`models.evaluate`, every scenario) and the framework (pymoo's selection, crossover, "
        "survival, plus the decision-vector mapping, constraint margins, records and archive):",
        "",
        "| method | population | generations | designs | wall time (s) | model (s) |"
        " framework share | framework per generation (ms) |",
        "| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: |",
    ]
    for method, pop, gens in (("nsga2", 60, 40), ("nsga2", 200, 20), ("nsga2", 1000, 8),
                              ("nsga2", 5000, 4), ("random", 1000, 8), ("random", 5000, 4)):
        r = time_split(study, pop, gens, 0, method)
        share = 1 - r["model"] / r["wall"]
        lines.append(f"| {method} | {pop} | {gens} | {r['evaluations']} | {r['wall']:.2f} | "
                     f"{r['model']:.2f} | {100 * share:.0f} % | {r['per_gen_ms']:.1f} |")
        print(f"time split {method} pop {pop} done", file=sys.stderr)
    lines += [
        "",
        "Reading: the vectorized model costs a few microseconds per design, less than pymoo "
        "spends on each individual per generation (its Population of Python objects, "
        "tournament selection, duplicate checks and non-dominated sorting, which grow with the "
        "population). So for NSGA-II the framework dominates at every population size, and "
        "larger populations do not help; the target of a framework share of at most 30 % is "
        "not met for the genetic algorithms with this model. The batch paths (sweep, random) "
        "bypass pymoo's individuals: there the rest is our own bookkeeping (the record table "
        "and the archive), about as much as the model. In absolute terms the framework costs "
        "tens of milliseconds per generation: the quickstart's whole search takes a second or "
        "two; the share falls as the model gets heavier (every extra scenario is one more "
        "model call per generation). For the same reason parallel workers do not pay on this "
        "model (docs/running.md): a chunk's transport costs more than its evaluation.",
    ]
    text = "\n".join(lines) + "\n"
    print(text)
    if args.write:
        path = ROOT / "docs" / "performance.md"
        old = path.read_text() if path.exists() else "# Performance\n"
        # replace our own section only; the other sections stay as they are
        pattern = re.compile(r"^## Search\n.*?(?=^## |\Z)", re.S | re.M)
        new = pattern.sub(lambda m: text + "\n", old) if pattern.search(old) else (
            old.rstrip("\n") + "\n\n" + text)
        path.write_text(new)
        print(f"written: {path}", file=sys.stderr)


if __name__ == "__main__":
    main()
