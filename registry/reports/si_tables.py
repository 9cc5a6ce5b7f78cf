"""Tables for supporting information: every value as reported and as normalised, with the
method, the solvent, the temperature each ΔG‡ holds at and the reference, one row per
measurement — in LaTeX, Markdown, or a workbook with one column per quantity and its unit in
the header (numbers stay numbers, so a reviewer can recompute).

Where the paper table (:mod:`.tables`) folds method and solvent into footnotes, an SI table
spells them out in columns; both normalise them first (:func:`.tables.normalised_conditions`), so
``DMSO-D6`` and ``DMSO-d6`` are one solvent. Units are converted by the one unit registry
(:mod:`registry.record.units`, pint), loaded only when a table is rendered.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from registry.reports.gather import extra_value
from registry.reports.numbers import format_uncertain
from registry.reports.tables import (
    FLAG_MARK,
    FLAG_NOTE,
    TableUnits,
    _check_rows,
    _latex_escape,
    _latex_formula,
    _latex_number,
    _md_escape,
    _md_formula,
    _present,
    _temperature_text,
    normalised_conditions,
    table_units,
)


@dataclass(frozen=True)
class Column:
    """One column: its key, its header in Markdown/LaTeX/a workbook, and whether it holds
    numbers (right-aligned; numeric cells in a workbook)."""

    key: str
    markdown: str
    latex: str
    workbook: str
    number: bool = False


def columns(units: TableUnits, extra: Sequence[str] = ()) -> list[Column]:
    """The SI table's columns; the workbook splits each value and its uncertainty. ``extra``
    adds the group's own columns (operator, notebook page …) before the flag."""
    e_md, e_tex = units.energy_label
    s_md, s_tex = units.entropy_label
    e_unit = units.energy.replace("*", "·")
    s_unit = units.entropy.replace("*", "·")
    return [
        Column("compound", "Compound", "Compound", "compound"),
        Column("process", "Process", "Process", "process"),
        Column("method", "Method", "Method", "method"),
        Column("solvent", "Solvent", "Solvent", "solvent"),
        Column("dg_t", "T / K", r"$T$ / K", "T of ΔG‡ (K)", True),
        Column("dg", f"ΔG‡ / {e_md}", r"$\Delta G^{\ddagger}$ / " + e_tex, f"ΔG‡ ({e_unit})", True),
        Column("dg_err", "", "", f"σ ΔG‡ ({e_unit})", True),
        Column("dg_text", "ΔG‡ as reported", r"$\Delta G^{\ddagger}$ as reported",
               "ΔG‡ as reported"),
        Column("dh", f"ΔH‡ / {e_md}", r"$\Delta H^{\ddagger}$ / " + e_tex, f"ΔH‡ ({e_unit})", True),
        Column("dh_err", "", "", f"σ ΔH‡ ({e_unit})", True),
        Column("dh_text", "ΔH‡ as reported", r"$\Delta H^{\ddagger}$ as reported",
               "ΔH‡ as reported"),
        Column("ds", f"ΔS‡ / {s_md}", r"$\Delta S^{\ddagger}$ / " + s_tex, f"ΔS‡ ({s_unit})", True),
        Column("ds_err", "", "", f"σ ΔS‡ ({s_unit})", True),
        Column("ds_text", "ΔS‡ as reported", r"$\Delta S^{\ddagger}$ as reported",
               "ΔS‡ as reported"),
        Column("reference", "Reference", "Reference", "reference"),
        *(Column(f"extra:{name}", name, _latex_escape(name), name) for name in extra),
        Column("flagged", "", "", "flagged (an error finding is open)"),
    ]  # fmt: skip


