"""The air side of a plate-fin sink: flow, pressure drop, h and sink resistance per design.

Two regimes: forced flow (fan curve, fixed flow or fixed approach velocity) through ducted
fin channels, and the fan-stopped case (natural convection and radiation). Each returns an
:class:`AirSide` of arrays, one element per design, that ``models.evaluate`` completes with
the base, the sources and the junctions.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import NamedTuple

import numpy as np

from models.air import AirProperties, air_in_range
from models.bypass import (
    bypass_flags,
    bypass_pressure_coefficients,
    split_fixed_total_flow,
    total_flow_with_bypass,
)
from models.channel import FrictionTerms, friction_terms, nusselt_channel, poiseuille_number
from models.contract import AirSupply, FanCurve
from models.fan import (
    FanTable,
    fan_model,
    fan_pressure_indexed,
    fan_table,
    inside_fan_data,
    operating_point,
)
from models.fins import fin_biot_number, fin_efficiency_tapered, overall_surface_efficiency
from models.geometry import PlateFinGeometry
from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient
from models.natural import fan_stopped_base_rise
from models.roots import bracketed_root


class AirSide(NamedTuple):
    """Air-side results per design (SI). ``r_sink`` is base (isothermal) to inlet air."""

    flow: np.ndarray  # m^3/s delivered (fins + bypass)
    channel_flow: np.ndarray  # m^3/s through the fin channels
    velocity: np.ndarray  # m/s in the channels
    reynolds: np.ndarray
    dp_sink: np.ndarray  # Pa
    dp_system: np.ndarray  # Pa, sink + extra impedance
    h: np.ndarray  # W/m^2K
    nusselt: np.ndarray
    eta_fin: np.ndarray
    eta_surface: np.ndarray
    ntu: np.ndarray
    biot: np.ndarray
    r_sink: np.ndarray  # K/W
    heat_capacity_rate: np.ndarray  # m_dot c_p, W/K (inf when the fan is stopped)
    found: np.ndarray  # operating point found (bool)
    in_fan_data: np.ndarray  # bool
    in_range_flow: np.ndarray  # bool


@dataclass(frozen=True)
class ChannelHydraulics:
    """What the fin channels' pressure drop needs, precomputed once per population."""

    flow_area: np.ndarray  # m^2, all channels together
    dh: np.ndarray  # m
    alpha: np.ndarray  # -
    l_over_dh: np.ndarray  # -
    terms: FrictionTerms  # Re-independent friction constants
    re_per_flow: np.ndarray  # Re / Q, s/m^3
    minor_per_flow2: np.ndarray  # (Kc + Ke) rho / (2 A^2), Pa s^2/m^6
    friction_per_flow: np.ndarray  # 2 rho nu (L/Dh) / (Dh A), Pa s/m^3 (times f Re)

    def pressure_drop(self, q: np.ndarray) -> np.ndarray:
        """Static pressure drop across the fins at volumetric flow ``q`` (m^3/s), Pa.

        dp = (Kc + Ke) rho V^2/2 + 4 f (L/Dh) rho V^2/2, written with f Re so that it is
        finite at Q = 0: the friction part is 2 rho nu (L/Dh) (f Re) V / Dh.
        """
        po = poiseuille_number(q * self.re_per_flow, self.terms)
        if po.ndim == 0:
            return q * (self.minor_per_flow2 * q + self.friction_per_flow * po)
        po *= self.friction_per_flow  # in place: called on every pass of the root find
        dp = self.minor_per_flow2 * q
        dp += po
        dp *= q
        return dp


