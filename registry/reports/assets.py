"""The CSS and JavaScript inlined into every report page (no CDN, no web fonts, no server).

The script is plain ES5-level JavaScript so any browser a group has can run it from a shared
folder (``file://``). It does three things: records script errors into ``#page-errors`` (so a
broken page says so, and tests can see it), filters the measurement table as one types, and
sorts it when a column header is clicked. ``#q=text`` in the address pre-fills the filter, so a
filtered view can be shared as a link.
"""

from __future__ import annotations

from registry.reports.theme import CSS_VARIABLES

CSS = (
    """
:root {"""
    + CSS_VARIABLES
    + """}
* { box-sizing: border-box; }
html { background: var(--paper); }
body { margin: 0; color: var(--ink); background: var(--paper);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "DejaVu Sans",
    sans-serif; }
a { color: var(--data); }
a:hover { color: var(--fit); }
header.band { background: var(--head); color: #f3efe4; padding: 18px 28px 14px;
  border-bottom: 4px solid var(--fit); }
header.band h1 { margin: 0; font-size: 21px; font-weight: 650; letter-spacing: .01em; }
header.band .sub { color: #c9d3cf; font-size: 13px; margin-top: 2px; }
header.band a { color: #f3efe4; }
main { padding: 20px 28px 40px; max-width: 1320px; }
.chips { display: flex; flex-wrap: wrap; gap: 10px; margin: 0 0 16px; padding: 0; list-style: none; }
.chips li { background: var(--panel); border: 1px solid var(--rule); border-radius: 14px;
  padding: 3px 12px; font-size: 13px; }
.chips b { color: var(--data); }
.tools { display: flex; gap: 14px; align-items: center; margin: 6px 0 10px; flex-wrap: wrap; }
.tools input[type=search] { font: inherit; padding: 6px 10px; min-width: 320px;
  border: 1px solid var(--muted); border-radius: 6px; background: var(--panel); color: var(--ink); }
.tools input[type=search]:focus { outline: 2px solid var(--data); outline-offset: 1px; }
.count { color: var(--muted); font-size: 13px; }
table.grid { border-collapse: collapse; width: 100%; background: var(--panel);
  border: 1px solid var(--rule); font-size: 13.5px; }
table.grid th, table.grid td { padding: 5px 9px; border-bottom: 1px solid var(--rule);
  text-align: left; vertical-align: top; }
table.grid td.num, table.grid th.num { text-align: right; font-variant-numeric: tabular-nums; }
table.grid thead th { position: sticky; top: 0; background: #efe9dc; z-index: 1; }
table.grid thead th button { all: unset; cursor: pointer; font-weight: 650; color: var(--ink); }
table.grid thead th button:focus-visible { outline: 2px solid var(--data); }
table.grid thead th[aria-sort=ascending] button::after { content: " \\25B4"; color: var(--fit); }
table.grid thead th[aria-sort=descending] button::after { content: " \\25BE"; color: var(--fit); }
table.grid tbody tr:nth-child(even) { background: #fcfaf5; }
table.grid tbody tr:hover { background: #f4efe3; }
.badge { display: inline-block; padding: 0 7px; border-radius: 9px; font-size: 12px;
  border: 1px solid var(--rule); background: #f6f2e8; }
.badge.reviewed { background: #e1efe9; border-color: #a9cdbf; }
.badge.flagged { background: #f8e3d6; border-color: #e3b191; }
table.grid tbody tr.flagged td:first-child { box-shadow: inset 3px 0 0 var(--warn); }
.flag-note { color: var(--warn); }
.badge.retracted { background: #ececec; border-color: #c8c8c8; text-decoration: line-through; }
.badge.error { background: #f6dcd7; border-color: #d59a90; color: var(--warn); }
.badge.warning { background: #f8ecd2; border-color: #e2c27e; }
.badge.info { background: #e4ecf3; border-color: #a8bfd3; }
.muted { color: var(--muted); }
.small { font-size: 12.5px; }
section.card { background: var(--panel); border: 1px solid var(--rule); border-radius: 8px;
  padding: 14px 18px; margin: 16px 0; }
section.card h2, section.card h3 { margin: 0 0 8px; font-size: 16px; }
section.card h3 { margin-top: 14px; }
.compound-head { display: grid; grid-template-columns: 340px 1fr; gap: 22px; align-items: start; }
figure.structure { margin: 0; background: var(--panel); border: 1px solid var(--rule);
  border-radius: 8px; min-height: 240px; display: flex; align-items: center;
  justify-content: center; }
figure.structure svg { display: block; max-width: 100%; height: auto; }
.structure-missing { padding: 24px; color: var(--muted); text-align: center; font-size: 13px; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; margin: 0; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
code { font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: 12.5px; }
ul.findings { list-style: none; padding: 0; margin: 6px 0 0; }
ul.findings li { border-left: 3px solid var(--rule); padding: 4px 10px; margin: 6px 0; }
ul.findings li.error { border-color: var(--warn); }
ul.findings li.warning { border-color: #d6a648; }
figure.plot { margin: 10px 0 0; }
figure.plot img { max-width: 640px; max-height: 460px; width: auto; height: auto;
  border: 1px solid var(--rule); border-radius: 6px; }
figure.plot figcaption { font-size: 12.5px; color: var(--muted); }
#page-errors { background: #f6dcd7; color: var(--warn); padding: 8px 12px; white-space: pre-wrap;
  border: 1px solid #d59a90; margin: 10px 28px 0; }
footer { color: var(--muted); font-size: 12px; padding: 10px 28px 24px; }
@media (max-width: 760px) { .compound-head { grid-template-columns: 1fr; } main { padding: 14px; } }
@page { margin: 15mm 14mm; }
@media print {
  html, body { background: #fff; color: #000; font-size: 9.5pt; }
  header.band { background: none; color: #000; border-bottom: 1pt solid #000; padding: 0 0 5pt; }
  header.band h1 { font-size: 15pt; }
  header.band .sub, header.band a { color: #333; }
  header.band a { text-decoration: none; }
  .tools, #page-errors, .print-hide { display: none !important; }
  main { padding: 6pt 0 0; max-width: none; }
  a { color: #000; text-decoration: none; }
  .chips li, .badge { background: none; border-color: #999; }
  section.card { border: 0; border-top: 0.75pt solid #999; border-radius: 0; padding: 6pt 0;
    margin: 8pt 0; break-inside: avoid; page-break-inside: avoid; }
  table.grid { background: none; border-color: #999; font-size: 8.5pt; }
  table.grid thead th { position: static; background: #eee; }
  table.grid tbody tr:nth-child(even), table.grid tbody tr:hover { background: none; }
  table.grid tr { break-inside: avoid; page-break-inside: avoid; }
  .compound-head { grid-template-columns: 42% 1fr; break-inside: avoid; }
  figure.structure { border: 0; min-height: 0; }
  figure.plot { break-inside: avoid; page-break-inside: avoid; }
  figure.plot img { max-width: 100%; max-height: 110mm; border: 0; }
  .muted, figure.plot figcaption { color: #444; }
}
"""
)

