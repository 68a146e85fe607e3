"""The whole evaluation against energy balances, limits with published values, and scipy."""

from __future__ import annotations

import dataclasses

import CoolProp.CoolProp as CoolProp  # noqa: N813
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy.interpolate import PchipInterpolator
from scipy.optimize import brentq

from models import AirSupply, Conditions, Design, FanCurve, HeatSource
from models.evaluate import evaluate, upstream_heating_fractions

FAN = FanCurve(
    flow_m3_per_s=(0.0, 0.01, 0.02, 0.03, 0.04),
    pressure_Pa=(120.0, 100.0, 70.0, 35.0, 0.0),
    name="test_fan",
)
SOURCE = HeatSource(
    power_W=60.0,
    length_m=0.03,
    width_m=0.03,
    interface_resistance_K_m2_per_W=1e-5,
    junction_to_case_K_per_W=0.1,
    max_junction_temperature_K=398.15,
    name="chip",
)


def conditions(**kw) -> Conditions:
    base = dict(
        ambient_temperature_K=303.15,
        ambient_pressure_Pa=101325.0,
        supply=AirSupply(mode="fan", fans=(FAN,)),
        sources=(SOURCE,),
    )
    base.update(kw)
    return Conditions(**base)


def design(n: int = 1, seed: int = 0, **kw) -> Design:
    rng = np.random.default_rng(seed)
    base = dict(
        fin_count=rng.integers(8, 30, n),
        fin_thickness_root_m=rng.uniform(1.0e-3, 2.0e-3, n),
        fin_thickness_tip_m=1.0e-3,
        fin_height_m=rng.uniform(0.02, 0.05, n),
        base_thickness_m=rng.uniform(3e-3, 8e-3, n),
        base_width_m=0.1,
        flow_length_m=0.1,
        conductivity_W_per_mK=200.0,
        density_kg_per_m3=2700.0,
    )
    base.update(kw)
    return Design(**base)


def _coolprop_air(T: float, p: float) -> dict[str, float]:
    # CoolProp, PropsSI(..., 'T', T, 'P', p, 'Air'): an outside reference for air
    get = {k: CoolProp.PropsSI(k, "T", T, "P", p, "Air") for k in ("D", "V", "L", "C")}
    return dict(rho=get["D"], mu=get["V"], k=get["L"], cp=get["C"])


def test_energy_balance_of_the_air_stream(check):
    df = evaluate(design(200), conditions())
    assert df["valid"].all()
    # first law for a steady stream: Q = rho Q_v c_p (T_out - T_in) -- energy balance;
    # c_p of the model's own air (the identity is what is checked), to 1e-9
    from models.air import air_properties

    air = air_properties(303.15, 101325.0)
    heat = (
        float(air.density)
        * df["flow_m3_per_s"]
        * float(air.specific_heat)
        * (df["outlet_temperature_K"] - 303.15)
    )
    check(
        "heat carried by the air / source power",
        heat.to_numpy() / 60.0,
        np.ones(len(df)),
        "first law (energy balance of the air stream)",
        rtol=1e-9,
    )


def test_long_laminar_channel_matches_fully_developed_hand_calculation(check):
    # Straight fins, fixed slow flow, very long channels: fully developed laminar flow, where
    # Nu -> Nu_T(alpha) and f Re -> fRe(alpha) (Shah & London 1978). Hand calculation with
    # CoolProp air, tanh fin efficiency and effectiveness-NTU (Kays & London 1984, ch. 2).
    N, t, H, W, L = 21, 1.0e-3, 0.040, 0.101, 1.5
    q = 2.0e-3  # m^3/s
    d = Design(
        fin_count=N,
        fin_thickness_root_m=t,
        fin_thickness_tip_m=t,
        fin_height_m=H,
        base_thickness_m=5e-3,
        base_width_m=W,
        flow_length_m=L,
        conductivity_W_per_mK=200.0,
        density_kg_per_m3=2700.0,
    )
    df = evaluate(d, conditions(supply=AirSupply(mode="flow", flow_m3_per_s=q)))
    air = _coolprop_air(303.15, 101325.0)
    s = (W - t) / (N - 1) - t  # 4 mm gap
    dh = 2 * s * H / (s + H)
    v = q / ((N - 1) * s * H)
    re = air["rho"] * v * dh / air["mu"]
    assert re < 1000 and L / (dh * re * 0.71) > 0.3  # fully developed thermally
    # Shah & London (1978) Table 45 (recalled from memory): alpha = 0.1 (1/alpha = 10):
    # f Re = 21.169, Nu_T = 5.858 (values of the four-walls-heated rectangular duct)
    nu_t, fre = 5.858, 21.169
    h = nu_t * air["k"] / dh
    m = np.sqrt(2 * h / (200.0 * t))
    eta = np.tanh(m * H) / (m * H)
    area = 2 * N * L * H + (N - 1) * s * L
    eta_o = 1 - (2 * N * L * H / area) * (1 - eta)
    c = air["rho"] * q * air["cp"]
    r_hand = 1 / (c * (1 - np.exp(-eta_o * h * area / c)))
    check(
        "sink resistance, fully developed laminar limit (K/W)",
        float(df["sink_resistance_K_per_W"].iloc[0]),
        r_hand,
        "Shah & London (1978) Table 45 Nu_T (recalled from memory) + CoolProp air + "
        "effectiveness-NTU; 2 % for the residual entry length and air-property fits",
        rtol=0.02,
    )
    dp_hand = 4 * (fre / re) * (L / dh) * 0.5 * air["rho"] * v * v
    check(
        "pressure drop, fully developed laminar limit (Pa)",
        float(df["pressure_drop_Pa"].iloc[0]),
        dp_hand,
        "Shah & London (1978) Table 45 f Re (recalled from memory) + CoolProp air; 3 % for "
        "the entry length excess and the entrance/exit losses",
        rtol=0.03,
    )


