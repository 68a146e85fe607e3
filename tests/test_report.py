"""report.html of a run, and the CAD export of a run's design by its ID.

A small quickstart run (tiny budget) is made once into a temporary folder; the report is
checked as a reader and a meeting would use it, and against the run's own files:

- self-contained: no script, style sheet, image or frame is loaded from anywhere (every
  ``src``/``href`` is an in-page anchor or a data URI; no ``url()`` or ``@import`` in styles);
- the sections in their order, the cautions (with the accuracy band the correlations' authors
  state in models/channel_heat.py), one table row per Pareto design with its limiting
  constraint, the picked designs (knee and best of each objective, found here independently);
- every key number of every picked design equals its pareto.csv value to the precision shown
  (units converted by this test's own table);
- the cross-section is to scale, the operating point lies on both the fan and system curves;
- every published source cited in models/ docstrings is in the report's reference list;
- ``export_from_run`` writes DXF, JSON and CSV whose numbers are pareto.csv's.
"""

from __future__ import annotations

import ast
import math
import re
from html.parser import HTMLParser
from pathlib import Path

import ezdxf
import numpy as np
import pandas as pd
import pytest
from ezdxf import path as dxf_path

from optim.api import run_study
from optim.export_run import export_from_run
from optim.parameter_sheet import read_parameter_sheet_csv
from optim.report import write_report
from optim.report_run import RunMismatchError

ROOT = Path(__file__).resolve().parents[1]
QUICKSTART = ROOT / "studies" / "quickstart.yaml"
# The sections a reader finds, in order (ids of <section>), as the issue lists them.
EXPECTED_SECTIONS = ["study", "cautions", "front", "candidates", "picked", "progress",
                     "validity", "references"]
CFM_PER_M3S = 60.0 / 0.3048**3  # 1 ft = 0.3048 m exactly (international foot, 1959)


@pytest.fixture(scope="module")
def run(tmp_path_factory) -> Path:
    """A quickstart run with a tiny budget (a few seconds), plots off."""
    folder = tmp_path_factory.mktemp("report") / "run"
    result = run_study(QUICKSTART, folder, progress="quiet", plots=False, population=30,
                       generations=10, seed=5)
    assert len(result.pareto) >= 3, "the tiny run must give a front to report on"
    return result.folder


@pytest.fixture(scope="module")
def data(run):
    """The run folder as the report reads it (load_run: study, pareto, picks, curves' input)."""
    from optim.report_data import load_run

    return load_run(run)


@pytest.fixture(scope="module")
def report(run) -> tuple[Path, str, pd.DataFrame]:
    path = write_report(run)
    return path, path.read_text(encoding="utf-8"), pd.read_csv(run / "pareto.csv")


class _Tags(HTMLParser):
    """Collects start tags with their attributes, style text, and the text under each tag id."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.styles: list[str] = []
        self._in_style = False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._in_style = tag == "style"

    def handle_endtag(self, tag):
        if tag == "style":
            self._in_style = False

    def handle_data(self, data):
        if self._in_style:
            self.styles.append(data)


def _parse(html: str) -> _Tags:
    p = _Tags()
    p.feed(html)
    return p


def _text(html: str) -> str:
    """Visible text, roughly: tags removed, scripts and styles dropped."""
    html = re.sub(r"<(script|style)\b.*?</\1>", " ", html, flags=re.S)
    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))


def _between(html: str, start: str, end: str) -> str:
    i = html.index(start)
    return html[i: html.index(end, i)]


# ----------------------------------------------------------------------------- the page
def test_report_is_one_self_contained_file(report):
    path, html, _ = report
    assert path.name == "report.html" and path.parent.name == "run"
    tags = _parse(html)
    for tag, attrs in tags.tags:
        for key in ("src", "href", "data", "srcset", "poster"):
            value = (attrs.get(key) or "").strip()
            if key == "href" and tag == "a":
                assert value.startswith("#"), f"<a href={value!r}> leaves the page"
            elif value and tag != "svg":
                assert value.startswith("data:") or value.startswith("#"), \
                    f"<{tag} {key}={value!r}> loads something from outside the file"
        assert tag not in ("iframe", "link", "object", "embed"), f"<{tag}> in the report"
    scripts = [a for t, a in tags.tags if t == "script"]
    assert scripts and not any("src" in a for a in scripts), "every script must be inline"
    css = " ".join(tags.styles)
    assert "url(" not in css and "@import" not in css
    # plotly.js itself is inside (its version banner), so the plots draw offline
    assert re.search(r"plotly\.js v\d+\.\d+", html), "plotly.js is not inlined"
    assert not re.search(r"""<script[^>]+src=["']?https?:""", html)


