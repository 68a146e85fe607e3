"""Run and resume studies from Python (the CLI is a thin layer over these two functions).

::

    from optim.api import run_study, resume_run
    result = run_study("studies/quickstart.yaml", out_dir="runs/qs", generations=20)
    result.pareto            # the Pareto table (pandas), as in pareto.csv
    result.folder            # the run folder
    result = resume_run("runs/qs", generations=40)   # continue to 40 generations

``source`` is a study file path, a dict with the same content, or a loaded
:class:`~optim.study_types.Study`. Keyword overrides change the budget or the seed for this
run (``method``, ``population``, ``generations``, ``max_evaluations``, ``wall_time_s``,
``stagnation_generations``, ``stagnation_tolerance``, ``checkpoint_every``, ``sweep_points``,
``workers``, ``dask_scheduler``, ``seed``); the frozen ``study.yaml`` records them.
"""

from __future__ import annotations

import dataclasses
import signal
import sys
import threading
import time
import traceback
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pandas as pd

from optim import search
from optim.checkpoint import CheckpointError, load_checkpoint, save_checkpoint
from optim.parallel import make_runner
from optim.problem import HeatSinkProblem
from optim.runfolder import Records, RunFolder, RunFolderError, display, pareto_table
from optim.study_types import Budget, Study

BUDGET_KEYS = tuple(f.name for f in dataclasses.fields(Budget))
RESUME_FIXED = ("method", "population", "sweep_points", "seed")  # set when the run started
PROGRESS_EVERY_S = 10.0  # seconds between one-line progress reports (log and non-terminal)
OUTPUTS_EVERY_S = 60.0  # at most this often, a checkpoint also refreshes pareto.csv etc.


def version() -> str:
    """The installed finfront version (``0+unknown`` when run from a source tree only)."""
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as _v

    try:
        return _v("finfront")
    except PackageNotFoundError:
        return "0+unknown"


class RunError(RuntimeError):
    """A run that failed after its folder was made (the traceback is in its log.txt)."""


@dataclass
class RunResult:
    """What a run gives back: the Pareto table and where everything else is."""

    folder: Path
    pareto: pd.DataFrame
    convergence: pd.DataFrame
    method: str
    generations: int
    evaluations: int
    stop_reason: str
    interrupted: bool
    elapsed_s: float
    model_s: float

    def evaluated(self) -> pd.DataFrame:
        """Every evaluated design (read from the run folder)."""
        return RunFolder(self.folder).read_evaluated()


# ----------------------------------------------------------------------------- study set-up
def load(source: Any) -> Study:
    """A Study from a path, a dict or a Study (``optim.study.StudyError`` on bad input)."""
    if isinstance(source, Study):
        return source
    from optim.study import load_study

    return load_study(source)


def apply_overrides(study: Study, overrides: dict[str, Any]) -> Study:
    """The study with budget fields and the seed replaced (None values are ignored)."""
    over = {k: v for k, v in overrides.items() if v is not None}
    unknown = sorted(set(over) - set(BUDGET_KEYS) - {"seed"})
    if unknown:
        raise ValueError(
            f"unknown override {unknown[0]!r}; expected one of: seed, {', '.join(BUDGET_KEYS)}"
        )
    budget = dataclasses.replace(study.budget, **{k: v for k, v in over.items() if k != "seed"})
    if budget.method not in search.METHODS:
        raise ValueError(f"method: got {budget.method!r}; expected one of {search.METHODS}")
    if budget.population < 2:
        raise ValueError(f"population: got {budget.population}; expected 2 or more")
    seed = int(over.get("seed", study.seed))
    resolved = _resolved_with(study, budget, seed)
    return dataclasses.replace(study, budget=budget, seed=seed, resolved=resolved)


def _resolved_with(study: Study, budget: Budget, seed: int) -> dict:
    """The frozen study dict with this run's budget and seed written in, so that loading
    ``study.yaml`` again gives the study as run."""
    import copy

    res = copy.deepcopy(dict(study.resolved or {}))
    sec = res.get("study") if isinstance(res.get("study"), dict) else None
    if sec is None:  # a Study built by hand: record what the run used
        return {**res, "name": study.name, "seed": seed, "budget": dataclasses.asdict(budget)}
    sec["seed"] = seed
    b = sec.setdefault("budget", {})
    wall = None
    if budget.wall_time_s is not None:
        from optim.units import format_quantity

        wall = format_quantity(budget.wall_time_s, "time")
    b.update(
        method=budget.method, population=budget.population, generations=budget.generations,
        evaluations=budget.max_evaluations, wall_time=wall,
        stagnation=({"generations": budget.stagnation_generations,
                     "tolerance": budget.stagnation_tolerance}
                    if budget.stagnation_generations is not None else None),
        checkpoint_every=budget.checkpoint_every, sweep_points=budget.sweep_points,
        workers=budget.workers, dask_scheduler=budget.dask_scheduler,
    )
    return res


