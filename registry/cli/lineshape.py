"""``fluxledger lineshape``: simulate exchange-broadened spectra, fit rates, store them.

The commands pass the options as written to :func:`registry.api.simulate_lineshape` and
:func:`registry.api.fit_lineshapes` (which read the quantities) and render text or ``--json``.
The api is imported inside the commands so that ``fluxledger --help`` stays fast.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import typer

from registry.cli.context import ErrorBoundaryGroup, state
from registry.cli.output import print_json, table_text
from registry.cli.ratefit_text import trend_text

NAME = "lineshape"


app = typer.Typer(
    cls=ErrorBoundaryGroup,
    no_args_is_help=True,
    help="Line-shape analysis of VT-NMR spectra: simulate, fit exchange rates, store them.",
)

_JSON = typer.Option(False, "--json", help="Print one JSON object; keys carry their unit.")
_SITES = typer.Option(
    ...,
    "--sites",
    help="Site shifts, comma-separated, in ppm unless 'Hz' is written: '3.10,2.95' or '-60,60 Hz'.",
)
_POPS = typer.Option(
    None, "--populations", help="Relative site populations, e.g. '0.6,0.4' (default: equal)."
)
_SCHEME = typer.Option(
    "mutual",
    "--scheme",
    help="How more than two sites exchange: 'mutual' (every pair) or 'cycle' (1→2→…→n→1).",
)
_COUPLING = typer.Option(
    None,
    "--coupling",
    help="J of two coupled sites (Hz unless written): an AB pair whose spins trade places.",
)
_MODES = "auto (fitted where a spectrum shows it, else tied), fit, hold, tie"
_FIELD = typer.Option(
    None, "--field", "--mhz", help="Spectrometer (observe) frequency, e.g. '400.13 MHz'."
)


# --- simulate -----------------------------------------------------------------------------------


@app.command()
def simulate(
    sites: str = _SITES,
    k: str = typer.Option(
        ..., "--k", help="Rate constant for leaving site 1, s⁻¹ unless written: '120', '1.2 kHz'."
    ),
    out: str = typer.Option(..., "--out", "-o", help="CSV file to write (shift, intensity)."),
    populations: str = _POPS,
    scheme: str = _SCHEME,
    width: str = typer.Option(
        "1 Hz", "--width", help="Intrinsic line width (full width at half height), Hz."
    ),
    field: str = _FIELD,
    points: int = typer.Option(16384, "--points", min=16, help="Number of points."),
    window: str = typer.Option(
        None, "--window", help="Spectral window 'lo,hi' in the sites' unit (default: automatic)."
    ),
    noise: float = typer.Option(
        0.0, "--noise", min=0.0, help="Gaussian noise, as a fraction of the tallest point."
    ),
    seed: int = typer.Option(0, "--seed", help="Seed of the noise generator (reproducible)."),
    temperature: str = typer.Option(
        None, "--temperature", help="Temperature to note in the file, e.g. '298 K' or '-20 °C'."
    ),
    coupling: str = _COUPLING,
    reference: str = typer.Option(
        None,
        "--reference",
        help="Add a non-exchanging singlet (same width, half the sites' area) at this shift.",
    ),
    as_json: bool = _JSON,
) -> None:
    """Write the spectrum of exchanging sites (unit area) as CSV."""
    from registry import api

    result = api.simulate_lineshape(
        sites, k, out=out, populations=populations, scheme=scheme, width=width, field=field,
        points=points, window=window, noise=noise, seed=seed, temperature=temperature,
        coupling=coupling, reference=reference,
    )  # fmt: skip
    if as_json:
        print_json(result.to_dict())
        return
    lo, hi = result.window_hz
    typer.echo(
        f"wrote {out}: {result.points} points, {lo:g} … {hi:g} Hz, "
        f"k = {result.k_per_s:g} s⁻¹, width {result.width_hz:g} Hz"
    )


# --- fit ----------------------------------------------------------------------------------------


@app.command()
def fit(
    ctx: typer.Context,
    files: list[Path] = typer.Argument(
        ..., help="Spectra (CSV or JCAMP-DX), one per temperature.", show_default=False
    ),
    sites: str = _SITES,
    populations: str = _POPS,
    scheme: str = _SCHEME,
    temps: str = typer.Option(
        None,
        "--temps",
        help="Temperatures of the files in order, K unless written: '250,260,270' or "
        "'-20,-10,0 °C'. Overrides temperatures read from the files.",
    ),
    field: str = _FIELD,
    x_unit: str = typer.Option(
        None, "--x-unit", help="Unit of a CSV shift column whose header does not say: ppm or Hz."
    ),
    width: str = typer.Option(
        "1 Hz",
        "--width",
        help="Intrinsic line width (FWHM): the start value, or the fixed one with --fix-width.",
    ),
    fix_width: bool = typer.Option(
        False,
        "--fix-width",
        help="Hold the intrinsic width (needed near the slow- and fast-exchange limits).",
    ),
    region: str = typer.Option(
        None, "--region", help="Fit only this window 'lo,hi' in the sites' unit, e.g. '3.6,2.4'."
    ),
    global_fit: bool = typer.Option(
        False, "--global", help="Also fit ΔH‡ and ΔS‡ to all spectra at once (Eyring-tied k)."
    ),
    plots: Path = typer.Option(
        None, "--plots", help="Write a PNG per spectrum and an Eyring plot into this directory."
    ),
    plot_format: str = typer.Option("png", "--plot-format", help="With --plots: png, svg or pdf."),
    plot_full: bool = typer.Option(
        False, "--plot-full", help="With --plots: the whole fitted window, not the lines zoomed."
    ),
    style: str = typer.Option(
        "screen", "--style", help="With --plots: screen (150 dpi) or print (journal, 600 dpi)."
    ),
    size: str = typer.Option(
        None, "--size", help="With --plots: single or double (journal column) or WxH inches."
    ),
    dpi: int = typer.Option(None, "--dpi", help="With --plots: dots per inch of a PNG."),
    measurement: int = typer.Option(
        None,
        "--measurement",
        help="Add the per-temperature rates as rate points of this measurement id.",
    ),
    solvent_bp: str = typer.Option(
        None, "--solvent-bp", help="Solvent boiling point, e.g. '61 °C', for the safety notes."
    ),
    shifts_mode: str = typer.Option(
        "auto", "--shifts-mode", help=f"How Δν of two sites varies: {_MODES} (linear drift)."
    ),
    populations_mode: str = typer.Option(
        "auto",
        "--populations-mode",
        help=f"How the populations of two sites vary: {_MODES} (van 't Hoff).",
    ),
    reference: str = typer.Option(
        None,
        "--reference",
        help="Window 'lo,hi' (sites' unit) with a non-exchanging line: its width is the "
        "intrinsic width of each spectrum.",
    ),
    tie_width: bool = typer.Option(
        False, "--tie-width", help="One intrinsic width for the series: the reference lines' mean."
    ),
    coupling: str = _COUPLING,
    fit_coupling: bool = typer.Option(False, "--fit-coupling", help="Fit J (from --coupling)."),
    store_doubtful: bool = typer.Option(
        False,
        "--store-doubtful",
        help="Store the rates of doubtful fits too (a parameter at a bound, k–width "
        "correlation, residuals not noise-like).",
    ),
    as_json: bool = _JSON,
) -> None:
    """Fit exchange rates to spectra; Eyring line through them; optionally store the rates."""
    # long: one typer option per line of the signature; the body only calls the api
    from registry import api

    st = state(ctx)
    database = None if measurement is None else api.open_registry(st.db)
    try:
        result = api.fit_lineshapes(
            files, sites, populations=populations, scheme=scheme, temps=temps, field=field,
            x_unit=x_unit, width=width, fix_width=fix_width, region=region,
            global_fit=global_fit, plots_dir=plots, database=database,
            measurement_id=measurement, actor=st.actor, solvent_bp=solvent_bp,
            shifts_mode=shifts_mode, populations_mode=populations_mode, reference=reference,
            tie_width=tie_width, coupling=coupling, fit_coupling=fit_coupling,
            store_doubtful=store_doubtful,
            plot_format=plot_format, plot_style=style, plot_size=size, plot_dpi=dpi,
            plot_zoom=not plot_full,
        )  # fmt: skip
    finally:
        if database is not None:
            database.close()
    if as_json:
        print_json(result.to_dict())
        return
    _render_fit(result)


def _sig(value: float | None, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, plain notation where that stays short."""
    if value is None or not math.isfinite(value):
        return ""
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-4 <= abs(value) < 1e6:
        text = f"{value:.{max(digits - 1 - math.floor(math.log10(abs(value))), 0)}f}"
    return text


