"""The coupled AB mutual-exchange shape: an independent Liouville-space solve, and its limits."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.lineshape.coupled import CoupledABModel, coupled_ab_spectrum
from registry.lineshape.fit import fit_spectrum
from registry.lineshape.simulate import two_site_spectrum


def _direct_liouville(freq, nu_a, nu_b, j, k, w):  # type: ignore[no-untyped-def]
    """The whole 16 × 16 Liouvillian from Kronecker products of the spin-½ matrices, solved
    at each frequency (no eigenvectors, no reduction to single-quantum coherences).

    dσ/dt = −2πi[H, σ] + k(PσP − σ) − πw·σ, H = ν_A I₁z + ν_B I₂z + J I₁·I₂, P the swap of
    the two spins; signal Tr(I₊ σ(ω)) after σ(0) = I₋, normalised by Tr(I₊I₋)
    (standard density-matrix theory of exchange, e.g. Abragam, Principles of Nuclear
    Magnetism, ch. X; from memory)."""
    sx = np.array([[0, 0.5], [0.5, 0]], dtype=complex)
    sy = np.array([[0, -0.5j], [0.5j, 0]], dtype=complex)
    sz = np.array([[0.5, 0], [0, -0.5]], dtype=complex)
    one = np.eye(2)
    spin1 = [np.kron(s, one) for s in (sx, sy, sz)]
    spin2 = [np.kron(one, s) for s in (sx, sy, sz)]
    ham = (
        nu_a * spin1[2]
        + nu_b * spin2[2]
        + j * sum(a @ b for a, b in zip(spin1, spin2, strict=True))
    )
    swap = np.zeros((4, 4))
    for a in range(2):
        for b in range(2):
            swap[2 * b + a, 2 * a + b] = 1.0
    eye4 = np.eye(4)
    # row-major vec: vec(Aσ) = (A ⊗ 1)vec σ, vec(σB) = (1 ⊗ Bᵀ)vec σ
    liou = -2j * np.pi * (np.kron(ham, eye4) - np.kron(eye4, ham.T))
    liou += k * (np.kron(swap, swap.T) - np.eye(16)) - np.pi * w * np.eye(16)
    lower = (spin1[0] - 1j * spin1[1]) + (spin2[0] - 1j * spin2[1])
    raise_ = lower.conj().T
    rho0 = lower.reshape(16)
    detect = raise_.T.reshape(16)  # Tr(I₊X) = Σ (I₊)_ij X_ji
    norm = np.trace(raise_ @ lower).real
    out = np.empty(len(freq))
    for i, nu in enumerate(freq):
        x = np.linalg.solve(2j * np.pi * nu * np.eye(16) - liou, rho0)
        out[i] = 2.0 * (detect @ x).real / norm
    return out


@pytest.mark.parametrize("k", [0.5, 30.0, 150.0, 2000.0, 1e5])
def test_matches_direct_liouville_solve(k: float) -> None:
    freq = np.linspace(-80.0, 80.0, 401)
    ours = coupled_ab_spectrum(freq, 25.0, -20.0, 12.0, k, 1.5)
    direct = _direct_liouville(freq, 25.0, -20.0, 12.0, k, 1.5)
    assert np.abs(ours - direct).max() <= 1e-6 * np.abs(direct).max()


@settings(max_examples=25, deadline=None)
@given(
    nu_a=st.floats(-60, 60),
    delta=st.floats(1, 80),
    j=st.floats(-20, 20),
    log_k=st.floats(-1, 5),
    w=st.floats(0.3, 5),
)
def test_matches_direct_solve_anywhere(nu_a, delta, j, log_k, w) -> None:  # type: ignore[no-untyped-def]
    freq = np.linspace(-150.0, 150.0, 121)
    ours = coupled_ab_spectrum(freq, nu_a, nu_a - delta, j, 10.0**log_k, w)
    direct = _direct_liouville(freq, nu_a, nu_a - delta, j, 10.0**log_k, w)
    assert np.abs(ours - direct).max() <= 1e-6 * np.abs(direct).max()


@pytest.mark.parametrize("k", [1.0, 80.0, 300.0, 5000.0])
def test_zero_coupling_is_the_uncoupled_two_site_shape(k: float) -> None:
    freq = np.linspace(-100.0, 100.0, 801)
    ab = coupled_ab_spectrum(freq, 30.0, -30.0, 0.0, k, 2.0)
    # Rogers & Woodbrey closed form (another code path), equal populations, k_AB = k
    two = two_site_spectrum(freq, 30.0, -30.0, k, 0.5, 2.0, 2.0)
    assert np.abs(ab - two).max() <= 1e-9 * two.max()


def test_slow_exchange_is_the_ab_quartet() -> None:
    """AB quartet (Pople, Schneider & Bernstein, High-resolution NMR, 1959; from memory):
    with D = ν_A − ν_B and C = √(D² + J²), lines at ν̄ ± (C − J)/2 (inner, relative intensity
    1 + J/C) and ν̄ ± (C + J)/2 (outer, 1 − J/C), ν̄ the mean shift."""
    nu_a, nu_b, j, w = 20.0, -10.0, 14.0, 0.8
    mean, c = 0.5 * (nu_a + nu_b), math.hypot(nu_a - nu_b, j)
    lines = [
        (mean + (c - j) / 2, 1 + j / c),
        (mean - (c - j) / 2, 1 + j / c),
        (mean + (c + j) / 2, 1 - j / c),
        (mean - (c + j) / 2, 1 - j / c),
    ]
    freq = np.linspace(-60.0, 60.0, 4001)
    expected = sum(
        0.25 * inten * (w / (2 * math.pi)) / ((freq - pos) ** 2 + (w / 2) ** 2)
        for pos, inten in lines
    )
    ours = coupled_ab_spectrum(freq, nu_a, nu_b, j, 1e-7, w)
    assert np.abs(ours - expected).max() <= 1e-6 * expected.max()


def test_unit_area() -> None:
    freq = np.linspace(-4000.0, 4000.0, 160001)
    s = coupled_ab_spectrum(freq, 25.0, -25.0, 15.0, 70.0, 3.0)
    area = float(np.sum(s) * (freq[1] - freq[0]))
    # Lorentzian tails beyond ±4 kHz carry ≈ 2·(w/2)/(π·4000) of the area (Cauchy tail integral)
    assert area == pytest.approx(1.0 - 3.0 / (math.pi * 4000.0), abs=2e-4)


def test_rate_fitted_from_a_coupled_spectrum() -> None:
    model = CoupledABModel((30.0, -30.0), 12.0)
    freq = np.linspace(-150.0, 150.0, 2048)
    rng = np.random.default_rng(7)
    clean = model.spectrum(freq, 60.0, 1.2)
    noisy = clean + rng.normal(0.0, 0.005 * clean.max(), len(freq))
    fit = fit_spectrum(freq, noisy, model, width_hz=1.2, fix_width=True)
    assert fit.k_err_per_s is not None
    assert abs(fit.k_per_s - 60.0) < 4 * fit.k_err_per_s


def test_coupled_series_with_j_fitted_through_the_api() -> None:
    """Simulated (api) AB spectra at three rates; J = 12 Hz recovered when fitted from 9 Hz."""
    from registry import api
    from registry.lineshape.spectrum import Spectrum

    spectra = []
    for i, (t, k) in enumerate([(280.0, 8.0), (300.0, 40.0), (320.0, 150.0)]):
        sim = api.simulate_lineshape(
            "30,-30 Hz", k, coupling="12 Hz", width="1 Hz", points=4096, noise=0.005,
            seed=i + 1, window="-150,150 Hz",
        )  # fmt: skip
        spectra.append(Spectrum(sim.x, sim.intensity, "Hz", f"ab_{t:.0f}", t_k=t))
    result = api.fit_lineshapes(
        spectra, "30,-30 Hz", coupling="9 Hz", fit_coupling=True, width="1 Hz", fix_width=True
    )
    for fit, k in zip(result.fits, (8.0, 40.0, 150.0), strict=True):
        params = {n: (v, e, h) for n, v, e, h in fit.parameters}
        j, j_err, how = params["coupling"]
        assert how == "fitted" and j_err is not None and abs(j - 12.0) < 4 * j_err
        assert fit.k_err_per_s is not None and abs(fit.k_per_s - k) < 4 * fit.k_err_per_s
    assert result.scheme == "coupled AB" and result.populations == (0.5, 0.5)


def test_global_fit_of_a_coupled_series() -> None:
    """ΔH‡ = 62 kJ/mol, ΔS‡ = 0 (invented); rates from the Eyring equation (CODATA k_B/h)."""
    from scipy import constants

    from registry import api
    from registry.lineshape.spectrum import Spectrum

    kb_h = constants.Boltzmann / constants.Planck
    spectra = []
    for i, t in enumerate((280.0, 290.0, 300.0, 310.0)):
        k = kb_h * t * math.exp(-62000.0 / (constants.R * t))
        sim = api.simulate_lineshape(
            "30,-30 Hz", k, coupling="12 Hz", width="1 Hz", points=2048, noise=0.01,
            seed=i + 10, window="-150,150 Hz",
        )  # fmt: skip
        spectra.append(Spectrum(sim.x, sim.intensity, "Hz", f"ab_{t:.0f}", t_k=t))
    result = api.fit_lineshapes(
        spectra, "30,-30 Hz", coupling="12 Hz", width="1 Hz", fix_width=True, global_fit=True
    )
    g = result.global_fit
    assert g is not None and g.converged
    assert abs(g.eyring.dh_kj_mol - 62.0) < 4 * g.eyring.dh_err_kj_mol


def test_simulated_record_and_refusals() -> None:
    from registry import api
    from registry.errors import UsageError

    sim = api.simulate_lineshape("30,-30 Hz", 50.0, coupling="12 Hz", points=512)
    data = sim.to_dict()
    assert data["coupling_hz"] == 12.0 and data["scheme"] == "coupled AB"
    assert data["populations"] == [0.5, 0.5] and data["reference_hz"] is None
    with pytest.raises(UsageError, match=r"^populations: the two spins"):
        api.simulate_lineshape("30,-30 Hz", 50.0, coupling="12 Hz", populations="0.6,0.4")
    with pytest.raises(UsageError, match=r"^coupling: a coupled AB pair has exactly two sites"):
        api.simulate_lineshape("30,0,-30 Hz", 50.0, coupling="12 Hz")
    from registry.lineshape.spectrum import Spectrum

    spec = Spectrum(sim.x, sim.intensity, "Hz", "ab", t_k=300.0)
    with pytest.raises(UsageError, match=r"^populations_mode: the two sites of a coupled AB"):
        api.fit_lineshapes([spec], "30,-30 Hz", coupling="12 Hz", populations_mode="fit")
    with pytest.raises(UsageError, match=r"^fit_coupling: give the coupling J"):
        api.fit_lineshapes([spec], "30,-30 Hz", fit_coupling=True)


def _ab_series(rates: list[tuple[float, float]], points: int, seed: int) -> list[object]:
    """AB spectra (sites ±25 Hz, J = −14.5 Hz, width 0.9 Hz, 1 % noise; invented) at (T, k)."""
    from registry import api
    from registry.lineshape.spectrum import Spectrum

    spectra: list[object] = []
    for i, (t, k) in enumerate(rates):
        sim = api.simulate_lineshape(
            "25,-25 Hz", k, coupling="-14.5 Hz", width="0.9 Hz", points=points, noise=0.01,
            seed=seed + i, window="-150,150 Hz",
        )  # fmt: skip
        spectra.append(Spectrum(sim.x, sim.intensity, "Hz", f"ab_{t:.0f}", t_k=t))
    return spectra


def test_j_is_tied_to_the_series_where_fast_exchange_loses_it() -> None:
    """Slow and intermediate AB spectra fix J (−14.5 Hz, invented); the fast one (k = 2000 s⁻¹,
    one collapsing line) does not: its J is tied to the weighted mean of the others (checked
    with numpy.average), with that mean's σ, and its rate stays within its error."""
    from registry import api

    spectra = _ab_series([(280.0, 10.0), (300.0, 60.0), (340.0, 2000.0)], 4096, 20)
    result = api.fit_lineshapes(
        spectra, "25,-25 Hz", coupling="-12 Hz", fit_coupling=True, width="0.9 Hz", fix_width=True
    )
    js = [{n: (v, e, h) for n, v, e, h in f.parameters}["coupling"] for f in result.fits]
    assert [h for _j, _e, h in js] == ["fitted", "fitted", "tied (mean)"]
    mean = np.average([j for j, _e, _h in js[:2]], weights=[1 / e**2 for _j, e, _h in js[:2]])
    (trend,) = [t for t in result.trends if t.name == "coupling"]
    assert trend.to_dict()["value"] == pytest.approx(mean, rel=1e-9)
    assert js[2][0] == pytest.approx(mean, abs=3 * js[2][1])  # a prior, not a clamp
    assert abs(mean + 14.5) < 4 * math.sqrt(trend.cov[0][0])
    fast = result.fits[2]
    assert fast.k_err_per_s is not None and abs(fast.k_per_s - 2000.0) < 3 * fast.k_err_per_s


def test_j_held_with_a_note_when_no_spectrum_fixes_it() -> None:
    """Only fast-exchange spectra: no spectrum fixes J, so it is held at the value given."""
    from registry import api

    spectra = _ab_series([(330.0, 3000.0), (340.0, 5000.0)], 2048, 40)
    result = api.fit_lineshapes(
        spectra, "25,-25 Hz", coupling="-12 Hz", fit_coupling=True, width="0.9 Hz",
        fix_width=True, global_fit=True,
    )  # fmt: skip
    hows = [{n: h for n, _v, _e, h in f.parameters}["coupling"] for f in result.fits]
    assert hows == ["held", "held"]
    assert "J not determined by any spectrum: held at the given value" in result.series_notes
    assert result.global_fit is not None  # the global fit holds it too, rather than guess it
    assert "coupling" not in {t.name for t in result.global_fit.trends}