def test_sections_in_order_with_titles(report):
    _, html, _ = report
    found = re.findall(r'<section id="([a-z]+)" class="report-section"', html)
    assert found == EXPECTED_SECTIONS
    for key in EXPECTED_SECTIONS:  # every section has its own heading and some content
        body = _between(html, f'<section id="{key}"', "</section>")
        assert re.search(r"<h2>[^<]{8,}</h2>", body), key
        assert len(_text(body)) > 200, f"section {key} is nearly empty"


def test_cautions_carry_the_stated_accuracy_and_the_safety_words(report):
    _, html, _ = report
    text = _text(_between(html, '<section id="cautions"', "</section>"))
    # models/channel_heat.py: the authors of the laminar channel model state +-10 %
    doc = (ROOT / "models" / "channel_heat.py").read_text(encoding="utf-8")
    stated = re.search(r"\+-(\d+) %", doc)
    assert stated, "models/channel_heat.py no longer states an accuracy"
    assert f"±{stated.group(1)} %" in text
    for words in ("prototype", "measured", "Touch-temperature", "product-safety standard",
                  "IEC 62368-1", "Local codes", "licensed engineering practice"):
        assert words in text, words


def test_candidate_table_has_one_row_per_pareto_design(report):
    _, html, pareto = report
    table = _between(html, '<table class="sortable candidates"', "</table>")
    rows = re.findall(r'<tr id="row-([^"]+)" data-id="[^"]+"[^>]*>(.*?)</tr>', table, re.S)
    assert [r[0] for r in rows] == pareto["design_id"].astype(str).tolist()
    # every row names its limiting constraint (pareto.csv's label, as the sort key)
    for (_, cells), lab in zip(rows, pareto["limiting_constraint"].astype(str), strict=True):
        assert f'data-v="{lab}"' in cells
    assert "table.sortable" in html and "aria-sort" in html  # the plain-JS sorter is there


def _knee(F: np.ndarray) -> int:
    """Knee: smallest sum of objectives scaled to [0, 1] on the front -- written here again
    (common practice, no source; the same definition as the report's)."""
    lo, hi = F.min(axis=0), F.max(axis=0)
    return int(np.argmin(((F - lo) / np.where(hi > lo, hi - lo, 1.0)).sum(axis=1)))


def test_picked_designs_are_the_knee_and_the_best_of_each_objective(report):
    _, html, pareto = report
    picked = re.findall(r'<article class="card pick" id="pick-([^"]+)"', html)
    F = pareto[["junction_temperature_K", "mass_kg"]].to_numpy(float)  # quickstart objectives
    expected = [_knee(F), int(np.argmin(F[:, 0])), int(np.argmin(F[:, 1]))]
    ids = pareto["design_id"].astype(str).to_numpy()
    assert picked == list(dict.fromkeys(ids[expected]))


# Units as shown -> (factor, offset) from the SI column: shown = SI * factor + offset.
# 1 m^3/s = 3600 m^3/h; degC = K - 273.15 (definitions); CFM from the international foot.
UNITS = {"mm": (1e3, 0.0), "°C": (1.0, -273.15), "g": (1e3, 0.0), "kg": (1.0, 0.0),
         "K": (1.0, 0.0), "K/W": (1.0, 0.0), "Pa": (1.0, 0.0), "m³/h": (3600.0, 0.0),
         "m/s": (1.0, 0.0), "W/(m²·K)": (1.0, 0.0), "cm²": (1e4, 0.0), "W": (1.0, 0.0),
         "%": (100.0, 0.0), "": (1.0, 0.0)}


