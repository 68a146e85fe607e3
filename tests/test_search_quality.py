"""Search quality: NSGA-II against the exhaustive sweep, and the optimal plate spacing
against Bejan & Sciubba (1992).

1. On a three-variable space (fin count, fin height, fin thickness) NSGA-II's Pareto front
   reaches at least 99 % of the hypervolume of the exhaustive sweep's front with at most 5 %
   of the sweep's evaluations. Both fronts are scaled by the sweep front's ideal and nadir
   points (reference point 1.1 on every axis). The 99 % / 5 % figures are the project's
   acceptance target (issue "study runner", item 9), not a published number.

2. Bejan, A. & Sciubba, E. (1992), "The optimal spacing of parallel plates cooled by forced
   convection", Int. J. Heat Mass Transfer 35(12), 3259-3264: for a stack of isothermal
   parallel plates of length L in a fixed volume, with a fixed pressure drop dp across it,
   thin plates (fin efficiency 1) and no entrance or exit losses, the spacing that maximises
   the heat transfer scales as L^(1/2) (mu alpha)^(1/4) dp^(-1/4) (the paper's abstract), i.e.
   D_opt / L ~ 2.7 Be^(-1/4) with Be = dp L^2 / (mu alpha) for air. The coefficient 2.7 is
   recalled from memory (of the paper and of Bejan, "Convection Heat Transfer", ch. 3), not
   read from the paper here. The search must find that spacing within 15 %: the issue's
   acceptance band, wide enough for the paper's own approximation (intersection of the
   small- and large-spacing asymptotes, matched to numerical results), the difference between
   its plate model and the model's developing-flow duct correlations with an effectiveness-NTU
   air heating, and the integer fin count (one fin is about 2 % of the spacing here).
"""

from __future__ import annotations

import numpy as np
import pytest

from models.contract import AirSupply, Conditions, FanCurve, HeatSource
from optim import search
from optim.problem import HeatSinkProblem
from optim.study_types import Budget, Constraint, Material, Objective, Scenario, Study, Variable

AMBIENT_K = 308.15
P_ATM = 101325.0


def _study(variables, objectives, constraints, fan, budget, *, k=200.0, fixed=None,
           width=0.1, length=0.12, fillet=0.0003, power=80.0, ambient=AMBIENT_K) -> Study:
    # invented scenario (rules: demo data is invented); the physics checks below do not
    # depend on its particular numbers
    cond = Conditions(
        ambient_temperature_K=ambient, ambient_pressure_Pa=P_ATM,
        supply=AirSupply(mode="fan", fans=(fan,)),
        sources=(HeatSource(power_W=power, length_m=0.04, width_m=0.04, name="dev",
                            junction_to_case_K_per_W=0.1, max_junction_temperature_K=423.15),),
    )
    fixed_all = {"base_thickness_m": 0.006, "material": "alloy", "fin_taper_ratio": 1.0}
    fixed_all.update(fixed or {})
    return Study(
        name="search-quality", seed=4, variables=tuple(variables), fixed=fixed_all,
        objectives=tuple(objectives), constraints=tuple(constraints), budget=budget,
        scenarios=(Scenario("nominal", cond),), materials=(Material("alloy", k, 2700.0),),
        fan_names=(fan.name,), base_width_m=width, flow_length_m=length, max_height_m=0.06,
        root_fillet_m=fillet, tip_radius_m=0.0,
    )


DEMO_FAN = FanCurve(  # invented axial fan
    flow_m3_per_s=(0.0, 0.004, 0.008, 0.012, 0.016, 0.020),
    pressure_Pa=(160.0, 140.0, 112.0, 78.0, 40.0, 0.0), name="demo")


def _run(problem: HeatSinkProblem, budget: Budget, seed: int) -> search.SearchState:
    state = search.new_state(problem, budget, seed)
    while search.stop_reason(state, problem, 0.0) is None:
        if search.step(state, problem) is None:
            break
    return state


