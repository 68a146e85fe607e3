"""Figures of a run (matplotlib, Agg backend), each as PNG and SVG in ``<run>/plots/``.

- ``pareto``: the Pareto front (every pair of objectives for three or more), each design
  coloured by its limiting constraint in plain words, other feasible designs in grey, the
  picked designs (knee, best of each objective) marked and named;
- ``convergence``: hypervolume and feasible fraction against designs evaluated;
- ``fan_system``: fan curves at the nominal air density with the system curves and operating
  points of up to five picked designs (the knee and the best design for each objective);
- ``fin_profile``: temperature along a fin of the knee design, against the log-mean air;
- ``design_space``: parallel coordinates of the Pareto set's design variables.

The figures are 16:9 (10.7 x 6 in, saved at 150 dpi) so that a 1280 x 720 projector shows them
whole; text is 12 pt or more, legends 11 pt. Axes are in engineering units: mm, degC, Pa,
m^3/h (and CFM), g or kg. Words, units and colours are those of the report
(``optim.report_format``); the curves come from the same functions as the report's
(``optim.report_curves``).
"""

from __future__ import annotations

import functools
import math
import textwrap
import traceback

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
from matplotlib.lines import Line2D  # noqa: E402
from scipy.spatial import cKDTree  # noqa: E402

from optim.problem import HeatSinkProblem  # noqa: E402
from optim.report_curves import air_curves, fin_profile  # noqa: E402
from optim.report_format import (  # noqa: E402
    PALETTE,
    axis_title,
    colour_map,
    fan_set_words,
    limiting_text,
    pick_title,
    unit_of,
    words,
)
from optim.runfolder import CFM_PER_M3S, RunFolder, display  # noqa: E402
from optim.search import SearchState  # noqa: E402
from optim.study_types import Study  # noqa: E402

MAX_BACKGROUND = 20000  # grey background points drawn at most
FIGSIZE = (10.67, 6.0)  # inches, 16:9
DPI = 150
STYLE = {
    "font.size": 12, "axes.titlesize": 13, "axes.labelsize": 12, "xtick.labelsize": 12,
    "ytick.labelsize": 12, "legend.fontsize": 11, "legend.title_fontsize": 11,
    "figure.titlesize": 15, "axes.grid": True, "grid.alpha": 0.3, "svg.fonttype": "path",
    "legend.framealpha": 0.92,
}
PICK_MARKERS = ("*", "D", "s", "^", "X")  # knee first, as in the report
PICK_SIZES = (20, 12, 12, 12, 12)  # marker size (pt) of each pick
SYSTEM_DASHES = ("--", "-.", (0, (1, 1.6)), (0, (6, 2, 1, 2, 1, 2)), (0, (9, 3)))
FAN_INK = "#333333"


