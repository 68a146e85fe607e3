"""House style of the run's figures (matplotlib, Agg backend) and the helpers every figure
uses: a 16:9 figure, saving as PNG and SVG in ``<run>/plots/``, wrapped text, axis units.

The figures are 16:9 (10.7 x 6 in, saved at 150 dpi) so that a 1280 x 720 projector shows them
whole; text is 12 pt or more, legends 11 pt. Axes are in engineering units: mm, degC, Pa,
m^3/h (and CFM), g or kg, in the report's words (``optim.report_format``).
"""

from __future__ import annotations

import functools
import textwrap
from collections.abc import Callable
from typing import Any

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from optim.report_format import axis_title, unit_of, words  # noqa: E402
from optim.runfolder import RunFolder  # noqa: E402

FIGSIZE = (10.67, 6.0)  # inches, 16:9
DPI = 150
STYLE = {
    "font.size": 12, "axes.titlesize": 13, "axes.labelsize": 12, "xtick.labelsize": 12,
    "ytick.labelsize": 12, "legend.fontsize": 11, "legend.title_fontsize": 11,
    "figure.titlesize": 15, "axes.grid": True, "grid.alpha": 0.3, "svg.fonttype": "path",
    "legend.framealpha": 0.92,
}


def styled(func: Callable[..., Any]) -> Callable[..., Any]:
    """Draw ``func``'s figure with the house style (rc settings do not leak to the caller)."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        with plt.rc_context(STYLE):
            return func(*args, **kwargs)

    return wrapper


def new_figure(**kwargs: Any) -> tuple[Any, Any]:
    """(figure, axes) of ``plt.subplots`` at the house size and dpi, constrained layout."""
    kwargs.setdefault("figsize", FIGSIZE)
    return plt.subplots(layout="constrained", dpi=DPI, **kwargs)


def save_figure(fig: Any, folder: RunFolder, name: str) -> None:
    """Write ``fig`` as ``<run>/plots/<name>.png`` and ``.svg``, then close it."""
    folder.plots_dir.mkdir(exist_ok=True)
    for ext in ("png", "svg"):
        fig.savefig(folder.plots_dir / f"{name}.{ext}", dpi=DPI)
    plt.close(fig)


def wrap(text: str, width: int) -> str:
    """``text`` wrapped to lines of at most ``width`` characters (never split at hyphens)."""
    return "\n".join(textwrap.wrap(text, width, break_on_hyphens=False)) or text


def axis_spec(column: str, values=None, sense: str | None = None,
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


def count_designs(n: int) -> str:
    """'1 design', '7 designs'."""
    return f"{n} design" if n == 1 else f"{n} designs"


def message_figure(folder: RunFolder, name: str, title: str, text: str) -> None:
    """Save figure ``name`` as a titled text message (for a figure with nothing to draw)."""
    fig, ax = new_figure()
    ax.text(0.5, 0.5, wrap(text, 60), ha="center", va="center", transform=ax.transAxes,
            fontsize=14)
    ax.set_axis_off()
    fig.suptitle(title)
    save_figure(fig, folder, name)