# ----------------------------------------------------------------------------- progress
class Reporter:
    """Progress on the console (rich bar on a terminal, periodic lines otherwise) and log.txt."""

    def __init__(self, folder: RunFolder, mode: str = "auto", stream=None) -> None:
        self.folder = folder
        self.stream = stream if stream is not None else sys.stderr
        if mode == "auto":
            mode = "bar" if getattr(self.stream, "isatty", lambda: False)() else "lines"
        self.mode = mode  # 'bar' | 'lines' | 'quiet'
        self._bar = None
        self._task = None
        self._last = -1e9
        self._last_bar = -1e9

    def start(self, total: int | None, description: str) -> None:
        if self.mode == "bar":
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                MofNCompleteColumn,
                Progress,
                TextColumn,
                TimeElapsedColumn,
                TimeRemainingColumn,
            )

            console = Console(file=self.stream)
            self._bar = Progress(
                TextColumn("[bold]{task.description}"), BarColumn(), MofNCompleteColumn(),
                TextColumn("{task.fields[info]}"), TimeElapsedColumn(), TimeRemainingColumn(),
                console=console, transient=False,
            )
            self._bar.start()
            self._task = self._bar.add_task(description, total=total, info="")

    def message(self, text: str, console: bool = True) -> None:
        self.folder.log(text)
        if not console or self.mode == "quiet":
            return
        if self._bar is not None:
            self._bar.console.print(text, markup=False, highlight=False)
        else:
            print(text, file=self.stream, flush=True)

    def update(self, completed: int, line) -> None:
        """Advance the bar; every PROGRESS_EVERY_S log ``line()`` (a callable: it is only
        computed when shown)."""
        now = time.monotonic()
        if self._bar is not None:
            info = ""
            if now - self._last_bar >= 1.0:
                self._last_bar = now
                info = "  ".join(line().split("  ")[2:4])  # front and feasible share
                self._bar.update(self._task, completed=completed, info=info)
            else:
                self._bar.update(self._task, completed=completed)
        if now - self._last >= PROGRESS_EVERY_S:
            self._last = now
            text = line()
            self.folder.log(text)
            if self.mode == "lines":
                print(text, file=self.stream, flush=True)

    def close(self) -> None:
        if self._bar is not None:
            self._bar.stop()
            self._bar = None


class _Interrupt:
    """First Ctrl-C: stop after the current generation (and checkpoint). Second: at once."""

    def __init__(self, reporter: Reporter) -> None:
        self.requested = False
        self.reporter = reporter
        self._old = None

    def __enter__(self) -> _Interrupt:
        if threading.current_thread() is threading.main_thread():
            self._old = signal.signal(signal.SIGINT, self._handle)
        return self

    def _handle(self, signum, frame) -> None:
        if self.requested:
            raise KeyboardInterrupt
        self.requested = True
        self.reporter.message(
            "interrupt: stopping after this generation (Ctrl-C again to quit now)")

    def __exit__(self, *exc) -> None:
        if self._old is not None:
            signal.signal(signal.SIGINT, self._old)


# ----------------------------------------------------------------------------- the loop
def _progress_total(state: search.SearchState, problem: HeatSinkProblem) -> tuple[int | None, str]:
    b = state.budget
    if state.method == "sweep":
        n = problem.codec.grid_size(b.sweep_points)
        if b.max_evaluations:
            n = min(n, b.max_evaluations)
        return n, "evaluations"
    if search.generation_limit(b):
        return search.generation_limit(b), "generations"
    if b.max_evaluations:
        return b.max_evaluations, "evaluations"
    return None, "generations"


def _line(state: search.SearchState, elapsed: float, total: int | None, unit: str,
          study: Study | None = None) -> str:
    a = state.archive
    h = state.history[-1] if state.history else {}
    done = state.evaluations if unit == "evaluations" else state.generation
    of = f"/{total}" if total else ""
    feasible = 100 * h.get("feasible_fraction", 0)
    best = ""
    if study is not None and len(a.F):
        parts = []
        for j, o in enumerate(study.objectives):
            v = a.F[:, j].min()
            v = -v if o.sense == "max" else v
            label, f, off = display(o.column)
            unit_txt = label.rsplit("(", 1)[-1].rstrip(")") if "(" in label else ""
            parts.append(f"{label.rsplit(' (', 1)[0]} {v * f + off:.4g} {unit_txt}".rstrip())
        best = "  best: " + ", ".join(parts)
    return (
        f"{state.method}: {unit} {done}{of}  evaluated {state.evaluations}  "
        f"front {len(a.F)}  feasible {feasible:.0f}%  elapsed {_hms(elapsed)}{best}"
    )


