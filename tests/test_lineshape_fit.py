"""Fits recover known rates from seeded synthetic spectra, within the errors they report.

The spectra are simulated with :mod:`registry.lineshape.simulate` (checked against the
published two-site results in test_lineshape_simulate.py) plus seeded white noise. The Eyring
equation's constants are CODATA values (scipy.constants).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import constants

from registry.lineshape.eyring import (
    eyring_ln_rate,
    ln_rate_from_dg_dh,
    parameters_from_dg_dh,
)
from registry.lineshape.fit import eyring_from_fits, fit_spectrum
from registry.lineshape.fit_core import LineShapeFitError, ModelShape
from registry.lineshape.fit_global import SpectrumInput, fit_global
from registry.lineshape.simulate import ExchangeModel

TWO_SITE = ExchangeModel.equal([-60.0, 60.0])


def _noisy(
    model: ExchangeModel,
    k: float,
    *,
    seed: int,
    width: float = 1.5,
    offset: float = 0.0,
    noise: float = 0.01,
    points: int = 4096,
    span: float = 300.0,
) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    freq = np.linspace(-span, span, points)
    clean = 5.0 * model.spectrum(freq, k, width, offset) + 0.02 + 1e-5 * freq
    return freq, clean + rng.normal(0.0, noise * clean.max(), points)


@pytest.mark.parametrize(
    ("k", "fix_width"),
    [(3.0, True), (40.0, False), (266.0, False), (800.0, False), (4000.0, True)],
)
def test_rate_recovered_within_reported_error(k: float, fix_width: bool) -> None:
    freq, y = _noisy(TWO_SITE, k, seed=int(k), offset=0.7)
    fit = fit_spectrum(freq, y, TWO_SITE, width_hz=1.5 if fix_width else 1.0, fix_width=fix_width)
    assert fit.converged
    assert fit.k_err_per_s is not None
    assert fit.k_err_per_s < 0.1 * k  # the test could fail: the error is informative
    assert abs(fit.k_per_s - k) < 3.0 * fit.k_err_per_s
    assert abs(fit.offset_hz - 0.7) < 3.0 * fit.offset_err_hz
    assert fit.area == pytest.approx(5.0, rel=0.02)
    if not fix_width:
        assert abs(fit.width_hz - 1.5) < 3.0 * fit.width_err_hz


def test_reported_errors_are_calibrated() -> None:
    # Over many noise draws the scatter of ln k around the truth, in units of the reported
    # error, must have a spread near 1 (χ²-like check of s²(JᵀJ)⁻¹ for white noise).
    k = 150.0
    z = []
    for seed in range(40):
        freq, y = _noisy(TWO_SITE, k, seed=1000 + seed, points=1024, noise=0.02)
        fit = fit_spectrum(freq, y, TWO_SITE, width_hz=1.0)
        assert fit.ln_k_err is not None
        z.append((fit.ln_k - math.log(k)) / fit.ln_k_err)
    z_arr = np.array(z)
    assert 0.7 < z_arr.std() < 1.35
    assert abs(z_arr.mean()) < 0.5
    assert 0.5 < np.mean(np.abs(z_arr) < 1.0) < 0.85


def test_unequal_populations() -> None:
    model = ExchangeModel((-40.0, 55.0), (0.7, 0.3))
    freq, y = _noisy(model, 90.0, seed=7)
    fit = fit_spectrum(freq, y, model, width_hz=1.0)
    assert abs(fit.k_per_s - 90.0) < 3 * fit.k_err_per_s


def test_three_site_cycle() -> None:
    model = ExchangeModel.equal([-80.0, 10.0, 75.0], scheme="cycle")
    freq, y = _noisy(model, 120.0, seed=11)
    fit = fit_spectrum(freq, y, model, width_hz=1.0)
    assert abs(fit.k_per_s - 120.0) < 3 * fit.k_err_per_s
    # the same data are a poor fit with the other exchange scheme
    other = fit_spectrum(freq, y, ExchangeModel.equal([-80.0, 10.0, 75.0]), width_hz=1.0)
    assert other.rms > 1.5 * fit.rms


def test_analytic_jacobian_matches_finite_differences() -> None:
    model = ExchangeModel((-30.0, 5.0, 45.0), (0.5, 0.3, 0.2))
    omega = 2 * np.pi * np.linspace(-150.0, 150.0, 601)
    shape = ModelShape(model, omega)
    k, w, off = 70.0, 1.3, 0.4
    s, d_lnk, d_w, d_off = shape.derivatives(k, w, off)
    h = 1e-6
    num_lnk = (shape.value(k * math.exp(h), w, off) - shape.value(k * math.exp(-h), w, off)) / (
        2 * h
    )
    num_w = (shape.value(k, w + h, off) - shape.value(k, w - h, off)) / (2 * h)
    num_off = (shape.value(k, w, off + h) - shape.value(k, w, off - h)) / (2 * h)
    scale = np.abs(s).max()
    np.testing.assert_allclose(s, shape.value(k, w, off), rtol=1e-10)
    np.testing.assert_allclose(d_lnk, num_lnk, atol=1e-6 * scale)
    np.testing.assert_allclose(d_w, num_w, atol=1e-6 * scale)
    np.testing.assert_allclose(d_off, num_off, atol=1e-6 * scale)


def test_eyring_rate_from_codata_constants() -> None:
    # With ΔH‡ = 0 and ΔS‡ = 0, k = k_B·T/h (Eyring 1935; CODATA k_B and h are exact since 2019).
    t = 298.15
    assert math.exp(eyring_ln_rate(t, 0.0, 0.0)) == pytest.approx(
        constants.Boltzmann * t / constants.Planck, rel=1e-12
    )
    assert constants.Boltzmann * t / constants.Planck == pytest.approx(6.2124e12, rel=1e-4)
    # ln k from (ΔG‡(T_m), ΔH‡) is the same function as from (ΔH‡, ΔS‡)
    dh, ds, t_m = 62.0, -8.0, 280.0
    dg_m = dh - t_m * ds / 1000.0
    temps = np.array([250.0, 280.0, 320.0])
    np.testing.assert_allclose(
        ln_rate_from_dg_dh(temps, dg_m, dh, t_m), eyring_ln_rate(temps, dh, ds), rtol=1e-13
    )
    params = parameters_from_dg_dh(dg_m, dh, np.diag([0.01, 0.04]), t_m, 3, None, "test")
    assert params.ds_j_mol_k == pytest.approx(ds)
    assert params.dg_298_kj_mol == pytest.approx(dh - 298.15 * ds / 1000.0)


def _vt_series(dh: float, ds: float, temps: list[float], seed: int) -> list[SpectrumInput]:
    rng = np.random.default_rng(seed)
    freq = np.linspace(-250.0, 250.0, 2048)
    out = []
    for t in temps:
        k = math.exp(eyring_ln_rate(t, dh, ds))
        clean = TWO_SITE.spectrum(freq, k, 1.5)
        y = clean + rng.normal(0.0, 0.01 * clean.max(), freq.size)
        out.append(SpectrumInput(freq, y, t, f"T{t:g}"))
    return out


def test_global_fit_recovers_activation_parameters() -> None:
    dh, ds = 58.0, -6.0
    spectra = _vt_series(dh, ds, [255.0, 265.0, 275.0, 285.0, 295.0, 305.0], seed=5)
    result = fit_global(spectra, TWO_SITE, width_hz=1.5, fix_width=True)
    e = result.eyring
    assert result.converged
    assert e.dh_err_kj_mol is not None and e.dh_err_kj_mol < 1.0
    assert abs(e.dh_kj_mol - dh) < 3 * e.dh_err_kj_mol
    assert abs(e.ds_j_mol_k - ds) < 3 * e.ds_err_j_mol_k
    assert abs(e.dg_298_kj_mol - (dh - 298.15 * ds / 1000)) < 3 * e.dg_298_err_kj_mol
    assert result.chi2_reduced == pytest.approx(1.0, abs=0.1)
    # the per-temperature fits and their Eyring line tell the same story
    line = eyring_from_fits(
        [
            fit_spectrum(s.freq_hz, s.intensity, TWO_SITE, width_hz=1.5, fix_width=True, t_k=s.t_k)
            for s in spectra
        ]
    )
    assert line is not None
    assert abs(line.dh_kj_mol - e.dh_kj_mol) < 2 * line.dh_err_kj_mol


def test_global_fit_needs_two_temperatures() -> None:
    spectra = _vt_series(58.0, 0.0, [280.0], seed=1)
    with pytest.raises(LineShapeFitError, match="two or more temperatures"):
        fit_global(spectra, TWO_SITE)


def test_unfittable_spectra_are_user_errors() -> None:
    freq = np.linspace(-100.0, 100.0, 512)
    with pytest.raises(LineShapeFitError, match="all zeros"):
        fit_spectrum(freq, np.zeros_like(freq), TWO_SITE, source="flat.csv")
    with pytest.raises(LineShapeFitError, match="too few"):
        fit_spectrum(freq[:8], freq[:8], TWO_SITE, source="short.csv")
    with pytest.raises(LineShapeFitError, match="outside the spectrum"):
        fit_spectrum(freq + 1000.0, np.ones_like(freq), TWO_SITE, source="far.csv")
    with pytest.raises(LineShapeFitError, match="non-finite"):
        fit_spectrum(freq, np.full_like(freq, np.nan), TWO_SITE, source="nan.csv")
    err = LineShapeFitError("a.csv", "why")
    assert str(err) == "a.csv: why"
    assert err.exit_code == 1


def test_fast_limit_with_free_width_is_flagged() -> None:
    # Deep in fast exchange the line is a Lorentzian whose width is w + πΔν²/(2k): k and w
    # cannot both be had from it; the fit must say so rather than report a sharp k.
    freq, y = _noisy(TWO_SITE, 2.0e5, seed=3)
    fit = fit_spectrum(freq, y, TWO_SITE, width_hz=1.0)
    assert "poorly determined" in fit.message or "point spacing" in fit.message
