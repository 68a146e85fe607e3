"""HTML of the report's sections other than the figures and the picked designs: the study
summary, the cautions, the candidate table, the validity warnings and the references."""

from __future__ import annotations

import datetime as _dt

import numpy as np
import pandas as pd

from optim.report_data import RunData
from optim.report_format import (
    colour_map,
    constraint_text,
    esc,
    flow_cfm,
    limiting_text,
    pick_title,
    short_words,
    show,
    sig,
    with_unit,
    words,
)
from optim.report_text import ACCURACY, CAUTIONS, REFERENCES, REFERENCES_NOTE


def section(key: str, title: str, body: str) -> str:
    return (f'<section id="{key}" class="report-section" data-section="{key}">'
            f"<h2>{esc(title)}</h2>{body}</section>")


def kv_table(rows: list[tuple[str, str]], cls: str = "kv") -> str:
    """A two-column table of (label, already-escaped HTML value)."""
    body = "".join(f"<tr><th scope=\"row\">{esc(k)}</th><td>{v}</td></tr>" for k, v in rows)
    return f'<table class="{cls}"><tbody>{body}</tbody></table>'


def grid_table(head: list[str], rows: list[list[str]], numeric: set[int] | None = None,
               cls: str = "grid") -> str:
    numeric = numeric or set()
    th = "".join(f'<th scope="col"{" class=num" if i in numeric else ""}>{h}</th>'
                 for i, h in enumerate(head))
    body = "".join("<tr>" + "".join(f'<td{" class=num" if i in numeric else ""}>{c}</td>'
                                    for i, c in enumerate(r)) + "</tr>" for r in rows)
    return f'<table class="{cls}"><thead><tr>{th}</tr></thead><tbody>{body}</tbody></table>'


# ----------------------------------------------------------------------------- summary
def _variable_range(v) -> str:
    if v.kind == "choice":
        return ", ".join(esc(c) for c in v.choices)
    lo, unit = show(v.name, v.lower)
    hi, _ = show(v.name, v.upper)
    return f"{lo} – {hi} {unit}".strip()


def _fixed_value(name: str, value) -> str:
    if isinstance(value, str):
        return esc(value)
    return esc(with_unit(name, value))


def _budget(b) -> str:
    parts = [f"method {esc(b.method)}", f"population {b.population}"]
    if b.generations:
        parts.append(f"at most {b.generations} generations")
    if b.max_evaluations:
        parts.append(f"at most {b.max_evaluations} designs")
    if b.wall_time_s:
        parts.append(f"at most {b.wall_time_s / 3600:.3g} h")
    if b.stagnation_generations:
        parts.append(f"stop after {b.stagnation_generations} generations without progress")
    return ", ".join(parts)


