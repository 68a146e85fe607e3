"""Figures of a run (matplotlib, Agg backend), each as PNG and SVG in ``<run>/plots/``.

- ``pareto``: the Pareto front (a pair matrix for three or more objectives), each design
  coloured by its limiting constraint, other feasible designs in grey, the knee marked;
- ``convergence``: hypervolume and feasible fraction against designs evaluated;
- ``fan_system``: fan curves at the nominal air density with the system curves and operating
  points of up to five picked designs (the knee and the best design for each objective);
- ``fin_profile``: temperature along a fin of the knee design;
- ``design_space``: parallel coordinates of the Pareto set's design variables.

Axes are in engineering units: mm, degC, Pa, m^3/h (and CFM), g.
"""

from __future__ import annotations

import dataclasses
import traceback

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from optim.problem import HeatSinkProblem  # noqa: E402
from optim.runfolder import CFM_PER_M3S, RunFolder, display, shown  # noqa: E402
from optim.search import SearchState  # noqa: E402
from optim.study_types import Study  # noqa: E402

R_AIR = 287.05  # J/(kg K), specific gas constant of dry air (common practice, no source)
MAX_BACKGROUND = 20000  # grey background points drawn at most
plt.rcParams.update({"font.size": 10, "axes.grid": True, "grid.alpha": 0.3})


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
def _save(fig, folder: RunFolder, name: str) -> None:
    folder.plots_dir.mkdir(exist_ok=True)
    for ext in ("png", "svg"):
        fig.savefig(folder.plots_dir / f"{name}.{ext}", dpi=150, bbox_inches="tight")
    plt.close(fig)


def _colours(labels: pd.Series) -> dict[str, tuple]:
    cmap = plt.get_cmap("tab10")
    return {lab: cmap(i % 10) for i, lab in enumerate(sorted(labels.astype(str).unique()))}


def _axis_label(column: str, sense: str | None = None) -> str:
    label = display(column)[0]
    return f"{label}, {'maximise' if sense == 'max' else 'minimise'}" if sense else label


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


# ----------------------------------------------------------------------------- figures
def plot_pareto(folder: RunFolder, study: Study, pareto: pd.DataFrame) -> None:
    objs = study.objectives
    if len(pareto) == 0 or "limiting_constraint" not in pareto:
        fig, ax = plt.subplots(figsize=(7, 4.5))
        ax.text(0.5, 0.5, "no evaluated design meets every constraint in every scenario",
                ha="center", va="center", transform=ax.transAxes)
        ax.set_axis_off()
        ax.set_title(f"{study.name}: Pareto front (empty)")
        _save(fig, folder, "pareto")
        return
    bg = _background(folder)
    colours = _colours(pareto["limiting_constraint"]) if len(pareto) else {}
    knee = picked_designs(pareto, study)[0][1] if len(pareto) else None
    m = len(objs)
    if m == 1:
        o = objs[0]
        var = study.variables[0].name if study.variables else o.column
        xcol = var if var in bg or var in pareto else o.column
        fig, ax = plt.subplots(figsize=(7, 5))
        if len(bg) and xcol in bg:
            ax.scatter(shown(bg[xcol], xcol), shown(bg[o.column], o.column), s=6, c="0.8",
                       label="feasible designs")
        for lab, grp in pareto.groupby("limiting_constraint"):
            ax.scatter(shown(grp[xcol], xcol), shown(grp[o.column], o.column), s=40,
                       color=colours[str(lab)], edgecolor="k", label=f"best, limited by {lab}")
        ax.set_xlabel(_axis_label(xcol))
        ax.set_ylabel(_axis_label(o.column, o.sense))
        ax.legend(fontsize=8)
        ax.set_title(f"{study.name}: best design")
        _save(fig, folder, "pareto")
        return
    size = 4.5 if m == 2 else 3.2
    n_panel = 1 if m == 2 else m - 1
    fig, axes = plt.subplots(n_panel, n_panel, figsize=(size * n_panel + (4 if m == 2 else 0),
                                                        size * n_panel),
                             squeeze=False)
    pairs = [(0, 1, axes[0, 0])] if m == 2 else [
        (j, i + 1, axes[i, j]) for i in range(m - 1) for j in range(m - 1)
    ]
    for a, b, ax in pairs:
        if m > 2 and a >= b:
            ax.axis("off")
            continue
        ca, cb = objs[a].column, objs[b].column
        if len(bg) and ca in bg and cb in bg:
            ax.scatter(shown(bg[ca], ca), shown(bg[cb], cb), s=4, c="0.82", lw=0,
                       label="other feasible designs")
        for lab, grp in pareto.groupby("limiting_constraint"):
            ax.scatter(shown(grp[ca], ca), shown(grp[cb], cb), s=22, color=colours[str(lab)],
                       edgecolor="k", lw=0.4, label=f"Pareto, limited by {lab}")
        if knee is not None:
            row = pareto.iloc[knee]
            ax.scatter(shown([row[ca]], ca), shown([row[cb]], cb), marker="*", s=220,
                       facecolor="none", edgecolor="k", lw=1.2, label="knee")
        if m == 2 or b == m - 1:
            ax.set_xlabel(_axis_label(ca, objs[a].sense))
        if m == 2 or a == 0:
            ax.set_ylabel(_axis_label(cb, objs[b].sense))
    handles, labels = pairs[0][2].get_legend_handles_labels()
    fig.suptitle(f"{study.name}: Pareto front ({len(pareto)} designs)")
    if m == 2:
        fig.tight_layout(rect=(0, 0, 0.62, 0.96))
        fig.legend(handles, labels, loc="center left", bbox_to_anchor=(0.63, 0.5), fontsize=8)
    else:
        fig.tight_layout(rect=(0, 0, 1, 0.96))
        fig.legend(handles, labels, loc="upper right", bbox_to_anchor=(0.98, 0.92), fontsize=8)
    _save(fig, folder, "pareto")


