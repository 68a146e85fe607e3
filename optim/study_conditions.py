"""The conditions the sink works in: heat sources on the base, the air supply, the scenarios.

Each source is checked against the base (footprint fits, centre on the base, no overlap with
another source); each scenario gets its own :class:`models.contract.Conditions` (ambient,
pressure from altitude, power scale, fans at a speed by the fan laws, or the fan stopped).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from models.air import pressure_at_altitude
from models.contract import AirSupply, Conditions, FanCurve, HeatSource
from models.materials import EMISSIVITY
from optim.study_errors import ErrorContext, mm, mm2
from optim.study_schema import Air, StudyFile
from optim.study_types import Scenario
from optim.study_yaml import Loc
from optim.units import format_quantity, show

__all__ = ["emissivity", "fin_tips", "study_fans", "study_scenarios", "study_sources"]


def study_sources(sf: StudyFile, ctx: ErrorContext) -> list[HeatSource]:
    """The heat sources in SI, each checked to sit on the base without overlapping another."""
    W, L = sf.envelope.base_width, sf.envelope.flow_length
    out: list[HeatSource] = []
    for i, s in enumerate(sf.sources):
        name = s.name or f"source_{i + 1}"
        if any(o.name == name for o in out):
            raise ctx.fail(
                ("sources", i, "name"),
                f"{show(name)} names two sources; expected each source name once",
            )
        length, width = s.footprint
        if length > L + 1e-12 or width > W + 1e-12:
            raise ctx.fail(
                ("sources", i, "footprint"),
                f"{mm2(s.footprint)} is larger than the base "
                f"({mm(L)} along the flow x {mm(W)} across); expected a "
                "footprint that fits on the base",
            )
        x, y = s.position if s.position is not None else (L / 2.0, W / 2.0)
        if (
            x - length / 2 < -1e-12
            or x + length / 2 > L + 1e-12
            or y - width / 2 < -1e-12
            or y + width / 2 > W + 1e-12
        ):
            raise ctx.fail(
                ("sources", i, "position"),
                f"{mm2((x, y))} puts the {mm2(s.footprint)} footprint off "
                f"the {mm(L)} x {mm(W)} base; expected a centre from "
                f"{mm(length / 2)} to {mm(L - length / 2)} along the flow "
                f"and from {mm(width / 2)} to {mm(W - width / 2)} across",
            )
        r_value, r_kind = s.interface_resistance
        r_area = r_value if r_kind == "area_resistance" else r_value * length * width
        src = HeatSource(
            power_W=s.power,
            length_m=length,
            width_m=width,
            x_m=_r15(x),
            y_m=_r15(y),
            interface_resistance_K_m2_per_W=_r15(r_area),
            junction_to_case_K_per_W=s.junction_to_case,
            max_junction_temperature_K=s.max_junction,
            name=name,
        )
        for j, o in enumerate(out):
            ox = min(src.x_m + length / 2, o.x_m + o.length_m / 2) - max(
                src.x_m - length / 2, o.x_m - o.length_m / 2
            )
            oy = min(src.y_m + width / 2, o.y_m + o.width_m / 2) - max(
                src.y_m - width / 2, o.y_m - o.width_m / 2
            )
            if ox > 1e-9 and oy > 1e-9:
                raise ctx.fail(
                    ("sources", i, "position"),
                    f"{mm2((src.x_m, src.y_m))} makes {show(name)} overlap "
                    f"sources[{j}] ({show(o.name)}) by {mm(ox)} x {mm(oy)}; "
                    "expected footprints that do not overlap",
                )
        out.append(src)
    return out


def study_fans(sf: StudyFile) -> tuple[tuple[FanCurve, ...], tuple[str, ...]]:
    """The candidate fans (air.candidates, else every fan) and their names, in that order."""
    air = sf.air
    if air.fans is None:
        return (), ()
    wanted = air.candidates if air.candidates is not None else [f.name for f in air.fans]
    fans = []
    for f in air.fans:
        if f.name in wanted:
            fans.append(
                FanCurve(
                    flow_m3_per_s=tuple(q for q, _ in f.curve),
                    pressure_Pa=tuple(p for _, p in f.curve),
                    name=f.name,
                    count=f.count,
                    arrangement=f.arrangement,
                    rated_density_kg_per_m3=f.rated_density,
                    power_W=f.power,
                )
            )
    fans.sort(key=lambda c: wanted.index(c.name))
    return tuple(fans), tuple(c.name for c in fans)


def study_scenarios(
    sf: StudyFile, ctx: ErrorContext, sources: list[HeatSource], fans: tuple[FanCurve, ...]
) -> tuple[tuple[Scenario, ...], list[dict]]:
    """The scenarios (a single "nominal" one when none is given) and their resolved rows."""
    air = sf.air
    rows = sf.scenarios
    if rows is None:
        entries = [
            dict(
                name="nominal",
                ambient=None,
                altitude=None,
                pressure=None,
                power_scale=1.0,
                fan_speed=1.0,
                fan_stopped=False,
            )
        ]
    else:
        entries = [r.model_dump() for r in rows]
    out, resolved = [], []
    for i, e in enumerate(entries):
        loc: Loc = ("scenarios", i)
        if any(o.name == e["name"] for o in out):
            raise ctx.fail(
                loc + ("name",),
                f"{show(e['name'])} names two scenarios; expected each scenario name once",
            )
        if i == 0 and e["fan_stopped"]:
            raise ctx.fail(
                loc + ("fan_stopped",),
                "true in the first scenario; expected "
                "the nominal scenario first (the objectives are taken from it) "
                "and the fan-stopped check after it",
            )
        if e["fan_speed"] != 1.0 and air.fans is None:
            raise ctx.fail(
                loc + ("fan_speed",),
                f"{e['fan_speed']!r} without fans; expected fan_speed only when air.fans is given",
            )
        ambient = e["ambient"] if e["ambient"] is not None else air.ambient
        altitude, pressure = e["altitude"], e["pressure"]
        if altitude is None and pressure is None:
            altitude, pressure = air.altitude, air.pressure
            if altitude is None and pressure is None:
                altitude = 0.0
        if pressure is None:
            pressure_used = _r15(float(pressure_at_altitude(altitude)))
        else:
            pressure_used = pressure
        for j, s in enumerate(sources):
            if s.max_junction_temperature_K <= ambient:
                raise ctx.fail(
                    ("sources", j, "max_junction"),
                    f"{show(format_quantity(s.max_junction_temperature_K, 'temperature'))} is "
                    f"not above the ambient of scenario {show(e['name'])} "
                    f"({format_quantity(ambient, 'temperature')}); expected a limit above "
                    "every ambient",
                )
        scale, speed = e["power_scale"], e["fan_speed"]
        scaled = tuple(replace(s, power_W=_r15(s.power_W * scale)) for s in sources)
        if e["fan_stopped"]:
            supply = AirSupply(mode="stopped", fans=fans)
        elif air.fans is not None:
            supply = AirSupply(mode="fan", fans=tuple(_fan_law(f, speed) for f in fans))
        elif air.flow is not None:
            supply = AirSupply(mode="flow", flow_m3_per_s=air.flow)
        else:
            supply = AirSupply(mode="velocity", velocity_m_per_s=air.approach_velocity)
        conditions = Conditions(
            ambient_temperature_K=ambient,
            ambient_pressure_Pa=pressure_used,
            supply=supply,
            sources=scaled,
            system_impedance_Pa_s2_per_m6=air.system_impedance,
            fin_tip="convective" if fin_tips(air) == "open" else "shrouded",
            clearance_top_m=air.bypass_clearance.top,
            clearance_side_m=air.bypass_clearance.side,
            surface_emissivity=emissivity(sf),
            extras={"altitude_m": altitude, "power_scale": scale, "fan_speed": speed},
        )
        out.append(Scenario(name=e["name"], conditions=conditions))
        row: dict[str, Any] = {
            "name": e["name"],
            "ambient": format_quantity(ambient, "temperature"),
        }
        if altitude is not None:
            row["altitude"] = format_quantity(altitude, "length", "m")
        else:
            row["pressure"] = format_quantity(pressure, "pressure")
        row.update(power_scale=scale, fan_speed=speed, fan_stopped=e["fan_stopped"])
        resolved.append(row)
    return tuple(out), resolved


# ---------------------------------------------------------------- helpers


def _r15(x: float) -> float:
    return float(f"{x:.15g}")


def fin_tips(air: Air) -> str:
    """``"open"`` or ``"shrouded"``: air.fin_tips, else open when there is a top clearance."""
    if air.fin_tips is not None:
        return air.fin_tips
    return "open" if air.bypass_clearance.top > 0 else "shrouded"


def emissivity(sf: StudyFile) -> float:
    """surface.emissivity, else the typical value of surface.finish."""
    e = sf.surface.emissivity
    return EMISSIVITY[sf.surface.finish] if e is None else e


def _fan_law(fan: FanCurve, speed: float) -> FanCurve:
    """The fan at ``speed`` x its rated speed: flow ~ speed, pressure ~ speed^2, power ~ speed^3.

    Source: the fan affinity laws (e.g. ASHRAE Handbook -- HVAC Systems and Equipment, ch. Fans)
    -- common practice.
    """
    if speed == 1.0:
        return fan
    return replace(
        fan,
        flow_m3_per_s=tuple(_r15(q * speed) for q in fan.flow_m3_per_s),
        pressure_Pa=tuple(_r15(p * speed * speed) for p in fan.pressure_Pa),
        power_W=None if fan.power_W is None else _r15(fan.power_W * speed**3),
    )
