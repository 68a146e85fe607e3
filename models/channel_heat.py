"""Heat transfer in the rectangular channels between plate fins (Nusselt numbers on Dh).

Every Nusselt number here is Nu = h Dh / k with the hydraulic diameter Dh = 4A/P = 2bH/(b + H)
of the channel (gap b between fins, fin height H) and assumes all four channel walls heated.
Friction factors used inside are FANNING factors (f = f_Darcy / 4) unless a name says Darcy.

Functions are pure, vectorized numpy: arrays broadcast together, inputs are never mutated, and an
impossible input gives NaN for that element, never an exception. Range flags are raised one
level up, in ``models.channel.nusselt_channel``.
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.channel_friction import _horner, fanning_fRe_fully_developed_rect

FloatArray = NDArray[np.float64]

# Shah & London (1978) polynomials, fully developed laminar flow, four walls heated.
_NU_T_PLATES = 7.541
_NU_T_POLY = (1.0, -2.610, 4.970, -5.119, 2.702, -0.548)
_NU_H1_PLATES = 8.235
_NU_H1_POLY = (1.0, -2.0421, 3.0853, -2.4765, 1.0578, -0.1861)

# Muzychka & Yovanovich (2004) combined-entry model, uniform wall temperature, MEAN values.
_MY_C2_MEAN = 1.5  # Leveque term: 1 for local, 3/2 for mean
_MY_C3_T = 0.409  # Leveque coefficient, uniform wall temperature
_MY_C4_MEAN = 2.0  # boundary-layer term: 1 for local, 2 for mean
_MY_FPR_A = 0.564  # f(Pr) = 0.564 / [1 + (1.664 Pr^(1/6))^(9/2)]^(2/9)
_MY_FPR_B = 1.664


def nusselt_fully_developed_rect(
    alpha: ArrayLike, boundary: Literal["T", "H1"] = "T"
) -> FloatArray:
    """Return Nu_Dh for fully developed laminar flow in a rectangular duct, all 4 walls heated.

    Formulas (a = aspect ratio)::

        Nu_T  = 7.541 (1 - 2.610 a + 4.970 a^2 - 5.119 a^3 + 2.702 a^4 - 0.548 a^5)
        Nu_H1 = 8.235 (1 - 2.0421 a + 3.0853 a^2 - 2.4765 a^3 + 1.0578 a^4 - 0.1861 a^5)

    'T': uniform wall temperature, axially and around the perimeter. 'H1': axially uniform heat
    input with a peripherally uniform wall temperature at each cross-section (highly conductive
    walls). All four walls (both fins, base and shroud) are heated; a channel with an adiabatic
    shroud has a lower Nu, which this function does not cover.

    Parameters
    ----------
    alpha : array_like
        Aspect ratio min(b, H)/max(b, H), dimensionless, in [0, 1].
    boundary : {'T', 'H1'}
        Thermal boundary condition (not an array; a bad value raises ValueError).

    Returns
    -------
    ndarray
        Nu_Dh, dimensionless: 'T' from 7.541 (parallel plates) to 2.98 (square);
        'H1' from 8.235 to 3.61.

    Validity
    --------
    0 <= alpha <= 1, laminar, hydrodynamically and thermally fully developed, constant
    properties. The polynomials agree with Shah & London's tabulated values within 0.1 %
    (tests/test_channel_heat.py). alpha outside [0, 1] or NaN: NaN.

    Source: Shah, R. K. & London, A. L. (1978), Laminar Flow Forced Convection in Ducts,
    Academic Press, rectangular ducts (table values 2.976/3.608 square, 3.391/4.123 at a = 0.5,
    4.439/5.331 at 0.25, 5.597/6.490 at 0.125, 7.541/8.235 plates); same values rounded in
    Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table 8.1.

    Example
    -------
    >>> round(float(nusselt_fully_developed_rect(0.25, "T")), 3)   # table: 4.439
    4.435
    """
    if boundary == "T":
        scale, poly = _NU_T_PLATES, _NU_T_POLY
    elif boundary == "H1":
        scale, poly = _NU_H1_PLATES, _NU_H1_POLY
    else:
        raise ValueError(f"boundary: got {boundary!r}, expected 'T' or 'H1'")
    a = np.asarray(alpha, dtype=float)
    ok = (a >= 0.0) & (a <= 1.0)
    with np.errstate(invalid="ignore"):
        val = scale * _horner(a, poly)
    return np.where(ok, val, np.nan)


def nusselt_combined_entry_mean(
    x_star: ArrayLike, prandtl: ArrayLike, fRe_fd: ArrayLike, nusselt_fd: ArrayLike
) -> FloatArray:
    """Return the mean Nu_Dh for simultaneously developing laminar flow, uniform wall temperature.

    Muzychka & Yovanovich's combined-entry model, written on the hydraulic diameter::

        Nu = [ (C4 f(Pr) / sqrt(x*))^m + ( (C2 C3 (fRe_fd / x*)^(1/3))^5 + Nu_fd^5 )^(m/5) ]^(1/m)
        f(Pr) = 0.564 / [1 + (1.664 Pr^(1/6))^(9/2)]^(2/9),   m = 2.27 + 1.65 Pr^(1/3)
        x* = L / (Dh Re_Dh Pr),   C2 = 3/2, C3 = 0.409, C4 = 2  (mean values, wall temperature T)

    Term 1 is the developing boundary layer at the inlet (flat-plate limit), term 2 the Leveque
    (thermal entry, developed velocity) limit, Nu_fd the fully developed limit. The authors
    write the model on sqrt(A): Nu_sqrtA, z* = L/(sqrtA Re_sqrtA Pr), fRe_sqrtA. Every term
    scales by the same factor sqrt(A)/Dh, so Nu_Dh = Nu_sqrtA * Dh/sqrt(A) with x* and fRe on Dh
    is the same model exactly; the length scale only enters through Nu_fd, which is passed in.

    h = Nu k / Dh is the mean over the length L referred to the LOG-MEAN temperature difference
    between the (uniform) wall and the air: Q = h A_wall dT_lm. For a uniform wall temperature
    this equals the length average of the local h, and it is the h to use in
    effectiveness = 1 - exp(-h A_wall / (m_dot c_p)), which counts the air's temperature rise once.

    Parameters
    ----------
    x_star : array_like
        Thermal length x* = L / (Dh Re_Dh Pr), dimensionless, > 0.
    prandtl : array_like
        Prandtl number, dimensionless, > 0.
    fRe_fd : array_like
        Fully developed FANNING f Re_Dh of the duct (16 circular tube, 24 parallel plates).
    nusselt_fd : array_like
        Fully developed Nu_Dh for uniform wall temperature (3.657 circular, 7.541 plates).

    Returns
    -------
    ndarray
        Mean Nu_Dh (log-mean temperature difference), dimensionless, >= nusselt_fd.

    Validity
    --------
    Laminar flow, uniform wall temperature, uniform inlet velocity and temperature, constant
    properties; any x* > 0 and Pr > 0 (f(Pr) spans Pr -> 0 to Pr -> inf). The authors state
    +-10 % or better against exact and numerical solutions for common duct shapes.
    x* <= 0 or Pr <= 0: NaN.

    Source: Muzychka, Y. S. & Yovanovich, M. M. (2004), "Laminar forced convection heat
    transfer in the combined entry region of non-circular ducts", J. Heat Transfer 126:54-61
    (model equation, constants C2, C3, C4, f(Pr) and m; written here on Dh).

    Example
    -------
    >>> round(float(nusselt_combined_entry_mean(10.0, 0.7, 24.0, 7.541)), 3)   # -> Nu_fd 7.541
    7.541
    """
    xs = np.asarray(x_star, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        f_pr = _MY_FPR_A / (1.0 + (_MY_FPR_B * pr ** (1.0 / 6.0)) ** 4.5) ** (2.0 / 9.0)
        m = 2.27 + 1.65 * np.cbrt(pr)
        boundary_layer = _MY_C4_MEAN * f_pr / np.sqrt(xs)
        leveque = _MY_C2_MEAN * _MY_C3_T * np.cbrt(np.asarray(fRe_fd, dtype=float) / xs)
        nu_fd = np.asarray(nusselt_fd, dtype=float)
        graetz = (leveque**5 + nu_fd**5) ** 0.2  # thermal-entry part (developed velocity)
        # factor out the largest term so that the power mean neither overflows nor underflows
        big = np.maximum(boundary_layer, graetz)
        val = big * ((boundary_layer / big) ** m + (graetz / big) ** m) ** (1.0 / m)
    return np.where((xs > 0.0) & (pr > 0.0), val, np.nan)


def nusselt_laminar_developing_mean(
    length: ArrayLike,
    hydraulic_diameter: ArrayLike,
    reynolds: ArrayLike,
    prandtl: ArrayLike,
    alpha: ArrayLike,
) -> FloatArray:
    """Return the mean Nu_Dh of a rectangular channel, simultaneously developing laminar flow.

    Formula: ``nusselt_combined_entry_mean(x*, Pr, fRe_fd(alpha), Nu_T(alpha))`` with
    x* = L / (Dh Re_Dh Pr), fRe_fd = ``fanning_fRe_fully_developed_rect`` (FANNING) and
    Nu_T = ``nusselt_fully_developed_rect(alpha, 'T')``; i.e. Muzychka & Yovanovich's (2004)
    combined-entry model for uniform wall temperature, mean over the length, all four walls
    heated. Their length scale is sqrt(A); converted to Dh for the caller (exact conversion,
    see ``nusselt_combined_entry_mean``).

    One change from the paper: the fully developed limit is Shah & London's exact Nu_T(alpha)
    instead of the authors' shape approximation C1 fRe_sqrtA / (8 sqrt(pi) alpha^(1/10)), which
    is 8.5 % high for the square duct and grows without bound as alpha -> 0 (parallel plates).

    h = Nu k / Dh refers to the LOG-MEAN temperature difference between wall and air (equal to
    the length-averaged local h for a uniform wall temperature); use it in an
    effectiveness-NTU step (eps = 1 - exp(-h A / (m_dot c_p))) so that the air's temperature
    rise is counted once. It is not referred to the inlet air temperature.

    Parameters
    ----------
    length : array_like
        Channel length along the flow L, m, > 0.
    hydraulic_diameter : array_like
        Dh = 2bH/(b + H), m, > 0.
    reynolds : array_like
        Re_Dh = V Dh / nu with V the mean channel velocity, dimensionless, > 0.
    prandtl : array_like
        Prandtl number, dimensionless, > 0 (air about 0.71).
    alpha : array_like
        Aspect ratio min(b, H)/max(b, H), dimensionless, in [0, 1].

    Returns
    -------
    ndarray
        Mean Nu_Dh (log-mean temperature difference), dimensionless, >= Nu_T(alpha).

    Validity
    --------
    Laminar flow (Re_Dh below about 2300), constant properties, uniform wall temperature,
    uniform inlet profiles. Authors' accuracy: +-10 %. Impossible inputs (L, Dh, Re or Pr
    <= 0, alpha outside [0, 1]): NaN. Turbulent Re is not flagged here (see
    ``models.channel.nusselt_channel``).

    Source: Muzychka, Y. S. & Yovanovich, M. M. (2004), J. Heat Transfer 126:54-61;
    fully developed limit from Shah & London (1978).

    Example
    -------
    L = 50 mm, Dh = 5 mm, Re = 500, Pr = 0.7 (x* = 0.0286), parallel plates:

    >>> round(float(nusselt_laminar_developing_mean(0.05, 0.005, 500.0, 0.7, 0.0)), 2)
    8.09

    Stephan's parallel-plate correlation (Shah & London 1978) gives 8.6 at this x*.
    """
    length = np.asarray(length, dtype=float)
    dh = np.asarray(hydraulic_diameter, dtype=float)
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        x_star = length / (dh * re * pr)
    ok = (length > 0.0) & (dh > 0.0) & (re > 0.0) & (pr > 0.0)
    nu = nusselt_combined_entry_mean(
        x_star, pr, fanning_fRe_fully_developed_rect(alpha), nusselt_fully_developed_rect(alpha)
    )
    return np.where(ok, nu, np.nan)


def nusselt_turbulent_gnielinski(
    reynolds: ArrayLike, prandtl: ArrayLike, Dh_over_L: ArrayLike
) -> FloatArray:
    """Return the mean Nu_Dh for turbulent flow in a smooth duct, with the entrance correction.

    Formula (f_D = Darcy factor = 4 x FANNING factor, Petukhov)::

        f_D = (0.790 ln Re - 1.64)^-2
        Nu  = (f_D/8) (Re - 1000) Pr / (1 + 12.7 sqrt(f_D/8) (Pr^(2/3) - 1)) * [1 + (Dh/L)^(2/3)]

    The bracket is Gnielinski's entrance (developing-flow) factor for the mean over length L;
    Dh_over_L = 0 gives the fully developed value. No (Pr/Pr_wall) property correction.

    Parameters
    ----------
    reynolds : array_like
        Re_Dh, dimensionless.
    prandtl : array_like
        Prandtl number, dimensionless.
    Dh_over_L : array_like
        Hydraulic diameter over channel length, dimensionless, >= 0.

    Returns
    -------
    ndarray
        Mean Nu_Dh, dimensionless (29.8 at Re = 1e4, Pr = 0.7, fully developed).

    Validity
    --------
    3000 < Re < 5e6 and 0.5 < Pr < 2000 (the range given with the equation); extrapolated
    without a flag here (``models.channel.nusselt_channel`` flags it and only calls this at
    Re >= 1e4). Re <= 1000 (where the formula is not positive), Pr <= 0 or Dh_over_L < 0: NaN.

    Source: Gnielinski, V. (1976), "New equations for heat and mass transfer in turbulent pipe
    and channel flow", Int. Chem. Eng. 16:359-368, with Petukhov's (1970) friction factor;
    entrance factor [1 + (d/L)^(2/3)] as given by Gnielinski in the VDI Heat Atlas (2010),
    chapter G1.

    Example
    -------
    >>> round(float(nusselt_turbulent_gnielinski(1e5, 0.7, 0.0)), 1)   # ht.turbulent_Gnielinski
    178.6
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    d_l = np.asarray(Dh_over_L, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        d = 0.790 * np.log(re) - 1.64
        f8 = 1.0 / (8.0 * d * d)  # f_Darcy / 8
        nu = f8 * (re - 1000.0) * pr / (1.0 + 12.7 * np.sqrt(f8) * (pr ** (2.0 / 3.0) - 1.0))
        nu = nu * (1.0 + d_l ** (2.0 / 3.0))
    ok = (re > 1000.0) & (pr > 0.0) & (d_l >= 0.0) & (nu > 0.0)
    return np.where(ok, nu, np.nan)
