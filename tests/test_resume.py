"""Checkpoint and resume: an interrupted run ends at the same Pareto front as one never
interrupted with the same seed.

The reference is the uninterrupted run itself (exact equality of the Pareto table and of
every evaluated design; no tolerance: the search is deterministic for a given seed).
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

from optim.api import resume_run, run_study
from optim.checkpoint import CheckpointError, load_checkpoint
from optim.runfolder import RunFolder

ROOT = Path(__file__).resolve().parents[1]
QUICKSTART = ROOT / "studies" / "quickstart.yaml"
SMALL = dict(population=16, method="nsga2", checkpoint_every=2, plots=False, progress="quiet")


def _evaluated(folder: Path) -> pd.DataFrame:
    return RunFolder(folder).read_evaluated().sort_values("eval_id").reset_index(drop=True)


def test_resume_after_generation_limit_equals_uninterrupted(tmp_path):
    whole = run_study(QUICKSTART, tmp_path / "whole", generations=8, **SMALL)
    part = run_study(QUICKSTART, tmp_path / "part", generations=3, **SMALL)
    assert part.generations == 3
    ckpt = load_checkpoint(tmp_path / "part")
    assert ckpt["state"].generation == 3
    assert ckpt["problem"].runner is None  # dropped by the pickle, re-attached on resume
    done = resume_run(tmp_path / "part", generations=8, plots=False, progress="quiet")
    assert done.generations == 8 and done.evaluations == whole.evaluations
    pd.testing.assert_frame_equal(done.pareto, whole.pareto, check_exact=True)
    pd.testing.assert_frame_equal(_evaluated(tmp_path / "part"), _evaluated(tmp_path / "whole"),
                                  check_exact=True)
    conv_a = pd.read_csv(tmp_path / "part" / "convergence.csv")
    conv_b = pd.read_csv(tmp_path / "whole" / "convergence.csv")
    pd.testing.assert_frame_equal(conv_a.drop(columns="generation_seconds"),
                                  conv_b.drop(columns="generation_seconds"))


def test_resume_drops_records_written_after_the_checkpoint(tmp_path):
    run_study(QUICKSTART, tmp_path / "r", generations=4, **SMALL)
    folder = RunFolder(tmp_path / "r")
    # pretend the run went on past its checkpoint (gen 4) and died: a stray generation 5
    stray = _evaluated(tmp_path / "r").head(3).assign(generation=5)
    folder.write_part(5, stray)
    resume_run(tmp_path / "r", generations=4, plots=False, progress="quiet")
    ev = _evaluated(tmp_path / "r")
    assert ev["generation"].max() == 4 and ev["eval_id"].is_unique


def test_resume_refuses_a_folder_without_checkpoint(tmp_path):
    with pytest.raises(CheckpointError, match="no checkpoint.pkl"):
        resume_run(tmp_path)
    run_study(QUICKSTART, tmp_path / "x", generations=2, **SMALL)
    with pytest.raises(ValueError, match="population: cannot change on resume"):
        resume_run(tmp_path / "x", population=40)


@pytest.mark.slow  # three CLI processes, about 10 s
def test_ctrl_c_checkpoints_and_resume_matches(tmp_path):
    """SIGINT in a real CLI process: it stops after the generation, saves, exits 130."""
    args = ["--population", "16", "--method", "nsga2", "--no-plots", "--quiet"]
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    cli = [sys.executable, "-m", "optim.cli"]
    whole = tmp_path / "whole"
    subprocess.run(cli + ["run", str(QUICKSTART), "--out", str(whole), "--generations", "30",
                          *args], check=True, env=env, cwd=ROOT, timeout=120)
    cut = tmp_path / "cut"
    proc = subprocess.Popen(cli + ["run", str(QUICKSTART), "--out", str(cut), "--generations",
                                   "30", *args], env=env, cwd=ROOT,
                            stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 60
    while not list((cut / "parts").glob("gen-*.pkl")) and time.time() < deadline:
        time.sleep(0.02)
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=60)
    if proc.returncode == 0:
        pytest.skip("the run finished before the interrupt arrived (machine too fast)")
    assert proc.returncode == 130, err
    assert "finfront resume" in err
    stopped = load_checkpoint(cut)["state"]
    assert 1 <= stopped.generation < 30 and stopped.stop_reason == "interrupted"
    r = subprocess.run(cli + ["resume", str(cut), "--no-plots", "--quiet"], env=env, cwd=ROOT,
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    pd.testing.assert_frame_equal(pd.read_csv(cut / "pareto.csv"),
                                  pd.read_csv(whole / "pareto.csv"), check_exact=True)


@pytest.mark.parametrize("objectives", [
    [{"minimise": "mass_kg"}],  # one objective: pymoo's GA
    [{"minimise": "junction_temperature_K"}, {"minimise": "mass_kg"},
     {"minimise": "pressure_drop_Pa"}],  # three objectives: NSGA-III
])
def test_every_algorithm_checkpoints_and_resumes_identically(tmp_path, objectives):
    import yaml

    raw = yaml.safe_load(QUICKSTART.read_text())
    raw["study"]["objectives"] = objectives
    opts = dict(SMALL, population=20)
    whole = run_study(raw, tmp_path / "whole", generations=5, **opts)
    run_study(raw, tmp_path / "part", generations=2, **opts)
    done = resume_run(tmp_path / "part", generations=5, plots=False, progress="quiet")
    assert done.method == ("nsga3" if len(objectives) == 3 else "nsga2")
    pd.testing.assert_frame_equal(done.pareto, whole.pareto, check_exact=True)


@pytest.mark.parametrize("method, first, then", [
    ("sweep", dict(max_evaluations=1000), dict(max_evaluations=1500)),  # batches of 500
    ("random", dict(generations=2), dict(generations=5)),
])
def test_sweep_and_random_resume_identically(tmp_path, method, first, then):
    opts = dict(SMALL, method=method, population=40)
    whole = run_study(QUICKSTART, tmp_path / "whole", **then, **opts)
    run_study(QUICKSTART, tmp_path / "part", **first, **opts)
    done = resume_run(tmp_path / "part", plots=False, progress="quiet", **then)
    assert done.method == method and done.evaluations == whole.evaluations
    pd.testing.assert_frame_equal(done.pareto, whole.pareto, check_exact=True)
