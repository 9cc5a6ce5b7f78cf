"""The two line-shape workflows, on values already read (Hz, s⁻¹, K; see :mod:`.inputs`).

* :func:`simulate` — one exchange-broadened spectrum, optionally with seeded noise, written as
  CSV when a file is named.
* :func:`load_spectra` then :func:`analyse` — spectra at several temperatures: a window, one fit
  per spectrum, the Eyring line through the rates, the global Eyring-tied fit when asked for,
  the plots, the rate points a measurement would hold and the safety cautions for the
  temperatures measured. Storing the points is the api's part (:mod:`registry.api.lineshape`),
  so nothing below the api touches the registry.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from registry.errors import UsageError
from registry.lineshape.results import LineShapeAnalysis, SimulatedSpectrum
from registry.lineshape.simulate import ExchangeModel
from registry.lineshape.spectrum import Spectrum, csv_text, read_spectrum
from registry.lineshape.store_link import rate_points
from registry.outputs import check_target, write_atomically
from registry.record.units import ParsedValue

if TYPE_CHECKING:  # the fit modules load scipy.optimize: only the fit workflow pays for it
    from registry.kinetics.fits import EyringFit
    from registry.lineshape.coupled import CoupledABModel
    from registry.lineshape.fit_core import LineShapeFit
    from registry.lineshape.fit_global import GlobalFit, SpectrumInput
    from registry.lineshape.reference import ReferenceWidth
    from registry.lineshape.series import SeriesFit, SiteOptions
    from registry.reports.style import FigureStyle

#: a spectrum as a caller names it: a file (CSV or JCAMP-DX) or one already in memory
SpectrumSource = str | Path | Spectrum


# ---------------------------------------------------------------------------------- simulate


def simulate(
    model: ExchangeModel | CoupledABModel,
    k_per_s: float,
    width_hz: float,
    *,
    x_unit: str,
    mhz: float | None,
    points: int,
    window_hz: tuple[float, float] | None,
    noise: float,
    seed: int,
    temperature: ParsedValue | None,
    out: str | Path | None,
    reference_hz: float | None = None,
    reference_area: float = 0.5,
) -> SimulatedSpectrum:
    """The unit-area spectrum at rate k (plus noise, a fraction of the tallest point), as a record.

    Without a window the spectrum spans the sites with a margin of the larger of their span,
    25 widths and 20 Hz (and the reference line, when one is asked for, with a margin of 25
    widths). ``reference_hz`` adds a non-exchanging singlet of the same intrinsic width there,
    of area ``reference_area`` (the exchanging sites have area 1). With ``out`` it is written as
    CSV, abscissa in ``x_unit``.
    """
    target = None if out is None else check_target(out, what="out")
    sites_hz = list(model.shifts_hz)
    if window_hz is None:
        margin = max(model.span_hz, 25.0 * width_hz, 20.0)
        lo, hi = min(sites_hz) - margin, max(sites_hz) + margin
        if reference_hz is not None:
            lo = min(lo, reference_hz - 25.0 * width_hz)
            hi = max(hi, reference_hz + 25.0 * width_hz)
    else:
        lo, hi = window_hz
    freq = np.linspace(lo, hi, points)
    intensity = model.spectrum(freq, k_per_s, width_hz)
    if reference_hz is not None:
        half = 0.5 * width_hz
        intensity = intensity + reference_area * (half / math.pi) / (
            (freq - reference_hz) ** 2 + half * half
        )
    if noise > 0:
        rng = np.random.default_rng(seed)
        intensity = intensity + rng.normal(0.0, noise * float(intensity.max()), points)
    x = freq / mhz if x_unit == "ppm" and mhz else freq
    if out is not None:
        comments = {
            "simulated": (
                f"{len(sites_hz)} sites at {', '.join(f'{s:g}' for s in sites_hz)} Hz, "
                f"k = {k_per_s:g} s-1 ({model.scheme}), width {width_hz:g} Hz, noise {noise:g}"
            )
        }
        if reference_hz is not None:
            comments["reference line"] = f"{reference_hz:g} Hz, area {reference_area:g}"
        if temperature is not None:
            comments["temperature"] = f"{temperature.value:.2f} K"
        if mhz:
            comments["observe frequency"] = f"{mhz:g} MHz"
        with write_atomically(target) as handle:  # type: ignore[arg-type]
            handle.write(csv_text(x, intensity, x_unit, comments))
    return SimulatedSpectrum(
        file=None if out is None else str(out),
        points=points,
        x_unit=x_unit,
        sites_hz=tuple(sites_hz),
        populations=tuple(model.populations),
        scheme=model.scheme,
        k_per_s=k_per_s,
        width_hz=width_hz,
        observe_mhz=mhz,
        window_hz=(lo, hi),
        noise=noise,
        seed=seed if noise > 0 else None,
        t_k=None if temperature is None else temperature.value,
        coupling_hz=getattr(model, "j_hz", None),
        reference_hz=reference_hz,
        x=x,
        intensity=intensity,
    )


# ---------------------------------------------------------------------------------- fit


def load_spectra(
    sources: Sequence[SpectrumSource],
    temps: Sequence[ParsedValue] | None,
    x_unit: str | None,
    mhz: float | None,
) -> list[Spectrum]:
    """Read the spectra; give them the unit and temperatures the caller supplied.

    Temperatures given override those in the files. Spectra recorded at different
    spectrometer frequencies are refused unless one frequency is given for all.
    """
    spectra = [s if isinstance(s, Spectrum) else read_spectrum(s) for s in sources]
    if x_unit is not None:
        spectra = [s if s.x_unit else s.with_x_unit(x_unit) for s in spectra]
    if temps is not None:  # one per file: inputs.read_temperatures checked the count
        spectra = [
            s.with_temperature(p.value, p.text.strip()) for s, p in zip(spectra, temps, strict=True)
        ]
    if mhz is None:
        known = {round(s.observe_mhz, 2) for s in spectra if s.observe_mhz}
        if len(known) > 1:
            raise UsageError(
                "the files were recorded at different spectrometer frequencies "
                f"({', '.join(f'{m:g}' for m in sorted(known))} MHz); fit them separately"
            )
    return spectra


def common_mhz(spectra: Sequence[Spectrum], mhz: float | None) -> float | None:
    """The frequency given, else the first one a file states (load_spectra checked they agree)."""
    if mhz:
        return mhz
    return next((s.observe_mhz for s in spectra if s.observe_mhz), None)


def require_temperatures(spectra: Sequence[Spectrum]) -> None:
    """A global fit and stored rate points need every spectrum's temperature."""
    missing = next((s.source for s in spectra if s.t_k is None), None)
    if missing is not None:
        raise UsageError(
            f"{missing}: no temperature in the file; give the temperatures of all files (temps)"
        )


