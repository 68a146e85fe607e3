"""Curves of the picked designs, from the model: fan and system curves, fin temperature profile.

- Fan curve: ``models.fan.fan_model`` of the design's fan set at the nominal inlet air density
  (fan laws), the curve the operating-point search used.
- System curve: the pressure the fan set must deliver (sink + extra system impedance) at each
  flow, from ``models.evaluate`` with the flow fixed -- the same function whose intersection
  with the fan curve is the operating point in pareto.csv.
- Fin temperature: ``models.fins.fin_temperature_profile`` with the design's h and fin sizes,
  between the isothermal base of the sink model, ``T_b = T_in + P R_sink``, and the air
  temperature that gives the model's heat flow, ``T_b - LMTD`` (the effectiveness-NTU sink
  transfers ``eta_o h A LMTD``); with the fan stopped h is referred to the ambient air.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from models.air import air_density
from models.contract import AirSupply, Conditions, Design
from models.evaluate import evaluate
from models.fan import fan_model, fan_pressure
from optim.report_format import fan_set_words
from optim.study_types import Study

SYSTEM_POINTS = 48  # flows on the system curve


@dataclass
class FanSet:
    label: str
    flow: np.ndarray  # m^3/s
    pressure: np.ndarray  # Pa
    data_flow: np.ndarray  # the curve's data points (set, at the study density)
    data_pressure: np.ndarray
    free_delivery: float


@dataclass
class AirCurves:
    mode: str  # 'fan' | 'flow' | 'velocity' | 'stopped'
    fan: FanSet | None
    system_flow: np.ndarray  # m^3/s
    system_pressure: np.ndarray  # Pa
    op_flow: float
    op_pressure: float
    density: float  # kg/m^3 at the inlet


def nominal(study: Study) -> Conditions:
    return study.scenarios[0].conditions


def inlet_density(cond: Conditions) -> float:
    return float(air_density(cond.ambient_temperature_K, cond.ambient_pressure_Pa))


def fan_set(cond: Conditions, fan_index: int, names: tuple[str, ...]) -> FanSet | None:
    """The fan set of a design at the inlet air density (None unless the supply is by fan)."""
    if cond.supply.mode != "fan" or not cond.supply.fans:
        return None
    curve = cond.supply.fans[int(fan_index)]
    rho = inlet_density(cond)
    model = fan_model(curve, rho)
    q = np.linspace(0.0, model.free_delivery_m3_per_s, 120)
    name = names[fan_index] if fan_index < len(names) else curve.name
    set_words = fan_set_words(curve)
    return FanSet(
        label=f"fan '{name}' ({set_words}) at {rho:.3f} kg/m³",
        flow=q, pressure=fan_pressure(model, q),
        data_flow=np.asarray(model.knots_m3_per_s),
        data_pressure=fan_pressure(model, np.asarray(model.knots_m3_per_s)),
        free_delivery=float(model.free_delivery_m3_per_s),
    )


def system_pressures(cond: Conditions, design: Design, flows: np.ndarray) -> np.ndarray:
    """(n designs, n flows): fan pressure needed at each fixed total flow, Pa."""
    out = []
    for q in flows:
        c = dataclasses.replace(cond, supply=AirSupply(mode="flow", flow_m3_per_s=float(q)))
        out.append(evaluate(design, c)["system_pressure_Pa"].to_numpy(dtype=float))
    return np.column_stack(out)


def air_curves(study: Study, designs: Design, rows) -> list[AirCurves]:
    """Fan set, system curve and operating point of each picked design (nominal scenario).

    ``designs`` holds the picked designs (one element each), ``rows`` their pareto.csv rows.
    """
    cond = nominal(study)
    mode = cond.supply.mode
    n = len(rows)
    if n == 0:
        return []
    fans = [fan_set(cond, int(r.get("fan_index", 0)), study.fan_names) for r in rows]
    q_op = np.array([float(r["flow_m3_per_s"]) for r in rows])
    top = [max(1.5 * q, f.free_delivery * 1.04 if f else 0.0) for q, f in zip(q_op, fans,
                                                                          strict=True)]
    q_max = max(top) if mode != "stopped" else 0.0
    if not (math.isfinite(q_max) and q_max > 0):
        flows = np.zeros(0)
        p_sys = np.zeros((n, 0))
    else:
        flows = np.linspace(q_max / SYSTEM_POINTS, q_max, SYSTEM_POINTS)
        p_sys = system_pressures(cond, designs, flows)
    rho = inlet_density(cond)
    return [
        AirCurves(mode=mode, fan=fans[i], system_flow=np.concatenate(([0.0], flows)),
                  system_pressure=np.concatenate(([0.0], p_sys[i])), op_flow=float(q_op[i]),
                  op_pressure=float(rows[i]["system_pressure_Pa"]), density=rho)
        for i in range(n)
    ]


@dataclass
class FinProfile:
    distance_mm: np.ndarray
    temperature_K: np.ndarray
    air_K: float  # air temperature the fin exchanges with
    base_K: float  # isothermal base of the sink model
    air_words: str
    tip_words: str


def fin_profile(study: Study, design: Design, row, points: int = 101) -> FinProfile:
    """Temperature along one fin of a design (nominal scenario), from the model's h."""
    from models.fins import fin_temperature_profile

    cond = nominal(study)
    a = design.arrays()
    t_root, t_tip = float(a["fin_thickness_root_m"][0]), float(a["fin_thickness_tip_m"][0])
    height = float(a["fin_height_m"][0])
    k = float(a["conductivity_W_per_mK"][0])
    h = float(row["h_W_per_m2K"])
    t_in = float(cond.ambient_temperature_K)
    power = float(sum(s.power_W for s in cond.sources))
    t_base = t_in + power * float(row["sink_resistance_K_per_W"])
    t_out = float(row["outlet_temperature_K"])
    if cond.supply.mode == "stopped":
        t_air, air_words = t_in, "ambient air (natural convection is referred to it)"
    else:
        d_in, d_out = t_base - t_in, t_base - t_out
        if d_out > 0 and abs(d_in - d_out) > 1e-9 * d_in:
            lmtd = (d_in - d_out) / math.log(d_in / d_out)
        else:
            lmtd = 0.5 * (d_in + d_out)
        t_air = t_base - lmtd
        air_words = "air, log-mean over the flow length"
    convective = cond.fin_tip == "convective"
    length = height + (0.5 * t_tip if convective else 0.0)  # corrected length for open tips
    x = np.linspace(0.0, height, points)
    theta = fin_temperature_profile(h, k, t_root, t_tip, length, x / length)
    tip_words = ("open tips (corrected length)" if convective
                 else "tips against the shroud (adiabatic)")
    return FinProfile(distance_mm=x * 1e3, temperature_K=t_air + (t_base - t_air) * theta,
                      air_K=t_air, base_K=t_base, air_words=air_words, tip_words=tip_words)
