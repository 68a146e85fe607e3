"""Parallel evaluation (local processes, Dask) gives exactly the serial results.

The population is cut into chunks evaluated in other processes; since every design's row of
``models.evaluate`` depends on that design only, the joined tables must equal the serial ones
bit for bit, and a whole run must end at the same Pareto front. No outside reference is
involved: the reference is the serial evaluation itself (exact equality, no tolerance).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from optim.api import run_study
from optim.parallel import DaskRunner, ProcessRunner, split_design
from optim.problem import HeatSinkProblem, uniform_sample

ROOT = Path(__file__).resolve().parents[1]
QUICKSTART = ROOT / "studies" / "quickstart.yaml"


@pytest.fixture(scope="module")
def problem() -> HeatSinkProblem:
    from optim.study import load_study

    return HeatSinkProblem(load_study(QUICKSTART))


@pytest.fixture(scope="module")
def population(problem) -> np.ndarray:
    # 400 designs: large enough for several chunks of at least MIN_CHUNK designs each
    return problem.codec.repair(uniform_sample(problem.codec, 400, np.random.default_rng(7)))


@pytest.fixture(scope="module")
def serial(problem, population) -> pd.DataFrame:
    problem.attach_runner(None)
    return problem.evaluate_population(population).records


def test_split_design_keeps_order_and_rows(problem, population):
    design = problem.study.design_from(problem.codec.decode(population))
    parts = split_design(design, 4)
    assert len(parts) == 4
    joined = np.concatenate([p.arrays()["fin_height_m"] for p in parts])
    np.testing.assert_array_equal(joined, design.arrays()["fin_height_m"])
    # a small population is never cut into tiny chunks
    small = problem.study.design_from(problem.codec.decode(population[:50]))
    assert len(split_design(small, 8)) == 1


def test_process_pool_equals_serial(problem, population, serial):
    runner = ProcessRunner(2)
    try:
        problem.attach_runner(runner)
        got = problem.evaluate_population(population).records
    finally:
        problem.attach_runner(None)
        runner.close()
    pd.testing.assert_frame_equal(got, serial, check_exact=True)


def test_dask_local_cluster_equals_serial(problem, population, serial):
    distributed = pytest.importorskip("distributed")
    # two worker processes on the loopback address, no dashboard (a LocalCluster otherwise
    # serves one on 0.0.0.0:8787); the chunks and tables travel pickled, as to a real cluster
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            runner = DaskRunner(client)
            try:
                problem.attach_runner(runner)
                got = problem.evaluate_population(population).records
            finally:
                problem.attach_runner(None)
                runner.close()
    pd.testing.assert_frame_equal(got, serial, check_exact=True)


def test_dask_unreachable_scheduler_is_one_clear_error():
    with pytest.raises(ConnectionError, match="cannot reach a scheduler"):
        DaskRunner("tcp://127.0.0.1:9", timeout_s=1.0)


def test_run_with_workers_ends_at_the_serial_front(tmp_path):
    budget = dict(population=20, generations=4, method="nsga2", plots=False, progress="quiet")
    a = run_study(QUICKSTART, tmp_path / "serial", **budget)
    b = run_study(QUICKSTART, tmp_path / "workers", workers=2, **budget)
    assert len(a.pareto) > 0
    pd.testing.assert_frame_equal(a.pareto, b.pareto, check_exact=True)
