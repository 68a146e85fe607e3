"""Interactive figures of the report (plotly; its script is inlined once by the page).

Every axis carries its unit; text is at least 15 px so that the figures read on a projector at
1280 x 720. Colours of the limiting constraints are those of the candidate table.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from optim.report_curves import AirCurves, FinProfile
from optim.report_format import (
    axis_title,
    colour_map,
    esc,
    flow_cfm,
    limiting_text,
    pick_title,
    show,
    with_unit,
    words,
)
from optim.runfolder import CFM_PER_M3S

FONT = dict(family="Segoe UI, Helvetica, Arial, sans-serif", size=16, color="#111111")
CONFIG = {"displaylogo": False, "responsive": True, "displayModeBar": "hover",
          "modeBarButtonsToRemove": ["select2d", "lasso2d", "autoScale2d"],
          "toImageButtonOptions": {"format": "svg", "scale": 1}}
GRID = "#dcdcdc"
FAN_INK = "#333333"


def to_div(fig: go.Figure, div_id: str, height: int, post_script: str | None = None,
           toolbar: bool = True) -> str:
    """The figure as a ``<div>`` plus its drawing script (plotly.js itself is inlined once).

    ``post_script`` runs once the figure is drawn; ``{plot_id}`` in it is the div's id.
    ``toolbar=False`` hides plotly's zoom and export buttons (small figures).
    """
    fig.update_layout(height=height)
    config = dict(CONFIG, displayModeBar=toolbar and "hover")
    return fig.to_html(full_html=False, include_plotlyjs=False, div_id=div_id, config=config,
                       default_width="100%", default_height=f"{height}px",
                       post_script=post_script)


def _style(fig: go.Figure, **layout) -> go.Figure:
    axis = dict(showline=True, linecolor="#444444", mirror=True, gridcolor=GRID, zeroline=False,
                ticks="outside", tickfont=dict(size=15), title_font=dict(size=16))
    fig.update_xaxes(**axis)
    fig.update_yaxes(**axis)
    base = dict(template="plotly_white", font=FONT, hoverlabel=dict(font_size=15),
                margin=dict(l=80, r=30, t=30, b=70), paper_bgcolor="#ffffff",
                plot_bgcolor="#ffffff")
    base.update(layout)
    legend = dict(font=dict(size=15))
    legend.update(base.pop("legend", {}))
    fig.update_layout(legend=legend, **base)
    return fig


def axis_spec(column: str, values) -> tuple[float, float, str]:
    """(factor, offset, title) that show a model column on an axis: shown = SI * f + offset.

    Masses are shown in kg when ``values`` (the front) reach 1 kg, in g otherwise.
    """
    unit = show(column, 1.0)[1]
    if unit == "°C":
        return 1.0, -273.15, axis_title(column)
    if column.endswith("_kg"):
        v = np.asarray(values, dtype=float)
        big = bool(v.size) and float(np.nanmax(np.abs(v))) >= 1.0
        return (1.0, 0.0, f"{words(column)} (kg)") if big else (1e3, 0.0, f"{words(column)} (g)")
    factor = {"m³/h": 3600.0, "cm²": 1e4, "mm": 1e3}.get(unit, 1.0)
    return factor, 0.0, axis_title(column)


# ----------------------------------------------------------------------------- Pareto front
def hover_text(row: pd.Series, constraints) -> str:
    """What a Pareto design's hover label says: its sizes and its key results."""
    g = row.get

    def u(col: str) -> str:
        return with_unit(col, g(col))

    lines = [
        f"<b>{esc(g('design_id', ''))}</b> — limited by "
        f"{esc(limiting_text(str(g('limiting_constraint', '')), constraints))}",
        f"{int(g('fin_count', 0))} fins · root {u('fin_thickness_root_m')} · tip "
        f"{u('fin_thickness_tip_m')}",
        f"fin height {u('fin_height_m')} · base {u('base_thickness_m')} · gap {u('gap_root_m')}",
    ]
    extra = " · ".join(esc(str(g(c))) for c in ("material", "fan") if c in row.index)
    if extra:
        lines.append(extra)
    lines += [
        f"junction {u('junction_temperature_K')} · mass {u('mass_kg')}",
        f"sink Δp {u('pressure_drop_Pa')} · flow {u('flow_m3_per_s')} "
        f"({flow_cfm(g('flow_m3_per_s'))} CFM)",
        f"thermal resistance {u('total_resistance_K_per_W')}",
    ]
    return "<br>".join(lines)


