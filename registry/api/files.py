"""Spreadsheets in and out: import a group's table, export measurements as files."""

from __future__ import annotations

from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from registry.api.registry import actor_name
from registry.errors import UsageError
from registry.storage.database import Database

#: the file formats :func:`export_measurements` writes: data files, and tables for papers
DATA_FORMATS = ("csv", "xlsx", "json", "sdf")
TABLE_FORMATS = ("latex", "tex", "markdown", "md")


def import_table(
    database: Database,
    path: str | Path,
    *,
    sheet: str | None = None,
    mapping: str | Path | None = None,
    dry_run: bool = False,
    skip_bad: bool = False,
    rejects: str | Path | None = None,
    actor: str | None = None,
    progress: Callable[[str, int, int], None] | None = None,
    workers: int | None = None,
    prefer: str | None = None,
    empty_clears: bool = False,
) -> dict[str, Any]:
    """Import a spreadsheet (.xlsx, .ods, .csv, .tsv) of measurements and/or rate points.

    Every row is read and checked first; then either the whole file is written in one
    transaction or — when any row has a problem — nothing, and
    :class:`~registry.errors.ImportRowError` lists every problem with its file, sheet, row,
    column and text. ``skip_bad`` imports the good rows instead and writes the rejected ones
    with their reasons to ``rejects`` (default: ``<file>.rejected.csv`` beside the file).
    ``dry_run`` reads and checks everything and writes nothing. ``mapping`` is a TOML mapping
    file (columns, units, defaults, sheets); ``sheet`` picks one sheet of a workbook.
    Importing the same file again adds nothing; a corrected file updates the matching
    measurements (matched by their ``uid`` column, then compound and label, then compound,
    process, solvent, method and reference), each change recorded in the history.

    A re-import never silently undoes work done in the registry: each field is compared with
    what the file said when it was last imported. A value changed in the registry since (an
    edit, a review) and not in the file is kept; one changed in both is a conflict, and nothing
    is written for that measurement unless ``prefer`` is ``"file"`` or ``"registry"`` (the
    rest of the file is written). A reviewed measurement is changed only with
    ``prefer="file"``. A column the file does not have changes nothing; an empty cell changes
    nothing unless ``empty_clears``. ``progress(stage, done, total)`` is called as rows are
    normalized and structures parsed; ``workers`` sets the size of the process pool big files
    are parsed in (default: up to two).

    Returns the import report: the mapping of each sheet, notes, problems, the counts and ids
    of added, updated, unchanged and held measurements with the validation findings on them
    (``would_add`` … and a preview of the first rows for a dry run), and the merge field by
    field: ``updates``, ``kept``, ``conflicts``, ``held`` (see
    :func:`registry.io.report.merge_report`).
    """
    from registry.io.importer import import_table as run

    return run(
        database, path, sheet=sheet, mapping=mapping, dry_run=dry_run, skip_bad=skip_bad,
        rejects=rejects, actor=actor_name(actor), progress=progress, workers=workers,
        prefer=prefer, empty_clears=empty_clears,
    )  # fmt: skip


def export_measurements(
    database: Database,
    out: str | Path,
    *,
    format: str | None = None,
    ids: Sequence[int] | None = None,
    energy_unit: str = "kJ/mol",
    uncertainty: str = "paren",
    include_flagged: bool = False,
    **filters: Any,
) -> dict[str, Any]:
    """Write the measurements the filters select (the keywords of :func:`list_measurements`)
    to ``out``.

    ``format`` is csv, xlsx, json or sdf (an SD file: each measurement's structure as a
    Molfile, its columns as data items; reported texts, normalized values, findings, rate points;
    text cells a spreadsheet would evaluate get a leading apostrophe, which the importer strips
    again), or latex/markdown for a table in a paper (ΔG‡, ΔH‡, ΔS‡ in ``energy_unit``,
    uncertainties as ``62.3(4)`` with ``uncertainty='paren'`` or ``62.3 ± 0.4`` with
    ``'pm'``). Without ``format`` the file's suffix decides (.csv, .xlsx, .json, .tex, .md).
    A table leaves flagged measurements (an error finding nobody accepted) out unless
    ``include_flagged``, and footnotes them when included; a data file holds every selected
    row (``flagged=False`` selects the clean ones). Returns what was written: file, format,
    counts and ``notes`` (stored values the file could not show as they are).

    ``out`` is checked first (:func:`registry.outputs.check_target`): the registry, a SQLite
    file, a folder, a symlink or a missing folder is refused before anything is read, and the
    file is written whole or not at all.
    """
    from registry.api.records import list_measurements
    from registry.outputs import check_target
    from registry.search.filters import listing_filters

    listing_filters(**filters)  # read and check the filters and the file before any work
    target = check_target(out, what="export", protect=database.path)
    kind = (format or target.suffix.lstrip(".")).lower()
    if kind not in DATA_FORMATS + TABLE_FORMATS:
        raise UsageError(
            "format must be one of csv, xlsx, json, sdf, latex, markdown "
            f"(got {kind or 'none'!r}); "
            "name it, or end the file name in .csv, .xlsx, .json, .sdf, .tex or .md"
        )
    if kind in TABLE_FORMATS:
        from registry.reports.table_file import export_table

        return export_table(
            database, out, format, energy_unit=energy_unit, uncertainty=uncertainty, ids=ids,
            include_flagged=include_flagged, **filters,
        )  # fmt: skip
    from registry.io.export import write_export

    chosen = [r["id"] for r in list_measurements(database, ids=ids, **filters)]
    return write_export(database, chosen, out, format)
