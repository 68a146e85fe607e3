"""Air flow in the channels of a ducted plate-fin heat sink: geometry, Nu and friction across
laminar, transitional and turbulent flow, and the channel pressure drop.

A channel is the rectangular passage between two neighbouring fins: gap b (between the fins),
height H (fin height, shroud on the tips), length L along the flow. Aspect ratio
alpha = min(b, H)/max(b, H), hydraulic diameter Dh = 4A/P = 2bH/(b + H). Friction factors are
FANNING factors throughout (f = f_Darcy / 4); the friction pressure drop is
dp = 4 f_app (L/Dh) rho V^2 / 2 with V the mean channel velocity.

Laminar-to-turbulent transition (Nu and friction): Gnielinski's linear interpolation in Re
between the laminar value at Re = 2300 and the turbulent value at Re = 1e4 (VDI Heat Atlas 2010,
chapter G1; Gnielinski 2013, Int. J. Heat Mass Transfer 63:134-140). Chosen over a
Churchill-Usagi power-mean blend because (1) it is the published recommendation of the author
of the turbulent correlation, (2) each correlation is evaluated only inside its own range
(laminar at Re <= 2300, Gnielinski at Re >= 1e4), (3) it has no fitted blending exponent,
whereas a power mean puts the transition where the two asymptotes cross (near Re = 1700 for
the friction of long parallel-plate channels, earlier than observed), (4) it is continuous and
cheap. For friction the same weights interpolate f Re^2 (the pressure drop at fixed geometry
and fluid), not f: interpolating f itself makes the pressure drop fall with velocity for short
channels, whose laminar apparent friction at Re = 2300 is large, and the fan operating-point
root find needs a pressure drop that rises with flow. Applying Gnielinski's interpolation to
f Re^2 is our choice (no published source).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.channel_friction import (
    _SHORT_DUCT_COEFF,
    fanning_fRe_fully_developed_rect,
    fanning_turbulent_smooth,
)
from models.channel_heat import (
    nusselt_combined_entry_mean,
    nusselt_fully_developed_rect,
    nusselt_turbulent_gnielinski,
)
from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient
from models.roots import _where  # exact branch-free np.where for float64

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int8]
BoolArray = NDArray[np.bool_]

RE_LAMINAR_MAX = 2300.0  # laminar correlations used up to here (Gnielinski 2013)
RE_TURBULENT_MIN = 1.0e4  # turbulent correlations used from here (Gnielinski 2013)
RE_TURBULENT_MAX = 5.0e6  # upper end of Petukhov's and Gnielinski's stated range
PR_TURBULENT_RANGE = (0.5, 2000.0)  # Gnielinski (1976) stated Prandtl range

LAMINAR, TRANSITION, TURBULENT, INVALID = 0, 1, 2, -1


class ChannelNusselt(NamedTuple):
    """Mean channel Nusselt number with its flow regime and range flag (see nusselt_channel)."""

    nusselt: FloatArray  # mean Nu_Dh, log-mean temperature difference, wall temperature uniform
    regime: IntArray  # 0 laminar, 1 transition (interpolated), 2 turbulent, -1 invalid input
    in_range: BoolArray  # False where an input lies outside a correlation's stated range

    @property
    def outside_range(self) -> BoolArray:
        """True where an input lies outside a correlation's stated range (= ~in_range)."""
        return ~self.in_range


class ChannelFriction(NamedTuple):
    """Apparent FANNING friction factor with its flow regime and range flag (fanning_channel)."""

    fanning: FloatArray  # mean apparent Fanning f over the length L (f_app)
    regime: IntArray
    in_range: BoolArray

    @property
    def outside_range(self) -> BoolArray:
        """True where an input lies outside a correlation's stated range (= ~in_range)."""
        return ~self.in_range


class ChannelPressureDrop(NamedTuple):
    """Static pressure drop of the channel row and its parts, Pa (pressure_drop_channel_parts)."""

    total: FloatArray  # entrance + friction + exit, Pa
    friction: FloatArray  # 4 f_app (L/Dh) rho V^2/2, Pa
    entrance: FloatArray  # Kc rho V^2/2, Pa
    exit: FloatArray  # Ke rho V^2/2, Pa
    reynolds: FloatArray  # Re_Dh
    fanning: FloatArray  # mean apparent Fanning f (inf at zero flow)
    regime: IntArray
    in_range: BoolArray

    @property
    def outside_range(self) -> BoolArray:
        """True where an input lies outside a correlation's stated range (= ~in_range)."""
        return ~self.in_range


