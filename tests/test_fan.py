"""Tests of models.fan: fan-curve validation, monotone interpolation, fan sets, fan laws,
per-design fan choice, the operating point and fan power.

Outside references used here:
- scipy.interpolate.PchipInterpolator: the same published method (Fritsch & Carlson 1980,
  slopes by Fritsch & Butland 1984), implemented independently of ours;
- scipy.optimize.brentq: a scalar root finder, run design by design;
- fan laws and fans in parallel/series: ASHRAE Handbook -- HVAC Systems and Equipment,
  chapter "Fans" (recalled from memory; the rules are common practice in every fan text):
  at fixed speed pressure and power scale with air density, flow does not; identical fans in
  parallel add flow at equal pressure, in series add pressure at equal flow;
- closed forms (straight-line fan curve against a polynomial system curve).

The fan curves below are invented inputs (a check value never comes from them alone).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.interpolate import PchipInterpolator
from scipy.optimize import brentq

from models.contract import FanCurve
from models.fan import (
    fan_model,
    fan_power_at,
    fan_pressure,
    fan_pressure_indexed,
    fan_table,
    inside_fan_data,
    operating_point,
    validate_fan_curve,
)

# Invented curves: a small axial fan (ends at zero pressure), a blower with an uneven point
# spacing whose data stop short of zero pressure and do not start at zero flow.
AXIAL = FanCurve(
    flow_m3_per_s=(0.0, 0.004, 0.008, 0.012, 0.016, 0.020, 0.024),
    pressure_Pa=(62.0, 55.0, 46.0, 40.0, 31.0, 17.0, 0.0),
    name="axial-60",
)
BLOWER = FanCurve(
    flow_m3_per_s=(0.001, 0.002, 0.0045, 0.006, 0.0095, 0.011),
    pressure_Pa=(410.0, 395.0, 330.0, 260.0, 120.0, 35.0),
    name="blower-40",
    power_W=4.2,
)


def _pchip_reference(curve: FanCurve):
    return PchipInterpolator(np.array(curve.flow_m3_per_s), np.array(curve.pressure_Pa))


# --- validation ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    "flow, pressure, message",
    [
        ((0.0, 0.01), (10.0, 0.0), r"fan 'F7': 2 curve points; expected at least 3"),
        ((0.0, 0.01, 0.02), (10.0, 0.0), r"3 flow values but 2 pressure values"),
        (
            (0.0, 0.01, 0.01),
            (50.0, 40.0, 0.0),
            r"flow_m3_per_s\[2\] = 0.01 is not above flow_m3_per_s\[1\] = 0.01; "
            r"expected strictly increasing flow",
        ),
        (
            (0.0, 0.02, 0.01),
            (50.0, 40.0, 0.0),
            r"flow_m3_per_s\[2\] = 0.01 is not above flow_m3_per_s\[1\] = 0.02",
        ),
        (
            (0.0, 0.01, 0.02),
            (50.0, 55.0, 0.0),
            r"pressure_Pa\[1\] = 55 is not below pressure_Pa\[0\] = 50; expected static "
            r"pressure strictly falling",
        ),
        ((0.0, 0.01, 0.02), (50.0, 50.0, 0.0), r"pressure_Pa\[1\] = 50 is not below"),
        ((-0.001, 0.01, 0.02), (50.0, 40.0, 0.0), r"flow_m3_per_s\[0\] = -0.001 is negative"),
        ((0.0, 0.01, 0.02), (50.0, 40.0, -1.0), r"pressure_Pa\[2\] = -1 is negative; expected"),
        ((0.0, math.nan, 0.02), (50.0, 40.0, 0.0), r"flow_m3_per_s\[1\] = nan; expected a finite"),
        ((0.0, 0.01, 0.02), (math.inf, 40.0, 0.0), r"pressure_Pa\[0\] = inf; expected a finite"),
    ],
)
def test_bad_curves_raise_one_clear_line(flow, pressure, message):
    with pytest.raises(ValueError, match=message) as err:
        validate_fan_curve(flow, pressure, name="F7")
    text = str(err.value)
    assert text.startswith("fan 'F7': ") and "\n" not in text


@pytest.mark.parametrize(
    "change, message",
    [
        (dict(count=0), r"count = 0; expected a whole number >= 1"),
        (dict(count=1.5), r"count = 1.5; expected a whole number >= 1"),
        (dict(arrangement="diagonal"), r"arrangement = 'diagonal'; expected 'parallel' or"),
        (dict(rated_density_kg_per_m3=-1.2), r"rated_density_kg_per_m3 = -1.2; expected a fin"),
        (dict(power_W=-2.0), r"power_W = -2.0; expected a finite power >= 0 W"),
        (dict(pressure_Pa=(62.0, 55.0, 56.0, 40.0, 31.0, 17.0, 0.0)), r"pressure_Pa\[2\] = 56"),
    ],
)
def test_bad_fan_settings_raise(change, message):
    fields = {**AXIAL.__dict__, **change}
    with pytest.raises(ValueError, match=r"fan 'axial-60': " + message):
        fan_model(FanCurve(**fields), 1.2)
    with pytest.raises(ValueError, match=r"density_kg_per_m3 = 0.0; expected a finite density"):
        fan_model(AXIAL, 0.0)


# --- monotone interpolation ------------------------------------------------------------------


@pytest.mark.parametrize("curve", [AXIAL, BLOWER], ids=lambda c: c.name)
def test_interpolation_matches_scipy_pchip(curve, check):
    m = fan_model(curve, curve.rated_density_kg_per_m3)
    q = np.linspace(curve.flow_m3_per_s[0], curve.flow_m3_per_s[-1], 2001)
    # Same formulas, different code: agreement to rounding (1e-12 of the shut-off pressure).
    check(
        f"PCHIP pressure, {curve.name}",
        fan_pressure(m, q),
        _pchip_reference(curve)(q),
        "scipy.interpolate.PchipInterpolator (Fritsch & Butland 1984 slopes)",
        atol=1e-12 * curve.pressure_Pa[0],
    )


def _curves():
    """Random strictly falling curves: 3-12 points, uneven spacing, any start and end."""

    @st.composite
    def curve(draw):
        n = draw(st.integers(3, 12))
        dq = draw(st.lists(st.floats(0.05, 10.0), min_size=n - 1, max_size=n - 1))
        dp = draw(st.lists(st.floats(0.05, 10.0), min_size=n - 1, max_size=n - 1))
        q0 = draw(st.sampled_from([0.0, 0.3, 2.0]))
        p_end = draw(st.sampled_from([0.0, 0.5, 5.0]))
        scale_q, scale_p = draw(st.sampled_from([(1e-3, 10.0), (0.05, 300.0)]))
        q = (q0 + np.concatenate(([0.0], np.cumsum(dq)))) * scale_q
        p = (p_end + np.concatenate((np.cumsum(dp[::-1])[::-1], [0.0]))) * scale_p
        return FanCurve(tuple(q), tuple(p), name="random")

    return curve()


@settings(max_examples=60, deadline=None)
@given(curve=_curves())
def test_interpolant_is_monotone_and_matches_pchip(curve):
    m = fan_model(curve, curve.rated_density_kg_per_m3)
    q_data = np.array(curve.flow_m3_per_s)
    p_data = np.array(curve.pressure_Pa)
    p0 = p_data[0]
    # Through every data point (to rounding).
    np.testing.assert_allclose(fan_pressure(m, q_data), p_data, rtol=0, atol=1e-12 * p0)
    # Never rising, from Q = 0 to 1.5 x free delivery (extrapolations included).
    q = np.linspace(0.0, 1.5 * m.free_delivery_m3_per_s, 4001)
    p = fan_pressure(m, q)
    assert np.all(np.diff(p) <= 1e-12 * p0)
    # No overshoot between points (the property monotone interpolation exists for).
    inside = (q >= q_data[0]) & (q <= q_data[-1])
    assert p[inside].max() <= p0 * (1 + 1e-12) and p[inside].min() >= p_data[-1] - 1e-12 * p0
    # Same published method as scipy's PchipInterpolator.
    ref = PchipInterpolator(q_data, p_data)(q[inside])
    np.testing.assert_allclose(p[inside], ref, rtol=0, atol=1e-10 * p0)
    # Zero pressure at free delivery, negative beyond.
    assert abs(float(fan_pressure(m, m.free_delivery_m3_per_s))) <= 1e-9 * p0
    assert float(fan_pressure(m, 1.01 * m.free_delivery_m3_per_s)) < 0.0


def test_extrapolation_rules(check):
    m = fan_model(BLOWER, 1.2)
    x0, x1 = BLOWER.flow_m3_per_s[0], BLOWER.flow_m3_per_s[-1]
    # Below the first point (data start at 1 L/s): a straight line down to Q = 0.
    p_0, p_half, p_x0 = fan_pressure(m, [0.0, x0 / 2, x0])
    check("p at half the first flow", p_half, (p_0 + p_x0) / 2, "closed form (linear)", rtol=1e-12)
    assert m.shutoff_pressure_Pa == p_0 >= BLOWER.pressure_Pa[0]
    # Q < 0 is clipped to 0.
    assert float(fan_pressure(m, -0.5)) == p_0
    # Beyond the last point: a straight line through zero pressure and on (negative).
    h = 0.25 * (m.free_delivery_m3_per_s - x1)
    p = fan_pressure(m, x1 + h * np.arange(6))
    check("equal steps beyond the data", np.diff(p, 2), 0.0, "closed form (linear)", atol=1e-9)
    check("p at free delivery", p[4], 0.0, "definition of free delivery", atol=1e-9)
    assert p[5] < 0.0 and m.free_delivery_m3_per_s > x1
    # The slope there is the interpolant's end slope (continuous derivative).
    d = 1e-7
    slope_in = (fan_pressure(m, x1) - fan_pressure(m, x1 - d)) / d
    slope_out = (fan_pressure(m, x1 + d) - fan_pressure(m, x1)) / d
    assert slope_out == pytest.approx(slope_in, rel=1e-3)
    assert np.isnan(fan_pressure(m, np.nan))


# --- fan sets and fan laws -------------------------------------------------------------------


@pytest.mark.parametrize("count", [2, 3])
def test_parallel_fans_add_flow_at_equal_pressure(count, check):
    curve = FanCurve(**{**AXIAL.__dict__, "count": count, "arrangement": "parallel"})
    m = fan_model(curve, 1.2)
    one = _pchip_reference(AXIAL)
    q = np.linspace(0.0, count * AXIAL.flow_m3_per_s[-1], 501)
    source = "fan law: n fans in parallel, p_set(Q) = p_one(Q/n) (ASHRAE HVAC S&E, Fans; memory)"
    check(f"{count} in parallel, pressure", fan_pressure(m, q), one(q / count), source,
          atol=1e-12 * 62)
    check(f"{count} in parallel, free delivery", m.free_delivery_m3_per_s,
          count * AXIAL.flow_m3_per_s[-1], source, rtol=1e-12)
    check(f"{count} in parallel, shut-off", m.shutoff_pressure_Pa, AXIAL.pressure_Pa[0], source,
          rtol=1e-12)


@pytest.mark.parametrize("count", [2, 3])
def test_series_fans_add_pressure_at_equal_flow(count, check):
    curve = FanCurve(**{**AXIAL.__dict__, "count": count, "arrangement": "series"})
    m = fan_model(curve, 1.2)
    one = _pchip_reference(AXIAL)
    q = np.linspace(0.0, AXIAL.flow_m3_per_s[-1], 501)
    source = "fan law: n fans in series, p_set(Q) = n p_one(Q) (ASHRAE HVAC S&E, Fans; memory)"
    check(f"{count} in series, pressure", fan_pressure(m, q), count * one(q), source,
          atol=1e-12 * 62 * count)
    check(f"{count} in series, shut-off", m.shutoff_pressure_Pa, count * AXIAL.pressure_Pa[0],
          source, rtol=1e-12)
    check(f"{count} in series, free delivery", m.free_delivery_m3_per_s,
          AXIAL.flow_m3_per_s[-1], source, rtol=1e-12)


def test_density_correction_follows_fan_laws(check):
    # Air at 2000 m and 40 degC against the rated 1.2 kg/m^3: ideal gas, p = 79.5 kPa (ISA
    # standard atmosphere at 2000 m, recalled from memory), R = 287.05 J/kg K.
    rho = 79_495.0 / (287.05 * 313.15)
    rated = fan_model(BLOWER, 1.2)
    thin = fan_model(BLOWER, rho)
    q = np.linspace(0.0, rated.free_delivery_m3_per_s, 301)
    source = "fan law at fixed speed: p ~ rho, Q unchanged (ASHRAE HVAC S&E, Fans; memory)"
    check("pressure at altitude / rated", fan_pressure(thin, q), fan_pressure(rated, q) * rho / 1.2,
          source, rtol=1e-12, atol=1e-12)
    check("free delivery at altitude", thin.free_delivery_m3_per_s, rated.free_delivery_m3_per_s,
          source, rtol=1e-12)
    check("electrical power at altitude", thin.electrical_power_W, 4.2 * rho / 1.2,
          "fan law at fixed speed: power ~ rho (ASHRAE HVAC S&E, Fans; memory)", rtol=1e-12)
    # The docstring's example: two (0, 0.01, 0.02 m^3/s; 60, 40, 0 Pa) fans in series at
    # 1.0 kg/m^3, rated at 1.2: shut-off 2 * 60 * 1.0/1.2 = 100 Pa.
    ex = fan_model(FanCurve((0, 0.01, 0.02), (60, 40, 0), count=2, arrangement="series"), 1.0)
    check("docstring example shut-off", ex.shutoff_pressure_Pa, 100.0, "fan laws, hand sum",
          rtol=1e-12)


def test_fan_power(check):
    m = fan_model(FanCurve((0, 0.01, 0.02), (60, 40, 0)), 1.2)
    power = fan_power_at(m, [0.0, 0.01, 0.02])
    # At a data point the pressure is the data: 0.01 m^3/s * 40 Pa = 0.4 W (hand product).
    check("air power at a data point", power.air_W, [0.0, 0.4, 0.0], "P = Q p, hand product",
          atol=1e-12)
    assert np.isnan(power.electrical_W).all()  # no power_W given
    two = fan_model(FanCurve(**{**BLOWER.__dict__, "count": 2}), 1.0)
    e = fan_power_at(two, np.array([0.003, 0.01])).electrical_W
    check("electrical power, 2 fans at 1.0 kg/m^3", e, 2 * 4.2 * 1.0 / 1.2,
          "fan law power ~ rho (ASHRAE HVAC S&E, Fans; memory)", rtol=1e-12)


# --- several candidate fans, one per design --------------------------------------------------


def _candidates(rho: float = 1.1):
    return [
        fan_model(AXIAL, rho),
        fan_model(FanCurve(**{**AXIAL.__dict__, "count": 2, "arrangement": "series"}), rho),
        fan_model(FanCurve(**{**BLOWER.__dict__, "count": 3}), rho),
    ]


def test_indexed_pressure_equals_per_fan_pressure():
    models = _candidates()
    rng = np.random.default_rng(7)
    n = 20_000
    idx = rng.integers(0, len(models), n)
    q = rng.uniform(-0.005, 0.06, n)
    knots = np.concatenate([mm.knots_m3_per_s for mm in models])
    q[:knots.size] = knots  # exactly on every breakpoint ...
    q[knots.size:2 * knots.size] = np.nextafter(knots, -1.0)  # ... and just below
    q[-1] = np.nan
    got = fan_pressure_indexed(models, idx, q)
    want = np.empty(n)
    for i, mm in enumerate(models):
        want[idx == i] = fan_pressure(mm, q[idx == i])
    np.testing.assert_array_equal(got, want)  # same rows and coefficients: bit for bit
    np.testing.assert_array_equal(fan_pressure_indexed(fan_table(models), idx, q), got)
    # A bad index is flagged with NaN, not raised.
    bad = fan_pressure_indexed(models, np.array([0, 3, -1, 2]), np.full(4, 0.004))
    assert np.isnan(bad[1:3]).all() and np.isfinite(bad[[0, 3]]).all()


def test_inside_fan_data():
    models = _candidates()
    assert inside_fan_data(models, [0, 0, 2, 2, 2, 5], [0.01, 0.03, 0.002, 0.0035, np.nan, 0.01]
                           ).tolist() == [True, False, False, True, False, False]


# --- operating point -------------------------------------------------------------------------


def test_operating_point_closed_form(check):
    # Straight-line fan p = 100 (1 - Q/0.02) (collinear points: PCHIP is exact on a line)
    # against dp = 5e5 Q^2: 5e5 Q^2 + 5000 Q - 100 = 0, Q = 0.01 m^3/s, p = 50 Pa.
    line = fan_model(FanCurve((0.0, 0.01, 0.02), (100.0, 50.0, 0.0)), 1.2)
    op = operating_point([line], np.zeros(1, int), lambda q: 5e5 * q * q)
    check("operating flow, line vs parabola", float(op.flow_m3_per_s[0]), 0.01, "closed form",
          rtol=1e-9)
    check("operating pressure, line vs parabola", float(op.pressure_Pa[0]), 50.0, "closed form",
          rtol=1e-8)
    # With a laminar (linear) part: k Q^2 + a Q = 100 - 5000 Q, a = 2000 Pa s/m^3.
    a, k = 2000.0, 3e5
    q_star = (-(5000 + a) + math.sqrt((5000 + a) ** 2 + 4 * k * 100)) / (2 * k)
    op = operating_point([line], 0, lambda q: a * q + k * q * q)
    assert op.flow_m3_per_s.shape == ()
    check("operating flow, line vs a Q + k Q^2", float(op.flow_m3_per_s), q_star,
          "closed form (quadratic formula)", rtol=1e-9)


def _random_designs(n: int, seed: int):
    rng = np.random.default_rng(seed)
    idx = rng.integers(0, 3, n)
    a = rng.uniform(0.0, 4000.0, n)  # Pa s/m^3: laminar, fully developed part
    b = 10 ** rng.uniform(4.0, 6.5, n)  # Pa s^2/m^6: minor losses and extra impedance
    c = rng.uniform(0.0, 3e4, n)  # Pa (s/m^3)^1.5: developing-flow part ~ Q^1.5
    return idx, a, b, c


def _scipy_fan_set(cv: FanCurve, rho: float):
    """The set's curve and free delivery from scipy's PCHIP of one fan plus the fan laws.

    Outside the data points: the documented straight-line extension with the interpolant's
    end slope (scipy's derivative), so the reference covers [0, free delivery].
    """
    x, y = np.array(cv.flow_m3_per_s), np.array(cv.pressure_Pa)
    one = PchipInterpolator(x, y)
    d0, dl = float(one.derivative()(x[0])), float(one.derivative()(x[-1]))
    if dl >= 0.0:
        dl = (y[-1] - y[-2]) / (x[-1] - x[-2])

    def p_one(q):
        if q < x[0]:
            return y[0] + d0 * (q - x[0])
        if q > x[-1]:
            return y[-1] + dl * (q - x[-1])
        return float(one(q))

    q_free = x[-1] - y[-1] / dl
    n, ratio = cv.count, rho / cv.rated_density_kg_per_m3
    if cv.arrangement == "parallel":
        return (lambda q: ratio * p_one(q / n)), n * q_free
    return (lambda q: n * ratio * p_one(q)), q_free


def test_operating_point_matches_brentq(check):
    rho = 1.1
    curves = [
        AXIAL,
        FanCurve(**{**AXIAL.__dict__, "count": 2, "arrangement": "series"}),
        FanCurve(**{**BLOWER.__dict__, "count": 3}),
    ]
    models = [fan_model(cv, rho) for cv in curves]
    idx, a, b, c = _random_designs(100, seed=11)
    calls = []

    def system(q):
        calls.append(1)
        return a * q + b * q * q + c * q * np.sqrt(q)

    op = operating_point(models, idx, system)
    assert op.found.all()
    expected = np.empty(100)
    for i in range(100):
        p_set, q_free = _scipy_fan_set(curves[idx[i]], rho)

        def g(q, i=i, p_set=p_set):
            return p_set(q) - (a[i] * q + b[i] * q * q + c[i] * q * math.sqrt(q))

        expected[i] = brentq(g, 0.0, q_free, xtol=1e-16, rtol=1e-14)
    check("operating flow, 100 random designs", op.flow_m3_per_s, expected,
          "scipy.optimize.brentq on scipy PchipInterpolator + fan laws", rtol=1e-6)
    # Few system-curve calls: the hot loop of the tool (measured: at most 7 after the ends).
    assert len(calls) == 2 + op.iterations.max() and op.iterations.max() <= 9


def test_operating_point_hint_and_known_zero_flow_drop():
    models = _candidates()
    idx, a, b, c = _random_designs(500, seed=3)
    calls = []

    def system(q):
        calls.append(1)
        return a * q + b * q * q + c * q * np.sqrt(q)

    cold = operating_point(models, idx, system)
    n_cold = len(calls)
    calls.clear()
    warm = operating_point(models, idx, system, q_hint=cold.flow_m3_per_s * 1.001,
                           system_dp_at_zero=0.0)
    assert len(calls) < n_cold
    np.testing.assert_allclose(warm.flow_m3_per_s, cold.flow_m3_per_s, rtol=2e-9)


def test_no_intersection_is_flagged_not_raised():
    models = _candidates()
    idx = np.array([0, 0, 1, 2, 7])
    offset = np.array([0.0, 80.0, 0.0, 0.0, 0.0])  # design 1: 80 Pa > 62 Pa shut-off * 1.1/1.2
    k = np.array([2e5, 2e5, 2e5, np.nan, 2e5])  # design 3: the system curve is NaN

    op = operating_point(models, idx, lambda q: offset + k * q * q)
    assert op.found.tolist() == [True, False, True, False, False]  # design 4: no fan 7
    assert np.isnan(op.flow_m3_per_s[~op.found]).all()
    assert np.isnan(op.pressure_Pa[~op.found]).all()
    # The flagged designs do not disturb the others (same answer when solved alone).
    alone = operating_point(models, idx[[0, 2]], lambda q: 2e5 * q * q)
    np.testing.assert_array_equal(alone.flow_m3_per_s, op.flow_m3_per_s[[0, 2]])


def test_models_are_read_only():
    m = fan_model(AXIAL, 1.2)
    with pytest.raises(ValueError):
        m.coefficients[0, 0] = 1.0
    q = np.array([0.004, 0.01])
    q0 = q.copy()
    fan_pressure(m, q)
    fan_pressure_indexed([m], 0, q)
    np.testing.assert_array_equal(q, q0)
