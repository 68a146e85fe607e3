"""``evaluate``: a whole population of plate-fin heat sinks in one vectorized call.

The chain, for every design at once (no loop over designs):

1. geometry of the profile (``models.geometry``);
2. air properties at the inlet (``models.air``);
3. the air side (``models.air_side``): the operating point where the fan set's curve meets
   the system curve (sink pressure drop + extra impedance), or a fixed flow, or a fixed
   approach velocity; channel h (developing laminar / transition / turbulent), tapered-fin
   efficiency, and the sink as a heat exchanger with an isothermal base (effectiveness-NTU),
   so the air's temperature rise is counted once -- or, with the fan stopped, natural
   convection and radiation;
4. the base (``models.spreading``): 1-D conduction plus spreading from every source
   footprint with the sink side as a uniform effective h; the air's heating along the flow
   redistributed among the sources by their positions; then interface and junction-to-case
   resistances.

See docs/model.md for the equations and sources, and ``models.columns`` for the table.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd

from models.air import air_properties
from models.air_side import AirSide, forced_air_side, stopped_air_side
from models.columns import COLUMNS, PER_SOURCE
from models.contract import Conditions, Design, HeatSource
from models.fins import fin_one_dimensional_valid
from models.geometry import GEOMETRY_REASONS, plate_fin_geometry
from models.spreading import (
    check_sources_on_base,
    heat_source_arrays,
    one_dimensional_base_resistance,
    source_temperature_rise,
)

_REASONS = (
    *GEOMETRY_REASONS,
    "no operating point: the fan and system curves do not meet",
    "no flow solution: the bypass split or the fan-stopped balance did not converge",
    "a heat source does not lie on the base",
    "degenerate design: the model's numbers overflow (sizes far outside any extrusion)",
)
_NO_OPERATING_POINT, _NO_FLOW_SOLUTION, _SOURCE_OFF_BASE, _DEGENERATE = (
    len(GEOMETRY_REASONS) + i for i in range(4)
)


def upstream_heating_fractions(
    x: np.ndarray, c: np.ndarray, flow_length: float | np.ndarray
) -> np.ndarray:
    """Return F[i, j]: the share of source j's heat already in the air, averaged over source i.

    Formula: heat from source j enters the air uniformly over its footprint, from
    x_j - c_j/2 to x_j + c_j/2; the share that has entered by position s is
    clip((s - x_j + c_j/2)/c_j, 0, 1); F[i, j] is its mean over footprint i (exact
    piecewise-linear share averaged by the trapezoid rule on 64 points per footprint: exact for
    coinciding or separate footprints, within about 0.03 % otherwise). F[i, i] = 1/2 and
    F[i, j] + F[j, i] = 1.

    Parameters: x footprint centres from the inlet edge (m, NaN = centred), c footprint
    lengths along the flow (m), flow_length base length along the flow (m; ``evaluate`` passes
    the population's mean, which a study fixes through its envelope). Shapes (S,).

    Returns: (S, S) array in [0, 1].

    Validity: any footprints on the base. The air's heating is taken as local to the sources
    (heat spread in the base is not followed along the flow).

    Source: energy balance of the air stream, common practice, no source.

    Example: two 20 mm sources centred at 20 mm and 80 mm on a 100 mm base: F = [[0.5, 0],
    [1, 0.5]].
    """
    xc = np.where(np.isnan(x), 0.5 * np.asarray(flow_length), x)
    s = np.linspace(-0.5, 0.5, 64)
    pts = xc[:, None] + c[:, None] * s[None, :]  # (S, 64) points along footprint i
    start = xc - 0.5 * c
    share = np.clip((pts[:, None, :] - start[None, :, None]) / c[None, :, None], 0.0, 1.0)
    # trapezoid mean over the 64 points (exact for the linear parts to round-off)
    w = np.full(64, 1.0)
    w[[0, -1]] = 0.5
    return (share * w).sum(axis=-1) / w.sum()


def _sources(sources: Sequence[HeatSource]) -> dict[str, np.ndarray]:
    if not sources:
        raise ValueError("conditions.sources: empty; expected at least one heat source")
    arr = heat_source_arrays(sources)
    area = arr["c"] * arr["d"]
    arr["r_int"] = np.array([s.interface_resistance_K_m2_per_W for s in sources]) / area
    arr["r_jc"] = np.array([s.junction_to_case_K_per_W for s in sources], dtype=float)
    arr["t_max"] = np.array([s.max_junction_temperature_K for s in sources], dtype=float)
    return arr


def _sources_on_base(L: np.ndarray, W: np.ndarray, src: dict[str, np.ndarray]) -> np.ndarray:
    """Per design: every footprint on the base and no two overlapping (checked once per
    distinct base size -- a study's envelope fixes it -- then broadcast)."""
    if L.min() == L.max() and W.min() == W.max():  # the usual case: one envelope
        fits = check_sources_on_base(L[:1], W[:1], src["x"], src["y"], src["c"], src["d"]).all(
            axis=-1
        )
        return np.broadcast_to(fits, L.shape)
    pairs, inverse = np.unique(np.stack([L, W], axis=1), axis=0, return_inverse=True)
    fits = check_sources_on_base(
        pairs[:, 0], pairs[:, 1], src["x"], src["y"], src["c"], src["d"]
    ).all(axis=-1)
    return fits[inverse.ravel()]


def _across_sources(ufunc: np.ufunc, x: np.ndarray) -> np.ndarray:
    """``ufunc.reduce(x, axis=1)`` for an (n, S) array with few sources S, as S - 1 passes
    over whole columns (numpy reduces short rows one row at a time, ten times slower)."""
    out = x[:, 0].copy()
    for j in range(1, x.shape[1]):
        ufunc(out, x[:, j], out=out)
    return out


def evaluate(design: Design, conditions: Conditions) -> pd.DataFrame:
    """Return one row per design: flow, heat transfer, temperatures, mass, validity flags.

    Formula (per design, SI): the air side gives the isothermal-base sink resistance
    R_sink (base to inlet air) and the heat capacity rate C = m_dot c_p; with
    h_eff = 1/(R_sink L W) under the base, every source footprint's mean temperature is
    T_b,i = T_in + sum_j R_ij Q_j + (1/C) sum_j Q_j (F_ij - 1/2), R_ij from the spreading
    solution (1-D, film and spreading parts included), F_ij from
    :func:`upstream_heating_fractions` (the air's heating along the flow about its mean,
    which the isothermal-base R_sink already holds); then
    T_j,i = T_b,i + Q_i (R''_TIM,i / A_i + R_jc,i).

    Parameters: ``design`` -- a :class:`models.contract.Design` whose fields are arrays (or
    scalars that broadcast) of fin count, fin thickness at root and tip (m), fin height (m),
    base thickness (m), base width (m), flow length (m), material conductivity (W/mK) and
    density (kg/m^3), fan choice (index), root fillet and tip radius (m); ``conditions`` -- a
    :class:`models.contract.Conditions`: ambient temperature (K) and pressure (Pa), the air
    supply (fan curves, fixed flow, fixed approach velocity, or stopped), the heat sources,
    the extra system impedance (Pa s^2/m^6), the fin-tip condition ('shrouded': adiabatic tips
    against a duct wall; 'convective': open tips, corrected length), surface emissivity (used
    with the fan stopped).

    Returns: a DataFrame with the columns of ``models.columns.COLUMNS`` and, per heat source
    ``s``, those of ``models.columns.PER_SOURCE``; units SI and in the names. A design that
    cannot be built (gap <= 0, tip thicker than root, ...) or whose system curve never meets
    the fan curve comes back with ``valid = False`` and a ``reason``, its temperatures +inf
    and margins -inf (every constraint on them violated); no exception, no silent NaN.

    Validity: ducted flow with a uniform inlet, 1-D fins, air properties at the inlet
    temperature, an isothermal base for the sink resistance and a uniform effective h under
    the base for spreading (model assumptions, common practice, no source); each
    correlation's own range is flagged in ``in_range_flow`` / ``in_range_fin``.

    Source: the published methods of the called functions (docs/model.md).

    Example: see tests/test_evaluate.py (energy balance, trends, independent hand
    calculations, operating point vs scipy's brentq).
    """
    d = design.arrays()
    n = d["fin_count"].size
    tip_convects = conditions.fin_tip == "convective"
    g = plate_fin_geometry(
        d["fin_count"],
        d["fin_thickness_root_m"],
        d["fin_thickness_tip_m"],
        d["fin_height_m"],
        d["base_thickness_m"],
        d["base_width_m"],
        d["flow_length_m"],
        d["fin_root_fillet_m"],
        d["fin_tip_radius_m"],
        tip_area_counts=tip_convects,
    )
    L, W, tb = d["flow_length_m"], d["base_width_m"], d["base_thickness_m"]
    k_s = d["conductivity_W_per_mK"]
    T_in = float(conditions.ambient_temperature_K)
    p_in = float(conditions.ambient_pressure_Pa)
    air = air_properties(T_in, p_in)
    src = _sources(conditions.sources)
    powers = src["power"]
    q_total = float(powers.sum())

    fan_mode = conditions.supply.mode == "fan"
    if conditions.supply.mode == "stopped":
        a: AirSide = stopped_air_side(
            g, d, air, T_in, p_in, q_total, float(conditions.surface_emissivity)
        )
    else:
        a = forced_air_side(
            g,
            d,
            air,
            conditions.supply,
            conditions.system_impedance_Pa_s2_per_m6,
            tip_convects,
            float(conditions.clearance_top_m),
            float(conditions.clearance_side_m),
            T_in,
            p_in,
        )

    # --- base, sources, junctions ---------------------------------------------------------
    r_base = one_dimensional_base_resistance(tb, k_s, L, W)
    h_eff = 1.0 / (a.r_sink * L * W)
    rise = source_temperature_rise(  # (n, S): footprint mean rise above the inlet air, K
        L, W, tb, k_s, h_eff, src["x"], src["y"], src["c"], src["d"], powers
    )
    if len(powers) > 1:
        F = upstream_heating_fractions(src["x"], src["c"], float(np.mean(L)))
        rise = rise + np.outer(1.0 / a.heat_capacity_rate, (F - 0.5) @ powers)
    t_base_src = T_in + rise
    t_j = t_base_src + powers * (src["r_int"] + src["r_jc"])
    margin = src["t_max"] - t_j
    hottest = np.argmax(t_j, axis=1)
    t_j_max = _across_sources(np.maximum, t_j)  # = t_j[rows, hottest]
    rows = np.arange(n)
    # the hottest source's rise per watt less the 1-D and sink parts: exact for one source,
    # for several it also holds the heating by the others
    r_spread = rise[rows, hottest] / np.maximum(powers[hottest], 1e-300) - r_base - a.r_sink
    # mixed outlet: the fin-channel air mixes with the bypass air (which picks up no heat)
    with np.errstate(divide="ignore", invalid="ignore"):
        mixed = q_total * a.channel_flow / (a.heat_capacity_rate * a.flow)
    air_rise = np.where(a.flow > 0, mixed, q_total / a.heat_capacity_rate)

    duct_area = np.maximum(  # floored: impossible rows (H <= 0) stay finite, then flagged
        (W + 2.0 * conditions.clearance_side_m) * (d["fin_height_m"] + conditions.clearance_top_m),
        1e-12,
    )

    # --- flags ----------------------------------------------------------------------------
    on_base = _sources_on_base(L, W, src)
    finite = np.isfinite(a.dp_system) & _across_sources(np.logical_and, np.isfinite(t_j))
    valid = g.valid & a.found & on_base & finite
    code = np.where(
        g.reason_code != 0,
        g.reason_code,
        np.select(
            [~on_base, ~a.found, ~finite],
            [_SOURCE_OFF_BASE, _NO_OPERATING_POINT if fan_mode else _NO_FLOW_SOLUTION, _DEGENERATE],
            0,
        ),
    )
    bad_rows = np.flatnonzero(~valid)  # usually few: copy and overwrite beats np.where

    def masked(x: np.ndarray, fill: float) -> np.ndarray:
        if not bad_rows.size:
            return x
        out = np.array(np.broadcast_to(x, valid.shape), dtype=float)
        out[bad_rows] = fill
        return out

    def hot(x: np.ndarray) -> np.ndarray:
        return masked(x, np.inf)

    def ok(x: np.ndarray) -> np.ndarray:
        return masked(x, 0.0)

    table = {
        "fin_count": d["fin_count"],
        "fin_thickness_root_m": d["fin_thickness_root_m"],
        "fin_thickness_tip_m": d["fin_thickness_tip_m"],
        "fin_height_m": d["fin_height_m"],
        "base_thickness_m": tb,
        "base_width_m": W,
        "flow_length_m": L,
        "fan_index": d["fan_index"],
        "pitch_m": g.pitch_m,
        "gap_root_m": g.gap_root_m,
        "gap_tip_m": g.gap_tip_m,
        "gap_mean_m": g.gap_mean_m,
        "fin_height_to_gap_ratio": g.fin_height_to_gap_ratio,
        "hydraulic_diameter_m": g.hydraulic_diameter_m,
        "channel_aspect_ratio": g.channel_aspect_ratio,
        "free_flow_ratio": g.free_flow_ratio,
        "fin_area_m2": g.fin_area_m2,
        "total_area_m2": g.total_area_m2,
        "cross_section_area_m2": g.cross_section_area_m2,
        "overall_height_m": g.overall_height_m,
        "mass_kg": g.volume_m3 * d["density_kg_per_m3"],
        "flow_m3_per_s": ok(a.flow),
        "channel_flow_m3_per_s": ok(a.channel_flow),
        "bypass_fraction": ok(1.0 - a.channel_flow / np.where(a.flow > 0, a.flow, 1.0)),
        "approach_velocity_m_per_s": ok(a.flow / duct_area),
        "channel_velocity_m_per_s": ok(a.velocity),
        "reynolds_number": ok(a.reynolds),
        "pressure_drop_Pa": hot(a.dp_sink),
        "system_pressure_Pa": hot(a.dp_system),
        "fan_air_power_W": hot(a.flow * a.dp_system),
        "h_W_per_m2K": ok(a.h),
        "nusselt_number": ok(a.nusselt),
        "fin_efficiency": ok(a.eta_fin),
        "surface_efficiency": ok(a.eta_surface),
        "fin_biot_number": ok(a.biot),
        "ntu": ok(a.ntu),
        "sink_resistance_K_per_W": hot(a.r_sink),
        "base_resistance_K_per_W": hot(r_base),
        "spreading_resistance_K_per_W": hot(r_spread),
        "interface_resistance_K_per_W": src["r_int"][hottest],
        "total_resistance_K_per_W": hot((t_j_max - T_in) / q_total),
        "air_temperature_rise_K": hot(air_rise),
        "outlet_temperature_K": hot(T_in + air_rise),
        "base_temperature_K": hot(_across_sources(np.maximum, t_base_src)),
        "junction_temperature_K": hot(t_j_max),
        "junction_margin_K": -hot(-_across_sources(np.minimum, margin)),
        "operating_point_found": a.found,
        "in_fan_data": a.in_fan_data,
        "in_range_flow": a.in_range_flow,
        "in_range_fin": fin_one_dimensional_valid(a.biot),
        "geometry_valid": g.valid,
        "valid": valid,
        "reason": pd.Categorical.from_codes(code, categories=_REASONS),
    }
    for i, s in enumerate(conditions.sources):
        table[f"junction_temperature_{s.name}_K"] = hot(t_j[:, i])
        table[f"junction_margin_{s.name}_K"] = -hot(-margin[:, i])
        table[f"base_temperature_{s.name}_K"] = hot(t_base_src[:, i])
    return pd.DataFrame(table, copy=False)


def _column_list() -> str:
    lines = ["", "    Output columns (``models.columns``):", ""]
    lines += [f"    - ``{name}``: {text}" for name, text in COLUMNS.items()]
    lines += [f"    - ``{name}``: {text}" for name, text in PER_SOURCE.items()]
    return "\n".join(lines) + "\n"


evaluate.__doc__ = (evaluate.__doc__ or "") + _column_list()
