"""Eyring and Arrhenius fits: exact recovery, honest standard errors (coverage), warnings."""

from __future__ import annotations

import math

import numpy as np
import pytest

from registry.kinetics import (
    KineticsInputError,
    dg_from_dh_ds,
    eyring_rate,
    fit_arrhenius,
    fit_eyring,
)

R_KJ = 8.314462618e-3  # CODATA 2018, kJ mol⁻¹ K⁻¹


def synthetic(dh: float, ds: float, temps: np.ndarray) -> np.ndarray:
    return np.asarray(eyring_rate(dg_from_dh_ds(dh, ds, temps), temps))


def test_noise_free_points_give_back_the_parameters() -> None:
    t = np.linspace(250.0, 330.0, 9)
    fit = fit_eyring(t, synthetic(65.0, -15.0, t))
    assert fit.dh_kj_mol == pytest.approx(65.0, abs=1e-8)
    assert fit.ds_j_mol_k == pytest.approx(-15.0, abs=1e-7)
    assert fit.dg_ref_kj_mol == pytest.approx(65.0 + 298.15 * 15.0 / 1000, abs=1e-8)
    assert fit.r_squared == pytest.approx(1.0)
    assert np.allclose(fit.residuals_ln, 0.0, atol=1e-10)
    assert fit.warnings == ()


def test_arrhenius_relates_to_eyring() -> None:
    # For a unimolecular process in solution Ea = ΔH‡ + RT (K. J. Laidler, Chemical
    # Kinetics, 3rd ed., Harper & Row 1987, ch. 4); over a range, RT at the middle of 1/T.
    t = np.linspace(280.0, 340.0, 7)
    k = synthetic(70.0, 5.0, t)
    ey, ar = fit_eyring(t, k), fit_arrhenius(t, k)
    t_mid = 1.0 / np.mean(1.0 / t)
    assert ar.ea_kj_mol == pytest.approx(ey.dh_kj_mol + R_KJ * t_mid, abs=0.02)
    # and A = (e·k_B·T/h)·exp(ΔS‡/R) at that temperature
    log10_a = math.log10(
        math.e * 1.380649e-23 * t_mid / 6.62607015e-34
    ) + 5.0 / 8.314462618 / math.log(10)
    assert ar.log10_a == pytest.approx(log10_a, abs=0.01)


def test_dh_ds_strongly_correlated_and_dg_better_determined() -> None:
    rng = np.random.default_rng(3)
    t = np.linspace(300.0, 350.0, 6)
    k = synthetic(80.0, -10.0, t) * np.exp(rng.normal(0.0, 0.05, t.size))
    fit = fit_eyring(t, k)
    assert fit.corr_dh_ds > 0.99  # the compensation every Eyring plot shows
    # ΔG‡ at the centre of the data is far better known than ΔH‡ (or T·ΔS‡)
    assert fit.dg_best_err_kj_mol < fit.dh_err_kj_mol / 10
    assert fit.dg_best_err_kj_mol < fit.dg_at(400.0).dg_err_kj_mol
    # and T* is where ΔG‡'s error is smallest
    for other in (fit.t_best_k - 5.0, fit.t_best_k + 5.0):
        assert fit.dg_at(other).dg_err_kj_mol > fit.dg_best_err_kj_mol


def test_dg_error_equals_propagation_with_covariance() -> None:
    rng = np.random.default_rng(5)
    t = np.linspace(270.0, 330.0, 8)
    k = synthetic(55.0, -30.0, t) * np.exp(rng.normal(0.0, 0.08, t.size))
    fit = fit_eyring(t, k)
    tt = 298.15
    var = (
        fit.dh_err_kj_mol**2
        + (tt * fit.ds_err_j_mol_k / 1000) ** 2
        - 2 * tt * fit.corr_dh_ds * fit.dh_err_kj_mol * fit.ds_err_j_mol_k / 1000
    )
    assert fit.dg_at(tt).dg_err_kj_mol == pytest.approx(math.sqrt(var), rel=1e-6)


