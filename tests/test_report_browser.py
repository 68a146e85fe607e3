"""report.html in a real browser: headless Chromium (Debian's ``chromium`` package).

The test copies the report, adds a probe (an error listener as the very first script of the
page, a check after the page has loaded as the last), loads it with no network use, and reads
the probe's result from the DOM (``--dump-dom``): no JavaScript error and nothing written to
``console.error``; every plot drawn with data (points or lines, a non-zero size); every
cross-section drawn; no resource fetched (Resource Timing is empty); the candidate table
sorts and a click on the Pareto plot finds its row. It then saves screenshots at 1280 x 720:
the top of the page and the Pareto front (earlier sections hidden, as if scrolled there).

Without /usr/bin/chromium the tests are skipped, unless ``FINFRONT_REQUIRE_BROWSER=1`` (CI sets
it), which makes a missing browser a failure. Set ``FINFRONT_SCREENSHOT_DIR`` to keep the
screenshots (CI artefacts); otherwise they stay in pytest's temporary folder.
"""

from __future__ import annotations

import html
import json
import os
import re
import shutil
import subprocess
import tempfile
from pathlib import Path

import pytest

from optim.api import run_study
from optim.report import write_report

CHROMIUM = Path(os.environ.get("FINFRONT_CHROMIUM", "/usr/bin/chromium"))  # or another build
ROOT = Path(__file__).resolve().parents[1]
# traps.md ("Report and browser"), plus /dev/shm off (small in containers) and no scrollbars
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-component-update", "--disable-sync", "--no-first-run",
         "--disable-dev-shm-usage", "--hide-scrollbars"]
VIRTUAL_TIME_MS = 20000  # virtual time for scripts and timers before the DOM is dumped

MISSING = (f"needs Debian's chromium at {CHROMIUM} (apt-get install "
           "--no-install-recommends chromium); .ci/run installs it")

pytestmark = pytest.mark.browser


@pytest.fixture(scope="module", autouse=True)
def chromium_present() -> None:
    if not CHROMIUM.exists():
        if os.environ.get("FINFRONT_REQUIRE_BROWSER") == "1":
            pytest.fail(f"FINFRONT_REQUIRE_BROWSER=1 but the browser is missing: {MISSING}")
        pytest.skip(MISSING)

PROBE_HEAD = """<script>
window.__probe = {errors: [], console: []};
window.addEventListener('error', function (e) {
  window.__probe.errors.push(String(e.message || e.type) + ' at ' + (e.filename || '?') + ':' +
                             (e.lineno || '?'));
}, true);
window.addEventListener('unhandledrejection', function (e) {
  window.__probe.errors.push('unhandled rejection: ' + String(e.reason));
});
(function () { var ce = console.error; console.error = function () {
  window.__probe.console.push(Array.prototype.join.call(arguments, ' '));
  return ce.apply(console, arguments); }; })();
</script>"""

PROBE_TAIL = """<script>
window.addEventListener('load', function () { setTimeout(function () {
  var plots = [];
  document.querySelectorAll('.plotly-graph-div').forEach(function (gd) {
    var box = gd.getBoundingClientRect();
    var lines = Array.prototype.filter.call(gd.querySelectorAll('.scatterlayer path.js-line'),
      function (p) { return (p.getAttribute('d') || '').length > 10; }).length;
    plots.push({id: gd.id, traces: (gd.data || []).length, drawn: !!gd._fullLayout,
                points: gd.querySelectorAll('.scatterlayer .point').length, lines: lines,
                width: box.width, height: box.height,
                xtitle: (gd.querySelector('.g-xtitle') || {}).textContent || '',
                ytitle: (gd.querySelector('.g-ytitle') || {}).textContent || ''});
  });
  var svgs = Array.prototype.map.call(document.querySelectorAll('svg.xsection'), function (s) {
    var b = s.getBBox(); return {width: b.width, height: b.height,
                                 paths: s.querySelectorAll('path').length}; });
  // sorting: click the mass heading twice
  var table = document.getElementById('candidate-table'), sorted = null;
  if (table) {
    var heads = table.tHead.rows[0].cells, col = -1;
    for (var i = 0; i < heads.length; i++) {
      if (heads[i].textContent.trim().indexOf('mass') === 0) { col = i; } }
    var read = function () { return Array.prototype.map.call(table.tBodies[0].rows,
      function (r) { return parseFloat(r.cells[col].getAttribute('data-v')); }); };
    heads[col].click(); var up = read(); heads[col].click(); var down = read();
    sorted = {up: up, down: down};
  }
  // a click on the Pareto plot highlights the design's row
  var gd = document.getElementById('pareto-front'), clicked = null;
  if (gd && gd.emit && table) {
    var id = table.tBodies[0].rows[table.tBodies[0].rows.length - 1].getAttribute('data-id');
    gd.emit('plotly_click', {points: [{customdata: id}]});
    clicked = {id: id, highlighted: document.getElementById('row-' + id).classList
                                           .contains('highlight')};
  }
  var out = document.createElement('pre');
  out.id = 'probe-result';
  out.textContent = JSON.stringify({errors: window.__probe.errors, console: window.__probe.console,
    plots: plots, svgs: svgs, sorted: sorted, clicked: clicked,
    resources: performance.getEntriesByType('resource').map(function (r) { return r.name; }),
    rows: table ? table.tBodies[0].rows.length : 0});
  document.body.appendChild(out);
}, 500); });
</script>"""


