"""What both line-shape fits share: the model of one spectrum, its derivatives, the result record.

Model of one spectrum: y(ν) = A·S(ν; k, w, δ) + b₀ + b₁·u, with S the unit-area exchange
spectrum of :mod:`registry.lineshape.simulate` (k = rate constant for leaving site 1, see there),
w a common intrinsic width (FWHM, Hz), δ a common offset of all sites (Hz, for referencing
drift), A the integrated intensity and a straight baseline in u = (ν − ν_mid)/half-width.
k and w are fitted as ln k and ln w, which keeps them positive and makes the rate's error
relative (a rate is known to so many per cent, not so many s⁻¹).

Derivatives are analytic: of the resolvent 2·Re[1ᵀ(iω − L)⁻¹p] with respect to w and δ they
are −π and 2πi times 2·Re Σ aₘDₘ² (Dₘ = 1/(iω − λₘ)), and with respect to ln k it is
2·Re[(1ᵀV·D)(V⁻¹XV)(D·V⁻¹p)] with X the exchange generator at rate k. Standard errors are
√diag(s²(JᵀJ)⁻¹), s² = SSR/(N − p): right for white noise; real spectra (zero-filled,
apodised) have correlated points, so treat the errors as lower bounds.

The per-temperature fit is :mod:`registry.lineshape.fit`, the Eyring-tied one
:mod:`registry.lineshape.fit_global`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import OptimizeResult

from registry.errors import FluxledgerError
from registry.lineshape.simulate import ExchangeModel, Resolvent, evaluate

FloatArray = NDArray[np.float64]

#: Levenberg–Marquardt evaluations per start; a good start converges in 10–30
MAX_EVALUATIONS = 200

#: what a fit's message says when k is not pinned, or the width collapsed (see make_fit)
POORLY_DETERMINED = (
    "k is poorly determined: near the slow- or fast-exchange limit k trades off "
    "against the intrinsic width, so fix the width (measured without exchange)"
)
WIDTH_COLLAPSED = "the intrinsic width ran down to the point spacing: fix the width"
#: what a fit's message says when k ended at the bound of the search or above k_B·T/h: the fit
#: failed (no rate reproduces the spectrum), whatever the optimiser reported
AT_BOUND = "k ran to the bound of the search"

#: the bound of ln k (and of ln of every exp'd parameter) in the search
LN_BOUND = 40.0


def bounded_exp(x: float) -> float:
    """exp with its argument held to ±40, so a wild Levenberg–Marquardt trial step cannot overflow."""
    return math.exp(min(max(float(x), -LN_BOUND), LN_BOUND))


def not_converged(result: OptimizeResult) -> str:
    """The plain words for a fit that stopped before converging (never the optimiser's text)."""
    return (
        f"the fit stopped after {result.nfev} evaluations without converging: narrow the "
        "region to the exchanging lines or hold the width"
    )


def bound_problem(k: float, t_k: float | None, kappa: float = 1.0) -> str | None:
    """Why a fitted k is no result: at the search's bound (±40 in ln k), or above the largest
    rate transition-state theory allows, κ·k_B·T/h (Eyring 1935; ~6.2×10¹² s⁻¹ at 298 K)."""
    from registry.kinetics.constants import KB_OVER_H_PER_S_K

    if abs(math.log(k)) >= LN_BOUND - 1e-6:
        return f"{AT_BOUND} (k = {k:.3g} s⁻¹): the fit failed; no exchange rate fits this spectrum"
    if t_k is not None and k > kappa * KB_OVER_H_PER_S_K * t_k:
        limit = kappa * KB_OVER_H_PER_S_K * t_k
        return (
            f"{AT_BOUND}: k = {k:.3g} s⁻¹ exceeds κ·k_B·T/h = {limit:.3g} s⁻¹ at {t_k:.2f} K, "
            "the fastest rate a barrier can give: the fit failed"
        )
    return None


class LineShapeFitError(FluxledgerError):
    """A spectrum that cannot be fitted as given (too few points, no signal, no convergence)."""

    exit_code = 1

    def __init__(self, source: str, reason: str) -> None:
        super().__init__(source, reason)
        self.source = source
        self.reason = reason

    def __str__(self) -> str:
        return f"{self.source}: {self.reason}"


@dataclass(frozen=True, eq=False)
class LineShapeFit:
    """Result at one temperature. Errors are standard errors (None when not determined)."""

    source: str
    t_k: float | None
    t_text: str | None
    k_per_s: float
    k_err_per_s: float | None
    ln_k: float
    ln_k_err: float | None
    width_hz: float
    width_err_hz: float | None
    offset_hz: float
    offset_err_hz: float | None
    area: float
    baseline_at_centre: float
    baseline_slope_per_hz: float
    rms: float
    n_points: int
    n_params: int
    converged: bool
    message: str
    method: str = "per temperature"
    #: (name, value, error, how) of each site parameter: fitted, held, tied or reference
    parameters: tuple[tuple[str, float, float | None, str], ...] = ()
    #: what makes the rate doubtful, in plain words with what to do (see registry.lineshape.sitefit)
    problems: tuple[str, ...] = ()
    freq_hz: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)
    data: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)
    best_fit: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)

    def to_dict(self) -> dict[str, object]:
        """Plain values for JSON and tables (the arrays are left out)."""
        skip = {"freq_hz", "data", "best_fit", "parameters", "problems"}
        out: dict[str, object] = {
            k: getattr(self, k) for k in self.__dataclass_fields__ if k not in skip
        }
        out["parameters"] = [
            {"name": n, "value": v, "error": e, "how": h} for n, v, e, h in self.parameters
        ]
        out["problems"] = list(self.problems)
        out["doubtful"] = self.doubtful
        return out

    @property
    def doubtful(self) -> bool:
        """The fit ran but its rate should not be trusted without a look (see ``problems``)."""
        return bool(self.problems) and not self.failed

    @property
    def failed(self) -> bool:
        """k ended at the bound of the search or above κ·k_B·T/h (see :func:`bound_problem`):
        no result, never stored nor used in an Eyring line."""
        return AT_BOUND in self.message

    @property
    def full_note(self) -> str:
        """The message and the problems in full; the short "k is poorly determined" is left
        out when a problem says it at length."""
        words = [w for w in self.message.split("; ") if w]
        if self.problems:
            words = [w for w in words if w != POORLY_DETERMINED]
        return "; ".join([*words, *self.problems])

    @property
    def remark(self) -> str:
        """A few words for a table when the fit needs a second look, else ''.

        'k poorly determined' stands in for 'not converged' (it says what to do about it);
        'width collapsed' is added to either.
        """
        if self.failed:
            return "failed: k at its bound"
        if self.problems:
            return "doubtful: " + "; ".join(p.split(":")[0] for p in self.problems)
        note = "" if self.converged else "not converged"
        if POORLY_DETERMINED in self.message:
            note = "k poorly determined"
        if WIDTH_COLLAPSED in self.message:
            note = (note + "; " if note else "") + "width collapsed"
        return note


