"""The pages of the HTML report as text: the index (a table to filter and sort) and one page per
compound (structure, identity, measurements with their values, rate points, findings and plots).

Pure functions from rows to HTML; :mod:`.site` writes them into a folder. All CSS and JavaScript
is inline (:mod:`.assets`), nothing is fetched from a network, and every piece of user text goes
through :func:`html.escape`.

A flagged measurement (``flagged``: an error finding nobody accepted) carries a ``flagged``
badge on the index and on its compound page, and its ΔG‡ stays out of the compound's range
unless the report was asked to include flagged values.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping, Sequence
from html import escape
from typing import Any

from registry.outputs import not_finite, visible_controls
from registry.reports import assets
from registry.reports.gather import extra_value
from registry.reports.numbers import format_uncertain


def escaped(value: Any) -> str:
    """Escaped text for HTML; None shows as nothing, a control character as its picture
    (``\\x01`` → ``␁``: HTML cannot show it, and a reader should see that it is there)."""
    return "" if value is None else escape(visible_controls(str(value)), quote=True)


def _num(value: Any, digits: int = 1) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return ""
    return f"{float(value):.{digits}f}"


def _kelvin(value: Any) -> str:
    """A temperature as written in papers: 298.15, 343.15, 320 (no float noise, no '.0')."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return ""
    text = format_uncertain(float(value), None, default_decimals=2)
    return text.rstrip("0").rstrip(".") if "." in text else text


def _energy(value: Any, err: Any) -> str:
    if value is None:
        return ""
    return format_uncertain(float(value), err, style="pm", minus="−")


def _page(title: str, body: str, *, subtitle: str = "", home: str | None = None) -> str:
    back = f' · <a href="{escaped(home)}">all measurements</a>' if home else ""
    return f"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="fluxledger">
<link rel="icon" href="data:,">
<title>{escaped(title)}</title>
<script>{assets.ERROR_SINK_JS}{assets.PRINT_JS}</script>
<style>{assets.CSS}</style>
</head>
<body>
<header class="band"><h1>{escaped(title)}</h1><div class="sub">{subtitle}{back}</div></header>
<div id="page-errors" role="alert" hidden></div>
<main>
{body}
</main>
</body>
</html>
"""


def _status(status: Any) -> str:
    s = escaped(status or "")
    return f'<span class="badge {s}">{s}</span>' if s else ""


def _compound_href(cid: Any, prefix: str = "compounds/") -> str:
    return f"{prefix}c{int(cid)}.html"


#: what the flagged badge says when pointed at
FLAG_TITLE = (
    "an error finding is open (not resolved, not accepted): left out of ranges, overview "
    "plots and paper tables unless asked for"
)


def _flag_badge(m: Mapping[str, Any]) -> str:
    if not m.get("flagged"):
        return ""
    return f'<span class="badge flagged" title="{escaped(FLAG_TITLE)}">flagged</span>'


# --- index -----------------------------------------------------------------------------------

_INDEX_COLUMNS: list[tuple[str, str, str]] = [
    ("id", "ID", "num"),
    ("compound", "Compound", "text"),
    ("compound_name", "Name", "text"),
    ("process", "Process", "text"),
    ("method", "Method", "text"),
    ("solvent", "Solvent", "text"),
    ("dg", "ΔG‡ (kJ/mol)", "num"),
    ("dg_t_k", "at T (K)", "num"),
    ("status", "Status", "text"),
    ("findings", "Findings", "num"),
]


def _index_row(m: Mapping[str, Any], extra: Sequence[str] = ()) -> str:
    findings = m.get("findings") or []
    open_findings = [f for f in findings if not f.get("accepted_by")]
    search = " ".join(
        str(m.get(k) or "")
        for k in (
            "id",
            "label",
            "compound",
            "compound_name",
            "smiles",
            "process",
            "nucleus",
            "method",
            "solvent",
            "status",
            "reference",
        )
    ).lower() + (" flagged" if m.get("flagged") else "")
    if extra:
        search += " " + " ".join(str(extra_value(m, c) or "") for c in extra).lower()
    compound_text = m.get("compound") or m.get("compound_name") or f"compound {m['compound_id']}"
    cells = [
        f'<td class="num" data-v="{int(m["id"])}">{int(m["id"])}</td>',
        f'<td><a href="{_compound_href(m["compound_id"])}">{escaped(compound_text)}</a></td>',
        f"<td>{escaped(m.get('compound_name'))}</td>",
        f"<td>{escaped(m.get('process'))}</td>",
        f"<td>{escaped(m.get('method'))}</td>",
        f"<td>{escaped(m.get('solvent'))}</td>",
        f'<td class="num" data-v="{_num(m.get("dg_kj_mol"), 4)}">'
        f"{escaped(_energy(m.get('dg_kj_mol'), m.get('dg_err_kj_mol')))}</td>",
        f'<td class="num" data-v="{_num(m.get("dg_t_k"), 3)}">{_kelvin(m.get("dg_t_k"))}</td>',
        f"<td>{_status(m.get('status'))}</td>",
        f'<td class="num" data-v="{len(open_findings)}">'
        + (f"{_flag_badge(m)} " if m.get("flagged") else "")
        + (f"{len(open_findings)}" if open_findings else "")
        + (
            f' <span class="muted small">(+{len(findings) - len(open_findings)} accepted)</span>'
            if len(findings) > len(open_findings)
            else ""
        )
        + "</td>",
        *(f'<td class="extra">{escaped(extra_value(m, c))}</td>' for c in extra),
    ]
    flagged = ' class="flagged"' if m.get("flagged") else ""
    return f'<tr{flagged} data-search="{escaped(search)}">' + "".join(cells) + "</tr>"


def render_index(
    measurements: Sequence[Mapping[str, Any]],
    *,
    title: str,
    subtitle: str,
    counts: Mapping[str, int],
    overview: str | None,
    overview_note: str = "",
    extra: Sequence[str] = (),
) -> str:
    """The index page: counts, the filter box, the sortable table, the overview plot (with
    ``overview_note`` under it: which values it leaves out). ``extra`` names the group's own
    columns (operator, notebook page …) to add to the table."""
    columns = [*_INDEX_COLUMNS, *((f"extra:{c}", c, "text") for c in extra)]
    head = "".join(
        f'<th scope="col" class="{"num" if kind == "num" else ""}" data-type="{kind}">'
        f'<button type="button">{escaped(label)}</button></th>'
        for _key, label, kind in columns
    )
    rows = "\n".join(_index_row(m, extra) for m in measurements)
    chips = "".join(f"<li><b>{n}</b> {escaped(label)}</li>" for label, n in counts.items())
    plot = (
        f'<section class="card"><h2>Barriers by process kind</h2><figure class="plot">'
        f'<img src="{escaped(overview)}" alt="ΔG‡ of every measurement grouped by process kind">'
        f'</figure><p class="muted small">{escaped(overview_note)}</p></section>'
        if overview
        else ""
    )
    body = f"""<ul class="chips">{chips}</ul>
