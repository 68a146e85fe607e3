"""Friction in the rectangular channels between plate fins (FANNING friction factor throughout).

All friction factors here are Fanning factors, f = tau_w / (rho V^2 / 2) = f_Darcy / 4, with the
Reynolds number and the length ratios based on the hydraulic diameter Dh = 4A/P = 2bH/(b + H).
The frictional pressure drop over a channel of length L is dp = 4 f_app (L / Dh) rho V^2 / 2.

Functions are pure, vectorized numpy: arrays broadcast together, inputs are never mutated, and an
impossible input (negative length, aspect ratio outside [0, 1], ...) gives NaN for that element,
never an exception. Flags for "outside the published range" are raised one level up, in
``models.channel.fanning_channel``.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]

# Shah & London (1978) polynomial for fully developed laminar flow in rectangular ducts.
_FRE_PARALLEL_PLATES = 24.0
_FRE_POLY = (1.0, -1.3553, 1.9467, -1.7012, 0.9564, -0.2537)

# Short-duct (Blasius boundary-layer) asymptote of the apparent friction, f_app Re -> 3.44/sqrt(x+).
_SHORT_DUCT_COEFF = 3.44


def _horner(x: FloatArray, coeffs: tuple[float, ...]) -> FloatArray:
    """Evaluate sum(coeffs[i] * x**i) by Horner's rule (coeffs in increasing power)."""
    out = np.full_like(x, coeffs[-1])
    for c in coeffs[-2::-1]:
        out = out * x + c
    return out


def fanning_fRe_fully_developed_rect(alpha: ArrayLike) -> FloatArray:
    """Return f*Re_Dh (FANNING) for fully developed laminar flow in a rectangular duct.

    Formula::

        f Re = 24 (1 - 1.3553 a + 1.9467 a^2 - 1.7012 a^3 + 0.9564 a^4 - 0.2537 a^5)

    with f the Fanning friction factor and Re based on the hydraulic diameter 2bH/(b + H).

    Parameters
    ----------
    alpha : array_like
        Channel aspect ratio a = min(b, H) / max(b, H), dimensionless, 0 <= a <= 1
        (a = 0 is the parallel-plate channel, a = 1 the square duct).

    Returns
    -------
    ndarray
        f Re (Fanning), dimensionless, from 24.0 (parallel plates) down to 14.23 (square).

    Validity
    --------
    0 <= alpha <= 1. The polynomial agrees with the exact series solution within 0.06 %
    (measured in tests/test_channel_friction.py). Outside [0, 1] (or NaN): NaN.

    Source: Shah, R. K. & London, A. L. (1978), Laminar Flow Forced Convection in Ducts,
    Academic Press, rectangular ducts, fully developed f Re polynomial in the aspect ratio
    (their Table of rectangular-duct results gives 24.000, 20.585, 18.233, 15.548 and 14.227 for
    a = 0, 0.125, 0.25, 0.5, 1).

    Example
    -------
    >>> round(float(fanning_fRe_fully_developed_rect(0.5)), 2)   # Shah & London table: 15.548
    15.56
    """
    a = np.asarray(alpha, dtype=float)
    ok = (a >= 0.0) & (a <= 1.0)
    with np.errstate(invalid="ignore"):
        val = _FRE_PARALLEL_PLATES * _horner(a, _FRE_POLY)
    return np.where(ok, val, np.nan)