def summary_section(d: RunData) -> str:
    st = d.study
    conv = d.convergence
    gens = int(conv["generation"].iloc[-1]) if len(conv) else None
    started = d.started.strftime("%Y-%m-%d %H:%M") if d.started else "unknown"
    evaluated = (f"{d.evaluated_count} designs" if d.evaluated_count is not None else "unknown")
    if gens is not None:
        evaluated += f" in {gens} generations"
    if d.evaluated_feasible is not None:
        evaluated += f"; {d.evaluated_feasible} met every constraint"
    stop = d.stop_line.removeprefix("stopped: ").split(";")[0] if d.stop_line else "not recorded"
    objectives = "; ".join(
        f"{'maximise' if o.sense == 'max' else 'minimise'} {esc(words(o.column))}"
        for o in st.objectives)
    space = [f"{esc(words(v.name))}: {_variable_range(v)}" for v in st.variables]
    space += [f"{esc(words(k))}: {_fixed_value(k, v)} (fixed)" for k, v in st.fixed.items()]
    tip = "full round" if st.tip_radius_m is None else with_unit("tip_radius_m",
                                                                   st.tip_radius_m)
    rows = [
        ("Study", f"<b>{esc(st.name)}</b>"),
        ("Run started", f"{esc(started)} &nbsp;·&nbsp; folder <code>{esc(d.folder.name)}</code>"
                        f" &nbsp;·&nbsp; finfront {esc(d.version)}"),
        ("Report written", esc(_dt.datetime.now().strftime("%Y-%m-%d %H:%M"))),
        ("Search budget", _budget(st.budget) + f", seed {st.seed}"),
        ("Designs evaluated", f"{esc(evaluated)}; stopped by: {esc(stop)}"),
        ("On the Pareto front", f"{len(d.pareto)} designs"),
        ("Objectives", objectives),
        ("Constraints (every scenario)",
         "<br>".join(esc(constraint_text(c)) for c in st.constraints) or "none"),
        ("Envelope", f"base {with_unit('base_width_m', st.base_width_m)} across the flow × "
                     f"{with_unit('flow_length_m', st.flow_length_m)} along it; at most "
                     f"{with_unit('overall_height_m', st.max_height_m)} high"),
        ("Extrusion", f"root fillet {esc(with_unit('root_fillet_m', st.root_fillet_m))}; "
                      f"fin tips {esc(tip)}"),
        ("Design space", "<br>".join(space)),
    ]
    body = kv_table(rows)
    body += "<h3>Scenarios</h3>" + _scenarios(st)
    body += "<h3>Heat sources</h3>" + _sources(st)
    fans = _fans(st)
    if fans:
        body += "<h3>Fans</h3>" + fans
    body += "<h3>Materials</h3>" + grid_table(
        ["material", "conductivity (W/(m·K))", "density (kg/m³)"],
        [[esc(m.name), sig(m.conductivity_W_per_mK), sig(m.density_kg_per_m3, 4)]
         for m in st.materials], numeric={1, 2})
    return section("study", "What was studied", body)


def _supply_words(cond) -> str:
    s = cond.supply
    if s.mode == "fan":
        return "fan (each design uses its chosen fan set)"
    if s.mode == "flow":
        return f"fixed flow {with_unit('flow_m3_per_s', s.flow_m3_per_s)}"
    if s.mode == "velocity":
        return f"fixed approach velocity {sig(s.velocity_m_per_s)} m/s"
    return "fan stopped: natural convection and radiation"


def _scenarios(st) -> str:
    rows = []
    for sc in st.scenarios:
        c = sc.conditions
        ex = c.extras or {}
        alt = ex.get("altitude_m")
        notes = []
        if ex.get("fan_speed", 1.0) not in (None, 1.0):
            notes.append(f"fan speed {100 * ex['fan_speed']:.0f} %")
        if ex.get("power_scale", 1.0) not in (None, 1.0):
            notes.append(f"heat × {ex['power_scale']:g}")
        if c.clearance_top_m or c.clearance_side_m:
            notes.append(f"bypass clearance {with_unit('c_m', c.clearance_top_m)} above, "
                         f"{with_unit('c_m', c.clearance_side_m)} beside")
        notes.append("open fin tips" if c.fin_tip == "convective" else "shrouded fin tips")
        rows.append([
            esc(sc.name), f"{c.ambient_temperature_K - 273.15:.1f}",
            f"{c.ambient_pressure_Pa / 1e3:.1f}" + (f" ({alt:.0f} m)" if alt is not None else ""),
            esc(_supply_words(c)), sig(sum(s.power_W for s in c.sources)),
            esc("; ".join(notes)),
        ])
    return grid_table(["scenario", "ambient (°C)", "air pressure (kPa)", "air supply",
                       "heat (W)", "notes"], rows, numeric={1, 2, 4})


def _sources(st) -> str:
    rows = []
    for s in st.scenarios[0].conditions.sources:
        pos = ("centred" if s.x_m is None and s.y_m is None else
               f"{'centre' if s.x_m is None else length_or(s.x_m)} / "
               f"{'centre' if s.y_m is None else length_or(s.y_m)}")
        rows.append([
            esc(s.name), sig(s.power_W),
            f"{length_or(s.length_m)} × {length_or(s.width_m)}", esc(pos),
            sig(s.interface_resistance_K_m2_per_W * 1e4), sig(s.junction_to_case_K_per_W),
            f"{s.max_junction_temperature_K - 273.15:.1f}",
        ])
    return grid_table(["source", "power (W)", "footprint along × across the flow (mm)",
                       "centre from inlet edge / left edge (mm)", "interface (K·cm²/W)",
                       "junction to case (K/W)", "junction limit (°C)"], rows,
                      numeric={1, 4, 5, 6})