_PICK_OFFSETS = {0: (-40, 45), 1: (30, 0), 2: (0, -40), 3: (40, -40), 4: (-40, -40)}
_PICK_SYMBOLS = ("star-open", "diamond-open", "square-open", "triangle-up-open", "x-open")


def pareto_figure(pareto: pd.DataFrame, study, background: pd.DataFrame, picks) -> go.Figure:
    """The Pareto front coloured by limiting constraint (pairs of objectives for 3 or more)."""
    objs = list(study.objectives)
    cols = [o.column for o in objs]
    pairs = [(0, 1)] if len(cols) == 2 else [(a, b) for a in range(len(cols))
                                              for b in range(a + 1, len(cols))]
    if len(cols) == 1:
        pareto = pareto.assign(_rank=np.arange(1, len(pareto) + 1))
        if len(background):
            background = pd.DataFrame()
        cols = ["_rank", cols[0]]
        pairs = [(0, 1)]
    ncol = min(3, len(pairs))
    nrow = math.ceil(len(pairs) / ncol)
    fig = make_subplots(rows=nrow, cols=ncol, horizontal_spacing=0.09, vertical_spacing=0.16)
    labels = pareto["limiting_constraint"].astype(str).value_counts().index.tolist()
    colours = colour_map(labels)
    text = [hover_text(r, study.constraints) for _, r in pareto.iterrows()]
    ids = pareto["design_id"].astype(str).tolist()

    specs = {c: axis_spec(c, pareto[c]) for c in cols if c != "_rank"}  # the front decides
    specs["_rank"] = (1.0, 0.0, "rank on the front (–)")

    def values(table: pd.DataFrame, col: str) -> tuple[np.ndarray, str]:
        f, off, title = specs[col]
        return table[col].to_numpy(dtype=float) * f + off, title

    def xy(table: pd.DataFrame, a: int, b: int):
        return (*values(table, cols[a]), *values(table, cols[b]))

    for k, (a, b) in enumerate(pairs):
        r, c = k // ncol + 1, k % ncol + 1
        if len(background) and cols[a] in background and cols[b] in background:
            bx, _, by, _ = xy(background, a, b)
            fig.add_trace(go.Scatter(x=bx, y=by, mode="markers", hoverinfo="skip",
                                     marker=dict(size=4, color="#c4c4c4"),
                                     name="other feasible designs evaluated",
                                     legendgroup="bg", showlegend=k == 0), row=r, col=c)
        x, xt, y, yt = xy(pareto, a, b)
        for lab in labels:
            sel = (pareto["limiting_constraint"].astype(str) == lab).to_numpy()
            fig.add_trace(go.Scatter(
                x=x[sel], y=y[sel], mode="markers", legendgroup=lab, showlegend=k == 0,
                name=f"limited by {limiting_text(lab, study.constraints)}",
                marker=dict(size=10, color=colours[lab], line=dict(width=0.8, color="#222")),
                text=[t for t, s in zip(text, sel, strict=True) if s],
                customdata=[d for d, s in zip(ids, sel, strict=True) if s],
                hovertemplate="%{text}<extra></extra>"), row=r, col=c)
        if len(pairs) == 1:  # one panel: the picks carry labels (placed clear of the front)
            px = [p.index for p in picks]
            fig.add_trace(go.Scatter(
                x=x[px], y=y[px], mode="markers", hoverinfo="skip", showlegend=True,
                legendgroup="picks", name="picked for discussion",
                marker=dict(size=20, symbol="circle-open", color="#111", line=dict(width=2.5))),
                row=r, col=c)
            for j, p in enumerate(picks):
                ax, ay = _PICK_OFFSETS.get(j, (60, -40))
                fig.add_annotation(x=x[p.index], y=y[p.index], ax=ax, ay=ay, row=r, col=c,
                                   xanchor="left" if ax > 0 else "right" if ax < 0 else "center",
                                   yanchor="bottom" if ay < 0 else "top" if ay > 0 else "middle",
                                   text=f"{esc(p.design_id)} {esc(pick_title(p.label))}",
                                   showarrow=True, arrowhead=0, arrowwidth=1.2,
                                   font=dict(size=15), bgcolor="rgba(255,255,255,0.9)",
                                   bordercolor="#555", borderwidth=1)
        else:  # several panels: one open symbol per pick, named in the legend
            for j, p in enumerate(picks):
                fig.add_trace(go.Scatter(
                    x=[x[p.index]], y=[y[p.index]], mode="markers", hoverinfo="skip",
                    legendgroup=f"pick{j}", showlegend=k == 0,
                    name=f"{p.design_id} {pick_title(p.label)}",
                    marker=dict(size=19, symbol=_PICK_SYMBOLS[j % len(_PICK_SYMBOLS)],
                                color="#111", line=dict(width=2.5))), row=r, col=c)
        fig.update_xaxes(title_text=xt, row=r, col=c)
        fig.update_yaxes(title_text=yt, row=r, col=c)
    _style(fig, legend=dict(orientation="h", yanchor="top", y=-0.16 if nrow == 1 else -0.08,
                            xanchor="left", x=0, font=dict(size=15)),
           margin=dict(l=80, r=30, t=30, b=40), hovermode="closest")
    return fig