def channel_hydraulics(
    g: PlateFinGeometry, L: np.ndarray, rho: float, nu: float
) -> ChannelHydraulics:
    """Return the precomputed channel constants for :meth:`ChannelHydraulics.pressure_drop`.

    Formula: sigma = free-flow ratio (clipped to [1e-6, 1]); Kc, Ke from
    ``models.minor_losses``; the friction constants of ``models.channel.friction_terms``.

    Parameters: g the population's geometry; L flow length (m); rho air density (kg/m^3);
    nu kinematic viscosity (m^2/s).

    Returns: :class:`ChannelHydraulics`.

    Validity: as the called correlations.

    Source: Kays & London (entrance/exit losses, via ``models.minor_losses``), Muzychka &
    Yovanovich and Petukhov (friction, via ``models.channel``).

    Example: see tests/test_evaluate.py (pressure drop of a long channel vs Poiseuille).
    """
    sigma = np.clip(g.free_flow_ratio, 1e-6, 1.0)
    area, dh = g.flow_area_m2, g.hydraulic_diameter_m
    l_over_dh = L / dh
    k_minor = entrance_loss_coefficient(sigma) + exit_loss_coefficient(sigma)
    return ChannelHydraulics(
        flow_area=area,
        dh=dh,
        alpha=g.channel_aspect_ratio,
        l_over_dh=l_over_dh,
        terms=friction_terms(g.channel_aspect_ratio, l_over_dh),
        re_per_flow=dh / (nu * area),
        minor_per_flow2=k_minor * 0.5 * rho / (area * area),
        friction_per_flow=2.0 * rho * nu * l_over_dh / (dh * area),
    )


@lru_cache(maxsize=64)
def _fan_table(fans: tuple[FanCurve, ...], rho: float) -> FanTable:
    """The candidate fans at this air density, built once per (fans, density)."""
    return fan_table([fan_model(c, rho) for c in fans])