def _hms(s: float) -> str:
    s = int(round(s))
    return f"{s // 3600}:{s % 3600 // 60:02d}:{s % 60:02d}"


def _flush(folder: RunFolder, state: search.SearchState, unsaved: list[Records]) -> None:
    """Write the records held since the last checkpoint (one part file, named by the last
    generation it holds) -- always just before the checkpoint itself."""
    if unsaved:
        folder.write_part(state.generation, Records.concat(unsaved))
        unsaved.clear()


def _write_outputs(folder: RunFolder, problem, state, final: bool) -> tuple[pd.DataFrame,
                                                                            pd.DataFrame]:
    pareto = pareto_table(state.archive.records, problem.study)
    folder.write_pareto(pareto)
    conv = search.convergence_table(state)
    folder.write_convergence(conv)
    if final:
        folder.merge_evaluated(state.generation)
    return pareto, conv


def _run(folder: RunFolder, problem: HeatSinkProblem, state: search.SearchState,
         reporter: Reporter, plots: bool) -> RunResult:
    b = state.budget
    total, unit = _progress_total(state, problem)
    base_elapsed = state.elapsed_s
    t0 = time.perf_counter()
    model0 = problem.model_seconds
    extra = {"version": version()}
    reporter.start(total, state.method)

    def line() -> str:
        return _line(state, state.elapsed_s, total, unit, problem.study)

    interrupted = False
    reason = None
    unsaved: list[Records] = []  # records since the last checkpoint (column arrays)
    last_outputs = time.monotonic()
    try:
        with _Interrupt(reporter) as intr:
            while True:
                elapsed = base_elapsed + time.perf_counter() - t0
                reason = search.stop_reason(state, problem, elapsed)
                if reason is None and intr.requested:
                    reason, interrupted = "interrupted", True
                if reason is not None:
                    break
                res = search.step(state, problem)
                if res is None:
                    reason = "nothing left to evaluate"
                    break
                unsaved.append(res.evaluation.batch)
                state.elapsed_s = base_elapsed + time.perf_counter() - t0
                done = state.evaluations if unit == "evaluations" else state.generation
                reporter.update(done, line)
                if b.checkpoint_every and state.generation % b.checkpoint_every == 0:
                    _flush(folder, state, unsaved)
                    save_checkpoint(folder.path, problem, state, extra)
                    if time.monotonic() - last_outputs >= OUTPUTS_EVERY_S:
                        _write_outputs(folder, problem, state, final=False)
                        last_outputs = time.monotonic()
                    folder.log(f"checkpoint at generation {state.generation}")
    except KeyboardInterrupt:
        reporter.close()
        folder.log("interrupted at once; the last checkpoint stands")
        raise
    except Exception as exc:
        reporter.close()
        folder.log("failed:\n" + traceback.format_exc())
        raise RunError(
            f"the run failed in generation {state.generation + 1} ({exc.__class__.__name__}: "
            f"{exc}); the traceback is in {folder.log_file}") from exc
    finally:
        reporter.close()
    state.elapsed_s = base_elapsed + time.perf_counter() - t0
    state.stop_reason = reason
    _flush(folder, state, unsaved)
    save_checkpoint(folder.path, problem, state, extra)
    pareto, conv = _write_outputs(folder, problem, state, final=True)
    model_s = problem.model_seconds - model0
    run_s = time.perf_counter() - t0
    reporter.message(line(), console=False)
    reporter.message(
        f"stopped: {reason}; {state.generation} generations, {state.evaluations} designs "
        f"evaluated, {len(pareto)} on the Pareto front; model {model_s:.1f} s of "
        f"{run_s:.1f} s this session"
    )
    if len(pareto) == 0:
        reporter.message("warning: no evaluated design meets every constraint in every scenario")
    if plots and not interrupted:
        from optim.plots import make_plots

        for name, err in make_plots(folder, problem, state, pareto, conv).items():
            reporter.message(f"warning: plot '{name}' failed: {err}")
    if not interrupted:
        from optim.report import write_report

        try:
            reporter.message(f"report: {write_report(folder.path)}", console=False)
        except Exception as exc:  # the run's results stand; the report can be rewritten
            folder.log("report failed:\n" + traceback.format_exc())
            reporter.message(
                f"warning: report.html failed ({exc.__class__.__name__}: {exc}); "
                f"retry with: finfront report {folder.path}"
            )
    return RunResult(
        folder=folder.path, pareto=pareto, convergence=conv, method=state.method,
        generations=state.generation, evaluations=state.evaluations, stop_reason=reason,
        interrupted=interrupted, elapsed_s=state.elapsed_s, model_s=model_s,
    )