<div class="tools">
  <label for="filter">Filter</label>
  <input id="filter" type="search" autocomplete="off" spellcheck="false"
    placeholder="compound, process, method, solvent, status …">
  <span id="shown-count" class="count" aria-live="polite"></span>
</div>
<table id="measurements" class="grid">
<thead><tr>{head}</tr></thead>
<tbody>
{rows}
</tbody>
</table>
<p class="muted small">Click a column header to sort; click again to reverse. Every word typed in
the filter must appear somewhere in a row (compound, name, SMILES, process, method, solvent,
status, reference{", the added columns" if extra else ""}; type <b>flagged</b> for the rows with an
open error finding).</p>
{plot}
<script>{assets.TABLE_JS}</script>"""
    return _page(title, body, subtitle=subtitle)


# --- compound pages --------------------------------------------------------------------------


def _rule_explanation(rule_id: str) -> str | None:
    """What a validation rule checks: its title and docstring from :mod:`registry.validation`."""
    try:
        from registry.validation import rule_by_id
    except ImportError:  # the validation package is optional for the report
        return None
    rule = rule_by_id(rule_id)
    if rule is None:
        return None
    title = str(getattr(rule, "title", "") or "").strip()
    title = title[:1].upper() + title[1:]
    doc = _plain_text((type(rule).__doc__ or "").strip().split("\n\n")[0])
    if title and doc:
        return f"{title}. {doc}"
    return title or doc or None


def _plain_text(doc: str) -> str:
    """A docstring paragraph for readers: reST roles and literals become plain words."""
    text = re.sub(r":[a-z]+:`~?([^`]+)`", r"\1", doc)
    text = text.replace("``", "")
    return " ".join(text.split())


def _finding_item(f: Mapping[str, Any]) -> str:
    severity = escaped(f.get("severity") or "info")
    parts = [
        f'<span class="badge {severity}">{severity}</span> '
        f"<code>{escaped(f.get('rule_id'))}</code> {escaped(f.get('message'))}"
    ]
    if f.get("reported") is not None or f.get("recomputed") is not None:
        unit = escaped(f.get("unit") or "")
        numbers = []
        for key, label in (
            ("reported", "reported"),
            ("recomputed", "recomputed"),
            ("difference", "difference"),
        ):
            if f.get(key) is not None:
                numbers.append(f"{label} {_num(f[key], 2)} {unit}".strip())
        parts.append(f'<div class="small">{"; ".join(numbers)}</div>')
    if f.get("likely_cause"):
        parts.append(f'<div class="small">Likely cause: {escaped(f["likely_cause"])}</div>')
    explanation = _rule_explanation(str(f.get("rule_id") or ""))
    if explanation:
        parts.append(
            f'<div class="small muted">What this rule checks: {escaped(explanation)}</div>'
        )
    if f.get("accepted_by"):
        parts.append(
            f'<div class="small muted">Accepted by {escaped(f["accepted_by"])}: '
            f"{escaped(f.get('accept_reason'))}</div>"
        )
    return f'<li class="{severity}">' + "".join(parts) + "</li>"


def _values_table(m: Mapping[str, Any]) -> str:
    rows = []

    def add(label: str, value: str, reported: Any = None) -> None:
        if value:
            rep = (
                f' <span class="muted small">(reported: {escaped(reported)})</span>'
                if reported
                else ""
            )
            rows.append(f"<tr><th scope='row'>{label}</th><td>{escaped(value)}{rep}</td></tr>")

    if m.get("dg_kj_mol") is not None:
        at = f" at {_kelvin(m.get('dg_t_k'))} K" if m.get("dg_t_k") is not None else ""
        add(
            "ΔG‡",
            _energy(m["dg_kj_mol"], m.get("dg_err_kj_mol")) + " kJ/mol" + at,
            m.get("dg_text"),
        )
    if m.get("dh_kj_mol") is not None:
        add("ΔH‡", _energy(m["dh_kj_mol"], m.get("dh_err_kj_mol")) + " kJ/mol", m.get("dh_text"))
    if m.get("ds_j_mol_k") is not None:
        add(
            "ΔS‡",
            _energy(m["ds_j_mol_k"], m.get("ds_err_j_mol_k")) + " J/(mol·K)",
            m.get("ds_text"),
        )
    if m.get("field_mhz") is not None:
        add("Spectrometer", f"{_num(m['field_mhz'], 0)} MHz")
    for co in m.get("coalescence") or []:
        extra = f", J {_num(co.get('j_hz'))} Hz" if co.get("j_hz") else ""
        pops = f", populations {co['population_text']}" if co.get("population_text") else ""
        add(
            "Coalescence",
            f"Tc {_kelvin(co['tc_k'])} K, Δν {_num(co['dnu_hz'], 2)} Hz{extra}{pops}",
            f"{co.get('tc_text')}; {co.get('dnu_text')}",
        )
    if m.get("reference"):
        add("Reference", str(m["reference"]))
    if not rows:
        return '<p class="muted small">No values stored.</p>'
    return '<table class="grid small">' + "".join(rows) + "</table>"


def _extra_table(m: Mapping[str, Any]) -> str:
    """The group's own columns kept with the entry (operator, notebook page, comments …)."""
    extra = m.get("extra") or {}
    shown = [(k, v) for k, v in extra.items() if v not in (None, "")]
    if not shown:
        return ""
    rows = "".join(
        f"<tr><th scope='row'>{escaped(k)}</th><td>{escaped(v)}</td></tr>" for k, v in shown
    )
    return f'<h3>Kept with this entry</h3><table class="grid small extra-columns">{rows}</table>'


