"""Figures of a run (matplotlib, Agg backend), each as PNG and SVG in ``<run>/plots/``.

- ``pareto``: the Pareto front (every pair of objectives for three or more), each design
  coloured by its limiting constraint in plain words, other feasible designs in grey, the
  picked designs (knee, best of each objective) marked and named;
- ``convergence``: hypervolume and feasible fraction against designs evaluated;
- ``fan_system``: fan curves at the nominal air density with the system curves and operating
  points of up to five picked designs (the knee and the best design for each objective);
- ``fin_profile``: temperature along a fin of the knee design, against the log-mean air;
- ``design_space``: parallel coordinates of the Pareto set's design variables
  (drawn by ``optim.plot_design_space``).

The figures are 16:9 (10.7 x 6 in, saved at 150 dpi) so that a 1280 x 720 projector shows them
whole; text is 12 pt or more, legends 11 pt (the house style and shared helpers are in
``optim.plot_style``; the picks' labels are placed by ``optim.plot_labels``). Axes are in
engineering units: mm, degC, Pa, m^3/h (and CFM), g or kg. Words, units and colours are those
of the report (``optim.report_format``); the curves come from the same functions as the
report's (``optim.report_curves``).
"""

from __future__ import annotations

import math
import traceback

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from matplotlib.lines import Line2D  # noqa: E402

from optim.plot_design_space import plot_design_space  # noqa: E402
from optim.plot_labels import place_labels  # noqa: E402
from optim.plot_style import (  # noqa: E402
    DPI,
    FIGSIZE,
    STYLE,
    axis_spec,
    count_designs,
    message_figure,
    new_figure,
    save_figure,
    styled,
    wrap,
)
from optim.problem import HeatSinkProblem  # noqa: E402
from optim.report_curves import air_curves, fin_profile  # noqa: E402
from optim.report_format import (  # noqa: E402
    PALETTE,
    colour_map,
    fan_set_words,
    limiting_text,
    pick_title,
)
from optim.runfolder import CFM_PER_M3S, RunFolder, display  # noqa: E402
from optim.search import SearchState  # noqa: E402
from optim.study_types import Study  # noqa: E402

__all__ = [
    "DPI", "FAN_INK", "FIGSIZE", "MAX_BACKGROUND", "PICK_MARKERS", "PICK_SIZES", "STYLE",
    "SYSTEM_DASHES", "knee_index", "make_plots", "objective_matrix", "picked_designs",
    "plot_convergence", "plot_design_space", "plot_fan_system", "plot_fin_profile",
    "plot_pareto",
]

MAX_BACKGROUND = 20000  # grey background points drawn at most
PICK_MARKERS = ("*", "D", "s", "^", "X")  # knee first, as in the report
PICK_SIZES = (20, 12, 12, 12, 12)  # marker size (pt) of each pick
SYSTEM_DASHES = ("--", "-.", (0, (1, 1.6)), (0, (6, 2, 1, 2, 1, 2)), (0, (9, 3)))
FAN_INK = "#333333"


# ----------------------------------------------------------------------------- picking
def knee_index(F: np.ndarray) -> int:
    """The knee of a front of minimised objectives: scaled to [0, 1] per objective, the point
    farthest below the hyperplane through the extremes, i.e. the smallest sum of scaled
    objectives (for two objectives: the largest distance from the line joining the ends)."""
    F = np.atleast_2d(np.asarray(F, dtype=float))
    lo, hi = F.min(axis=0), F.max(axis=0)
    span = np.where(hi > lo, hi - lo, 1.0)
    return int(np.argmin(((F - lo) / span).sum(axis=1)))


def picked_designs(pareto: pd.DataFrame, study: Study) -> list[tuple[str, int]]:
    """Up to five rows of the Pareto table: the knee, then the best of each objective."""
    if len(pareto) == 0:
        return []
    F = objective_matrix(pareto, study)
    picks = [("knee", knee_index(F))]
    for j, o in enumerate(study.objectives):
        label = f"best {display(o.column)[0].split(' (')[0]}"
        picks.append((label, int(np.argmin(F[:, j]))))
    out, seen = [], set()
    for label, i in picks:
        if i not in seen:
            seen.add(i)
            out.append((label, i))
    return out[:5]