def si_values(
    rows: Iterable[Mapping[str, Any]], units: TableUnits, extra: Sequence[str] = ()
) -> list[dict[str, Any]]:
    """Each row's values by column key: numbers converted to ``units`` (floats, None when
    absent), texts as reported, method and solvent normalised, the group's own ``extra``
    columns as kept."""
    from registry.record.units import convert

    def value(v: Any, unit: str, canonical: str) -> float | None:
        return convert(float(v), canonical, unit) if _present(v) else None

    rows = list(rows)
    out = []
    for r, (method, solvent) in zip(rows, normalised_conditions(rows), strict=True):
        out.append(
            {
                "compound": str(r.get("compound") or r.get("compound_name") or ""),
                "process": r.get("process") or "",
                "method": method or "",
                "solvent": solvent or "",
                "dg_t": float(r["dg_t_k"]) if _present(r.get("dg_t_k")) else None,
                "dg": value(r.get("dg_kj_mol"), units.energy, "kJ/mol"),
                "dg_err": value(r.get("dg_err_kj_mol"), units.energy, "kJ/mol"),
                "dg_text": r.get("dg_text") or "",
                "dh": value(r.get("dh_kj_mol"), units.energy, "kJ/mol"),
                "dh_err": value(r.get("dh_err_kj_mol"), units.energy, "kJ/mol"),
                "dh_text": r.get("dh_text") or "",
                "ds": value(r.get("ds_j_mol_k"), units.entropy, "J/(mol*K)"),
                "ds_err": value(r.get("ds_err_j_mol_k"), units.entropy, "J/(mol*K)"),
                "ds_text": r.get("ds_text") or "",
                "reference": (r.get("reference") or "").strip(),
                "flagged": "yes" if r.get("flagged") else "",
                **{f"extra:{name}": _text(extra_value(r, name)) for name in extra},
            }
        )
    return out


def _text(value: Any) -> Any:
    """A kept cell as it was: numbers stay numbers, anything else becomes text."""
    if value is None or (isinstance(value, (int, float)) and not isinstance(value, bool)):
        return value
    return str(value)


def _shown(
    values: list[dict[str, Any]], units: TableUnits, extra: Sequence[str] = ()
) -> list[Column]:
    """The text table's columns: errors go into their value's cell, empty columns are left out
    (compound, ΔG‡ and its temperature always stay)."""
    keep = ("compound", "dg", "dg_t")
    return [
        c
        for c in columns(units, extra)
        if c.markdown and (c.key in keep or any(v[c.key] not in (None, "") for v in values))
    ]


def _cell(v: Mapping[str, Any], key: str, style: str, minus: str) -> str:
    if key in ("dg", "dh", "ds"):
        if v[key] is None:
            return ""
        return format_uncertain(v[key], v[f"{key}_err"], style=style, minus=minus, plus_minus=" ± ")
    if key == "dg_t":
        return _temperature_text(v[key])
    return str(v[key] or "")


def render_si_markdown(
    rows: Iterable[Mapping[str, Any]],
    *,
    energy_unit: str = "kJ/mol",
    entropy_unit: str | None = None,
    uncertainty: str = "paren",
    extra: Sequence[str] = (),
) -> str:
    """A pipe table, one row per measurement, every value as reported beside its normalised
    form; flagged rows (only there when asked for) carry † and a note."""
    rows = _check_rows(rows)
    units = table_units(energy_unit, entropy_unit)
    values = si_values(rows, units, extra)
    shown = _shown(values, units, extra)
    lines = [
        "| " + " | ".join(c.markdown for c in shown) + " |",
        "|" + "|".join("---:" if c.number else ":---" for c in shown) + "|",
    ]
    for v in values:
        cells = []
        for c in shown:
            text = _cell(v, c.key, uncertainty, "−")
            text = text if c.number else _md_escape(text)
            if c.key == "solvent":
                text = _md_formula(text)
            if c.key == "dg" and v["flagged"]:
                text += " " + FLAG_MARK
            cells.append(text)
        lines.append("| " + " | ".join(cells) + " |")
    notes = [f"{FLAG_MARK} {FLAG_NOTE}"] if any(v["flagged"] for v in values) else []
    notes.append(_units_note(uncertainty))
    return "\n".join(lines) + "\n\n" + "  \n".join(notes) + "\n"