def _inputs(
    spectra: Sequence[Spectrum],
    mhz: float | None,
    window_hz: tuple[float, float] | None,
    reference_hz: tuple[float, float] | None = None,
) -> list[SpectrumInput]:
    """Each spectrum in Hz, cut to the window (both ends included), the reference window out."""
    from registry.lineshape.fit_global import SpectrumInput

    inputs = []
    for spec in spectra:
        freq = spec.frequency_hz(mhz)
        inten = spec.intensity
        keep = np.ones(freq.shape, dtype=bool)
        if window_hz is not None:
            keep &= (freq >= window_hz[0]) & (freq <= window_hz[1])
        if reference_hz is not None:
            keep &= (freq < reference_hz[0]) | (freq > reference_hz[1])
        freq, inten = freq[keep], inten[keep]
        inputs.append(SpectrumInput(freq, inten, spec.t_k or math.nan, spec.source, spec.t_text))
    return inputs


def _series_record(
    model: ExchangeModel | CoupledABModel,
    mhz: float | None,
    options: SiteOptions,
    window_hz: tuple[float, float] | None,
    series: SeriesFit,
) -> dict[str, object]:
    """The run a stored rate belongs to: what was given, how the sites and width were allowed
    to vary, and the trends the spectra were tied to (kept with each rate point)."""
    tied = series.tied_width
    return {
        "sites_hz": [float(v) for v in model.shifts_hz],
        "populations_given": [float(p) for p in model.populations],
        "scheme": model.scheme,
        "coupling_hz": getattr(model, "j_hz", None),
        "observe_mhz": mhz,
        "shifts_mode": options.shifts,
        "populations_mode": options.populations,
        "region_hz": None if window_hz is None else list(window_hz),
        "reference_hz": None if options.reference_hz is None else list(options.reference_hz),
        "width": _width_setting(options),
        "trends": [t.to_dict() for t in series.trends],
        "tied_width": None if tied is None else tied.to_dict(),
        "spectra": len(series.fits),
    }