def test_operating_point_agrees_with_brentq_on_100_random_designs(check):
    pop = design(100, seed=3)
    cond = conditions()
    df = evaluate(pop, cond)
    fan = PchipInterpolator(FAN.flow_m3_per_s, FAN.pressure_Pa)  # scipy's monotone cubic
    from models.air import air_properties

    rho_ratio = float(air_properties(303.15, 101325.0).density) / FAN.rated_density_kg_per_m3
    arrays = pop.arrays()
    expected = []
    for i in range(100):
        one = Design(**{k: arrays[k][i] for k in arrays})

        def residual(q: float, one: Design = one) -> float:
            sys = evaluate(one, dataclasses.replace(cond, supply=AirSupply("flow", (), q)))
            return float(fan(q)) * rho_ratio - float(sys["system_pressure_Pa"].iloc[0])

        expected.append(brentq(residual, 1e-7, 0.04, xtol=1e-14, rtol=1e-12))
    check(
        "operating flow of 100 random designs (m^3/s)",
        df["flow_m3_per_s"].to_numpy(),
        np.array(expected),
        "scipy.optimize.brentq on scipy PchipInterpolator fan curve vs the same system curve",
        rtol=1e-6,
    )


def test_impossible_designs_come_back_flagged_with_violated_margins():
    d = design(
        4,
        fin_count=np.array([1, 80, 12, 12]),
        fin_thickness_root_m=1.5e-3,
        fin_height_m=np.array([0.03, 0.03, -0.01, 0.03]),
    )
    strong_system = conditions(system_impedance_Pa_s2_per_m6=0.0)
    df = evaluate(d, strong_system)
    assert df["valid"].tolist() == [False, False, False, True]
    assert (df.loc[~df["valid"], "junction_margin_K"] == -np.inf).all()
    assert (df.loc[~df["valid"], "junction_temperature_K"] == np.inf).all()
    assert (df.loc[~df["valid"], "reason"] != "").all()
    # a fan index outside the candidate list: no fan curve, no operating point
    df = evaluate(design(3, fan_index=4), conditions())
    assert not df["operating_point_found"].any()
    assert df["reason"].str.startswith("no operating point").all()


designs = st.builds(
    lambda n, tr, tip, H, tb, k: design(
        1,
        fin_count=n,
        fin_thickness_root_m=tr,
        fin_thickness_tip_m=tr * tip,
        fin_height_m=H,
        base_thickness_m=tb,
        conductivity_W_per_mK=k,
    ),
    st.integers(0, 80),
    st.floats(0.2e-3, 5e-3),
    st.floats(0.0, 1.2),
    st.floats(-0.01, 0.15),
    st.floats(-1e-3, 0.03),
    st.floats(20.0, 400.0),
)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(designs)
def test_nothing_nan_or_infinite_leaves_evaluate_unflagged(d):
    df = evaluate(d, conditions())
    num = df.select_dtypes(include=[np.number])
    finite = np.isfinite(num.to_numpy(dtype=float)).all(axis=1)
    assert not np.isnan(num.to_numpy(dtype=float)).any()
    assert (finite | ~df["valid"].to_numpy()).all()


@settings(max_examples=25, deadline=None)
@given(st.integers(6, 30), st.floats(1e-3, 2e-3), st.floats(0.015, 0.05))
def test_sink_resistance_falls_as_flow_rises(n, t, H):
    d = design(1, fin_count=n, fin_thickness_root_m=t, fin_thickness_tip_m=t, fin_height_m=H)
    flows = np.geomspace(1e-3, 0.05, 8)
    r = [
        float(
            evaluate(d, conditions(supply=AirSupply("flow", (), q)))[
                "sink_resistance_K_per_W"
            ].iloc[0]
        )
        for q in flows
    ]
    assert np.all(np.diff(r) < 0)  # common practice, no source: more air, lower resistance


@settings(max_examples=25, deadline=None)
@given(st.floats(2e-3, 3e-2), st.floats(0.015, 0.05))
def test_pressure_drop_rises_with_fin_count_at_fixed_flow(q, H):
    counts = np.arange(6, 30)
    d = design(len(counts), fin_count=counts, fin_thickness_root_m=1e-3, fin_height_m=H)
    dp = evaluate(d, conditions(supply=AirSupply("flow", (), q)))["pressure_drop_Pa"].to_numpy()
    assert np.all(np.diff(dp) > 0)  # common practice, no source: narrower channels, more loss


