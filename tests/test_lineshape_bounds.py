"""Line-shape fits that fail: k at the bound of the search; a point without σ_k in the Eyring
line; ΔG‡(298.15 K) of the global fit extrapolated.

Check values: k_B·T/h from CODATA (scipy.constants), the largest rate a barrier can give
(Eyring, J. Chem. Phys. 3, 107 (1935)); the weighted Eyring line is an independent weighted
least-squares fit (numpy.polyfit with weights 1/σ of ln(k/T)) of ln(k/T) against 1/T,
ΔH‡ = −R·slope.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import constants as C

from registry.lineshape.eyring import eyring_ln_rate
from registry.lineshape.fit import eyring_from_fits, fill_k_errors, fit_spectrum
from registry.lineshape.fit_global import SpectrumInput, fit_global
from registry.lineshape.simulate import ExchangeModel
from registry.lineshape.store_link import rate_points

TWO_SITE = ExchangeModel.equal([-60.0, 60.0])
KB_H = C.Boltzmann / C.Planck


def _single_line(seed: int = 1) -> tuple[np.ndarray, np.ndarray]:
    """One Lorentzian of the intrinsic width at the centre: infinitely fast exchange, which the
    fit can only approach by running k to the bound of its search."""
    freq = np.linspace(-300.0, 300.0, 4096)
    w = 1.5
    y = 5.0 * (w / 2 / math.pi) / (freq**2 + (w / 2) ** 2)
    return freq, y + np.random.default_rng(seed).normal(0.0, 1e-3 * y.max(), freq.size)


def test_a_fit_at_the_k_bound_is_a_failure() -> None:
    freq, y = _single_line()
    fit = fit_spectrum(freq, y, TWO_SITE, width_hz=1.5, fix_width=True, t_k=300.0, source="a.csv")
    assert fit.k_per_s > KB_H * 300.0  # the old result: 2.35×10¹⁷ s⁻¹, reported as converged
    assert fit.failed and not fit.converged
    assert fit.k_err_per_s is None
    assert "bound" in fit.remark
    assert rate_points([fit]) == []  # never stored


def _rates(temps: list[float], dh: float, ds: float) -> list[float]:
    return [math.exp(eyring_ln_rate(t, dh, ds)) for t in temps]


def _fake_fit(t: float, k: float, err: float | None, source: str):  # type: ignore[no-untyped-def]
    from registry.lineshape.fit_core import LineShapeFit

    return LineShapeFit(
        source=source, t_k=t, t_text=None, k_per_s=k, k_err_per_s=err, ln_k=math.log(k),
        ln_k_err=None if err is None else err / k, width_hz=1.0, width_err_hz=None,
        offset_hz=0.0, offset_err_hz=None, area=1.0, baseline_at_centre=0.0,
        baseline_slope_per_hz=0.0, rms=0.0, n_points=100, n_params=5, converged=True,
        message="ok",
    )  # fmt: skip


def test_one_point_without_sigma_keeps_the_line_weighted() -> None:
    temps = [280.0, 290.0, 300.0, 310.0, 320.0]
    ks = [
        k * f for k, f in zip(_rates(temps, 60.0, -5.0), [1.05, 0.97, 1.02, 0.9, 1.1], strict=True)
    ]
    rel = [0.02, 0.05, None, 0.03, 0.2]
    fits = [_fake_fit(t, k, None if r is None else r * k, f"s{i}")
            for i, (t, k, r) in enumerate(zip(temps, ks, rel, strict=True))]  # fmt: skip
    errors, note = fill_k_errors(fits)
    assert errors is not None and note is not None and "s2" in note
    line = eyring_from_fits(fits)
    assert line is not None and line.weighted
    assert any("no σ_k for s2" in w for w in line.warnings)
    # independent weighted fit: the point without σ gets the largest relative σ (0.2)
    sig = np.array([0.02, 0.05, 0.2, 0.03, 0.2])
    x, y = 1.0 / np.array(temps), np.log(np.array(ks) / np.array(temps))
    slope, _ = np.polyfit(x, y, 1, w=1.0 / sig)
    assert line.dh_kj_mol == pytest.approx(-C.R * slope / 1000.0, rel=1e-9)


def test_failed_fits_are_left_out_of_the_line() -> None:
    temps = [280.0, 290.0, 300.0]
    fits = [_fake_fit(t, k, 0.05 * k, f"s{i}") for i, (t, k) in
            enumerate(zip(temps, _rates(temps, 60.0, -5.0), strict=True))]  # fmt: skip
    bad = _fake_fit(310.0, 2.35e17, None, "bound.csv")
    object.__setattr__(bad, "message", "ok; k ran to the bound of the search (k = 2.35e+17 s⁻¹)")
    line = eyring_from_fits([*fits, bad])
    assert line is not None and line.n_points == 3
    assert any("bound.csv" in w for w in line.warnings)


def test_global_fit_warns_when_298_is_extrapolated() -> None:
    rng = np.random.default_rng(7)
    freq = np.linspace(-250.0, 250.0, 1024)
    spectra = []
    for t in (330.0, 345.0, 360.0):  # 32–62 K above 298.15 K
        k = math.exp(eyring_ln_rate(t, 70.0, 0.0))
        clean = TWO_SITE.spectrum(freq, k, 1.5)
        y = clean + rng.normal(0.0, 0.01 * clean.max(), freq.size)
        spectra.append(SpectrumInput(freq, y, t, f"T{t:g}"))
    result = fit_global(spectra, TWO_SITE, width_hz=1.5, fix_width=True)
    assert any("extrapolated" in w and "298.1" in w for w in result.warnings)


def test_plots_zoom_to_the_lines_by_default(tmp_path) -> None:  # type: ignore[no-untyped-def]
    """A Lorentzian of half-width γ stands above 1 % of its height where |x − x0| < γ·√99
    (L ∝ 1/(1 + (x − x0)²/γ²)); the zoomed view is that span widened by 30 % on each side."""
    import numpy as np

    from registry.lineshape.plots import _zoomed

    x = np.linspace(-500.0, 500.0, 200001)
    gamma, x0 = 2.0, 40.0
    shape = 1.0 / (1.0 + ((x - x0) / gamma) ** 2)
    floor = 1.0 / (1.0 + ((-500.0 - x0) / gamma) ** 2)  # the shape's lowest point
    level = floor + 0.01 * (1.0 - floor)
    half = gamma * np.sqrt(1.0 / level - 1.0)  # ≈ γ·√99
    lo, hi = _zoomed(x, shape)
    assert lo == pytest.approx(x0 - half - 0.3 * 2 * half, abs=0.01)  # grid step 0.005
    assert hi == pytest.approx(x0 + half + 0.3 * 2 * half, abs=0.01)
    assert _zoomed(x, np.zeros_like(x)) == (-500.0, 500.0)  # nothing to zoom on: the window
