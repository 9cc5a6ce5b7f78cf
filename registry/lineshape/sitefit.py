"""One spectrum of two exchanging sites with its site parameters fitted, held or tied.

Real spectra drift: the sites' shifts, their separation Δν and the populations move with
temperature. Here each of them is a parameter of its own, besides k:

* ``centre`` — the mean of the two site shifts (Hz); ``delta`` — Δν = ν₁ − ν₂ (Hz);
* ``population`` — p₁, fitted as logit p₁ = ln(p₁/p₂) (= −ln K of the site equilibrium);
* ``width`` — the intrinsic FWHM (Hz), fitted as ln w; ``coupling`` — J (Hz) of a coupled AB pair.

Each is a :class:`Setting`: fitted (free), held (exactly at a value), or given with a σ —
tied to the series' smooth function of temperature, or measured on a reference line — which
enters as a Gaussian prior: one more residual s·(value − μ)/σ, s the noise of the spectrum.
The errors of k then include the uncertainty of everything it was tied to. Area and a straight
baseline are fitted with analytic derivatives, the rest by central differences (two-site shapes
cost microseconds). Afterwards :func:`diagnose` says in plain words what makes the rate
doubtful (:mod:`registry.lineshape.diagnose`): a parameter at its bound, k strongly correlated
with the width or with Δν or the populations, residuals that are not noise-like.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, replace

import numpy as np
from scipy.optimize import least_squares

from registry.lineshape.coupled import CoupledABModel
from registry.lineshape.diagnose import (
    K_UNDETERMINED,
    MAX_CORRELATION,
    residual_problem,
    width_problem,
)
from registry.lineshape.fit_core import (
    MAX_EVALUATIONS,
    POORLY_DETERMINED,
    FloatArray,
    LineShapeFit,
    Prepared,
    bound_problem,
    covariance,
    not_converged,
)
from registry.lineshape.simulate import ExchangeModel, two_site_spectrum

#: the parameters besides k, in the order of the vector θ after ln k
NAMES = ("centre", "delta", "population", "width", "coupling")


@dataclass(frozen=True)
class Setting:
    """How one parameter enters: ``how`` is 'fitted', 'held', 'tied' or 'reference'; ``value``
    the start (fitted), the value (held) or the prior's centre (tied, reference) in natural
    units (Hz; p₁ for the population); ``sigma`` the prior's σ."""

    value: float
    how: str = "fitted"
    sigma: float | None = None

    @property
    def free(self) -> bool:
        return self.how != "held"


def _to_internal(name: str, value: float) -> float:
    if name == "population":
        return math.log(value / (1.0 - value))
    if name == "width":
        return math.log(value)
    return value


def _to_natural(name: str, value: float) -> float:
    if name == "population":
        return 1.0 / (1.0 + math.exp(-min(max(value, -30.0), 30.0)))
    if name == "width":
        return math.exp(min(max(value, -40.0), 40.0))
    return value


def _prior_sigma(name: str, setting: Setting) -> float:
    """σ of the prior on the internal scale (logit for a population, ln w for a width)."""
    assert setting.sigma is not None
    if name == "population":  # d logit/dp = 1/(p(1−p))
        return setting.sigma / (setting.value * (1.0 - setting.value))
    if name == "width":
        return setting.sigma / setting.value
    return setting.sigma


def shape(freq: FloatArray, k: float, values: Mapping[str, float], coupled: bool) -> FloatArray:
    """The unit-area two-site (or coupled AB) spectrum for k and the natural parameter values."""
    nu1 = values["centre"] + 0.5 * values["delta"]
    nu2 = values["centre"] - 0.5 * values["delta"]
    if coupled:
        model = CoupledABModel((nu1, nu2), values["coupling"])
        return model.spectrum(freq, k, values["width"])
    w = values["width"]
    return two_site_spectrum(freq, nu1, nu2, k, values["population"], w, w)