def plot_convergence(folder: RunFolder, study: Study, conv: pd.DataFrame) -> None:
    fig, ax = plt.subplots(figsize=(7, 4.5))
    ax.plot(conv["evaluations"], conv["hypervolume"], "-o", ms=3, color="C0")
    ax.set_xlabel("designs evaluated")
    ax.set_ylabel("hypervolume of the best-so-far front (normalised, -)", color="C0")
    ax2 = ax.twinx()
    ax2.plot(conv["evaluations"], 100 * conv["feasible_fraction"], "-", color="C1", alpha=0.7)
    ax2.set_ylabel("feasible designs in the generation (%)", color="C1")
    ax2.set_ylim(0, 105)
    ax2.grid(False)
    ax.set_title(f"{study.name}: convergence")
    fig.tight_layout()
    _save(fig, folder, "convergence")


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


def plot_fan_system(folder: RunFolder, problem: HeatSinkProblem, state: SearchState,
                    pareto: pd.DataFrame) -> None:
    from models.contract import AirSupply
    from models.evaluate import evaluate

    study = problem.study
    picks = picked_designs(pareto, study)
    if not picks:
        return
    cond = study.scenarios[0].conditions
    rows = pareto.iloc[[i for _, i in picks]].reset_index(drop=True)
    designs = _designs_for(problem, state, rows)
    q_op = rows["flow_m3_per_s"].to_numpy(dtype=float)
    fig, ax = plt.subplots(figsize=(8, 5.5))
    q_top = np.nanmax(q_op) * 1.6 if np.isfinite(q_op).any() else 0.01
    fans_used = sorted(set(rows["fan_index"].astype(int))) if "fan_index" in rows else []
    if cond.supply.mode == "fan" and cond.supply.fans:
        from models.fan import fan_model, fan_pressure

        rho = cond.ambient_pressure_Pa / (R_AIR * cond.ambient_temperature_K)
        for fi in fans_used or [0]:
            curve = cond.supply.fans[fi]
            model = fan_model(curve, rho)
            q_free = max(curve.flow_m3_per_s) * (curve.count if curve.arrangement == "parallel"
                                                 else 1)
            q = np.linspace(0, q_free, 200)
            name = study.fan_names[fi] if fi < len(study.fan_names) else curve.name
            ax.plot(q * 3600, fan_pressure(model, q), "-", lw=2.2, color="0.25",
                    alpha=0.6 + 0.4 * (fi == fans_used[0] if fans_used else 1),
                    label=f"fan '{name}' ({curve.count} x, {curve.arrangement}) at "
                          f"{rho:.3f} kg/m^3")
            q_top = max(q_top, q_free * 1.05)
    q_grid = np.linspace(q_top * 0.01, q_top, 40)
    dp = np.full((len(rows), q_grid.size), np.nan)
    for k, q in enumerate(q_grid):
        c = dataclasses.replace(cond, supply=AirSupply(mode="flow", flow_m3_per_s=float(q)))
        dp[:, k] = evaluate(designs, c)["system_pressure_Pa"].to_numpy(dtype=float)
    for j, (label, _) in enumerate(picks):
        col = f"C{j}"
        r = rows.iloc[j]
        ax.plot(q_grid * 3600, dp[j], "--", color=col, lw=1.4,
                label=f"{label} ({r.get('design_id', '')}): system curve")
        ax.plot([r["flow_m3_per_s"] * 3600], [r["system_pressure_Pa"]], "o", color=col, ms=8,
                mec="k")
    ymax = np.nanmax([np.nanmax(rows["system_pressure_Pa"].to_numpy(dtype=float)) * 2.0,
                      *(ln.get_ydata().max() for ln in ax.lines[: len(fans_used or [0])])])
    ax.set_ylim(0, ymax * 1.05 if np.isfinite(ymax) and ymax > 0 else None)
    ax.set_xlim(0, q_top * 3600)
    ax.set_xlabel("air flow (m^3/h)")
    ax.set_ylabel("static pressure (Pa)")
    sec = ax.secondary_xaxis("top", functions=(lambda x: x / 3600 * CFM_PER_M3S,
                                               lambda x: x / CFM_PER_M3S * 3600))
    sec.set_xlabel("air flow (CFM)")
    ax.legend(fontsize=7, loc="upper right")
    ax.set_title(f"{study.name}: fan and system curves, operating points "
                 f"({study.scenarios[0].name})", fontsize=10)
    fig.tight_layout()
    _save(fig, folder, "fan_system")


