"""Checks of models.channel_friction against published tables, closed-form solutions and fluids.

All friction factors are FANNING factors (f = f_Darcy / 4).
"""

from __future__ import annotations

import numpy as np
import pytest
from fluids.friction import Clamond

from models.channel_friction import (
    fanning_apparent_laminar,
    fanning_fRe_fully_developed_rect,
    fanning_turbulent_smooth,
)

# Shah & London (1978), Laminar Flow Forced Convection in Ducts, rectangular ducts, fully
# developed f Re (Fanning) -- values recalled from memory (the table is not at hand); they agree
# with the exact series solution below to all printed digits, and Incropera & DeWitt Table 8.1
# lists the same within rounding (Darcy f Re_D = 57, 62, 73, 82, 96).
SHAH_LONDON_FRE = {1.0: 14.227, 0.5: 15.548, 0.25: 18.233, 0.125: 20.585, 0.0: 24.000}


def fre_series_exact(alpha: np.ndarray, terms: int = 2001) -> np.ndarray:
    """Exact fully developed f Re (Fanning) of a rectangular duct, infinite-series solution.

    f Re = 24 / { (1 + a)^2 [1 - (192 a / pi^5) sum_{n odd} tanh(n pi / (2 a)) / n^5] }
    (Marco & Han 1955; Shah & London 1978, rectangular ducts; also White, Viscous Fluid Flow).
    """
    a = np.atleast_1d(np.asarray(alpha, dtype=float))
    n = np.arange(1, terms, 2, dtype=float)[:, None]
    s = np.sum(np.tanh(n * np.pi / (2.0 * a[None, :])) / n**5, axis=0)
    return 24.0 / ((1.0 + a) ** 2 * (1.0 - 192.0 * a / np.pi**5 * s))


def shah_1978_fapp_re(x_plus: np.ndarray, fre: float, k_inf: float, c: float) -> np.ndarray:
    """Shah (1978) apparent-friction correlation, J. Fluids Eng. 100:177-179 (stated +-2.4 %).

    f_app Re = 3.44/sqrt(x+) + [K(inf)/(4 x+) + f Re - 3.44/sqrt(x+)] / [1 + C (x+)^-2]
    """
    r = 3.44 / np.sqrt(x_plus)
    return r + (k_inf / (4.0 * x_plus) + fre - r) / (1.0 + c / x_plus**2)


@pytest.mark.parametrize("alpha", sorted(SHAH_LONDON_FRE))
def test_fre_fully_developed_vs_shah_london_table(check, alpha):
    # Table printed to 5 significant digits; the polynomial is a fit to it, measured within
    # 0.06 % -> tolerance 0.1 %.
    check(
        f"fRe fully developed (Fanning), rect. duct alpha={alpha}",
        fanning_fRe_fully_developed_rect(alpha),
        SHAH_LONDON_FRE[alpha],
        "Shah & London (1978) rectangular-duct table, recalled from memory",
        rtol=1e-3,
    )


def test_fre_fully_developed_vs_exact_series(check):
    alphas = np.array([1.0, 0.75, 0.5, 0.3, 0.2, 0.1, 0.05, 0.02, 0.01])
    # the series is exact; the 5-term polynomial fits it within 0.06 % -> tolerance 0.1 %
    check(
        "fRe fully developed (Fanning) vs series, alpha 0.01..1",
        fanning_fRe_fully_developed_rect(alphas),
        fre_series_exact(alphas),
        "exact series solution (Marco & Han 1955; Shah & London 1978), computed in the test",
        rtol=1e-3,
    )


# Shah (1978) constants, recalled from memory (paper not at hand):
# parallel plates (alpha = 0): f Re = 24, K(inf) = 0.674, C = 2.9e-5
# square duct (alpha = 1):     f Re = 14.227, K(inf) = 1.43, C = 2.9e-4
SHAH_CONSTANTS = {0.0: (24.0, 0.674, 2.9e-5), 1.0: (14.227, 1.43, 2.9e-4)}
X_PLUS = np.array([1e-5, 1e-4, 3e-4, 1e-3, 3e-3, 1e-2, 3e-2, 0.1, 0.3, 1.0])


@pytest.mark.parametrize("alpha", [0.0, 1.0])
def test_apparent_friction_vs_shah_correlation(check, alpha):
    fre, k_inf, c = SHAH_CONSTANTS[alpha]
    ours = fanning_apparent_laminar(X_PLUS, alpha)
    ref = shah_1978_fapp_re(X_PLUS, fre, k_inf, c)
    # Tolerance 7 %: Muzychka & Yovanovich state 10 % or better for their two-asymptote model;
    # measured here 6.5 % (plates, x+ ~ 0.01-0.03) and 3 % (square). Shah's own fit is +-2.4 %.
    check(
        f"f_app Re (Fanning), alpha={alpha}, x+ 1e-5..1",
        ours,
        ref,
        "Shah (1978) J. Fluids Eng. 100:177 correlation, constants recalled from memory",
        rtol=0.07,
    )