def _coverage(trials: int, weighted: bool, seed: int) -> dict[str, float]:
    """Share of trials whose 95 % interval (reported SE × reported factor) holds the truth."""
    rng = np.random.default_rng(seed)
    dh, ds = 72.0, -12.0
    t = np.linspace(275.0, 335.0, 6)
    k_true = synthetic(dh, ds, t)
    sigma_ln = np.linspace(0.03, 0.12, t.size)  # unequal errors, as in real data
    hits = {"dh": 0, "ds": 0, "dg298": 0, "dg_naive": 0}
    for _ in range(trials):
        noise = rng.normal(0.0, sigma_ln if weighted else 0.06, t.size)
        k = k_true * np.exp(noise)
        fit = fit_eyring(t, k, sigma_ln * k if weighted else None)
        f = fit.ci95_factor
        hits["dh"] += abs(fit.dh_kj_mol - dh) <= f * fit.dh_err_kj_mol
        hits["ds"] += abs(fit.ds_j_mol_k - ds) <= f * fit.ds_err_j_mol_k
        dg_true = dh - 298.15 * ds / 1000
        hits["dg298"] += abs(fit.dg_ref_kj_mol - dg_true) <= f * fit.dg_ref_err_kj_mol
        # the error one gets by ignoring the ΔH‡/ΔS‡ covariance
        naive = math.hypot(fit.dh_err_kj_mol, 298.15 * fit.ds_err_j_mol_k / 1000)
        hits["dg_naive"] += abs(fit.dg_ref_kj_mol - dg_true) <= f * naive
    return {key: value / trials for key, value in hits.items()}


@pytest.mark.parametrize("weighted", [False, True])
def test_reported_errors_cover_the_truth_about_95_percent(weighted: bool) -> None:
    cov = _coverage(400, weighted, seed=11 if weighted else 12)
    for key in ("dh", "ds", "dg298"):
        assert 0.88 <= cov[key] <= 0.99, (key, cov[key])
    # the same check fails for an error that ignores the covariance: it is far too wide
    assert cov["dg_naive"] > 0.99


def test_weights_follow_sigma_k() -> None:
    t = np.linspace(280.0, 340.0, 5)
    k = synthetic(70.0, 0.0, t)
    k_bad = k.copy()
    k_bad[-1] *= 3.0  # one wild point …
    err = 0.05 * k
    err[-1] = 100.0 * k[-1]  # … that its σ_k says to ignore
    fit = fit_eyring(t, k_bad, err)
    assert fit.dh_kj_mol == pytest.approx(70.0, abs=0.05)
    assert fit.weighted


def test_warnings_few_points_narrow_span_extrapolation() -> None:
    t = np.array([300.0, 310.0])
    fit = fit_eyring(t, synthetic(70.0, 0.0, t), t_ref_k=400.0)
    text = " | ".join(fit.warnings)
    assert "only 2 points" in text
    assert "span only 10.0 K" in text
    assert "extrapolated 90 K beyond" in text
    assert math.isnan(fit.dh_err_kj_mol)  # no scatter to judge without σ_k


def test_chi2_warning_when_sigma_k_too_small() -> None:
    rng = np.random.default_rng(9)
    t = np.linspace(280.0, 340.0, 8)
    k = synthetic(70.0, 0.0, t) * np.exp(rng.normal(0.0, 0.2, t.size))
    fit = fit_eyring(t, k, 0.01 * k)
    assert any("scatter is larger than the stated σ_k" in w for w in fit.warnings)


def test_no_warning_inside_range() -> None:
    t = np.linspace(280.0, 320.0, 5)
    fit = fit_eyring(t, synthetic(70.0, 0.0, t))
    assert fit.dg_at(300.0).warning is None
    assert fit.warnings == ()


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (([300.0], [1.0]), "t_k: a line needs at least 2 points; got 1"),
        (([300.0, 300.0, 300.0], [1.0, 2.0, 3.0]), "t_k: all points are at the same temperature"),
        (([300.0, 310.0], [1.0]), "k_per_s: 1 rate constants for 2 temperatures"),
        (([300.0, 310.0], [1.0, -2.0]), "k_per_s: must be > 0 s⁻¹"),
        (([300.0, 310.0], [1.0, np.nan]), "t_k/k_per_s: missing (NaN) values cannot be fitted"),
    ],
)
def test_bad_points(args: tuple, message: str) -> None:
    with pytest.raises(KineticsInputError) as info:
        fit_eyring(*args)
    assert str(info.value).startswith(message)