def _styled(func):
    """Draw ``func``'s figure with the house style (rc settings do not leak to the caller)."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        with plt.rc_context(STYLE):
            return func(*args, **kwargs)

    return wrapper


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
def _figure(**kwargs):
    kwargs.setdefault("figsize", FIGSIZE)
    return plt.subplots(layout="constrained", dpi=DPI, **kwargs)


def _save(fig, folder: RunFolder, name: str) -> None:
    folder.plots_dir.mkdir(exist_ok=True)
    for ext in ("png", "svg"):
        fig.savefig(folder.plots_dir / f"{name}.{ext}", dpi=DPI)
    plt.close(fig)


def _wrap(text: str, width: int) -> str:
    return "\n".join(textwrap.wrap(text, width, break_on_hyphens=False)) or text


def _axis(column: str, values=None, sense: str | None = None,
          two_lines: bool = False) -> tuple[float, float, str]:
    """(factor, offset, title) that show a model column on an axis: shown = SI * f + offset.

    Masses are in kg when ``values`` reach 1 kg, in g otherwise (as in the report)."""
    unit = unit_of(column)
    factor, offset = {"°C": (1.0, -273.15), "m³/h": (3600.0, 0.0), "cm²": (1e4, 0.0),
                      "mm": (1e3, 0.0)}.get(unit, (1.0, 0.0))
    title = axis_title(column)
    if column.endswith("_kg"):
        v = np.asarray(values if values is not None else [], dtype=float)
        big = bool(v.size) and float(np.nanmax(np.abs(v))) >= 1.0
        factor, title = (1.0, f"{words(column)} (kg)") if big else (1e3, f"{words(column)} (g)")
    if sense:
        title += ("\n" if two_lines else ", ") + (
            "higher is better" if sense == "max" else "lower is better")
    return factor, offset, title


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


def _count(n: int) -> str:
    return f"{n} design" if n == 1 else f"{n} designs"


def _pick_name(pareto: pd.DataFrame, label: str, i: int, study: Study | None = None) -> str:
    """'D102 knee of the front', 'D001 best mass'; with one objective: 'D007 best design'."""
    did = pareto.iloc[i].get("design_id", f"row {i + 1}")
    if study is not None and len(study.objectives) == 1:
        return f"{did} best design"
    return f"{did} {pick_title(label)}"


def _dense(xy: np.ndarray, step: float) -> np.ndarray:
    """Points along a polyline (pixels) at most ``step`` apart (non-finite points dropped)."""
    xy = xy[np.isfinite(xy).all(axis=1)]
    if len(xy) < 2:
        return xy
    seg = np.hypot(*np.diff(xy, axis=0).T)
    s = np.concatenate([[0.0], np.cumsum(seg)])
    t = np.linspace(0.0, s[-1], max(2, int(s[-1] / step) + 1))
    return np.column_stack([np.interp(t, s, xy[:, 0]), np.interp(t, s, xy[:, 1])])


def _place_labels(ax, anchors, texts, obstacles=(), weights=None, lines=(),
                  fontsize: float = 12, colours=None) -> None:
    """Annotate each anchor (data coordinates) with its text, in a box joined to it by a
    leader line, placed where it covers the fewest obstacles (points with weights, and
    ``lines`` as (x, y) arrays, in data coordinates), no other label and nothing outside the
    axes; the leader line keeps clear of lines and other anchors. The figure's layout is
    fixed first."""
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    px = fig.dpi / 72.0
    obstacles = np.asarray(obstacles, dtype=float).reshape(-1, 2)
    w_obs = np.ones(len(obstacles)) if weights is None else np.asarray(weights, float)
    ok = np.isfinite(obstacles).all(axis=1)
    obs, w_obs = ax.transData.transform(obstacles[ok]), w_obs[ok]
    for lx, ly in lines:  # a point every 3 px along each line, in the axes
        dense = _dense(ax.transData.transform(np.column_stack([lx, ly])), 3.0)
        dense = dense[(dense[:, 0] >= frame.x0) & (dense[:, 0] <= frame.x1)
                      & (dense[:, 1] >= frame.y0) & (dense[:, 1] <= frame.y1)]
        obs = np.concatenate([obs, dense])
        w_obs = np.concatenate([w_obs, np.full(len(dense), 2.0)])
    pts = ax.transData.transform(np.asarray(anchors, dtype=float).reshape(-1, 2))
    strong = cKDTree(obs[w_obs >= 1.0])  # the lines and front points a leader should not cross
    sizes = []
    for text in texts:
        probe = ax.text(0, 0, text, fontsize=fontsize)
        ext = probe.get_window_extent(renderer)
        probe.remove()
        sizes.append((ext.width, ext.height))
    pad = 0.35 * fontsize * px

    def best_spot(k: int, boxes: list, leaders: list):
        """(score, dx, dy, ha, va, box, leader samples) of the best place for label k."""
        p = pts[k]
        w, h = sizes[k][0] + 2 * pad, sizes[k][1] + 2 * pad
        others = np.delete(pts, k, axis=0)
        best = None
        for dist in (26, 44, 66, 92, 124, 160, 200, 250):
            for deg in range(0, 360, 15):
                c, s = math.cos(math.radians(deg)), math.sin(math.radians(deg))
                ha = "left" if c > 0.35 else "right" if c < -0.35 else "center"
                va = "bottom" if s > 0.35 else "top" if s < -0.35 else "center"
                x = p[0] + dist * c * px
                y = p[1] + dist * s * px
                x0 = x - pad if ha == "left" else x - w + pad if ha == "right" else x - w / 2
                y0 = y - pad if va == "bottom" else y - h + pad if va == "top" else y - h / 2
                x1, y1 = x0 + w, y0 + h
                out = (max(0.0, frame.x0 - x0) + max(0.0, x1 - frame.x1)) * h + (
                    max(0.0, frame.y0 - y0) + max(0.0, y1 - frame.y1)) * w
                inside = ((obs[:, 0] > x0 - 6) & (obs[:, 0] < x1 + 6) & (obs[:, 1] > y0 - 6)
                          & (obs[:, 1] < y1 + 6))
                hits = float(w_obs[inside].sum())
                anchors_hit = int(((pts[:, 0] > x0 - 8) & (pts[:, 0] < x1 + 8)
                                   & (pts[:, 1] > y0 - 8) & (pts[:, 1] < y1 + 8)).sum())
                overlaps = [max(0.0, min(x1, b[2]) - max(x0, b[0]) + 6.0)
                            * max(0.0, min(y1, b[3]) - max(y0, b[1]) + 6.0) for b in boxes]
                overlap = 300.0 * sum(o > 0 for o in overlaps) + 100.0 * sum(overlaps) / (w * h)
                # the leader line: matplotlib starts it at the text's corner or side midpoint
                # nearest the anchor; it should keep clear of the curves, anchors and labels
                tx = min((x0 + pad, 0.5 * (x0 + x1), x1 - pad), key=lambda v: abs(v - p[0]))
                ty = min((y0 + pad, 0.5 * (y0 + y1), y1 - pad), key=lambda v: abs(v - p[1]))
                vec = np.array([tx, ty]) - p
                u0 = min(1.0, 16.0 / max(float(np.hypot(*vec)), 1e-9))  # clear of the anchor
                n_seg = max(4, int(np.hypot(*vec) * (1.0 - u0) / 4.0))  # every 4 px
                seg = p + np.linspace(u0, 1.0, n_seg)[:, None] * vec
                crossed = sum(bool(((seg[:, 0] > b[0]) & (seg[:, 0] < b[2]) & (seg[:, 1] > b[1])
                                    & (seg[:, 1] < b[3])).any()) for b in boxes)
                near, _ = strong.query(seg, distance_upper_bound=7.0)
                near_pts = np.hypot(*(seg[:, None, :] - others[None, :, :]).transpose(2, 0, 1))
                leader = (3.0 * float(np.isfinite(near).sum())
                          + 20.0 * float((near_pts < 10).any(axis=0).sum()) + 40.0 * crossed)
                cut = sum(int(((q[:, 0] > x0) & (q[:, 0] < x1) & (q[:, 1] > y0)
                               & (q[:, 1] < y1)).any()) for q in leaders)
                score = (hits + leader + 40.0 * cut + 20.0 * anchors_hit + overlap
                         + (300.0 + 2000.0 * out / (w * h) if out > 0 else 0.0) + 0.02 * dist)
                if best is None or score < best[0]:
                    best = (score, dist * c, dist * s, ha, va, (x0, y0, x1, y1), seg)
        return best

    spots: list = []
    for k in range(len(pts)):  # greedy, in order (the knee first) ...
        spots.append(best_spot(k, [b[5] for b in spots], [b[6] for b in spots]))
    for _ in range(2):  # ... then each label again, with all the others in place
        for k in range(len(pts)):
            rest = spots[:k] + spots[k + 1:]
            spots[k] = best_spot(k, [b[5] for b in rest], [b[6] for b in rest])
    for k, (text, p, spot) in enumerate(zip(texts, pts, spots, strict=True)):
        _, dx, dy, ha, va, _, _ = spot
        edge = colours[k] if colours is not None else "0.35"
        ann = ax.annotate(
            text, xy=tuple(ax.transData.inverted().transform(p)), xytext=(dx, dy),
            textcoords="offset points", ha=ha, va=va, fontsize=fontsize, zorder=20,
            bbox=dict(boxstyle="round,pad=0.35", fc="white", ec=edge, lw=1.2, alpha=0.9),
            arrowprops=dict(arrowstyle="-", color=edge, lw=1.2, shrinkA=0, shrinkB=4))
        ann.set_in_layout(False)


def _message(folder: RunFolder, name: str, title: str, text: str) -> None:
    fig, ax = _figure()
    ax.text(0.5, 0.5, _wrap(text, 60), ha="center", va="center", transform=ax.transAxes,
            fontsize=14)
    ax.set_axis_off()
    fig.suptitle(title)
    _save(fig, folder, name)


# ----------------------------------------------------------------------------- Pareto front
@_styled
def plot_pareto(folder: RunFolder, study: Study, pareto: pd.DataFrame) -> None:
    objs = list(study.objectives)
    if len(pareto) == 0 or "limiting_constraint" not in pareto:
        _message(folder, "pareto", f"{study.name}: Pareto front (empty)",
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
    fig, axes = _figure(nrows=nrow, ncols=ncol, squeeze=False)
    specs = {c: _axis(c, pareto[c], s, two_lines=len(pairs) > 1)
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
            handles.setdefault(_wrap(f"limited by {limiting_text(lab, study.constraints)}",
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
            _place_labels(ax, np.column_stack([x[idx], y[idx]]), names,
                          np.concatenate(obstacles), np.concatenate(weights))
    for k in range(len(pairs), nrow * ncol):
        axes[k // ncol, k % ncol].set_axis_off()
    if len(pairs) > 1:
        fig.legend(list(handles.values()), list(handles.keys()), loc="outside lower center",
                   ncol=3)
    title = "best design" if len(objs) == 1 else "Pareto front"
    fig.suptitle(f"{study.name}: {title} ({_count(len(pareto))})")
    _save(fig, folder, "pareto")


# ----------------------------------------------------------------------------- convergence
@_styled
def plot_convergence(folder: RunFolder, study: Study, conv: pd.DataFrame) -> None:
    fig, ax = _figure()
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
    _save(fig, folder, "convergence")


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




@_styled
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
        _message(folder, "fan_system", f"{study.name}: air flow ({scen})",
                 "No air is moved in the nominal scenario (fan stopped): no operating point.")
        return
    to_h = 3600.0
    fig, ax = _figure()
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
        labels.append(_wrap(f"system curve and operating point of {name}", 32))
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
    _place_labels(ax, marks, names, lines=obstacles, colours=inks)
    _save(fig, folder, "fan_system")


# ----------------------------------------------------------------------------- fin
@_styled
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
    fig, (ax0, ax1) = _figure(ncols=2, width_ratios=(1, 1.7))
    fin_ink, air_ink = PALETTE[0], "#555555"
    # left: the whole span from the air to the base
    ax0.plot(x, t, lw=3, color=fin_ink, label="fin")
    ax0.axhline(air, color=air_ink, ls="--", lw=2,
                label=_wrap(f"air, log-mean over the flow length: {air:.1f} °C", 22))
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
    _save(fig, folder, "fin_profile")


# ----------------------------------------------------------------------------- design space
@_styled
def plot_design_space(folder: RunFolder, problem: HeatSinkProblem, pareto: pd.DataFrame) -> None:
    study = problem.study
    if not study.variables or len(pareto) == 0:
        return
    rec = pareto
    shown_vars, same = [], []
    for v in study.variables:
        if v.kind == "choice":
            present = rec[v.name].astype(str).unique() if v.name in rec else []
            if len(v.choices) <= 1 or len(present) <= 1:  # one value: a note, not an axis
                value = present[0] if len(present) else (v.choices[0] if v.choices else "")
                same.append(f"{words(v.name)} {value}")
                continue
        elif v.upper is None or v.lower is None or not float(v.upper) > float(v.lower):
            continue
        shown_vars.append(v)
    if not shown_vars:
        return
    fig, ax = _figure()
    obj = study.objectives[0]
    f, off, ctitle = _axis(obj.column, rec[obj.column], obj.sense, two_lines=True)
    c = rec[obj.column].to_numpy(dtype=float) * f + off
    norm = plt.Normalize(np.nanmin(c), np.nanmax(c))
    cmap = plt.get_cmap("viridis")
    Y, names, ends, inner, first = [], [], [], [], []
    for k, v in enumerate(shown_vars):
        if v.kind == "choice":
            codes = {name: i for i, name in enumerate(v.choices)}
            n = max(len(v.choices) - 1, 1)
            Y.append(np.array([codes.get(str(x), np.nan) for x in rec[v.name]], float) / n)
            names.append(words(v.name))
            first.append(str(rec[v.name].iloc[0]))
            ends.append((str(v.choices[0]), str(v.choices[-1])))
            inner += [(k, i / n, str(ch)) for i, ch in enumerate(v.choices[1:-1], start=1)]
            continue
        fac, _, title = _axis(v.name)
        lo, hi = float(v.lower), float(v.upper)
        Y.append((rec[v.name].to_numpy(dtype=float) - lo) / (hi - lo))
        names.append(title)
        fmt = "{:.0f}" if v.kind == "int" else "{:.4g}"
        ends.append((fmt.format(lo * fac), fmt.format(hi * fac)))
        first.append(fmt.format(float(rec[v.name].iloc[0]) * fac))
    Y = np.column_stack(Y)
    x = np.arange(len(shown_vars))
    spread = len(Y) > 1 and float(np.nanmax(c)) > float(np.nanmin(c))
    order = np.argsort(-c if obj.sense == "min" else c, kind="stable")  # best on top
    for i in order:
        ink = cmap(norm(c[i])) if spread else PALETTE[0]
        ax.plot(x, Y[i], "-", color=ink, alpha=0.75 if spread else 1.0, lw=1.6 if spread else 3)
    if len(Y) == 1:  # one design: its values beside its points
        ax.plot(x, Y[0], "o", ms=9, color=PALETTE[0], mec="k")
        for k, text in enumerate(first):
            ax.annotate(text, (k, Y[0, k]), xytext=(8, 0), textcoords="offset points",
                        ha="left", va="center", fontsize=12, bbox=dict(
                            boxstyle="round,pad=0.2", fc="white", ec="none", alpha=0.85))
    ax.vlines(x, 0.0, 1.0, color="0.3", lw=1.2, zorder=0)
    for k, (lo, hi) in enumerate(ends):
        ax.text(k, -0.05, lo, ha="center", va="top", fontsize=12)
        ax.text(k, 1.05, hi, ha="center", va="bottom", fontsize=12)
    for k, yv, text in inner:
        ax.text(k + 0.04, yv, text, ha="left", va="center", fontsize=12,
                bbox=dict(boxstyle="round,pad=0.2", fc="white", ec="none", alpha=0.85))
    ax.set_xticks(x, [_wrap(n, 16) for n in names])
    ax.set_xlim(-0.35, len(shown_vars) - 0.65)
    ax.set_ylim(-0.17, 1.17)
    ax.set_yticks([0, 1], ["lower\nbound", "upper\nbound"])
    ax.grid(axis="x", visible=False)
    if spread:
        sm = plt.cm.ScalarMappable(norm=norm, cmap=cmap)
        fig.colorbar(sm, ax=ax, label=ctitle, pad=0.02)
    title = f"{study.name}: design variables of the Pareto set ({_count(len(Y))})"
    if same:
        title += "\nevery design on the front has " + ", ".join(same)
    fig.suptitle(title)
    _save(fig, folder, "design_space")


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