class _Problem:
    """Residuals (data, then priors) and Jacobian for θ = ln k, the free parameters, A, b₀, b₁."""

    def __init__(
        self, prep: Prepared, settings: Mapping[str, Setting], coupled: bool, noise: float
    ) -> None:
        self.prep = prep
        self.settings = settings
        self.coupled = coupled
        self.free = [n for n in NAMES if settings[n].free]
        self.priors = [n for n in self.free if settings[n].sigma is not None]
        self.noise = noise
        self.n = len(prep.y)

    def values(self, theta: FloatArray) -> dict[str, float]:
        out = {n: s.value for n, s in self.settings.items()}
        for i, name in enumerate(self.free):
            out[name] = _to_natural(name, float(theta[1 + i]))
        return out

    def model(self, theta: FloatArray) -> FloatArray:
        k = math.exp(min(max(float(theta[0]), -40.0), 40.0))
        return shape(self.prep.freq, k, self.values(theta), self.coupled)

    def residuals(self, theta: FloatArray) -> FloatArray:
        a, b0, b1 = theta[-3:]
        data = a * self.model(theta) + b0 + b1 * self.prep.u - self.prep.y
        return np.concatenate([data, self._prior_rows(theta)])

    def _prior_rows(self, theta: FloatArray) -> FloatArray:
        rows = []
        for name in self.priors:
            i = 1 + self.free.index(name)
            setting = self.settings[name]
            mu = _to_internal(name, setting.value)
            rows.append(self.noise * (theta[i] - mu) / _prior_sigma(name, setting))
        return np.asarray(rows, dtype=float)

    def jacobian(self, theta: FloatArray) -> FloatArray:
        a = theta[-3]
        n_nl = 1 + len(self.free)
        jac = np.zeros((self.n + len(self.priors), len(theta)))
        for j in range(n_nl):
            step = 1e-6 * max(1.0, abs(float(theta[j])))
            up, down = theta.copy(), theta.copy()
            up[j] += step
            down[j] -= step
            jac[: self.n, j] = a * (self.model(up) - self.model(down)) / (2 * step)
        jac[: self.n, -3] = self.model(theta)
        jac[: self.n, -2] = 1.0
        jac[: self.n, -1] = self.prep.u
        for r, name in enumerate(self.priors):
            i = 1 + self.free.index(name)
            jac[self.n + r, i] = self.noise / _prior_sigma(name, self.settings[name])
        return jac


def fit_sites(
    prep: Prepared,
    settings: Mapping[str, Setting],
    *,
    k0: float,
    linear0: tuple[float, float, float],
    noise: float,
    coupled: bool = False,
    centre_given: float = 0.0,
    method: str = "per temperature, sites free",
) -> LineShapeFit:
    """Fit k and the free site parameters of one prepared spectrum; see the module docstring.

    ``k0`` and ``linear0`` (A, b₀, b₁ on the prepared scale) start the search, best taken from
    :func:`registry.lineshape.fit.fit_spectrum`; ``noise`` is the rms of that fit (prepared
    scale), which weighs the priors against the data.
    """
    problem = _Problem(prep, settings, coupled, max(noise, 1e-12))
    theta0 = [math.log(k0)]
    theta0 += [_to_internal(n, settings[n].value) for n in problem.free]
    theta0 += list(linear0)
    result = least_squares(
        problem.residuals,
        np.asarray(theta0, float),
        jac=problem.jacobian,
        method="lm",
        x_scale="jac",
        max_nfev=MAX_EVALUATIONS,
    )
    theta = result.x
    data_res = result.fun[: problem.n]
    ssr = float(data_res @ data_res)
    jac = problem.jacobian(theta)
    # s² = SSR/(N − p) from the data rows alone; the prior rows were weighted with ``noise``
    cov = covariance(jac, ssr, problem.n)
    fit = _record(problem, result, cov, method)
    # the offset reported is that of the sites' centre from the centre of the sites given
    return replace(fit, offset_hz=fit.offset_hz - centre_given)


def _errors(
    problem: _Problem, theta: FloatArray, cov: FloatArray | None
) -> dict[str, float | None]:
    """Standard errors in natural units (delta method for p₁ and w)."""
    out: dict[str, float | None] = {}
    names = ["ln_k", *problem.free]
    for i, name in enumerate(names):
        var = None if cov is None else float(cov[i, i])
        if var is None or not math.isfinite(var) or var < 0:
            out[name] = None
            continue
        err = math.sqrt(var)
        value = _to_natural(name, float(theta[i])) if name != "ln_k" else 0.0
        if name == "population":
            err *= value * (1.0 - value)
        elif name == "width":
            err *= value
        out[name] = err
    return out


