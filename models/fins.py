"""Straight (longitudinal) plate fins: fin parameter, efficiency and temperature profile.

One fin of a plate-fin heat sink: a plate of height ``L`` (base to tip), thickness ``t``
(constant, or falling linearly from ``t_root`` at the base to ``t_tip`` at the tip), much
wider along the flow than it is thick ("wide fin": the perimeter over the cross-section area
is ``2/t``; the two narrow end faces are ignored). Steady 1-D conduction along the height,
uniform conductivity ``k``, convection with a uniform ``h`` on both faces to air at one
temperature, base held at one temperature. ``theta = T - T_air``.

Every function is vectorized: its arguments are numpy arrays (or scalars) in SI that
broadcast together (the positions of :func:`fin_temperature_profile` add trailing axes
instead: designs x positions); nothing is mutated; impossible inputs (negative ``h``, zero
or negative ``k`` or root thickness, negative tip thickness or height) give NaN, and
:func:`fin_inputs_valid` gives the matching boolean flag. No function raises on array input.

Efficiency reference area: ``2 L`` per unit fin length along the flow (both faces, height
measured normal to the base), plus the tip face ``t`` where the tip convects. For a tapered
fin the wetted faces are slanted: their true length is ``sqrt(L^2 + ((t_root - t_tip)/2)^2)``,
longer than ``L`` by ``(t_root - t_tip)^2 / (8 L^2)`` relative -- 0.01 % for a fin 2 mm thick
at the root, 1 mm at the tip and 30 mm high -- and the 1-D equation itself neglects the same
slope. Multiply the efficiency by ``h`` times either area; the difference is below the
model's accuracy.
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike
from scipy.special import i0e, i1e, k0e, k1e

from models.contract import FloatArray

ONE_D_BIOT_LIMIT = 0.1  # common practice, no source (see fin_one_dimensional_valid)

_TAPER_SERIES = 1e-6  # |1 - t_tip/t_root| below this: first-order taper series (error ~ eps^2)
_SMALL_ML = 1e-7  # m L below this: two-term small-mL series (error ~ (m L)^4)


def _f(x: ArrayLike) -> FloatArray:
    return np.asarray(x, dtype=float)


def _tanh_over_x(x: FloatArray) -> FloatArray:
    """tanh(x)/x for x >= 0, exact 1 at x = 0 (series 1 - x^2/3 below 1e-7)."""
    small = x < _SMALL_ML
    xs = np.where(small, 1.0, x)
    return np.where(small, 1.0 - x * x / 3.0, np.tanh(xs) / xs)


def fin_inputs_valid(
    h: ArrayLike, k: ArrayLike, t_root: ArrayLike, t_tip: ArrayLike, L: ArrayLike
) -> np.ndarray:
    """Return True where the fin inputs describe a physically possible fin.

    Formula: ``h >= 0``, ``k > 0``, ``t_root > 0``, ``t_tip >= 0``, ``L >= 0``, all finite.

    Parameters
    ----------
    h : heat transfer coefficient on the fin faces, W/(m^2 K)
    k : fin conductivity, W/(m K)
    t_root, t_tip : fin thickness at the base and at the tip, m (pass the same array twice
        for a fin of constant thickness)
    L : fin height from the base to the tip, m

    Returns
    -------
    bool array, broadcast shape of the inputs. Where False, every efficiency and profile
    function of this module returns NaN.

    Validity: a tip thicker than the root is allowed here (the tapered solution covers it);
    whether it can be extruded is the geometry module's question.

    Source: common practice, no source (the physical meaning of each input).

    Example: ``fin_inputs_valid(50.0, 200.0, 2e-3, 0.0, 0.03)`` -> True (a triangular fin);
    ``fin_inputs_valid(-1.0, 200.0, 2e-3, 1e-3, 0.03)`` -> False.
    """
    h, k, tr, tt, L = np.broadcast_arrays(_f(h), _f(k), _f(t_root), _f(t_tip), _f(L))
    with np.errstate(invalid="ignore"):
        ok = (h >= 0) & (k > 0) & (tr > 0) & (tt >= 0) & (L >= 0)
        ok &= np.isfinite(h) & np.isfinite(k) & np.isfinite(tr) & np.isfinite(tt)
        ok &= np.isfinite(L)
    return ok


def fin_parameter(h: ArrayLike, k: ArrayLike, thickness: ArrayLike) -> FloatArray:
    """Return the fin parameter m (1/m) of a wide plate fin of uniform thickness.

    Formula: ``m = sqrt(h P / (k A_c))`` with the wide-fin perimeter-to-area ratio
    ``P / A_c = 2 w / (w t) = 2 / t`` (the two end faces of width ``t`` neglected beside the
    two faces of width ``w``), so ``m = sqrt(2 h / (k t))``.

    Parameters
    ----------
    h : heat transfer coefficient, W/(m^2 K)
    k : fin conductivity, W/(m K)
    thickness : fin thickness t, m (the root thickness for a tapered fin)

    Returns
    -------
    m, 1/m, >= 0 (0 where h = 0). NaN where h < 0, k <= 0 or t <= 0.

    Validity: wide fin (width along the flow >> t, always true for extruded plate fins; the
    exact ratio ``2 (w + t)/(w t)`` differs by ``t/w``, 0.2 % for a 1 mm fin 50 mm long).

    Source: Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer,
    6th ed., Sec. 3.6.2, m^2 = hP/(kA_c) (equation number not at hand); wide-fin ratio 2/t,
    Kraus, Aziz & Welty, Extended Surface Heat Transfer (2001), Ch. 2 (recalled from memory).

    Example: h = 45 W/m^2K, k = 386 W/mK (copper), t = 2 mm: ``fin_parameter(45, 386, 2e-3)``
    -> 10.80 1/m, the value printed in the worked solution cited in tests/test_fins.py.
    """
    h, k, t = _f(h), _f(k), _f(thickness)
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = (h >= 0) & (k > 0) & (t > 0)
        return np.where(ok, np.sqrt(np.where(ok, 2.0 * h / (k * t), 0.0)), np.nan)


def fin_parameter_pin(h: ArrayLike, k: ArrayLike, diameter: ArrayLike) -> FloatArray:
    """Return the fin parameter m (1/m) of a round pin fin.

    Formula: ``m = sqrt(h P / (k A_c))`` with ``P = pi D``, ``A_c = pi D^2 / 4``:
    ``m = sqrt(4 h / (k D))``.

    Parameters
    ----------
    h : heat transfer coefficient, W/(m^2 K)
    k : pin conductivity, W/(m K)
    diameter : pin diameter D, m

    Returns
    -------
    m, 1/m, >= 0. NaN where h < 0, k <= 0 or D <= 0.

    Validity: 1-D conduction along the pin (h D / 2k << 1).

    Source: Incropera et al., 6th ed., Sec. 3.6.2 (recalled from memory).

    Example: a 2 mm copper pin (k = 400 W/mK) in a gentle breeze (h = 50 W/m^2K):
    ``fin_parameter_pin(50, 400, 2e-3)`` -> sqrt(250) = 15.8 1/m.
    """
    h, k, d = _f(h), _f(k), _f(diameter)
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = (h >= 0) & (k > 0) & (d > 0)
        return np.where(ok, np.sqrt(np.where(ok, 4.0 * h / (k * d), 0.0)), np.nan)


def fin_efficiency_adiabatic_tip(m: ArrayLike, L: ArrayLike) -> FloatArray:
    """Return the efficiency of a straight fin of uniform section with an adiabatic tip.

    Formula: ``eta = tanh(m L) / (m L)``; below ``m L = 1e-7`` the series ``1 - (m L)^2 / 3``
    (so ``eta -> 1`` smoothly as ``m L -> 0``).

    Parameters
    ----------
    m : fin parameter, 1/m (see :func:`fin_parameter`)
    L : fin height (base to tip), m; pass the corrected height ``L + t/2`` to account for a
        convecting tip (see :func:`fin_efficiency_convective_tip`)

    Returns
    -------
    eta, -, in (0, 1], referenced to the faces of height ``L`` (``2 L`` per unit length).
    NaN where m < 0 or L < 0.

    Validity: 1-D fin (Biot number h t / 2k << 1, see :func:`fin_one_dimensional_valid`),
    uniform h and k.

    Source: Incropera et al., 6th ed., Table 3.4 case B and the fin-efficiency equation of
    Sec. 3.6.4 (eta_f = tanh(mL)/mL; equation numbers not at hand).

    Example: ``fin_efficiency_adiabatic_tip(10.0, 0.1)`` -> tanh(1)/1 = 0.76159.
    """
    m, L = _f(m), _f(L)
    with np.errstate(invalid="ignore"):
        x = m * L
        ok = (m >= 0) & (L >= 0)
        return np.where(ok, _tanh_over_x(np.where(ok, x, 0.0)), np.nan)


def fin_efficiency_convective_tip(
    h: ArrayLike,
    k: ArrayLike,
    thickness: ArrayLike,
    L: ArrayLike,
    method: Literal["exact", "corrected_length"] = "exact",
) -> FloatArray:
    """Return the efficiency of a straight plate fin of uniform thickness whose tip convects.

    Formulas (``m = sqrt(2h/(k t))``, ``L_c = L + t/2``):

    - ``method="exact"``: the 1-D solution with ``-k dtheta/dx = h theta`` at the tip,
      ``q = k t m theta_b (tanh(mL) + h/(mk)) / (1 + (h/(mk)) tanh(mL))`` per unit length,
      divided by ``h (2L + t) theta_b``. With ``h/(mk) = m t/2`` this is
      ``eta = (L tanh(mL)/(mL) + t/2) / (L_c (1 + (m t/2) tanh(mL)))``, which stays finite
      and tends to 1 as ``m -> 0``.
    - ``method="corrected_length"``: the adiabatic-tip formula at the corrected height,
      ``eta = tanh(m L_c) / (m L_c)``.

    Parameters
    ----------
    h : heat transfer coefficient on faces and tip, W/(m^2 K)
    k : fin conductivity, W/(m K)
    thickness : fin thickness t, m
    L : fin height, base to tip, m
    method : "exact" (default) or "corrected_length"

    Returns
    -------
    eta, -, in (0, 1], referenced to the faces plus the tip, ``2 L + t = 2 L_c`` per unit
    length. NaN where h < 0, k <= 0, t <= 0 or L < 0.

    Validity: 1-D fin (Bi = h t / 2k << 1). The corrected length is accurate when
    ``h t / k <= 0.0625`` (Incropera et al., Sec. 3.6.4, "errors negligible"; threshold
    recalled from memory); tests/test_fins.py measures at most 0.3 % there for L >= t.

    Source: Incropera et al., 6th ed., Table 3.4 case A (exact) and Sec. 3.6.4 (corrected
    length, after Harper & Brown, NACA Report 158, 1922); equation numbers not at hand.

    Example: h = 100, k = 180, t = 1 mm, L = 10 mm: m = 33.33 1/m;
    ``fin_efficiency_convective_tip(100, 180, 1e-3, 0.01)`` -> 0.9611 (exact);
    with ``method="corrected_length"`` -> 0.9611 as well (h t / k = 5.6e-4).
    """
    h, k, t, L = _f(h), _f(k), _f(thickness), _f(L)
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = (h >= 0) & (k > 0) & (t > 0) & (L >= 0)
        m = np.sqrt(np.where(ok, 2.0 * h / (k * t), 0.0))
        t_ = np.where(ok, t, 1.0)
        L_ = np.where(ok, L, 0.0)
        Lc = L_ + 0.5 * t_
        if method == "exact":
            mL = m * L_
            eta = (L_ * _tanh_over_x(mL) + 0.5 * t_) / (Lc * (1.0 + 0.5 * m * t_ * np.tanh(mL)))
        elif method == "corrected_length":
            eta = _tanh_over_x(m * Lc)
        else:
            raise ValueError(f"method: got {method!r}, expected 'exact' or 'corrected_length'")
        return np.where(ok, eta, np.nan)


def _taper_terms(h, k, t_root, t_tip, L):
    """Common pieces of the tapered-fin solution; see fin_efficiency_tapered."""
    h, k, tr, tt, L = np.broadcast_arrays(_f(h), _f(k), _f(t_root), _f(t_tip), _f(L))
    ok = fin_inputs_valid(h, k, tr, tt, L)
    tr_ = np.where(ok, tr, 1.0)
    tau = np.where(ok, tt, 1.0) / tr_  # tip / root thickness
    eps = np.where(ok, (tr - tt), 0.0) / tr_  # taper, 1 - tau, without cancellation
    with np.errstate(invalid="ignore", divide="ignore"):
        M = np.sqrt(np.where(ok, 2.0 * h / (k * tr_), 0.0)) * np.where(ok, L, 0.0)  # m_root L
    return ok, tau, eps, M


def fin_efficiency_tapered(
    h: ArrayLike, k: ArrayLike, t_root: ArrayLike, t_tip: ArrayLike, L: ArrayLike
) -> FloatArray:
    """Return the efficiency of a longitudinal fin of trapezoidal profile, adiabatic tip.

    The thickness falls linearly from ``t_root`` at the base to ``t_tip`` at the tip. With the
    distance ``xi`` from the (virtual) apex where the thickness would be zero, the 1-D
    equation ``d/dxi(xi dtheta/dxi) = beta^2 theta`` has the solution
    ``theta = A I0(u) + B K0(u)``, ``u = 2 beta sqrt(xi)``. In the variables used here
    (``m = sqrt(2h/(k t_root))``, ``M = m L``, ``tau = t_tip/t_root``, ``eps = 1 - tau``):

        u_b = 2 M / |eps|  (base),   u_a = u_b sqrt(tau)  (tip),
        eta = |I1(u_b) K1(u_a) - K1(u_b) I1(u_a)| / (M [I0(u_b) K1(u_a) + K0(u_b) I1(u_a)])

    evaluated with the exponentially scaled ``i0e, i1e, k0e, k1e`` (stable for any ``u``).
    Limits, all continuous:

    - triangular fin, ``t_tip = 0``: ``eta = I1(2M) / (M I0(2M))`` (Harper & Brown 1922);
    - ``|eps| < 1e-6``: first-order taper series derived from the same equation,
      ``eta = tanh(M)/M + (eps/4) (sech^2 M - tanh^2 M / M^2)`` (its error, ~eps^2, is below
      1e-12, so there is no visible step where the branch switches; at ``eps = 0`` it is the
      rectangular fin ``tanh(M)/M``);
    - ``M < 1e-7``: ``eta = 1 - M^2 (1/3 + eps/12)`` (-> 1 as ``h`` or ``L`` -> 0).

    A tip thicker than the root (``eps < 0``) is solved by the same formula. Accuracy of the
    evaluation (checked against 40-digit arithmetic while writing it): relative error below
    1e-13 for ``M > 1e-3``, below 5e-10 anywhere.

    Parameters
    ----------
    h : heat transfer coefficient on both faces, W/(m^2 K)
    k : fin conductivity, W/(m K)
    t_root : thickness at the base, m
    t_tip : thickness at the tip, m (0 for a triangular fin, ``t_root`` for a plain plate)
    L : fin height, base to tip (normal to the base), m

    Returns
    -------
    eta, -, in (0, 1], referenced to ``2 L`` per unit length (both faces at their projected
    height; the slant length differs by ``(t_root - t_tip)^2 / (8 L^2)`` relative, see the
    module note). NaN where :func:`fin_inputs_valid` is False.

    Validity: 1-D fin (Biot number at the root ``h t_root / 2k << 1``); the faces' slope
    ``(t_root - t_tip) / 2L << 1``; adiabatic tip (for a convecting tip, pass
    ``L + t_tip/2`` as an approximation, in the spirit of the corrected length).

    Source: trapezoidal longitudinal fin, Gardner, "Efficiency of extended surface", Trans.
    ASME 67 (1945) 621-631, and Kraus, Aziz & Welty, Extended Surface Heat Transfer (2001),
    chapter on longitudinal fins (both recalled from memory, equation numbers not at hand;
    the formula above was re-derived here and is checked in tests/test_fins.py against a
    finite-difference solution of the ODE); triangular limit: Harper & Brown, NACA Report
    158 (1922), and Incropera et al., 6th ed., Table 3.5.

    Example: triangular fin with ``M = m L = 1``, ``fin_efficiency_tapered(h, k, t, 0, L)``
    -> I1(2)/I0(2) = 1.59064/2.27959 = 0.69777 (Abramowitz & Stegun Table 9.8).
    """
    ok, tau, eps, M = _taper_terms(h, k, t_root, t_tip, L)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # exact Bessel form
        aeps = np.abs(eps)
        bessel = (aeps >= _TAPER_SERIES) & (M >= _SMALL_ML)
        Mb = np.where(bessel, M, 1.0)
        ub = 2.0 * Mb / np.where(bessel, aeps, 1.0)
        sq = np.sqrt(tau)
        ua = ub * sq
        d = np.sign(eps) * 2.0 * Mb / (1.0 + sq)  # u_b - u_a, free of cancellation
        p = np.exp(d - np.abs(d))  # 1 for a normal taper
        q = np.exp(-d - np.abs(d))  # exp(-2 (u_b - u_a)) for a normal taper
        g = i1e(ua) / k1e(ua)  # 0 at the triangular tip (0/inf)
        num = p * i1e(ub) - q * k1e(ub) * g
        den = p * i0e(ub) + q * k0e(ub) * g
        eta_bessel = np.abs(num) / (Mb * den)
        # near-rectangular series and small-M series
        Ms = np.where(M >= _SMALL_ML, M, 1.0)
        th = np.tanh(Ms)
        sech2 = 1.0 - th * th
        eta_series = th / Ms + 0.25 * eps * (sech2 - th * th / (Ms * Ms))
        eta_small = 1.0 - M * M * (1.0 / 3.0 + eps / 12.0)
    eta = np.where(M < _SMALL_ML, eta_small, np.where(bessel, eta_bessel, eta_series))
    return np.where(ok, eta, np.nan)


def fin_temperature_profile(
    h: ArrayLike,
    k: ArrayLike,
    t_root: ArrayLike,
    t_tip: ArrayLike,
    L: ArrayLike,
    x_over_L: ArrayLike,
) -> FloatArray:
    """Return theta(x)/theta_base along a straight or tapered plate fin with an adiabatic tip.

    Formulas (same variables as :func:`fin_efficiency_tapered`; ``s = x/L``, x from the
    base; ``u(s) = u_b sqrt(1 - eps s)``):

    - tapered: ``theta/theta_b = [K1(u_a) I0(u) + I1(u_a) K0(u)] /
      [K1(u_a) I0(u_b) + I1(u_a) K0(u_b)]`` (scaled Bessel functions);
    - ``|eps| < 1e-6``: ``cosh(M(1-s))/cosh(M) + eps theta_1(s)`` with the first-order taper
      correction ``theta_1`` derived here from the same equation (error ~eps^2); at
      ``eps = 0`` this is the rectangular fin ``cosh(m(L-x))/cosh(mL)``;
    - ``M < 1e-7``: ``1 - M^2 (s - s^2/2)``.

    Parameters
    ----------
    h : heat transfer coefficient, W/(m^2 K)
    k : fin conductivity, W/(m K)
    t_root, t_tip : thickness at base and tip, m (equal for a fin of uniform thickness)
    L : fin height, m
    x_over_L : position along the fin, 0 at the base, 1 at the tip (-)

    Shapes: the five design arguments broadcast together to a shape ``D``; the positions
    ``x_over_L`` (shape ``P``) are laid along new trailing axes, so the result has shape
    ``D + P``: ``n`` designs (1-D arrays) at ``p`` positions give an ``(n, p)`` array, a
    scalar position gives shape ``(n,)``, one design at ``p`` positions gives ``(p,)``.

    Returns
    -------
    theta/theta_b, -, in (0, 1], 1 at the base, falling monotonically to the tip (rising
    nowhere). NaN where :func:`fin_inputs_valid` is False or ``x_over_L`` is outside [0, 1].

    Validity: as :func:`fin_efficiency_tapered` (1-D fin, adiabatic tip).

    Source: rectangular fin, Incropera et al., 6th ed., Table 3.4 case B; tapered fin, the
    trapezoidal-fin solution of Gardner (1945) and Kraus, Aziz & Welty (2001), recalled from
    memory and re-derived here; checked against a finite-difference solution in the tests.

    Example: rectangular fin with ``m L = 1``, tip value ``1/cosh(1) = 0.64805``; triangular
    fin with ``m L = 1``, tip value ``1/I0(2) = 0.43868``.
    """
    ok_d, tau, eps, M = _taper_terms(h, k, t_root, t_tip, L)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # per-design pieces, on the designs' own shape (cheap when x_over_L adds an axis)
        aeps = np.abs(eps)
        bessel = (aeps >= _TAPER_SERIES) & (M >= _SMALL_ML)
        sgn = np.sign(eps)
        Mb = np.where(bessel, M, 1.0)
        ub = 2.0 * Mb / np.where(bessel, aeps, 1.0)
        sq = np.sqrt(tau)
        d = sgn * 2.0 * Mb / (1.0 + sq)  # u_b - u_a
        ad = np.abs(d)
        g = i1e(ub * sq) / k1e(ub * sq)  # 0 for a triangular fin
        den = i0e(ub) * np.exp(d - ad) + g * k0e(ub) * np.exp(-d - ad)
        Ms = np.where(M >= _SMALL_ML, M, 1.0)
        e2M = np.exp(-2.0 * Ms)
        th = np.tanh(Ms)
        a_coef = 0.25 * (1.0 - Ms * th - th / Ms)
        # per position: designs along the leading axes, positions along the trailing ones
        s = _f(x_over_L)
        (ok_d, bessel, eps, M, sgn, Mb, ub, sq, ad, g, den, Ms, e2M, a_coef) = (
            np.reshape(a, np.shape(a) + (1,) * s.ndim)
            for a in (ok_d, bessel, eps, M, sgn, Mb, ub, sq, ad, g, den, Ms, e2M, a_coef)
        )
        valid_s = (s >= 0.0) & (s <= 1.0)
        s = np.where(valid_s, s, 0.0)
        w = np.sqrt(1.0 - eps * s)  # t(x)/t_root = 1 - eps s
        u = ub * w
        ws = w + sq  # 0 only at the tip of a triangular fin, where u - u_a = 0
        e = np.where(ws > 0.0, sgn * 2.0 * Mb * (1.0 - s) / ws, 0.0)  # u - u_a
        k0_term = np.where(g > 0.0, g * k0e(u), 0.0)  # 0 at a triangular tip (u = 0)
        num = i0e(u) * np.exp(e - ad) + k0_term * np.exp(-e - ad)
        prof_bessel = num / den
        # near-rectangular: theta_0 + eps theta_1, written without overflow for large M
        r = 1.0 - s
        decay = np.exp(-Ms * s) / (1.0 + e2M)
        co = decay * (1.0 + np.exp(-2.0 * Ms * r))  # cosh(M r)/cosh(M)
        si = decay * (1.0 - np.exp(-2.0 * Ms * r))  # sinh(M r)/cosh(M)
        theta1 = (
            -0.25 * r * co
            + 0.5 * Ms * r * si
            - 0.25 * Ms * r * r * si
            + a_coef * co
            + si / (4.0 * Ms)
        )
        prof_series = co + eps * theta1
        prof_small = 1.0 - M * M * (s - 0.5 * s * s)
    prof = np.where(M < _SMALL_ML, prof_small, np.where(bessel, prof_bessel, prof_series))
    return np.where(ok_d & valid_s, prof, np.nan)


def fin_biot_number(h: ArrayLike, k: ArrayLike, thickness: ArrayLike) -> FloatArray:
    """Return the transverse Biot number of a plate fin, Bi = h (t/2) / k.

    Formula: ``Bi = h t / (2 k)`` (half-thickness as the conduction length; note that some
    texts use ``h t / k``).

    Parameters
    ----------
    h : heat transfer coefficient, W/(m^2 K)
    k : fin conductivity, W/(m K)
    thickness : fin thickness t, m (use the root thickness of a tapered fin, its largest)

    Returns
    -------
    Bi, -, >= 0. NaN where h < 0, k <= 0 or t <= 0.

    Validity: any; it is the measure of validity of the 1-D fin models
    (:func:`fin_one_dimensional_valid`).

    Source: Incropera et al., 6th ed., Sec. 3.6 (1-D fin assumption, Bi << 1; recalled from
    memory).

    Example: aluminium (k = 200 W/mK), t = 2 mm, h = 100 W/m^2K:
    ``fin_biot_number(100, 200, 2e-3)`` -> 5e-4.
    """
    h, k, t = _f(h), _f(k), _f(thickness)
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = (h >= 0) & (k > 0) & (t > 0)
        return np.where(ok, 0.5 * h * t / np.where(ok, k, 1.0), np.nan)


def fin_one_dimensional_valid(Bi: ArrayLike, threshold: float = ONE_D_BIOT_LIMIT) -> np.ndarray:
    """Return True where 1-D fin theory is valid: 0 <= Bi <= threshold.

    Formula: ``valid = (Bi >= 0) & (Bi <= threshold)``; NaN gives False.

    Parameters
    ----------
    Bi : transverse Biot number h (t/2) / k, - (see :func:`fin_biot_number`)
    threshold : the largest Bi accepted, - (default 0.1)

    Returns
    -------
    bool array, shape of ``Bi``.

    Validity: the threshold 0.1 is common practice, no source. What it means here, measured
    in tests/test_fins.py against the exact 2-D solution of a rectangular fin
    (separation of variables, adiabatic tip): the 1-D efficiency overestimates the 2-D one
    by at most 0.3 % at Bi = 0.01, 2.6 % at Bi = 0.1 and 10 % at Bi = 0.5, for m L from 0.1
    to 3. Plate fins of aluminium in forced air have Bi of order 1e-3.

    Source: common practice, no source (Bi << 1 as the condition for 1-D fin theory is in
    every heat-transfer text, e.g. Incropera et al., Sec. 3.6, recalled from memory).

    Example: ``fin_one_dimensional_valid([0.0005, 0.1, 0.2])`` -> [True, True, False].
    """
    b = _f(Bi)
    with np.errstate(invalid="ignore"):
        return (b >= 0.0) & (b <= threshold)


def overall_surface_efficiency(
    eta_fin: ArrayLike, area_fins: ArrayLike, area_total: ArrayLike
) -> FloatArray:
    """Return the overall surface efficiency of a finned surface.

    Formula: ``eta_o = 1 - (A_f / A_t) (1 - eta_f)``, with ``A_t = A_f + A_b`` (fins plus
    the exposed base between them); ``q = eta_o h A_t theta_b``.

    Parameters
    ----------
    eta_fin : fin efficiency eta_f, - (referenced to ``area_fins``)
    area_fins : wetted area of all fins A_f, m^2
    area_total : wetted area of fins and exposed base A_t, m^2

    Returns
    -------
    eta_o, -, in [eta_f, 1]. NaN where A_t <= 0, A_f < 0, A_f > A_t or eta_f outside
    [0, 1].

    Validity: uniform h over fins and base; no contact resistance at the fin roots
    (extruded fins are one piece with the base).

    Source: Incropera et al., 6th ed., Sec. 3.6.5, overall surface efficiency (equation
    number not at hand).

    Example: ``overall_surface_efficiency(0.8, 0.9, 1.0)`` -> 1 - 0.9 * 0.2 = 0.82.
    """
    eta, af, at = _f(eta_fin), _f(area_fins), _f(area_total)
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = (at > 0) & (af >= 0) & (af <= at) & (eta >= 0) & (eta <= 1)
        return np.where(ok, 1.0 - af / np.where(ok, at, 1.0) * (1.0 - eta), np.nan)