def run_study(source: Any, out_dir: str | Path | None = None, *, progress: str = "auto",
              plots: bool = True, **overrides: Any) -> RunResult:
    """Run a study and return its result; the run folder is ``out_dir`` (new or empty) or
    ``runs/<name>-<time>``.

    ``progress``: 'auto' (a bar on a terminal, periodic lines otherwise), 'bar', 'lines' or
    'quiet'. ``plots=False`` skips the figures. Raises ``optim.study.StudyError`` for a bad
    study (before any folder is made), ``RunFolderError`` for an unusable folder,
    ``ConnectionError`` for an unreachable Dask scheduler.
    """
    study = apply_overrides(load(source), overrides)
    problem = HeatSinkProblem(study)
    state = search.new_state(problem, study.budget, study.seed)
    runner = make_runner(study.budget.workers, study.budget.dask_scheduler)
    path = Path(out_dir) if out_dir is not None else RunFolder.default_path(study.name)
    try:
        folder = RunFolder.create(path, study.resolved)
    except BaseException:
        _close(runner)
        raise
    reporter = Reporter(folder, progress)
    problem.attach_runner(runner)
    reporter.message(f"finfront {version()}: study '{study.name}' -> {folder.path}",
                     console=False)
    reporter.message(
        f"method {state.method}, population {study.budget.population}, seed {study.seed}, "
        f"{runner.describe() if runner else 'serial evaluation'}; "
        f"{len(study.scenarios)} scenario(s), {problem.n_var} variables, "
        f"{problem.n_obj} objectives, {len(study.constraints)} constraints",
        console=progress != "quiet",
    )
    try:
        return _run(folder, problem, state, reporter, plots)
    finally:
        _close(runner)


def resume_run(folder: str | Path, *, progress: str = "auto", plots: bool = True,
               **overrides: Any) -> RunResult:
    """Continue a run from its checkpoint to the (optionally extended) budget.

    Budget overrides may raise ``generations``, ``max_evaluations``, ``wall_time_s`` or
    change the workers; ``method``, ``population``, ``sweep_points`` and ``seed`` are those of
    the run. A run resumed to the same budget ends at the same Pareto front as one never
    interrupted.
    """
    rf = RunFolder.open(Path(folder))
    payload = load_checkpoint(rf.path)
    problem: HeatSinkProblem = payload["problem"]
    state: search.SearchState = payload["state"]
    over = {k: v for k, v in overrides.items() if v is not None}
    fixed = [k for k in over if k in RESUME_FIXED and over[k] != _current(state, k)]
    if fixed:
        raise ValueError(f"{fixed[0]}: cannot change on resume; it is fixed when a run starts")
    unknown = sorted(set(over) - set(BUDGET_KEYS))
    if unknown:
        raise ValueError(f"unknown override {unknown[0]!r}; expected one of: {BUDGET_KEYS}")
    state.budget = dataclasses.replace(state.budget, **over)
    state.stop_reason = None
    rf.drop_parts_after(state.generation)
    runner = make_runner(state.budget.workers, state.budget.dask_scheduler)
    problem.attach_runner(runner)  # what the pickle dropped
    reporter = Reporter(rf, progress)
    reporter.message(
        f"finfront {version()}: resume at generation {state.generation} "
        f"({state.evaluations} designs evaluated); "
        f"{runner.describe() if runner else 'serial evaluation'}",
        console=progress != "quiet",
    )
    if payload.get("version") not in (None, version()):
        reporter.message(f"warning: checkpoint written by finfront {payload.get('version')}")
    try:
        return _run(rf, problem, state, reporter, plots)
    finally:
        _close(runner)


def _current(state: search.SearchState, key: str):
    if key == "seed":
        return state.seed
    return getattr(state.budget, key)


def _close(runner) -> None:
    if runner is not None:
        runner.close()


__all__ = ["RunError", "RunResult", "run_study", "resume_run", "version", "CheckpointError",
           "RunFolderError"]