def _fan_with_bypass(table, idx, ch, coeff, k_sys):
    """Operating point with a bypass: root on the channel flow Q_c (one root find).

    g(Q_c) = p_fan(Q) - dp_c(Q_c) - k Q^2 with Q = Q_c + Q_bypass(dp_c(Q_c)), falling in Q_c.
    """
    fan_idx = np.clip(idx, 0, len(table.models) - 1)  # a bad index gives NaN below
    hi = table.free_delivery_m3_per_s[fan_idx]

    def total(qc: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        dp = ch.pressure_drop(qc)
        return total_flow_with_bypass(qc, dp, coeff.a, coeff.b), dp

    def resid(qc: np.ndarray) -> np.ndarray:
        q, dp = total(qc)
        return fan_pressure_indexed(table, idx, q) - dp - k_sys * q * q

    res = bracketed_root(
        resid,
        np.zeros_like(hi),
        hi,
        1e-12 * hi,
        1e-9,
        60,
        f_lo=table.shutoff_pressure_Pa[fan_idx],
        method="anderson-bjorck",
    )
    qc = np.where(res.converged, res.root, 1e-9)
    q, _ = total(qc)
    return q, qc, res.converged


def forced_air_side(
    g: PlateFinGeometry,
    d: dict[str, np.ndarray],
    air: AirProperties,
    supply: AirSupply,
    system_impedance: float,
    tip_convects: bool,
    clearance_top: float = 0.0,
    clearance_side: float = 0.0,
    T_air: float = 293.15,
    p_air: float = 101325.0,
) -> AirSide:
    """Return the forced-convection air side of every design (see :class:`AirSide`).

    Formula: operating point p_fan(Q) = dp_sink(Q) + k Q^2 (fan mode), or Q fixed, or
    Q = V_approach W H; Re = V D_h/nu; Nu from ``nusselt_channel`` (referred to the log-mean
    temperature difference); eta_f tapered-fin efficiency (corrected length H + t_tip/2 when
    tips convect); eta_o = 1 - (A_f/A)(1 - eta_f); NTU = eta_o h A/(m_dot c_p);
    R_sink = 1/(m_dot c_p (1 - exp(-NTU))) -- the isothermal-base heat exchanger, which counts
    the air's temperature rise once.

    With a clearance around the fins (unducted sink in a larger duct), the flow splits between
    the fin channels and the clearance at equal pressure drop (``models.bypass``, after
    Simons & Schmidt); the fan delivers the total, the fins see the channel share, and the
    operating point is one root find on the channel flow.

    Parameters: g geometry; d the design arrays (``Design.arrays()``); air inlet air
    properties; supply the air supply; system_impedance k (Pa s^2/m^6); tip_convects whether
    fin tips see the air (no shroud); clearance_top, clearance_side bypass gaps (m); T_air,
    p_air the inlet state (K, Pa) for the air-property range flag.

    Returns: :class:`AirSide` (SI arrays).

    Validity: as the called correlations; designs without an operating point are flagged
    (found False) and computed at a token flow so that every number stays finite.

    Source: effectiveness-NTU of a heat exchanger with one fluid at uniform temperature
    (Kays & London, Compact Heat Exchangers, 3rd ed. 1984, ch. 2); the other sources are
    those of the called functions.

    Example: see tests/test_evaluate.py.
    """
    n = g.pitch_m.size
    rho, cp = float(air.density), float(air.specific_heat)
    ch = channel_hydraulics(g, d["flow_length_m"], rho, float(air.kinematic_viscosity))
    k_sys = float(system_impedance)
    found = np.ones(n, dtype=bool)
    in_fan = np.ones(n, dtype=bool)
    bypass = clearance_top > 0.0 or clearance_side > 0.0
    clearance = (
        d["base_width_m"],
        d["fin_height_m"],
        d["flow_length_m"],
        clearance_top,
        clearance_side,
        rho,
        float(air.kinematic_viscosity),
    )
    if bypass:
        coeff = bypass_pressure_coefficients(*clearance)
    if supply.mode == "fan":
        if not supply.fans:
            raise ValueError("supply.fans: empty; expected at least one fan curve in fan mode")
        try:
            table = _fan_table(tuple(supply.fans), rho)
        except TypeError:  # curve points given as lists (unhashable): build without the cache
            table = fan_table([fan_model(c, rho) for c in supply.fans])
        if bypass:
            q, qc, found = _fan_with_bypass(table, d["fan_index"], ch, coeff, k_sys)
        else:
            op = operating_point(
                table,
                d["fan_index"],
                lambda q: ch.pressure_drop(q) + k_sys * q * q,
                system_dp_at_zero=0.0,
            )
            found = op.found
            q = qc = np.where(found, op.flow_m3_per_s, 1e-9)
        found = found & g.valid
        in_fan = inside_fan_data(table, d["fan_index"], q) & found
    elif supply.mode in ("flow", "velocity"):
        if supply.mode == "flow":
            q = np.full(n, float(supply.flow_m3_per_s))
        else:  # approach velocity over the whole duct section ahead of the sink
            duct = (d["base_width_m"] + 2 * clearance_side) * (d["fin_height_m"] + clearance_top)
            q = float(supply.velocity_m_per_s) * duct
        if bypass:
            split = split_fixed_total_flow(q, ch.pressure_drop, coeff.a, coeff.b)
            found = split.converged
            qc = np.where(found, split.channel_flow, 1e-9)
        else:
            qc = q
    else:
        raise ValueError(f"supply.mode: {supply.mode!r}; expected 'fan', 'flow' or 'velocity'")
    dp_sink = ch.pressure_drop(qc)
    v = qc / ch.flow_area
    re = v * ch.dh / float(air.kinematic_viscosity)
    m_cp = rho * qc * cp

    nu_res = nusselt_channel(re, float(air.prandtl), ch.alpha, ch.l_over_dh)
    air_ok = bool(air_in_range(T_air, p_air))
    bypass_ok = True
    if bypass:
        bypass_ok = bypass_flags(dp_sink, *clearance).in_range
    h = nu_res.nusselt * float(air.conductivity) / ch.dh
    k_s = d["conductivity_W_per_mK"]
    t_r, t_t, H = d["fin_thickness_root_m"], d["fin_thickness_tip_m"], d["fin_height_m"]
    H_eff = H + 0.5 * t_t if tip_convects else H  # corrected length for a convecting tip
    eta_f = fin_efficiency_tapered(h, k_s, t_r, t_t, H_eff)
    eta_o = overall_surface_efficiency(eta_f, g.fin_area_m2, g.total_area_m2)
    ntu = eta_o * h * g.total_area_m2 / m_cp
    r_sink = 1.0 / (m_cp * -np.expm1(-ntu))
    return AirSide(
        flow=q,
        channel_flow=qc,
        velocity=v,
        reynolds=re,
        dp_sink=dp_sink,
        dp_system=dp_sink + k_sys * q * q,
        h=h,
        nusselt=nu_res.nusselt,
        eta_fin=eta_f,
        eta_surface=eta_o,
        ntu=ntu,
        biot=fin_biot_number(h, k_s, t_r),
        r_sink=r_sink,
        heat_capacity_rate=m_cp,
        found=found,
        in_fan_data=in_fan,
        in_range_flow=nu_res.in_range & found & bypass_ok & air_ok,
    )


def stopped_air_side(
    g: PlateFinGeometry,
    d: dict[str, np.ndarray],
    air: AirProperties,
    T_ambient: float,
    p_ambient: float,
    power_total: float,
    emissivity: float,
) -> AirSide:
    """Return the air side with the fan stopped: natural convection and radiation.

    Formula: the base rise dT that sheds ``power_total`` by natural convection between the
    vertical fins (Bar-Cohen & Rohsenow composite channel correlation, outer faces as isolated
    plates) plus radiation (``models.natural.fan_stopped_base_rise``); R_sink = dT / Q.

    Orientation: fins vertical, channels open at the top and bottom, the flow length along
    gravity (the way a fan-cooled sink stands in most racks and cabinets).

    Parameters: g geometry; d design arrays; air inlet air properties (unused but for h
    reporting); T_ambient (K), p_ambient (Pa); power_total (W); emissivity of the surface (-).

    Returns: :class:`AirSide` with zero flow and pressure drop; h the channel's natural
    convection coefficient; in_range_flow from the correlation's range and convergence.

    Validity: as ``models.natural.fan_stopped_base_rise``. Tapered fins are passed as their
    mean thickness.

    Source: Bar-Cohen & Rohsenow (1984), J. Heat Transfer 106:116-123; Elenbaas (1942);
    radiation by the Stefan-Boltzmann law (via ``models.natural``).

    Example: see tests/test_evaluate.py (fan-stopped energy balance).
    """
    n = g.pitch_m.size
    k_s = d["conductivity_W_per_mK"]
    t_mean = 0.5 * (d["fin_thickness_root_m"] + d["fin_thickness_tip_m"])
    res = fan_stopped_base_rise(
        power_total,
        d["fin_count"],
        t_mean,
        d["fin_height_m"],
        d["base_width_m"],
        d["flow_length_m"],
        k_s,
        T_ambient,
        p_ambient,
        emissivity,
    )
    zero = np.zeros(n)
    ok = res.valid & g.valid
    r_sink = np.where(ok, res.base_rise_K / power_total, np.inf)
    return AirSide(
        flow=zero,
        channel_flow=zero,
        velocity=zero,
        reynolds=zero,
        dp_sink=zero,
        dp_system=zero,
        h=res.h_channel_W_per_m2K,
        nusselt=res.h_channel_W_per_m2K * g.hydraulic_diameter_m / float(air.conductivity),
        eta_fin=res.fin_efficiency,
        eta_surface=overall_surface_efficiency(res.fin_efficiency, g.fin_area_m2, g.total_area_m2),
        ntu=zero,
        biot=fin_biot_number(res.h_channel_W_per_m2K, k_s, d["fin_thickness_root_m"]),
        r_sink=r_sink,
        heat_capacity_rate=np.full(n, np.inf),
        found=ok,
        in_fan_data=np.ones(n, dtype=bool),
        in_range_flow=res.in_range & ok & bool(air_in_range(T_ambient, p_ambient)),
    )