def fanning_apparent_laminar(x_plus: ArrayLike, alpha: ArrayLike) -> FloatArray:
    """Return f_app*Re_Dh (FANNING, apparent) for hydrodynamically developing laminar flow.

    The apparent friction factor f_app is the mean Fanning factor over the length L from the
    inlet (uniform inlet velocity) that gives the whole pressure drop, wall shear plus the
    momentum-flux change of the developing profile: dp = 4 f_app (L/Dh) rho V^2 / 2.

    Formula (Muzychka & Yovanovich, asymptote blending with n = 2)::

        f_app Re = sqrt( (3.44 / sqrt(x+))^2 + (f Re)_fd^2 ),   x+ = L / (Dh Re)

    where (f Re)_fd is ``fanning_fRe_fully_developed_rect(alpha)``. Muzychka & Yovanovich state
    the model with the length scale sqrt(A); both asymptotes scale with the same factor
    sqrt(A)/Dh, so the Dh form above is the same model exactly.

    Parameters
    ----------
    x_plus : array_like
        Hydrodynamic length x+ = L / (Dh Re_Dh), dimensionless, > 0 (np.inf gives the fully
        developed value).
    alpha : array_like
        Aspect ratio min(b, H)/max(b, H), dimensionless, in [0, 1].

    Returns
    -------
    ndarray
        f_app Re_Dh (Fanning), dimensionless, >= (f Re)_fd; tends to 3.44/sqrt(x+) as x+ -> 0.

    Validity
    --------
    Laminar flow (Re_Dh below about 2300), any x+ > 0, 0 <= alpha <= 1. Both limits are exact
    (short duct: Blasius boundary layer, f_app Re = 3.44/sqrt(x+); long duct: fully developed);
    in between the model stays within 7 % of Shah's (1978) correlation for parallel plates and
    within 3.5 % for the square duct (checked in tests/test_channel_friction.py); the authors
    state 10 % or better for common duct shapes. x+ <= 0 or alpha outside [0, 1]: NaN.

    Source: Muzychka, Y. S. & Yovanovich, M. M. (2009), "Pressure drop in laminar developing
    flow in noncircular ducts: a scaling and modeling approach", J. Fluids Eng. 131:111105,
    doi:10.1115/1.4000377 (asymptotes 3.44/sqrt(x+) and fully developed fRe, blending exponent
    n = 2; form recalled from memory). Chosen over Shah's (1978) correlation because Shah's
    needs tabulated K(inf) and C for each aspect ratio; Shah's correlation is used as the
    outside check.

    Example
    -------
    >>> round(float(fanning_apparent_laminar(1e-4, 0.0)), 1)   # Shah (1978): 344.5 for plates
    344.8
    """
    xp = np.asarray(x_plus, dtype=float)
    fre_fd = fanning_fRe_fully_developed_rect(alpha)
    with np.errstate(divide="ignore", invalid="ignore"):
        val = np.sqrt(_SHORT_DUCT_COEFF**2 / xp + fre_fd * fre_fd)
    return np.where(xp > 0.0, val, np.nan)


def fanning_turbulent_smooth(reynolds: ArrayLike) -> FloatArray:
    """Return the FANNING friction factor for fully developed turbulent flow in a smooth duct.

    Formula (Petukhov 1970, written for the Darcy factor, converted to Fanning)::

        f_Darcy = (0.790 ln Re - 1.64)^-2,     f_Fanning = f_Darcy / 4

    Parameters
    ----------
    reynolds : array_like
        Reynolds number based on the hydraulic diameter, dimensionless.

    Returns
    -------
    ndarray
        Fanning friction factor, dimensionless (0.0114 at Re = 3000, 0.00225 at Re = 5e6).

    Validity
    --------
    3000 < Re < 5e6, smooth walls; for non-circular ducts the hydraulic-diameter approximation
    (shape effects of order 10 % are not modelled). Outside that range
    the formula is extrapolated without a flag here (``models.channel.fanning_channel`` flags
    it); Re <= 8 (where 0.790 ln Re - 1.64 <= 0) or NaN gives NaN.

    Source: Petukhov, B. S. (1970), "Heat transfer and friction in turbulent pipe flow with
    variable physical properties", Advances in Heat Transfer 6:503-564; as quoted in
    Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 8.21 (range 3000-5e6).

    Example
    -------
    >>> round(float(fanning_turbulent_smooth(1e5)), 5)   # Darcy 0.01799 / 4 (Petukhov)
    0.0045
    """
    re = np.asarray(reynolds, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        d = 0.790 * np.log(re) - 1.64
        val = 0.25 / (d * d)
    return np.where(d > 0.0, val, np.nan)