def objective_matrix(table: pd.DataFrame, study: Study) -> np.ndarray:
    cols = []
    for o in study.objectives:
        v = table[o.column].to_numpy(dtype=float)
        cols.append(-v if o.sense == "max" else v)
    return np.column_stack(cols)


# ----------------------------------------------------------------------------- helpers
def _background(folder: RunFolder) -> pd.DataFrame:
    try:
        ev = folder.read_evaluated()
    except (OSError, ValueError):
        return pd.DataFrame()
    if "feasible" in ev:
        ev = ev[ev["feasible"].astype(bool)]
    if len(ev) > MAX_BACKGROUND:
        ev = ev.sample(MAX_BACKGROUND, random_state=0)
    return ev


def _pick_name(pareto: pd.DataFrame, label: str, i: int, study: Study | None = None) -> str:
    """'D102 knee of the front', 'D001 best mass'; with one objective: 'D007 best design'."""
    did = pareto.iloc[i].get("design_id", f"row {i + 1}")
    if study is not None and len(study.objectives) == 1:
        return f"{did} best design"
    return f"{did} {pick_title(label)}"


# ----------------------------------------------------------------------------- Pareto front
@styled
def plot_pareto(folder: RunFolder, study: Study, pareto: pd.DataFrame) -> None:
    objs = list(study.objectives)
    if len(pareto) == 0 or "limiting_constraint" not in pareto:
        message_figure(folder, "pareto", f"{study.name}: Pareto front (empty)",
                       "No evaluated design meets every constraint in every scenario.")
        return
    bg = _background(folder)
    limits = pareto["limiting_constraint"].astype(str)
    labels = limits.value_counts().index.tolist()
    colours = colour_map(labels)  # the report's colours, in the report's order
    picks = picked_designs(pareto, study)
    cols = [o.column for o in objs]
    senses = [o.sense for o in objs]
    if len(objs) == 1:  # one objective: against the first free size (else the rank)
        free = [v.name for v in study.variables
                if v.kind != "choice" and v.name in pareto and v.name in bg]
        if free:
            cols, senses = [free[0], cols[0]], [None, senses[0]]
        else:
            pareto = pareto.assign(_rank=np.arange(1, len(pareto) + 1))
            bg = pd.DataFrame()
            cols, senses = ["_rank", cols[0]], [None, senses[0]]
    pairs = [(0, 1)] if len(cols) == 2 else [(a, b) for a in range(len(cols))
                                              for b in range(a + 1, len(cols))]
    ncol = min(3, len(pairs))
    nrow = math.ceil(len(pairs) / ncol)
    fig, axes = new_figure(nrows=nrow, ncols=ncol, squeeze=False)
    specs = {c: axis_spec(c, pareto[c], s, two_lines=len(pairs) > 1)
             for c, s in zip(cols, senses, strict=True) if c != "_rank"}
    specs["_rank"] = (1.0, 0.0, "rank on the front (–)")

    def values(table: pd.DataFrame, col: str) -> np.ndarray:
        f, off, _ = specs[col]
        return table[col].to_numpy(dtype=float) * f + off

    handles: dict[str, object] = {}
    for k, (a, b) in enumerate(pairs):
        ax = axes[k // ncol, k % ncol]
        ca, cb = cols[a], cols[b]
        obstacles, weights = [], []
        if len(bg) and ca in bg and cb in bg:
            bx, by = values(bg, ca), values(bg, cb)
            ax.scatter(bx, by, s=7, c="#c4c4c4", lw=0, zorder=1, rasterized=len(bx) > 3000)
            handles.setdefault("other feasible designs evaluated", Line2D(
                [], [], ls="none", marker="o", ms=5, mfc="#c4c4c4", mec="none"))
            obstacles.append(np.column_stack([bx, by]))
            weights.append(np.full(len(bx), 0.25))
        x, y = values(pareto, ca), values(pareto, cb)
        obstacles.append(np.column_stack([x, y]))
        weights.append(np.full(len(x), 3.0))
        for lab in labels:
            sel = (limits == lab).to_numpy()
            h = ax.scatter(x[sel], y[sel], s=42, color=colours[lab], edgecolor="#222222",
                           lw=0.6, zorder=3)
            handles.setdefault(wrap(f"limited by {limiting_text(lab, study.constraints)}",
                                    40), h)
        for j, (plabel, i) in enumerate(picks):
            for ink, lw in (("white", 4.5), ("k", 1.8)):  # a white halo keeps it visible
                ax.scatter([x[i]], [y[i]], marker=PICK_MARKERS[j % 5],
                           s=(PICK_SIZES[j % 5] + 6) ** 2, facecolor="none", edgecolor=ink,
                           lw=lw, zorder=5)
            if len(pairs) > 1:  # a legend-sized copy of the symbol
                handles.setdefault(_pick_name(pareto, plabel, i), Line2D(
                    [], [], ls="none", marker=PICK_MARKERS[j % 5], ms=14 if j == 0 else 11,
                    mfc="none", mec="k", mew=1.8))
        ax.set_xlabel(specs[ca][2])
        ax.set_ylabel(specs[cb][2])
        ax.margins(0.06)
        if len(pairs) == 1:  # one panel: the picks carry their names beside them
            names = [_pick_name(pareto, plabel, i, study) for plabel, i in picks]
            idx = [i for _, i in picks]
            ax.legend(list(handles.values()), list(handles.keys()), loc="upper left",
                      bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0,
                      title="each point is one design", alignment="left")
            place_labels(ax, np.column_stack([x[idx], y[idx]]), names,
                         np.concatenate(obstacles), np.concatenate(weights))
    for k in range(len(pairs), nrow * ncol):
        axes[k // ncol, k % ncol].set_axis_off()
    if len(pairs) > 1:
        fig.legend(list(handles.values()), list(handles.keys()), loc="outside lower center",
                   ncol=3)
    title = "best design" if len(objs) == 1 else "Pareto front"
    fig.suptitle(f"{study.name}: {title} ({count_designs(len(pareto))})")
    save_figure(fig, folder, "pareto")


# ----------------------------------------------------------------------------- convergence
@styled
def plot_convergence(folder: RunFolder, study: Study, conv: pd.DataFrame) -> None:
    fig, ax = new_figure()
    blue, red = PALETTE[0], PALETTE[1]
    h1, = ax.plot(conv["evaluations"], conv["hypervolume"], "-o", ms=5, lw=2.2, color=blue,
                  label="hypervolume of the best front so far (left axis)")
    ax.set_xlabel("designs evaluated (–)")
    ax.set_ylabel("hypervolume, normalised (–)", color=blue)
    ax.set_ylim(0, 1.05)
    ax.set_xlim(left=0)
    ax2 = ax.twinx()
    h2, = ax2.plot(conv["evaluations"], 100 * conv["feasible_fraction"], "-", lw=2,
                   color=red, label="feasible designs in the generation (right axis)")
    ax2.set_ylabel("feasible designs in the generation (%)", color=red)
    ax2.set_ylim(0, 105)
    ax2.grid(False)
    fig.legend([h1, h2], [h1.get_label(), h2.get_label()], loc="outside lower center", ncol=2)
    fig.suptitle(f"{study.name}: convergence of the search")
    save_figure(fig, folder, "convergence")


# ----------------------------------------------------------------------------- air side
def _designs_for(problem, state, rows: pd.DataFrame):
    """Model Designs of Pareto rows (looked up by eval_id in the archive)."""
    rec = state.archive.records
    pos = {int(e): i for i, e in enumerate(rec["eval_id"])}
    idx = np.array([pos[int(e)] for e in rows["eval_id"]])
    X = state.archive.X[idx]
    return problem.study.design_from(problem.codec.decode(X))


def _take(design, i: int):
    arrays = design.arrays()
    return type(design)(**{k: v[i : i + 1] for k, v in arrays.items()})


@styled
def plot_fan_system(folder: RunFolder, problem: HeatSinkProblem, state: SearchState,
                    pareto: pd.DataFrame) -> None:
    study = problem.study
    picks = picked_designs(pareto, study)
    if not picks:
        return
    cond = study.scenarios[0].conditions
    rows = pareto.iloc[[i for _, i in picks]].reset_index(drop=True)
    designs = _designs_for(problem, state, rows)
    curves = air_curves(study, designs, [r for _, r in rows.iterrows()])
    scen = study.scenarios[0].name
    if not curves or all(c.system_flow.size <= 1 for c in curves):
        message_figure(folder, "fan_system", f"{study.name}: air flow ({scen})",
                       "No air is moved in the nominal scenario (fan stopped): no operating point.")
        return
    to_h = 3600.0
    fig, ax = new_figure()
    q_ops = np.array([c.op_flow for c in curves])
    p_ops = np.array([c.op_pressure for c in curves])
    x_top = 1.3 * float(np.nanmax(q_ops)) if np.isfinite(q_ops).any() else 0.01
    y_top = 1.6 * float(np.nanmax(p_ops)) if np.isfinite(p_ops).any() else 1.0
    obstacles = []
    fans_drawn: set[int] = set()
    fan_names: dict[int, str] = {}
    fans_drawn_order: list[int] = []
    fan_ends: list[tuple[float, float]] = []
    fan_index = rows["fan_index"].astype(int).tolist() if "fan_index" in rows else [0] * len(rows)
    greys = ("#222222", "#6b6b6b", "#9a9a9a")
    handles, labels = [], []
    for j, c in enumerate(curves):
        fi = fan_index[j]
        if c.fan is None or fi in fans_drawn:
            continue
        f = c.fan
        ink = greys[len(fans_drawn) % len(greys)]
        curve = cond.supply.fans[fi]
        name = study.fan_names[fi] if fi < len(study.fan_names) else curve.name
        h, = ax.plot(f.flow * to_h, f.pressure, "-", lw=3, color=ink, zorder=2)
        fan_names[fi] = name
        handles.append(h)
        labels.append(f"fan curve: {name}\n{fan_set_words(curve)}, air at "
                      f"{c.density:.3f} kg/m³")
        h, = ax.plot(f.data_flow * to_h, f.data_pressure, "o", ms=6, mfc="white", mec=ink,
                     mew=1.6, zorder=2)
        if not fans_drawn:
            handles.append(h)
            labels.append("fan data points")
        obstacles.append((f.flow * to_h, f.pressure))
        fans_drawn.add(fi)
        fans_drawn_order.append(fi)
        fan_ends.append((float(f.flow[0]) * to_h, float(f.pressure[0])))
        x_top = max(x_top, 1.05 * f.free_delivery)
        y_top = max(y_top, float(np.nanmax(f.pressure)))
    y_top *= 1.08
    if len(fans_drawn) > 1:  # several fan sets: each curve named at its shut-off end
        for fi, (fx, fy) in zip(fans_drawn_order, fan_ends, strict=True):
            ax.annotate(fan_names[fi], (fx, fy), xytext=(8, 3), textcoords="offset points",
                        ha="left", va="bottom", fontsize=12, zorder=7, bbox=dict(
                            boxstyle="round,pad=0.2", fc="white", ec="none", alpha=0.85))
            obstacles.append((np.array([fx, fx + 0.3 * x_top * to_h]), np.array([fy, fy])))
    marks, names, inks = [], [], []
    for j, c in enumerate(curves):
        ink = PALETTE[j % len(PALETTE)]
        name = _pick_name(rows, picks[j][0], j, study)
        keep = c.system_flow <= x_top * 1.0001
        knee = j == 0  # drawn on top of the others, open, so that what lies under it shows
        ax.plot(c.system_flow[keep] * to_h, c.system_pressure[keep], ls=SYSTEM_DASHES[j % 5],
                lw=3.0 if knee else 2.4, color=ink, zorder=6 if knee else 4)
        ax.plot([c.op_flow * to_h], [c.op_pressure], ls="none", marker=PICK_MARKERS[j % 5],
                ms=24 if knee else 11, mfc="none" if knee else ink, mec=ink if knee else "k",
                mew=2.6 if knee else 1.2, zorder=9 if knee else 8)
        handles.append(Line2D([], [], ls=SYSTEM_DASHES[j % 5], lw=3.0 if knee else 2.4,
                              color=ink, marker=PICK_MARKERS[j % 5], ms=14 if knee else 10,
                              mfc="none" if knee else ink, mec=ink if knee else "k"))
        labels.append(wrap(f"system curve and operating point of {name}", 32))
        obstacles.append((c.system_flow[keep] * to_h, c.system_pressure[keep]))
        q = c.op_flow
        marks.append((q * to_h, c.op_pressure))
        names.append(f"{name}\n{q * to_h:.1f} m³/h = {q * CFM_PER_M3S:.1f} CFM, "
                     f"{c.op_pressure:.0f} Pa")
        if len(fans_drawn) > 1:  # which fan set it runs on
            names[-1] += f"\non {fan_names[fan_index[j]]}"
        inks.append(ink)
    ax.set_xlim(0, x_top * to_h)
    ax.set_ylim(0, y_top)
    ax.set_xlabel("air flow (m³/h)")
    ax.set_ylabel("static pressure (Pa)")
    sec = ax.secondary_xaxis("top", functions=(lambda x: x / to_h * CFM_PER_M3S,
                                               lambda x: x / CFM_PER_M3S * to_h))
    sec.set_xlabel("air flow (CFM)")
    if fans_drawn:
        note = ("system curve: sink + system\nimpedance; operating point: where\n"
                "it meets the fan curve")
        what = "fan and system curves, operating points"
    else:  # a fixed flow or approach velocity: the operating point is at that flow
        fixed = "air flow" if cond.supply.mode == "flow" else "approach\nvelocity"
        note = ("system curve: sink + system\nimpedance; operating point: at\n"
                f"the study's fixed {fixed}")
        what = "system curves and operating points"
        if cond.supply.mode == "flow":
            q = float(cond.supply.flow_m3_per_s)
            h = ax.axvline(q * to_h, color=FAN_INK, ls=":", lw=2, zorder=1)
            handles.insert(0, h)
            labels.insert(0, f"fixed air flow {q * to_h:.1f} m³/h\n= {q * CFM_PER_M3S:.1f} CFM")
            obstacles.append((np.array([q, q]) * to_h, np.array([0.0, y_top])))
    ax.legend(handles, labels, loc="upper left", bbox_to_anchor=(1.02, 1.0), borderaxespad=0,
              alignment="left", title=note)
    fig.suptitle(f"{study.name}: {what} ({scen} scenario)")
    place_labels(ax, marks, names, lines=obstacles, colours=inks)
    save_figure(fig, folder, "fan_system")


# ----------------------------------------------------------------------------- fin
@styled
def plot_fin_profile(folder: RunFolder, problem: HeatSinkProblem, state: SearchState,
                     pareto: pd.DataFrame) -> None:
    study = problem.study
    picks = picked_designs(pareto, study)
    if not picks:
        return
    row = pareto.iloc[picks[0][1]]
    design = _take(_designs_for(problem, state, pareto.iloc[[picks[0][1]]]), 0)
    prof = fin_profile(study, design, row)  # the report's profile: base and log-mean air
    cond = study.scenarios[0].conditions
    x = prof.distance_mm
    t = prof.temperature_K - 273.15
    air, base = prof.air_K - 273.15, prof.base_K - 273.15
    t_in = cond.ambient_temperature_K - 273.15
    power = float(sum(s.power_W for s in cond.sources))
    r_sink = float(row["sink_resistance_K_per_W"])
    fig, (ax0, ax1) = new_figure(ncols=2, width_ratios=(1, 1.7))
    fin_ink, air_ink = PALETTE[0], "#555555"
    # left: the whole span from the air to the base
    ax0.plot(x, t, lw=3, color=fin_ink, label="fin")
    ax0.axhline(air, color=air_ink, ls="--", lw=2,
                label=wrap(f"air, log-mean over the flow length: {air:.1f} °C", 22))
    span = base - air
    lo0, hi0 = min(air, float(t.min())), max(base, float(t.max()))
    pad0 = 0.08 * (hi0 - lo0) if hi0 > lo0 else 1.0
    ax0.set_ylim(lo0 - pad0, hi0 + pad0)
    drop = float(t.max() - t.min())
    lo1 = float(t.min()) - max(0.6 * drop, 0.05)  # room for the notes under the tip
    hi1 = float(t.max()) + max(0.2 * drop, 0.05)
    ax0.axhspan(lo1, hi1, color=fin_ink, alpha=0.10, lw=0, label="enlarged on the right")
    ax0.set_xlim(0, float(x[-1]) * 1.02)
    ax0.set_xlabel("distance from the base (mm)")
    ax0.set_ylabel("temperature (°C)")
    ax0.set_title("fin and air")
    ax0.legend(loc="center", fontsize=11)
    # right: the fin's own temperature drop, with theta / theta_b on the right
    ax1.plot(x, t, lw=3, color=fin_ink)
    ax1.set_ylim(lo1, hi1)
    ax1.set_xlim(0, float(x[-1]) * 1.02)
    ax1.set_xlabel("distance from the base along the fin (mm)")
    ax1.set_ylabel("fin temperature (°C)")
    ax1.set_title("the fin's temperature drop, enlarged")
    theta = r"$\theta/\theta_b$"
    if span > 0:
        sec = ax1.secondary_yaxis("right", functions=(lambda v: (v - air) / span,
                                                      lambda r: air + r * span))
        sec.set_ylabel(f"{theta}: excess over the air,\nrelative to the base's (–)")
    th_tip = (float(t[-1]) - air) / span if span > 0 else float("nan")
    ax1.plot([x[0], x[-1]], [t[0], t[-1]], "o", ms=9, color=fin_ink, mec="k", zorder=5)
    ax1.annotate(f"base {t[0]:.1f} °C, {theta} = 1", (x[0], t[0]), xytext=(12, 6),
                 textcoords="offset points", ha="left", va="bottom", fontsize=12)
    ax1.annotate(f"tip {t[-1]:.1f} °C, {theta} = {th_tip:.2f}", (x[-1], t[-1]),
                 xytext=(x[-1], t[-1] + 0.35 * drop), textcoords="data", ha="right",
                 va="bottom", fontsize=12, arrowprops=dict(arrowstyle="-", color="0.4",
                                                           shrinkA=2, shrinkB=6))
    ax1.text(0.02, 0.03,
             f"base = inlet air + power × sink resistance\n"
             f"        = {t_in:.1f} °C + {power:.0f} W × {r_sink:.3g} K/W = {base:.1f} °C\n"
             f"h = {float(row['h_W_per_m2K']):.1f} W/(m²·K), "
             f"fin efficiency {float(row.get('fin_efficiency', np.nan)):.3f}\n{prof.tip_words}",
             transform=ax1.transAxes, ha="left", va="bottom", fontsize=12,
             bbox=dict(boxstyle="round,pad=0.4", fc="white", ec="0.6", alpha=0.95))
    did = row.get("design_id", "")
    which = "best design" if len(study.objectives) == 1 else "knee design"
    fig.suptitle(f"{study.name}: temperature along one fin of the {which} {did}")
    save_figure(fig, folder, "fin_profile")


def make_plots(folder: RunFolder, problem: HeatSinkProblem, state: SearchState,
               pareto: pd.DataFrame, conv: pd.DataFrame) -> dict[str, str]:
    """Draw every figure; returns {figure: error} for those that failed (the run stands)."""
    jobs = {
        "pareto": lambda: plot_pareto(folder, problem.study, pareto),
        "convergence": lambda: plot_convergence(folder, problem.study, conv),
        "fan_system": lambda: plot_fan_system(folder, problem, state, pareto),
        "fin_profile": lambda: plot_fin_profile(folder, problem, state, pareto),
        "design_space": lambda: plot_design_space(folder, problem, pareto),
    }
    failed = {}
    for name, job in jobs.items():
        try:
            job()
        except Exception as exc:  # a figure must not cost the run its results
            plt.close("all")
            folder.log(traceback.format_exc())
            failed[name] = f"{exc.__class__.__name__}: {exc}"
    return failed
