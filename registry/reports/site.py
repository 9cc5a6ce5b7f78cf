"""The static HTML report: a self-contained folder a group opens from a shared drive, offline.

``index.html`` lists every measurement in a table one can filter and sort; ``compounds/`` has a
page per compound (:mod:`.pages`) with its drawn structure (:mod:`.drawing`), its measurements,
what validation found about them and an Eyring plot for each measurement with at least two rate
points (``plots/``, SVG). A ``.fluxledger-report`` marker lets a rebuild replace its own files,
and only those. Flagged measurements (an open error finding) are listed and marked; the
overview and each compound's ΔG‡ range leave them out unless ``include_flagged``.
"""

from __future__ import annotations

import shutil
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from registry.errors import UsageError
from registry.reports.pages import escaped, render_compound, render_index
from registry.storage.database import Database

#: what a report folder is made of; anything else in the folder is left alone
_OWN = ("index.html", "compounds", "plots")
#: marks a folder as written by us, so a rebuild may replace what it holds
MARKER = ".fluxledger-report"


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


def _check_folder(directory: Path) -> None:
    """Refuse a file, or a folder holding pages or plots someone else put there."""
    if directory.exists() and not directory.is_dir():
        raise UsageError(f"{directory} exists and is not a folder")
    clash = [name for name in _OWN if (directory / name).exists()]
    if clash and not (directory / MARKER).exists():
        raise UsageError(
            f"{directory} already holds {', '.join(clash)} not written by 'fluxledger report';"
            " choose an empty or new folder"
        )


def _prepare(directory: Path) -> None:
    """Create the folder; replace our own pages and plots, never files someone else put there."""
    _check_folder(directory)
    directory.mkdir(parents=True, exist_ok=True)
    (directory / MARKER).write_text(
        "This folder is written by 'fluxledger report'; index.html, compounds/ and plots/ are"
        " replaced on every run.\n",
        encoding="utf-8",
    )
    for name in ("compounds", "plots"):  # our own sub-folders are rebuilt from scratch
        sub = directory / name
        if sub.is_dir():
            shutil.rmtree(sub)
        sub.mkdir()


def _eyring_plot(m: Mapping[str, Any], out: Path) -> tuple[str | None, str | None]:
    """Draw the Eyring plot of one measurement; (file name, None) or (None, why not)."""
    from registry.kinetics import KineticsInputError, fit_eyring
    from registry.reports.canvas import save_figure
    from registry.reports.gather import series_from_points
    from registry.reports.plots import eyring_figure

    points = m.get("rate_points") or []
    if len(points) < 2:
        return None, None
    title = f"measurement {int(m['id'])}: {m.get('compound') or m.get('compound_name') or ''}"
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
) -> ReportResult:
    """Write the report folder (index, a page per compound, plots) and say what went in.

    The folder is checked before anything is read and the registry is read before anything is
    written, so a refused folder or an unreadable registry leaves an existing report intact.
    """
    from registry.reports import gather
    from registry.reports.drawing import structure_svg

    out = Path(directory)
    _check_folder(out)
    measurements = gather.measurements_for_report(database, include_retracted=include_retracted)
    compounds = gather.compounds(database, include_retracted=include_retracted)
    groups = gather.barriers_by_kind(
        database, include_retracted=include_retracted, include_flagged=include_flagged
    )
    _prepare(out)
    when = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    subtitle = escaped(f"{database.name} · written {when} by fluxledger")
    result = ReportResult(directory=str(out), index=str(out / "index.html"))
    result.measurements = len(measurements)
    result.flagged = sum(1 for m in measurements if m.get("flagged"))
    by_compound: dict[int, list[Mapping[str, Any]]] = {}
    for m in measurements:
        by_compound.setdefault(int(m["compound_id"]), []).append(m)
    plot_files, plot_notes = (
        _eyring_plots(measurements, out / "plots", result) if plots else ({}, {})
    )
    for c in compounds:
        svg = structure_svg(c)
        if svg:
            result.structures_drawn += 1
        else:
            result.structures_missing += 1
        page = render_compound(
            c,
            by_compound.get(int(c["id"]), []),
            structure=svg,
            plots=plot_files,
            plot_notes=plot_notes,
            subtitle=subtitle,
            include_flagged=include_flagged,
        )
        (out / "compounds" / f"c{int(c['id'])}.html").write_text(page, encoding="utf-8")
        result.compound_pages += 1
    overview = None
    if plots and groups.values:
        from registry.reports.canvas import save_figure
        from registry.reports.plots import overview_figure

        figure = overview_figure(groups.values, flagged=groups.flagged)
        save_figure(figure, out / "plots" / "overview.svg")
        overview = "plots/overview.svg"
    index = render_index(
        measurements, title=title, subtitle=subtitle, counts=_counts(measurements, compounds),
        overview=overview,
        overview_note=_overview_note(groups.left_out, include_flagged),
    )  # fmt: skip
    (out / "index.html").write_text(index, encoding="utf-8")
    if groups.left_out:
        result.notes.append(
            f"{groups.left_out} flagged value(s) left out of the overview and of the compounds'"
            " ΔG‡ ranges"
        )
    if result.structures_missing:
        result.notes.append(
            f"{result.structures_missing} compound(s) shown without a drawing (unsanitized or no"
            " structure)"
        )
    return result


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
