"""The overnight study end to end with a tiny budget: four placed sources, bypass clearances,
four scenarios (hot high-altitude, slowed fans, fan stopped) and three objectives.

The checks are of the tool's contract (every constraint holds in every scenario, the worst
scenario is named), plus a physical fact: with the fan stopped the sink runs much hotter per
watt (common practice, no source).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from models import evaluate
from optim.api import run_study
from optim.study import load_study

ROOT = Path(__file__).resolve().parents[1]
OVERNIGHT = ROOT / "studies" / "overnight.yaml"


def test_overnight_study_runs_end_to_end_with_every_scenario(tmp_path):
    study = load_study(OVERNIGHT)
    names = [s.name for s in study.scenarios]
    assert names == ["nominal", "hot_altitude", "quiet_fans", "fan_stopped"]
    assert len(study.scenarios[0].conditions.sources) == 4
    assert study.scenarios[0].conditions.clearance_top_m > 0
    result = run_study(OVERNIGHT, tmp_path / "run", progress="quiet", plots=False,
                       population=40, generations=6, workers=1)
    assert result.evaluations == 240
    assert (result.folder / "report.html").is_file()
    evaluated = result.evaluated()
    assert set(evaluated["worst_scenario"].dropna()) <= set(names)
    feasible = evaluated[evaluated["feasible"]]
    margins = [c for c in evaluated.columns if c.startswith("margin_")]
    # a feasible design meets every constraint in every scenario (worst-scenario margins)
    assert (feasible[margins] >= 0).all().all()
    assert len(result.pareto) == len(result.pareto.drop_duplicates("design_id"))


def test_fan_stopped_scenario_is_evaluated_by_natural_convection():
    study = load_study(OVERNIGHT)
    rng = np.random.default_rng(0)
    X = {
        "fin_count": rng.integers(16, 50, 30),
        "fin_thickness_root_m": rng.uniform(1.2e-3, 3.5e-3, 30),
        "fin_taper_ratio": rng.uniform(0.5, 1.0, 30),
        "fin_height_m": rng.uniform(0.025, 0.07, 30),
        "base_thickness_m": rng.uniform(5e-3, 15e-3, 30),
        "material": np.zeros(30, dtype=int),
        "fan": np.zeros(30, dtype=int),
    }
    design = study.design_from(X)
    by_name = {s.name: s.conditions for s in study.scenarios}
    forced = evaluate(design, by_name["nominal"])
    stopped = evaluate(design, by_name["fan_stopped"])
    ok = forced["valid"] & stopped["valid"]
    assert ok.sum() > 10
    assert (stopped.loc[ok, "flow_m3_per_s"] == 0).all()
    assert (
        stopped.loc[ok, "sink_resistance_K_per_W"] > 2 * forced.loc[ok, "sink_resistance_K_per_W"]
    ).all()