def _rates_table(points: Sequence[Mapping[str, Any]]) -> str:
    if not points:
        return ""

    def row(p: Mapping[str, Any]) -> str:
        err = p.get("k_err_per_s")
        return (
            f"<tr><td class='num'>{_num(p['t_k'], 2)}</td><td class='num'>{p['k_per_s']:.4g}</td>"
            f"<td class='num'>{'' if err is None else format(err, '.2g')}</td>"
            f"<td class='muted'>{escaped(p.get('t_text'))}; {escaped(p.get('k_text'))}</td></tr>"
        )

    body = "".join(row(p) for p in points)
    return (
        "<details><summary>Rate points</summary>"
        '<table class="grid small"><thead><tr><th class="num">T (K)</th><th class="num">k (s⁻¹)'
        '</th><th class="num">σk (s⁻¹)</th><th>as reported</th></tr></thead>'
        f"<tbody>{body}</tbody></table></details>"
    )


def _measurement_card(m: Mapping[str, Any], plot: str | None, plot_note: str | None) -> str:
    bits = [
        b
        for b in (
            m.get("process"),
            m.get("sites"),
            m.get("nucleus"),
            m.get("method"),
            m.get("solvent"),
        )
        if b
    ]
    label = f" · {escaped(m['label'])}" if m.get("label") else ""
    findings = m.get("findings") or []
    findings_html = (
        '<h3>Validation findings</h3><ul class="findings">'
        + "".join(_finding_item(f) for f in findings)
        + "</ul>"
        if findings
        else '<p class="muted small">No validation findings.</p>'
    )
    plot_html = ""
    if plot:
        plot_html = (
            f'<figure class="plot"><img src="{escaped(plot)}" alt="Eyring plot of measurement '
            f'{int(m["id"])}"><figcaption>Eyring plot of the stored rate points: weighted fit, '
            f"95 % confidence band of the line, ± one standard error in the box."
            f"</figcaption></figure>"
        )
    elif plot_note:
        plot_html = f'<p class="muted small">{escaped(plot_note)}</p>'
    flag_note = (
        f'<p class="small flag-note">Flagged: {escaped(FLAG_TITLE)}.</p>'
        if m.get("flagged")
        else ""
    )
    return f"""<section class="card" id="m{int(m["id"])}">
<h2>Measurement {int(m["id"])}{label} {_status(m.get("status"))} {_flag_badge(m)}</h2>
<p class="muted small">{" · ".join(escaped(b) for b in bits)}</p>
{flag_note}
{_values_table(m)}
{_extra_table(m)}
{_rates_table(m.get("rate_points") or [])}
{findings_html}
{plot_html}
</section>"""