def _width_setting(options: SiteOptions) -> str:
    if options.reference_hz is not None:
        return "tied reference width" if options.tie_width else "reference line per spectrum"
    return f"held at {options.width_hz:g} Hz" if options.fix_width else "fitted"


def analyse(
    spectra: Sequence[Spectrum],
    model: ExchangeModel | CoupledABModel,
    mhz: float | None,
    *,
    options: SiteOptions,
    window_hz: tuple[float, float] | None,
    global_fit: bool,
    plots_dir: str | Path | None,
    solvent_bp_k: float | None,
    store_doubtful: bool = False,
    plot_style: FigureStyle | None = None,
    plot_format: str = "png",
    plot_zoom: bool = True,
) -> LineShapeAnalysis:
    """Fit every spectrum, draw the Eyring line, optionally the global fit and the plots.

    Two sites (or a coupled AB pair) go through :func:`registry.lineshape.series.fit_series`,
    which lets Δν, the populations and the width vary as ``options`` say; more sites keep
    their given shifts and populations. Rows come back in temperature order. Doubtful fits
    (``LineShapeFit.problems``) give no rate point unless ``store_doubtful``.
    """
    from registry.kinetics.safety import safety_notes
    from registry.lineshape.fit import eyring_from_fits
    from registry.lineshape.series import reference_widths

    inputs = _inputs(spectra, mhz, window_hz, options.reference_hz)
    references = None
    if options.reference_hz is not None:
        references = reference_widths(_inputs(spectra, mhz, None), options.reference_hz)
    series = _fit_all(inputs, model, options, references)
    fits = list(series.fits)
    line = eyring_from_fits(fits)
    global_result = _global(inputs, series, model, options) if global_fit else None
    plots: list[str] = []
    if plots_dir is not None:
        observe = [mhz if s.x_unit == "ppm" else None for s in spectra]
        plots = _plots(fits, global_result, line, plots_dir, observe, plot_style, plot_format,
                       plot_zoom)  # fmt: skip
    temps_k = [f.t_k for f in fits if f.t_k is not None]
    cautions = safety_notes(np.array(temps_k), solvent_bp_k=solvent_bp_k) if temps_k else []
    stored = [f for f in fits if store_doubtful or not f.doubtful]
    left_out = [Path(f.source).name for f in fits if f.doubtful and not store_doubtful]
    notes = list(series.notes)
    if left_out:
        notes.append(
            f"no rate point to store, the fit is doubtful (see its note): {', '.join(left_out)}; "
            "keep them with store_doubtful"
        )
    return LineShapeAnalysis(
        sites_hz=tuple(model.shifts_hz),
        populations=tuple(model.populations),
        scheme=model.scheme,
        observe_mhz=mhz,
        fits=tuple(fits),
        eyring_line=line,
        global_fit=global_result,
        rate_points=(
            tuple(rate_points(stored, _series_record(model, mhz, options, window_hz, series)))
            if len(temps_k) == len(fits)
            else ()
        ),
        plots=tuple(plots),
        cautions=tuple(cautions),
        trends=series.trends,
        reference_widths=series.widths,
        tied_width=series.tied_width,
        series_notes=tuple(notes),
    )


def _fit_all(
    inputs: list[SpectrumInput],
    model: ExchangeModel | CoupledABModel,
    options: SiteOptions,
    references: list[ReferenceWidth] | None,
) -> SeriesFit:
    """Two sites: the series fit; more: each spectrum with its sites held (reference width held)."""
    from registry.lineshape.reference import tie_widths
    from registry.lineshape.series import SeriesFit, fit_series

    if len(model.shifts_hz) == 2:
        return fit_series(inputs, model, options, references)
    if options.shifts not in ("auto", "hold") or options.populations not in ("auto", "hold"):
        raise UsageError(
            "shifts_mode, populations_mode: Δν and the populations vary only for two sites; "
            "use auto or hold"
        )
    tied = tie_widths(references) if references and options.tie_width else None
    widths = [tied or r for r in references] if references else [None] * len(inputs)
    fits = [_held_sites_fit(s, model, options, w) for s, w in zip(inputs, widths, strict=True)]
    fits.sort(key=lambda f: (f.t_k is None, f.t_k or 0.0))
    return SeriesFit(tuple(fits), (), tuple(references or ()), tied)