def test_key_numbers_of_picked_designs_equal_pareto_csv(report):
    _, html, pareto = report
    by_id = pareto.set_index(pareto["design_id"].astype(str))
    checked = 0
    for did in re.findall(r'<article class="card pick" id="pick-([^"]+)"', html):
        card = _between(html, f'id="pick-{did}"', "</article>")
        row = by_id.loc[did]
        cells = re.findall(r'<td class="num" data-col="([^"]+)">([-0-9.]+) '
                           r'<span class="unit">([^<]*)</span>', card)
        assert len(cells) >= 25, f"{did}: too few key numbers ({len(cells)})"
        for col, text, unit in cells:
            factor, offset = UNITS[unit]
            expected = float(row[col]) * factor + offset
            decimals = len(text.split(".")[1]) if "." in text else 0
            # shown to `decimals` places: rounding leaves at most half a unit of the last place
            assert abs(float(text) - expected) <= 0.5 * 10.0**-decimals * (1 + 1e-9), \
                f"{did} {col}: shows {text} {unit}, pareto.csv gives {expected}"
            checked += 1
        cfm = re.search(r'<span data-col="flow_CFM">([0-9.]+)</span>', card).group(1)
        d = len(cfm.split(".")[1]) if "." in cfm else 0
        assert abs(float(cfm) - row["flow_m3_per_s"] * CFM_PER_M3S) <= 0.5 * 10.0**-d * 1.000001
        assert abs(float(cfm) - row["flow_CFM"]) <= 0.5 * 10.0**-d * 1.000001
    assert checked >= 75


def test_cross_section_is_drawn_to_scale(report):
    _, html, pareto = report
    did = re.findall(r'<article class="card pick" id="pick-([^"]+)"', html)[0]
    row = pareto.set_index(pareto["design_id"].astype(str)).loc[did]
    svg = _between(_between(html, f'id="pick-{did}"', "</article>"), "<svg", "</svg>")
    d = re.search(r'<path d="([^"]+)"', svg).group(1)  # the main view's outline, first path
    nums = np.array([float(v) for v in re.findall(r"-?\d+\.?\d*", d)])
    # M/L give x y pairs; A gives rx ry rot large sweep x y: take the end points only
    pts = []
    for _cmd, args in re.findall(r"([MLA])([^MLAZ]+)", d):
        v = [float(a) for a in args.split()]
        pts.append(v[-2:])
    pts = np.array(pts)
    assert nums.size > 100
    width_px = np.ptp(pts[:, 0])
    height_px = np.ptp(pts[:, 1])
    # one scale for x and y: the drawn aspect ratio is the profile's (base width / overall
    # height); end points miss only the top of the tip rounds (a fraction of a mm)
    ratio = row["base_width_m"] / row["overall_height_m"]
    assert width_px / height_px == pytest.approx(ratio, rel=0.02)
    for label in (f"{row['base_width_mm']:.2f}", f"{row['overall_height_mm']:.2f}"):
        assert f">{label}</text>" in svg, label  # dimensioned in mm, as the DXF does


def test_operating_point_is_on_both_curves(data):
    """The operating point is where the fan curve meets the system curve (definition;
    ASHRAE Handbook, HVAC Systems and Equipment, chapter Fans -- recalled from memory)."""
    from optim.report_curves import air_curves
    from optim.report_run import take

    picks = data.picks
    curves = air_curves(data.study, take(data.designs, [p.index for p in picks]),
                        [p.row for p in picks])
    from models.fan import fan_model, fan_pressure
    from optim.report_curves import inlet_density

    cond = data.study.scenarios[0].conditions
    for p, c in zip(picks, curves, strict=True):
        fan = fan_model(cond.supply.fans[int(p.row["fan_index"])], inlet_density(cond))
        # fan side: the root finder's tolerance (1e-6 relative is far looser than it)
        assert float(fan_pressure(fan, c.op_flow)) == pytest.approx(c.op_pressure, rel=1e-6)
        # system side: the drawn curve, linearly interpolated between 48 flows (2 %)
        p_sys = np.interp(c.op_flow, c.system_flow, c.system_pressure)
        assert p_sys == pytest.approx(c.op_pressure, rel=0.02)


