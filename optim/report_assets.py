"""Style sheet and scripts of the report, inlined into the page (nothing is fetched).

Sizes are chosen for a projector at 1280 x 720: body text 18 px, tables 16 px, nothing below
15 px; dark text on white.
"""

from __future__ import annotations

CSS = """
:root { --ink:#111111; --line:#b9c0ca; --head:#e6ecf4; --accent:#0b3d91; }
html { font-size:18px; }
body { margin:0; font-family:"Segoe UI", Helvetica, Arial, sans-serif; color:var(--ink);
  background:#ffffff; line-height:1.45; }
main { max-width:1240px; margin:0 auto; padding:14px 20px 60px; }
header.top h1 { font-size:30px; margin:6px 0 2px; }
header.top p { margin:2px 0; font-size:17px; }
h2 { font-size:26px; margin:40px 0 12px; padding-bottom:4px;
  border-bottom:3px solid var(--accent); }
h3 { font-size:22px; margin:22px 0 8px; }
p, li { font-size:18px; }
code { font-size:16px; }
.note { font-size:16px; color:#333333; }
table { border-collapse:collapse; font-size:16px; margin:6px 0 10px; }
th, td { border:1px solid var(--line); padding:4px 8px; text-align:left; vertical-align:top; }
thead th { background:var(--head); font-weight:600; }
td.num, th.num { text-align:right; font-variant-numeric:tabular-nums; white-space:nowrap; }
table.kv th { font-weight:normal; background:#f6f8fb; }
table.kv td.num { font-weight:600; }
table.keynums { width:100%; }
table.keynums caption { text-align:left; font-weight:700; font-size:17px; padding:4px 0; }
.unit { font-weight:normal; color:#333333; }
nav.toc ol { columns:2; font-size:17px; margin:6px 0; }
.banner { background:#fde2e1; border-left:8px solid #b3261e; padding:8px 14px; }
.caution { background:#fff3df; border-left:8px solid #b85400; padding:6px 16px; }
.caution li { margin:6px 0; }
.chip { display:inline-block; width:15px; height:15px; border-radius:3px; margin-right:7px;
  vertical-align:-2px; border:1px solid #222222; }
.tag { display:inline-block; font-size:15px; background:#0b3d91; color:#ffffff;
  border-radius:3px; padding:0 5px; margin-left:4px; white-space:nowrap; }
.table-wrap { max-height:72vh; overflow:auto; border:1px solid var(--line); position:relative; }
.table-wrap table { margin:0; }
.table-wrap thead th { position:sticky; top:0; z-index:2; cursor:pointer; user-select:none; }
.table-wrap thead th:focus { outline:3px solid #e69f00; }
th[aria-sort=ascending]::after { content:" \\25B2"; }
th[aria-sort=descending]::after { content:" \\25BC"; }
tr.picked td { background:#eef3ff; }
table.candidates td { white-space:nowrap; }
table.candidates { font-size:15px; }
table.candidates td.limit { white-space:normal; min-width:150px; }
.where { font-size:15px; color:#333333; }
table.candidates th, table.candidates td { padding:4px 6px; }
.star { color:#0b3d91; font-size:18px; }
tr.highlight td { background:#ffe98a; }
.card { border:2px solid var(--line); border-radius:6px; padding:8px 16px 12px;
  margin:18px 0 30px; }
.card h3 { margin-top:8px; }
.card-grid { display:grid; grid-template-columns:620px 1fr; gap:22px; align-items:start; }
.chart-grid { display:grid; grid-template-columns:1fr 1fr; gap:22px; }
.keys-3 { display:grid; grid-template-columns:1fr 1fr 1fr; gap:18px; align-items:start; }
figure { margin:0; }
figcaption { font-size:16px; color:#222222; margin-top:4px; }
svg.xsection { display:block; max-width:none; }
@media (max-width:1200px) { .card-grid, .chart-grid, .keys-3 { grid-template-columns:1fr; } }
@media print { .table-wrap { max-height:none; overflow:visible; } .card { break-inside:avoid; } }
"""

# First script of the page: find a row of the candidate table from a Pareto-plot click.
HEAD_JS = """
window.finfrontShowRow = function (id) {
  var row = document.getElementById('row-' + id);
  if (!row) { return; }
  document.querySelectorAll('tr.highlight').forEach(function (r) {
    r.classList.remove('highlight'); });
  row.classList.add('highlight');
  var wrap = row.closest('.table-wrap');
  if (wrap) { wrap.scrollTop = row.offsetTop - wrap.clientHeight / 2; }
};
"""

# Last script of the page: sortable tables (click or Enter on a heading).
SORT_JS = """
(function () {
  function key(cell, numeric) {
    var v = cell.getAttribute('data-v');
    if (v === null) { v = cell.textContent.trim(); }
    if (numeric) { var x = parseFloat(v); return isNaN(x) ? Infinity : x; }
    return v.toLowerCase();
  }
  document.querySelectorAll('table.sortable').forEach(function (table) {
    var heads = table.tHead.rows[0].cells;
    Array.prototype.forEach.call(heads, function (th, col) {
      th.tabIndex = 0;
      th.title = 'sort by this column';
      function sort() {
        var asc = th.getAttribute('aria-sort') !== 'ascending';
        Array.prototype.forEach.call(heads, function (h) { h.removeAttribute('aria-sort'); });
        th.setAttribute('aria-sort', asc ? 'ascending' : 'descending');
        var numeric = th.classList.contains('num');
        var body = table.tBodies[0];
        var rows = Array.prototype.slice.call(body.rows);
        rows.sort(function (a, b) {
          var x = key(a.cells[col], numeric), y = key(b.cells[col], numeric);
          return x < y ? (asc ? -1 : 1) : (x > y ? (asc ? 1 : -1) : 0);
        });
        rows.forEach(function (r) { body.appendChild(r); });
      }
      th.addEventListener('click', sort);
      th.addEventListener('keydown', function (e) {
        if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); sort(); }
      });
    });
  });
})();
"""

# Run after the Pareto plot is drawn (plotly's post_script): clicks find the table row.
PARETO_CLICK_JS = """
var gd = document.getElementById('{plot_id}');
gd.on('plotly_click', function (ev) {
  var p = ev && ev.points && ev.points[0];
  if (p && p.customdata) { window.finfrontShowRow(p.customdata); }
});
"""