def _chromium(args: list[str], tmp: Path) -> subprocess.CompletedProcess:
    profile = tempfile.mkdtemp(prefix="chromium-", dir=tmp)
    try:
        return subprocess.run([str(CHROMIUM), *FLAGS, f"--user-data-dir={profile}", *args],
                              capture_output=True, text=True, timeout=180, check=False)
    finally:
        shutil.rmtree(profile, ignore_errors=True)


@pytest.fixture(scope="module")
def report_file(chromium_present, tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("browser") / "run"
    result = run_study(ROOT / "studies" / "quickstart.yaml", folder, progress="quiet",
                       plots=False, population=30, generations=10, seed=5)
    assert len(result.pareto) >= 3
    return write_report(result.folder)


def _with(report: Path, head: str = "", tail: str = "", css: str = "") -> Path:
    text = report.read_text(encoding="utf-8")
    text = text.replace("<head>", "<head>" + head, 1)
    text = text.replace("</head>", f"<style>{css}</style></head>", 1)
    text = text.replace("</body>", tail + "</body>", 1)
    out = report.with_name(f"probe-{abs(hash((head, tail, css))) % 10**8}.html")
    out.write_text(text, encoding="utf-8")
    return out


def test_report_runs_without_errors_and_draws_every_plot(report_file, tmp_path):
    probe = _with(report_file, PROBE_HEAD, PROBE_TAIL)
    done = _chromium([f"--virtual-time-budget={VIRTUAL_TIME_MS}", "--dump-dom",
                      probe.as_uri()], tmp_path)
    m = re.search(r'<pre id="probe-result">(.*?)</pre>', done.stdout, re.S)
    assert m, f"the probe did not report (exit {done.returncode}): {done.stderr[-2000:]}"
    res = json.loads(html.unescape(m.group(1)))
    assert res["errors"] == [], res["errors"]
    assert res["console"] == [], res["console"]
    assert res["resources"] == [], f"the page fetched {res['resources']}"
    plots = {p["id"]: p for p in res["plots"]}
    assert "pareto-front" in plots and "convergence" in plots
    assert sum(k.startswith("air-") for k in plots) >= 3
    assert sum(k.startswith("fin-") for k in plots) >= 3
    for pid, p in plots.items():
        assert p["drawn"] and p["traces"] > 0, f"plot {pid} not drawn"
        assert p["points"] + p["lines"] > 0, f"plot {pid} is empty"
        assert p["width"] > 300 and p["height"] > 300, f"plot {pid} has no size"
        assert "(" in p["xtitle"] and "(" in p["ytitle"], f"plot {pid}: axis without unit"
    assert len(res["svgs"]) == sum(k.startswith("fin-") for k in plots)
    for s in res["svgs"]:
        assert s["width"] > 300 and s["height"] > 200 and s["paths"] >= 3
    pareto_rows = len((report_file.parent / "pareto.csv").read_text().splitlines()) - 1
    assert res["rows"] == pareto_rows
    up, down = res["sorted"]["up"], res["sorted"]["down"]
    assert up == sorted(up) and down == sorted(down, reverse=True) and up != down
    assert res["clicked"]["highlighted"]


def _screenshot(page: Path, png: Path, tmp: Path) -> None:
    done = _chromium(["--window-size=1280,720", f"--virtual-time-budget={VIRTUAL_TIME_MS}",
                      f"--screenshot={png}", page.as_uri()], tmp)
    assert png.is_file(), f"no screenshot (exit {done.returncode}): {done.stderr[-2000:]}"


def test_screenshots_at_1280x720(report_file, tmp_path):
    from PIL import Image

    keep = os.environ.get("FINFRONT_SCREENSHOT_DIR")
    out_dir = Path(keep) if keep else tmp_path
    out_dir.mkdir(parents=True, exist_ok=True)
    top = out_dir / "report-top-1280x720.png"
    _screenshot(report_file, top, tmp_path)
    # "scrolled" to the Pareto front: the sections before it hidden
    front = _with(report_file, css="header.top, nav.toc, #study, #cautions { display:none }")
    front_png = out_dir / "report-front-1280x720.png"
    _screenshot(front, front_png, tmp_path)
    for png in (top, front_png):
        with Image.open(png) as im:
            assert im.size == (1280, 720)
            grey = im.convert("L")
            dark = sum(grey.histogram()[:128])  # pixels darker than mid-grey: text and lines
            assert dark > 2000, f"{png.name} looks blank"
            colours = len(im.convert("RGB").getcolors(maxcolors=1 << 24))
            assert colours > 50, f"{png.name} has almost no content"
