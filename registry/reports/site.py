"""The static HTML report: a self-contained folder a group opens from a shared drive, offline.

``index.html`` lists every measurement in a table one can filter and sort; ``compounds/`` has a
page per compound (:mod:`.pages`) with its drawn structure (:mod:`.drawing`), its measurements,
what validation found about them and an Eyring plot for each measurement with at least two rate
points (``plots/``, SVG). A ``.fluxledger-report`` marker lets a rebuild replace its own files,
and only those. Flagged measurements (an open error finding) are listed and marked; the
overview and each compound's ΔG‡ range leave them out unless ``include_flagged``.

Written whole or not at all (:mod:`registry.outputs`): the folder and every name the report
writes in it are checked before anything is read (a symlinked ``index.html`` or ``compounds/``
is refused, never followed); the pages and plots are built in a staging folder inside the
report folder and renamed into place only when all are written, ``index.html`` last, so an
error or a full disk leaves the previous report as it was."""

from __future__ import annotations

import os
import shutil
import tempfile
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError
from registry.outputs import (
    OddValues,
    OutputError,
    check_target,
    explain,
    make_folder,
    write_atomically,
)
from registry.reports.pages import escaped, render_compound, render_index
from registry.storage.database import Database

if TYPE_CHECKING:
    from registry.reports.gather import BarrierGroups

#: what a report folder is made of; anything else in the folder is left alone
_OWN = ("index.html", "compounds", "plots")
_FOLDERS = ("compounds", "plots")
#: marks a folder as written by us, so a rebuild may replace what it holds
MARKER = ".fluxledger-report"
#: the name of the folder (inside the report folder) a report is built in
_STAGING = ".building-"


@dataclass
class ReportResult:
    """Where the report went and what it holds."""

    directory: str
    index: str
    compound_pages: int = 0
    measurements: int = 0
    flagged: int = 0
    eyring_plots: int = 0
    structures_drawn: int = 0
    structures_missing: int = 0
    notes: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)


def _check_folder(directory: Path, protect: Path | None) -> None:
    """Refuse a file, a folder holding pages or plots someone else put there, and any name the
    report writes that is a symlink (it would be followed or replaced) or the registry."""
    if directory.exists() and not directory.is_dir():
        raise UsageError(f"{directory} exists and is not a folder")
    if directory.is_symlink() and not directory.exists():
        raise UsageError(f"report {directory}: is a symbolic link to nothing; name a folder")
    if not directory.exists():
        return  # created, with its parents, once the registry has been read
    clash = [
        name for name in _OWN if (directory / name).exists() or (directory / name).is_symlink()
    ]
    if clash and not (directory / MARKER).exists():
        raise UsageError(
            f"{directory} already holds {', '.join(clash)} not written by 'fluxledger report';"
            " choose an empty or new folder"
        )
    for name in ("index.html", MARKER):
        check_target(directory / name, what="report page", protect=protect)
    for name in _FOLDERS:
        sub = directory / name
        if sub.is_symlink() or (sub.exists() and not sub.is_dir()):
            raise UsageError(
                f"report {sub}: is a symbolic link or not a folder; the report replaces this "
                "folder, so it must be a plain folder (or absent)"
            )


def _prepare(directory: Path) -> Path:
    """Create the folder and mark it ours; returns a fresh staging folder inside it holding an
    empty ``compounds/`` and ``plots/`` (staging folders a killed run left are removed)."""
    make_folder(directory, what="report")
    with write_atomically(directory / MARKER) as fh:
        fh.write(
            "This folder is written by 'fluxledger report'; index.html, compounds/ and plots/ "
            "are replaced on every run.\n"
        )
    for leftover in directory.glob(f"{_STAGING}*"):
        if leftover.is_dir() and not leftover.is_symlink():
            shutil.rmtree(leftover, ignore_errors=True)
    try:
        staging = Path(tempfile.mkdtemp(prefix=_STAGING, dir=directory))
        for name in _FOLDERS:
            (staging / name).mkdir()
    except OSError as exc:
        raise OutputError(explain(directory, exc)) from exc
    return staging


def _write_page(path: Path, text: str) -> None:
    """A page in the staging folder (our own fresh folder: it becomes visible by the rename)."""
    try:
        path.write_text(text, encoding="utf-8")
    except OSError as exc:
        raise OutputError(explain(path, exc)) from exc