def test_fin_profile_averages_to_the_fin_efficiency(data):
    """For a longitudinal fin with an adiabatic tip the efficiency is the mean excess
    temperature over the fin height, eta = (1/L) int theta/theta_b dx (definition;
    Incropera et al., 6th ed., Sec. 3.6.4, recalled from memory). The quickstart fins are
    shrouded (adiabatic tips); trapezoid rule on 401 points: 1e-4."""
    from optim.report_curves import fin_profile

    for p in data.picks:
        prof = fin_profile(data.study, p.design, p.row, points=401)
        theta = (prof.temperature_K - prof.air_K) / (prof.base_K - prof.air_K)
        eta = np.trapezoid(theta, prof.distance_mm) / prof.distance_mm[-1]
        assert eta == pytest.approx(float(p.row["fin_efficiency"]), abs=1e-4)


# ----------------------------------------------------------------------------- references
_CITED = re.compile(r"\b([A-Z][a-z]+(?:-[A-Z][a-z]+)?)\b[^()\n.;]{0,30}?\(?\b(19\d\d|20[0-2]\d)\b")


def _cited_names() -> set[str]:
    """Capitalised names followed closely by a year in the Source/References paragraphs of
    every models/ docstring (a deliberately loose net)."""
    names: set[str] = set()
    for path in sorted((ROOT / "models").glob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        docs = [ast.get_docstring(tree) or ""]
        docs += [ast.get_docstring(n) or "" for n in ast.walk(tree)
                 if isinstance(n, (ast.FunctionDef, ast.ClassDef))]
        for doc in docs:
            for m in re.finditer(r"(?:Source|References?)\b(.*?)(?:\n\s*\n|\Z)", doc, re.S):
                names |= {n for n, _ in _CITED.findall(" ".join(m.group(1).split()))}
    return names


def test_every_source_cited_in_the_models_is_listed(report):
    _, html, _ = report
    refs = _text(_between(html, '<section id="references"', "</section>"))
    # words the net catches that are not sources ("Chosen over Shah's (1978)", "February
    # 2004", "Kc, Ke: Kays & London (1984)", "Re = 2300 ... (Gnielinski 2013)")
    names = _cited_names() - {"Chosen", "February", "Kc", "Ke", "Re"}
    assert {"Muzychka", "Gnielinski", "Petukhov", "Shah", "Kays"} <= names  # the net works
    missing = sorted(n for n in names if n not in refs)
    assert not missing, f"cited in models/ but not in optim/report_text.py REFERENCES: {missing}"


# ----------------------------------------------------------------------------- empty front
def test_report_of_an_empty_front_still_has_every_section(tmp_path):
    study = ROOT / "studies" / "quickstart.yaml"
    text = study.read_text(encoding="utf-8").replace('max_mass: "1.5 kg"', 'max_mass: "10 g"')
    assert 'max_mass: "10 g"' in text
    src = tmp_path / "impossible.yaml"
    src.write_text(text, encoding="utf-8")
    result = run_study(src, tmp_path / "run", progress="quiet", plots=False, population=10,
                       generations=1)
    assert len(result.pareto) == 0
    html = write_report(result.folder).read_text(encoding="utf-8")
    assert re.findall(r'<section id="([a-z]+)" class="report-section"', html) == \
        EXPECTED_SECTIONS
    assert "front is empty" in html


# ----------------------------------------------------------------------------- export
def test_export_from_run_matches_pareto_csv(run, tmp_path):
    pareto = pd.read_csv(run / "pareto.csv")
    row = pareto.iloc[len(pareto) // 2]
    did = str(row["design_id"])
    out = export_from_run(run, int(did[1:]), tmp_path / "cad", formats=("dxf", "json", "csv"))
    assert set(out) == {"dxf", "json", "csv"}
    assert out["json"].name == f"{did}_parameters.json"
    import json

    sheets = [json.loads(out["json"].read_text(encoding="utf-8")),
              read_parameter_sheet_csv(out["csv"])]
    for sheet in sheets:
        assert sheet["design_id"] == did
        for key in ("mass_kg", "sink_resistance_K_per_W", "total_resistance_K_per_W",
                    "pressure_drop_Pa", "flow_m3_per_s"):
            # the same model on the same design; one design alone repeats the run's
            # population to ~1e-12 (measured), 1e-9 allows for summation order
            assert sheet[key] == pytest.approx(float(row[key]), rel=1e-9), key
        assert sheet["fin_count"] == int(row["fin_count"])
        assert sheet["fin_height_mm"] == pytest.approx(float(row["fin_height_mm"]), rel=1e-9)
    doc = ezdxf.readfile(out["dxf"])
    msp = doc.modelspace()
    outline = [e for e in msp if e.dxf.layer == "PROFILE_OUTLINE"]
    assert len(outline) == 1 and outline[0].closed
    pts = np.array([(v.x, v.y) for v in dxf_path.make_path(outline[0]).flattening(0.0005)])
    area_mm2 = 0.5 * abs(np.dot(pts[:-1, 0], pts[1:, 1]) - np.dot(pts[1:, 0], pts[:-1, 1]))
    density = float(sheets[0]["density_kg_per_m3"])
    drawn_mass = area_mm2 * 1e-6 * float(row["flow_length_m"]) * density
    # the consistency rule: drawn area x length x density within 1 % of the model
    assert drawn_mass == pytest.approx(float(row["mass_kg"]), rel=0.01)
    texts = " ".join(e.dxf.text for e in msp.query("TEXT") if e.dxf.layer == "DESIGN_DATA")
    assert f"Design: {did}" in texts
    shown = float(re.search(r"Mass: ([0-9.]+) kg", texts).group(1))  # 4 significant digits
    assert shown == pytest.approx(float(row["mass_kg"]), rel=5e-4)


def test_export_from_run_rejects_unknown_ids_and_a_changed_study(run, tmp_path):
    with pytest.raises(KeyError, match="D999"):
        export_from_run(run, "D999", tmp_path / "x")
    copy = tmp_path / "changed"
    copy.mkdir()
    for name in ("pareto.csv", "log.txt"):
        (copy / name).write_bytes((run / name).read_bytes())
    text = (run / "study.yaml").read_text(encoding="utf-8")
    changed = text.replace("fin_taper_ratio: 0.7", "fin_taper_ratio: 0.6")
    assert changed != text
    (copy / "study.yaml").write_text(changed, encoding="utf-8")
    with pytest.raises(RunMismatchError, match="fin_thickness_tip_m"):
        export_from_run(copy, "D001", tmp_path / "y", formats=("json",))
    assert not (tmp_path / "y").exists() or not any((tmp_path / "y").iterdir())


def test_report_numbers_and_export_numbers_agree(report, run, tmp_path):
    """The sheet a CAD user receives shows the numbers the meeting saw (same rounding)."""
    from optim.report_format import show

    _, html, pareto = report
    did = re.findall(r'<article class="card pick" id="pick-([^"]+)"', html)[0]
    card = _between(html, f'id="pick-{did}"', "</article>")
    sheet = read_parameter_sheet_csv(export_from_run(run, did, tmp_path, formats=("csv",))["csv"])
    for col in ("mass_kg", "sink_resistance_K_per_W", "total_resistance_K_per_W",
                "pressure_drop_Pa"):
        text, unit = show(col, sheet[col])
        assert f'data-col="{col}">{text} <span class="unit">{unit}</span>' in card, col
    assert math.isfinite(sheet["junction_temperature_K"])


def test_pareto_plot_background_is_dominated_by_the_front(data):
    """Every feasible design evaluated is weakly dominated by a design on the front
    (definition of the Pareto front of minimised objectives), also as drawn: the grey
    background and the coloured front share each axis's unit."""
    from optim.report_charts import pareto_figure

    fig = pareto_figure(data.pareto, data.study, data.background, data.picks)
    bg = [t for t in fig.data if t.name == "other feasible designs evaluated"]
    front = [t for t in fig.data if str(t.name).startswith("limited by")]
    assert bg and front and len(bg[0].x) > 10
    fx = np.concatenate([np.asarray(t.x, float) for t in front])
    fy = np.concatenate([np.asarray(t.y, float) for t in front])
    bx, by = np.asarray(bg[0].x, float), np.asarray(bg[0].y, float)
    tol_x, tol_y = 1e-9 * np.ptp(fx), 1e-9 * np.ptp(fy)
    dominated = [np.any((fx <= x + tol_x) & (fy <= y + tol_y)) for x, y in zip(bx, by,
                                                                               strict=True)]
    assert all(dominated), f"{dominated.count(False)} background points beat the front"