def render_si_latex(
    rows: Iterable[Mapping[str, Any]],
    *,
    energy_unit: str = "kJ/mol",
    entropy_unit: str | None = None,
    uncertainty: str = "paren",
    caption: str | None = None,
    label: str = "tab:si-barriers",
    extra: Sequence[str] = (),
) -> str:
    """A ``longtable`` (it runs over pages, as SI tables do) with booktabs rules."""
    rows = _check_rows(rows)
    units = table_units(energy_unit, entropy_unit)
    values = si_values(rows, units, extra)
    shown = _shown(values, units, extra)
    spec = "".join("r" if c.number else "l" for c in shown)
    head = " & ".join(c.latex for c in shown) + r" \\"
    lines = ["% written by fluxledger; needs \\usepackage{booktabs,longtable}"]
    lines.append(f"\\begin{{longtable}}{{{spec}}}")
    if caption:
        lines.append(
            f"  \\caption{{{_latex_escape(caption)}}}\\label{{{_latex_escape(label)}}}\\\\"
        )
    lines += [r"  \toprule", f"  {head}", r"  \midrule", r"  \endhead"]
    for v in values:
        cells = []
        for c in shown:
            text = _cell(v, c.key, uncertainty, "-")
            if c.number:
                text = _latex_number(text)
            elif c.key == "solvent":
                text = _latex_formula(text)
            else:
                text = _latex_escape(text)
            if c.key == "dg" and v["flagged"]:
                text += r"\textsuperscript{\dag}"
            cells.append(text)
        lines.append("  " + " & ".join(cells) + r" \\")
    lines.append(r"  \bottomrule")
    notes = (
        [f"\\textsuperscript{{\\dag}}\\,{_latex_escape(FLAG_NOTE)}"]
        if any(v["flagged"] for v in values)
        else []
    )
    notes.append(_units_note(uncertainty, latex=True))
    lines.append(r"  \multicolumn{" + str(len(shown)) + r"}{p{0.9\linewidth}}{\footnotesize "
                 + r" \newline ".join(notes) + r"}\\")  # fmt: skip
    lines.append(r"\end{longtable}")
    return "\n".join(lines) + "\n"


def _units_note(uncertainty: str, *, latex: bool = False) -> str:
    how = (
        "uncertainties in parentheses apply to the last digits given"
        if uncertainty == "paren"
        else "uncertainties after ±"
    )
    text = (
        "Normalised values converted from the values as reported (shown beside them); "
        f"{how}; T is the temperature each ΔG‡ holds at."
    )
    if not latex:
        return text
    return (
        _latex_escape(text.split("; T is")[0])
        + r"; $T$ is the temperature each $\Delta G^{\ddagger}$ holds at."
    )


def write_si_workbook(
    path: Path, rows: Sequence[Mapping[str, Any]], units: TableUnits, extra: Sequence[str] = ()
) -> None:
    """A workbook, one column per quantity with its unit in the header, one row per
    measurement; numbers as numbers, texts guarded against formula evaluation and written in
    the workbook format's escapes (as the exports are)."""
    from openpyxl import Workbook

    from registry.io.export import workbook_text
    from registry.outputs import not_finite

    values = si_values(rows, units, extra)
    cols = [
        c for c in columns(units, extra) if c.key != "flagged" or any(v["flagged"] for v in values)
    ]
    book = Workbook(write_only=True)
    sheet = book.create_sheet("barriers")
    sheet.append([workbook_text(c.workbook) for c in cols])
    for v in values:
        sheet.append([_workbook_cell(v[c.key], workbook_text, not_finite) for c in cols])
    book.save(path)


def _workbook_cell(value: Any, as_text: Any, odd: Any) -> Any:
    from registry.io.cells import neutralise

    if value is None or value == "":
        return None
    if isinstance(value, str):
        return as_text(neutralise(value))
    return repr(value) if odd(value) else value