def _put_in_place(directory: Path, staging: Path, index: str) -> None:
    """Swap the new ``compounds/`` and ``plots/`` in for the old ones, then write the index."""
    try:
        for name in _FOLDERS:
            old = directory / name
            if old.is_dir():
                os.replace(old, staging / f"previous-{name}")
            os.replace(staging / name, old)
    except OSError as exc:
        raise OutputError(explain(directory, exc)) from exc
    with write_atomically(directory / "index.html") as fh:
        fh.write(index)


def _eyring_plot(m: Mapping[str, Any], out: Path) -> tuple[str | None, str | None]:
    """Draw the Eyring plot of one measurement; (file name, None) or (None, why not)."""
    from registry.kinetics import KineticsInputError, fit_eyring
    from registry.reports.canvas import save_figure
    from registry.reports.gather import not_finite_points, series_from_points
    from registry.reports.plots import eyring_figure

    points = m.get("rate_points") or []
    if len(points) < 2:
        return None, None
    odd = not_finite_points([(p["t_k"], p["k_per_s"], p.get("k_err_per_s")) for p in points])
    if odd:
        return None, f"No Eyring plot: {odd}"
    from registry.reports.gather import measurement_title

    title = measurement_title(
        int(m["id"]), m.get("label"), m.get("compound"), m.get("compound_name")
    )
    series = series_from_points(
        [p["t_k"] for p in points],
        [p["k_per_s"] for p in points],
        [p.get("k_err_per_s") for p in points],
        title.strip(),
    )
    try:
        fit = fit_eyring(series.t_k, series.k_per_s, series.k_err_per_s)
    except KineticsInputError as exc:
        return None, f"No Eyring plot: {exc}"
    fig, _ = eyring_figure(fit, title=series.title, k_err_per_s=series.k_err_per_s)
    name = f"eyring-m{int(m['id'])}.svg"
    save_figure(fig, out / name)
    return name, None


def _eyring_plots(
    measurements: Sequence[Mapping[str, Any]], out: Path, result: ReportResult
) -> tuple[dict[int, str], dict[int, str]]:
    """Draw every measurement's Eyring plot; (files by id, why-not notes by id)."""
    files: dict[int, str] = {}
    notes: dict[int, str] = {}
    for m in measurements:
        name, note = _eyring_plot(m, out)
        if name:
            files[int(m["id"])] = f"../plots/{name}"
            result.eyring_plots += 1
        elif note:
            notes[int(m["id"])] = note
    return files, notes


def build_report(
    database: Database,
    directory: str | Path,
    *,
    title: str = "Barrier registry",
    include_retracted: bool = False,
    include_flagged: bool = False,
    plots: bool = True,
    columns: Sequence[str] = (),
) -> ReportResult:
    """Write the report folder (index, a page per compound, plots) and say what went in.

    The folder is checked before anything is read and the registry is read before anything is
    written; the new pages replace the old ones only once all are written. So a refused
    folder, an unreadable registry or a full disk leaves an existing report intact. Pages
    name the registry by its file name (or server database name), never by a path.
    ``columns`` adds the group's own columns (operator, notebook page …) to the index table.
    """
    from registry.reports import gather

    if not str(directory).strip():
        raise UsageError("report: give a folder name")
    out = Path(directory)
    _check_folder(out, database.path)
    measurements = gather.measurements_for_report(database, include_retracted=include_retracted)
    compounds = gather.compounds(database, include_retracted=include_retracted)
    groups = gather.barriers_by_kind(
        database, include_retracted=include_retracted, include_flagged=include_flagged
    )
    shown, column_notes = _known_columns(columns, measurements)
    staging = _prepare(out)
    try:
        when = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
        subtitle = escaped(f"{gather.registry_title(database)} · written {when} by fluxledger")
        result = ReportResult(directory=str(out), index=str(out / "index.html"))
        result.measurements = len(measurements)
        result.flagged = sum(1 for m in measurements if m.get("flagged"))
        plot_files, plot_notes = (
            _eyring_plots(measurements, staging / "plots", result) if plots else ({}, {})
        )
        pages = _Pages(subtitle, plot_files, plot_notes, include_flagged)
        _compound_pages(compounds, measurements, staging / "compounds", pages, result)
        overview = None
        if plots and groups.values:
            from registry.reports.canvas import save_figure
            from registry.reports.plots import overview_figure

            figure = overview_figure(groups.values, flagged=groups.flagged)
            save_figure(figure, staging / "plots" / "overview.svg")
            overview = "plots/overview.svg"
        index = render_index(
            measurements, title=title, subtitle=subtitle,
            counts=_counts(measurements, compounds), overview=overview,
            overview_note=_overview_note(groups.left_out, include_flagged), extra=shown,
        )  # fmt: skip
        _put_in_place(out, staging, index)
    finally:
        shutil.rmtree(staging, ignore_errors=True)
    result.notes.extend(_notes(result, groups, measurements, compounds))
    result.notes.extend(column_notes)
    return result


