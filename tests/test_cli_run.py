"""End to end: the ``finfront`` command on the quickstart study with a small budget.

Checks the run folder's files and columns, the exit codes, and the one-line errors. The
checks are of the tool's own contract (docs/running.md), not of physics.
"""

from __future__ import annotations

import gzip
import os
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest

from optim.cli import main

ROOT = Path(__file__).resolve().parents[1]
QUICKSTART = ROOT / "studies" / "quickstart.yaml"
SMALL = ["--population", "20", "--generations", "6", "--method", "nsga2", "--quiet"]


def _cli(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("FORCE_COLOR", None)
    return subprocess.run([sys.executable, "-m", "optim.cli", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def run_folder(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("cli") / "qs"
    r = _cli("run", str(QUICKSTART), "--out", str(out), *SMALL)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip().endswith(str(out))
    return out


def test_run_folder_holds_every_output(run_folder):
    for name in ("study.yaml", "pareto.csv", "evaluated.csv.gz", "convergence.csv", "log.txt",
                 "report.html",
                 "checkpoint.pkl"):
        assert (run_folder / name).is_file(), name
    for fig in ("pareto", "convergence", "fan_system", "fin_profile", "design_space"):
        for ext in ("png", "svg"):
            assert (run_folder / "plots" / f"{fig}.{ext}").stat().st_size > 1000, (fig, ext)
    assert not list((run_folder / "parts").glob("*")), "parts are merged at the end"


def test_pareto_columns_carry_units(run_folder):
    from optim.study import load_study

    study = load_study(QUICKSTART)
    p = pd.read_csv(run_folder / "pareto.csv")
    assert len(p) > 0
    for col in ("design_id", "fin_count", "fin_height_mm", "fin_thickness_root_mm",
                "base_thickness_mm", "mass_kg", "junction_temperature_K",
                "junction_temperature_degC", "pressure_drop_Pa", "flow_m3_per_h",
                "limiting_constraint", "worst_scenario"):
        assert col in p.columns, col
    for o in study.objectives:
        assert o.column in p.columns
    for c in study.constraints:
        assert f"margin_{c.label}" in p.columns
        assert (p[f"margin_{c.label}"] >= 0).all()  # every Pareto design meets every limit
    assert set(p["worst_scenario"]) <= {s.name for s in study.scenarios}
    # degC and K columns describe the same temperature
    assert ((p["junction_temperature_degC"] + 273.15 - p["junction_temperature_K"]).abs()
            < 1e-9).all()


def test_evaluated_and_convergence(run_folder):
    with gzip.open(run_folder / "evaluated.csv.gz", "rt") as fh:
        ev = pd.read_csv(fh)
    assert len(ev) == 120 and ev["eval_id"].tolist() == list(range(120))  # 6 x 20 designs
    conv = pd.read_csv(run_folder / "convergence.csv")
    assert list(conv.columns[:4]) == ["generation", "evaluations", "hypervolume",
                                      "feasible_fraction"]
    assert conv["evaluations"].tolist() == [20, 40, 60, 80, 100, 120]
    assert conv["hypervolume"].is_monotonic_increasing  # best-so-far front never loses
    log = (run_folder / "log.txt").read_text()
    assert "stopped: generation limit (6)" in log
    assert "\x1b[" not in log  # no terminal escape codes in the log


def test_summary_and_resume_extend(run_folder, capsys):
    assert main(["summary", str(run_folder)]) == 0
    out = capsys.readouterr().out
    assert "Pareto front" in out and "knee" in out
    assert main(["resume", str(run_folder), "--generations", "7", "--quiet", "--no-plots"]) == 0
    assert len(pd.read_csv(run_folder / "convergence.csv")) == 7


def test_check_prints_the_middle_design(capsys):
    assert main(["check", str(QUICKSTART)]) == 0
    out = capsys.readouterr().out
    assert "middle of the bounds" in out and "junction temperature" in out


def test_version_and_help(capsys):
    with pytest.raises(SystemExit) as e:
        main(["--version"])
    assert e.value.code == 0 and capsys.readouterr().out.startswith("finfront ")
    for cmd in ("run", "resume", "check", "summary"):
        with pytest.raises(SystemExit) as e:
            main([cmd, "--help"])
        assert e.value.code == 0
        assert "usage: finfront " + cmd in capsys.readouterr().out


def test_bad_study_is_one_line_exit_2_and_no_folder(tmp_path, capsys):
    bad = tmp_path / "bad.yaml"
    bad.write_text("study: [unclosed\n")
    out = tmp_path / "never"
    r = _cli("run", str(bad), "--out", str(out))
    assert r.returncode == 2
    assert r.stderr.startswith("error: ") and len(r.stderr.strip().splitlines()) == 1
    assert not out.exists()
    assert main(["run", str(tmp_path / "missing.yaml"), "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("error: ") and len(err.strip().splitlines()) == 1
    assert not out.exists()


def test_existing_folder_and_bad_options_are_refused(tmp_path, run_folder, capsys):
    assert main(["run", str(QUICKSTART), "--out", str(run_folder), *SMALL]) == 2
    assert "already exists" in capsys.readouterr().err
    assert main(["resume", str(tmp_path / "nothing")]) == 2
    assert capsys.readouterr().err.startswith("error: ")
    assert main(["run", str(QUICKSTART), "--out", str(tmp_path / "p"), "--population", "1"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("error: population") and not (tmp_path / "p").exists()


def test_every_constraint_holds_in_every_scenario_and_the_worst_is_named(tmp_path):
    """A study given as a dict, with a second, hotter scenario (issue 'scenarios'): margins
    are the worst over the scenarios, and worst_scenario names the scenario of the limiting
    constraint. Reference: the per-scenario columns of the same records (exact)."""
    import yaml

    from optim.api import run_study

    raw = yaml.safe_load(QUICKSTART.read_text())
    raw["scenarios"] = [{"name": "nominal"}, {"name": "hot_room", "ambient": "42 degC"}]
    res = run_study(raw, tmp_path / "two", population=20, generations=6, method="nsga2",
                    plots=False, progress="quiet")
    ev = res.evaluated()
    assert len(res.pareto) > 0
    label = next(c for c in ev.columns if c.startswith("margin_") and "junction" in c)
    limit = 5.0  # the quickstart's min_junction_margin, "5 K"
    nominal, hot = ev["junction_margin_K"], ev["hot_room:junction_margin_K"]
    ok = ev["valid"].astype(bool) & ev["hot_room:valid"].astype(bool)
    expected = (pd.concat([nominal, hot], axis=1).min(axis=1) - limit) / limit
    assert ((ev.loc[ok, label] - expected[ok]).abs() < 1e-12).all()
    # the hot room is the worse scenario for the junction wherever it limits a design
    lim = ok & (ev["limiting_constraint"] == label.removeprefix("margin_"))
    assert lim.any() and (ev.loc[lim, "worst_scenario"] == "hot_room").all()
    # every Pareto design meets the junction limit in the hot room too
    assert (res.pareto["hot_room:junction_margin_K"] >= limit).all()
