"""Tables of barriers for papers and theses, as LaTeX (booktabs) or Markdown.

Values are shown in the energy unit the reader asks for, with uncertainties in the usual
notation (see :mod:`registry.reports.numbers`). Method and solvent are not columns: each
distinct (method, solvent) pair becomes a lettered footnote on the ΔG‡ value, the way journals
lay out such tables; references become numbered notes. Columns with no value in any row are
left out. All user text is escaped for the target format. Flagged measurements (an error
finding nobody accepted) are left out of a table unless asked for; included, their ΔG‡
carries a dagger (†) and a note saying so.

Rows are mappings with the keys of a measurement listing
(:data:`registry.record.fields.LISTING_COLUMNS`) plus optional ``dh_err_kj_mol`` and
``ds_err_j_mol_k``; :func:`table_rows` fetches exactly that. Units are converted by the one unit
registry (:mod:`registry.record.units`, pint), loaded only when a table is rendered.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError
from registry.outputs import without_controls
from registry.reports.numbers import format_uncertain

if TYPE_CHECKING:
    from registry.storage.database import Database

#: energy units a table header knows how to write; others are written as given
_ENERGY_LABEL = {
    "kJ/mol": ("kJ mol⁻¹", r"kJ\,mol$^{-1}$"),
    "kcal/mol": ("kcal mol⁻¹", r"kcal\,mol$^{-1}$"),
}
_ENTROPY_LABEL = {
    "J/(mol*K)": ("J mol⁻¹ K⁻¹", r"J\,mol$^{-1}$\,K$^{-1}$"),
    "cal/(mol*K)": ("cal mol⁻¹ K⁻¹", r"cal\,mol$^{-1}$\,K$^{-1}$"),
}
_SUPERSCRIPT_LETTERS = dict(
    zip("abcdefghijklmnoprstuvwxyz", "ᵃᵇᶜᵈᵉᶠᵍʰⁱʲᵏˡᵐⁿᵒᵖʳˢᵗᵘᵛʷˣʸᶻ", strict=True)
)
_SUBSCRIPT_DIGITS = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")


@dataclass(frozen=True)
class TableUnits:
    """The units a table shows energies and entropies in, checked with the unit registry."""

    energy: str
    entropy: str
    energy_label: tuple[str, str]
    entropy_label: tuple[str, str]


def energy_unit_name(text: str, field: str = "energy_unit") -> str:
    """kJ/mol or kcal/mol, however spelled (the units barrier tables and figures are written in)."""
    key = text.replace(" ", "").replace("⁻¹", "-1").lower()
    if key in ("kj/mol", "kjmol-1", "kj", "kj/mole"):
        return "kJ/mol"
    if key in ("kcal/mol", "kcalmol-1", "kcal", "kcal/mole"):
        return "kcal/mol"
    raise UsageError(f"{field} {text!r}: use kJ/mol or kcal/mol")


def table_units(energy_unit: str = "kJ/mol", entropy_unit: str | None = None) -> TableUnits:
    """Normalise the requested units; ΔS‡ follows the energy unit (cal with kcal) unless given."""
    from registry.record.units import unit_of

    energy = _canonical_energy(energy_unit)
    if entropy_unit is None:
        entropy = "cal/(mol*K)" if energy == "kcal/mol" else "J/(mol*K)"
    else:
        unit_of(entropy_unit, "entropy", field="entropy_unit")
        entropy = entropy_unit
    e_label = _ENERGY_LABEL.get(energy, (energy, _latex_escape(energy)))
    s_label = _ENTROPY_LABEL.get(entropy, (entropy, _latex_escape(entropy)))
    return TableUnits(energy, entropy, e_label, s_label)


def _canonical_energy(text: str) -> str:
    from registry.record.units import unit_of

    unit_of(text, "energy", field="energy_unit")
    key = text.replace(" ", "").lower()
    if key in ("kj/mol", "kjmol-1", "kjmol^-1", "kj/mole"):
        return "kJ/mol"
    if key in ("kcal/mol", "kcalmol-1", "kcalmol^-1", "kcal/mole"):
        return "kcal/mol"
    return text


def table_rows(
    database: Database,
    *,
    ids: Sequence[int] | None = None,
    limit: int | None = None,
    include_flagged: bool = False,
    **filters: Any,
) -> list[dict[str, Any]]:
    """The rows a table needs: the measurements a listing with these filters selects (the
    keywords of :func:`registry.search.filters.listing_filters`), with ΔH‡/ΔS‡ errors.
    Flagged measurements only with ``include_flagged`` (or ``flagged=True``)."""
    return selected_rows(database, ids, limit, include_flagged, filters)[0]


def selected_rows(
    database: Database,
    ids: Sequence[int] | None,
    limit: int | None,
    include_flagged: bool,
    filters: Mapping[str, Any],
) -> tuple[list[dict[str, Any]], int]:
    """(rows, how many flagged rows were left out); asking for flagged rows only
    (``flagged=True``) includes them."""
    from registry.reports.gather import measurement_rows
    from registry.search.filters import listing_filters

    rows = measurement_rows(database, listing_filters(**filters), ids=ids)
    left_out = 0
    if not (include_flagged or filters.get("flagged") is True):
        kept = [r for r in rows if not r.get("flagged")]
        left_out, rows = len(rows) - len(kept), kept
    return (rows[:limit] if limit else rows), left_out


# --- shared layout ---------------------------------------------------------------------------


@dataclass(frozen=True)
class _Cell:
    """A number (already rounded text) or text, with an optional footnote marker."""

    text: str
    marker: str | None = None
    number: bool = False
    flagged: bool = False  # a flagged value: the dagger and its note


@dataclass(frozen=True)
class _Layout:
    columns: list[tuple[str, str]]  # (key, kind) kind in text|energy|entropy|temperature|ref
    rows: list[dict[str, _Cell]]
    conditions: list[tuple[str, str | None, str | None]]  # (marker, method, solvent)
    references: list[str]

    @property
    def any_flagged(self) -> bool:
        return any(cell.flagged for row in self.rows for cell in row.values())


#: the mark of a flagged value and its note (Markdown text; LaTeX writes ``\dag``)
FLAG_MARK = "†"
FLAG_NOTE = (
    "Flagged in the registry: an error-level check of this entry is open (not resolved, not "
    "accepted); shown on request."
)


def _letters(index: int) -> str:
    """a, b, … z, aa, ab … (no gaps)."""
    out = ""
    index += 1
    while index:
        index, rem = divmod(index - 1, 26)
        out = chr(ord("a") + rem) + out
    return out


def _present(value: Any) -> bool:
    return value is not None and not (isinstance(value, float) and not math.isfinite(value))


def _temperature_text(t_k: Any) -> str:
    if not _present(t_k):
        return ""
    text = format_uncertain(float(t_k), None, default_decimals=2)
    return text.rstrip("0").rstrip(".") if "." in text else text


def _layout(
    rows: Sequence[Mapping[str, Any]], units: TableUnits, style: str, minus: str, pm: str
) -> _Layout:
    from registry.record.units import convert

    conditions: dict[tuple[str | None, str | None], str] = {}
    references: dict[str, int] = {}
    out: list[dict[str, _Cell]] = []

    def energy(value: Any, err: Any) -> str:
        if not _present(value):
            return ""
        v = convert(float(value), "kJ/mol", units.energy)
        e = convert(float(err), "kJ/mol", units.energy) if _present(err) else None
        return format_uncertain(v, e, style=style, minus=minus, plus_minus=pm)

    def entropy(value: Any, err: Any) -> str:
        if not _present(value):
            return ""
        v = convert(float(value), "J/(mol*K)", units.entropy)
        e = convert(float(err), "J/(mol*K)", units.entropy) if _present(err) else None
        return format_uncertain(v, e, style=style, minus=minus, plus_minus=pm)

    for r, key in zip(rows, normalised_conditions(rows), strict=True):
        marker = None
        if any(key):
            marker = conditions.setdefault(key, _letters(len(conditions)))
        ref = (r.get("reference") or "").strip()
        ref_no = references.setdefault(ref, len(references) + 1) if ref else None
        dg_text = energy(r.get("dg_kj_mol"), r.get("dg_err_kj_mol"))
        out.append(
            {
                "compound": _Cell(str(r.get("compound") or r.get("compound_name") or "")),
                "process": _Cell(str(r.get("process") or "")),
                "dg": _Cell(dg_text, marker, True, bool(r.get("flagged"))),
                "dg_t": _Cell(_temperature_text(r.get("dg_t_k")), number=True),
                "dh": _Cell(energy(r.get("dh_kj_mol"), r.get("dh_err_kj_mol")), number=True),
                "ds": _Cell(entropy(r.get("ds_j_mol_k"), r.get("ds_err_j_mol_k")), number=True),
                "ref": _Cell(str(ref_no) if ref_no else "", number=True),
            }
        )
    columns = [
        ("compound", "text"),
        ("process", "text"),
        ("dg", "energy"),
        ("dg_t", "temperature"),
        ("dh", "energy"),
        ("ds", "entropy"),
        ("ref", "ref"),
    ]
    keep = [c for c in columns if c[0] in ("compound", "dg") or any(row[c[0]].text for row in out)]
    return _Layout(
        keep,
        out,
        [(m, method, solvent) for (method, solvent), m in conditions.items()],
        list(references),
    )


def normalised_conditions(rows: Sequence[Mapping[str, Any]]) -> list[tuple[str | None, str | None]]:
    """(method, solvent) of each row, normalised so that one condition gets one footnote.

    The method is named as the vocabulary names it. Solvents are the same when the registry's
    solvent table links them to one entry (the ``solvent_name`` a row carries), else when the
    built-in solvent table knows the spelling, else when they fold to the same letters and
    digits; each is then written as the table first spells it, its deuterium label in lower
    case (``DMSO-D6`` → ``DMSO-d6``: the isotope symbol in a labelled solvent's name is a
    lower-case d, as in chloroform-d; IUPAC Red Book isotope nomenclature, from memory)."""
    from registry.record import vocab

    builtin = _builtin_solvents()
    shown: dict[str, str] = {}
    out: list[tuple[str | None, str | None]] = []
    for row in rows:
        method = (row.get("method") or "").strip() or None
        if method:
            method = vocab.read_method(method).name or method
        text = " ".join((row.get("solvent") or "").split())
        if not text:
            out.append((method, row.get("solvent_name") or None))
            continue
        folded = vocab.solvent_key(text)
        key = row.get("solvent_name") or builtin.get(folded) or folded
        spelled = re.sub(r"(?<=[-\s])D(\d+)\b", r"d\1", text)
        out.append((method, shown.setdefault(key, spelled)))
    return out


def _builtin_solvents() -> dict[str, str]:
    """Folded spelling (name, formula, aliases) → name, of the built-in solvent table."""
    from registry.record import vocab

    out: dict[str, str] = {}
    for name, formula, _deut, _mp, _bp, _src, aliases in vocab.SOLVENTS:
        for spelled in (name, formula, *aliases):
            out.setdefault(vocab.solvent_key(spelled), name)
    return out


def _has_paren(layout: _Layout) -> bool:
    """True when some number carries an uncertainty in parentheses (then the note explains it)."""
    return any(cell.number and "(" in cell.text for row in layout.rows for cell in row.values())


def _condition_text(method: str | None, solvent: str | None) -> tuple[str, str | None]:
    from registry.record.vocab import METHODS

    what = METHODS.get(method or "", method or "")
    what = (what[:1].upper() + what[1:]) if what else "Method not stated"
    return what, solvent


def _check_rows(rows: Iterable[Mapping[str, Any]]) -> list[Mapping[str, Any]]:
    rows = list(rows)
    if not rows:
        raise UsageError("no measurements to put in a table (is the selection empty?)")
    return rows


# --- Markdown --------------------------------------------------------------------------------

_MD_SPECIAL = re.compile(r"([\\`*_\[\]<>|#])")


def _one_line(text: str) -> str:
    """User text on one line: every character Python counts as a line break (CR, form feed,
    U+2028 …) becomes a space, so a label cannot end a table row early; other control
    characters are dropped (LaTeX stops at them)."""
    return without_controls(" ".join(text.splitlines())) if text else text


def _md_escape(text: str) -> str:
    return _MD_SPECIAL.sub(r"\\\1", _one_line(text))


def _md_marker(marker: str) -> str:
    if all(ch in _SUPERSCRIPT_LETTERS for ch in marker):
        return "".join(_SUPERSCRIPT_LETTERS[ch] for ch in marker)
    return f"^{marker}^"


def _md_formula(text: str) -> str:
    """CDCl3 → CDCl₃, toluene-d8 → toluene-d₈: digits after a letter in a formula-like word."""
    return re.sub(r"(?<=[A-Za-z])(\d+)", lambda m: m.group(1).translate(_SUBSCRIPT_DIGITS), text)


def render_markdown(
    rows: Iterable[Mapping[str, Any]],
    *,
    energy_unit: str = "kJ/mol",
    entropy_unit: str | None = None,
    uncertainty: str = "paren",
) -> str:
    """A pipe table with lettered condition notes and numbered references below it."""
    rows = _check_rows(rows)
    units = table_units(energy_unit, entropy_unit)
    layout = _layout(rows, units, uncertainty, "−", " ± ")
    heads = {
        "compound": "Compound",
        "process": "Process",
        "dg": f"ΔG‡ / {units.energy_label[0]}",
        "dg_t": "T / K",
        "dh": f"ΔH‡ / {units.energy_label[0]}",
        "ds": f"ΔS‡ / {units.entropy_label[0]}",
        "ref": "Ref.",
    }
    lines = [
        "| " + " | ".join(heads[k] for k, _ in layout.columns) + " |",
        "|" + "|".join(":---" if kind == "text" else "---:" for _, kind in layout.columns) + "|",
    ]
    for row in layout.rows:
        cells = []
        for key, _kind in layout.columns:
            cell = row[key]
            text = cell.text if cell.number else _md_escape(cell.text)
            if cell.marker and text:
                text += " " + _md_marker(cell.marker)
            if cell.flagged:
                text += " " + FLAG_MARK
            cells.append(text)
        lines.append("| " + " | ".join(cells) + " |")
    notes = []
    for marker, method, solvent in layout.conditions:
        what, solv = _condition_text(method, solvent)
        where = f"; in {_md_formula(_md_escape(solv))}" if solv else ""
        notes.append(f"{_md_marker(marker)} {_md_escape(what)}{where}.")
    if layout.any_flagged:
        notes.append(f"{FLAG_MARK} {FLAG_NOTE}")
    for number, ref in enumerate(layout.references, start=1):
        notes.append(f"[{number}] {_md_escape(ref)}")
    if uncertainty == "paren" and _has_paren(layout):
        notes.append("Uncertainties in parentheses apply to the last digits given.")
    return "\n".join(lines) + "\n\n" + "  \n".join(notes) + "\n"


# --- LaTeX -----------------------------------------------------------------------------------

_LATEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
}
_LATEX_TEXT = {"‡": r"\ddag{}", "°": r"\textdegree{}", "±": r"$\pm$", "−": "$-$"}


def _latex_escape(text: str) -> str:
    out = "".join(_LATEX_SPECIAL.get(ch, ch) for ch in _one_line(text))
    for ch, repl in _LATEX_TEXT.items():
        out = out.replace(ch, repl)
    return out


def _latex_formula(text: str) -> str:
    """CDCl3 → CDCl$_3$ and toluene-d8 → toluene-$d_8$ (escaped first)."""
    escaped = _latex_escape(text)
    escaped = re.sub(r"-d(\d+)\b", r"-$d_{\1}$", escaped)
    return re.sub(r"(?<=[A-Za-z])(\d+)", r"$_{\1}$", escaped)


def _latex_number(text: str) -> str:
    """A rounded number for a table cell: minus and ± set in math mode."""
    if not text:
        return ""
    return "$" + text.replace("±", r"\pm") + "$"


def render_latex(
    rows: Iterable[Mapping[str, Any]],
    *,
    energy_unit: str = "kJ/mol",
    entropy_unit: str | None = None,
    uncertainty: str = "paren",
    caption: str | None = None,
    label: str = "tab:barriers",
) -> str:
    r"""A ``table`` environment (booktabs rules) with lettered condition notes below the tabular."""
    rows = _check_rows(rows)
    units = table_units(energy_unit, entropy_unit)
    layout = _layout(rows, units, uncertainty, "-", " ± ")
    heads = {
        "compound": "Compound",
        "process": "Process",
        "dg": r"$\Delta G^{\ddagger}$ / " + units.energy_label[1],
        "dg_t": r"$T$ / K",
        "dh": r"$\Delta H^{\ddagger}$ / " + units.energy_label[1],
        "ds": r"$\Delta S^{\ddagger}$ / " + units.entropy_label[1],
        "ref": "Ref.",
    }
    spec = "".join("l" if kind == "text" else "r" for _, kind in layout.columns)
    lines = [
        "% written by fluxledger; needs \\usepackage{booktabs}",
        r"\begin{table}",
        r"  \centering",
    ]
    if caption:
        lines.append(f"  \\caption{{{_latex_escape(caption)}}}")
    lines.append(f"  \\label{{{_latex_escape(label)}}}")
    lines += [
        f"  \\begin{{tabular}}{{{spec}}}",
        r"    \toprule",
        "    " + " & ".join(heads[k] for k, _ in layout.columns) + r" \\",
        r"    \midrule",
    ]
    for row in layout.rows:
        cells = []
        for key, _kind in layout.columns:
            cell = row[key]
            text = _latex_number(cell.text) if cell.number else _latex_escape(cell.text)
            marks = [m for m in (cell.marker if text else None,
                                 r"\dag" if cell.flagged else None) if m]  # fmt: skip
            if marks:
                text += f"\\textsuperscript{{{','.join(marks)}}}"
            cells.append(text)
        lines.append("    " + " & ".join(cells) + r" \\")
    lines += [r"    \bottomrule", r"  \end{tabular}"]
    notes = []
    for marker, method, solvent in layout.conditions:
        what, solv = _condition_text(method, solvent)
        where = f"; in {_latex_formula(solv)}" if solv else ""
        notes.append(f"\\textsuperscript{{{marker}}}\\,{_latex_escape(what)}{where}.")
    if layout.any_flagged:
        notes.append(f"\\textsuperscript{{\\dag}}\\,{_latex_escape(FLAG_NOTE)}")
    for number, ref in enumerate(layout.references, start=1):
        notes.append(f"[{number}]\\,{_latex_escape(ref)}")
    if uncertainty == "paren" and _has_paren(layout):
        notes.append("Uncertainties in parentheses apply to the last digits given.")
    if notes:
        lines.append(r"  \par\smallskip\footnotesize")
        lines += [f"  {note}\\\\" for note in notes[:-1]] + [f"  {notes[-1]}"]
    lines.append(r"\end{table}")
    return "\n".join(lines) + "\n"