#: how a site parameter was found, as one mark after its value in the table
_MARKS = {"fitted": "", "held": "=", "reference": "", "fitted, not determined": "?"}


def _mark(how: str) -> str:
    return "~" if how.startswith("tied") else _MARKS.get(how, "")


def _fit_row(fit: Any) -> dict[str, Any]:
    row = {
        "file": Path(fit.source).name,
        "T/K": "" if fit.t_k is None else f"{fit.t_k:.2f}",
        "k/s-1": _sig(fit.k_per_s),
        "±k": _sig(fit.k_err_per_s, 2),
        "w/Hz": _sig(fit.width_hz, 3),
        "offset/Hz": f"{fit.offset_hz:.3f}",
    }
    params = {n: (v, h) for n, v, _e, h in fit.parameters}
    if params:
        delta, how = params["delta"]
        row["Δν/Hz"] = f"{delta:.2f}{_mark(how)}"
        if "population" in params:
            p1, how = params["population"]
            row["p1"] = f"{p1:.3f}{_mark(how)}"
        if "coupling" in params:
            j, how = params["coupling"]
            row["J/Hz"] = f"{j:.2f}{_mark(how)}"
    row["rms"] = _sig(fit.rms, 2)
    row["note"] = fit.remark
    return row


def _render_series(result: Any) -> None:
    """What the sites were tied to, and the reference widths."""
    from registry.api import value_with_error_text as pm

    if any(f.parameters for f in result.fits):
        typer.echo("after a value: ~ tied to the series, = held, ? fitted but not determined")
    for t in result.trends:
        text = trend_text(t.to_dict())
        if text:  # one spectrum's value is shown in its row
            typer.echo(text)
    if result.tied_width is not None:
        w = result.tied_width
        typer.echo(f"intrinsic width {w.how}: {pm(w.width_hz, w.width_err_hz, 'Hz')}")
    elif result.reference_widths:
        typer.echo("intrinsic width: from each spectrum's reference line")