# ----------------------------------------------------------------------------- air side
def air_figure(curves: AirCurves, design_id: str, colour: str) -> go.Figure:
    """Fan curve of the design's fan set, its system curve and the operating point."""
    fig = go.Figure()
    to_h = 3600.0
    x_top = max(float(curves.system_flow.max()) if curves.system_flow.size else 0.0,
                1.3 * curves.op_flow)
    if curves.fan is not None:
        f = curves.fan
        x_top = min(x_top, 1.05 * f.free_delivery) if f.free_delivery > 0 else x_top
        fig.add_trace(go.Scatter(
            x=f.flow * to_h, y=f.pressure, mode="lines", name=f.label,
            line=dict(color=FAN_INK, width=3),
            hovertemplate="fan: %{x:.1f} m³/h, %{y:.1f} Pa<extra></extra>"))
        fig.add_trace(go.Scatter(
            x=f.data_flow * to_h, y=f.data_pressure, mode="markers", name="fan data points",
            marker=dict(size=8, color="#ffffff", line=dict(width=2, color=FAN_INK)),
            hovertemplate="fan data: %{x:.1f} m³/h, %{y:.1f} Pa<extra></extra>"))
    keep = curves.system_flow <= x_top * 1.0001
    fig.add_trace(go.Scatter(
        x=curves.system_flow[keep] * to_h, y=curves.system_pressure[keep], mode="lines",
        name=f"{design_id}: sink + system impedance", line=dict(color=colour, width=3,
                                                                dash="dash"),
        hovertemplate="system: %{x:.1f} m³/h, %{y:.1f} Pa<extra></extra>"))
    q, p = curves.op_flow, curves.op_pressure
    fig.add_trace(go.Scatter(
        x=[q * to_h], y=[p], mode="markers", name="operating point",
        marker=dict(size=16, color=colour, line=dict(width=2, color="#111")),
        hovertemplate=(f"operating point<br>{q * to_h:.1f} m³/h ({q * CFM_PER_M3S:.1f} CFM)"
                       f"<br>{p:.1f} Pa<extra></extra>")))
    y_top = max([p * 1.8] + ([float(curves.fan.pressure.max())] if curves.fan else []))
    x_range = [0.0, x_top * to_h]
    fig.add_trace(go.Scatter(x=[x_range[0] / to_h * CFM_PER_M3S, x_range[1] / to_h *
                                CFM_PER_M3S], y=[0, 0], xaxis="x2", mode="markers",
                             marker=dict(opacity=0), hoverinfo="skip", showlegend=False))
    _style(fig, hovermode="closest",
           legend=dict(orientation="h", yanchor="top", y=-0.3, xanchor="left", x=0),
           margin=dict(l=80, r=30, t=70, b=40),
           xaxis2=dict(overlaying="x", side="top", range=[v / to_h * CFM_PER_M3S
                                                           for v in x_range],
                       title_text="air flow (CFM)", fixedrange=True, showgrid=False,
                       tickmode="auto", nticks=8,
                       tickfont=dict(size=15), title_font=dict(size=16), ticks="outside",
                       showline=True, linecolor="#444444"))
    fig.update_layout(xaxis=dict(range=x_range, title_text="air flow (m³/h)", fixedrange=True))
    fig.update_yaxes(title_text="static pressure (Pa)", range=[0, 1.05 * y_top])
    return fig