@pytest.mark.parametrize("alpha", [0.0, 1.0])
def test_apparent_friction_vs_shah_in_asymptotic_ranges(check, alpha):
    # Where one asymptote dominates (x+ <= 1e-3 or x+ >= 1) both forms must agree closely:
    # tolerance 1 % (measured 0.4 %).
    fre, k_inf, c = SHAH_CONSTANTS[alpha]
    xp = np.array([1e-6, 1e-5, 1e-4, 1e-3, 1.0, 3.0, 10.0])
    check(
        f"f_app Re asymptotic ranges, alpha={alpha}",
        fanning_apparent_laminar(xp, alpha),
        shah_1978_fapp_re(xp, fre, k_inf, c),
        "Shah (1978) correlation, constants recalled from memory",
        rtol=0.01,
    )


def test_apparent_friction_short_duct_limit(check):
    # x+ -> 0: f_app Re -> 3.44 / sqrt(x+) (Blasius boundary layer on the walls; Shah & London
    # 1978, short-duct asymptote). At x+ = 1e-10 the fully developed term changes the product
    # by < 1e-7; tolerance 1e-6.
    xp = 1e-10
    for alpha in (0.0, 0.25, 1.0):
        check(
            f"f_app Re sqrt(x+) as x+ -> 0, alpha={alpha}",
            fanning_apparent_laminar(xp, alpha) * np.sqrt(xp),
            3.44,
            "Shah & London (1978) short-duct asymptote 3.44/sqrt(x+)",
            rtol=1e-6,
        )


def test_apparent_friction_long_duct_limit(check):
    # x+ -> inf: f_app Re -> fully developed f Re (table). At x+ = 1e6 the entry term adds
    # 1e-5 relative; tolerance 1e-3 covers the polynomial fit.
    for alpha, fre in SHAH_LONDON_FRE.items():
        check(
            f"f_app Re as x+ -> inf, alpha={alpha}",
            fanning_apparent_laminar(1e6, alpha),
            fre,
            "Shah & London (1978) rectangular-duct table, recalled from memory",
            rtol=1e-3,
        )
    assert fanning_apparent_laminar(np.inf, 0.5) == pytest.approx(
        fanning_fRe_fully_developed_rect(0.5), rel=1e-12
    )


def test_petukhov_vs_fluids_colebrook_smooth(check):
    # fluids.friction.Clamond(Re, eD=0) solves Colebrook's equation exactly (smooth pipe =
    # Prandtl-Karman law); Darcy -> Fanning by /4.
    re_hi = np.geomspace(1e4, 5e6, 15)
    ref_hi = np.array([Clamond(r, 0.0) for r in re_hi]) / 4.0
    # 2 %: Petukhov's formula fits the smooth-pipe law within about 2 % for Re >= 1e4
    # (measured 1.8 % at 1e4, < 0.3 % above 4e4).
    check(
        "Fanning f turbulent smooth, Re 1e4..5e6",
        fanning_turbulent_smooth(re_hi),
        ref_hi,
        "fluids.friction.Clamond(Re, 0)/4 (Colebrook, smooth)",
        rtol=0.02,
    )
    re_lo = np.geomspace(3000, 1e4, 6)
    ref_lo = np.array([Clamond(r, 0.0) for r in re_lo]) / 4.0
    # 5 % near the lower end of the range, where both are extrapolations of turbulent data
    # toward transition (measured 4.7 % at Re = 3000).
    check(
        "Fanning f turbulent smooth, Re 3000..1e4",
        fanning_turbulent_smooth(re_lo),
        ref_lo,
        "fluids.friction.Clamond(Re, 0)/4 (Colebrook, smooth)",
        rtol=0.05,
    )


def test_petukhov_is_quarter_of_darcy_form(check):
    # Petukhov (1970) as printed (Darcy): f = (0.790 ln Re - 1.64)^-2; Incropera eq. 8.21.
    # Same formula, exact up to rounding: checks the Darcy -> Fanning conversion.
    re = np.array([3000.0, 1e4, 1e5, 1e6, 5e6])
    check(
        "Fanning = Darcy/4 (Petukhov form)",
        fanning_turbulent_smooth(re),
        (0.790 * np.log(re) - 1.64) ** -2 / 4.0,
        "Petukhov (1970) eq. as printed in Incropera & DeWitt eq. 8.21",
        rtol=1e-12,
    )


def test_validity_edges_give_nan():
    # alpha just outside [0, 1], x+ <= 0, Re where the Petukhov bracket is not positive
    assert np.isnan(fanning_fRe_fully_developed_rect(-1e-9))
    assert np.isnan(fanning_fRe_fully_developed_rect(1.0 + 1e-9))
    assert np.isfinite(fanning_fRe_fully_developed_rect(np.array([0.0, 1.0]))).all()
    assert np.isnan(fanning_apparent_laminar(0.0, 0.5))
    assert np.isnan(fanning_apparent_laminar(-1e-3, 0.5))
    assert np.isnan(fanning_apparent_laminar(1e-3, 1.5))
    assert np.isnan(fanning_turbulent_smooth(np.array([0.0, -5.0, 7.9]))).all()
    assert np.isfinite(fanning_turbulent_smooth(8.1))


def test_broadcasting_and_no_mutation():
    xp = np.array([[1e-3], [1e-2]])
    alpha = np.array([0.0, 0.5, 1.0])
    xp0, a0 = xp.copy(), alpha.copy()
    out = fanning_apparent_laminar(xp, alpha)
    assert out.shape == (2, 3)
    np.testing.assert_array_equal(xp, xp0)
    np.testing.assert_array_equal(alpha, a0)
