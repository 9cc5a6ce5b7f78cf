"""``fluxledger lineshape``: simulate exchange-broadened spectra, fit rates, store them.

The commands parse options (quantities through :func:`registry.record.units.parse_value`), call
:mod:`registry.lineshape` and render text or ``--json``. numpy, scipy and matplotlib are
imported inside the commands so that ``fluxledger --help`` stays fast.
"""

from __future__ import annotations

import math
import re
from pathlib import Path
from typing import TYPE_CHECKING, Any

import typer

from registry.cli.context import ErrorBoundaryGroup, state
from registry.cli.output import print_json, table_text
from registry.errors import UnitError, UsageError

if TYPE_CHECKING:
    from registry.lineshape.simulate import ExchangeModel
    from registry.lineshape.spectrum import Spectrum

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
_FIELD = typer.Option(
    None, "--field", "--mhz", help="Spectrometer (observe) frequency, e.g. '400.13 MHz'."
)


# --- parsing helpers (text → canonical floats); errors are UnitError/UsageError ---------------

_ITEM = re.compile(
    r"^\s*(?P<num>[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(?P<unit>.*?)\s*$"
)


def _split_list(text: str, field: str) -> list[tuple[str, str | None]]:
    """``'3.10, 2.95 ppm'`` → [('3.10', 'ppm'), ('2.95', 'ppm')].

    A unit after the last value applies to every value written without one. Use a decimal
    point in lists: the comma separates values.
    """
    from registry.record.units import clean_text

    items = [clean_text(t) for t in text.split(",")]
    parsed = []
    for item in items:
        match = _ITEM.match(item)
        if not item or not match:
            raise UnitError(field, text, "write numbers separated by commas, e.g. '3.10,2.95'")
        parsed.append((match["num"], match["unit"] or None))
    last_unit = parsed[-1][1]
    return [(num, unit or last_unit) for num, unit in parsed]


def _shift_list(text: str, field: str) -> tuple[list[float], str]:
    """Numbers and their unit ('ppm' or 'Hz'), as written; ppm unless a unit says otherwise."""
    from registry.record.units import parse_value

    items = _split_list(text, field)
    units = {("ppm" if u is None or u.lower() == "ppm" else u) for _, u in items}
    if len(units) > 1:
        raise UnitError(field, text, "write all values in one unit")
    unit = units.pop()
    if unit == "ppm":
        return [parse_value(n, "dimensionless", field=field).value for n, _ in items], "ppm"
    return [parse_value(f"{n} {unit}", "shift", field=field).value for n, _ in items], "Hz"