# ----------------------------------------------------------------------------- fin
def fin_figure(profile: FinProfile, colour: str) -> go.Figure:
    """Temperature along one fin, with the air temperature it exchanges heat with."""
    x = profile.distance_mm
    t = profile.temperature_K - 273.15
    air = profile.air_K - 273.15
    fig = go.Figure()
    fig.add_trace(go.Scatter(x=x, y=t, mode="lines", name="fin", line=dict(color=colour,
                                                                            width=4),
                             hovertemplate="%{x:.1f} mm from the base: %{y:.1f} °C"
                                           "<extra></extra>"))
    fig.add_trace(go.Scatter(x=[x[0], x[-1]], y=[air, air], mode="lines",
                             name=profile.air_words, line=dict(color="#555555", width=3,
                                                               dash="dot"),
                             hovertemplate=f"air {air:.1f} °C<extra></extra>"))
    lo, hi = min(air, float(t.min())), max(float(t.max()), air)
    pad = max(0.06 * (hi - lo), 0.5)
    _style(fig, hovermode="closest",
           legend=dict(orientation="h", yanchor="top", y=-0.2, xanchor="left", x=0),
           margin=dict(l=80, r=30, t=30, b=40))
    fig.update_xaxes(title_text="distance from the base along the fin (mm)",
                     range=[0, float(x[-1]) * 1.02])
    fig.update_yaxes(title_text="temperature (°C)", range=[lo - pad, hi + pad])
    return fig


# ----------------------------------------------------------------------------- convergence
def convergence_figure(conv: pd.DataFrame) -> go.Figure:
    """Hypervolume of the best-so-far front and the feasible share, per designs evaluated."""
    fig = make_subplots(specs=[[{"secondary_y": True}]])
    ev = conv["evaluations"].to_numpy(dtype=float)
    fig.add_trace(go.Scatter(x=ev, y=conv["hypervolume"], mode="lines+markers",
                             name="hypervolume of the best front so far", line=dict(
                                 color="#0072B2", width=3), marker=dict(size=7),
                             hovertemplate="%{x:.0f} designs: hypervolume %{y:.3f}"
                                           "<extra></extra>"), secondary_y=False)
    fig.add_trace(go.Scatter(x=ev, y=100.0 * conv["feasible_fraction"].astype(float),
                             mode="lines", name="feasible designs in the generation",
                             line=dict(color="#D55E00", width=2.5),
                             hovertemplate="%{x:.0f} designs: %{y:.0f} % feasible"
                                           "<extra></extra>"), secondary_y=True)
    _style(fig, hovermode="x unified",
           legend=dict(orientation="h", yanchor="top", y=-0.2, xanchor="left", x=0),
           margin=dict(l=80, r=80, t=30, b=40))
    fig.update_xaxes(title_text="designs evaluated (–)", rangemode="tozero")
    fig.update_yaxes(title_text="hypervolume, normalised (–)", secondary_y=False,
                     title_font=dict(color="#0072B2"), range=[0, 1.05], tickmode="linear",
                     tick0=0, dtick=0.2)
    fig.update_yaxes(title_text="feasible (%)", secondary_y=True, range=[0, 105],
                     showgrid=False, title_font=dict(color="#D55E00"), tickmode="linear",
                     tick0=0, dtick=20)
    return fig
