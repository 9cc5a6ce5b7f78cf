"""``fluxledger plot``: figures as PNG or SVG (the output file's suffix chooses).

Each command parses its options, calls :mod:`registry.reports` (which calls
:mod:`registry.kinetics`) and says what it wrote; ``--json`` prints the numbers drawn.
matplotlib, numpy and pandas are imported inside the commands so ``--help`` stays fast.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import typer

from registry.cli.context import state
from registry.cli.output import print_json, table_text
from registry.errors import NotFoundError, UsageError

NAME = "plot"

app = typer.Typer(
    no_args_is_help=True,
    help="Figures, PNG or SVG by the output suffix: Eyring plots, Tc against field, overviews.",
)

_OUT = typer.Option(..., "-o", "--out", help="Output file; .png or .svg chooses the format.")
_JSON = typer.Option(False, "--json", help="Print what was drawn as JSON (canonical units).")
_UNIT = typer.Option(
    "kJ/mol", "--energy-unit", help="Energy unit written on the figure: kJ/mol or kcal/mol."
)


def energy_unit_option(text: str) -> str:
    """kJ/mol or kcal/mol, however spelled; anything else is a usage error."""
    from registry.reports.tables import energy_unit_name

    return energy_unit_name(text)


def _measurement_id(text: str) -> int | None:
    return int(text) if text.isdigit() and int(text) > 0 else None


@app.command("eyring")
def eyring(
    ctx: typer.Context,
    source: str = typer.Argument(
        ...,
        help="A measurement id, or a CSV/TSV/spreadsheet with T and k columns "
        "(optional σk; units in the headers or in the cells).",
    ),
    out: Path = _OUT,
    sheet: str = typer.Option(None, "--sheet", help="Sheet of a spreadsheet file."),
    t_ref: str = typer.Option(
        "25 °C", "--t-ref", help="Second temperature for ΔG‡ (the mean measured T is always shown)."
    ),
    title: str = typer.Option(None, "--title", help="Figure title (default: what was plotted)."),
    energy_unit: str = _UNIT,
    as_json: bool = _JSON,
) -> None:
    """ln(k/T) against 1/T with the weighted fit, its 95 % confidence band, ΔH‡, ΔS‡ and ΔG‡."""
    from registry.kinetics import fit_eyring
    from registry.record.units import parse_value
    from registry.reports import plots

    unit = energy_unit_option(energy_unit)
    plots.figure_format(out)
    t_ref_k = parse_value(t_ref, "temperature", field="--t-ref", default_unit="K").value
    path = Path(source)
    if path.exists():
        from registry.kinetics.rate_table import read_rate_table

        points = read_rate_table(path, sheet=sheet)
        t, k, k_err, default_title = points.t_k, points.k_per_s, points.k_err_per_s, path.name
    elif (mid := _measurement_id(source)) is not None:
        from registry import api
        from registry.reports import gather

        series = gather.rate_series(api.open_registry(state(ctx).db), mid)
        t, k, k_err, default_title = series.t_k, series.k_per_s, series.k_err_per_s, series.title
    else:
        raise NotFoundError(f"{source}: no such file (nor a measurement id)")
    fit = fit_eyring(t, k, k_err, t_ref_k=t_ref_k)
    fig, summary = plots.eyring_figure(
        fit,
        title=title if title is not None else default_title,
        energy_unit=unit,
        t_ref_k=t_ref_k,
        k_err_per_s=k_err,
    )
    written = plots.save_figure(fig, out)
    data = {"file": str(written), "source": source, **summary.as_dict()}
    if as_json:
        print_json(data)
        return
    typer.echo(f"wrote {written}: Eyring plot of {summary.n_points} rate points")
    for line in plots.eyring_text(summary, unit)[:4]:
        typer.echo(f"  {line}")
    for warning in summary.warnings:
        typer.echo(f"note: {warning}")


@app.command("coalescence")
def coalescence(
    ctx: typer.Context,
    out: Path = _OUT,
    barrier: str = typer.Option(
        None, "--barrier", "--dg", help="ΔG‡ with unit, e.g. '15.2 ± 0.2 kcal/mol'."
    ),
    dnu: str = typer.Option(
        None, "--dnu", help="Shift difference of the two sites: '0.12 ppm', or Hz with --dnu-field."
    ),
    dnu_field: str = typer.Option(
        None, "--dnu-field", help="Spectrometer frequency at which a Δν in Hz was measured."
    ),
    j: str = typer.Option(None, "--j", help="Coupling between the exchanging sites, e.g. '12 Hz'."),
    measurement: int = typer.Option(
        None, "--measurement", help="Take ΔG‡, Δν and solvent from this measurement and mark it."
    ),
    compound: str = typer.Option(
        None,
        "--compound",
        help="Mark the observed Tc of compounds whose label or name contains this.",
    ),
    solvent: str = typer.Option(
        None, "--solvent", help="Shade temperatures outside this solvent's liquid range."
    ),
    min_field: str = typer.Option("60 MHz", "--min-field", help="Lowest field drawn."),
    max_field: str = typer.Option("1000 MHz", "--max-field", help="Highest field drawn."),
    title: str = typer.Option(None, "--title", help="Figure title."),
    energy_unit: str = _UNIT,
    as_json: bool = _JSON,
) -> None:
    """Predicted coalescence temperature against spectrometer field, with observed points."""
    import numpy as np

    from registry.kinetics import safety_notes
    from registry.record.units import parse_value
    from registry.reports import gather, plots

    unit = energy_unit_option(energy_unit)
    plots.figure_format(out)
    observed: list[dict[str, Any]] = []
    solvent_info = None
    database = None
    if measurement is not None or compound or solvent:
        from registry import api

        database = api.open_registry(state(ctx).db)
    dg = dg_err = dnu_ppm = None
    j_hz = 0.0
    if database is not None and (measurement is not None or compound):
        observed = gather.observed_coalescence(
            database, measurement_id=measurement, compound=compound
        )
    if measurement is not None:
        own = [o for o in observed if o["measurement_id"] == measurement]
        if own:
            dg, dg_err = own[0]["dg_kj_mol"], own[0]["dg_err_kj_mol"]
            dnu_ppm = own[0]["dnu_ppm"]
            j_hz = own[0]["j_hz"] or 0.0
            solvent = solvent or own[0]["solvent_text"]
    if barrier:
        parsed = parse_value(barrier, "energy", field="--barrier")
        dg, dg_err = parsed.value, parsed.error
    if dnu:
        dnu_ppm = _dnu_ppm(dnu, dnu_field)
    if j:
        j_hz = parse_value(j, "frequency", field="--j", default_unit="Hz").value
    if dg is None:
        raise UsageError("give --barrier (or --measurement with a stored ΔG‡)")
    if dnu_ppm is None:
        raise UsageError("give --dnu (or --measurement with a stored coalescence Δν and field)")
    lo = parse_value(min_field, "field", field="--min-field", default_unit="MHz").value
    hi = parse_value(max_field, "field", field="--max-field", default_unit="MHz").value
    if not 0 < lo < hi:
        raise UsageError("--min-field must be above 0 and below --max-field")
    if database is not None and solvent:
        solvent_info = gather.solvent_range(database, solvent)
    prediction = plots.predict_coalescence(
        dg, dnu_ppm, np.linspace(lo, hi, 240), dg_err_kj_mol=dg_err, j_hz=j_hz
    )
    fig = plots.coalescence_figure(
        prediction, observed=observed, solvent=solvent_info, title=title, energy_unit=unit
    )
    written = plots.save_figure(fig, out)
    fields = [f for f in plots.COMMON_FIELDS_MHZ if lo <= f <= hi]
    at_fields = plots.predict_coalescence(dg, dnu_ppm, fields, j_hz=j_hz) if fields else None
    table = [
        {"field_mhz": f, "tc_k": float(t), "tc_c": float(t) - 273.15}
        for f, t in zip(fields, at_fields.tc_k if at_fields else [], strict=True)
    ]
    cautions = safety_notes(
        prediction.tc_k,
        solvent_bp_k=(solvent_info or {}).get("bp_k"),
        solvent_mp_k=(solvent_info or {}).get("mp_k"),
    )
    data = {
        "file": str(written),
        "dg_kj_mol": dg,
        "dg_err_kj_mol": dg_err,
        "dnu_ppm": dnu_ppm,
        "j_hz": j_hz,
        "field_range_mhz": [lo, hi],
        "tc_range_k": [float(np.nanmin(prediction.tc_k)), float(np.nanmax(prediction.tc_k))],
        "predicted": table,
        "observed": [
            {k: o.get(k) for k in ("measurement_id", "compound", "field_mhz", "tc_k", "dnu_ppm")}
            for o in observed
        ],
        "solvent": solvent_info,
        "cautions": cautions,
    }
    if as_json:
        print_json(data)
        return
    typer.echo(
        f"wrote {written}: predicted Tc from {data['tc_range_k'][0]:.1f} K at {lo:g} MHz"
        f" to {data['tc_range_k'][1]:.1f} K at {hi:g} MHz ({len(observed)} observed point(s))"
    )
    if table:
        typer.echo(table_text(table, ["field_mhz", "tc_k", "tc_c"]))
    if solvent and solvent_info is None:
        typer.echo(f"note: solvent {solvent!r} is not in the solvent table; no liquid range drawn")
    for line in cautions:
        typer.echo(f"caution: {line}")


def _dnu_ppm(text: str, field_text: str | None) -> float:
    """Δν in ppm; a frequency needs the field it was measured at (Δν in Hz scales with field)."""
    from registry.record.units import parse_value

    # read at a nominal 1 MHz: a value in ppm comes back as Hz per MHz, i.e. in ppm
    parsed = parse_value(text, "shift", field="--dnu", spectrometer_mhz=1.0)
    if parsed.unit.strip().lower() == "ppm":
        return parsed.value
    if not field_text:
        raise UsageError(
            f"--dnu {text!r}: a Δν in Hz holds at one field only; add --dnu-field (e.g. '400 MHz')"
            " or give Δν in ppm"
        )
    field_mhz = parse_value(field_text, "field", field="--dnu-field", default_unit="MHz").value
    return parsed.value / field_mhz


@app.command("overview")
def overview(
    ctx: typer.Context,
    out: Path = _OUT,
    by: str = typer.Option(
        "auto",
        "--by",
        help="Group by 'kind' (process kind), 'motif' (structural motif), or 'auto' (motif "
        "when motif matching is available, else kind).",
    ),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Plot retracted measurements too."
    ),
    title: str = typer.Option(None, "--title", help="Figure title."),
    energy_unit: str = _UNIT,
    as_json: bool = _JSON,
) -> None:
    """ΔG‡ of every measurement, grouped, as boxes (≥ 3 values) and points."""
    from registry import api
    from registry.reports import gather, plots

    unit = energy_unit_option(energy_unit)
    plots.figure_format(out)
    if by not in ("auto", "kind", "motif"):
        raise UsageError(f"--by {by!r}: use kind, motif or auto")
    database = api.open_registry(state(ctx).db)
    groups = None
    grouping = "process kind"
    if by in ("auto", "motif"):
        groups = gather.barriers_by_motif(database, include_retracted=include_retracted)
        if groups is None and by == "motif":
            raise UsageError("motif matching is not available in this installation; use --by kind")
        if groups is not None:
            grouping = "structural motif"
    if groups is None:
        groups = gather.barriers_by_kind(database, include_retracted=include_retracted)
    fig = plots.overview_figure(groups, energy_unit=unit, group_title=grouping, title=title)
    written = plots.save_figure(fig, out)
    rows = [
        {"group": g, "n": len(v), "min_kj_mol": min(v), "max_kj_mol": max(v)}
        for g, v in groups.items()
    ]
    if as_json:
        print_json({"file": str(written), "grouped_by": grouping, "groups": rows})
        return
    typer.echo(f"wrote {written}: ΔG‡ by {grouping}, {sum(r['n'] for r in rows)} value(s)")
    typer.echo(table_text(rows, ["group", "n", "min_kj_mol", "max_kj_mol"]))