def test_fan_stopped_scenario_balances_power_and_runs_hotter(check):
    d = design(20, seed=5)
    forced = evaluate(d, conditions())
    stopped = evaluate(d, conditions(supply=AirSupply(mode="stopped"), surface_emissivity=0.8))
    assert stopped["valid"].all()
    assert (stopped["flow_m3_per_s"] == 0).all()
    # common practice, no source: a stopped fan raises the sink resistance several-fold
    assert (stopped["sink_resistance_K_per_W"] > 3 * forced["sink_resistance_K_per_W"]).all()


def test_upstream_heating_fractions_of_two_in_line_sources(check):
    F = upstream_heating_fractions(np.array([0.02, 0.08]), np.array([0.02, 0.02]), 0.1)
    check(
        "air-heating shares of two separated sources",
        F.ravel(),
        np.array([0.5, 0.0, 1.0, 0.5]),
        "energy balance of the air stream (common practice, no source)",
        atol=1e-12,
    )


def test_downstream_source_runs_hotter_and_the_mean_is_kept(check):
    up = HeatSource(power_W=40, length_m=0.02, width_m=0.03, x_m=0.02, y_m=0.05, name="up")
    down = dataclasses.replace(up, x_m=0.08, name="down")
    d = design(5, seed=7)
    df = evaluate(d, conditions(sources=(up, down), supply=AirSupply("flow", (), 0.004)))
    t_up = df["base_temperature_up_K"].to_numpy()
    t_down = df["base_temperature_down_K"].to_numpy()
    from models.air import air_properties

    air = air_properties(303.15, 101325.0)
    c = float(air.density) * 0.004 * float(air.specific_heat)
    # by symmetry the base fields differ only by the air heating: the downstream source sees
    # the upstream one's 40 W in the air, the upstream sees none: difference Q/C
    # (energy balance of the air stream, common practice, no source)
    check(
        "downstream minus upstream footprint temperature (K)",
        t_down - t_up,
        np.full(5, 40.0 / c),
        "energy balance: Q_upstream / (m_dot c_p)",
        rtol=1e-6,
    )


@pytest.mark.parametrize("mode", ["flow", "velocity"])
def test_fixed_flow_and_fixed_velocity_agree(mode, check):
    d = design(10, seed=11)
    q = 0.01
    ref = evaluate(d, conditions(supply=AirSupply("flow", (), q)))
    front = d.arrays()["base_width_m"] * d.arrays()["fin_height_m"]
    v = q / front
    if mode == "velocity":
        out = [
            float(
                evaluate(
                    Design(**{k: val[i] for k, val in d.arrays().items()}),
                    conditions(supply=AirSupply("velocity", (), velocity_m_per_s=v[i])),
                )["sink_resistance_K_per_W"].iloc[0]
            )
            for i in range(10)
        ]
    else:
        out = ref["sink_resistance_K_per_W"].tolist()
    check(
        f"sink resistance, {mode} supply",
        np.array(out),
        ref["sink_resistance_K_per_W"].to_numpy(),
        "definition Q = V_approach W H (common practice, no source)",
        rtol=1e-12,
    )


def test_zero_clearance_equals_the_ducted_result():
    d = design(20, seed=4)
    ducted = evaluate(d, conditions())
    zero = evaluate(d, conditions(clearance_top_m=0.0, clearance_side_m=0.0))
    assert ducted.equals(zero)


def test_bypass_grows_with_clearance_and_the_fins_keep_the_energy_balance(check):
    d = design(10, seed=6)
    fractions = []
    for c in (1e-3, 4e-3, 1.6e-2):
        df = evaluate(d, conditions(clearance_top_m=c, clearance_side_m=c / 2))
        assert df["valid"].all()
        fractions.append(df["bypass_fraction"].to_numpy())
    # Simons & Schmidt's equal-pressure-drop estimate (via models.bypass): more clearance,
    # more bypass -- the published trend (Prstic, Iyengar & Bar-Cohen 2000, recalled)
    assert np.all(np.diff(np.array(fractions), axis=0) > 0)
    from models.air import air_properties

    air = air_properties(303.15, 101325.0)
    heat = (
        float(air.density)
        * df["flow_m3_per_s"]
        * float(air.specific_heat)
        * (df["outlet_temperature_K"] - 303.15)
    )
    check(
        "heat carried by the mixed outlet air / source power, with bypass",
        heat.to_numpy() / 60.0,
        np.ones(len(df)),
        "first law (energy balance of the mixed outlet stream)",
        rtol=1e-9,
    )


def test_table_columns_are_exactly_the_documented_ones():
    from models.columns import COLUMNS, PER_SOURCE

    df = evaluate(design(3), conditions())
    expected = list(COLUMNS) + [k.format(s="chip") for k in PER_SOURCE]
    assert sorted(df.columns) == sorted(expected)
