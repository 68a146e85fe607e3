"""``finfront``: run, resume, check and summarise heat-sink studies from the terminal.

Exit codes: 0 success; 1 a failure while running (e.g. a Dask scheduler that cannot be
reached); 2 bad input (study file, options, run folder), reported as one line
``error: ...`` on stderr; 130 interrupted (the checkpoint is saved; ``finfront resume``
continues).
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

import numpy as np
import pandas as pd

from optim.problem import HeatSinkProblem

EXIT_RUNTIME, EXIT_INPUT, EXIT_INTERRUPT = 1, 2, 130


def _parser() -> argparse.ArgumentParser:
    from optim.api import version

    p = argparse.ArgumentParser(
        prog="finfront",
        description="Size plate-fin heat sinks for fan-cooled electronics: run a study to a "
                    "Pareto front, resume it, check a study file, summarise a run, write its "
                    "report, export a design for CAD.",
    )
    p.add_argument("--version", action="version", version=f"finfront {version()}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", required=True)

    def budget_opts(sp: argparse.ArgumentParser, new: bool) -> None:
        g = sp.add_argument_group("budget (overrides the study file)")
        g.add_argument("--generations", type=int, metavar="N", help="generation limit")
        g.add_argument("--evaluations", type=int, metavar="N", dest="max_evaluations",
                       help="limit on designs evaluated")
        g.add_argument("--wall-time", type=float, metavar="SECONDS", dest="wall_time_s",
                       help="wall-time limit in seconds")
        if new:
            g.add_argument("--population", type=int, metavar="N", help="population size")
            g.add_argument("--method", choices=("auto", "nsga2", "nsga3", "sweep", "random"),
                           help="search method (default: the study's, usually auto)")
            g.add_argument("--seed", type=int, metavar="N", help="random seed")
        x = sp.add_argument_group("evaluation and output")
        x.add_argument("--workers", type=int, metavar="N",
                       help="local worker processes (1 = serial)")
        x.add_argument("--dask", metavar="ADDRESS", dest="dask_scheduler",
                       help="Dask scheduler address, e.g. tcp://10.0.0.5:8786")
        x.add_argument("--quiet", action="store_true", help="no progress display")
        x.add_argument("--no-plots", action="store_true", help="skip the figures")

    r = sub.add_parser("run", help="run a study file to a Pareto front",
                       description="Run a study file; results go to a new run folder.")
    r.add_argument("study", metavar="STUDY", help="study file (YAML)")
    r.add_argument("--out", metavar="DIR", help="run folder (new or empty; default "
                   "runs/<name>-<date>-<time>)")
    budget_opts(r, new=True)

    s = sub.add_parser("resume", help="continue an interrupted or finished run",
                       description="Continue a run from its checkpoint; a larger "
                       "--generations or --evaluations extends a finished run.")
    s.add_argument("folder", metavar="FOLDER", help="run folder")
    budget_opts(s, new=False)

    c = sub.add_parser("check", help="validate a study file and evaluate one design",
                       description="Validate a study file, evaluate the design in the middle "
                       "of the bounds in every scenario, and print its key results.")
    c.add_argument("study", metavar="STUDY", help="study file (YAML)")

    m = sub.add_parser("summary", help="summarise a run folder",
                       description="Print what a run found: budget used, Pareto front, "
                       "picked designs and what limits them.")
    m.add_argument("folder", metavar="FOLDER", help="run folder")

    rp = sub.add_parser("report", help="write (or rewrite) a run's report.html",
                        description="Write the self-contained design-review report "
                        "report.html into a run folder.")
    rp.add_argument("folder", metavar="FOLDER", help="run folder")

    e = sub.add_parser("export", help="export one design of a run for CAD",
                       description="Export a design of a run folder by its ID (the "
                       "design_id column of pareto.csv, e.g. D012): a DXF of the profile "
                       "with dimensions, a STEP solid (needs the cad extra) and a parameter "
                       "sheet (JSON and CSV), re-evaluated so that they match the report.")
    e.add_argument("folder", metavar="FOLDER", help="run folder")
    e.add_argument("design", metavar="DESIGN_ID", help="design ID, e.g. D012 or 12")
    e.add_argument("--out", metavar="DIR", help="output folder (default FOLDER/export)")
    e.add_argument("--formats", metavar="LIST", default="dxf,step,json,csv",
                   help="comma-separated subset of dxf,step,json,csv (default: all)")
    return p


def _error(msg: str, code: int) -> int:
    print(f"error: {msg}", file=sys.stderr)
    return code


def _overrides(args: argparse.Namespace) -> dict:
    keys = ("generations", "max_evaluations", "wall_time_s", "population", "method", "seed",
            "workers", "dask_scheduler")
    return {k: getattr(args, k) for k in keys if getattr(args, k, None) is not None}


def _study_error():
    try:
        from optim.study import StudyError
    except ImportError:  # pragma: no cover - the loader is part of the package
        return ValueError
    return StudyError


def main(argv: list[str] | None = None) -> int:
    """The ``finfront`` entry point; returns the exit code."""
    args = _parser().parse_args(argv)
    from optim.runtime import tune_allocator

    tune_allocator()
    from optim.api import RunError
    from optim.checkpoint import CheckpointError
    from optim.runfolder import RunFolderError

    StudyError = _study_error()
    try:
        if args.command == "run":
            return _cmd_run(args)
        if args.command == "resume":
            return _cmd_resume(args)
        if args.command == "check":
            return _cmd_check(args)
        if args.command == "report":
            return _cmd_report(args)
        if args.command == "export":
            return _cmd_export(args)
        return _cmd_summary(args)
    except StudyError as exc:
        return _error(str(exc).splitlines()[0] if str(exc) else "bad study file", EXIT_INPUT)
    except (RunFolderError, CheckpointError, ValueError, FileNotFoundError) as exc:
        return _error(str(exc), EXIT_INPUT)
    except KeyError as exc:
        return _error(str(exc.args[0]) if exc.args else "unknown key", EXIT_INPUT)
    except ImportError as exc:  # the optional cad extra for STEP
        return _error(f"{exc} (or choose --formats dxf,json,csv)", EXIT_INPUT)
    except (RunError, ConnectionError, OSError) as exc:
        return _error(str(exc), EXIT_RUNTIME)
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return EXIT_INTERRUPT
    except Exception as exc:  # a bug: one line here, the traceback in the run's log.txt
        if os.environ.get("FINFRONT_DEBUG"):
            raise
        return _error(f"internal error ({exc.__class__.__name__}: {exc}); the run folder's "
                      "log.txt has the details (set FINFRONT_DEBUG=1 to see them here)",
                      EXIT_RUNTIME)


def _finish(result) -> int:
    if result.interrupted:
        print(f"interrupted after generation {result.generations}; checkpoint saved. "
              f"Continue with: finfront resume {result.folder}", file=sys.stderr)
        return EXIT_INTERRUPT
    print(result.folder)
    return 0


def _cmd_run(args) -> int:
    from optim.api import run_study

    result = run_study(args.study, args.out, progress="quiet" if args.quiet else "auto",
                       plots=not args.no_plots, **_overrides(args))
    return _finish(result)


def _cmd_resume(args) -> int:
    from optim.api import resume_run

    result = resume_run(args.folder, progress="quiet" if args.quiet else "auto",
                        plots=not args.no_plots, **_overrides(args))
    return _finish(result)


def _cmd_report(args) -> int:
    from optim.report import write_report

    print(write_report(Path(args.folder)))
    return 0


def _cmd_export(args) -> int:
    from optim.export_run import export_from_run

    formats = tuple(f.strip().lower() for f in args.formats.split(",") if f.strip())
    paths = export_from_run(
        Path(args.folder), args.design, Path(args.out) if args.out else None, formats=formats
    )
    for path in paths.values():
        print(path)
    return 0


# ----------------------------------------------------------------------------- check
def middle_design(problem: HeatSinkProblem) -> np.ndarray:
    """The decision vector in the middle of the bounds (integers rounded, middle choice)."""
    X = 0.5 * (problem.codec.xl + problem.codec.xu)
    return problem.codec.repair(X[None, :])


CHECK_ROWS = (
    "fin_count", "pitch_m", "gap_root_m", "fin_height_m", "fin_thickness_root_m",
    "fin_thickness_tip_m", "base_thickness_m", "mass_kg", "flow_m3_per_s",
    "channel_velocity_m_per_s", "reynolds_number", "pressure_drop_Pa", "system_pressure_Pa",
    "h_W_per_m2K", "fin_efficiency", "sink_resistance_K_per_W", "total_resistance_K_per_W",
    "base_temperature_K", "junction_temperature_K", "outlet_temperature_K",
    "fin_height_to_gap_ratio",
)


def _fmt(value, column: str) -> str:
    from optim.runfolder import display, shown

    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    try:
        v = float(shown([value], column)[0])
    except (TypeError, ValueError):
        return str(value)
    if not np.isfinite(v):
        return "-"
    unit = display(column)[0].rsplit("(", 1)[-1].rstrip(")") if "(" in display(column)[0] else ""
    return f"{v:.4g} {unit}".strip()


def _cmd_check(args) -> int:
    from rich.console import Console
    from rich.table import Table

    from optim import search
    from optim.api import load
    from optim.problem import HeatSinkProblem

    study = load(args.study)
    problem = HeatSinkProblem(study)
    X = middle_design(problem)
    ev = problem.evaluate_population(X)
    tables = [ev.records]
    console = Console(width=None if sys.stdout.isatty() else 120)
    console.print(f"study '{study.name}': valid. {problem.n_var} free variables, "
                  f"{problem.n_obj} objectives, {len(study.constraints)} constraints, "
                  f"{len(study.scenarios)} scenario(s).", highlight=False)
    method = search.resolve_method(problem, study.budget)
    grid = problem.codec.grid_size(study.budget.sweep_points)
    console.print(f"search: {method} (sweep grid {grid}"
                  f" points; population {study.budget.population}, generations "
                  f"{study.budget.generations})", highlight=False)
    rec = tables[0].iloc[0]
    t = Table(title="design in the middle of the bounds (nominal scenario)")
    t.add_column("quantity")
    t.add_column("value", justify="right")
    for v in study.variables:
        if v.kind == "choice":
            t.add_row(v.name, str(rec[v.name]))
    for col in CHECK_ROWS:
        if col in rec.index:
            from optim.runfolder import display

            t.add_row(display(col)[0].rsplit(" (", 1)[0], _fmt(rec[col], col))
    for o in study.objectives:
        if o.column not in CHECK_ROWS:
            t.add_row(f"objective: {o.column}", _fmt(rec[o.column], o.column))
    console.print(t)
    c = Table(title="constraints (margin = fraction of the limit; negative = violated)")
    for h in ("constraint", "column", "limit", "worst scenario value", "margin"):
        c.add_column(h)
    names = [s.name for s in study.scenarios]
    for con in study.constraints:
        vals = [rec.get(con.column if i == 0 else f"{n}:{con.column}") for i, n in
                enumerate(names)]
        worst = max(vals, key=lambda x: -np.inf if x is None or pd.isna(x) else
                    (x if con.sense == "<=" else -x))
        c.add_row(con.label, con.column, f"{con.sense} {_fmt(con.limit, con.column)}",
                  _fmt(worst, con.column), f"{rec[f'margin_{con.label}']:+.3f}")
    console.print(c)
    if not bool(rec["feasible"]):
        console.print(f"this design is not feasible: limited by {rec['limiting_constraint']} "
                      f"(worst scenario: {rec['worst_scenario']})", highlight=False)
    else:
        console.print(f"feasible; closest constraint: {rec['limiting_constraint']} "
                      f"(worst scenario: {rec['worst_scenario']})", highlight=False)
    return 0


# ----------------------------------------------------------------------------- summary
def _cmd_summary(args) -> int:
    from rich.console import Console
    from rich.table import Table

    from optim.checkpoint import load_checkpoint
    from optim.plots import picked_designs
    from optim.runfolder import RunFolder, RunFolderError, display

    folder = RunFolder(Path(args.folder))
    if not folder.pareto_file.is_file():
        raise RunFolderError(f"'{args.folder}': no pareto.csv; expected a finfront run folder")
    payload = load_checkpoint(folder.path)
    problem, state = payload["problem"], payload["state"]
    study = problem.study
    pareto = pd.read_csv(folder.pareto_file)
    console = Console(width=None if sys.stdout.isatty() else 120)
    console.print(f"[bold]{study.name}[/bold]  ({folder.path})")
    console.print(
        f"method {state.method}; {state.generation} generations, {state.evaluations} designs "
        f"evaluated in {state.elapsed_s:.1f} s; stopped: {state.stop_reason or 'not finished'}",
        highlight=False)
    if folder.convergence_file.is_file():
        conv = pd.read_csv(folder.convergence_file)
        if len(conv):
            last = conv.iloc[-1]
            console.print(f"final hypervolume {last['hypervolume']:.4f}; feasible fraction of "
                          f"the last generation {100 * last['feasible_fraction']:.0f}%",
                          highlight=False)
    console.print(f"Pareto front: {len(pareto)} designs")
    if len(pareto) == 0:
        console.print("no design met every constraint in every scenario")
        return 0
    for o in study.objectives:
        lab, f, off = display(o.column)
        v = pareto[o.column].to_numpy(float) * f + off
        console.print(f"  {lab}: {v.min():.4g} .. {v.max():.4g} ({o.sense})", highlight=False)
    counts = pareto["limiting_constraint"].value_counts()
    console.print("limited by: " + ", ".join(f"{k} ({v})" for k, v in counts.items()),
                  highlight=False)
    picks = picked_designs(pareto, study)
    t = Table(title="picked designs")
    t.add_column("")
    for label, _ in picks:
        t.add_column(label, justify="right")
    rows = ["design_id", "fin_count", "fin_height_m", "fin_thickness_root_m",
            "fin_thickness_tip_m", "base_thickness_m", "gap_root_m"]
    rows += [c for c in ("material", "fan") if c in pareto]
    rows += [o.column for o in study.objectives if o.column not in rows]
    rows += [c for c in ("mass_kg", "junction_temperature_K", "pressure_drop_Pa",
                         "flow_m3_per_s", "limiting_constraint", "worst_scenario")
             if c not in rows]
    for c in rows:
        if c not in pareto:
            continue
        name = display(c)[0].rsplit(" (", 1)[0] if pareto[c].dtype.kind == "f" else \
            c.replace("_", " ")
        t.add_row(name, *[_fmt(pareto.iloc[i][c], c) for _, i in picks])
    console.print(t)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
