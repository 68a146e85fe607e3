"""Parallel coordinates of the Pareto set's design variables (``design_space`` figure).

Each free design variable is one vertical axis from its lower to its upper bound (a choice
variable: its choices in order); each design on the front is one line, coloured by the first
objective, the best drawn on top. A variable with one value across the front is named in the
title instead of drawn.
"""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from optim.plot_style import (  # noqa: E402
    axis_spec,
    count_designs,
    new_figure,
    save_figure,
    styled,
    wrap,
)
from optim.problem import HeatSinkProblem  # noqa: E402
from optim.report_format import PALETTE, words  # noqa: E402
from optim.runfolder import RunFolder  # noqa: E402


@styled
def plot_design_space(folder: RunFolder, problem: HeatSinkProblem, pareto: pd.DataFrame) -> None:
    """Save the ``design_space`` figure of the Pareto table (nothing without free variables)."""
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
    fig, ax = new_figure()
    obj = study.objectives[0]
    f, off, ctitle = axis_spec(obj.column, rec[obj.column], obj.sense, two_lines=True)
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
        fac, _, title = axis_spec(v.name)
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
    ax.set_xticks(x, [wrap(n, 16) for n in names])
    ax.set_xlim(-0.35, len(shown_vars) - 0.65)
    ax.set_ylim(-0.17, 1.17)
    ax.set_yticks([0, 1], ["lower\nbound", "upper\nbound"])
    ax.grid(axis="x", visible=False)
    if spread:
        sm = plt.cm.ScalarMappable(norm=norm, cmap=cmap)
        fig.colorbar(sm, ax=ax, label=ctitle, pad=0.02)
    title = f"{study.name}: design variables of the Pareto set ({count_designs(len(Y))})"
    if same:
        title += "\nevery design on the front has " + ", ".join(same)
    fig.suptitle(title)
    save_figure(fig, folder, "design_space")
