"""Checks of models.channel: geometry, the laminar-transition-turbulent blends, flags, and the
channel pressure drop (FANNING friction factors throughout)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from fluids.core import Reynolds
from fluids.friction import Clamond
from fluids.geometry import RectangularFinExchanger
from ht.conv_internal import turbulent_Gnielinski

from models.channel import (
    INVALID,
    LAMINAR,
    RE_LAMINAR_MAX,
    RE_TURBULENT_MIN,
    TRANSITION,
    TURBULENT,
    aspect_ratio,
    fanning_channel,
    hydraulic_diameter_rect,
    nusselt_channel,
    pressure_drop_channel,
    pressure_drop_channel_parts,
    reynolds_number,
)
from models.channel_friction import fanning_apparent_laminar
from models.channel_heat import nusselt_laminar_developing_mean
from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient

# ---------------------------------------------------------------- geometry -------------------


def test_hydraulic_diameter_vs_fluids(check):
    # fluids.geometry.RectangularFinExchanger(fin_height, fin_thickness, fin_spacing): channel
    # (s - t) x (h - t), Dh = 4A/P. Map gap b = s - t, height H = h - t. Same definition ->
    # round-off tolerance.
    t = 0.001
    for b, H in [(0.004, 0.036), (0.01, 0.01), (0.02, 0.005)]:
        pfe = RectangularFinExchanger(fin_height=H + t, fin_thickness=t, fin_spacing=b + t)
        check(
            f"Dh of a {b * 1e3:g} x {H * 1e3:g} mm channel",
            hydraulic_diameter_rect(b, H),
            pfe.Dh,
            "fluids.geometry.RectangularFinExchanger(...).Dh",
            rtol=1e-12,
        )


def test_reynolds_vs_fluids(check):
    check(
        "Re = V Dh / nu",
        reynolds_number(2.5, 0.0072, 1.6e-5),
        Reynolds(V=2.5, D=0.0072, nu=1.6e-5),
        "fluids.core.Reynolds(V, D, nu=...)",
        rtol=1e-12,
    )


def test_geometry_edges():
    assert aspect_ratio(0.004, 0.036) == pytest.approx(aspect_ratio(0.036, 0.004))
    assert aspect_ratio(0.01, 0.01) == 1.0
    assert np.isnan(hydraulic_diameter_rect(np.array([0.0, -1e-3]), 0.01)).all()
    assert np.isnan(aspect_ratio(0.01, 0.0))
    assert np.isnan(
        reynolds_number(
            np.array([-1.0, 1.0, 1.0]), np.array([0.01, 0.0, 0.01]), np.array([1e-5, 1e-5, 0.0])
        )
    ).all()


# ---------------------------------------------------------------- regimes --------------------

ALPHAS = [0.02, 0.1, 0.5, 1.0]
L_OVER_DH = [1.0, 5.0, 20.0, 100.0, 1e4]


def test_laminar_and_turbulent_branches_use_their_correlations(check):
    # Turbulent branch = Gnielinski with Petukhov friction and entrance factor, i.e.
    # ht.turbulent_Gnielinski(Re, Pr, fd) * (1 + (Dh/L)^(2/3)); same equation -> 1e-10.
    re = np.array([1e4, 3e4, 1e5, 1e6])
    l_dh = 20.0
    ref = np.array(
        [turbulent_Gnielinski(r, 0.7, (0.790 * math.log(r) - 1.64) ** -2) for r in re]
    ) * (1.0 + (1.0 / l_dh) ** (2.0 / 3.0))
    r = nusselt_channel(re, 0.7, 0.2, l_dh)
    check("channel Nu, turbulent branch", r.nusselt, ref, "ht.turbulent_Gnielinski", rtol=1e-10)
    assert np.all(r.regime == TURBULENT) and np.all(r.in_range)
    # turbulent friction vs fluids (Colebrook smooth); Petukhov within 2 % for Re >= 1e4
    f = fanning_channel(re, 0.2, l_dh)
    check(
        "channel Fanning f, turbulent branch",
        f.fanning,
        np.array([Clamond(x, 0.0) for x in re]) / 4.0,
        "fluids.friction.Clamond(Re, 0)/4",
        rtol=0.02,
    )
    # laminar branch: long parallel-plate channel -> f Re = 24 (Shah & London 1978)
    f_lam = fanning_channel(np.array([10.0, 100.0, 2000.0]), 0.0, 1e7)
    check(
        "channel f Re, long plates",
        f_lam.fanning * np.array([10.0, 100.0, 2000.0]),
        24.0,
        "Shah & London (1978), parallel plates f Re = 24",
        rtol=1e-3,
    )
    assert np.all(f_lam.regime == LAMINAR)
    # laminar Nu equals the developing-flow model (same function, identity of wiring)
    re_l = np.array([50.0, 500.0, 2300.0])
    np.testing.assert_allclose(
        nusselt_channel(re_l, 0.7, 0.3, 15.0).nusselt,
        nusselt_laminar_developing_mean(15.0, 1.0, re_l, 0.7, 0.3),
        rtol=1e-13,
    )
    np.testing.assert_allclose(
        fanning_channel(re_l, 0.3, 15.0).fanning,
        fanning_apparent_laminar(15.0 / re_l, 0.3) / re_l,
        rtol=1e-13,
    )


@pytest.mark.parametrize("alpha", ALPHAS)
@pytest.mark.parametrize("l_dh", L_OVER_DH)
def test_blend_continuous_at_both_ends(alpha, l_dh):
    # Gnielinski's interpolation meets the laminar value at 2300 and the turbulent one at 1e4
    eps = 1e-7
    for re0 in (RE_LAMINAR_MAX, RE_TURBULENT_MIN):
        re = np.array([re0 * (1 - eps), re0, re0 * (1 + eps)])
        nu = nusselt_channel(re, 0.7, alpha, l_dh).nusselt
        f = fanning_channel(re, alpha, l_dh).fanning
        assert np.ptp(nu) <= 1e-5 * nu[1]
        assert np.ptp(f) <= 1e-5 * f[1]


@pytest.mark.parametrize("alpha", ALPHAS)
@pytest.mark.parametrize("l_dh", L_OVER_DH)
def test_blend_monotone_where_it_should_be(alpha, l_dh):
    # Nu never falls with Re (fixed Pr, geometry); f Re^2 -- the pressure drop at fixed
    # geometry and fluid -- strictly rises with Re (needed by the fan operating-point search).
    re = np.geomspace(1.0, 5e6, 3000)
    nu = nusselt_channel(re, 0.7, alpha, l_dh).nusselt
    f = fanning_channel(re, alpha, l_dh).fanning
    assert np.all(np.diff(nu) >= -1e-12 * nu[1:])
    assert np.all(np.diff(f * re**2) > 0.0)


def test_transition_midpoint_is_gnielinski_interpolation(check):
    # Gnielinski (2013) / VDI Heat Atlas G1: Nu = (1 - g) Nu_lam(2300) + g Nu_turb(1e4),
    # g = (Re - 2300)/7700 -- evaluated here from the two anchors of the same channel.
    l_dh, alpha, pr = 30.0, 0.25, 0.7
    re_mid = 0.5 * (RE_LAMINAR_MAX + RE_TURBULENT_MIN)
    anchors = nusselt_channel(np.array([RE_LAMINAR_MAX, RE_TURBULENT_MIN]), pr, alpha, l_dh)
    r = nusselt_channel(re_mid, pr, alpha, l_dh)
    check(
        "channel Nu at Re = 6150 (transition midpoint)",
        r.nusselt,
        anchors.nusselt.mean(),
        "Gnielinski (2013) linear interpolation between Re 2300 and 1e4",
        rtol=1e-12,
    )
    assert int(r.regime) == TRANSITION


def test_flags_at_validity_edges():
    # Re just inside / just outside the upper limit 5e6 of Petukhov and Gnielinski
    r = nusselt_channel(np.array([4.99e6, 5.01e6]), 0.7, 0.5, 50.0)
    assert r.in_range.tolist() == [True, False]
    assert np.all(np.isfinite(r.nusselt))  # extrapolated, not NaN
    assert r.outside_range.tolist() == [False, True]
    f = fanning_channel(np.array([4.99e6, 5.01e6]), 0.5, 50.0)
    assert f.in_range.tolist() == [True, False]
    # Pr range 0.5..2000 of Gnielinski applies in transition/turbulent flow only
    pr = np.array([0.49, 0.51, 1999.0, 2001.0])
    assert nusselt_channel(2e4, pr, 0.5, 50.0).in_range.tolist() == [False, True, True, False]
    assert nusselt_channel(5e3, pr, 0.5, 50.0).in_range.tolist() == [False, True, True, False]
    assert nusselt_channel(1e3, pr, 0.5, 50.0).in_range.all()
    # impossible inputs: NaN, flagged, regime -1
    bad = nusselt_channel(
        np.array([-1.0, 0.0, 500.0, 500.0, 500.0]),
        np.array([0.7] * 4 + [0.0]),
        np.array([0.5, 0.5, 1.01, 0.5, 0.5]),
        np.array([50.0, 50, 50, 0, 50]),
    )
    assert np.isnan(bad.nusselt).all() and not bad.in_range.any()
    assert np.all(bad.regime == INVALID)
    fb = fanning_channel(
        np.array([-1.0, 500.0, 500.0]), np.array([0.5, -0.1, 0.5]), np.array([50.0, 50.0, -1.0])
    )
    assert np.isnan(fb.fanning).all() and not fb.in_range.any()
    # zero flow: friction factor infinite (f Re finite), flagged as outside every range
    f0 = fanning_channel(0.0, 0.5, 50.0)
    assert np.isinf(f0.fanning) and not f0.in_range


# ---------------------------------------------------------------- pressure drop --------------


def test_pressure_drop_plane_poiseuille(check):
    # Long, very wide channel (alpha = 0.001, x+ ~ 600), sigma = 1 (no entry/exit loss): the
    # pressure drop tends to plane Poiseuille flow, dp = 12 mu V L / b^2 (closed form).
    # Tolerance 0.5 %: f Re at alpha = 0.001 is 0.14 % below 24, the entry excess 0.001 %.
    v, rho, nu, b, H, L = 0.05, 1.2, 1.5e-5, 0.0005, 0.5, 2.0
    p = pressure_drop_channel_parts(v, rho, nu, b, H, L, 1.0)
    check(
        "channel dp, long wide channel vs plane Poiseuille",
        p.total,
        12.0 * rho * nu * v * L / b**2,
        "plane Poiseuille flow, dp = 12 mu V L / b^2 (closed form)",
        rtol=5e-3,
    )
    assert float(p.entrance) == 0.0 and float(p.exit) == 0.0


def test_pressure_drop_parts_and_velocity_head():
    v = np.array([0.5, 2.0, 8.0, 40.0])
    rho, nu, b, H, L, s = 1.16, 1.6e-5, 0.004, 0.036, 0.1, 0.8
    p = pressure_drop_channel_parts(v, rho, nu, b, H, L, s)
    head = 0.5 * rho * v**2  # channel velocity head
    np.testing.assert_allclose(p.entrance, entrance_loss_coefficient(s) * head, rtol=1e-13)
    np.testing.assert_allclose(p.exit, exit_loss_coefficient(s) * head, rtol=1e-13)
    dh = hydraulic_diameter_rect(b, H)
    np.testing.assert_allclose(p.friction, 4.0 * p.fanning * (L / dh) * head, rtol=1e-12)
    np.testing.assert_allclose(p.total, p.friction + p.entrance + p.exit, rtol=1e-13)
    np.testing.assert_allclose(pressure_drop_channel(v, rho, nu, b, H, L, s), p.total)
    assert p.regime.tolist() == [LAMINAR, LAMINAR, TRANSITION, TURBULENT]


@pytest.mark.parametrize("L", [0.005, 0.05, 0.3])
@pytest.mark.parametrize("b", [0.0015, 0.005])
def test_pressure_drop_monotone_and_zero_at_rest(L, b):
    v = np.concatenate([[0.0], np.geomspace(1e-4, 200.0, 4000)])
    p = pressure_drop_channel_parts(v, 1.2, 1.5e-5, b, 0.04, L, 0.75)
    assert float(p.total[0]) == 0.0 and not p.in_range[0]  # no flow: 0 Pa, flagged
    assert np.all(np.diff(p.total) > 0.0)


def test_pressure_drop_invalid_inputs():
    p = pressure_drop_channel_parts(
        np.array([-1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0]),
        np.array([1.2, 0.0, 1.2, 1.2, 1.2, 1.2, 1.2]),
        1.5e-5,
        np.array([0.004, 0.004, 0.0, 0.004, 0.004, 0.004, 0.004]),
        np.array([0.04, 0.04, 0.04, -0.04, 0.04, 0.04, 0.04]),
        np.array([0.1, 0.1, 0.1, 0.1, 0.0, 0.1, 0.1]),
        np.array([0.8, 0.8, 0.8, 0.8, 0.8, 0.0, 1.01]),
    )
    assert np.isnan(p.total).all() and not p.in_range.any()
    assert np.all(p.regime == INVALID)


def test_poiseuille_number_elements_are_independent_of_their_neighbours():
    # a NaN or laminar neighbour must not change a turbulent element's value (the regime
    # branches are skipped only when no element needs them)
    from models.channel import friction_terms, poiseuille_number

    re = np.array([np.nan, 500.0, 5000.0, 20000.0])
    terms = friction_terms(np.full(4, 0.1), np.full(4, 20.0))
    together = poiseuille_number(re, terms)
    alone = [
        poiseuille_number(re[i : i + 1], friction_terms(np.array([0.1]), np.array([20.0])))[0]
        for i in range(4)
    ]
    np.testing.assert_array_equal(together, np.array(alone))