def _render_fit(result: Any) -> None:
    """The table of fits, the Eyring line, the global fit, then plots, storage and cautions."""
    from registry.api import value_with_error_text as pm

    typer.echo(table_text([_fit_row(f) for f in result.fits]))
    _render_series(result)
    for note in (*result.fit_notes, *result.series_notes):
        typer.echo(f"note: {note}")
    line = result.eyring_line
    if line is not None:
        typer.echo(
            f"Eyring line ({'weighted' if line.weighted else 'unweighted'}, {line.n_points} "
            f"rates): ΔH‡ = {pm(line.dh_kj_mol, line.dh_err_kj_mol, 'kJ/mol')}, "
            f"ΔS‡ = {pm(line.ds_j_mol_k, line.ds_err_j_mol_k, 'J/(mol·K)')}, "
            f"ΔG‡({line.t_ref_k:.2f} K) = "
            f"{pm(line.dg_ref_kj_mol, line.dg_ref_err_kj_mol, 'kJ/mol')}"
        )
        for w in line.warnings:
            typer.echo(f"note: {w}")
    if result.global_fit is not None:
        g = result.global_fit.eyring
        typer.echo(
            f"global fit ({g.n_temperatures} spectra, χ²/dof = {g.chi2_reduced:.2f}): "
            f"ΔH‡ = {pm(g.dh_kj_mol, g.dh_err_kj_mol, 'kJ/mol')}, "
            f"ΔS‡ = {pm(g.ds_j_mol_k, g.ds_err_j_mol_k, 'J/(mol·K)')}, "
            f"ΔG‡(298.15 K) = {pm(g.dg_298_kj_mol, g.dg_298_err_kj_mol, 'kJ/mol')}"
        )
        for t in result.global_fit.trends:
            typer.echo(trend_text(t.to_dict(), "global fit"))
        if result.global_note:
            typer.echo(f"note: {result.global_note}")
    for p in result.plots:
        typer.echo(f"plot: {p}")
    if result.stored_rate_points is not None:
        typer.echo(
            f"stored {result.stored_rate_points} rate points in measurement {result.measurement_id}"
        )
    for c in result.cautions:
        typer.echo(f"caution: {c}")