def _known_columns(
    columns: Sequence[str], measurements: Sequence[Mapping[str, Any]]
) -> tuple[list[str], list[str]]:
    """The asked-for columns some measurement has, and a note for each one none has (naming
    the ones there are)."""
    known: dict[str, str] = {}
    for m in measurements:
        for k in m.get("extra") or {}:
            known.setdefault(k.casefold(), k)
    shown = [c for c in columns if c.casefold() in known]
    missing = [c for c in columns if c.casefold() not in known]
    there = ", ".join(sorted(known.values())) or "none"
    return shown, [
        f"column {c!r}: no measurement has it, left out (the group's own columns here: {there})"
        for c in missing
    ]


@dataclass(frozen=True)
class _Pages:
    """What every compound page shares."""

    subtitle: str
    plots: dict[int, str]
    plot_notes: dict[int, str]
    include_flagged: bool


def _compound_pages(
    compounds: Sequence[Mapping[str, Any]],
    measurements: Sequence[Mapping[str, Any]],
    folder: Path,
    pages: _Pages,
    result: ReportResult,
) -> None:
    """A page per compound: its drawing (or why not), measurements, findings and plots."""
    from registry.reports.drawing import structure_svg

    by_compound: dict[int, list[Mapping[str, Any]]] = {}
    for m in measurements:
        by_compound.setdefault(int(m["compound_id"]), []).append(m)
    for c in compounds:
        svg = structure_svg(c)
        if svg:
            result.structures_drawn += 1
        else:
            result.structures_missing += 1
        page = render_compound(
            c, by_compound.get(int(c["id"]), []), structure=svg, plots=pages.plots,
            plot_notes=pages.plot_notes, subtitle=pages.subtitle,
            include_flagged=pages.include_flagged,
        )  # fmt: skip
        _write_page(folder / f"c{int(c['id'])}.html", page)
        result.compound_pages += 1


def _notes(
    result: ReportResult,
    groups: BarrierGroups,
    measurements: Sequence[Mapping[str, Any]],
    compounds: Sequence[Mapping[str, Any]],
) -> list[str]:
    """What the report left out or could not show as stored."""
    notes = []
    if groups.left_out:
        notes.append(
            f"{groups.left_out} flagged value(s) left out of the overview and of the compounds'"
            " ΔG‡ ranges"
        )
    if result.structures_missing:
        notes.append(
            f"{result.structures_missing} compound(s) shown without a drawing (unsanitized or no"
            " structure)"
        )
    odd = OddValues()
    for m in measurements:
        where = f"measurement {m['id']}"
        odd.scan({k: v for k, v in m.items() if not isinstance(v, list)}, where)
        for row in (*m.get("coalescence", ()), *m.get("rate_points", ()), *m.get("findings", ())):
            odd.scan(row, where)
    for c in compounds:
        odd.scan(c, f"compound {c['id']}")
    return notes + odd.notes(
        numbers="shown as empty cells and left out of ranges and plots",
        texts="each shown as its picture (␁ for \\x01 …)",
    )


def _counts(
    measurements: Sequence[Mapping[str, Any]], compounds: Sequence[Mapping[str, Any]]
) -> dict[str, int]:
    """The figures at the top of the index."""
    return {
        "measurements": len(measurements),
        "flagged (open error finding)": sum(1 for m in measurements if m.get("flagged")),
        "compounds": len(compounds),
        "with rate points": sum(1 for m in measurements if len(m.get("rate_points") or []) >= 2),
        "validation findings": sum(len(m.get("findings") or []) for m in measurements),
    }


def _overview_note(left_out: int, include_flagged: bool) -> str:
    if include_flagged:
        return "Flagged values (an error finding is open) are included, drawn as crosses."
    if left_out:
        return f"{left_out} flagged value(s) (an error finding is open) are left out of this plot."
    return "No value is flagged."