def _record(problem: _Problem, result: object, cov: FloatArray | None, method: str) -> LineShapeFit:
    prep = problem.prep
    theta = result.x  # type: ignore[attr-defined]
    k = math.exp(min(max(float(theta[0]), -40.0), 40.0))
    values = problem.values(theta)
    errors = _errors(problem, theta, cov)
    a, b0, b1 = (float(v) for v in theta[-3:])
    best = a * problem.model(theta) + b0 + b1 * prep.u
    resid = best - prep.y
    ln_k_err = errors["ln_k"]
    notes = [] if result.success else [not_converged(result)]  # type: ignore[attr-defined]
    bound = bound_problem(k, prep.t_k)
    if bound:
        notes.append(bound)
        ln_k_err = None
    elif ln_k_err is None or ln_k_err > 1.0:
        notes.append(POORLY_DETERMINED)
    params = []
    for name in NAMES:
        s = problem.settings[name]
        if name == "coupling" and not problem.coupled:
            continue
        if name == "population" and problem.coupled:
            continue
        how = s.how
        if how == "fitted" and name in ("delta", "population", "coupling"):
            r = correlation(problem, cov, name)
            err = errors.get(name)
            if r is None or err is None or abs(r) > MAX_CORRELATION:
                how = "fitted, not determined"
        params.append((name, values[name], errors.get(name), how))
    fit = LineShapeFit(
        source=prep.source, t_k=prep.t_k, t_text=prep.t_text, k_per_s=k,
        k_err_per_s=None if ln_k_err is None else k * ln_k_err, ln_k=math.log(k),
        ln_k_err=ln_k_err, width_hz=values["width"], width_err_hz=errors.get("width"),
        offset_hz=values["centre"], offset_err_hz=errors.get("centre"), area=a * prep.ynorm,
        baseline_at_centre=b0 * prep.ynorm,
        baseline_slope_per_hz=b1 * prep.ynorm / prep.half_span,
        rms=math.sqrt(float(resid @ resid) / len(resid)) * prep.ynorm, n_points=len(prep.y),
        n_params=len(theta), converged=bool(result.success) and not bound,  # type: ignore[attr-defined]
        message="; ".join(notes), method=method, parameters=tuple(params),
        freq_hz=prep.freq, data=prep.y * prep.ynorm, best_fit=best * prep.ynorm,
    )  # fmt: skip
    return replace(fit, problems=tuple(diagnose(problem, fit, cov, resid, best - b0 - b1 * prep.u)))


def correlation(problem: _Problem, cov: FloatArray | None, name: str) -> float | None:
    """Correlation of ln k with a fitted parameter (None when not fitted or not determined)."""
    if cov is None or name not in problem.free:
        return None
    j = 1 + problem.free.index(name)
    denom = math.sqrt(abs(cov[0, 0] * cov[j, j]))
    return float(cov[0, j] / denom) if denom > 0 else None


def diagnose(
    problem: _Problem,
    fit: LineShapeFit,
    cov: FloatArray | None,
    resid: FloatArray,
    signal: FloatArray,
) -> list[str]:
    """What makes this rate doubtful, each in plain words with what to do about it."""
    out = []
    values = {n: v for n, v, _e, _h in fit.parameters}
    if fit.failed:
        return out
    if "width" in problem.free and fit.width_hz <= 1.01 * problem.prep.width_floor:
        out.append(
            "width at its bound: the intrinsic width ran down to the point spacing; hold the "
            "width or measure it on a reference line (reference window)"
        )
    p = values.get("population")
    if p is not None and "population" in problem.free and not 0.02 < p < 0.98:
        out.append(
            f"population at its bound: p₁ ran to {p:.3f}; hold the populations or tie them "
            "across the series"
        )
    width_free = "width" in problem.free and problem.settings["width"].sigma is None
    width_words = width_problem(correlation(problem, cov, "width")) if width_free else None
    if width_words:
        out.append(width_words)
    elif fit.ln_k_err is None or fit.ln_k_err > 1.0:
        out.append(K_UNDETERMINED)
    for name, words in (("delta", "Δν"), ("population", "p₁"), ("coupling", "J")):
        r = correlation(problem, cov, name)
        if r is not None and problem.settings[name].sigma is None and abs(r) > 0.99:
            out.append(
                f"k–{words} correlation {r:+.2f}: this spectrum does not fix {words}; tie it "
                "to the series or hold it"
            )
    words = residual_problem(resid, signal)
    return [*out, words] if words else out


def settings_from_model(
    model: ExchangeModel | CoupledABModel, width_hz: float, offset_hz: float = 0.0
) -> dict[str, Setting]:
    """Starting settings (all fitted except the coupling) from a model of two sites."""
    nu1, nu2 = model.shifts_hz
    j = model.j_hz if isinstance(model, CoupledABModel) else 0.0
    return {
        "centre": Setting(0.5 * (nu1 + nu2) + offset_hz),
        "delta": Setting(nu1 - nu2),
        "population": Setting(model.populations[0], "held" if _is_ab(model) else "fitted"),
        "width": Setting(width_hz),
        "coupling": Setting(j, "held"),
    }


def _is_ab(model: object) -> bool:
    return isinstance(model, CoupledABModel)