def plot_fin_profile(folder: RunFolder, problem: HeatSinkProblem, state: SearchState,
                     pareto: pd.DataFrame) -> None:
    from models.fins import fin_temperature_profile

    study = problem.study
    picks = picked_designs(pareto, study)
    if not picks:
        return
    row = pareto.iloc[picks[0][1]]
    design = _take(_designs_for(problem, state, pareto.iloc[[picks[0][1]]]), 0)
    a = design.arrays()
    s = np.linspace(0.0, 1.0, 101)
    theta = fin_temperature_profile(row["h_W_per_m2K"], a["conductivity_W_per_mK"][0],
                                    a["fin_thickness_root_m"][0], a["fin_thickness_tip_m"][0],
                                    a["fin_height_m"][0], s)
    cond = study.scenarios[0].conditions
    t_in = cond.ambient_temperature_K
    t_air = 0.5 * (t_in + float(row["outlet_temperature_K"]))
    # the isothermal base of the sink resistance: inlet + total power x sink resistance
    power = sum(s.power_W for s in cond.sources)
    t_base = t_in + power * float(row["sink_resistance_K_per_W"])
    T = t_air + (t_base - t_air) * theta
    fig, ax = plt.subplots(figsize=(7, 4.5))
    ax.plot(s * a["fin_height_m"][0] * 1e3, T - 273.15, lw=2, label="fin")
    ax.axhline(t_air - 273.15, color="0.5", ls=":", label="mean air temperature")
    ax.set_xlabel("distance from the base along the fin (mm)")
    ax.set_ylabel("fin temperature (degC)")
    eff = row.get("fin_efficiency", np.nan)
    ax.set_title(
        f"{study.name}: fin of the knee design {row.get('design_id', '')} "
        f"(h = {row['h_W_per_m2K']:.1f} W/m^2K, fin efficiency {eff:.3f})", fontsize=9)
    ax.legend(fontsize=8, title="base at its mean temperature (inlet + P R_sink)",
              title_fontsize=8)
    fig.tight_layout()
    _save(fig, folder, "fin_profile")


def plot_design_space(folder: RunFolder, problem: HeatSinkProblem, pareto: pd.DataFrame) -> None:
    study = problem.study
    vars_ = list(study.variables)
    if not vars_ or len(pareto) == 0:
        return
    rec = pareto
    fig, ax = plt.subplots(figsize=(max(6, 1.6 * len(vars_) + 2), 4.8))
    obj = study.objectives[0].column
    c = shown(rec[obj], obj)
    norm = plt.Normalize(np.nanmin(c), np.nanmax(c))
    cmap = plt.get_cmap("viridis")
    Y, ticks = [], []
    for v in vars_:
        if v.kind == "choice":
            codes = {name: i for i, name in enumerate(v.choices)}
            vals = np.array([codes.get(str(x), np.nan) for x in rec[v.name]], float)
            n = max(len(v.choices) - 1, 1)
            Y.append(vals / n)
            ticks.append((v.name, f"{v.choices[0]}", f"{v.choices[-1]}"))
            continue
        vals = rec[v.name].to_numpy(dtype=float)
        lo, hi = float(v.lower), float(v.upper)
        Y.append((vals - lo) / (hi - lo if hi > lo else 1.0))
        label, f, _ = display(v.name)
        ticks.append((label, f"{lo * f:.4g}", f"{hi * f:.4g}"))
    Y = np.column_stack(Y)
    x = np.arange(len(vars_))
    for i in range(len(Y)):
        ax.plot(x, Y[i], "-", color=cmap(norm(c[i])), alpha=0.7, lw=1.2)
    for k, (_label, lo, hi) in enumerate(ticks):
        ax.text(k, -0.06, lo, ha="center", va="top", fontsize=8)
        ax.text(k, 1.06, hi, ha="center", va="bottom", fontsize=8)
    ax.set_xticks(x, [t[0] for t in ticks], rotation=15, fontsize=9)
    ax.set_ylim(-0.15, 1.15)
    ax.set_yticks([0, 0.5, 1], ["lower bound", "", "upper bound"])
    sm = plt.cm.ScalarMappable(norm=norm, cmap=cmap)
    fig.colorbar(sm, ax=ax, label=_axis_label(obj))
    ax.set_title(f"{study.name}: design variables of the Pareto set ({len(Y)} designs)")
    fig.tight_layout()
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
