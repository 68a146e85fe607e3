"""The picked designs of the report: for each, a to-scale cross-section, fan and system curves
with the operating point, the fin temperature profile, and the key numbers.

Every key number is a value of the design's pareto.csv row, shown in engineering units; its
cell names the column (``data-col``) so that the numbers can be checked against the file.
"""

from __future__ import annotations

import numpy as np

from optim.report_charts import air_figure, fin_figure, to_div
from optim.report_curves import air_curves, fin_profile
from optim.report_data import RunData
from optim.report_format import (
    colour_map,
    constraint_text,
    esc,
    flow_cfm,
    is_absolute_temperature,
    limiting_text,
    pick_title,
    show,
    sig,
    with_unit,
)
from optim.report_run import take
from optim.report_sections import section
from optim.report_svg import cross_section_svg


def _num(row, column: str, label: str) -> tuple[str, str] | None:
    """(label, value cell) for a column of the row, or None if the row lacks it."""
    if column not in row.index:
        return None
    text, unit = show(column, row[column])
    return label, (f'<td class="num" data-col="{esc(column)}">{esc(text)} '
                   f'<span class="unit">{esc(unit)}</span></td>')


def _text(label: str, value: str) -> tuple[str, str]:
    return label, f"<td>{esc(value)}</td>"


def _table(title: str, rows: list) -> str:
    body = "".join(f'<tr><th scope="row">{esc(k)}</th>{v}</tr>' for k, v in
                   (r for r in rows if r is not None))
    return f'<table class="kv keynums"><caption>{esc(title)}</caption><tbody>{body}</tbody></table>'


def _margin_row(c, fraction: float) -> tuple[str, str, str]:
    """(limit, value in the worst scenario, margin) of one constraint, from pareto.csv's
    normalised margin (a fraction of |limit|, or of 1 in SI when the limit is 0)."""
    scale = abs(c.limit) if c.limit != 0 else 1.0
    margin = fraction * scale
    value = c.limit - margin if c.sense == "<=" else c.limit + margin
    if is_absolute_temperature(c.column) or c.column.endswith("_K"):
        m_text = f"{margin:+.1f} K"
    else:
        text, unit = show(c.column, margin)
        m_text = f"{'+' if margin >= 0 and not text.startswith('-') else ''}{text} {unit}"
    return constraint_text(c, source=False), with_unit(c.column, value), m_text.strip()


def _margin_table(rows: list[tuple[str, str, str]]) -> str:
    body = "".join(f'<tr><th scope="row">{esc(a)}</th><td class="num">{esc(b)}</td>'
                   f'<td class="num margin">{esc(m)}</td></tr>' for a, b, m in rows)
    return ('<table class="kv keynums margins"><caption>Limits: worst value over the scenarios '
            "and the margin left</caption><thead><tr><th>limit</th><th>worst value</th>"
            f"<th>margin</th></tr></thead><tbody>{body}</tbody></table>")


def key_number_tables(d: RunData, row) -> tuple[str, str]:
    """(profile and temperature tables, resistance / air / constraint tables) of a design."""
    st = d.study
    geo = [
        _num(row, "fin_count", "fin count"),
        _num(row, "fin_thickness_root_m", "fin thickness at the root"),
        _num(row, "fin_thickness_tip_m", "fin thickness at the tip"),
        _num(row, "fin_height_m", "fin height"),
        _num(row, "base_thickness_m", "base thickness"),
        _num(row, "base_width_m", "base width (across the flow)"),
        _num(row, "flow_length_m", "length along the flow"),
        _num(row, "pitch_m", "fin pitch"),
        _num(row, "gap_root_m", "gap at the root"),
        _num(row, "gap_tip_m", "gap at the tip"),
        _num(row, "fin_height_to_gap_ratio", "fin height / gap at the root"),
        _text("material", str(row.get("material", "–"))),
        _num(row, "mass_kg", "mass"),
        _num(row, "total_area_m2", "wetted surface area"),
    ]
    temps = [_num(row, "junction_temperature_K", "hottest junction")]
    for s in st.scenarios[0].conditions.sources:
        temps.append(_num(row, f"junction_temperature_{s.name}_K", f"junction of {s.name}"))
    temps += [
        _num(row, "junction_margin_K", "smallest margin to a junction limit"),
        _num(row, "base_temperature_K", "hottest base footprint"),
        _num(row, "outlet_temperature_K", "outlet air"),
        _num(row, "air_temperature_rise_K", "air temperature rise"),
    ]
    thermal = [
        _num(row, "total_resistance_K_per_W", "hottest junction to inlet air, per total W"),
        _num(row, "sink_resistance_K_per_W", "sink (isothermal base to inlet air)"),
        _num(row, "spreading_resistance_K_per_W", "spreading in the base"),
        _num(row, "base_resistance_K_per_W", "conduction through the base"),
        _num(row, "interface_resistance_K_per_W", "interface material"),
    ]
    air = []
    if "fan" in row.index:
        air.append(_text("fan set", str(row["fan"])))
    if "flow_m3_per_s" in row.index:
        q = float(row["flow_m3_per_s"])
        text, unit = show("flow_m3_per_s", q)
        air.append(("air flow", f'<td class="num" data-col="flow_m3_per_s">{esc(text)} '
                                f'<span class="unit">{esc(unit)}</span> = '
                                f'<span data-col="flow_CFM">{esc(flow_cfm(q))}</span> '
                                '<span class="unit">CFM</span></td>'))
    air += [
        _num(row, "system_pressure_Pa", "fan pressure (sink + system)"),
        _num(row, "pressure_drop_Pa", "pressure drop across the sink"),
        _num(row, "approach_velocity_m_per_s", "approach velocity"),
        _num(row, "channel_velocity_m_per_s", "velocity between the fins"),
        _num(row, "reynolds_number", "Reynolds number in a channel"),
        _num(row, "h_W_per_m2K", "heat transfer coefficient"),
        _num(row, "fin_efficiency", "fin efficiency"),
        _num(row, "fan_air_power_W", "air power delivered by the fan"),
    ]
    if float(row.get("bypass_fraction", 0.0) or 0.0) > 0:
        air.append(_num(row, "bypass_fraction", "share of the flow bypassing the fins"))
    cons = []
    for c in st.constraints:
        col = f"margin_{c.label}"
        if col in row.index:
            cons.append(_margin_row(c, float(row[col])))
    first = _table("Profile", geo) + _table("Temperatures, nominal scenario", temps)
    second = (_table("Thermal resistance", thermal) + _table("Air flow, nominal scenario", air)
              + _margin_table(cons))
    return first, second