def length_or(value_m: float) -> str:
    return show("x_m", value_m)[0]


def _fans(st) -> str:
    from optim.report_curves import fan_set

    cond = st.scenarios[0].conditions
    if cond.supply.mode != "fan":
        return ""
    rows = []
    for i, curve in enumerate(cond.supply.fans):
        f = fan_set(cond, i, st.fan_names)
        rows.append([
            esc(st.fan_names[i] if i < len(st.fan_names) else curve.name),
            esc(f"{curve.count} × {curve.arrangement}" if curve.count > 1 else "one fan"),
            sig(float(f.pressure[0])), sig(f.free_delivery * 3600.0), flow_cfm(f.free_delivery),
            sig(curve.power_W * curve.count) if curve.power_W is not None else "–",
        ])
    note = (f'<p class="note">At the nominal scenario\'s inlet air density '
            f"({cond.ambient_temperature_K - 273.15:.1f} °C, "
            f"{cond.ambient_pressure_Pa / 1e3:.1f} kPa).</p>")
    return grid_table(["fan set", "fans", "shut-off pressure (Pa)", "free delivery (m³/h)",
                       "free delivery (CFM)", "rated electrical power (W)"], rows,
                      numeric={2, 3, 4, 5}) + note


# ----------------------------------------------------------------------------- cautions
def cautions_section() -> str:
    items = "".join(f"<li><b>{esc(t)}.</b> {esc(text)}</li>" for t, text in CAUTIONS)
    acc = grid_table(["part of the model", "stated accuracy", "stated by", "in"],
                     [[esc(a), esc(b), esc(c), f"<code>{esc(f)}</code>"]
                      for a, b, c, f in ACCURACY])
    body = (f'<div class="caution"><ol class="cautions">{items}</ol></div>'
            f"<h3>Accuracy of the model's parts</h3>{acc}")
    return section("cautions", "Read this before using the numbers", body)


# ----------------------------------------------------------------------------- candidates
def candidate_columns(d: RunData) -> list[tuple[str, str]]:
    """(SI column, header HTML) of the candidate table, in order."""
    cols = [("fin_count", "fins"), ("fin_thickness_root_m", "root<br>(mm)"),
            ("fin_thickness_tip_m", "tip<br>(mm)"), ("fin_height_m", "height<br>(mm)"),
            ("base_thickness_m", "base<br>(mm)"), ("gap_root_m", "gap<br>(mm)")]
    for c in ("material", "fan"):
        if c in d.pareto and d.pareto[c].nunique() > 1:
            cols.append((c, c))
    results = [o.column for o in d.study.objectives]
    results += [c for c in ("junction_temperature_K", "mass_kg", "pressure_drop_Pa",
                            "flow_m3_per_s", "total_resistance_K_per_W") if c not in results]
    for c in results:
        unit = "g" if c.endswith("_kg") else show(c, 1.0)[1]
        name = esc(short_words(c))
        cols.append((c, f"{name}<br>({esc(unit)})" if unit else name))
    return cols


def _cell(column: str, value) -> tuple[str, str, bool]:
    """(shown text, sort value, numeric) of one table cell."""
    if column in ("material", "fan"):
        return esc(value), esc(value), False
    v = float(value)
    if column.endswith("_kg"):
        return f"{v * 1e3:.1f}", repr(v), True
    return show(column, v)[0], repr(v), True


_FLAG_SHORT = {"in_range_flow": "flow range", "in_range_fin": "1-D fin", "in_fan_data": "fan data"}


