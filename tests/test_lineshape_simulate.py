"""Exchange-broadened spectra checked against the published two-site results.

Sources: Gutowsky & Holm, J. Chem. Phys. 25, 1228 (1956) (equal-population line shape,
coalescence at k = πΔν/√2, slow-exchange broadening k/π); Rogers & Woodbrey, J. Phys. Chem. 66,
540 (1962) (closed form with populations and T₂); McConnell, J. Chem. Phys. 28, 430 (1958) and
Sack, Mol. Phys. 1, 163 (1958) (matrix form); fast-exchange width 4π·p_A·p_B·Δν²/(k_AB + k_BA)
from the same Bloch–McConnell equations (Sandström, Dynamic NMR Spectroscopy, 1982, ch. 2;
from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.lineshape.simulate import (
    ExchangeModel,
    bloch_mcconnell_spectrum,
    exchange_generator,
    resolvent,
    scheme_rate_matrix,
    stationary_populations,
    two_site_spectrum,
)


def _two_site_matrix(k_ab: float, p_a: float) -> np.ndarray:
    return np.array([[0.0, k_ab], [k_ab * p_a / (1 - p_a), 0.0]])


def _fwhm(freq: np.ndarray, y: np.ndarray) -> float:
    """Full width at half height of the single tallest peak, by linear interpolation."""
    i = int(np.argmax(y))
    half = y[i] / 2
    left = i - np.argmax(y[i::-1] < half)
    right = i + np.argmax(y[i:] < half)
    xl = np.interp(half, [y[left], y[left + 1]], [freq[left], freq[left + 1]])
    xr = np.interp(half, [y[right], y[right - 1]], [freq[right], freq[right - 1]])
    return float(xr - xl)


@pytest.mark.parametrize(
    ("k", "p_a", "w_a", "w_b"),
    [
        (3.0, 0.5, 1.0, 1.0),
        (80.0, 0.5, 0.5, 0.5),
        (222.0, 0.5, 1.0, 1.0),
        (400.0, 0.7, 0.8, 2.0),
        (5000.0, 0.25, 1.5, 0.3),
        (1e6, 0.6, 1.0, 1.0),
    ],
)
def test_closed_form_and_matrix_agree(k: float, p_a: float, w_a: float, w_b: float) -> None:
    freq = np.linspace(-400.0, 400.0, 4001)
    closed = two_site_spectrum(freq, -50.0, 50.0, k, p_a, w_a, w_b)
    matrix = bloch_mcconnell_spectrum(
        freq, [-50.0, 50.0], _two_site_matrix(k, p_a), [p_a, 1 - p_a], [w_a, w_b]
    )
    np.testing.assert_allclose(matrix, closed, rtol=1e-9, atol=0)


@settings(max_examples=60, deadline=None)
@given(
    log_k=st.floats(-1.0, 6.0),
    p_a=st.floats(0.05, 0.95),
    w_a=st.floats(0.05, 20.0),
    w_b=st.floats(0.05, 20.0),
    dnu=st.floats(1.0, 2000.0),
)
def test_closed_form_and_matrix_agree_everywhere(
    log_k: float, p_a: float, w_a: float, w_b: float, dnu: float
) -> None:
    k = 10.0**log_k
    freq = np.linspace(-2 * dnu, 2 * dnu, 801)
    closed = two_site_spectrum(freq, 0.3 * dnu, -0.7 * dnu, k, p_a, w_a, w_b)
    matrix = bloch_mcconnell_spectrum(
        freq, [0.3 * dnu, -0.7 * dnu], _two_site_matrix(k, p_a), [p_a, 1 - p_a], [w_a, w_b]
    )
    np.testing.assert_allclose(matrix, closed, rtol=1e-9, atol=0)


def test_equal_populations_match_gutowsky_holm() -> None:
    # Gutowsky & Holm (1956), T2 → ∞, equal populations:
    # g(ν) ∝ τ(ν_A − ν_B)² / [(½(ν_A + ν_B) − ν)² + 4π²τ²(ν_A − ν)²(ν_B − ν)²], τ = τ_A/2.
    # With k = 1/τ_A (rate of leaving a site) this pins the convention: τ = 1/(2k).
    nu_a, nu_b, k = 30.0, -30.0, 95.0
    tau = 1.0 / (2.0 * k)
    freq = np.linspace(-120.0, 120.0, 2001)
    gh = (
        tau
        * (nu_a - nu_b) ** 2
        / (
            (0.5 * (nu_a + nu_b) - freq) ** 2
            + 4 * math.pi**2 * tau**2 * (nu_a - freq) ** 2 * (nu_b - freq) ** 2
        )
    )
    ours = two_site_spectrum(freq, nu_a, nu_b, k, 0.5, 0.0, 0.0)
    ratio = ours / gh
    np.testing.assert_allclose(ratio, ratio[0], rtol=1e-9)


def _second_derivative_at_centre(k: float, dnu: float) -> float:
    h = 1e-3 * dnu
    freq = np.array([-h, 0.0, h])
    model = ExchangeModel.equal([-dnu / 2, dnu / 2])
    y = model.spectrum(freq, k, width_hz=1e-7 * dnu)
    return float((y[0] - 2 * y[1] + y[2]) / h**2)


def test_coalescence_at_pi_dnu_over_root_two() -> None:
    # Gutowsky & Holm (1956): with equal populations and negligible intrinsic width the two
    # lines merge into one flat-topped line at k = πΔν/√2 (k = 1/τ_A, rate of leaving a site).
    dnu = 100.0
    k_c = math.pi * dnu / math.sqrt(2.0)
    below = _second_derivative_at_centre(0.9 * k_c, dnu)
    at = _second_derivative_at_centre(k_c, dnu)
    above = _second_derivative_at_centre(1.1 * k_c, dnu)
    assert below > 0  # a dip between two maxima
    assert above < 0  # one maximum
    assert abs(at) < 1e-4 * abs(below)
    # the other convention (k = 1/τ with τ = τ_Aτ_B/(τ_A+τ_B) = τ_A/2) would put it at 2·k_c:
    assert abs(_second_derivative_at_centre(k_c / 2, dnu)) > 1e3 * abs(at)


def test_slow_exchange_broadens_each_line_by_k_over_pi() -> None:
    # Gutowsky & Holm (1956): for k ≪ 2πΔν each line's width grows by k/π Hz.
    freq = np.linspace(-150.0, 150.0, 300001)
    model = ExchangeModel.equal([-100.0, 100.0])
    k, w = 5.0, 0.5
    y = model.spectrum(freq, k, w)
    right = freq > 0
    assert _fwhm(freq[right], y[right]) == pytest.approx(w + k / math.pi, rel=2e-3)


@pytest.mark.parametrize("p_a", [0.5, 0.7])
def test_fast_exchange_gives_one_averaged_line(p_a: float) -> None:
    # Fast exchange: one line at p_A·ν_A + p_B·ν_B, broadened by 4π·p_A·p_B·Δν²/(k_AB + k_BA).
    nu_a, nu_b, k_ab, w = 40.0, -40.0, 2.0e5, 1.0
    p_b = 1 - p_a
    k_ba = k_ab * p_a / p_b
    freq = np.linspace(-60.0, 60.0, 240001)
    y = two_site_spectrum(freq, nu_a, nu_b, k_ab, p_a, w, w)
    assert freq[np.argmax(y)] == pytest.approx(p_a * nu_a + p_b * nu_b, abs=2e-3)
    extra = 4 * math.pi * p_a * p_b * (nu_a - nu_b) ** 2 / (k_ab + k_ba)
    assert _fwhm(freq, y) == pytest.approx(w + extra, rel=2e-3)


def test_without_exchange_the_lines_are_unit_area_lorentzians() -> None:
    # k → 0: Σ p_i·L(ν − ν_i) with the unit-area Lorentzian L(x) = (w/2)/(π((w/2)² + x²))
    # (Lorentzian form; common practice, no source).
    model = ExchangeModel((-500.0, 500.0), (0.3, 0.7))
    freq = np.array([-500.0, -3.0, 0.0, 500.0, 512.0])
    w = 2.0

    def lorentz(x: np.ndarray) -> np.ndarray:
        return (w / 2) / (math.pi * ((w / 2) ** 2 + x**2))

    expected = 0.3 * lorentz(freq + 500.0) + 0.7 * lorentz(freq - 500.0)
    np.testing.assert_allclose(model.spectrum(freq, 1e-9, w), expected, rtol=1e-9)


def _area(shifts: list[float], rates: np.ndarray, width: float) -> float:
    """∫S dν over ±10⁷ Hz: dense near the lines, geometric in the tails (trapezoid)."""
    span = max(abs(s) for s in shifts) + 50 * width + 100.0
    step = width / 20.0
    core = np.linspace(-span, span, int(2 * span / step) + 1)
    tail = np.geomspace(span, 1e7, 4000)[1:]
    freq = np.concatenate([-tail[::-1], core, tail])
    y = bloch_mcconnell_spectrum(freq, shifts, rates, widths_hz=width)
    return float(np.trapezoid(y, freq))


@settings(max_examples=40, deadline=None)
@given(
    shifts=st.lists(st.floats(-300.0, 300.0), min_size=2, max_size=4, unique=True).filter(
        lambda s: min(abs(a - b) for i, a in enumerate(s) for b in s[i + 1 :]) > 0.5
    ),
    log_k=st.floats(-1.0, 6.0),
    width=st.floats(0.3, 10.0),
    scheme=st.sampled_from(["mutual", "cycle"]),
)
def test_area_is_conserved_whatever_the_rate(
    shifts: list[float], log_k: float, width: float, scheme: str
) -> None:
    # Exchange moves intensity between frequencies but never creates or destroys it: the
    # integral of Re[1ᵀ(iω − L)⁻¹p] over all ν is ½·Σp whatever the rates (Lorentzian tails
    # beyond ±10⁷ Hz hold < 10⁻⁴ of it here).
    pops = np.ones(len(shifts)) / len(shifts)
    rates = scheme_rate_matrix(10.0**log_k, pops, scheme)
    slow = scheme_rate_matrix(1e-3, pops, scheme)
    area = _area(shifts, rates, width)
    assert area == pytest.approx(1.0, abs=2e-3)
    assert area == pytest.approx(_area(shifts, slow, width), abs=2e-3)


def test_exchange_generator_and_equilibrium() -> None:
    rates = np.array([[0.0, 6.0, 0.0], [0.0, 0.0, 3.0], [2.0, 0.0, 0.0]])  # a cycle
    gen = exchange_generator(rates)
    np.testing.assert_allclose(gen.sum(axis=0), 0.0, atol=1e-12)  # magnetization is conserved
    pops = stationary_populations(rates)
    # flux around the cycle is the same on every step: p1·6 = p2·3 = p3·2
    np.testing.assert_allclose(pops * np.array([6.0, 3.0, 2.0]), pops[0] * 6.0, rtol=1e-12)
    assert pops.sum() == pytest.approx(1.0)


def test_scheme_rates_keep_the_populations_stationary() -> None:
    pops = np.array([0.5, 0.3, 0.2])
    for scheme in ("mutual", "cycle"):
        rates = scheme_rate_matrix(40.0, pops, scheme)
        assert rates[0].max() == pytest.approx(40.0)  # k is the rate of leaving site 1
        np.testing.assert_allclose(exchange_generator(rates) @ pops, 0.0, atol=1e-12)
    two = scheme_rate_matrix(10.0, [0.75, 0.25])
    np.testing.assert_allclose(two, [[0.0, 10.0], [30.0, 0.0]])  # p_A·k_AB = p_B·k_BA


def test_populations_off_equilibrium_are_refused() -> None:
    with pytest.raises(ValueError, match="not at equilibrium"):
        bloch_mcconnell_spectrum([0.0], [-10.0, 10.0], [[0, 5.0], [5.0, 0]], [0.8, 0.2])


def test_near_defective_matrix_falls_back_to_direct_solution() -> None:
    # Equal populations and widths at k = πΔν (= δω/2) make L defective (an exceptional point).
    dnu = 60.0
    k = math.pi * dnu
    res = resolvent([-dnu / 2, dnu / 2], _two_site_matrix(k, 0.5), [0.5, 0.5], 1.0)
    assert res.direct
    freq = np.linspace(-200.0, 200.0, 801)
    closed = two_site_spectrum(freq, -dnu / 2, dnu / 2, k, 0.5, 1.0, 1.0)
    matrix = bloch_mcconnell_spectrum(
        freq, [-dnu / 2, dnu / 2], _two_site_matrix(k, 0.5), None, 1.0
    )
    np.testing.assert_allclose(matrix, closed, rtol=1e-9)


def test_bad_model_input() -> None:
    with pytest.raises(ValueError, match="populations"):
        ExchangeModel((0.0, 10.0), (0.5,))
    with pytest.raises(ValueError, match="scheme"):
        ExchangeModel((0.0, 10.0), (0.5, 0.5), "random")
    with pytest.raises(ValueError, match="p_a"):
        two_site_spectrum([0.0], 1.0, -1.0, 10.0, 1.2)
