"""Figures: the Eyring confidence band, the coalescence prediction, files by suffix.

Check values come from the published equations, evaluated here with CODATA constants
(scipy.constants), not from the code under test.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from scipy import constants as codata
from scipy import stats

from registry.errors import UsageError
from registry.kinetics import fit_eyring
from registry.reports import canvas, coalescence_plot, plots

T_K = np.array([268.0, 278.0, 288.0, 298.0, 308.0, 318.0])
#: invented scatter (multiplicative) on exact Eyring rates, for demo fits
SCATTER = np.array([1.05, 0.96, 1.02, 0.97, 1.04, 0.98])
DH_KJ_MOL, DS_J_MOL_K = 64.0, -8.0


def eyring_k(t_k: np.ndarray, dh_kj_mol: float, ds_j_mol_k: float) -> np.ndarray:
    """k = (k_B·T/h)·exp(ΔS‡/R − ΔH‡/RT) (H. Eyring, J. Chem. Phys. 3, 107 (1935))."""
    return (
        codata.k
        * t_k
        / codata.h
        * np.exp(ds_j_mol_k / codata.R - dh_kj_mol * 1000.0 / (codata.R * t_k))
    )


def test_band_is_the_textbook_interval_for_the_mean_response() -> None:
    # unweighted: half-width = t(0.975, n−2)·s·√(1/n + (x − x̄)²/Sxx), s² = SSE/(n − 2)
    # (straight-line regression, confidence interval on the mean response; e.g. Montgomery
    # and Runger, Applied Statistics and Probability for Engineers, ch. 11; from memory)
    k = eyring_k(T_K, DH_KJ_MOL, DS_J_MOL_K) * SCATTER
    fit = fit_eyring(T_K, k)
    x, y = 1.0 / T_K, np.log(k / T_K)
    n = x.size
    slope, intercept = np.polyfit(x, y, 1)
    sse = float(((y - (intercept + slope * x)) ** 2).sum())
    s = math.sqrt(sse / (n - 2))
    sxx = float(((x - x.mean()) ** 2).sum())
    grid = np.linspace(x.min() - 2e-4, x.max() + 2e-4, 7)
    expected = stats.t.ppf(0.975, n - 2) * s * np.sqrt(1.0 / n + (grid - x.mean()) ** 2 / sxx)
    line, half = plots.eyring_band(fit, grid)
    assert line == pytest.approx(intercept + slope * grid, rel=1e-9)
    assert half == pytest.approx(expected, rel=1e-9)
    # narrowest at the mean of 1/T, as it must be
    assert half.argmin() == 3


def test_band_with_stated_errors_uses_the_normal_quantile() -> None:
    # σ_k given: weights 1/σ_y² with σ_y = σ_k/k and absolute covariance, z(0.975) = 1.95996
    k = eyring_k(T_K, DH_KJ_MOL, DS_J_MOL_K) * SCATTER
    sigma_y = np.full_like(k, 0.05)
    fit = fit_eyring(T_K, k, sigma_y * k)
    x = 1.0 / T_K
    w = 1.0 / sigma_y**2
    xw = (w * x).sum() / w.sum()
    sxx = (w * (x - xw) ** 2).sum()
    grid = np.array([x.min(), xw, x.max()])
    expected = stats.norm.ppf(0.975) * np.sqrt(1.0 / w.sum() + (grid - xw) ** 2 / sxx)
    _, half = plots.eyring_band(fit, grid)
    assert half == pytest.approx(expected, rel=1e-9)


def test_summary_dg_at_mean_temperature_obeys_gibbs() -> None:
    k = eyring_k(T_K, DH_KJ_MOL, DS_J_MOL_K) * SCATTER
    summary = plots.eyring_summary(fit_eyring(T_K, k))
    assert summary.t_mean_k == pytest.approx(T_K.mean())
    # ΔG‡ = ΔH‡ − T·ΔS‡ at any T (definition of the Gibbs energy)
    for t, dg in ((summary.t_mean_k, summary.dg_mean_kj_mol), (298.15, summary.dg_ref_kj_mol)):
        assert dg == pytest.approx(summary.dh_kj_mol - t * summary.ds_j_mol_k / 1000.0, abs=1e-9)
    # the data were made with ΔH‡ = 64 kJ/mol: the fit must land within 3 standard errors
    assert abs(summary.dh_kj_mol - DH_KJ_MOL) < 3 * summary.dh_err_kj_mol
    # ΔG‡ near the middle of the data is far better determined than ΔH‡ (ΔH‡/ΔS‡ correlation)
    assert summary.dg_mean_err_kj_mol < summary.dh_err_kj_mol / 5
    assert summary.band


def test_eyring_figure_files_by_suffix(tmp_path: Path) -> None:
    k = eyring_k(T_K, DH_KJ_MOL, DS_J_MOL_K) * SCATTER
    fig, summary = plots.eyring_figure(fit_eyring(T_K, k), title="demo", energy_unit="kcal/mol")
    svg = canvas.save_figure(fig, tmp_path / "e.svg").read_text(encoding="utf-8")
    png = canvas.save_figure(fig, tmp_path / "e.PNG").read_bytes()
    assert png.startswith(b"\x89PNG\r\n\x1a\n")
    assert svg.lstrip().startswith("<?xml") and "<svg" in svg
    # the stated values, converted with the thermochemical calorie (4.184 J, NIST SP 811 B.8)
    dh_kcal = summary.dh_kj_mol / 4.184
    assert f"ΔH‡ = {dh_kcal:.1f}" in svg or f"ΔH‡ = {dh_kcal:.2f}" in svg
    assert "ΔG‡(298.15 K) = " in svg and "mean T" in svg
    assert "95 % confidence band of the line" in svg
    with pytest.raises(UsageError, match=r"\.png, \.svg or \.pdf"):
        canvas.save_figure(fig, tmp_path / "e.eps")
    with pytest.raises(UsageError, match="does not exist"):
        canvas.save_figure(fig, tmp_path / "missing" / "e.svg")


def test_two_points_without_errors_have_no_band() -> None:
    t = np.array([290.0, 320.0])
    fit = fit_eyring(t, eyring_k(t, DH_KJ_MOL, DS_J_MOL_K))
    _, half = plots.eyring_band(fit, 1.0 / t)
    assert np.isnan(half).all()
    fig, summary = plots.eyring_figure(fit)
    assert not summary.band
    assert any("only 2 points" in w for w in summary.warnings)
    fig.clear()


def test_predicted_tc_satisfies_gutowsky_holm_and_eyring() -> None:
    dg, dnu_ppm = 65.0, 0.25
    fields = np.array([60.0, 300.0, 400.0, 600.0, 1000.0])
    p = coalescence_plot.predict_coalescence(dg, dnu_ppm, fields, dg_err_kj_mol=0.5)
    dnu_hz = dnu_ppm * fields
    # k_c = π·Δν/√2 (Gutowsky and Holm, J. Chem. Phys. 25, 1228 (1956)) must equal the
    # Eyring rate at the predicted Tc
    k_c = math.pi * dnu_hz / math.sqrt(2.0)
    k_eyring = codata.k * p.tc_k / codata.h * np.exp(-dg * 1000.0 / (codata.R * p.tc_k))
    assert k_eyring == pytest.approx(k_c, rel=1e-8)
    # the working form ΔG‡ = 19.14·Tc·(9.97 + log10(Tc/Δν)) J/mol (e.g. H. Friebolin, Basic
    # One- and Two-Dimensional NMR Spectroscopy; from memory) agrees to its rounding
    approx = 19.14e-3 * p.tc_k * (9.97 + np.log10(p.tc_k / dnu_hz))
    assert approx == pytest.approx(dg, abs=0.1)
    assert np.all(np.diff(p.tc_k) > 0)  # a larger Δν in Hz needs faster exchange
    assert np.all(p.tc_low_k < p.tc_k) and np.all(p.tc_k < p.tc_high_k)


def test_coalescence_and_overview_figures(tmp_path: Path) -> None:
    p = coalescence_plot.predict_coalescence(60.0, 0.3, np.linspace(60, 1000, 50))
    fig = coalescence_plot.coalescence_figure(
        p,
        observed=[{"field_mhz": 400.0, "tc_k": 300.0, "label": "#7"}],
        solvent={"name": "dichloromethane-d2", "mp_k": 176.15, "bp_k": 313.15},
        title="demo",
    )
    svg = canvas.save_figure(fig, tmp_path / "c.svg").read_text(encoding="utf-8")
    assert "#7" in svg and "pressure-rated sealed tube" in svg
    fig = plots.overview_figure(
        {"bond-rotation": [60.0, 62.0, 75.0, 80.0], "ring-inversion": [42.0]},
        energy_unit="kcal/mol",
    )
    svg = canvas.save_figure(fig, tmp_path / "o.svg").read_text(encoding="utf-8")
    assert "(n = 4)" in svg and "(n = 1)" in svg and "ΔG‡ (kcal/mol)" in svg
    with pytest.raises(UsageError, match="no barriers"):
        plots.overview_figure({"x": []})


def test_same_data_same_svg(tmp_path: Path) -> None:
    """Reports are rebuilt often; unchanged data must give byte-identical plot files."""
    k = eyring_k(T_K, DH_KJ_MOL, DS_J_MOL_K) * SCATTER
    a = canvas.save_figure(plots.eyring_figure(fit_eyring(T_K, k))[0], tmp_path / "a.svg")
    b = canvas.save_figure(plots.eyring_figure(fit_eyring(T_K, k))[0], tmp_path / "b.svg")
    assert a.read_bytes() == b.read_bytes()
