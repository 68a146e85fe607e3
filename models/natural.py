"""Fan-stopped scenario: natural convection from a vertical plate-fin array, plus radiation.

The sink hangs with its fins vertical: the channels between fins run along gravity and are
open at the bottom, the top and the fin tips. ``length_m`` below is the channel length along
gravity (for the fan-cooled sink that is normally the flow length).

Convection: Bar-Cohen & Rohsenow (1984) composite for symmetric isothermal parallel plates,
h referenced to the ambient (inlet) air temperature -- the air's temperature rise in the
channel is inside the correlation, so no effectiveness-NTU step follows it. Outer faces of
the two end fins: the isolated-plate limit of the same composite (Nu_L = 0.59 Ra_L^(1/4)).

Radiation: the channel between two fins is a grey, diffuse, isothermal cavity whose openings
(tip slot and the two channel ends) see black surroundings at ambient temperature; its
apparent emissivity is the two-surface-enclosure result. The outer fin faces and the fin tips
see the surroundings with view factor 1. The back of the base is taken as adiabatic (it sits
on the electronics). Fins radiate and convect through the same fin efficiency.

Known limits of the radiation model (measured in tests/test_natural.py against a discretised
radiosity solution of a long U-channel): the uniform-radiosity cavity formula is within 5 %
for emissivity >= 0.8 (anodised, painted) up to fin-height/gap = 20, but overestimates the
cavity emission of bare metal (emissivity 0.05-0.1) by up to about 35 % at fin-height/gap = 10.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from models.air import air_in_range, air_properties

FloatArray = NDArray[np.float64]

STEFAN_BOLTZMANN = 5.670374419e-8  # W/(m2 K4), CODATA 2018 (exact in the 2019 SI)
G0 = 9.80665  # m/s2, standard gravity
EL_AT_OPTIMUM = 2.714**4  # Elenbaas number at the Bar-Cohen & Rohsenow optimum spacing
RA_PLATE_MIN, RA_PLATE_MAX = 1.0e4, 1.0e9  # laminar isolated-plate range of Nu = 0.59 Ra^1/4


def _scalar(a: np.ndarray) -> np.ndarray:
    return a[()] if isinstance(a, np.ndarray) and a.ndim == 0 else a


def _f(x: ArrayLike) -> FloatArray:
    return np.asarray(x, dtype=float)


def _buoyancy_group(delta_T_K: ArrayLike, T_film_K: ArrayLike, p_Pa: ArrayLike):
    """P = rho^2 cp g beta |dT| / (mu k) in 1/m3 (beta = 1/T_film), and the air conductivity."""
    air = air_properties(T_film_K, p_Pa)
    rho, cp, mu, k = (
        _f(v) for v in (air.density, air.specific_heat, air.viscosity, air.conductivity)
    )
    P = rho * rho * cp * G0 * np.abs(_f(delta_T_K)) / (_f(T_film_K) * mu * k)
    return P, k


def elenbaas_rayleigh(
    spacing_m: ArrayLike,
    height_m: ArrayLike,
    delta_T_K: ArrayLike,
    T_film_K: ArrayLike,
    p_Pa: ArrayLike,
) -> FloatArray:
    """Channel Rayleigh (Elenbaas) number Ra* = Ra_s s / L of a vertical parallel-plate channel.

    Formula: El = rho^2 cp g beta |dT| s^4 / (mu k L) = Ra_s s / L, Ra_s = g beta |dT| s^3/(nu a),
    beta = 1 / T_film (ideal gas), air properties at T_film and p (models.air).

    Parameters: spacing_m -- gap s between plates, m; height_m -- plate length L along
    gravity, m; delta_T_K -- wall minus ambient (inlet) temperature, K (sign ignored);
    T_film_K -- film temperature (T_wall + T_ambient)/2, K; p_Pa -- pressure, Pa.
    Returns: El, - (>= 0).
    Validity: laminar (Ra_L = El (L/s)^4 below about 1e9); air properties 200-500 K. Outside:
    computed anyway (no clipping); s <= 0 or L <= 0 gives NaN.
    Source: Bar-Cohen & Rohsenow, J. Heat Transfer 106 (1984) 116; El as defined in Kraus,
    "Cooling Electronic Equipment", Mechanical Engineers' Handbook vol. 4 (Kutz, ed.), Eq. (35);
    Cengel & Ghajar, Heat and Mass Transfer, Eq. 9-31 (Ra_S S/L).

    Example: Cengel & Ghajar Example 9-3 (air at 55 C, 1 atm; dT = 50 K, L = 0.18 m,
    S = 7.45 mm): Ra_L = 1.845e7, so El = Ra_L (S/L)^4 = 54.1 (textbook properties);
    this module's air gives 52.8 (its Prandtl number is 2.4 % below the textbook table).

    >>> round(float(elenbaas_rayleigh(7.45e-3, 0.18, 50.0, 328.15, 101325.0)), 1)
    52.8
    """
    s = _f(spacing_m)
    L = _f(height_m)
    P, _ = _buoyancy_group(delta_T_K, T_film_K, p_Pa)
    El = P * s**4 / np.where(L > 0.0, L, np.nan)
    return _scalar(np.where(s > 0.0, El, np.nan))


def nusselt_vertical_channel_isothermal(elenbaas: ArrayLike) -> FloatArray:
    """Mean Nusselt number hs/k of a symmetric isothermal vertical channel (Bar-Cohen & Rohsenow).

    Formula: Nu_s = [576 / El^2 + 2.873 / El^0.5]^(-1/2), evaluated as
    El / sqrt(576 + 2.873 El^1.5) (same value, no division by zero at El = 0).
    h is referenced to T_wall - T_ambient (inlet) and averaged over both plate faces.

    Parameters: elenbaas -- channel Rayleigh number El = Ra_s s/L, -.
    Returns: Nu_s = h s / k, - (0 at El = 0; -> El/24 for small El; -> 0.59 El^(1/4) for
    large El).
    Validity: laminar flow, El >= 0 (the two limits are the exact fully developed and
    isolated-plate asymptotes). El < 0 gives NaN.
    Source: Bar-Cohen & Rohsenow (1984), composite for symmetric isothermal plates; as printed
    in Kraus (Mechanical Engineers' Handbook vol. 4, Table 1) and Cengel & Ghajar, Eq. 9-31.

    Example: at the optimum spacing El = 2.714^4 = 54.26 -> Nu = 1.307 (Cengel & Ghajar,
    Eq. 9-33 and Example 9-3: 1.307).

    >>> round(float(nusselt_vertical_channel_isothermal(2.714**4)), 3)
    1.307
    """
    El = _f(elenbaas)
    El = np.where(El >= 0.0, El, np.nan)
    return _scalar(El / np.sqrt(576.0 + 2.873 * El**1.5))


def nusselt_channel_fully_developed(elenbaas: ArrayLike) -> FloatArray:
    """Fully developed (small-spacing) limit of the isothermal-channel Nusselt number.

    Formula: Nu_s = El / 24.

    Parameters: elenbaas -- channel Rayleigh number El, -.
    Returns: Nu_s, - (>= 0).
    Validity: El much less than about 10 (long, narrow channels); above it over-predicts.
    El < 0 gives NaN.
    Source: Elenbaas (1942), Physica 9:1; fully developed limit for symmetric isothermal
    plates in Kraus (Mechanical Engineers' Handbook vol. 4, Table 1: Nu_0 = El/24).

    Example: El = 0.24 -> Nu = 0.01.

    >>> float(nusselt_channel_fully_developed(0.24))
    0.01
    """
    El = _f(elenbaas)
    return _scalar(np.where(El >= 0.0, El / 24.0, np.nan))


def nusselt_channel_isolated_plate(elenbaas: ArrayLike) -> FloatArray:
    """Isolated-plate (wide-spacing) limit of the isothermal-channel Nusselt number.

    Formula: Nu_s = 2.873^(-1/2) El^(1/4) = 0.590 El^(1/4) (equivalently Nu_L = 0.59 Ra_L^(1/4)).

    Parameters: elenbaas -- channel Rayleigh number El, -.
    Returns: Nu_s, - (>= 0).
    Validity: El much greater than about 1e3 (boundary layers do not merge), laminar
    (Ra_L < 1e9). El < 0 gives NaN.
    Source: large-El limit of the Bar-Cohen & Rohsenow (1984) composite; the laminar
    vertical-plate correlation Nu_L = 0.59 Ra_L^(1/4), 1e4 < Ra_L < 1e9 (McAdams; Cengel &
    Ghajar, Table 9-1 -- table number recalled from memory).

    Example: El = 1e4 -> 0.590 * 10 = 5.90.

    >>> round(float(nusselt_channel_isolated_plate(1e4)), 2)
    5.9
    """
    El = _f(elenbaas)
    return _scalar(np.where(El >= 0.0, El**0.25 / np.sqrt(2.873), np.nan))


def nusselt_vertical_channel_elenbaas(elenbaas: ArrayLike) -> FloatArray:
    """Elenbaas's own semi-empirical Nusselt number for a symmetric isothermal vertical channel.

    Formula: Nu_s = (El / 24) [1 - exp(-35 / El)]^(3/4).

    Parameters: elenbaas -- channel Rayleigh number El, -.
    Returns: Nu_s, - (0 at El = 0; -> El/24 small; -> 0.600 El^(1/4) large).
    Validity: laminar; fitted by Elenbaas to his measurements on square plates in air.
    El < 0 gives NaN. Offered as a cross-check of the composite, not used by the sink model.
    Source: Elenbaas, Physica 9 (1942) 1; as quoted in Incropera & DeWitt, Fundamentals of
    Heat and Mass Transfer, Sec. 9.7 (equation recalled from memory).

    Example: El = 54.26 -> (54.26/24) * (1 - exp(-0.645))^0.75 = 1.294, 1 % below the
    composite's 1.307.

    >>> round(float(nusselt_vertical_channel_elenbaas(2.714**4)), 3)
    1.294
    """
    El = _f(elenbaas)
    safe = np.where(El > 0.0, El, 1.0)
    nu = safe / 24.0 * (-np.expm1(-35.0 / safe)) ** 0.75
    return _scalar(np.where(El > 0.0, nu, np.where(El == 0.0, 0.0, np.nan)))


class OptimumSpacing(NamedTuple):
    """Bar-Cohen & Rohsenow optimum plate spacing and the heat transfer there."""

    spacing_m: FloatArray  # optimum gap, m
    nusselt: FloatArray  # Nu_s = h s / k at the optimum (1.307), -
    h_W_per_m2K: FloatArray  # mean h over the plate faces at the optimum, W/(m2 K)


def optimum_spacing_isothermal(
    height_m: ArrayLike, delta_T_K: ArrayLike, T_film_K: ArrayLike, p_Pa: ArrayLike
) -> OptimumSpacing:
    """Optimum gap of an array of isothermal vertical plates in natural convection.

    Formula: s_opt = 2.714 (L / P)^(1/4), P = cp rho^2 g beta dT / (mu k) (beta = 1/T_film),
    equivalently s_opt = 2.714 L / Ra_L^(1/4); there El = 2.714^4 = 54.26 and
    Nu = 1.307 (composite), h = Nu k / s_opt.

    Parameters: height_m -- plate length L along gravity, m; delta_T_K -- wall minus
    ambient temperature, K (> 0); T_film_K -- film temperature, K; p_Pa -- pressure, Pa.
    Returns: OptimumSpacing(spacing_m m, nusselt -, h_W_per_m2K W/(m2 K)).
    Validity: thin plates (t << s), isothermal, laminar (Ra_L < 1e9); maximises heat per
    unit base area for plates of zero thickness. dT <= 0 or L <= 0 gives NaN.
    Source: Bar-Cohen & Rohsenow (1984), optimum spacing for symmetric isothermal plates;
    Cengel & Ghajar, Heat and Mass Transfer, Eqs. 9-32 and 9-33.

    Example: Cengel & Ghajar Example 9-3 (L = 0.18 m, dT = 50 K, T_film = 55 C, 1 atm):
    textbook 7.45 mm and h = 4.863 W/m2K; this module's air gives 7.50 mm and 4.95 W/m2K
    (its k is 2.6 % above and its Pr 2.4 % below the textbook table).

    >>> opt = optimum_spacing_isothermal(0.18, 50.0, 328.15, 101325.0)
    >>> round(float(opt.spacing_m) * 1e3, 2), round(float(opt.h_W_per_m2K), 2)
    (7.5, 4.95)
    """
    L = _f(height_m)
    dT = _f(delta_T_K)
    P, k = _buoyancy_group(dT, T_film_K, p_Pa)
    P = np.where(dT > 0.0, P, np.nan)
    s = 2.714 * (np.where(L > 0.0, L, np.nan) / P) ** 0.25
    nu = np.full_like(s, float(nusselt_vertical_channel_isothermal(EL_AT_OPTIMUM)))
    nu = np.where(np.isfinite(s), nu, np.nan)
    return OptimumSpacing(_scalar(s), _scalar(nu), _scalar(nu * k / s))


def radiation_heat_transfer_coefficient(
    emissivity: ArrayLike, T_surface_K: ArrayLike, T_ambient_K: ArrayLike
) -> FloatArray:
    """Radiation heat transfer coefficient of a grey surface to large surroundings, W/(m2 K).

    Formula: h_rad = eps sigma (Ts^2 + Ta^2)(Ts + Ta), so that h_rad (Ts - Ta) =
    eps sigma (Ts^4 - Ta^4) exactly; sigma = 5.670374419e-8 W/(m2 K4).

    Parameters: emissivity -- total hemispherical emissivity, - (0-1); T_surface_K --
    surface temperature, K; T_ambient_K -- temperature of the surroundings, K.
    Returns: h_rad, W/(m2 K) (6.1 for a black surface at 300 K to black surroundings at 300 K).
    Validity: grey diffuse surface small compared with (or fully seen by) surroundings at
    T_ambient. Emissivity outside [0, 1] or a temperature <= 0 gives NaN.
    Source: Stefan-Boltzmann law, linearised (e.g. Incropera & DeWitt, Eq. 1.9).

    Example: eps = 0.85, Ts = 350 K, Ta = 300 K:
    0.85 * 5.670374e-8 * (350^2 + 300^2) * 650 = 6.657 W/(m2 K).

    >>> round(float(radiation_heat_transfer_coefficient(0.85, 350.0, 300.0)), 3)
    6.657
    """
    eps = _f(emissivity)
    Ts = _f(T_surface_K)
    Ta = _f(T_ambient_K)
    ok = (eps >= 0.0) & (eps <= 1.0) & (Ts > 0.0) & (Ta > 0.0)
    h = eps * STEFAN_BOLTZMANN * (Ts * Ts + Ta * Ta) * (Ts + Ta)
    return _scalar(np.where(ok, h, np.nan))


def cavity_apparent_emissivity(
    emissivity: ArrayLike, opening_area_m2: ArrayLike, wall_area_m2: ArrayLike
) -> FloatArray:
    """Apparent emissivity of the opening of an isothermal grey cavity (two-surface enclosure).

    Formula: eps_a = eps A_w / (eps A_w + (1 - eps) A_o); the cavity's net emission is
    eps_a sigma (Tw^4 - Ta^4) A_o. Derived from the two-surface enclosure
    q = sigma (Tw^4 - Ta^4) / [(1 - eps)/(eps A_w) + 1/A_o] with the opening black at Ta.

    Parameters: emissivity -- wall emissivity, - (0-1); opening_area_m2 -- area A_o of the
    opening(s), m2; wall_area_m2 -- area A_w of the cavity walls, m2 (>= A_o).
    Returns: eps_a, - (between eps, for a flat surface A_w = A_o, and 1).
    Validity: isothermal, diffuse, grey walls with uniform radiosity. For a long U-channel of
    depth/gap 10 it overestimates the exact (discretised) value by 4 % at eps = 0.8 and about
    30 % at eps = 0.05-0.1 (tests/test_natural.py). Emissivity outside [0, 1], areas <= 0 or
    A_w < A_o give NaN.
    Source: two-surface enclosure relation, e.g. Incropera & DeWitt, Sec. 13.3 (the
    radiation network of two grey surfaces; equation number not cited).

    Example: eps = 0.85, channel 5 mm wide, 30 mm deep, 100 mm long, tip slot and both ends
    open: A_o = 5*100 + 2*5*30 = 800 mm2, A_w = (2*30 + 5)*100 = 6500 mm2 ->
    0.85*6500 / (0.85*6500 + 0.15*800) = 0.979.

    >>> round(float(cavity_apparent_emissivity(0.85, 800e-6, 6500e-6)), 3)
    0.979
    """
    eps = _f(emissivity)
    Ao = _f(opening_area_m2)
    Aw = _f(wall_area_m2)
    ok = (eps >= 0.0) & (eps <= 1.0) & (Ao > 0.0) & (Aw >= Ao)
    num = eps * Aw
    den = num + (1.0 - eps) * Ao
    return _scalar(np.where(ok, num / np.where(den > 0.0, den, np.nan), np.nan))


def natural_convection_sink_h(
    spacing_m: ArrayLike,
    height_m: ArrayLike,
    delta_T_K: ArrayLike,
    T_ambient_K: ArrayLike,
    p_Pa: ArrayLike,
) -> FloatArray:
    """Mean convective h over the channel walls of a vertical plate-fin array, W/(m2 K).

    Formula: h = Nu_s k / s, Nu_s from :func:`nusselt_vertical_channel_isothermal` with
    El from :func:`elenbaas_rayleigh`; properties at T_film = T_ambient + dT/2.

    Parameters: spacing_m -- gap between fins s, m; height_m -- channel length along
    gravity L, m; delta_T_K -- fin (base) minus ambient temperature, K; T_ambient_K --
    ambient temperature, K; p_Pa -- ambient pressure, Pa.
    Returns: h, W/(m2 K), referenced to T_fin - T_ambient (typically 2-8 W/(m2 K) in air).
    Validity: isothermal fins, laminar (Ra_L < 1e9), film temperature 200-500 K. Outside:
    computed anyway (the caller flags); s <= 0 or L <= 0 gives NaN.
    Source: Bar-Cohen & Rohsenow (1984); Cengel & Ghajar, Eqs. 9-31 and 9-33.

    Example: Cengel & Ghajar Example 9-3 (S = 7.45 mm, L = 0.18 m, dT = 50 K, 30 C air):
    textbook h = 4.863 W/m2K; this module 4.92 W/m2K (textbook air k is 2.6 % lower).

    >>> round(float(natural_convection_sink_h(7.45e-3, 0.18, 50.0, 303.15, 101325.0)), 2)
    4.92
    """
    dT = _f(delta_T_K)
    s = _f(spacing_m)
    T_film = _f(T_ambient_K) + 0.5 * dT
    P, k = _buoyancy_group(dT, T_film, p_Pa)
    El = P * s**4 / np.where(_f(height_m) > 0.0, _f(height_m), np.nan)
    nu = nusselt_vertical_channel_isothermal(np.where(s > 0.0, El, np.nan))
    return _scalar(nu * k / np.where(s > 0.0, s, np.nan))


def natural_convection_plate_h(
    height_m: ArrayLike, delta_T_K: ArrayLike, T_ambient_K: ArrayLike, p_Pa: ArrayLike
) -> FloatArray:
    """Mean convective h of an isolated vertical isothermal plate face, W/(m2 K).

    Formula: h = 0.59 Ra_L^(1/4) k / L, Ra_L = g beta |dT| L^3 / (nu alpha), beta = 1/T_film,
    properties at T_film = T_ambient + dT/2.

    Parameters: height_m -- plate length along gravity L, m; delta_T_K -- plate minus
    ambient temperature, K; T_ambient_K -- ambient temperature, K; p_Pa -- pressure, Pa.
    Returns: h, W/(m2 K) (about 3-8 for electronics-size plates in air).
    Validity: laminar, 1e4 <= Ra_L <= 1e9; outside: computed anyway (the caller flags;
    Churchill & Chu's form is more accurate below 1e4). L <= 0 gives NaN.
    Source: Nu_L = 0.59 Ra_L^(1/4) (McAdams; Cengel & Ghajar Table 9-1, recalled from
    memory), which is also the isolated-plate limit of the Bar-Cohen & Rohsenow composite.

    Example: L = 0.18 m, dT = 50 K, 30 C air: Ra_L = 1.80e7, h = 0.59 * 65.1 * 0.02844 / 0.18
    = 6.07 W/(m2 K) (Cengel & Ghajar's Example 9-3 air would give Ra_L = 1.845e7).

    >>> round(float(natural_convection_plate_h(0.18, 50.0, 303.15, 101325.0)), 2)
    6.07
    """
    dT = _f(delta_T_K)
    L = _f(height_m)
    L = np.where(L > 0.0, L, np.nan)
    P, k = _buoyancy_group(dT, _f(T_ambient_K) + 0.5 * dT, p_Pa)
    return _scalar(0.59 * (P * L**3) ** 0.25 * k / L)


class NaturalSinkHeat(NamedTuple):
    """Heat a vertical plate-fin sink sheds by natural convection and radiation at a base rise."""

    heat_convection_W: FloatArray  # W
    heat_radiation_W: FloatArray  # W
    h_channel_W_per_m2K: FloatArray  # convective h on channel walls (Bar-Cohen & Rohsenow)
    h_outer_W_per_m2K: FloatArray  # convective h on the two outer fin faces (isolated plate)
    h_radiation_W_per_m2K: FloatArray  # black-body h_rad = sigma (Tb^2+Ta^2)(Tb+Ta)
    channel_emissivity: FloatArray  # apparent emissivity of one channel's openings, -
    fin_efficiency: FloatArray  # inner fins (both faces in channels), -
    fin_efficiency_outer: FloatArray  # the two end fins (one face outside), -
    elenbaas_number: FloatArray  # channel El, -
    rayleigh_length: FloatArray  # Ra_L on the channel length, -
    gap_m: FloatArray  # fin gap, m
    valid: NDArray[np.bool_]  # geometry and inputs physically possible
    in_range: NDArray[np.bool_]  # valid and inside the correlations' ranges


class FanStoppedResult(NamedTuple):
    """Base temperature rise with the fan stopped, and the terms of its energy balance."""

    base_rise_K: FloatArray  # base minus ambient temperature, K
    heat_convection_W: FloatArray  # W
    heat_radiation_W: FloatArray  # W
    h_channel_W_per_m2K: FloatArray
    h_outer_W_per_m2K: FloatArray
    h_radiation_W_per_m2K: FloatArray  # black-body, see NaturalSinkHeat
    channel_emissivity: FloatArray
    fin_efficiency: FloatArray
    fin_efficiency_outer: FloatArray
    elenbaas_number: FloatArray
    rayleigh_length: FloatArray
    gap_m: FloatArray
    residual: FloatArray  # |power - convected - radiated| / power after the last iteration
    valid: NDArray[np.bool_]
    in_range: NDArray[np.bool_]  # valid, converged (residual < 1e-6) and inside ranges


def _fin_efficiency(h: FloatArray, k: FloatArray, t: FloatArray, Lc: FloatArray) -> FloatArray:
    mL = np.sqrt(2.0 * h / (k * t)) * Lc
    safe = np.where(mL > 1e-9, mL, 1.0)
    return np.where(mL > 1e-9, np.tanh(safe) / safe, 1.0)


def _sink_terms(dT, N, t, H, s, L, k_s, Ta, p, eps, eps_cav_spread):
    """Conductances (W/K) of the sink at base rise dT, plus diagnostics (internal)."""
    Tb = Ta + dT
    T_film = Ta + 0.5 * dT
    P, k_air = _buoyancy_group(dT, T_film, p)
    El = P * s**4 / L
    Ra_L = P * L**3
    nu_ch = El / np.sqrt(576.0 + 2.873 * El**1.5)
    h_ch = nu_ch * k_air / s
    h_pl = 0.59 * Ra_L**0.25 * k_air / L
    h_bb = STEFAN_BOLTZMANN * (Tb * Tb + Ta * Ta) * (Tb + Ta)
    h_ri = eps_cav_spread * h_bb  # channel radiation spread over the channel walls
    h_ro = eps * h_bb  # outer fin faces and tips see the surroundings directly
    h_in = h_ch + h_ri
    h_out = h_pl + h_ro
    Lc = H + 0.5 * t  # corrected fin length (tip heat carried by the efficiency)
    eta_i = _fin_efficiency(h_in, k_s, t, Lc)
    eta_o = _fin_efficiency(0.5 * (h_in + h_out), k_s, t, Lc)
    # efficiency-weighted areas, m2
    a_channel = ((N - 2.0) * eta_i + eta_o) * 2.0 * H * L  # fin faces inside channels
    a_base = (N - 1.0) * s * L  # exposed base strips between fins (eta = 1)
    a_env = 2.0 * H * L * eta_o + ((N - 2.0) * eta_i + 2.0 * eta_o) * t * L  # outer faces, tips
    g_ch = (a_channel + a_base) * h_ch
    g_pl = a_env * h_pl
    g_rad = (a_channel + a_base) * h_ri + a_env * h_ro
    # local exponents d ln(g)/d ln(dT), used to damp the fixed-point step (Newton in ln dT);
    # r carries the film-temperature dependence of the properties (P ~ T^-4.5, k ~ T^0.8)
    r = 0.5 * dT / T_film
    n_el = 1.0 - 4.5 * r
    n_ch = n_el * (1.0 - 0.75 * 2.873 * El**1.5 / (576.0 + 2.873 * El**1.5)) + 0.8 * r
    n_pl = 0.25 * n_el + 0.8 * r
    n_rad = dT * (3.0 * Tb * Tb + 2.0 * Tb * Ta + Ta * Ta) / ((Tb * Tb + Ta * Ta) * (Tb + Ta))
    g = g_ch + g_pl + g_rad
    n_eff = (g_ch * n_ch + g_pl * n_pl + g_rad * n_rad) / np.where(g > 0.0, g, 1.0)
    return dict(
        g_conv=g_ch + g_pl,
        g_rad=g_rad,
        n_eff=n_eff,
        h_ch=h_ch,
        h_pl=h_pl,
        h_bb=h_bb,
        eta_i=eta_i,
        eta_o=eta_o,
        El=El,
        Ra_L=Ra_L,
        T_film=T_film,
    )


def _prepare(
    fin_count,
    fin_thickness_m,
    fin_height_m,
    base_width_m,
    length_m,
    conductivity_W_per_mK,
    T_ambient_K,
    p_Pa,
    emissivity,
    *extra,
):
    arrays = np.broadcast_arrays(
        *(
            _f(a)
            for a in (
                fin_count,
                fin_thickness_m,
                fin_height_m,
                base_width_m,
                length_m,
                conductivity_W_per_mK,
                T_ambient_K,
                p_Pa,
                emissivity,
                *extra,
            )
        )
    )
    N, t, H, W, L, k_s, Ta, p, eps = (np.array(a, dtype=float) for a in arrays[:9])
    N = np.rint(N)
    with np.errstate(invalid="ignore", divide="ignore"):
        s = (W - N * t) / (N - 1.0)
    valid = (
        (N >= 2.0)
        & (t > 0.0)
        & (H > 0.0)
        & (L > 0.0)
        & (s > 0.0)
        & (k_s > 0.0)
        & (Ta > 0.0)
        & (p > 0.0)
        & (eps >= 0.0)
        & (eps <= 1.0)
    )
    one = np.ones_like(N)
    # safe stand-ins where invalid, so the arithmetic stays finite; results are NaN-ed later
    N, t, H, L, k_s, Ta, p = (
        np.where(valid, a, d * one)
        for a, d in (
            (N, 2.0),
            (t, 1e-3),
            (H, 1e-2),
            (L, 1e-1),
            (k_s, 200.0),
            (Ta, 300.0),
            (p, 101325.0),
        )
    )
    s = np.where(valid, s, 1e-2)
    eps = np.where(valid, eps, 0.5)
    a_open = s * L + 2.0 * s * H  # tip slot and the two channel ends
    a_wall = (2.0 * H + s) * L  # two fin faces and the base strip
    eps_cav = np.asarray(cavity_apparent_emissivity(eps, a_open, a_wall), dtype=float)
    eps_cav_spread = eps_cav * a_open / a_wall
    extra_arrays = [np.array(a, dtype=float) for a in arrays[9:]]
    return (N, t, H, s, L, k_s, Ta, p, eps, eps_cav, eps_cav_spread, valid, extra_arrays)


def _in_range(valid, terms, p):
    return (
        valid
        & air_in_range(terms["T_film"], p)
        & (terms["Ra_L"] >= RA_PLATE_MIN)
        & (terms["Ra_L"] <= RA_PLATE_MAX)
    )


def natural_sink_heat(
    delta_T_K: ArrayLike,
    fin_count: ArrayLike,
    fin_thickness_m: ArrayLike,
    fin_height_m: ArrayLike,
    base_width_m: ArrayLike,
    length_m: ArrayLike,
    conductivity_W_per_mK: ArrayLike,
    T_ambient_K: ArrayLike,
    p_Pa: ArrayLike,
    emissivity: ArrayLike,
) -> NaturalSinkHeat:
    """Heat shed by a vertical plate-fin sink at a given base rise, by convection and radiation.

    Formula: Q = dT * sum_surfaces(eta * h * A), over: fin faces inside channels
    2 (N-1) H L and base strips (N-1) s L, with h_channel + h_rad,in; the envelope -- outside
    faces of the two end fins 2 H L and all fin tips N t L -- with h_outer + eps h_bb.
    Gap s = (W - N t)/(N - 1) (end fins flush with the base edges);
    h_channel = Nu_s k/s (Bar-Cohen & Rohsenow), h_outer = 0.59 Ra_L^(1/4) k/L;
    h_bb = sigma (Tb^2 + Ta^2)(Tb + Ta); h_rad,in = eps_a h_bb A_o / A_w, eps_a the
    apparent emissivity of a channel (openings A_o = sL + 2sH, walls A_w = (2H + s)L), so a
    channel radiates eps_a h_bb A_o dT; fin efficiency eta = tanh(m Lc)/(m Lc), Lc = H + t/2,
    m = sqrt(2 h/(k t)) with h the face h including radiation (end fins: mean of their two
    faces; base strips eta = 1). Properties at T_film = Ta + dT/2, beta = 1/T_film.

    Parameters: delta_T_K -- base minus ambient temperature, K; fin_count -- N (rounded),
    -; fin_thickness_m -- mean fin thickness t (tapered fins: mean of root and tip), m;
    fin_height_m -- fin height H from the base, m; base_width_m -- W across the fins, m;
    length_m -- channel length L along gravity, m; conductivity_W_per_mK -- fin material
    k, W/(m K); T_ambient_K -- ambient and surroundings temperature, K; p_Pa -- ambient
    pressure, Pa; emissivity -- surface emissivity, - (0-1).
    Returns: NaturalSinkHeat (heats W, coefficients W/(m2 K), efficiencies, El, Ra_L,
    gap m, flags). Heats grow monotonically with dT.
    Validity: fins vertical, channels open at both ends and at the tips; back of the base
    adiabatic; laminar (1e4 <= Ra_L <= 1e9); film temperature 200-500 K, 50-120 kPa. The
    correlations take the fins at base temperature (buoyancy from dT) and the fin efficiency
    then discounts the cooler fin -- common practice, accurate while eta stays above ~0.8.
    Outside the ranges: computed and ``in_range`` False. Impossible input (N < 2, gap <= 0,
    non-positive size, k, T or p, emissivity outside [0, 1]): NaN and ``valid`` False.
    Source: Bar-Cohen & Rohsenow (1984) composite (Cengel & Ghajar Eq. 9-31); 0.59 Ra^1/4
    isolated plate; Stefan-Boltzmann; two-surface enclosure; straight-fin efficiency with
    corrected length (Incropera & DeWitt, Sec. 3.6).

    Example: 12 fins 2 mm thick, 30 mm high, on a 100 mm wide base, 100 mm long, black
    anodised (0.85), 6063-T5, dT = 40 K, 25 C, 1 atm: gap 6.91 mm, h_channel 5.7 W/m2K,
    18.9 W convected; radiation by hand: 11 channels * 1.105e-3 m2 * 0.972 * 7.33 * 40
    = 3.5 W from the openings plus 0.0084 m2 * 0.85 * 7.33 * 40 = 2.1 W from outer faces
    and tips (both times a fin efficiency of 0.99) -> 5.5 W.

    >>> q = natural_sink_heat(40.0, 12, 2e-3, 30e-3, 0.1, 0.1, 209.0, 298.15, 101325.0, 0.85)
    >>> round(float(q.heat_convection_W), 1), round(float(q.heat_radiation_W), 1)
    (18.9, 5.5)
    """
    (N, t, H, s, L, k_s, Ta, p, eps, eps_cav, spread, valid, (dT,)) = _prepare(
        fin_count,
        fin_thickness_m,
        fin_height_m,
        base_width_m,
        length_m,
        conductivity_W_per_mK,
        T_ambient_K,
        p_Pa,
        emissivity,
        delta_T_K,
    )
    valid = valid & (dT >= 0.0)
    dT = np.where(valid, dT, 1.0)
    terms = _sink_terms(dT, N, t, H, s, L, k_s, Ta, p, eps, spread)
    return _pack(
        NaturalSinkHeat,
        valid,
        _in_range(valid, terms, p),
        dict(
            heat_convection_W=terms["g_conv"] * dT,
            heat_radiation_W=terms["g_rad"] * dT,
        ),
        terms,
        eps_cav,
        s,
    )


def _pack(cls, valid, in_range, head, terms, eps_cav, s, tail=None):
    fields = dict(head)
    fields.update(
        h_channel_W_per_m2K=terms["h_ch"],
        h_outer_W_per_m2K=terms["h_pl"],
        h_radiation_W_per_m2K=terms["h_bb"],
        channel_emissivity=eps_cav,
        fin_efficiency=terms["eta_i"],
        fin_efficiency_outer=terms["eta_o"],
        elenbaas_number=terms["El"],
        rayleigh_length=terms["Ra_L"],
        gap_m=s,
    )
    fields.update(tail or {})
    out = {}
    for name in cls._fields:
        if name in ("valid", "in_range"):
            continue
        out[name] = _scalar(np.where(valid, fields[name], np.nan))
    out["valid"] = _scalar(np.asarray(valid))
    out["in_range"] = _scalar(np.asarray(in_range))
    return cls(**out)


def fan_stopped_base_rise(
    power_W: ArrayLike,
    fin_count: ArrayLike,
    fin_thickness_m: ArrayLike,
    fin_height_m: ArrayLike,
    base_width_m: ArrayLike,
    length_m: ArrayLike,
    conductivity_W_per_mK: ArrayLike,
    T_ambient_K: ArrayLike,
    p_Pa: ArrayLike,
    emissivity: ArrayLike,
    iterations: int = 25,
) -> FanStoppedResult:
    """Base temperature rise of a vertical plate-fin sink with the fan stopped, K.

    Formula: solves power = Q_conv(dT) + Q_rad(dT) of :func:`natural_sink_heat` for dT by a
    fixed number of damped fixed-point steps in ln dT, all designs at once:
    x <- x + [ln(power) - ln(G(e^x)) - x] / (1 + n), G = Q/dT the total conductance and
    n = d ln G / d ln dT estimated from the correlations' local exponents (1 when the channel
    flow is fully developed, 1/4 for boundary layers) -- a Newton step for power laws.

    Parameters: power_W -- heat to shed, W (>= 0); the geometry, material, ambient and
    emissivity arguments as in :func:`natural_sink_heat` (same units); iterations -- number
    of steps (fixed, no early exit; 25 gave residuals below 1e-10 on 1e5 random designs
    whose rise stays below 1000 K).
    Returns: FanStoppedResult: base_rise_K (K), the balance terms at that rise, residual =
    |power - Q_conv - Q_rad| / power, and the valid / in_range flags (in_range also requires
    residual < 1e-6).
    Validity: as :func:`natural_sink_heat`; power 0 gives a rise of 0. Rises are confined to
    1e-6 K .. 2000 K: a design that would need more stops there with a large residual and
    in_range False (its film temperature is far outside the air fits anyway). Impossible input
    (negative power, N < 2, gap <= 0, ...) gives NaN with valid False -- never an exception.
    Source: energy balance on the sink; terms as :func:`natural_sink_heat` (Bar-Cohen &
    Rohsenow 1984; Stefan-Boltzmann; two-surface enclosure; straight-fin efficiency).

    Example: the sink of the :func:`natural_sink_heat` example shedding 24.36 W rises 40 K
    above a 25 C ambient (the inverse of that example).

    >>> r = fan_stopped_base_rise(24.36, 12, 2e-3, 30e-3, 0.1, 0.1, 209.0, 298.15, 101325.0, 0.85)
    >>> round(float(r.base_rise_K), 1)
    40.0
    """
    (N, t, H, s, L, k_s, Ta, p, eps, eps_cav, spread, valid, (Q,)) = _prepare(
        fin_count,
        fin_thickness_m,
        fin_height_m,
        base_width_m,
        length_m,
        conductivity_W_per_mK,
        T_ambient_K,
        p_Pa,
        emissivity,
        power_W,
    )
    valid = valid & (Q >= 0.0) & np.isfinite(Q)
    positive = valid & (Q > 0.0)
    Qs = np.where(positive, Q, 1.0)
    ln_Q = np.log(Qs)
    # first guess: 4 W/m2K convection + 5 eps W/m2K radiation over the wetted area
    area = (2.0 * N * H + N * t + (N - 1.0) * s) * L
    x = np.log(np.clip(Qs / ((4.0 + 5.0 * eps) * area), 1e-3, 1e3))
    x_lo, x_hi = np.log(1e-6), np.log(2.0e3)
    for _ in range(int(iterations)):
        terms = _sink_terms(np.exp(x), N, t, H, s, L, k_s, Ta, p, eps, spread)
        g = terms["g_conv"] + terms["g_rad"]
        x = np.clip(x + (ln_Q - np.log(g) - x) / (1.0 + terms["n_eff"]), x_lo, x_hi)
    dT = np.where(positive, np.exp(x), 0.0)
    terms = _sink_terms(dT, N, t, H, s, L, k_s, Ta, p, eps, spread)
    q_conv = terms["g_conv"] * dT
    q_rad = terms["g_rad"] * dT
    residual = np.where(positive, np.abs(Qs - q_conv - q_rad) / Qs, 0.0)
    in_range = _in_range(valid, terms, p) & (residual < 1e-6)
    return _pack(
        FanStoppedResult,
        valid,
        in_range,
        dict(
            base_rise_K=dT,
            heat_convection_W=q_conv,
            heat_radiation_W=q_rad,
        ),
        terms,
        eps_cav,
        s,
        tail=dict(residual=residual),
    )
