"""Figures and the HTML report: one call per ``fluxledger plot …`` / ``report`` command.

Each call checks its inputs first (output suffix and folder, units, which source of data), then
reads what it needs, fits with :mod:`registry.kinetics`, draws with :mod:`registry.reports`
(matplotlib's object API on the Agg canvas, never pyplot), writes the file and returns a record
of what was drawn: the path, the fitted numbers in canonical units, notes and cautions.
Quantities are given as floats in canonical units (K, kJ/mol, Hz, MHz, Δν in ppm) or as texts
in any usual notation (``'15.2 ± 0.2 kcal/mol'``, ``'25 °C'``); only texts need the unit
registry, so a plot of stored data in kJ/mol never builds it.

Nothing here writes to the registry. Tables for papers are written by
:func:`registry.reports.table_file.export_table` (through ``export_measurements``).

A flagged measurement (an error finding nobody accepted) is marked wherever it is drawn: its
Eyring plot and Tc points say so, and the overview leaves its ΔG‡ out unless
``include_flagged`` (then it is drawn as a cross).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.api.figure_inputs import RatePointInput, barrier_and_shift, number, read_points
from registry.errors import UsageError

if TYPE_CHECKING:
    from registry.reports.gather import BarrierGroups, RateSeries
    from registry.reports.plots import EyringSummary
    from registry.reports.site import ReportResult
    from registry.storage.database import Database


def _as_dict(record: Any) -> dict[str, Any]:
    return {k: getattr(record, k) for k in record.__dataclass_fields__}


# ---------------------------------------------------------------- Eyring


@dataclass(frozen=True)
class EyringPlot:
    """What :func:`plot_eyring` drew: the file, where the points came from, the fit's numbers
    (:class:`registry.reports.plots.EyringSummary`, canonical units) and the lines written on
    the figure (in ``energy_unit``)."""

    file: str
    source: str
    title: str
    energy_unit: str
    summary: EyringSummary
    lines: tuple[str, ...]
    #: the measurement's open error findings, (finding id, rule id): it is flagged if any
    open_errors: tuple[tuple[int, str], ...] = ()

    @property
    def flagged(self) -> bool:
        return bool(self.open_errors)

    @property
    def notes(self) -> tuple[str, ...]:
        """The fit's warnings (few points, narrow range, extrapolated ΔG‡ …), and whether the
        measurement is flagged."""
        return self.summary.warnings + _flag_notes(self.source, self.open_errors)

    def as_dict(self) -> dict[str, Any]:
        head = {k: getattr(self, k) for k in ("file", "source", "title", "energy_unit")}
        return {
            **head,
            **self.summary.as_dict(),
            "lines": list(self.lines),
            "flagged": self.flagged,
            "open_errors": [{"finding": f, "rule": r} for f, r in self.open_errors],
        }


def _flag_notes(what: str, open_errors: Sequence[tuple[int, str]]) -> tuple[str, ...]:
    if not open_errors:
        return ()
    named = ", ".join(f"finding {f} [{r}]" for f, r in open_errors)
    return (f"{what} is flagged: error {named} is open (not resolved, not accepted)",)


def plot_eyring(
    database: Database | None = None,
    *,
    measurement_id: int | None = None,
    points: Sequence[RatePointInput] | None = None,
    file: str | Path | None = None,
    sheet: str | None = None,
    out: str | Path,
    t_ref: float | str | None = None,
    title: str | None = None,
    energy_unit: str = "kJ/mol",
    style: str = "screen",
    size: str | tuple[float, float] | None = None,
    dpi: int | None = None,
) -> EyringPlot:
    """ln(k/T) against 1/T with the weighted fit, its 95 % band, ΔH‡, ΔS‡ and ΔG‡ (at the mean
    measured T and at ``t_ref``, default 25 °C), written to ``out`` (.png, .svg or .pdf).
    ``style`` (screen or print), ``size`` (single, double or 'W×H' inches) and ``dpi``: see
    :func:`registry.reports.style.figure_style`.

    The rate points come from exactly one of: a stored measurement (``measurement_id``, needs
    ``database``), ``points`` (texts ``'T, k'`` / ``'T; k; σk'`` or tuples in K and s⁻¹), or a
    table ``file`` (CSV/TSV/spreadsheet with T and k columns, optional σk; ``sheet`` for a
    spreadsheet). σk weights the fit only when every point has one.
    """
    from registry.reports import canvas, plots
    from registry.reports.style import figure_style
    from registry.reports.tables import energy_unit_name

    unit = energy_unit_name(energy_unit)
    look = figure_style(style, size=size, dpi=dpi)
    canvas.check_output(out, protect=database.path if database else None)
    series, source = _rate_series(database, measurement_id, points, file, sheet)
    from registry.kinetics import fit_eyring
    from registry.kinetics.constants import STANDARD_TEMPERATURE_K

    t_ref_k = STANDARD_TEMPERATURE_K
    if t_ref is not None:
        t_ref_k = number(t_ref, "temperature", "t_ref", default_unit="K")[0]

    fit = fit_eyring(series.t_k, series.k_per_s, series.k_err_per_s, t_ref_k=t_ref_k)
    shown = series.title if title is None else title
    drawn_title = f"{shown} — flagged: an error finding is open" if series.open_errors else shown
    fig, summary = plots.eyring_figure(
        fit, title=drawn_title, energy_unit=unit, t_ref_k=t_ref_k,
        k_err_per_s=series.k_err_per_s, style=look,
    )  # fmt: skip
    written = canvas.save_figure(fig, out, style=look)
    return EyringPlot(
        str(written), source, shown, unit, summary, tuple(plots.eyring_text(summary, unit)),
        series.open_errors,
    )  # fmt: skip


def _rate_series(
    database: Database | None,
    measurement_id: int | None,
    points: Sequence[RatePointInput] | None,
    file: str | Path | None,
    sheet: str | None,
) -> tuple[RateSeries, str]:
    """The rate points from the one source given, and how to name that source."""
    from registry.reports import gather

    given = [n for n, v in (("measurement_id", measurement_id), ("points", points),
                            ("file", file)) if v is not None]  # fmt: skip
    if len(given) != 1:
        raise UsageError(
            "give one source of rate points: measurement_id, points or file"
            + (f" (got {', '.join(given)})" if given else "")
        )
    if sheet is not None and file is None:
        raise UsageError("sheet: applies to a spreadsheet file only")
    if measurement_id is not None:
        if database is None:
            raise UsageError(f"measurement_id {measurement_id}: needs an open registry (database)")
        from registry.record.ids import as_id

        number = as_id(measurement_id)
        return gather.rate_series(database, number), f"measurement {number}"
    if file is not None:
        from registry.kinetics.rate_table import read_rate_table

        table = read_rate_table(file, sheet=sheet)
        series = gather.RateSeries(table.t_k, table.k_per_s, table.k_err_per_s, Path(file).name)
        return series, str(file)
    t, k, k_err = read_points(points or [])
    return gather.series_from_points(t, k, k_err, f"{len(t)} rate points"), "points"


# ---------------------------------------------------------------- coalescence


@dataclass(frozen=True)
class CoalescencePlot:
    """What :func:`plot_coalescence` drew (K, kJ/mol, Hz, MHz; Δν in ppm). ``cautions`` are the
    usual safety lines for the predicted temperatures (boiling/melting point, heat, cold)."""

    file: str
    dg_kj_mol: float
    dg_err_kj_mol: float | None
    dnu_ppm: float
    j_hz: float
    field_range_mhz: tuple[float, float]
    tc_range_k: tuple[float, float]
    predicted: tuple[dict[str, float], ...]
    observed: tuple[dict[str, Any], ...]
    solvent: dict[str, Any] | None
    notes: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()

    def as_dict(self) -> dict[str, Any]:
        return _as_dict(self)


def plot_coalescence(
    database: Database | None = None,
    *,
    out: str | Path,
    barrier: float | str | None = None,
    dnu: float | str | None = None,
    dnu_field: float | str | None = None,
    j: float | str | None = None,
    measurement_id: int | None = None,
    compound: str | None = None,
    solvent: str | None = None,
    min_field: float | str = 60.0,
    max_field: float | str = 1000.0,
    title: str | None = None,
    energy_unit: str = "kJ/mol",
    style: str = "screen",
    size: str | tuple[float, float] | None = None,
    dpi: int | None = None,
) -> CoalescencePlot:
    """Predicted coalescence temperature against spectrometer field (Gutowsky–Holm k_c with
    Eyring), the observed Tc of a measurement or of compounds, and the solvent's liquid range.

    ``barrier`` (ΔG‡, kJ/mol or a text), ``dnu`` (Δν in ppm, or a text; Hz needs ``dnu_field``,
    the field it was measured at) and ``j`` (Hz) default to the values stored with
    ``measurement_id``; ``compound`` marks the observed Tc of compounds whose label or name
    contains it; ``solvent`` (default: the measurement's) shades temperatures outside its
    liquid range. Looking anything up needs ``database``. ``style``, ``size``, ``dpi``: as
    for :func:`plot_eyring`.
    """
    import numpy as np

    from registry.reports import canvas, coalescence_plot, gather
    from registry.reports.style import figure_style
    from registry.reports.tables import energy_unit_name

    unit = energy_unit_name(energy_unit)
    look = figure_style(style, size=size, dpi=dpi)
    canvas.check_output(out, protect=database.path if database else None)
    lo = number(min_field, "field", "min_field", default_unit="MHz")[0]
    hi = number(max_field, "field", "max_field", default_unit="MHz")[0]
    if not 0 < lo < hi:
        raise UsageError(f"min_field {lo:g} MHz must be above 0 and below max_field ({hi:g} MHz)")
    for name, value in (("measurement_id", measurement_id), ("compound", compound),
                        ("solvent", solvent)):  # fmt: skip
        if database is None and value is not None:
            raise UsageError(f"{name}: looking it up needs an open registry (database)")
    observed, own = _observed(database, measurement_id, compound)
    dg, dg_err, dnu_ppm, j_hz = barrier_and_shift(own, barrier, dnu, dnu_field, j)
    solvent = solvent or own.get("solvent_text")
    solvent_info = gather.solvent_range(database, solvent) if database and solvent else None
    notes = _flagged_points(observed, own)
    if solvent and solvent_info is None:
        notes.append(f"solvent {solvent!r} is not in the solvent table; no liquid range drawn")
    prediction = coalescence_plot.predict_coalescence(
        dg, dnu_ppm, np.linspace(lo, hi, 240), dg_err_kj_mol=dg_err, j_hz=j_hz
    )
    fig = coalescence_plot.coalescence_figure(
        prediction, observed=observed, solvent=solvent_info, title=title, energy_unit=unit,
        style=look,
    )  # fmt: skip
    written = canvas.save_figure(fig, out, style=look)
    return _coalescence_record(
        str(written), prediction, (lo, hi), observed, solvent_info, notes, j_hz
    )


def _coalescence_record(
    file: str,
    prediction: Any,
    field_range: tuple[float, float],
    observed: Sequence[Mapping[str, Any]],
    solvent_info: dict[str, Any] | None,
    notes: list[str],
    j_hz: float,
) -> CoalescencePlot:
    """What was drawn, with Tc at the usual spectrometer fields inside the range."""
    import numpy as np

    from registry.reports import coalescence_plot

    p = prediction
    lo, hi = field_range
    fields = [f for f in coalescence_plot.COMMON_FIELDS_MHZ if lo <= f <= hi]
    at_fields = (
        coalescence_plot.predict_coalescence(p.dg_kj_mol, p.dnu_ppm, fields, j_hz=j_hz).tc_k
        if fields
        else []
    )
    return CoalescencePlot(
        file=file,
        dg_kj_mol=float(p.dg_kj_mol),
        dg_err_kj_mol=p.dg_err_kj_mol,
        dnu_ppm=float(p.dnu_ppm),
        j_hz=j_hz,
        field_range_mhz=(lo, hi),
        tc_range_k=(float(np.nanmin(p.tc_k)), float(np.nanmax(p.tc_k))),
        predicted=tuple(
            {"field_mhz": f, "tc_k": float(t), "tc_c": float(t) - 273.15}
            for f, t in zip(fields, at_fields, strict=True)
        ),
        observed=tuple(
            {k: o.get(k) for k in ("measurement_id", "compound", "field_mhz", "tc_k", "dnu_ppm")}
            | {"flagged": bool(o.get("flagged"))}
            for o in observed
        ),
        solvent=solvent_info,
        notes=tuple(notes),
        cautions=tuple(_cautions(p.tc_k, solvent_info)),
    )


def _observed(
    database: Database | None, measurement_id: int | None, compound: str | None
) -> tuple[list[dict[str, Any]], dict[str, Any]]:
    """The observed coalescence points to mark, and the measurement's own one (or {})."""
    from registry.reports import gather

    observed: list[dict[str, Any]] = []
    if database is not None and (measurement_id is not None or compound):
        observed = gather.observed_coalescence(
            database, measurement_id=measurement_id, compound=compound
        )
    own = next((o for o in observed if o["measurement_id"] == measurement_id), {})
    return observed, own


def _flagged_points(observed: Sequence[Mapping[str, Any]], own: Mapping[str, Any]) -> list[str]:
    """A note per flagged observed point (an error finding is open), saying how it is drawn."""
    return [
        f"measurement {o['measurement_id']} is flagged (an error finding is open): its point"
        " is drawn as a cross" + ("; the prediction uses its ΔG‡ as stored" if o is own else "")
        for o in observed
        if o.get("flagged")
    ]


def _cautions(tc_k: Any, solvent: Mapping[str, Any] | None) -> list[str]:
    """The usual cautions (pressure-rated sealed tube above the boiling point, freezing, heat,
    cryogens); they defer to the facility's rules."""
    from registry.kinetics import safety_notes

    return safety_notes(
        tc_k,
        solvent_bp_k=(solvent or {}).get("bp_k"),
        solvent_mp_k=(solvent or {}).get("mp_k"),
    )


# ---------------------------------------------------------------- overview


@dataclass(frozen=True)
class OverviewPlot:
    """What :func:`plot_overview` drew: the grouping and each group's size, range (kJ/mol) and
    flagged values drawn; ``left_out_flagged`` flagged values were not drawn, nor
    ``left_out_not_finite`` stored values that are not finite (inf or nan). ``measurements``
    were drawn as ``points`` points: the same number unless ``motif_overlap`` (then
    ``shared`` measurements whose compound matches several motifs are drawn under each)."""

    file: str
    grouped_by: str
    groups: tuple[dict[str, Any], ...]
    include_flagged: bool = False
    left_out_flagged: int = 0
    left_out_not_finite: int = 0
    measurements: int = 0
    points: int = 0
    shared: int = 0
    motif_overlap: bool = False
    notes: tuple[str, ...] = ()

    def as_dict(self) -> dict[str, Any]:
        return {**_as_dict(self), "groups": list(self.groups), "notes": list(self.notes)}


def plot_overview(
    database: Database,
    *,
    out: str | Path,
    by: str = "auto",
    include_retracted: bool = False,
    include_flagged: bool = False,
    motif_overlap: bool = False,
    title: str | None = None,
    energy_unit: str = "kJ/mol",
    style: str = "screen",
    size: str | tuple[float, float] | None = None,
    dpi: int | None = None,
) -> OverviewPlot:
    """ΔG‡ of every measurement, grouped: every value a point, a box for groups of ≥ 5.

    ``by``: ``'kind'`` (process kind), ``'motif'`` (structural motif; needs motif matching),
    or ``'auto'`` (motif when available, else kind). Each measurement is drawn once; by motif
    a compound matching several motifs goes under the narrowest, unless ``motif_overlap``
    (then under each, and the figure says so). Flagged values (an error finding nobody
    accepted, the rule of the listings) are left out unless ``include_flagged``; then they
    are drawn as crosses. ``style``, ``size``, ``dpi``: as for :func:`plot_eyring`.
    """
    from registry.reports import canvas, gather, plots
    from registry.reports.style import figure_style
    from registry.reports.tables import energy_unit_name

    unit = energy_unit_name(energy_unit)
    look = figure_style(style, size=size, dpi=dpi)
    canvas.check_output(out, protect=database.path)
    if by not in ("auto", "kind", "motif"):
        raise UsageError(f"by {by!r}: use kind, motif or auto")
    if motif_overlap and by == "kind":
        raise UsageError("motif_overlap: applies to grouping by motif only")
    groups = None
    grouping = "process kind"
    chosen = {"include_retracted": include_retracted, "include_flagged": include_flagged}
    if by in ("auto", "motif"):
        groups = gather.barriers_by_motif(database, overlap=motif_overlap, **chosen)
        if groups is None and by == "motif":
            raise UsageError("by 'motif': motif matching is not available here; use kind")
        if groups is not None:
            grouping = "structural motif"
    if groups is None:
        groups = gather.barriers_by_kind(database, **chosen)
    notes = _overview_notes(groups)
    fig = plots.overview_figure(
        groups.values, flagged=groups.flagged, energy_unit=unit, group_title=grouping,
        title=title, note=notes[0] if notes else None, style=look,
    )  # fmt: skip
    written = canvas.save_figure(fig, out, style=look)
    rows = tuple(
        {"group": g, "n": len(v), "min_kj_mol": min(v), "max_kj_mol": max(v),
         "flagged": sum(groups.flagged[g])}
        for g, v in groups.values.items()
    )  # fmt: skip
    return OverviewPlot(
        str(written), grouping, rows, include_flagged, groups.left_out, groups.not_finite,
        groups.measurements, groups.points, groups.shared, groups.overlap, tuple(notes),
    )  # fmt: skip


def _overview_notes(groups: BarrierGroups) -> list[str]:
    """How shared motifs were counted (the first note is also written on the figure)."""
    if not groups.shared:
        return []
    if groups.overlap:
        return [
            f"motifs overlap: {groups.shared} of {groups.measurements} measurements match"
            f" several motifs and are drawn under each ({groups.points} points)"
        ]
    return [
        f"each measurement drawn once: {groups.shared} whose compound matches several motifs"
        " are under the narrowest"
    ]


# ---------------------------------------------------------------- the HTML report


def build_report(
    database: Database,
    out_dir: str | Path,
    *,
    title: str = "Barrier registry",
    include_retracted: bool = False,
    include_flagged: bool = False,
    plots: bool = True,
    columns: Sequence[str] = (),
) -> ReportResult:
    """Write the static HTML report: a filterable, sortable index, a page per compound with its
    structure, measurements, findings and Eyring plots, and a ΔG‡ overview. ``plots=False``
    skips the figures (much faster on big registries). Only our own files are ever replaced.
    Flagged measurements are listed and marked; their ΔG‡ is left out of the overview and the
    per-compound ranges unless ``include_flagged``. Pages name the registry by its file name
    (or server database name), never by a path; each measurement page shows the group's own
    columns kept with it (operator, notebook page, comments …), and ``columns`` adds some of
    them to the index table."""
    from registry.reports.site import build_report as write

    return write(
        database, out_dir, title=title, include_retracted=include_retracted,
        include_flagged=include_flagged, plots=plots, columns=tuple(columns),
    )  # fmt: skip