#: installed first, in <head>, so errors in anything after it are caught
ERROR_SINK_JS = """
window.fluxErrors = [];
window.onerror = function (message, source, line, column) {
  window.fluxErrors.push(String(message) + " (line " + line + ":" + column + ")");
  var box = document.getElementById("page-errors");
  if (box) { box.hidden = false; box.textContent = window.fluxErrors.join("\\n"); }
  return false;
};
"""

#: before printing, every folded part (rate points …) is opened so the paper shows it all
PRINT_JS = """
window.addEventListener("beforeprint", function () {
  var folded = document.querySelectorAll("details");
  for (var i = 0; i < folded.length; i++) { folded[i].open = true; }
});
"""

TABLE_JS = """
(function () {
  "use strict";
  var table = document.getElementById("measurements");
  var input = document.getElementById("filter");
  var count = document.getElementById("shown-count");
  if (!table || !input) { return; }
  var body = table.tBodies[0];
  var rows = Array.prototype.slice.call(body.rows);
  var total = rows.length;

  function applyFilter() {
    var terms = input.value.toLowerCase().split(/\\s+/).filter(function (t) { return t; });
    var shown = 0;
    rows.forEach(function (row) {
      var text = row.getAttribute("data-search") || "";
      var keep = terms.every(function (t) { return text.indexOf(t) !== -1; });
      row.hidden = !keep;
      if (keep) { shown += 1; }
    });
    count.textContent = shown + " of " + total + " measurements shown";
    table.setAttribute("data-shown", String(shown));
  }

  function cellValue(row, index, numeric) {
    var cell = row.cells[index];
    var raw = cell.getAttribute("data-v");
    if (raw === null) { raw = cell.textContent.trim(); }
    if (numeric) {
      var n = parseFloat(raw);
      return isNaN(n) ? null : n;
    }
    return raw.toLowerCase();
  }

  function sortBy(index, th) {
    var numeric = th.getAttribute("data-type") === "num";
    var descending = th.getAttribute("aria-sort") === "ascending";
    Array.prototype.forEach.call(table.tHead.rows[0].cells, function (other) {
      other.removeAttribute("aria-sort");
    });
    th.setAttribute("aria-sort", descending ? "descending" : "ascending");
    var sign = descending ? -1 : 1;
    var sorted = rows.slice().sort(function (a, b) {
      var x = cellValue(a, index, numeric), y = cellValue(b, index, numeric);
      if (x === null || x === "") { return (y === null || y === "") ? 0 : 1; }
      if (y === null || y === "") { return -1; }
      return x < y ? -sign : (x > y ? sign : 0);
    });
    sorted.forEach(function (row) { body.appendChild(row); });
  }

  Array.prototype.forEach.call(table.tHead.rows[0].cells, function (th, index) {
    var button = th.querySelector("button");
    if (button) { button.addEventListener("click", function () { sortBy(index, th); }); }
  });
  input.addEventListener("input", applyFilter);
  var match = /^#q=(.*)$/.exec(window.location.hash);
  if (match) { input.value = decodeURIComponent(match[1]); }
  applyFilter();
  document.body.setAttribute("data-ready", "1");
})();
"""