def candidates_section(d: RunData) -> str:
    p = d.pareto
    if len(p) == 0:
        return section("candidates", "All candidates on the front",
                       "<p>No evaluated design met every constraint in every scenario, so there "
                       "are no candidates. Relax a constraint or widen the design space.</p>")
    cols = candidate_columns(d)
    colours = colour_map(p["limiting_constraint"].astype(str).value_counts().index.tolist())
    picked = {pk.index: pk.label for pk in d.picks}
    flags = validity_flags(d, short=True)
    multi = len(d.study.scenarios) > 1
    head = ['<th scope="col">design</th>']
    head += [f'<th scope="col"{"" if c in ("material", "fan") else " class=num"}>{h}</th>'
             for c, h in cols]
    head.append('<th scope="col">range<br>checks</th>')
    head.append('<th scope="col">limited by</th>')
    rows = []
    for i, (_, r) in enumerate(p.iterrows()):
        did = str(r["design_id"])
        mark = (f' <span class="star" title="{esc(pick_title(picked[i]))}">★</span>'
                if i in picked else "")
        cells = [f'<td data-v="{i:06d}"><b>{esc(did)}</b>{mark}</td>']
        for c, _h in cols:
            text, key, numeric = _cell(c, r[c])
            cells.append(f'<td{" class=num" if numeric else ""} data-v="{key}">{text}</td>')
        bad = flags.get(did, [])
        short = list(dict.fromkeys(b.split(" (")[0] for b in bad))
        cells.append(f'<td data-v="{len(bad)}" title="{esc("; ".join(bad))}">'
                     + (esc(", ".join(short)) if bad else "ok") + "</td>")
        lab = str(r["limiting_constraint"])
        full = esc(limiting_text(lab, d.study.constraints))
        where = (f'<br><span class="where">in {esc(r.get("worst_scenario", ""))}</span>'
                 if multi else "")
        cells.append(f'<td class="limit" data-v="{esc(lab)}" title="{full}"><span class="chip" '
                     f'style="background:{colours[lab]}"></span>'
                     f"{esc(limiting_text(lab, d.study.constraints, source=False))}{where}</td>")
        cls = ' class="picked"' if i in picked else ""
        rows.append(f'<tr id="row-{esc(did)}" data-id="{esc(did)}"{cls}>' + "".join(cells)
                    + "</tr>")
    table = (f'<div class="table-wrap"><table class="sortable candidates" id="candidate-table">'
             f"<thead><tr>{''.join(head)}</tr></thead><tbody>{''.join(rows)}</tbody></table>"
             "</div>")
    same = [f"{c} {esc(p[c].iloc[0])}" for c in ("material", "fan")
            if c in p and p[c].nunique() == 1]
    note = ('<p class="note">Click a column heading to sort; click a design on the Pareto plot '
            "to find its row. ★ and shading: picked designs (below). Fin thickness at the root "
            "and tip, gap at the root; temperatures of the nominal scenario."
            + (f" Every design uses {', '.join(same)}." if same else "")
            + " Range checks: see “Designs outside the published ranges”.</p>")
    return section("candidates", "All candidates on the front", note + table)


# ----------------------------------------------------------------------------- validity
_FLAG_WORDS = {
    "in_range_flow": "channel flow outside the correlations' published range",
    "in_range_fin": "fin Biot number too large for 1-D fin theory",
    "in_fan_data": "operating point beyond the fan curve's data (curve extrapolated)",
}


def validity_flags(d: RunData, short: bool = False) -> dict[str, list[str]]:
    """{design id: ['what is outside (scenario)', ...]} over every scenario."""
    out: dict[str, list[str]] = {}
    ids = d.pareto["design_id"].astype(str).tolist() if len(d.pareto) else []
    for sc, table in zip(d.study.scenarios, d.scenario_tables, strict=False):
        for col, text in (_FLAG_SHORT if short else _FLAG_WORDS).items():
            if col not in table:
                continue
            bad = ~table[col].to_numpy(dtype=bool)
            for i in np.flatnonzero(bad):
                out.setdefault(ids[i], []).append(f"{text} ({sc.name})")
    return out