def _count(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _to_hz(values: list[float], unit: str, mhz: float | None, field: str) -> list[float]:
    from registry.record.units import ppm_to_hz

    if unit == "Hz":
        return values
    if not mhz:
        raise UsageError(f"{field} is in ppm: give the spectrometer frequency with --field")
    return [ppm_to_hz(v, mhz) for v in values]


def _mhz(text: str | None) -> float | None:
    from registry.record.units import parse_value

    if text is None:
        return None
    mhz = parse_value(text, "field", field="--field", default_unit="MHz").value
    if mhz <= 0:
        raise UnitError("--field", text, "the spectrometer frequency must be > 0 MHz")
    return mhz


def _positive(text: str, quantity: str, field: str, default_unit: str) -> float:
    from registry.record.units import parse_value

    value = parse_value(text, quantity, field=field, default_unit=default_unit).value
    if not value > 0:
        raise UnitError(field, text, "must be > 0")
    return value


def _populations(text: str | None, n_sites: int) -> tuple[float, ...]:
    from registry.record.units import parse_value

    if text is None:
        return tuple([1.0 / n_sites] * n_sites)
    items = _split_list(text, "--populations")
    if any(unit for _, unit in items):
        raise UnitError("--populations", text, "populations are plain numbers")
    values = [parse_value(n, "dimensionless", field="--populations").value for n, _ in items]
    if len(values) != n_sites:
        raise UsageError(
            f"--populations gives {_count(len(values), 'value')} for {_count(n_sites, 'site')}"
        )
    if any(not v > 0 for v in values):
        raise UnitError("--populations", text, "every population must be > 0")
    total = sum(values)
    return tuple(v / total for v in values)


def _model(sites_hz: list[float], pops: tuple[float, ...], scheme: str) -> ExchangeModel:
    from registry.lineshape.simulate import SCHEMES, ExchangeModel

    if scheme not in SCHEMES:
        raise UsageError(f"--scheme must be one of {', '.join(SCHEMES)}, not {scheme!r}")
    if len(sites_hz) < 2:
        raise UsageError("--sites needs at least two shifts")
    if len(set(sites_hz)) < len(sites_hz):
        raise UsageError("--sites: two sites at the same shift give no exchange broadening")
    return ExchangeModel(tuple(sites_hz), pops, scheme)


def _range(text: str, field: str, unit: str, mhz: float | None) -> tuple[float, float]:
    """A 'lo,hi' pair in the sites' unit (or a unit written after it), returned in Hz."""
    items = _split_list(text, field)
    if len(items) != 2:
        raise UnitError(field, text, "give two values, e.g. '3.5,2.5'")
    written = items[1][1] or unit
    values, vunit = _shift_list(f"{items[0][0]},{items[1][0]} {written}", field)
    lo, hi = sorted(_to_hz(values, vunit, mhz, field))
    if lo == hi:
        raise UnitError(field, text, "the two ends must differ")
    return lo, hi


# --- simulate -----------------------------------------------------------------------------------


@app.command()
def simulate(
    sites: str = _SITES,
    k: str = typer.Option(
        ..., "--k", help="Rate constant for leaving site 1, s⁻¹ unless written: '120', '1.2 kHz'."
    ),
    out: Path = typer.Option(..., "--out", "-o", help="CSV file to write (shift, intensity)."),
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
    as_json: bool = _JSON,
) -> None:
    """Write the spectrum of exchanging sites (unit area) as CSV."""
    import numpy as np

    from registry.lineshape.spectrum import csv_text
    from registry.record.units import parse_value

    mhz = _mhz(field)
    shift_values, unit = _shift_list(sites, "--sites")
    sites_hz = _to_hz(shift_values, unit, mhz, "--sites")
    pops = _populations(populations, len(sites_hz))
    model = _model(sites_hz, pops, scheme)
    k_per_s = _positive(k, "rate", "--k", "1/s")
    width_hz = _positive(width, "shift", "--width", "Hz")
    if window is None:
        margin = max(model.span_hz, 25.0 * width_hz, 20.0)
        lo, hi = min(sites_hz) - margin, max(sites_hz) + margin
    else:
        lo, hi = _range(window, "--window", unit, mhz)
    freq = np.linspace(lo, hi, points)
    intensity = model.spectrum(freq, k_per_s, width_hz)
    if noise > 0:
        rng = np.random.default_rng(seed)
        intensity = intensity + rng.normal(0.0, noise * float(intensity.max()), points)
    comments = {
        "simulated": (
            f"{len(sites_hz)} sites at {', '.join(f'{s:g}' for s in sites_hz)} Hz, "
            f"k = {k_per_s:g} s-1 ({scheme}), width {width_hz:g} Hz, noise {noise:g}"
        )
    }
    t_k = None
    if temperature is not None:
        parsed = parse_value(temperature, "temperature", field="--temperature", default_unit="K")
        t_k = parsed.value
        comments["temperature"] = f"{parsed.value:.2f} K"
    if mhz:
        comments["observe frequency"] = f"{mhz:g} MHz"
    x = freq / mhz if unit == "ppm" and mhz else freq
    try:
        out.write_text(csv_text(x, intensity, unit, comments), encoding="utf-8")
    except OSError as exc:
        raise UsageError(f"cannot write {out}: {exc.strerror}") from exc
    result = {
        "file": str(out),
        "points": points,
        "x_unit": unit,
        "sites_hz": sites_hz,
        "populations": list(pops),
        "scheme": scheme,
        "k_per_s": k_per_s,
        "width_hz": width_hz,
        "observe_mhz": mhz,
        "window_hz": [lo, hi],
        "noise": noise,
        "seed": seed if noise > 0 else None,
        "t_k": t_k,
    }
    if as_json:
        print_json(result)
        return
    typer.echo(
        f"wrote {out}: {points} points, {lo:g} … {hi:g} Hz, k = {k_per_s:g} s⁻¹, "
        f"width {width_hz:g} Hz"
    )


# --- fit ----------------------------------------------------------------------------------------


def _load(
    files: list[Path], temps: str | None, x_unit: str | None, mhz: float | None
) -> list[Spectrum]:
    from registry.lineshape.spectrum import read_spectrum
    from registry.record.units import parse_value

    spectra = [read_spectrum(f) for f in files]
    if x_unit is not None:
        unit = {"ppm": "ppm", "hz": "Hz"}.get(x_unit.lower())
        if unit is None:
            raise UsageError(f"--x-unit must be 'ppm' or 'Hz', not {x_unit!r}")
        spectra = [s if s.x_unit else s.with_x_unit(unit) for s in spectra]
    if temps is not None:
        items = _split_list(temps, "--temps")
        if len(items) != len(files):
            raise UsageError(
                f"--temps gives {_count(len(items), 'temperature')} "
                f"for {_count(len(files), 'file')}"
            )
        parsed = [
            parse_value(f"{n} {u or ''}".strip(), "temperature", field="--temps", default_unit="K")
            for n, u in items
        ]
        spectra = [
            s.with_temperature(p.value, p.text.strip())
            for s, p in zip(spectra, parsed, strict=True)
        ]
    if mhz is None:
        known = {round(s.observe_mhz, 2) for s in spectra if s.observe_mhz}
        if len(known) > 1:
            raise UsageError(
                "the files were recorded at different spectrometer frequencies "
                f"({', '.join(f'{m:g}' for m in sorted(known))} MHz); fit them separately"
            )
    return spectra


def _common_mhz(spectra: list[Spectrum], mhz: float | None) -> float | None:
    if mhz:
        return mhz
    return next((s.observe_mhz for s in spectra if s.observe_mhz), None)


def _sig(value: float | None, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, plain notation where that stays short."""
    if value is None or not math.isfinite(value):
        return ""
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-4 <= abs(value) < 1e6:
        text = f"{value:.{max(digits - 1 - math.floor(math.log10(abs(value))), 0)}f}"
    return text


def _fit_row(fit: Any) -> dict[str, Any]:
    note = "" if fit.converged else "not converged"
    if "poorly determined" in fit.message:
        note = "k poorly determined"
    if "point spacing" in fit.message:
        note = (note + "; " if note else "") + "width collapsed"
    return {
        "file": Path(fit.source).name,
        "T/K": "" if fit.t_k is None else f"{fit.t_k:.2f}",
        "k/s-1": _sig(fit.k_per_s),
        "±k": _sig(fit.k_err_per_s, 2),
        "w/Hz": _sig(fit.width_hz, 3),
        "offset/Hz": f"{fit.offset_hz:.3f}",
        "rms": _sig(fit.rms, 2),
        "note": note,
    }


def _eyring_line_dict(line: Any) -> dict[str, Any]:
    keys = (
        "dh_kj_mol",
        "dh_err_kj_mol",
        "ds_j_mol_k",
        "ds_err_j_mol_k",
        "corr_dh_ds",
        "t_ref_k",
        "dg_ref_kj_mol",
        "dg_ref_err_kj_mol",
        "t_best_k",
        "dg_best_kj_mol",
        "dg_best_err_kj_mol",
        "chi2_reduced",
        "n_points",
        "weighted",
    )
    out = {k: getattr(line, k) for k in keys}
    out["warnings"] = list(line.warnings)
    out["method"] = "weighted Eyring line through the per-temperature rates"
    return out


def _pm(value: float, err: float | None, unit: str) -> str:
    """Value ± error, the error to two significant figures (as the stored rate texts)."""
    from registry.lineshape.store_link import value_with_error_text

    return value_with_error_text(value, err, unit)


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
    measurement: int = typer.Option(
        None,
        "--measurement",
        help="Add the per-temperature rates as rate points of this measurement id.",
    ),
    solvent_bp: str = typer.Option(
        None, "--solvent-bp", help="Solvent boiling point, e.g. '61 °C', for the safety notes."
    ),
    as_json: bool = _JSON,
) -> None:
    """Fit exchange rates to spectra; Eyring line through them; optionally store the rates."""
    import numpy as np

    from registry.kinetics.safety import safety_notes
    from registry.lineshape.fit import SpectrumInput, eyring_from_fits, fit_global, fit_spectrum
    from registry.lineshape.store_link import rate_points, store_rate_points

    mhz_option = _mhz(field)
    spectra = _load(files, temps, x_unit, mhz_option)
    mhz = _common_mhz(spectra, mhz_option)
    shift_values, unit = _shift_list(sites, "--sites")
    model = _model(
        _to_hz(shift_values, unit, mhz, "--sites"),
        _populations(populations, len(shift_values)),
        scheme,
    )
    width_hz = _positive(width, "shift", "--width", "Hz")
    window = _range(region, "--region", unit, mhz) if region else None
    if (global_fit or measurement is not None) and any(s.t_k is None for s in spectra):
        missing = next(s.source for s in spectra if s.t_k is None)
        raise UsageError(f"{missing}: no temperature in the file; give all of them with --temps")
    inputs = []
    for spec in spectra:
        freq = spec.frequency_hz(mhz)
        inten = spec.intensity
        if window is not None:
            keep = (freq >= window[0]) & (freq <= window[1])
            freq, inten = freq[keep], inten[keep]
        inputs.append(SpectrumInput(freq, inten, spec.t_k or math.nan, spec.source, spec.t_text))
    fits = [
        fit_spectrum(
            s.freq_hz,
            s.intensity,
            model,
            width_hz=width_hz,
            fix_width=fix_width,
            source=s.source,
            t_k=None if math.isnan(s.t_k) else s.t_k,
            t_text=s.t_text,
        )
        for s in inputs
    ]
    line = eyring_from_fits(fits)
    global_result = (
        fit_global(inputs, model, width_hz=width_hz, fix_width=fix_width, starts=fits)
        if global_fit
        else None
    )
    plot_files: list[str] = []
    if plots is not None:
        from registry.lineshape.plots import write_plots

        written = write_plots(
            global_result.fits if global_result else fits,
            plots,
            line=global_result.eyring if global_result else line,
            observe_mhz=[mhz if s.x_unit == "ppm" else None for s in spectra],
        )
        plot_files = [str(p) for p in written]
    stored = None
    if measurement is not None:
        stored = store_rate_points(state(ctx).db, measurement, fits, actor=state(ctx).actor)
    temps_k = [f.t_k for f in fits if f.t_k is not None]
    bp = None if solvent_bp is None else _positive(solvent_bp, "temperature", "--solvent-bp", "K")
    cautions = safety_notes(np.array(temps_k), solvent_bp_k=bp) if temps_k else []
    result = {
        "k_convention": "k = rate constant for leaving site 1 (k_AB = 1/tau_A), s-1",
        "sites_hz": list(model.shifts_hz),
        "populations": list(model.populations),
        "scheme": model.scheme,
        "observe_mhz": mhz,
        "fits": [f.to_dict() for f in fits],
        "eyring_line": _eyring_line_dict(line) if line is not None else None,
        "global": None,
        "rate_points": rate_points(fits) if temps_k and len(temps_k) == len(fits) else [],
        "plots": plot_files,
        "stored_rate_points": stored,
        "measurement_id": measurement,
        "cautions": cautions,
    }
    if global_result is not None:
        result["global"] = {
            **global_result.eyring.to_dict(),
            "converged": global_result.converged,
            "message": global_result.message,
            "n_points": global_result.n_points,
            "fits": [f.to_dict() for f in global_result.fits],
        }
    if as_json:
        print_json(result)
        return
    _render_fit(result, fits, line, global_result)


def _render_fit(result: dict[str, Any], fits: list[Any], line: Any, global_result: Any) -> None:
    typer.echo(table_text([_fit_row(f) for f in fits]))
    for f in fits:
        if not f.converged or "poorly" in f.message or "point spacing" in f.message:
            typer.echo(f"note: {Path(f.source).name}: {f.message}")
    if line is not None:
        typer.echo(
            f"Eyring line ({'weighted' if line.weighted else 'unweighted'}, {line.n_points} "
            f"rates): ΔH‡ = {_pm(line.dh_kj_mol, line.dh_err_kj_mol, 'kJ/mol')}, "
            f"ΔS‡ = {_pm(line.ds_j_mol_k, line.ds_err_j_mol_k, 'J/(mol·K)')}, "
            f"ΔG‡({line.t_ref_k:.2f} K) = "
            f"{_pm(line.dg_ref_kj_mol, line.dg_ref_err_kj_mol, 'kJ/mol')}"
        )
        for w in line.warnings:
            typer.echo(f"note: {w}")
    if global_result is not None:
        g = global_result.eyring
        typer.echo(
            f"global fit ({g.n_temperatures} spectra, χ²/dof = {g.chi2_reduced:.2f}): "
            f"ΔH‡ = {_pm(g.dh_kj_mol, g.dh_err_kj_mol, 'kJ/mol')}, "
            f"ΔS‡ = {_pm(g.ds_j_mol_k, g.ds_err_j_mol_k, 'J/(mol·K)')}, "
            f"ΔG‡(298.15 K) = {_pm(g.dg_298_kj_mol, g.dg_298_err_kj_mol, 'kJ/mol')}"
        )
        if not global_result.converged:
            typer.echo(f"note: global fit: {global_result.message}")
    for p in result["plots"]:
        typer.echo(f"plot: {p}")
    if result["stored_rate_points"] is not None:
        typer.echo(
            f"stored {result['stored_rate_points']} rate points in measurement "
            f"{result['measurement_id']}"
        )
    for c in result["cautions"]:
        typer.echo(f"caution: {c}")