def test_nsga2_reaches_99_percent_of_the_sweep_hypervolume_with_5_percent_of_its_cost():
    variables = (
        Variable("fin_count", "int", 8.0, 40.0),
        Variable("fin_height_m", "real", 0.015, 0.05),
        Variable("fin_thickness_root_m", "real", 0.0008, 0.0025),
    )
    study = _study(
        variables, (Objective("mass_kg"), Objective("junction_temperature_K")),
        (Constraint("fin_height_to_gap_ratio", "<=", 12.0, "extruder.max_height_to_gap"),
         Constraint("pressure_drop_Pa", "<=", 90.0, "constraints.pressure_drop")),
        DEMO_FAN, Budget(method="sweep", sweep_points=25),
    )
    problem = HeatSinkProblem(study)
    sweep = _run(problem, study.budget, study.seed)
    n_sweep = sweep.evaluations
    assert n_sweep == 33 * 25 * 25
    ga_budget = Budget(method="nsga2", population=32, generations=32)
    ga = _run(problem, ga_budget, seed=4)
    assert ga.evaluations <= 0.05 * n_sweep
    ideal, nadir = sweep.archive.ideal, sweep.archive.nadir
    hv_sweep = search.normalised_hypervolume(sweep.archive.F, ideal, nadir)
    hv_ga = search.normalised_hypervolume(ga.archive.F, ideal, nadir)
    assert hv_ga >= 0.99 * hv_sweep, (hv_ga, hv_sweep, ga.evaluations)


# Air at 300 K and 1 atm: Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table A.4
# (values recalled from memory): mu = 184.6e-7 N s/m^2, alpha = 22.5e-6 m^2/s. Be depends on
# their product to the power 1/4, so a 1 % error in either moves D_opt by 0.25 %.
MU_AIR_300K = 184.6e-7
ALPHA_AIR_300K = 22.5e-6


@pytest.mark.parametrize("dp", [2.0, 10.0])
def test_optimal_plate_spacing_at_fixed_pressure_drop_bejan_sciubba(dp, check):
    L, W, H = 0.1, 0.1, 0.05
    # a flat fan curve is a fixed pressure across the sink (no extra system impedance);
    # the drop to zero far beyond the operating flows only closes the curve
    flat = FanCurve(flow_m3_per_s=(0.0, 0.5, 1.0, 2.0),
                    pressure_Pa=(dp, dp * 0.99999, dp * 0.99998, 0.0), name="fixed-dp")
    study = _study(
        (Variable("fin_count", "int", 10.0, 160.0),),
        (Objective("sink_resistance_K_per_W"),),  # min R = max heat at a fixed base-air dT
        (), flat, Budget(method="nsga2", population=20, generations=12),
        k=1e5,  # fin efficiency 1 (checked below)
        fixed={"fin_thickness_root_m": 1e-4, "fin_height_m": H, "base_thickness_m": 0.003},
        width=W, length=L, fillet=0.0, ambient=300.0,
    )
    problem = HeatSinkProblem(study)
    state = _run(problem, study.budget, study.seed)
    assert state.method == "nsga2" and problem.n_obj == 1  # pymoo's GA for one objective
    best = state.archive.records.iloc[0]
    # Bejan & Sciubba's idealisation holds for the design found:
    assert best["fin_efficiency"] > 0.99  # plates at the base temperature
    assert best["reynolds_number"] < 2000  # laminar
    assert best["gap_mean_m"] / H < 0.1  # parallel plates: the channel's short side is the gap
    # Be on the pressure drop across the plates (the model's minor losses are < 1 % of it at
    # these free-flow ratios, sigma > 0.95: a 1 % change in dp moves D_opt by 0.25 %)
    Be = best["pressure_drop_Pa"] * L**2 / (MU_AIR_300K * ALPHA_AIR_300K)
    d_opt = 2.7 * L * Be ** -0.25
    check(f"optimal plate spacing at dp = {dp:g} Pa, L = 0.1 m (m)", best["gap_mean_m"], d_opt,
          "Bejan & Sciubba (1992), IJHMT 35(12) 3259: D_opt/L = 2.7 Be^(-1/4) "
          "(coefficient recalled from memory)", rtol=0.15)
    # the search found the model's own optimum: no fin count nearby does better
    n = int(best["fin_count"])
    X = np.array([[n - 2.0], [n - 1.0], [n + 1.0], [n + 2.0]])
    near = problem.evaluate_population(X).records["sink_resistance_K_per_W"].to_numpy()
    assert np.all(near >= best["sink_resistance_K_per_W"])
