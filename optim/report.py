"""``report.html``: one self-contained page for the design review of a run.

::

    from optim.report import write_report
    write_report(Path("runs/quickstart-20261201-2307"))   # -> .../report.html

The page holds its scripts, styles and figures (plotly.js is inlined once, about 4.8 MB; the
cross-sections are inline SVG), so it opens with no network. Its sections, in order:

1. ``study``      what was studied: study, run, budget, scenarios, sources, fans, materials;
2. ``cautions``   the model's accuracy band, prototype, safety standard, codes and practice;
3. ``front``      the Pareto front, interactive, coloured by limiting constraint;
4. ``candidates`` every design on the front in a sortable table, with its limiting constraint;
5. ``picked``     up to five designs (knee, best of each objective): cross-section to scale,
                  fan and system curves, fin temperature profile, key numbers;
6. ``progress``   how the search converged;
7. ``validity``   designs outside a correlation's published range, per scenario;
8. ``references`` the published sources of the model's equations.
"""

from __future__ import annotations

from pathlib import Path

from optim.atomic import atomic_write_text
from optim.report_assets import CSS, HEAD_JS, PARETO_CLICK_JS, SORT_JS
from optim.report_charts import convergence_figure, pareto_figure, to_div
from optim.report_data import RunData, load_run
from optim.report_format import esc, words
from optim.report_picks import picks_section
from optim.report_sections import (
    candidates_section,
    cautions_section,
    references_section,
    section,
    summary_section,
    validity_section,
)

REPORT_NAME = "report.html"
SECTIONS = (
    ("study", "What was studied"),
    ("cautions", "Read this before using the numbers"),
    ("front", "Best trade-offs found"),
    ("candidates", "All candidates on the front"),
    ("picked", "Designs picked for discussion"),
    ("progress", "How the search went"),
    ("validity", "Designs outside the published ranges"),
    ("references", "Where the model's equations come from"),
)


def write_report(run_folder: Path) -> Path:
    """Write ``report.html`` into a finished run folder and return its path.

    Reads the folder's ``study.yaml``, ``pareto.csv``, ``convergence.csv``, ``log.txt`` and
    (if present) ``evaluated.csv.gz``; evaluates the Pareto designs again with the model for the
    curves and the per-scenario validity flags. The file is written atomically (a temporary
    file renamed over it). Raises ``FileNotFoundError`` for a folder without study.yaml or
    pareto.csv.
    """
    folder = Path(run_folder)
    data = load_run(folder)
    html = render(data)
    path = folder / REPORT_NAME
    return atomic_write_text(path, html)


def front_section(d: RunData) -> str:
    if len(d.pareto) == 0:
        return section("front", "Best trade-offs found",
                       "<p>No evaluated design met every constraint in every scenario: the "
                       "front is empty.</p>")
    fig = pareto_figure(d.pareto, d.study, d.background, d.picks)
    m = len(d.study.objectives)
    height = 620 if m <= 2 else 430 * ((m * (m - 1) // 2 + 2) // 3) + 120
    plot = to_div(fig, "pareto-front", height, post_script=PARETO_CLICK_JS)
    objs = " and ".join(esc(words(o.column)) for o in d.study.objectives)
    text = (f"<p>Each coloured point is a design on the Pareto front of {objs}: no other design "
            "evaluated is better in one objective without being worse in another. Its colour "
            "says which limit stops it from improving further (the constraint with the smallest "
            "margin). Grey points are other designs that met every limit. Hover over a point "
            "for its sizes and results; click it to find it in the table below.</p>")
    return section("front", "Best trade-offs found", text + plot)


def progress_section(d: RunData) -> str:
    conv = d.convergence
    if len(conv) == 0 or "hypervolume" not in conv:
        return section("progress", "How the search went",
                       "<p>No convergence record (convergence.csv) was found.</p>")
    last = conv.iloc[-1]
    text = (f"<p>The hypervolume measures how much of the objective space the best front so far "
            "dominates, scaled so that the final front's ideal and worst points are 0 and 1; a "
            "curve that has flattened means more generations would add little. Last generation: "
            f"{int(last['generation'])}, {int(last['evaluations'])} designs evaluated, "
            f"hypervolume {float(last['hypervolume']):.3f}, "
            f"{100 * float(last['feasible_fraction']):.0f} % of its designs feasible.</p>")
    if d.stop_line:
        text += f'<p class="note">From the log: {esc(d.stop_line)}</p>'
    return section("progress", "How the search went",
                   text + to_div(convergence_figure(conv), "convergence", 430))


def _toc() -> str:
    items = "".join(f'<li><a href="#{k}">{esc(t)}</a></li>' for k, t in SECTIONS)
    return f'<nav class="toc" aria-label="contents"><ol>{items}</ol></nav>'


def render(d: RunData) -> str:
    """The whole page as one string."""
    from plotly.offline import get_plotlyjs

    plotly_js = get_plotlyjs().replace("</script", "<\\/script")
    banner = ""
    if d.mismatch:
        banner = (f'<p class="banner"><b>The model no longer reproduces this run\'s numbers.</b> '
                  f"{esc(d.mismatch)} Figures drawn from the model may disagree with the "
                  "tables; run the study again.</p>")
    body = "".join((
        summary_section(d), cautions_section(), front_section(d), candidates_section(d),
        picks_section(d), progress_section(d), validity_section(d), references_section(),
    ))
    title = f"Heat-sink design review: {d.study.name}"
    return (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        '<meta name="viewport" content="width=device-width, initial-scale=1">'
        f"<title>{esc(title)}</title><style>{CSS}</style>"
        f"<script>{HEAD_JS}</script><script>{plotly_js}</script></head>"
        f'<body><main><header class="top"><h1>{esc(title)}</h1>'
        f"<p>Run folder <code>{esc(d.folder.name)}</code> · {len(d.pareto)} designs on the "
        f"front · all values from the model, nominal scenario unless stated</p></header>"
        f"{banner}{_toc()}{body}</main><script>{SORT_JS}</script></body></html>\n"
    )