def _flow_reasons(row: pd.Series, cond) -> str:
    """Why the model flagged a design's flow (``in_range_flow`` False), from its row."""
    from models.air import air_in_range, air_properties
    from models.bypass import bypass_flags

    reasons = []
    re_ch = float(row["reynolds_number"])
    if re_ch > 5e6:
        reasons.append(f"channel Re = {sig(re_ch)} (correlations to 5 000 000)")
    if not bool(row.get("operating_point_found", True)):
        reasons.append("no operating point")
    if cond.clearance_top_m > 0 or cond.clearance_side_m > 0:
        air = air_properties(cond.ambient_temperature_K, cond.ambient_pressure_Pa)
        f = bypass_flags(float(row["pressure_drop_Pa"]), float(row["base_width_m"]),
                         float(row["fin_height_m"]), float(row["flow_length_m"]),
                         cond.clearance_top_m, cond.clearance_side_m, float(air.density),
                         float(air.kinematic_viscosity))
        re_by = float(np.nanmax(f.reynolds))
        if not bool(f.in_range):
            reasons.append(f"bypass clearance Re = {sig(re_by)} (laminar model to 2300)")
    if not bool(air_in_range(cond.ambient_temperature_K, cond.ambient_pressure_Pa)):
        reasons.append("air outside 200–500 K, 50–120 kPa (property fits)")
    return "; ".join(reasons) or f"channel Re = {sig(re_ch)}"


def _flag_value(col: str, row: pd.Series, cond) -> str:
    if col == "in_range_flow":
        return _flow_reasons(row, cond)
    if col == "in_range_fin":
        return f"Bi = {sig(row['fin_biot_number'], 2)} (limit 0.1)"
    return f"{with_unit('flow_m3_per_s', row['flow_m3_per_s'])}"


def validity_section(d: RunData) -> str:
    rows = []
    ids = d.pareto["design_id"].astype(str).tolist() if len(d.pareto) else []
    for sc, table in zip(d.study.scenarios, d.scenario_tables, strict=False):
        for col, text in _FLAG_WORDS.items():
            if col not in table:
                continue
            for i in np.flatnonzero(~table[col].to_numpy(dtype=bool)):
                rows.append([esc(ids[i]), esc(sc.name), esc(text),
                             esc(_flag_value(col, table.iloc[i], sc.conditions))])
    if rows:
        body = (f"<p>{len({r[0] for r in rows})} of {len(ids)} designs on the front are outside "
                "a published range in at least one scenario. Their numbers are extrapolations: "
                "widen the accuracy band for them, or prefer designs that are inside.</p>"
                + grid_table(["design", "scenario", "what is outside", "value"], rows))
    elif ids:
        body = (f"<p>All {len(ids)} designs on the front are inside the published ranges of the "
                "correlations, 1-D fin theory holds (fin Biot number below 0.1), and every "
                "operating point lies within its fan curve's data, in every scenario.</p>")
    else:
        body = "<p>There are no designs on the front to check.</p>"
    if d.evaluated_flags and d.evaluated_feasible:
        counts = [f"{n} with {_FLAG_WORDS[c]}" for c, n in d.evaluated_flags.items() if n]
        body += (f'<p class="note">Among all {d.evaluated_feasible} feasible designs evaluated '
                 "(nominal scenario): " + (esc("; ".join(counts)) if counts else
                                           "none is outside a range") + ".</p>")
    body += ('<p class="note">Checked: Reynolds and Prandtl numbers against each channel '
             "correlation's range (models/channel.py), the bypass clearance flow, air "
             "properties' temperature and pressure range (models/air.py), the fin Biot number "
             "(models/fins.py), and the operating point against the fan data "
             "(models/fan.py).</p>")
    return section("validity", "Designs outside the published ranges", body)


# ----------------------------------------------------------------------------- references
def references_section() -> str:
    items = "".join(f"<li>{esc(r)}</li>" for r in REFERENCES)
    return section("references", "Where the model's equations come from",
                   f'<ul class="references">{items}</ul><p class="note">{esc(REFERENCES_NOTE)}'
                   "</p>")