def render_compound(
    compound: Mapping[str, Any],
    measurements: Sequence[Mapping[str, Any]],
    *,
    structure: str | None,
    plots: Mapping[int, str],
    plot_notes: Mapping[int, str],
    subtitle: str,
    include_flagged: bool = False,
) -> str:
    """One compound: structure (or a placeholder saying why not), identity, its ΔG‡ range
    (flagged values only with ``include_flagged``), measurements."""
    name = compound.get("label") or compound.get("name") or f"compound {compound['id']}"
    if structure:
        figure = structure
    elif not compound.get("structure_ok", True):
        figure = (
            '<div class="structure-missing">Structure not drawn: it is stored unsanitized'
            f" ({escaped(compound.get('structure_problem') or 'RDKit could not sanitize it')}).<br>"
            f"SMILES as entered: <code>{escaped(compound.get('smiles_input'))}</code></div>"
        )
    else:
        figure = '<div class="structure-missing">No structure stored for this compound.</div>'
    facts = [
        ("Label", compound.get("label")),
        ("Name", compound.get("name")),
        ("SMILES", compound.get("smiles_canonical") or compound.get("smiles_input")),
        ("InChIKey", compound.get("inchikey")),
        ("Formula", compound.get("formula")),
        ("Charge", compound.get("net_charge") if compound.get("net_charge") else None),
        ("Notes", compound.get("notes")),
    ]
    dl = "".join(
        f"<dt>{label}</dt><dd>{'<code>' if label in ('SMILES', 'InChIKey') else ''}{escaped(v)}"
        f"{'</code>' if label in ('SMILES', 'InChIKey') else ''}</dd>"
        for label, v in facts
        if v not in (None, "")
    )
    cards = "\n".join(
        _measurement_card(m, plots.get(int(m["id"])), plot_notes.get(int(m["id"])))
        for m in measurements
    )
    body = f"""<div class="compound-head">
<figure class="structure" id="structure" aria-label="structure of {escaped(name)}">{figure}</figure>
<section><dl class="facts">{dl}</dl>
<p class="small muted">{len(measurements)} measurement(s) on this page.</p>
{barrier_range(measurements, include_flagged)}</section>
</div>
{cards}"""
    return _page(str(name), body, subtitle=subtitle, home="../index.html")


def barrier_range(measurements: Sequence[Mapping[str, Any]], include_flagged: bool) -> str:
    """The compound's ΔG‡ range as a sentence: flagged values left out (and said so) unless
    ``include_flagged``."""
    shown = [m for m in measurements if m.get("dg_kj_mol") is not None]
    odd = sum(1 for m in shown if not_finite(m["dg_kj_mol"]))  # inf/nan stored behind our back
    shown = [m for m in shown if not not_finite(m["dg_kj_mol"])]
    values = [float(m["dg_kj_mol"]) for m in shown if include_flagged or not m.get("flagged")]
    flagged = sum(1 for m in shown if m.get("flagged"))
    if include_flagged:
        note = f" ({flagged} of them flagged)" if flagged else ""
    else:
        note = f"; {flagged} flagged value(s) left out" if flagged else ""
    note += f"; {odd} value(s) that are not finite left out" if odd else ""
    if not values:
        text = "No ΔG‡ to sum up" + note + "."
    elif len(values) == 1:
        text = f"ΔG‡ {_num(values[0], 1)} kJ/mol from 1 value{note}."
    else:
        text = (
            f"ΔG‡ from {_num(min(values), 1)} to {_num(max(values), 1)} kJ/mol over "
            f"{len(values)} values{note}."
        )
    return f'<p class="small" id="barrier-range">{escaped(text)}</p>'