def _held_sites_fit(
    s: SpectrumInput,
    model: ExchangeModel | CoupledABModel,
    options: SiteOptions,
    ref: ReferenceWidth | None,
) -> LineShapeFit:
    """One spectrum with its sites as given; a measured width is held, and its σ carried into
    σ(ln k) by refitting at w + σ_w (the change of ln k, added in quadrature)."""
    from dataclasses import replace

    from registry.lineshape.fit import fit_spectrum

    def fit(width: float, fixed: bool) -> LineShapeFit:
        return fit_spectrum(
            s.freq_hz, s.intensity, model, width_hz=width, fix_width=fixed, source=s.source,
            t_k=None if math.isnan(s.t_k) else s.t_k, t_text=s.t_text,
        )  # fmt: skip

    if ref is None:
        return fit(options.width_hz, options.fix_width)
    best = fit(ref.width_hz, True)
    if not ref.width_err_hz or best.ln_k_err is None or best.failed:
        return best
    shifted = fit(ref.width_hz + ref.width_err_hz, True)
    ln_k_err = math.hypot(best.ln_k_err, shifted.ln_k - best.ln_k)
    return replace(
        best, ln_k_err=ln_k_err, k_err_per_s=best.k_per_s * ln_k_err,
        width_err_hz=ref.width_err_hz,
    )  # fmt: skip


def _global(
    inputs: list[SpectrumInput],
    series: SeriesFit,
    model: ExchangeModel | CoupledABModel,
    options: SiteOptions,
) -> GlobalFit:
    """The Eyring-tied fit, Δν and the populations on shared lines fitted with it where the
    series tied them (:func:`registry.lineshape.global_sites.plan_for`), each spectrum's width
    held, fitted with its reference line's σ, or fitted."""
    from dataclasses import replace

    from registry.lineshape.fit_global import fit_global
    from registry.lineshape.global_sites import plan_for

    by_source = {f.source: f for f in series.fits}
    ordered = sorted(inputs, key=lambda s: s.t_k)
    starts = [by_source[s.source] for s in ordered]
    refs = {w.source: w for w in series.widths}
    spectra = []
    for s, f in zip(ordered, starts, strict=True):
        ref = series.tied_width or refs.get(s.source)
        # a reference width enters with its σ (0: held exactly); a held width stays as given
        width = ref.width_hz if ref else (f.width_hz if options.fix_width else None)
        sigma = (ref.width_err_hz or 0.0) if ref else None
        spectra.append(replace(s, model=_own_model(model, f), width_hz=width, width_err_hz=sigma))
    plan = plan_for(model, options, series.trends)
    held = options.fix_width and options.reference_hz is None
    return fit_global(spectra, model, width_hz=options.width_hz, fix_width=held, starts=starts,
                      plan=plan, tie_width=series.tied_width is not None)  # fmt: skip


def _own_model(
    model: ExchangeModel | CoupledABModel, fit: LineShapeFit
) -> ExchangeModel | CoupledABModel:
    """The sites one spectrum's fit found (Δν, p₁, J), centred where the given sites are."""
    from registry.lineshape.coupled import CoupledABModel

    values = {n: v for n, v, _e, _h in fit.parameters}
    if "delta" not in values:
        return model
    centre = 0.5 * (model.shifts_hz[0] + model.shifts_hz[1])
    shifts = (centre + 0.5 * values["delta"], centre - 0.5 * values["delta"])
    if isinstance(model, CoupledABModel):
        return CoupledABModel(shifts, values.get("coupling", model.j_hz))
    p1 = values["population"]
    return ExchangeModel(shifts, (p1, 1.0 - p1), model.scheme)


def _plots(
    fits: list[LineShapeFit],
    global_result: GlobalFit | None,
    line: EyringFit | None,
    directory: str | Path,
    observe_mhz: list[float | None],
    style: FigureStyle | None,
    fmt: str,
    zoom: bool = True,
) -> list[str]:
    """One PNG per spectrum and the Eyring plot: of the global fit when there is one."""
    from registry.lineshape.plots import write_plots

    written = write_plots(
        global_result.fits if global_result else fits,
        directory,
        line=global_result.eyring if global_result else line,
        observe_mhz=observe_mhz,
        fmt=fmt,
        zoom=zoom,
        **({"style": style} if style is not None else {}),
    )
    return [str(p) for p in written]