@dataclass
class ModelShape:
    """S(ν) and, when asked, its derivatives for one (k, w, δ); caches the diagonalisation."""

    model: ExchangeModel
    omega: FloatArray
    _k: float = math.nan
    _res: Resolvent | None = None

    def resolvent(self, k: float) -> Resolvent:
        if k != self._k or self._res is None:
            self._res = self.model.resolvent(k)
            self._k = k
        return self._res

    def value(self, k: float, width: float, offset: float) -> FloatArray:
        return evaluate(self.resolvent(k), self.omega / (2 * np.pi), width, offset)

    def derivatives(
        self, k: float, width: float, offset: float
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """S, ∂S/∂ln k, ∂S/∂w, ∂S/∂δ (analytic; central differences near a defective L)."""
        res = self.resolvent(k)
        if res.direct:
            return self._numeric(k, width, offset)
        lam = res.eigenvalues - np.pi * width + 2j * np.pi * offset
        # Element-wise over the n eigenvalues (n is small): BLAS calls on (N, n) arrays cost
        # more in thread start-up than the arithmetic itself.
        iw = 1j * self.omega
        d = [1.0 / (iw - lam_m) for lam_m in lam]
        s_c = sum(a * dm for a, dm in zip(res.amplitudes, d, strict=True))
        d2a = sum(a * dm * dm for a, dm in zip(res.amplitudes, d, strict=True))
        c = res.inverse @ self.model.generator(k) @ res.vectors
        n = len(lam)
        dk_c = sum(
            (res.left[m] * c[m, q] * res.right[q]) * (d[m] * d[q])
            for m in range(n)
            for q in range(n)
        )
        s = 2.0 * s_c.real
        ds_dw = -2.0 * np.pi * d2a.real
        ds_doff = -4.0 * np.pi * d2a.imag  # 2·Re(2πi·z) = −4π·Im z
        ds_dlnk = 2.0 * dk_c.real
        return s, ds_dlnk, ds_dw, ds_doff

    def along(
        self,
        k: float,
        width: float,
        offset: float,
        d_liou: NDArray[np.complex128],
        d_pops: NDArray[np.complex128],
    ) -> FloatArray:
        """∂S along a change ∂L of the matrix and ∂p of the populations (a site parameter:
        Δν, p₁, J; see the models' ``site_derivative``).

        S = 2·Re[1ᵀG·p] with G = (iω − L)⁻¹ gives ∂S = 2·Re[1ᵀG·∂L·G·p + 1ᵀG·∂p]; with
        L = VΛV⁻¹ that is 2·Re[Σ (1ᵀV)ₘ(V⁻¹∂LV)ₘq(V⁻¹p)q·DₘDq + Σ (1ᵀV)ₘ(V⁻¹∂p)ₘDₘ].
        Near a defective L the resolvent is solved at each frequency instead.
        """
        res = self.resolvent(k)
        shift = -np.pi * width + 2j * np.pi * offset
        if res.direct:
            n = len(res.populations)
            eye = np.eye(n)
            mats = 1j * self.omega[:, None, None] * eye - (res.liouvillian + shift * eye)[None]
            g_p = np.linalg.solve(mats, np.broadcast_to(res.populations.astype(complex), (len(self.omega), n))[..., None])[..., 0]  # fmt: skip
            ones = np.ones((len(self.omega), n, 1), complex)
            one_g = np.linalg.solve(np.swapaxes(mats, 1, 2), ones)[..., 0]
            val = np.einsum("ni,ij,nj->n", one_g, d_liou, g_p) + one_g @ d_pops
            return 2.0 * val.real
        lam = res.eigenvalues + shift
        iw = 1j * self.omega
        d = [1.0 / (iw - lam_m) for lam_m in lam]
        c = res.inverse @ d_liou @ res.vectors
        moved = res.inverse @ d_pops
        n = len(lam)
        total = sum(res.left[m] * moved[m] * d[m] for m in range(n))
        total = total + sum(
            (res.left[m] * c[m, q] * res.right[q]) * (d[m] * d[q])
            for m in range(n)
            for q in range(n)
        )
        return 2.0 * np.real(total)

    def _numeric(
        self, k: float, width: float, offset: float
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """Central differences, for the rare L too close to defective for eigenvectors."""
        h = 1e-6
        hz = 1e-6 * max(width, 1e-3)
        up = self.value(k * math.exp(h), width, offset)
        down = self.value(k * math.exp(-h), width, offset)
        d_lnk = (up - down) / (2 * h)
        s = self.value(k, width, offset)
        d_w = (self.value(k, width + hz, offset) - self.value(k, width - hz, offset)) / (2 * hz)
        d_off = (self.value(k, width, offset + hz) - self.value(k, width, offset - hz)) / (2 * hz)
        return s, d_lnk, d_w, d_off


@dataclass
class Prepared:
    """One spectrum scaled for fitting: intensities divided by their largest magnitude."""

    source: str
    freq: FloatArray
    y: FloatArray
    ynorm: float
    u: FloatArray
    half_span: float
    shape: ModelShape
    t_k: float | None
    t_text: str | None
    #: half the point spacing: a narrower line is not described by the sampled data
    width_floor: float

    def thinned(self, stride: int) -> Prepared:
        """Every ``stride``-th point, same scaling and width floor (for the coarse stage)."""
        if stride <= 1:
            return self
        freq = self.freq[::stride]
        return Prepared(
            self.source,
            freq,
            self.y[::stride],
            self.ynorm,
            self.u[::stride],
            self.half_span,
            ModelShape(self.shape.model, 2 * np.pi * freq),
            self.t_k,
            self.t_text,
            self.width_floor,
        )

    def width(self, theta_w: float) -> float:
        """w = floor + exp(θ): positive, and LM cannot chase it to zero where it has no grip."""
        return self.width_floor + bounded_exp(theta_w)

    def theta_w(self, width_hz: float) -> float:
        return math.log(max(width_hz - self.width_floor, 1e-3 * self.width_floor))


def prepare(
    freq_hz: FloatArray,
    intensity: FloatArray,
    model: ExchangeModel,
    source: str,
    t_k: float | None,
    t_text: str | None,
    n_params: int,
) -> Prepared:
    """Sort, check and scale one spectrum; a spectrum that cannot be fitted is refused here."""
    freq = np.asarray(freq_hz, dtype=float)
    y = np.asarray(intensity, dtype=float)
    if freq.shape != y.shape or freq.ndim != 1:
        raise LineShapeFitError(source, "frequency and intensity arrays differ in shape")
    if not (np.isfinite(freq).all() and np.isfinite(y).all()):
        raise LineShapeFitError(source, "the spectrum holds non-finite values")
    if len(freq) < n_params + 5:
        raise LineShapeFitError(
            source, f"{len(freq)} points are too few to fit {n_params} parameters"
        )
    order = np.argsort(freq)
    freq, y = freq[order], y[order]
    ynorm = float(np.abs(y).max())
    if ynorm == 0.0:
        raise LineShapeFitError(source, "the spectrum is all zeros")
    centre = 0.5 * (freq[0] + freq[-1])
    half = 0.5 * (freq[-1] - freq[0])
    if half <= 0:
        raise LineShapeFitError(source, "the frequency axis has zero width")
    lo, hi = min(model.shifts_hz), max(model.shifts_hz)
    if hi < freq[0] or lo > freq[-1]:
        raise LineShapeFitError(
            source,
            f"the sites ({lo:g} … {hi:g} Hz) lie outside the spectrum "
            f"({freq[0]:g} … {freq[-1]:g} Hz); check the shifts, units and spectrometer frequency",
        )
    return Prepared(
        source,
        freq,
        y / ynorm,
        ynorm,
        (freq - centre) / half,
        half,
        ModelShape(model, 2 * np.pi * freq),
        t_k,
        t_text,
        0.5 * (freq[-1] - freq[0]) / (len(freq) - 1),
    )


def covariance(jac: FloatArray, ssr: float, n: int) -> FloatArray | None:
    """s²·(JᵀJ)⁻¹, s² = SSR/(N − p); None when J does not determine every parameter.

    JᵀJ is formed with its columns scaled to unit length (a correlation-like matrix, well
    conditioned unless parameters are truly degenerate) and inverted by eigen-decomposition;
    an SVD of the tall N×p Jacobian gives the same numbers but costs ten times more.
    """
    p = jac.shape[1]
    if n <= p:
        return None
    norms = np.sqrt(np.einsum("ij,ij->j", jac, jac))
    if not (norms > 0).all():
        return None
    scaled = jac / norms
    gram = scaled.T @ scaled
    evals, evecs = np.linalg.eigh(gram)
    if evals[0] <= 1e-12 * evals[-1]:
        return None
    inv = (evecs / evals) @ evecs.T
    return inv / np.outer(norms, norms) * (ssr / (n - p))


def std_err(cov: FloatArray | None, i: int) -> float | None:
    """Standard error of parameter ``i``, None when the covariance does not give one."""
    if cov is None or not np.isfinite(cov[i, i]) or cov[i, i] < 0:
        return None
    return math.sqrt(float(cov[i, i]))


def make_fit(
    prep: Prepared,
    *,
    k: float,
    ln_k_err: float | None,
    width: float,
    width_err: float | None,
    offset: float,
    offset_err: float | None,
    linear: tuple[float, float, float],
    n_par: int,
    result: OptimizeResult,
    method: str,
    width_free: bool = False,
    k_width_corr: float | None = None,
) -> LineShapeFit:
    """A :class:`LineShapeFit` in the data's own units, with a warning when k is not pinned
    and the problems of :mod:`registry.lineshape.diagnose` (``k_width_corr`` when the width
    was fitted: None means not separable)."""
    from registry.lineshape.diagnose import K_UNDETERMINED, residual_problem, width_problem

    a, b0, b1 = linear
    model_y = a * prep.shape.value(k, width, offset) + b0 + b1 * prep.u
    resid = model_y - prep.y
    notes = [] if result.success else [not_converged(result)]
    bound = bound_problem(k, prep.t_k)
    if bound:
        notes.append(bound)
        ln_k_err = None
    elif ln_k_err is None or ln_k_err > 1.0:
        notes.append(POORLY_DETERMINED)
    if width <= 1.01 * prep.width_floor:
        notes.append(WIDTH_COLLAPSED)
    message = "; ".join(notes)
    problems = []
    if not bound:
        width_words = width_problem(k_width_corr) if width_free else None
        if width_words:
            problems.append(width_words)
        elif ln_k_err is None or ln_k_err > 1.0:
            problems.append(K_UNDETERMINED)
        words = residual_problem(resid, model_y - b0 - b1 * prep.u)
        problems += [words] if words else []
    return LineShapeFit(
        source=prep.source,
        t_k=prep.t_k,
        t_text=prep.t_text,
        k_per_s=k,
        k_err_per_s=None if ln_k_err is None else k * ln_k_err,
        ln_k=math.log(k),
        ln_k_err=ln_k_err,
        width_hz=width,
        width_err_hz=width_err,
        offset_hz=float(offset),
        offset_err_hz=offset_err,
        area=float(a * prep.ynorm),
        baseline_at_centre=float(b0 * prep.ynorm),
        baseline_slope_per_hz=float(b1 * prep.ynorm / prep.half_span),
        rms=math.sqrt(float(resid @ resid) / len(resid)) * prep.ynorm,
        n_points=len(prep.y),
        n_params=n_par,
        converged=bool(result.success) and not bound,
        message=message,
        method=method,
        problems=tuple(problems),
        freq_hz=prep.freq,
        data=prep.y * prep.ynorm,
        best_fit=model_y * prep.ynorm,
    )
