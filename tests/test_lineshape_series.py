"""A variable-temperature series as real spectra are: drifting sites, unequal populations that move
with temperature, the intrinsic width from a reference line, 1 % noise.

Truth values are the inputs of the simulation (an invented series, not a real compound): the
rates from the Eyring equation (Eyring, J. Chem. Phys. 3, 107 (1935), constants from CODATA via
scipy.constants), the populations from van 't Hoff, ln K = −ΔH°/RT + ΔS°/R. The spectra are the
Rogers & Woodbrey closed form (checked against the matrix form in test_lineshape_simulate.py) plus
a unit-area Lorentzian written out here.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants as C

from registry import api
from registry.lineshape.diagnose import durbin_watson_z
from registry.lineshape.fit_core import prepare
from registry.lineshape.reference import fit_reference, tie_widths
from registry.lineshape.simulate import ExchangeModel, two_site_spectrum
from registry.lineshape.sitefit import Setting, fit_sites
from registry.lineshape.spectrum import Spectrum

R = C.R  # J/(mol·K), CODATA
KB_H = C.Boltzmann / C.Planck
DH, DS = 58.0, -7.0  # kJ/mol, J/(mol·K): invented barrier
DH0, DS0 = 2.0, 5.0  # kJ/mol, J/(mol·K): invented site equilibrium, p₁ ≈ 0.55 at 300 K
TEMPS = [270.0, 280.0, 290.0, 300.0, 310.0, 320.0, 330.0, 340.0]
REF_HZ = -250.0


def _rate(t: float) -> float:
    return KB_H * t * math.exp(DS / R - DH * 1000.0 / (R * t))


def _p1(t: float) -> float:
    k_eq = math.exp(-DH0 * 1000.0 / (R * t) + DS0 / R)  # K = p₂/p₁
    return 1.0 / (1.0 + k_eq)


def _lorentzian(freq: np.ndarray, centre: float, width: float) -> np.ndarray:
    half = width / 2
    return (half / math.pi) / ((freq - centre) ** 2 + half**2)


def _truth(t: float) -> dict[str, float]:
    frac = (t - TEMPS[0]) / (TEMPS[-1] - TEMPS[0])
    # sites drift by 0.015 and 0.005 ppm at 400 MHz across the series: Δν moves by 4 Hz
    return {
        "k": _rate(t), "p1": _p1(t), "nu1": 50.0 + 6.0 * frac, "nu2": -50.0 + 2.0 * frac,
        "w": 1.0 + 0.4 * (1.0 - frac),
    }  # fmt: skip


def _series(seed: int, points: int = 4096) -> list[Spectrum]:
    rng = np.random.default_rng(seed)
    freq = np.linspace(-300.0, 300.0, points)
    spectra = []
    for t in TEMPS:
        v = _truth(t)
        y = two_site_spectrum(freq, v["nu1"], v["nu2"], v["k"], v["p1"], v["w"], v["w"])
        y = y + 0.5 * _lorentzian(freq, REF_HZ, v["w"])
        y = y + rng.normal(0.0, 0.01 * y.max(), freq.size)
        spectra.append(Spectrum(freq, y, "Hz", f"vt_{t:.0f}", t_k=t))
    return spectra


def _fit(spectra: list[Spectrum], **kwargs: object):  # type: ignore[no-untyped-def]
    return api.fit_lineshapes(
        spectra, "50,-50 Hz", populations="0.5,0.5", region="-200,300 Hz",
        reference="-280,-220 Hz", **kwargs,
    )  # fmt: skip


def test_drifting_series_recovers_every_rate_and_the_barrier() -> None:
    """The issue's criterion (every rate within 5 %, ΔH‡ within 1 kJ/mol) on one seeded series.

    It is a fixed example, not a guarantee: with 1 % noise and 4,096 points the fast-exchange
    rates carry 3–4 % errors (Δν there is extrapolated from the slow spectra), so over 20 seeds
    every rate lies within 5 % in about half the series (benchmarks/bench_lineshape.py). What
    holds for every seed is checked below: ΔH‡ within 1 kJ/mol, and errors that cover the truth.
    """
    result = _fit(_series(seed=0))
    assert [f.t_k for f in result.fits] == TEMPS
    for fit in result.fits:
        k = _truth(fit.t_k)["k"]  # type: ignore[arg-type]
        assert abs(fit.k_per_s / k - 1.0) < 0.05, (fit.source, fit.k_per_s, k)
    line = result.eyring_line
    assert line is not None and abs(line.dh_kj_mol - DH) < 1.0
    hows = {f.source: dict((n, h) for n, _v, _e, h in f.parameters) for f in result.fits}
    assert hows["vt_270"]["delta"] == "fitted" and hows["vt_340"]["delta"] == "tied (drift)"
    assert hows["vt_340"]["population"] == "tied (van 't Hoff)"
    assert all(h["width"] == "reference" for h in hows.values())
    vant_hoff = next(t for t in result.trends if t.kind == "van 't Hoff").thermodynamics()
    assert abs(vant_hoff["dh_kj_mol"] - DH0) < 3 * vant_hoff["dh_err_kj_mol"]
    assert abs(vant_hoff["ds_j_mol_k"] - DS0) < 3 * vant_hoff["ds_err_j_mol_k"]
    assert len(result.rate_points) == 8


def test_barrier_within_1_kj_mol_and_rates_covered_on_every_seed() -> None:
    """Ten seeded series: ΔH‡ within 1 kJ/mol in each, and the 80 rates' stated σ_k cover the
    truth as normal errors should (rates of one series share their trends, so the 80 are not
    independent; the band of :func:`_coverage_ok` is wide enough for that)."""
    z = []
    for seed in range(1, 11):
        result = _fit(_series(seed=seed))
        line = result.eyring_line
        assert line is not None and abs(line.dh_kj_mol - DH) < 1.0, seed
        z += [(f.k_per_s - _truth(f.t_k)["k"]) / f.k_err_per_s for f in result.fits]  # type: ignore[arg-type, operator]
    assert _coverage_ok(np.array(z))
    assert not _coverage_ok(2.0 * np.array(z))


def test_held_equal_populations_are_called_doubtful_and_not_stored() -> None:
    """The old behaviour: populations held at 50:50 while the spectra say 57:43."""
    spectra = _series(seed=4)[:2]  # slow exchange, where both lines show
    result = _fit(spectra, populations_mode="hold", shifts_mode="hold")
    assert all(any("residuals not noise-like" in p for p in f.problems) for f in result.fits)
    assert all("Durbin–Watson" in p for f in result.fits for p in f.problems)
    assert result.rate_points == ()
    assert any("no rate point" in n and "store_doubtful" in n for n in result.series_notes)
    assert result.eyring_line is not None
    assert any("doubtful rates (vt_270, vt_280)" in w for w in result.eyring_line.warnings)
    again = _fit(spectra, populations_mode="hold", shifts_mode="hold", store_doubtful=True)
    assert len(again.rate_points) == 2
    # letting them vary (the default) fits the same spectra without complaint
    assert not any(f.problems for f in _fit(spectra).fits)


def test_rows_come_in_temperature_order() -> None:
    spectra = _series(seed=5)[::-2]
    result = _fit(spectra)
    assert [f.t_k for f in result.fits] == sorted(f.t_k for f in result.fits)  # type: ignore[type-var]
    assert [p["t_k"] for p in result.rate_points] == sorted(p["t_k"] for p in result.rate_points)


def test_no_optimiser_text_in_any_note() -> None:
    result = _fit(_series(seed=6)[:2], populations_mode="hold", shifts_mode="hold")
    text = " ".join(result.notes)
    for word in ("ftol", "xtol", "gtol", "`", "Both actual and predicted"):
        assert word not in text


def test_width_fitted_in_fast_exchange_is_called_correlated() -> None:
    """Fast exchange, width free, no reference: k and w trade off (the width of the averaged
    line is w + 4πp₁p₂Δν²/(k₁₂ + k₂₁), Gutowsky & Holm 1956)."""
    freq = np.linspace(-300.0, 300.0, 4096)
    rng = np.random.default_rng(11)
    y = two_site_spectrum(freq, 50.0, -50.0, 20000.0, 0.5, 1.0, 1.0)
    y = y + rng.normal(0.0, 0.01 * y.max(), freq.size)
    result = api.fit_lineshapes(
        [Spectrum(freq, y, "Hz", "fast", t_k=350.0)], "50,-50 Hz", width="1.5 Hz",
        shifts_mode="hold", populations_mode="hold",
    )  # fmt: skip
    (fit,) = result.fits
    assert any(p.startswith("k–width correlation") and "reference window" in p
               for p in fit.problems)  # fmt: skip
    assert fit.doubtful and result.rate_points == ()


def test_reference_width_against_a_written_lorentzian() -> None:
    freq = np.linspace(-50.0, 50.0, 2001)
    rng = np.random.default_rng(2)
    y = 3.0 * _lorentzian(freq, 4.0, 1.7) + 0.01 + rng.normal(0.0, 0.005, freq.size)
    ref = fit_reference(freq, y, (-20.0, 25.0), "r")
    assert ref.width_err_hz is not None
    assert abs(ref.width_hz - 1.7) < 4 * ref.width_err_hz
    assert ref.centre_hz == pytest.approx(4.0, abs=0.02)


def test_tied_width_is_the_weighted_mean() -> None:
    from registry.lineshape.reference import ReferenceWidth

    refs = [ReferenceWidth(w, e, 0.0, "s") for w, e in [(1.0, 0.1), (1.2, 0.2), (1.1, 0.05)]]
    tied = tie_widths(refs)
    weights = np.array([100.0, 25.0, 400.0])  # 1/σ², written out
    assert tied.width_hz == pytest.approx(np.average([1.0, 1.2, 1.1], weights=weights))


def test_durbin_watson_against_a_hand_count() -> None:
    # e = 1, 2, −1, 0: Σ(Δe)² = 1 + 9 + 1 = 11, Σe² = 6, d = 11/6 (Durbin & Watson 1950)
    d, z = durbin_watson_z(np.array([1.0, 2.0, -1.0, 0.0]))
    assert d == pytest.approx(11 / 6)
    assert z == pytest.approx((11 / 6 - 2.0) / (2.0 / 2.0))


# ---- coverage: the errors mean what they say ------------------------------------------------


def _coverage_ok(z: np.ndarray) -> bool:
    """Normal errors put 68.3 % of |z| below 1 and 95.4 % below 2; with 60 draws the first
    fraction lies in [0.50, 0.86] (≈ ±3σ of a binomial), the second above 0.85."""
    inside1 = float(np.mean(np.abs(z) < 1.0))
    inside2 = float(np.mean(np.abs(z) < 2.0))
    return 0.50 <= inside1 <= 0.86 and inside2 >= 0.85


def _one(freq, y, settings, source="c"):  # type: ignore[no-untyped-def]
    from registry.lineshape.fit import fit_spectrum

    model = ExchangeModel((50.0, -50.0), (0.5, 0.5))
    f0 = fit_spectrum(freq, y, model, width_hz=settings["width"].value, fix_width=True)
    prep = prepare(freq, y, model, source, 300.0, None, 8)
    linear = (f0.area / prep.ynorm, f0.baseline_at_centre / prep.ynorm,
              f0.baseline_slope_per_hz * prep.half_span / prep.ynorm)  # fmt: skip
    return fit_sites(prep, settings, k0=f0.k_per_s, linear0=linear, noise=f0.rms / prep.ynorm)


def test_errors_cover_the_truth_at_their_stated_level() -> None:
    """60 seeded repeats of two cases: intermediate exchange with the sites free and the width
    from a reference line; fast exchange with Δν and p₁ tied to priors whose centres scatter
    about the truth by their σ (as a series' trend would)."""
    freq = np.linspace(-250.0, 250.0, 2048)
    z_mid, z_fast = [], []
    for seed in range(60):
        rng = np.random.default_rng(1000 + seed)
        clean = two_site_spectrum(freq, 52.0, -48.0, 150.0, 0.56, 1.2, 1.2)
        y = clean + rng.normal(0.0, 0.01 * clean.max(), freq.size)
        w_meas = 1.2 + rng.normal(0.0, 0.02)
        mid = {
            "centre": Setting(2.0), "delta": Setting(100.0), "population": Setting(0.5),
            "width": Setting(w_meas, "reference", 0.02), "coupling": Setting(0.0, "held"),
        }  # fmt: skip
        fit = _one(freq, y, mid)
        z_mid.append((fit.k_per_s - 150.0) / fit.k_err_per_s)
        clean = two_site_spectrum(freq, 52.0, -48.0, 3000.0, 0.56, 1.2, 1.2)
        y = clean + rng.normal(0.0, 0.01 * clean.max(), freq.size)
        fast = {
            **mid,
            "delta": Setting(100.0 + rng.normal(0.0, 1.0), "tied", 1.0),
            "population": Setting(0.56 + rng.normal(0.0, 0.01), "tied", 0.01),
        }
        fit = _one(freq, y, fast)
        z_fast.append((fit.k_per_s - 3000.0) / fit.k_err_per_s)
    for z in (np.array(z_mid), np.array(z_fast)):
        assert _coverage_ok(z)
        # the check can fail: errors half or twice as large as reported would not pass it
        assert not _coverage_ok(2.0 * z)
        assert not _coverage_ok(0.5 * z)


@given(
    st.lists(st.tuples(st.floats(-100.0, 100.0), st.floats(0.01, 10.0)), min_size=1, max_size=12)
)
def test_weighted_mean_and_its_birge_widened_variance(rows: list[tuple[float, float]]) -> None:
    """Against numpy.average and the textbook variance 1/Σw, times the reduced χ² when that
    exceeds 1 (Birge ratio squared; Birge 1932)."""
    from registry.lineshape.reference import weighted_mean

    values, sigma = [r[0] for r in rows], [r[1] for r in rows]
    w = 1.0 / np.square(sigma)
    mean, var = weighted_mean(values, sigma)
    expected = float(np.average(values, weights=w))
    assert mean == pytest.approx(expected, rel=1e-9, abs=1e-9)
    chi2 = float(np.sum(w * (np.array(values) - expected) ** 2)) / max(len(rows) - 1, 1)
    factor = max(chi2, 1.0) if len(rows) > 1 else 1.0
    assert var == pytest.approx(factor / float(np.sum(w)), rel=1e-9)
