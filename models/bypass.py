"""Flow bypass around an unducted plate-fin heat sink: the split between the fin channels and the
clearance around them, by equal static pressure drop.

Geometry (one cross-section normal to the flow). The sink (base width ``W``, fin height ``H``,
flow length ``L``) sits in a duct or enclosure channel larger than its fins. Air can pass the
fins through a clearance ``c_t`` above the fin tips, over the full base width ``W`` (the "top
path", a rectangular duct ``W x c_t``), and through a clearance ``c_s`` beside each outer fin,
over the fin height ``H`` (the "side path": two identical ducts ``c_s x H``). The two corner
rectangles ``c_s x c_t`` (present when both clearances are open) are not counted: they add at
most ``2 c_s c_t`` to the bypass area. Every clearance duct runs the length ``L``; its walls are
the enclosure wall and the fin tips (top) or the outer face of an outer fin (side).

Equal pressure drop. The fin channels and the clearance ducts join the same upstream and
downstream planes, so they carry the same static pressure drop ``dp``; the total flow is the
sum of their flows. This is the equal-pressure-drop bypass estimate of Simons & Schmidt
(1997) as described by Simons (2004): the sink's pressure drop is found at its channel flow
with the ducted method, and the bypass carries whatever flow the same pressure drop drives
through the clearance (channel flow -> pressure drop -> total flow, the direction of
:func:`total_flow_with_bypass`). We keep that idea and write our own clearance resistance,
for each path ``k`` (top, sides)::

    dp = a_k Q_k + b_k Q_k^2
    a_k = 2 (f Re)_k mu L / (A_k Dh_k^2)           fully developed laminar friction
    b_k = (Kc + Ke) rho / (2 A_k^2)                 entrance contraction + exit expansion

with ``(f Re)_k`` the Shah & London fully developed FANNING value for the duct's aspect ratio
(``models.channel_friction``), and Kc, Ke of Kays & London as used for the fin channels
(``models.minor_losses``: Kc = 0.42 (1 - sigma^2), Ke = (1 - sigma)^2, both on the path's own
velocity head, the convention of ``models.channel``) at the bypass free-flow ratio
``sigma_b = A_b / (W H + A_b)``, ``A_b`` the total clearance area: the sink's frontal area
blocks the clearance stream as the fins' leading faces block a channel stream. A thin
clearance (sigma_b -> 0) then loses 1.42 velocity heads, near the one velocity head that
Lee's (1995) bypass model charges the bypass stream (recalled from memory) plus a sharp-slot
entry; at sigma_b = 0.2 the two agree within 5 %; a clearance much larger than the sink
(sigma_b -> 1) loses nothing. The terms of a path are written in the same equal-area
(Kays & London) form as the fin channels, so the approach and leaving velocity heads cancel
from both sides of the equal-dp condition.

What we simplified. Making the bypass flow larger, so the fin flow and the heat transfer
smaller (conservative for temperatures):

* fully developed laminar friction everywhere: the developing-flow excess (apparent
  friction) of short, wide clearances and turbulent friction above Re = 2300 are left out
  (flagged by :func:`bypass_flags` when Re > 2300);
* the bypass air picks up no heat (a thermal, not a flow, simplification).

Making it smaller: the fin tips and the outer fins are counted as no-slip walls of the
clearance ducts, though between the tips the boundary is the slower-moving channel air;
and the two corner rectangles are left out (at most ``2 c_s c_t`` of area). Of unknown sign,
and the main uncertainty for clearances comparable to the fin height: the entrance and exit
loss of the clearance at ``sigma_b``.

Paths in parallel, exactly. The top path and the side pair generally differ in their ratio of
linear to quadratic resistance, so no single equivalent duct reproduces their sum (a
one-duct fit, exact in the all-linear and all-quadratic limits, was off by about 10 % at the 90th
percentile of a sweep of plausible sizes). The coefficients therefore carry a leading path
axis of length 2 (``BYPASS_PATHS``; leading, so that each path's row is contiguous in memory
inside the operating-point root find); each path's flow is the explicit root of its own
quadratic at the common ``dp``, and the flows add. The two side ducts are identical and split
their flow equally, which makes the side pair one path of area ``2 H c_s`` with the side
duct's hydraulic diameter, exactly.

References: R. E. Simons (2004), "Estimating the effect of flow bypass on parallel plate-fin
heat sink performance", ElectronicsCooling 10(1), February 2004, eqs. 1-3 (procedure: sink
pressure drop at the channel flow, then the duct flow at the same pressure drop; its Table 1
coefficients were not at hand and are not reproduced); R. E. Simons & R. R. Schmidt (1997),
"A simple method to estimate heat sink air flow bypass", ElectronicsCooling 3(2) (cited by
Simons 2004 for the derivation; not read, issue recalled from memory); S. Lee (1995),
"Optimum design and selection of heat sinks", IEEE Trans. Compon. Packag. Manuf. Technol. A
18(4):812-817 (bypass model recalled from memory, not read); H. Jonsson & B. Moshfegh (2001),
IEEE Trans. Compon. Packag. Technol. 24(2):142-149 (measured bypass with sink-to-duct width
ratios 0.33-0.84 and fin-to-duct height ratios 0.33-1 at duct Re 2000-16500; background).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.channel_friction import fanning_fRe_fully_developed_rect
from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient
from models.roots import bracketed_root

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

BYPASS_PATHS = ("top", "sides")  # order of the leading (path) axis of the coefficients
RE_BYPASS_LAMINAR_MAX = 2300.0  # laminar friction used up to here (as models.channel)


class BypassCoefficients(NamedTuple):
    """Per-path bypass resistance, dp = a Q + b Q^2 (unpacks as ``a, b``).

    Both arrays have the shape ``(2,) + S``: the path axis first (``BYPASS_PATHS``: top, both
    sides), then the broadcast shape S of the inputs. A closed path (clearance 0) has
    ``a = +inf`` and ``b = 0``; impossible inputs give NaN.
    """

    a: FloatArray  # Pa s/m^3, linear (laminar friction) coefficient, > 0
    b: FloatArray  # Pa s^2/m^6, quadratic (entrance + exit) coefficient, >= 0


class BypassSplit(NamedTuple):
    """Result of :func:`split_fixed_total_flow` (SI)."""

    channel_flow: FloatArray  # m^3/s through the fin channels
    bypass_flow: FloatArray  # m^3/s through the clearance (= total - channel_flow)
    pressure_drop: FloatArray  # Pa, common static pressure drop dp_channel(channel_flow)
    converged: BoolArray  # False (and NaN flows) where no split was found


class BypassFlags(NamedTuple):
    """Result of :func:`bypass_flags`."""

    reynolds: FloatArray  # Re_Dh of each path, shape (2,) + S (BYPASS_PATHS); 0 where closed
    valid_input: BoolArray  # False where the geometry or air properties are impossible
    in_range: BoolArray  # valid_input and every open path laminar (Re <= 2300)

    @property
    def outside_range(self) -> BoolArray:
        """True where the bypass model is used outside its range (= ~in_range)."""
        return ~self.in_range


def _paths(
    W: ArrayLike, H: ArrayLike, clearance_top: ArrayLike, clearance_side: ArrayLike
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray, BoolArray]:
    """Area, hydraulic diameter, aspect ratio (path axis first), sigma_b and validity."""
    W, H, ct, cs = np.broadcast_arrays(
        *(np.asarray(v, dtype=float) for v in (W, H, clearance_top, clearance_side))
    )
    ok = (W > 0.0) & (H > 0.0) & (ct >= 0.0) & (cs >= 0.0) & np.isfinite(W + H + ct + cs)
    width = np.stack([W, H])  # top duct W x c_t; one side duct H x c_s
    gap = np.stack([ct, cs])
    count = np.array([1.0, 2.0]).reshape((2,) + (1,) * W.ndim)  # sides: two equal ducts
    with np.errstate(invalid="ignore", divide="ignore"):
        area = count * width * gap
        dh = 2.0 * width * gap / (width + gap)
        alpha = np.minimum(width, gap) / np.maximum(width, gap)
        a_bypass = area[0] + area[1]
        sigma = a_bypass / (W * H + a_bypass)
    return area, dh, alpha, sigma, ok


def bypass_pressure_coefficients(
    W: ArrayLike,
    H: ArrayLike,
    L: ArrayLike,
    clearance_top: ArrayLike,
    clearance_side: ArrayLike,
    density: ArrayLike,
    kinematic_viscosity: ArrayLike,
) -> BypassCoefficients:
    """Return the per-path coefficients a, b of the clearance pressure drop dp = a Q + b Q^2.

    Formula, for each path k (top: one duct ``W x c_t``; sides: two ducts ``H x c_s``)::

        A_k     = W c_t  |  2 H c_s                 path flow area
        Dh_k    = 2 w c / (w + c)                   (w, c) = (W, c_t) | (H, c_s)
        alpha_k = min(w, c) / max(w, c)
        a_k     = 2 (f Re)(alpha_k) rho nu L / (A_k Dh_k^2)
        sigma_b = (A_top + A_sides) / (W H + A_top + A_sides)
        b_k     = [0.42 (1 - sigma_b^2) + (1 - sigma_b)^2] rho / (2 A_k^2)

    For a wide gap (alpha -> 0, f Re = 24, Dh -> 2c) ``a`` tends to the plane Poiseuille
    resistance ``12 mu L / (w c^3)``.

    Parameters
    ----------
    W : array_like
        Base width of the sink (width of the top clearance), m, > 0.
    H : array_like
        Fin height (height of each side clearance), m, > 0.
    L : array_like
        Flow length of the sink (length of every clearance duct), m, > 0.
    clearance_top : array_like
        Gap c_t between the fin tips and the enclosure wall, m, >= 0 (0: closed).
    clearance_side : array_like
        Gap c_s between each outer fin and the enclosure wall, m, >= 0 (0: closed).
    density : array_like
        Air density rho, kg/m^3, > 0.
    kinematic_viscosity : array_like
        Air kinematic viscosity nu, m^2/s, > 0.

    Returns
    -------
    BypassCoefficients
        ``a`` (Pa s/m^3, > 0) and ``b`` (Pa s^2/m^6, >= 0), each of shape ``(2,) + S``: the
        path axis first (``BYPASS_PATHS``), then the broadcast shape S of the inputs (so
        ``a[0]`` is the top path of every design). A closed path (clearance 0): ``a = +inf``,
        ``b = 0`` (it carries no flow at any dp).

    Validity
    --------
    Laminar clearance flow (Re_Dh <= 2300; :func:`bypass_flags` flags the rest, where the
    laminar friction is extrapolated and under-estimates the bypass resistance), friction
    fully developed (the developing-flow excess is not included), constant density.
    Impossible inputs (W, H, L, rho or nu not > 0, a negative or NaN clearance): NaN in both
    paths (flagged by :func:`bypass_flags`), never an exception.

    Source: equal-pressure-drop bypass estimate after Simons & Schmidt (1997) / Simons (2004),
    ElectronicsCooling (see the module docstring for what is ours); fully developed laminar
    f Re: Shah & London (1978), rectangular-duct polynomial; Kc, Ke: Kays & London (1984),
    Compact Heat Exchangers, Figs. 5-2 to 5-4 (Re -> infinity), in the forms of
    ``models.minor_losses``; plane Poiseuille limit: White, Viscous Fluid Flow, 3rd ed., ch. 3
    (flow per width h^3 dp / (12 mu L) between plates h apart; section not at hand).

    Example
    -------
    A 1 mm gap over a 100 mm wide sink, 100 mm long, air mu = 1.2 * 1.5e-5 = 1.8e-5 Pa s:
    plane Poiseuille gives 12 mu L / (W c^3) = 2.16e5 Pa s/m^3; the finite width (aspect
    ratio 0.01) adds 0.6 %, as the exact rectangular-duct series does:

    >>> c = bypass_pressure_coefficients(0.1, 0.03, 0.1, 0.001, 0.0, 1.2, 1.5e-5)
    >>> round(float(c.a[0]) / 2.16e5, 3), float(c.a[1]), float(c.b[1])
    (1.006, inf, 0.0)
    """
    W, H, length, ct, cs, rho, nu = np.broadcast_arrays(
        *(
            np.asarray(v, dtype=float)
            for v in (W, H, L, clearance_top, clearance_side, density, kinematic_viscosity)
        )
    )
    area, dh, alpha, sigma, ok = _paths(W, H, ct, cs)
    mu_l = rho * nu * length
    ok = ok & (rho > 0.0) & (nu > 0.0) & (length > 0.0) & np.isfinite(mu_l)
    open_ = area > 0.0
    # sigma_b is common to both paths; where everything is closed it is never used.
    s = np.where(sigma > 0.0, sigma, 1.0)
    k_minor = entrance_loss_coefficient(s) + exit_loss_coefficient(s)
    fre = fanning_fRe_fully_developed_rect(np.where(open_, alpha, 0.0))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        a = 2.0 * fre * mu_l / (area * dh * dh)
        b = k_minor * rho / (2.0 * area * area)
    a = np.where(open_, a, np.inf)
    b = np.where(open_, b, 0.0)
    return BypassCoefficients(np.where(ok, a, np.nan), np.where(ok, b, np.nan))


def bypass_path_flows(dp: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatArray:
    """Return the flow of each bypass path at the static pressure drop dp, m^3/s.

    Formula: the root of ``a Q + b Q^2 = dp`` (``a Q + b Q |Q| = dp`` for dp < 0) in the
    cancellation-free form ::

        Q = 2 dp / (a + sqrt(a^2 + 4 b |dp|))

    (``a = +inf`` gives exactly 0; ``b = 0`` gives dp / a; ``a -> 0`` gives sqrt(dp/b)).

    Parameters
    ----------
    dp : array_like
        Static pressure drop across the sink, Pa, shape ``S`` (one per design).
    a : array_like
        Linear coefficients, Pa s/m^3, shape ``(P,) + S`` (path axis first; e.g. from
        :func:`bypass_pressure_coefficients`), > 0 or +inf (closed path).
    b : array_like
        Quadratic coefficients, Pa s^2/m^6, same shape as ``a``, >= 0.

    Returns
    -------
    ndarray
        Q_k, m^3/s, shape ``(P,) + S``; same sign as dp; 0 where a path is closed or dp = 0.

    Validity
    --------
    Any real dp: a negative dp gives the reverse flow with the same resistance (odd
    extension, so that root finders see a monotone function). NaN in dp, a or b gives NaN.
    Relative rounding error a few ulp at every ratio of 4 b dp to a^2. ``a^2`` overflows only
    for a > 1e154 Pa s/m^3 (a gap far below a nanometre), where the flow comes out 0 instead
    of below 1e-154 m^3/s.

    Source: the quadratic formula rationalised to avoid cancellation (Press et al.,
    Numerical Recipes, 3rd ed., section 5.6, eqs. 5.6.4-5.6.5; numbers recalled from memory).

    Example
    -------
    a = 100 Pa s/m^3, b = 1e6 Pa s^2/m^6, dp = 2 Pa: 1e6 Q^2 + 100 Q - 2 = 0 gives
    Q = (-100 + sqrt(1e4 + 8e6)) / 2e6 = 0.0013651 m^3/s:

    >>> round(float(bypass_path_flows(2.0, [100.0], [1e6])[0]), 8)
    0.0013651
    """
    p = np.asarray(dp, dtype=float)[np.newaxis]  # S -> (1,) + S, against (P,) + S
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        return 2.0 * p / (a + np.sqrt(a * a + 4.0 * b * np.abs(p)))


def bypass_flow_at_pressure(dp: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatArray:
    """Return the total bypass flow Q_b at the static pressure drop dp, m^3/s.

    Formula: ``Q_b = sum_k 2 dp / (a_k + sqrt(a_k^2 + 4 b_k |dp|))`` over the paths k (each
    path's root of ``a_k Q + b_k Q^2 = dp``; see :func:`bypass_path_flows`).

    Parameters
    ----------
    dp : array_like
        Static pressure drop across the sink (the fin channels' drop), Pa, shape ``S``.
    a, b : array_like
        Per-path coefficients from :func:`bypass_pressure_coefficients`, Pa s/m^3 and
        Pa s^2/m^6, shape ``(P,) + S`` (path axis first).

    Returns
    -------
    ndarray
        Q_b, m^3/s, shape ``S``, >= 0 for dp >= 0; exactly 0 where every path is closed
        (clearances 0, ``a = +inf``), so the ducted result is recovered bit for bit.

    Validity
    --------
    As :func:`bypass_path_flows` (negative dp: reverse flow; NaN propagates, so invalid
    geometry from :func:`bypass_pressure_coefficients` gives NaN).

    Source: equal pressure drop over parallel paths (Simons 2004, ElectronicsCooling; see
    the module docstring); root form as :func:`bypass_path_flows`.

    Example
    -------
    Two paths, (a, b) = (100, 1e6) and (+inf, 0) (closed), at 2 Pa: 0.0013651 m^3/s:

    >>> round(float(bypass_flow_at_pressure(2.0, [100.0, np.inf], [1e6, 0.0])), 8)
    0.0013651
    """
    p = np.asarray(dp, dtype=float)
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    two_p, four_p = 2.0 * p, 4.0 * np.abs(p)
    out = np.zeros(np.broadcast_shapes(p.shape, a.shape[1:], b.shape[1:]))
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for ak, bk in zip(a, b, strict=True):  # over the (two) paths, not over designs
            out += two_p / (ak + np.sqrt(ak * ak + bk * four_p))
    return out


def total_flow_with_bypass(
    q_channel: ArrayLike, dp_channel: ArrayLike, a: ArrayLike, b: ArrayLike
) -> FloatArray:
    """Return the total flow Q = Q_c + Q_b(dp_c) of a sink with bypass, m^3/s.

    Formula: ``Q = Q_c + sum_k 2 dp_c / (a_k + sqrt(a_k^2 + 4 b_k dp_c))`` -- the fin channels
    carry ``Q_c`` at their static pressure drop ``dp_c``, the clearance carries the flow the
    same ``dp_c`` drives through it. Meant for the fan operating point: root-find on ``Q_c``
    for ``fan(Q) = dp_c(Q_c) + k Q^2`` with this Q (one root find, no nested solve; the
    residual falls strictly with ``Q_c``).

    Parameters
    ----------
    q_channel : array_like
        Flow through the fin channels, m^3/s, >= 0, shape ``S``.
    dp_channel : array_like
        Static pressure drop of the fin channels at ``q_channel``, Pa (computed by the
        caller), shape ``S``.
    a, b : array_like
        Per-path coefficients from :func:`bypass_pressure_coefficients`, shape ``(P,) + S``.

    Returns
    -------
    ndarray
        Q, m^3/s, shape ``S``, >= q_channel; equal to q_channel exactly where every clearance
        is 0.

    Validity
    --------
    As :func:`bypass_flow_at_pressure`. NaN inputs give NaN.

    Source: mass conservation over parallel paths at equal pressure drop (Simons 2004,
    ElectronicsCooling, eqs. 1-3: channel flow -> pressure drop -> duct flow).

    Example
    -------
    >>> round(float(total_flow_with_bypass(0.001, 2.0, [100.0, np.inf], [1e6, 0.0])), 8)
    0.0023651
    """
    return np.asarray(q_channel, dtype=float) + bypass_flow_at_pressure(dp_channel, a, b)


def split_fixed_total_flow(
    Q_total: ArrayLike,
    dp_channel_fn: Callable[[FloatArray], FloatArray],
    a: ArrayLike,
    b: ArrayLike,
    *,
    rtol: float = 1e-12,
    maxiter: int = 100,
) -> BypassSplit:
    """Return the split of a fixed total flow between the fin channels and the bypass.

    Solves, for every design at once, ::

        F(Q_c) = Q_c + Q_b(dp_c(Q_c)) - Q_total = 0,     0 <= Q_c <= Q_total

    with :func:`models.roots.bracketed_root` (Chandrupatla). ``F(0) = -Q_total < 0`` and
    ``F(Q_total) = Q_b >= 0``, and F rises strictly, so the root exists and is unique. First
    trial point: both paths taken as linear resistances through their values at ``Q_total``,
    ``Q_c = Q_total^2 / (Q_total + Q_b(dp_c(Q_total)))``. The bypass flow returned is
    ``Q_total - Q_c`` (mass conserved exactly); the pressure drop is ``dp_c(Q_c)``.

    Parameters
    ----------
    Q_total : array_like
        Total volumetric flow arriving at the sink, m^3/s, >= 0, shape ``S``.
    dp_channel_fn : callable
        ``dp_c(q) -> Pa``: static pressure drop of the fin channels at channel flow ``q``
        (m^3/s), vectorized over an array of shape ``S`` (element i for design i), strictly
        increasing, with ``dp_c(0) = 0`` (never called at 0 for a positive Q_total).
    a, b : array_like
        Per-path coefficients from :func:`bypass_pressure_coefficients`, shape ``(P,) + S``.
    rtol : float
        Relative tolerance on Q_c, dimensionless (absolute floor 1e-15 Q_total).
    maxiter : int
        Most calls of ``dp_channel_fn`` in the root find (two more are made: at Q_total
        and at the root).

    Returns
    -------
    BypassSplit
        channel_flow, bypass_flow (m^3/s, each in [0, Q_total], summing to Q_total),
        pressure_drop (Pa), converged (bool).

    Validity
    --------
    Where every clearance is 0 the result is exactly ``(Q_total, 0, dp_c(Q_total))``. Q_total
    = 0 gives zeros. A negative or NaN Q_total, NaN coefficients (impossible bypass geometry)
    or a channel function returning NaN give NaN flows and ``converged = False`` (flagged, no
    exception).

    Source: equal pressure drop and mass conservation over parallel paths (Simons 2004,
    ElectronicsCooling; Simons & Schmidt 1997); root finder: Chandrupatla (1997), Adv. Eng.
    Software 28:145-149.

    Example
    -------
    Channels dp = 1e4 q (linear), one path a = 1e4, b = 0, Q_total = 0.002 m^3/s: equal
    resistances share the flow equally:

    >>> s = split_fixed_total_flow(0.002, lambda q: 1e4 * q, [[1e4]], [[0.0]])
    >>> round(float(s.channel_flow[0]), 12), round(float(s.pressure_drop[0]), 9)
    (0.001, 10.0)
    """
    q_tot = np.asarray(Q_total, dtype=float)
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    shape = np.broadcast_shapes(q_tot.shape, a.shape[1:], b.shape[1:])
    q_tot = np.broadcast_to(q_tot, shape)
    positive = q_tot > 0.0
    q_work = np.where(positive, q_tot, 1.0)  # placeholder flow for zero / invalid rows

    def residual(q: FloatArray) -> FloatArray:
        return q + bypass_flow_at_pressure(dp_channel_fn(q), a, b) - q_work

    dp_hi = np.asarray(dp_channel_fn(q_work), dtype=float)
    qb_hi = bypass_flow_at_pressure(dp_hi, a, b)
    with np.errstate(invalid="ignore", divide="ignore"):
        guess = q_work * q_work / (q_work + qb_hi)
    res = bracketed_root(
        residual,
        np.zeros(shape),
        q_work,
        1e-15 * q_work,
        rtol,
        maxiter,
        f_lo=-q_work,
        f_hi=qb_hi,
        x_first=guess,
    )
    # All paths closed: F(Q_total) = 0 exactly, the root is Q_total (kept bit for bit).
    closed = np.all(np.isinf(a) & (a > 0.0), axis=0) & np.isfinite(dp_hi)
    q_c = np.where(closed, q_work, res.root)
    ok = (res.converged | closed) & np.isfinite(q_c) & positive
    dp = np.asarray(dp_channel_fn(np.where(ok, q_c, q_work)), dtype=float)
    zero = q_tot == 0.0
    q_c = np.where(zero, 0.0, np.where(ok, q_c, np.nan))
    dp = np.where(zero, 0.0, np.where(ok, dp, np.nan))
    return BypassSplit(q_c, q_tot - q_c, dp, np.asarray(ok | zero))


def bypass_flags(
    dp: ArrayLike,
    W: ArrayLike,
    H: ArrayLike,
    L: ArrayLike,
    clearance_top: ArrayLike,
    clearance_side: ArrayLike,
    density: ArrayLike,
    kinematic_viscosity: ArrayLike,
) -> BypassFlags:
    """Return each path's Reynolds number and where the bypass model leaves its range.

    Formula, for each open path k at the operating pressure drop dp::

        Re_k = Q_k Dh_k / (A_k nu),   Q_k from bypass_path_flows(dp, a, b)
        in_range = valid_input and Re_k <= 2300 for every open path

    Parameters
    ----------
    dp : array_like
        Operating static pressure drop across the sink, Pa, >= 0, shape ``S``.
    W, H, L, clearance_top, clearance_side : array_like
        As :func:`bypass_pressure_coefficients`, m.
    density : array_like
        Air density, kg/m^3, > 0.
    kinematic_viscosity : array_like
        Air kinematic viscosity, m^2/s, > 0.

    Returns
    -------
    BypassFlags
        reynolds (shape ``(2,) + S``, ``BYPASS_PATHS``; 0 where a path is closed, NaN where
        the input is impossible), valid_input (bool), in_range (bool; ``outside_range`` is
        its negation).

    Validity
    --------
    Out of range (in_range False, results extrapolated, not clipped): an open path with
    Re > 2300, where the laminar friction term under-estimates the clearance resistance (for
    a long gap at Re = 1e4 turbulent friction is about 3 times the laminar value), so the
    bypass flow is over-estimated and the fin flow under-estimated -- the conservative side
    for temperatures. Impossible input: valid_input False.

    Source: laminar limit Re = 2300 as in ``models.channel`` (Gnielinski 2013, Int. J. Heat
    Mass Transfer 63:134-140); turbulent/laminar ratio from Petukhov (1970) vs f = 24/Re.

    Example
    -------
    A 5 mm gap over a 100 mm wide sink at 20 Pa carries Re above 2300 (flagged):

    >>> f = bypass_flags(20.0, 0.1, 0.03, 0.1, 0.005, 0.0, 1.2, 1.5e-5)
    >>> bool(f.valid_input), bool(f.in_range), bool(f.reynolds[0] > 2300)
    (True, False, True)
    """
    dp, W, H, L, ct, cs, rho, nu = np.broadcast_arrays(
        *(
            np.asarray(v, dtype=float)
            for v in (dp, W, H, L, clearance_top, clearance_side, density, kinematic_viscosity)
        )
    )
    coeff = bypass_pressure_coefficients(W, H, L, ct, cs, rho, nu)
    area, dh, _, _, _ = _paths(W, H, ct, cs)
    q = bypass_path_flows(dp, coeff.a, coeff.b)
    with np.errstate(invalid="ignore", divide="ignore"):
        re = np.where(area > 0.0, np.abs(q) * dh / (area * nu), 0.0)
    re = np.where(np.isnan(coeff.a), np.nan, re)
    valid = np.all(~np.isnan(coeff.a), axis=0)
    laminar = np.all(re <= RE_BYPASS_LAMINAR_MAX, axis=0)
    return BypassFlags(re, valid, valid & laminar)
