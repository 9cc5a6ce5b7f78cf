"""A table for a paper written to a file: LaTeX (.tex) or Markdown (.md).

The rendering is :mod:`.tables`; here the file is checked before any work
(:func:`registry.outputs.check_target`: never the registry, a SQLite file, a folder or a
symlink) and written whole or not at all, and the result says which stored values the table
could not show (numbers that are not finite, control characters in texts).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError
from registry.outputs import OddValues, check_target, write_atomically, write_file
from registry.reports.tables import energy_unit_name, render_latex, render_markdown, selected_rows

if TYPE_CHECKING:
    from registry.storage.database import Database

#: table formats by name and by file suffix
TABLE_FORMATS = {"latex": "latex", "tex": "latex", "markdown": "markdown", "md": "markdown"}


def export_table(
    database: Database,
    output: str | Path,
    fmt: str | None = None,
    *,
    energy_unit: str = "kJ/mol",
    uncertainty: str = "paren",
    caption: str | None = None,
    include_flagged: bool = False,
    **filters: Any,
) -> dict[str, Any]:
    """Write the measurements ``filters`` select as a LaTeX or Markdown table file.

    ``fmt`` is latex/tex or markdown/md, or None to take it from the suffix (.tex, .md);
    ``filters`` are the keywords of :func:`.tables.table_rows` (those of a measurement listing:
    compound, method, solvent, process, status, barrier, barrier_min, barrier_max,
    include_retracted, flagged, ids, limit). Flagged measurements are left out (the result
    counts them in ``flagged_left_out``) unless ``include_flagged``; included, their ΔG‡
    carries a † footnote. The file is checked first (:func:`registry.outputs.check_target`)
    and written whole or not at all; ``notes`` say which stored values were left out (numbers
    that are not finite, control characters in texts).
    """
    path = check_target(output, what="table", protect=database.path)
    energy_unit = energy_unit_name(energy_unit)
    name = TABLE_FORMATS.get((fmt or path.suffix.lstrip(".")).lower())
    if name is None:
        raise UsageError(f"{path}: a table is written as latex (.tex) or markdown (.md)")
    if uncertainty not in ("paren", "pm"):
        raise UsageError(f"uncertainty {uncertainty!r}: use paren (62.3(4)) or pm (62.3 ± 0.4)")
    ids, limit = filters.pop("ids", None), filters.pop("limit", None)
    rows, left_out = selected_rows(database, ids, limit, include_flagged, filters)
    if not rows and left_out:
        raise UsageError(
            f"no measurements to put in a table: the {left_out} selected are flagged (an error"
            " finding is open); include flagged values to show them with a footnote"
        )
    if name == "latex":
        text = render_latex(rows, energy_unit=energy_unit, uncertainty=uncertainty, caption=caption)
    else:
        text = render_markdown(rows, energy_unit=energy_unit, uncertainty=uncertainty)
    with write_atomically(path) as fh:
        fh.write(text)
    odd = OddValues()
    for r in rows:
        odd.scan({k: r.get(k) for k in _SHOWN}, f"measurement {r['id']}")
    return {
        "file": str(path),
        "format": name,
        "measurements": len(rows),
        "energy_unit": energy_unit,
        "uncertainty": uncertainty,
        "flagged_included": sum(1 for r in rows if r.get("flagged")),
        "flagged_left_out": left_out,
        "notes": odd.notes(numbers="left empty", texts="the control characters dropped"),
    }


def _missing_columns(columns: Sequence[str], rows: Sequence[Mapping[str, Any]]) -> list[str]:
    """A note for each asked-for column of the group's own that no selected row has."""
    have = {k.casefold() for r in rows for k in (r.get("extra") or {})}
    return [f"column {c!r}: no selected measurement has it (left empty)" for c in columns
            if c.casefold() not in have]  # fmt: skip


#: the row keys a table shows
_SHOWN = ("compound", "process", "reference", "method", "solvent", "dg_kj_mol", "dg_err_kj_mol",
          "dg_t_k", "dh_kj_mol", "dh_err_kj_mol", "ds_j_mol_k", "ds_err_j_mol_k")  # fmt: skip


#: supporting-information table formats by name and by file suffix
SI_FORMATS = {**TABLE_FORMATS, "xlsx": "xlsx"}


def export_si_table(
    database: Database,
    output: str | Path,
    fmt: str | None = None,
    *,
    energy_unit: str = "kJ/mol",
    uncertainty: str = "paren",
    caption: str | None = None,
    include_flagged: bool = False,
    columns: Sequence[str] = (),
    **filters: Any,
) -> dict[str, Any]:
    """Write the measurements ``filters`` select as a supporting-information table: every
    value as reported and normalised, method, solvent (both normalised), the temperature of
    each ΔG‡ and the reference, and the group's own ``columns`` (operator, notebook page …);
    LaTeX (.tex), Markdown (.md) or a workbook (.xlsx, one column per quantity with its unit in
    the header). Checked and written as :func:`export_table`."""
    from registry.reports import si_tables
    from registry.reports.tables import table_units

    path = check_target(output, what="table", protect=database.path)
    energy_unit = energy_unit_name(energy_unit)
    name = SI_FORMATS.get((fmt or path.suffix.lstrip(".")).lower())
    if name is None:
        raise UsageError(
            f"{path}: a supporting-information table is written as latex (.tex), markdown (.md)"
            " or xlsx (.xlsx)"
        )
    if uncertainty not in ("paren", "pm"):
        raise UsageError(f"uncertainty {uncertainty!r}: use paren (62.3(4)) or pm (62.3 ± 0.4)")
    ids, limit = filters.pop("ids", None), filters.pop("limit", None)
    rows, left_out = selected_rows(database, ids, limit, include_flagged, filters)
    if not rows:
        raise UsageError(
            "no measurements to put in a table"
            + (f": the {left_out} selected are flagged; include flagged values" if left_out else "")
        )
    extra = tuple(columns)
    options = {"energy_unit": energy_unit, "uncertainty": uncertainty, "extra": extra}
    if name == "xlsx":
        units = table_units(energy_unit)
        write_file(path, lambda tmp: si_tables.write_si_workbook(tmp, rows, units, extra))
    else:
        text = (
            si_tables.render_si_latex(rows, caption=caption, **options)
            if name == "latex"
            else si_tables.render_si_markdown(rows, **options)
        )
        with write_atomically(path) as fh:
            fh.write(text)
    odd = OddValues()
    for r in rows:
        odd.scan(
            {k: r.get(k) for k in (*_SHOWN, "dg_text", "dh_text", "ds_text")},
            f"measurement {r['id']}",
        )
    return {
        "file": str(path),
        "format": name,
        "layout": "supporting information",
        "measurements": len(rows),
        "energy_unit": energy_unit,
        "uncertainty": uncertainty,
        "flagged_included": sum(1 for r in rows if r.get("flagged")),
        "flagged_left_out": left_out,
        "columns": list(extra),
        "notes": odd.notes(numbers="left empty", texts="the control characters dropped")
        + _missing_columns(extra, rows),
    }


def _missing_columns(columns: Sequence[str], rows: Sequence[Mapping[str, Any]]) -> list[str]:
    """A note for each asked-for column of the group's own that no selected row has."""
    have = {k.casefold() for r in rows for k in (r.get("extra") or {})}
    return [f"column {c!r}: no selected measurement has it (left empty)" for c in columns
            if c.casefold() not in have]  # fmt: skip
