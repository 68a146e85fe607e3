"""pareto.csv keeps at most PARETO_MAX designs spread along the front (tool contract)."""

from __future__ import annotations

import numpy as np

from optim.runfolder import spread_subset


def test_spread_subset_keeps_the_extremes_and_spreads_the_rest():
    t = np.linspace(0.0, 1.0, 5001)
    F = np.column_stack([t, (1.0 - t) ** 2])  # a convex two-objective front, densely sampled
    idx = spread_subset(F, 50)
    assert len(idx) == 50 and len(set(idx.tolist())) == 50
    assert 0 in idx and 5000 in idx  # the best of each objective
    # evenly spread: no gap between neighbours along the front more than 3x the mean gap
    chosen = F[np.sort(idx)]
    gaps = np.hypot(*np.diff(chosen, axis=0).T)
    assert gaps.max() < 3.0 * gaps.mean()
    assert np.array_equal(idx, spread_subset(F, 50))  # deterministic


def test_small_fronts_are_kept_whole():
    F = np.random.default_rng(0).random((30, 3))
    assert np.array_equal(spread_subset(F, 200), np.arange(30))