def picks_section(d: RunData) -> str:
    if not d.picks:
        return section("picked", "Designs picked for discussion",
                       "<p>No design is on the front, so none is picked.</p>")
    colours = colour_map(d.pareto["limiting_constraint"].astype(str).value_counts().index)
    rows = [p.row for p in d.picks]
    designs = take(d.designs, [p.index for p in d.picks])
    curves = air_curves(d.study, designs, rows)
    cards = []
    intro = ('<p>The knee of the front (the best compromise when every objective is scaled to '
             "its range on the front) and the best design for each objective. Numbers are those "
             "of pareto.csv in the nominal scenario; the CAD export of a design by its ID "
             "carries the same numbers.</p>")
    for k, p in enumerate(d.picks):
        did = p.design_id
        lab = str(p.row.get("limiting_constraint", ""))
        colour = colours.get(lab, "#0072B2")
        svg = cross_section_svg(p.dims, did)
        tip = ("full round" if p.dims.tip_radius_m >= 0.5 * p.dims.fin_thickness_tip_m * (1 - 1e-9)
               else f"R {show('r_m', p.dims.tip_radius_m)[0]} mm")
        first, second = key_number_tables(d, p.row)
        air = _air_block(d, curves[k], did, colour)
        prof = fin_profile(d.study, p.design, p.row)
        fin = to_div(fin_figure(prof, colour), f"fin-{did}", 420, toolbar=False)
        eff = sig(float(p.row.get("fin_efficiency", np.nan)))
        h = sig(float(p.row.get("h_W_per_m2K", np.nan)))
        worst = p.row.get("worst_scenario", "")
        lead = (f"Limited by <b>{esc(limiting_text(lab, d.study.constraints))}</b>"
                + (f" in scenario {esc(worst)}" if len(d.study.scenarios) > 1 else "") + ".")
        cards.append(
            f'<article class="card pick" id="pick-{esc(did)}" data-design="{esc(did)}" '
            f'data-pick="{esc(p.label)}">'
            f'<h3><span class="chip" style="background:{colour}"></span>{esc(did)} — '
            f"{esc(pick_title(p.label))}</h3><p>{lead}</p>"
            f'<div class="card-grid"><figure class="xs">{svg}<figcaption>Cross-section to '
            "scale, as the DXF and STEP exports draw it; air flows into the page; dimensions in "
            f"mm; root fillets R {esc(show('r_m', p.dims.root_fillet_m)[0])}, fin tips "
            f"{esc(tip)}. A and B: the fin roots and tips, magnified.</figcaption></figure>"
            f'<div class="keys">{first}</div></div>'
            f'<div class="chart-grid"><figure>{air}</figure>'
            f"<figure>{fin}<figcaption>Temperature along one fin (h = {h} W/(m²·K), fin "
            f"efficiency {eff}): from the isothermal base of the sink model, "
            f"{prof.base_K - 273.15:.1f} °C, towards the {esc(prof.air_words)}, "
            f"{prof.air_K - 273.15:.1f} °C; {esc(prof.tip_words)}.</figcaption></figure></div>"
            f'<div class="keys-3">{second}</div></article>')
    return section("picked", "Designs picked for discussion", intro + "".join(cards))


def _air_block(d: RunData, curves, did: str, colour: str) -> str:
    if curves.mode == "stopped":
        return ("<p>The fan is stopped in the nominal scenario: the sink is cooled by natural "
                "convection and radiation, with no operating point.</p>")
    fig = to_div(air_figure(curves, did, colour), f"air-{did}", 520, toolbar=False)
    q = curves.op_flow
    if curves.mode == "fan":
        cap = (f"Fan and system curves, nominal scenario: the operating point is "
               f"{q * 3600:.1f} m³/h ({flow_cfm(q)} CFM) at {curves.op_pressure:.1f} Pa. "
               "The system curve is the sink's pressure drop plus the study's extra impedance.")
    else:
        cap = (f"System curve, nominal scenario: the flow is fixed at {q * 3600:.1f} m³/h "
               f"({flow_cfm(q)} CFM), needing {curves.op_pressure:.1f} Pa; no fan curve.")
    return f"{fig}<figcaption>{esc(cap)}</figcaption>"
