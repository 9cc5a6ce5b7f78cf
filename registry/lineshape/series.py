"""A variable-temperature series of two-site spectra whose site parameters move with temperature.

Each spectrum is fitted with its site parameters free (:mod:`registry.lineshape.sitefit`); where a
spectrum determines Δν and the populations (slow and intermediate exchange: two lines, or a broad
line that still shows them) they stay as fitted. Where it does not (fast exchange: one averaged
line, whose width fixes only p₁p₂Δν²/k), they are tied to the series' smooth functions of
temperature, fitted through the spectra that do determine them:

* Δν: a straight line in T (shifts drift linearly over a VT series);
* the populations: van 't Hoff, ln K = −ΔH°/(RT) + ΔS°/R with K = p₂/p₁, giving ΔH° and ΔS° of
  the site equilibrium with their errors;
* J of a coupled pair, when fitted: one value for the series (their weighted mean; a coupling
  constant hardly moves with temperature), since the collapsing pair of fast exchange loses it.

A tied value enters with its prediction σ (a Gaussian prior), so the rate's error includes it.
``auto`` does the above; ``fit`` leaves every spectrum free; ``hold`` keeps the given values;
``tie`` ties every spectrum. The width comes from a reference line of each spectrum (or their
weighted mean, tied), or is held or fitted as before. Rows come back in temperature order.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from registry.errors import UsageError
from registry.kinetics.constants import R_KJ_MOL_K
from registry.lineshape.coupled import CoupledABModel
from registry.lineshape.fit import fit_spectrum
from registry.lineshape.fit_core import FloatArray, LineShapeFit, Prepared, prepare
from registry.lineshape.reference import ReferenceWidth, fit_reference, tie_widths, weighted_mean
from registry.lineshape.simulate import ExchangeModel
from registry.lineshape.sitefit import Setting, fit_sites, settings_from_model

#: how a site parameter varies across the series (see the module docstring)
MODES = ("auto", "fit", "hold", "tie")
#: a fitted Δν "determines" it when its σ is below this fraction of |Δν|: k goes about as Δν
#: near coalescence and as Δν² in fast exchange, so 1 % in Δν costs at most ~2 % in k; a spectrum
#: that knows Δν less well is better served by the series' drift …
DELTA_REL = 0.01
#: … and p₁ when its σ is below this (absolute; k goes as p₁p₂ in fast exchange); J, like Δν,
#: when its σ is below DELTA_REL of |J|
POP_ABS = 0.01
#: how a tied value is marked, by parameter
TIED_HOW = {"delta": "tied (drift)", "population": "tied (van 't Hoff)", "coupling": "tied (mean)"}


@dataclass(frozen=True)
class Trend:
    """A parameter tied across the series: y = a + b·x, x = T − T̄ (drift) or 1/T (van 't Hoff),
    or y = a (constant: J, or one value for the series); y is ln K = ln(p₂/p₁) for the
    populations."""

    name: str
    kind: str
    a: float
    b: float
    cov: tuple[tuple[float, float], tuple[float, float]]
    x_ref: float
    sources: tuple[str, ...]

    def _x(self, t_k: float) -> float:
        if self.kind == "constant":
            return 0.0
        return t_k - self.x_ref if self.kind == "linear drift" else 1.0 / t_k

    def predict(self, t_k: float) -> tuple[float, float]:
        """Value and σ at T in natural units (Hz for Δν, p₁ for the populations)."""
        x = self._x(t_k)
        y = self.a + self.b * x
        c = np.array(self.cov)
        sd = math.sqrt(max(float(np.array([1.0, x]) @ c @ np.array([1.0, x])), 0.0))
        if self.name != "population":
            return y, sd
        p1 = 1.0 / (1.0 + math.exp(y))  # y = ln K = ln(p₂/p₁)
        return p1, p1 * (1.0 - p1) * sd

    def to_dict(self) -> dict[str, object]:
        out: dict[str, object] = {"parameter": self.name, "kind": self.kind,
                                  "from": list(self.sources)}  # fmt: skip
        if self.kind == "constant":  # one value for the whole series (the global fit's)
            value, err = self.predict(self.x_ref or 300.0)
            out.update(value=value, error=err)
        elif len(self.sources) < 2:  # one spectrum gives a value, not a line
            value, err = self.predict(self.x_ref or 300.0)
            out.update(kind="one spectrum's value", value=value, error=err)
        elif self.kind == "linear drift":
            out.update(
                at_k=self.x_ref, value_hz=self.a, error_hz=math.sqrt(self.cov[0][0]),
                slope_hz_per_k=self.b, slope_err_hz_per_k=math.sqrt(self.cov[1][1]),
            )  # fmt: skip
        else:
            out.update(self.thermodynamics())
        return out

    def thermodynamics(self) -> dict[str, float]:
        """ΔH° (kJ/mol) and ΔS° (J/(mol·K)) of site 1 ⇌ site 2 with their errors."""
        return {
            "dh_kj_mol": -R_KJ_MOL_K * self.b,
            "dh_err_kj_mol": R_KJ_MOL_K * math.sqrt(self.cov[1][1]),
            "ds_j_mol_k": 1000.0 * R_KJ_MOL_K * self.a,
            "ds_err_j_mol_k": 1000.0 * R_KJ_MOL_K * math.sqrt(self.cov[0][0]),
        }


def weighted_line(
    x: Sequence[float], y: Sequence[float], sigma: Sequence[float]
) -> tuple[float, float, FloatArray]:
    """y = a + b·x by weighted least squares; covariance widened by the Birge ratio when the
    scatter exceeds the errors. One point gives a constant (b = 0) with its own σ."""
    xa, ya, sa = (np.asarray(v, float) for v in (x, y, sigma))
    if len(xa) == 1:
        return float(ya[0]), 0.0, np.array([[sa[0] ** 2, 0.0], [0.0, 0.0]])
    design = np.column_stack([np.ones_like(xa), xa]) / sa[:, None]
    coef, *_ = np.linalg.lstsq(design, ya / sa, rcond=None)
    cov = np.linalg.inv(design.T @ design)
    if len(xa) > 2:
        chi2 = float(np.sum(((ya - design @ coef * sa) / sa) ** 2)) / (len(xa) - 2)
        cov = cov * max(chi2, 1.0)
    return float(coef[0]), float(coef[1]), cov


def _trend(name: str, fits: Sequence[LineShapeFit], exclude: str | None = None) -> Trend | None:
    """The drift of Δν or the van 't Hoff line of p₁ through the fits that determine them
    (without the spectrum ``exclude``)."""
    rows = []
    for f in fits:
        if f.source == exclude:
            continue
        par = {n: (v, e) for n, v, e, _h in f.parameters}
        value, err = par.get(name, (math.nan, None))
        how = next((h for n, _v, _e, h in f.parameters if n == name), "")
        if f.failed or _misfit(f) or how != "fitted" or f.t_k is None or not err or err <= 0:
            continue
        limit = POP_ABS if name == "population" else DELTA_REL * abs(value)
        if err < limit:
            rows.append((f.t_k, value, err, f.source))
    if not rows:
        return None
    temps = [r[0] for r in rows]
    sources = tuple(r[3] for r in rows)
    if name == "coupling":
        mean, var = weighted_mean([r[1] for r in rows], [r[2] for r in rows])
        return Trend(name, "constant", mean, 0.0, ((var, 0.0), (0.0, 0.0)), 0.0, sources)
    if name == "delta":
        t_ref = float(np.mean(temps))
        a, b, cov = weighted_line([t - t_ref for t in temps], [r[1] for r in rows],
                                  [r[2] for r in rows])  # fmt: skip
        return Trend(name, "linear drift", a, b, pair(cov), t_ref, sources)
    y = [math.log((1.0 - r[1]) / r[1]) for r in rows]
    s = [r[2] / (r[1] * (1.0 - r[1])) for r in rows]
    a, b, cov = weighted_line([1.0 / t for t in temps], y, s)
    return Trend(name, "van 't Hoff", a, b, pair(cov), 0.0, sources)


def _misfit(fit: LineShapeFit) -> bool:
    """A fit whose model misses the data or ran a parameter to a bound says nothing about Δν or
    the populations (a k–width correlation does not spoil them)."""
    return any(p.startswith("residuals") or "at its bound" in p for p in fit.problems)


def pair(cov: FloatArray) -> tuple[tuple[float, float], tuple[float, float]]:
    """A 2×2 covariance as the nested tuples a frozen :class:`Trend` keeps."""
    return ((float(cov[0, 0]), float(cov[0, 1])), (float(cov[1, 0]), float(cov[1, 1])))


@dataclass(frozen=True, eq=False)
class SeriesFit:
    """The fits in temperature order, the trends the parameters were tied to, the widths."""

    fits: tuple[LineShapeFit, ...]
    trends: tuple[Trend, ...] = ()
    widths: tuple[ReferenceWidth, ...] = ()
    tied_width: ReferenceWidth | None = None
    notes: tuple[str, ...] = field(default=())


@dataclass(frozen=True)
class SiteOptions:
    """How Δν (``shifts``), the populations and the width vary; J fitted or held."""

    shifts: str = "auto"
    populations: str = "auto"
    width_hz: float = 1.0
    fix_width: bool = False
    reference_hz: tuple[float, float] | None = None
    tie_width: bool = False
    fit_coupling: bool = False

    def __post_init__(self) -> None:
        for name in ("shifts", "populations"):
            if getattr(self, name) not in MODES:
                raise UsageError(
                    f"{name}_mode must be one of {', '.join(MODES)}, not {getattr(self, name)!r}"
                )
        if self.tie_width and self.reference_hz is None:
            raise UsageError("tie_width needs a reference window (reference)")


@dataclass
class _First:
    """One spectrum after the first pass: the fit, its start, and what a refit needs."""

    fit: LineShapeFit
    start: LineShapeFit
    prep: Prepared
    linear: tuple[float, float, float]
    settings: dict[str, Setting]
    noise: float
    coupled: bool
    centre: float

    def refit(self, settings: dict[str, Setting]) -> LineShapeFit:
        return fit_sites(
            self.prep, settings, k0=self.start.k_per_s, linear0=self.linear, noise=self.noise,
            coupled=self.coupled, centre_given=self.centre,
        )  # fmt: skip


def _first(
    spectrum,  # type: ignore[no-untyped-def]
    ref: ReferenceWidth | None,
    model: ExchangeModel | CoupledABModel,
    options: SiteOptions,
    pops_mode: str,
) -> _First:
    """The start (per-temperature fit with the given sites), then the fit with the site
    parameters free (or held, as the modes say)."""
    coupled = isinstance(model, CoupledABModel)
    width = ref.width_hz if ref else options.width_hz
    t_k = None if spectrum.t_k is None or math.isnan(spectrum.t_k) else spectrum.t_k
    freq, y, source = spectrum.freq_hz, spectrum.intensity, spectrum.source
    start = fit_spectrum(freq, y, model, width_hz=width, fix_width=bool(ref) or options.fix_width,
                         source=source, t_k=t_k, t_text=spectrum.t_text)  # fmt: skip
    prep = prepare(freq, y, model, source, t_k, spectrum.t_text, 8)
    linear = (start.area / prep.ynorm, start.baseline_at_centre / prep.ynorm,
              start.baseline_slope_per_hz * prep.half_span / prep.ynorm)  # fmt: skip
    settings = settings_from_model(model, width, start.offset_hz)
    settings["width"] = _width_setting(ref, width, options.fix_width)
    for name, mode in (("delta", options.shifts), ("population", pops_mode)):
        if mode == "hold":
            settings[name] = Setting(settings[name].value, "held")
    if coupled and options.fit_coupling:
        settings["coupling"] = Setting(settings["coupling"].value, "fitted")
    centre = 0.5 * (model.shifts_hz[0] + model.shifts_hz[1])
    row = _First(start, start, prep, linear, settings, start.rms / prep.ynorm, coupled, centre)
    row.fit = row.refit(settings)
    return row


def fit_series(
    spectra: Sequence,  # SpectrumInput of fit_global: freq_hz, intensity, t_k, source, t_text
    model: ExchangeModel | CoupledABModel,
    options: SiteOptions,
    references: Sequence[ReferenceWidth] | None = None,
) -> SeriesFit:
    """Fit every spectrum with its site parameters as ``options`` say; see the module docstring.

    ``references`` are the widths measured on each spectrum's reference line
    (:func:`reference_widths`, on the whole spectrum before the region is cut), in order.
    """
    if len(model.shifts_hz) != 2:
        raise UsageError(
            "shifts_mode, populations_mode: Δν and the populations vary only for two sites; "
            "use auto or hold"
        )
    widths: list[ReferenceWidth | None] = (
        list(references) if references is not None else [None] * len(spectra)
    )
    tied = tie_widths([w for w in widths if w is not None]) if options.tie_width else None
    if isinstance(model, CoupledABModel) and options.populations not in ("auto", "hold"):
        raise UsageError(
            "populations_mode: the two sites of a coupled AB pair are equally populated; "
            "leave it at auto or hold"
        )
    pops_mode = "hold" if isinstance(model, CoupledABModel) else options.populations
    rows = [
        _first(s, tied or w, model, options, pops_mode)
        for s, w in zip(spectra, widths, strict=True)
    ]
    firsts = [row.fit for row in rows]
    modes = {"delta": options.shifts, "population": pops_mode}
    if isinstance(model, CoupledABModel) and options.fit_coupling:
        modes["coupling"] = "auto"
    trends = {n: _trend(n, firsts) for n, m in modes.items() if m in ("auto", "tie")}
    fits = [_second(row, firsts, trends, modes) for row in rows]
    fits.sort(key=lambda f: (f.t_k is None, f.t_k or 0.0))
    notes = [
        f"{words} not determined by any spectrum: held at the given value"
        for name, words in (("delta", "Δν"), ("population", "the populations"), ("coupling", "J"))
        if name in trends and trends[name] is None
    ]
    return SeriesFit(
        tuple(fits), tuple(t for t in trends.values() if t is not None),
        tuple(w for w in widths if w is not None), tied, tuple(notes),
    )  # fmt: skip


def _second(
    row: _First, firsts: list[LineShapeFit], trends: dict[str, Trend | None], modes: dict[str, str]
) -> LineShapeFit:
    """Refit one spectrum with the parameters it does not determine tied to their trend.

    'auto' keeps what the spectrum determines as fitted; when tying one parameter leaves the
    other undetermined in the refit, that one is tied too (one more refit). 'tie' ties every
    spectrum; one that helped draw the trend is tied to the trend of the *other* spectra
    (leave-one-out), so its own value is not counted twice.
    """
    fit, settings = row.fit, row.settings
    keep = {n for n, m in modes.items() if m == "auto" and _own(trends.get(n), fit)}
    for _ in range(2):
        todo = [
            n for n, m in modes.items()
            if m in ("auto", "tie") and settings[n].how == "fitted"
            and (n not in keep or _how(fit, n) == "fitted, not determined")
        ]  # fmt: skip
        if not todo:
            return fit
        for name in todo:
            settings = {**settings, name: _tied(name, trends.get(name), firsts, fit, settings)}
        fit = row.refit(settings)
        keep = {n for n in keep if settings[n].how == "fitted"}
    return fit


def _own(trend: Trend | None, fit: LineShapeFit) -> bool:
    return trend is not None and fit.source in trend.sources


def _how(fit: LineShapeFit, name: str) -> str:
    return next((h for n, _v, _e, h in fit.parameters if n == name), "")


def _tied(
    name: str,
    trend: Trend | None,
    firsts: list[LineShapeFit],
    fit: LineShapeFit,
    settings: dict[str, Setting],
) -> Setting:
    """The setting tying ``name`` to its trend at this temperature (without this spectrum's
    own value when it helped draw the trend); held at the given value when there is none."""
    basis = _trend(name, firsts, exclude=fit.source) if _own(trend, fit) else trend
    if basis is None or fit.t_k is None:
        return Setting(settings[name].value, "held")
    value, sd = basis.predict(fit.t_k)
    return Setting(value, TIED_HOW[name], max(sd, 1e-9))


def reference_widths(spectra: Sequence, window_hz: tuple[float, float]) -> list[ReferenceWidth]:
    """The reference line's width in each spectrum (freq_hz, intensity, source)."""
    return [fit_reference(s.freq_hz, s.intensity, window_hz, s.source) for s in spectra]


def _width_setting(ref: ReferenceWidth | None, width: float, fix: bool) -> Setting:
    if ref is not None:
        if ref.width_err_hz is None:
            return Setting(ref.width_hz, "held")
        return Setting(ref.width_hz, "reference" if ref.source != "series" else "tied (series)",
                       ref.width_err_hz)  # fmt: skip
    return Setting(width, "held" if fix else "fitted")