def hydraulic_diameter_rect(b: ArrayLike, H: ArrayLike) -> FloatArray:
    """Return the hydraulic diameter of a rectangular channel, m.

    Formula: Dh = 4A/P = 4 b H / (2 (b + H)) = 2 b H / (b + H).

    Parameters
    ----------
    b : array_like
        Gap between the fins, m, > 0.
    H : array_like
        Channel height (fin height), m, > 0.

    Returns
    -------
    ndarray
        Dh, m, in [min(b, H), 2 min(b, H)): b for a square channel, -> 2b for b << H.

    Validity
    --------
    b > 0 and H > 0; otherwise NaN (impossible geometry; flagged by the callers).

    Source: definition (4 x flow area / wetted perimeter), common practice.

    Example
    -------
    >>> round(float(hydraulic_diameter_rect(0.004, 0.036)), 6)   # 2*4*36/40 mm
    0.0072
    """
    b = np.asarray(b, dtype=float)
    H = np.asarray(H, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        dh = 2.0 * b * H / (b + H)
    return np.where((b > 0.0) & (H > 0.0), dh, np.nan)


def aspect_ratio(b: ArrayLike, H: ArrayLike) -> FloatArray:
    """Return the channel aspect ratio alpha = min(b, H) / max(b, H), dimensionless.

    Parameters
    ----------
    b : array_like
        Gap between the fins, m, > 0.
    H : array_like
        Channel height, m, > 0.

    Returns
    -------
    ndarray
        alpha in (0, 1]; 1 for a square channel, -> 0 for parallel plates.

    Validity
    --------
    b > 0 and H > 0; otherwise NaN.

    Source: definition as used by Shah & London (1978) for rectangular ducts.

    Example
    -------
    >>> round(float(aspect_ratio(0.004, 0.036)), 4)   # 4/36
    0.1111
    """
    b = np.asarray(b, dtype=float)
    H = np.asarray(H, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        a = np.minimum(b, H) / np.maximum(b, H)
    return np.where((b > 0.0) & (H > 0.0), a, np.nan)


def reynolds_number(
    velocity: ArrayLike, length: ArrayLike, kinematic_viscosity: ArrayLike
) -> FloatArray:
    """Return the Reynolds number Re = V L / nu, dimensionless.

    Parameters
    ----------
    velocity : array_like
        Mean velocity, m/s, >= 0.
    length : array_like
        Characteristic length (here the hydraulic diameter), m, > 0.
    kinematic_viscosity : array_like
        nu, m^2/s, > 0 (air at 300 K: about 1.57e-5).

    Returns
    -------
    ndarray
        Re, dimensionless, >= 0.

    Validity
    --------
    velocity >= 0, length > 0, nu > 0; otherwise NaN.

    Source: definition, common practice.

    Example
    -------
    >>> round(float(reynolds_number(2.0, 0.0072, 1.6e-5)), 1)
    900.0
    """
    v = np.asarray(velocity, dtype=float)
    d = np.asarray(length, dtype=float)
    nu = np.asarray(kinematic_viscosity, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        re = v * d / nu
    return np.where((v >= 0.0) & (d > 0.0) & (nu > 0.0), re, np.nan)


def _transition_weight(re: FloatArray) -> FloatArray:
    """Gnielinski's interpolation weight gamma = (Re - 2300)/(1e4 - 2300), clipped to [0, 1]."""
    return np.clip((re - RE_LAMINAR_MAX) / (RE_TURBULENT_MIN - RE_LAMINAR_MAX), 0.0, 1.0)


def _regime(re: FloatArray, invalid: BoolArray) -> IntArray:
    reg = np.where(
        re <= RE_LAMINAR_MAX, LAMINAR, np.where(re >= RE_TURBULENT_MIN, TURBULENT, TRANSITION)
    )
    return np.where(invalid, INVALID, reg).astype(np.int8)


class FrictionTerms(NamedTuple):
    """Per-channel constants of the friction model, computed once per geometry."""

    fre_fd: FloatArray  # fully developed laminar f Re (FANNING)
    short_coeff_sq: FloatArray  # 3.44^2 / (L/Dh): laminar developing term per unit Re
    g_lo: FloatArray  # f Re^2 at the laminar anchor Re = 2300
    g_hi: FloatArray  # f Re^2 at the turbulent anchor Re = 1e4 (never below g_lo)


def friction_terms(alpha: ArrayLike, L_over_Dh: ArrayLike) -> FrictionTerms:
    """Return the Re-independent constants of ``fanning_channel`` for a set of channels.

    Formula: fRe_fd = ``fanning_fRe_fully_developed_rect(alpha)``; c = 3.44^2/(L/Dh);
    g_lo = 2300 sqrt(c 2300 + fRe_fd^2); g_hi = max(f_Petukhov(1e4) 1e4^2, g_lo).

    Parameters: alpha aspect ratio (-), L_over_Dh channel length over hydraulic diameter (-).

    Returns: :class:`FrictionTerms` (all dimensionless). Use with :func:`poiseuille_number`
    when the same channels are evaluated at many Reynolds numbers (the fan root find).

    Validity: as :func:`fanning_channel`.

    Source: the constants of :func:`fanning_channel` (Muzychka & Yovanovich 2004, 2009;
    Petukhov 1970; Gnielinski 2013) -- a refactoring, no new physics.

    Example: long parallel-plate channels: ``friction_terms(0.0, 1e6).fre_fd`` is 24.
    """
    fre_fd = fanning_fRe_fully_developed_rect(alpha)
    with np.errstate(divide="ignore", invalid="ignore"):
        c = _SHORT_DUCT_COEFF**2 / np.asarray(L_over_Dh, dtype=float)
        g_lo = RE_LAMINAR_MAX * np.sqrt(c * RE_LAMINAR_MAX + fre_fd * fre_fd)
    g_hi = np.maximum(fanning_turbulent_smooth(RE_TURBULENT_MIN) * RE_TURBULENT_MIN**2, g_lo)
    return FrictionTerms(fre_fd, c, g_lo, g_hi)


def poiseuille_number(re: FloatArray, terms: FrictionTerms) -> FloatArray:
    """Return f_app Re (FANNING) across all regimes from precomputed :func:`friction_terms`.

    Formula: as :func:`fanning_channel` (f Re = f_app * Re); finite at Re = 0 (the fully
    developed laminar value).

    Parameters: re Reynolds number on Dh (-, >= 0); terms from :func:`friction_terms`.

    Returns: f_app Re (-), >= fRe_fd.

    Validity: as :func:`fanning_channel`; no flags here (use fanning_channel for them).

    Source: Muzychka & Yovanovich (2004, 2009); Petukhov (1970); Gnielinski (2013).

    Example: ``poiseuille_number(np.array([1000.0]), friction_terms(0.0, 1e6))`` is [24.0].
    """
    # In place where possible: this runs on every pass of the fan operating-point search.
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # laminar: sqrt((3.44/sqrt(x+))^2 + fRe^2) with 1/x+ = Re / (L/Dh), safe at Re = 0
        po = np.sqrt(terms.short_coeff_sq * re + terms.fre_fd * terms.fre_fd)
        re_max = np.fmax.reduce(np.ravel(re), initial=0.0)  # NaN-blind maximum
        if re_max > RE_LAMINAR_MAX and po.ndim:  # the other regimes only where some element is
            gam = _transition_weight(re)
            po_tr = np.subtract(1.0, gam)
            po_tr *= terms.g_lo
            gam *= terms.g_hi
            po_tr += gam
            po_tr /= re  # ((1 - gam) g_lo + gam g_hi) / Re
            po = _where(re <= RE_LAMINAR_MAX, po, po_tr, out=po)
            if re_max >= RE_TURBULENT_MIN:
                po_tu = fanning_turbulent_smooth(re) * re
                po = _where(re >= RE_TURBULENT_MIN, po_tu, po, out=po_tu)
        elif re_max > RE_LAMINAR_MAX:  # 0-d: as above, without the in-place steps
            gam = _transition_weight(re)
            po_tr = ((1.0 - gam) * terms.g_lo + gam * terms.g_hi) / re
            po = np.where(re <= RE_LAMINAR_MAX, po, po_tr)
            if re_max >= RE_TURBULENT_MIN:
                po = np.where(re >= RE_TURBULENT_MIN, fanning_turbulent_smooth(re) * re, po)
    return po


def _poiseuille_channel(re: FloatArray, alpha: ArrayLike, l_over_dh: FloatArray) -> FloatArray:
    """f_app * Re (FANNING) across all regimes; finite at Re = 0 (fully developed laminar)."""
    return poiseuille_number(re, friction_terms(alpha, l_over_dh))


def fanning_channel(reynolds: ArrayLike, alpha: ArrayLike, L_over_Dh: ArrayLike) -> ChannelFriction:
    """Return the mean apparent FANNING friction factor of a channel in any flow regime.

    Formula::

        Re <= 2300:        f = fanning_apparent_laminar(x+ = (L/Dh)/Re, alpha) / Re
        Re >= 1e4:         f = fanning_turbulent_smooth(Re)      (Petukhov, fully developed)
        2300 < Re < 1e4:   f Re^2 = (1 - g) [f Re^2]_lam(2300) + g [f Re^2]_turb(1e4),
                           g = (Re - 2300) / (1e4 - 2300)

    (the turbulent anchor is raised to the laminar one if it were lower, so that f Re^2 never
    decreases). Laminar: Muzychka & Yovanovich developing-flow model, FANNING; turbulent
    entrance excess not included.

    Parameters
    ----------
    reynolds : array_like
        Re_Dh, dimensionless, > 0.
    alpha : array_like
        Aspect ratio min(b, H)/max(b, H), dimensionless, in [0, 1].
    L_over_Dh : array_like
        Channel length over hydraulic diameter, dimensionless, > 0.

    Returns
    -------
    ChannelFriction
        fanning (mean apparent Fanning f, dimensionless), regime (int8: 0 laminar,
        1 transition, 2 turbulent, -1 invalid input), in_range (bool; the property
        outside_range is its negation).

    Validity
    --------
    Flags (outside_range = True): Re <= 0 (f = inf at Re = 0, NaN below), Re > 5e6
    (extrapolated), invalid alpha or L_over_Dh (NaN). Continuous in Re; f Re^2 (the pressure
    drop at fixed geometry and fluid) strictly increases with Re.

    Source: laminar: Muzychka & Yovanovich (2004, 2009); turbulent: Petukhov (1970);
    transition: Gnielinski (2013), Int. J. Heat Mass Transfer 63:134-140 / VDI Heat Atlas
    (2010) G1, applied to f Re^2 (our choice, see module docstring).

    Example
    -------
    >>> r = fanning_channel(1000.0, 0.0, 1e6)   # long parallel-plate channel: 24/Re
    >>> round(float(r.fanning), 4), int(r.regime), bool(r.in_range)
    (0.024, 0, True)
    """
    re = np.asarray(reynolds, dtype=float)
    a = np.asarray(alpha, dtype=float)
    lr = np.asarray(L_over_Dh, dtype=float)
    bad_alpha = ~((a >= 0.0) & (a <= 1.0))
    invalid = ~(re >= 0.0) | ~np.isfinite(re) | bad_alpha | ~(lr > 0.0) | ~np.isfinite(lr)
    po = _poiseuille_channel(re, a, lr)
    with np.errstate(divide="ignore", invalid="ignore"):
        f = po / re
    f = np.where(invalid, np.nan, f)
    outside = invalid | (re <= 0.0) | (re > RE_TURBULENT_MAX)
    return ChannelFriction(f, _regime(re, invalid), np.asarray(~outside))


def nusselt_channel(
    reynolds: ArrayLike, prandtl: ArrayLike, alpha: ArrayLike, L_over_Dh: ArrayLike
) -> ChannelNusselt:
    """Return the mean Nu_Dh of a channel (uniform wall temperature) in any flow regime.

    Formula::

        Re <= 2300:        Nu = Muzychka-Yovanovich combined entry, mean, wall temperature T
                                (nusselt_combined_entry_mean with Shah & London fRe and Nu_T)
        Re >= 1e4:         Nu = nusselt_turbulent_gnielinski(Re, Pr, Dh/L)
        2300 < Re < 1e4:   Nu = (1 - g) Nu_lam(2300) + g Nu_turb(1e4),
                           g = (Re - 2300) / (1e4 - 2300)

    (Nu_turb(1e4) is raised to Nu_lam(2300) if it were lower, so that Nu never falls with Re).
    All four walls heated. h = Nu k / Dh refers to the LOG-MEAN wall-to-air temperature
    difference in the laminar model (use it with effectiveness-NTU); the turbulent mean Nu
    is referred to the same mean wall-to-bulk difference.

    Parameters
    ----------
    reynolds : array_like
        Re_Dh, dimensionless, > 0.
    prandtl : array_like
        Prandtl number, dimensionless, > 0.
    alpha : array_like
        Aspect ratio, dimensionless, in [0, 1].
    L_over_Dh : array_like
        Channel length over hydraulic diameter, dimensionless, > 0.

    Returns
    -------
    ChannelNusselt
        nusselt (dimensionless), regime (int8: 0 laminar, 1 transition, 2 turbulent, -1
        invalid input), in_range (bool; the property outside_range is its negation).

    Validity
    --------
    Flags (outside_range = True): Re <= 0, Pr <= 0, invalid alpha or L_over_Dh (all NaN);
    Re > 5e6; Pr outside [0.5, 2000] where the turbulent correlation is used (transition and
    turbulent regimes; extrapolated). Continuous and non-decreasing in Re.

    Source: laminar: Muzychka & Yovanovich (2004), J. Heat Transfer 126:54-61, with the
    fully developed limit of Shah & London (1978); turbulent: Gnielinski (1976) with Petukhov
    friction and entrance factor [1 + (Dh/L)^(2/3)]; transition: Gnielinski (2013), Int. J.
    Heat Mass Transfer 63:134-140 (VDI Heat Atlas 2010, G1).

    Example
    -------
    >>> r = nusselt_channel(1e4, 0.7, 0.5, 1e9)   # long duct at Re = 1e4: Gnielinski 29.8
    >>> round(float(r.nusselt), 1), int(r.regime)
    (29.8, 2)
    """
    re = np.asarray(reynolds, dtype=float)
    pr = np.asarray(prandtl, dtype=float)
    a = np.asarray(alpha, dtype=float)
    lr = np.asarray(L_over_Dh, dtype=float)
    invalid = (
        ~(re > 0.0) | ~(pr > 0.0) | ~((a >= 0.0) & (a <= 1.0)) | ~(lr > 0.0) | ~np.isfinite(re)
    )
    fre_fd = fanning_fRe_fully_developed_rect(a)
    nu_fd = nusselt_fully_developed_rect(a, "T")
    with np.errstate(divide="ignore", invalid="ignore"):
        dh_over_l = 1.0 / lr
        nu_lam = nusselt_combined_entry_mean(lr / (re * pr), pr, fre_fd, nu_fd)
        nu_lo = nusselt_combined_entry_mean(lr / (RE_LAMINAR_MAX * pr), pr, fre_fd, nu_fd)
        nu_turb = nusselt_turbulent_gnielinski(re, pr, dh_over_l)
        nu_hi = np.maximum(nusselt_turbulent_gnielinski(RE_TURBULENT_MIN, pr, dh_over_l), nu_lo)
        gam = _transition_weight(re)
        nu_tr = (1.0 - gam) * nu_lo + gam * nu_hi
    nu = np.where(re <= RE_LAMINAR_MAX, nu_lam, np.where(re >= RE_TURBULENT_MIN, nu_turb, nu_tr))
    nu = np.where(invalid, np.nan, nu)
    pr_out = (pr < PR_TURBULENT_RANGE[0]) | (pr > PR_TURBULENT_RANGE[1])
    outside = invalid | (re > RE_TURBULENT_MAX) | ((re > RE_LAMINAR_MAX) & pr_out)
    return ChannelNusselt(nu, _regime(re, invalid), np.asarray(~outside))


def pressure_drop_channel_parts(
    velocity_channel: ArrayLike,
    density: ArrayLike,
    kinematic_viscosity: ArrayLike,
    b: ArrayLike,
    H: ArrayLike,
    L: ArrayLike,
    sigma: ArrayLike,
) -> ChannelPressureDrop:
    """Return the static pressure drop over the channel row and its parts (entrance, friction,
    exit), Pa.

    Formula (constant density; FANNING f)::

        dp = (Kc + 4 f_app L/Dh + Ke) rho V^2 / 2
        Kc = 0.42 (1 - sigma^2),  Ke = (1 - sigma)^2        (models.minor_losses)
        f_app = fanning_channel(Re = V Dh / nu, alpha, L/Dh)

    V is the mean velocity in the channels; Kc and Ke multiply the same channel velocity head.
    The friction term is evaluated as 2 (f_app Re) L rho nu V / Dh^2, finite at V = 0.

    Parameters
    ----------
    velocity_channel : array_like
        Mean air velocity between the fins, m/s, >= 0.
    density : array_like
        Air density, kg/m^3, > 0.
    kinematic_viscosity : array_like
        Air kinematic viscosity, m^2/s, > 0.
    b : array_like
        Gap between fins, m, > 0.
    H : array_like
        Fin height (channel height), m, > 0.
    L : array_like
        Flow length, m, > 0.
    sigma : array_like
        Free-flow area ratio (channel flow area / duct frontal area), dimensionless, (0, 1].

    Returns
    -------
    ChannelPressureDrop
        total, friction, entrance, exit (Pa, >= 0), reynolds, fanning (apparent, FANNING),
        regime, in_range (property outside_range = ~in_range).

    Validity
    --------
    Ducted (shrouded) channels, no bypass, constant density. Impossible inputs (negative
    velocity, non-positive density, viscosity, b, H or L, sigma outside (0, 1]): all parts
    NaN and outside_range True. Zero velocity: all parts 0, outside_range True (no flow).
    Re > 5e6 flagged. The total is continuous and strictly increasing in velocity.

    Source: Kays & London (1984), Compact Heat Exchangers, eq. for core pressure drop with
    entrance and exit losses (incompressible form); friction and loss coefficients as cited in
    models.channel_friction, models.minor_losses and fanning_channel.

    Example
    -------
    V = 2 m/s, rho = 1.16 kg/m^3, nu = 1.6e-5 m^2/s, b = 4 mm, H = 36 mm, L = 100 mm,
    sigma = 0.8 (Re = 900, x+ = 0.0154):

    >>> p = pressure_drop_channel_parts(2.0, 1.16, 1.6e-5, 0.004, 0.036, 0.1, 0.8)
    >>> round(float(p.friction), 2), round(float(p.entrance), 3), round(float(p.exit), 3)
    (4.97, 0.351, 0.093)
    """
    v = np.asarray(velocity_channel, dtype=float)
    rho = np.asarray(density, dtype=float)
    nu = np.asarray(kinematic_viscosity, dtype=float)
    length = np.asarray(L, dtype=float)
    s = np.asarray(sigma, dtype=float)
    dh = hydraulic_diameter_rect(b, H)
    alpha = aspect_ratio(b, H)
    invalid = (
        ~(v >= 0.0)
        | ~np.isfinite(v)
        | ~(rho > 0.0)
        | ~(nu > 0.0)
        | ~(length > 0.0)
        | ~np.isfinite(dh)
        | ~((s > 0.0) & (s <= 1.0))
    )
    with np.errstate(divide="ignore", invalid="ignore"):
        re = v * dh / nu
        l_over_dh = length / dh
        po = _poiseuille_channel(re, alpha, l_over_dh)
        head = 0.5 * rho * v * v
        dp_f = 2.0 * po * length * rho * nu * v / (dh * dh)
        f_app = po / re
    dp_in = entrance_loss_coefficient(s) * head
    dp_out = exit_loss_coefficient(s) * head

    def _nan(x: FloatArray) -> FloatArray:
        return np.where(invalid, np.nan, x)

    dp_f, dp_in, dp_out = _nan(dp_f), _nan(dp_in), _nan(dp_out)
    outside = invalid | (v == 0.0) | (re > RE_TURBULENT_MAX)
    return ChannelPressureDrop(
        total=dp_f + dp_in + dp_out,
        friction=dp_f,
        entrance=dp_in,
        exit=dp_out,
        reynolds=_nan(re),
        fanning=_nan(f_app),
        regime=_regime(re, invalid),
        in_range=np.asarray(~outside),
    )


def pressure_drop_channel(
    velocity_channel: ArrayLike,
    density: ArrayLike,
    kinematic_viscosity: ArrayLike,
    b: ArrayLike,
    H: ArrayLike,
    L: ArrayLike,
    sigma: ArrayLike,
) -> FloatArray:
    """Return the total static pressure drop over the channel row, Pa.

    Formula: dp = (Kc + 4 f_app L/Dh + Ke) rho V^2 / 2 (FANNING f_app, channel velocity V);
    the total of ``pressure_drop_channel_parts`` (see there for parameters, validity, sources).

    Parameters
    ----------
    velocity_channel, density, kinematic_viscosity, b, H, L, sigma : array_like
        As in ``pressure_drop_channel_parts`` (m/s, kg/m^3, m^2/s, m, m, m, dimensionless).

    Returns
    -------
    ndarray
        Total static pressure drop, Pa, >= 0; NaN for impossible inputs (use the parts
        variant for the flags).

    Validity
    --------
    As ``pressure_drop_channel_parts``: continuous and strictly increasing in velocity, 0 at
    zero velocity.

    Source: Kays & London (1984), Compact Heat Exchangers (core pressure drop, incompressible).

    Example
    -------
    >>> round(float(pressure_drop_channel(2.0, 1.16, 1.6e-5, 0.004, 0.036, 0.1, 0.8)), 2)
    5.41
    """
    return pressure_drop_channel_parts(
        velocity_channel, density, kinematic_viscosity, b, H, L, sigma
    ).total
