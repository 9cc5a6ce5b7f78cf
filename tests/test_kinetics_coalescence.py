"""Coalescence barriers against the published formulas, worked examples and Monte Carlo."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import brentq

from registry.kinetics import (
    KineticsInputError,
    coalescence_barrier,
    coalescence_rate,
    shanan_atidi_x,
    unequal_population_barriers,
)


def guenther_dg_j_mol(tc: float, k_c: float) -> float:
    """ΔG‡ = 19.14·Tc·(10.32 + log10(Tc/k_c)) J/mol, the practical form printed in
    H. Günther, NMR Spectroscopy, 3rd ed. (Wiley-VCH 2013), dynamic NMR chapter (from memory)."""
    return 19.14 * tc * (10.32 + math.log10(tc / k_c))


def kcal_textbook_dg(tc: float, dnu: float) -> float:
    """ΔG‡ = 4.58·10⁻³·Tc·(9.97 + log10(Tc/Δν)) kcal/mol for two equally populated singlets,
    the form in H. Friebolin, Basic One- and Two-Dimensional NMR Spectroscopy, 5th ed.
    (Wiley-VCH 2011), ch. 11 (from memory)."""
    return 4.58e-3 * tc * (9.97 + math.log10(tc / dnu))


def test_gutowsky_holm_rate() -> None:
    # k_c = π·Δν/√2 ≈ 2.22·Δν (H. S. Gutowsky, C. H. Holm, J. Chem. Phys. 25, 1228 (1956))
    assert coalescence_rate(100.0) == pytest.approx(222.144, rel=1e-5)
    assert coalescence_rate(1.0) == pytest.approx(2.22, abs=0.005)  # common practice, no source


def test_worked_example_100_hz_at_300_k() -> None:
    # from memory: the usual worked example — two singlets 100 Hz apart that coalesce at
    # 300 K: k_c ≈ 222 s⁻¹, ΔG‡ ≈ 60.0 kJ/mol (14.3 kcal/mol)
    res = coalescence_barrier(300.0, 100.0)
    assert res.k_c_per_s == pytest.approx(222.1, abs=0.1)
    assert res.dg_kj_mol == pytest.approx(60.0, abs=0.05)
    assert res.dg_kj_mol / 4.184 == pytest.approx(14.3, abs=0.05)


@pytest.mark.parametrize(
    ("tc", "dnu"), [(180.0, 5.0), (261.15, 27.0), (300.0, 100.0), (420.0, 900.0)]
)
def test_agrees_with_guenther_practical_form(tc: float, dnu: float) -> None:
    res = coalescence_barrier(tc, dnu)
    # the printed constants are rounded (19.14 for R·ln10 = 19.1448, 10.32 for 10.3189)
    assert res.dg_kj_mol * 1000 == pytest.approx(guenther_dg_j_mol(tc, res.k_c_per_s), rel=1e-3)
    assert res.dg_kj_mol / 4.184 == pytest.approx(kcal_textbook_dg(tc, dnu), rel=2e-3)


def test_coupled_ab_rate() -> None:
    # k_c = π·√(Δν² + 6J²)/√2 (R. J. Kurland, M. B. Rubin, W. B. Wise, J. Chem. Phys. 40,
    # 2426 (1964)); Δν = 20 Hz, J = 12 Hz: π·√(400 + 864)/√2 = π·35.553/1.41421 = 78.978 s⁻¹
    assert coalescence_rate(20.0, 12.0) == pytest.approx(78.978, rel=1e-4)
    assert coalescence_rate(20.0, -12.0) == coalescence_rate(20.0, 12.0)
    assert coalescence_barrier(300.0, 20.0, 12.0).k_c_per_s == pytest.approx(78.978, rel=1e-4)
    assert (
        coalescence_barrier(300.0, 20.0, 0.0).dg_kj_mol
        == coalescence_barrier(300.0, 20.0).dg_kj_mol
    )


def _x_by_root_finding(dp: float) -> float:
    """Solve Δp = ((X² − 2)/3)^(3/2)/X by bracketing, independently of the Cardano root."""
    if dp == 0.0:
        return math.sqrt(2.0)
    return brentq(lambda x: ((x * x - 2.0) / 3.0) ** 1.5 / x - dp, math.sqrt(2.0), 1e4, xtol=1e-14)


@pytest.mark.parametrize("dp", [0.0, 1e-9, 1e-4, 0.05, 0.2, 0.5, 0.8, 0.95, 0.999])
def test_shanan_atidi_root_matches_bracketing(dp: float) -> None:
    assert shanan_atidi_x(dp) == pytest.approx(_x_by_root_finding(dp), rel=1e-10)


def test_unequal_matches_shanan_atidi_bar_eli_formulas() -> None:
    # H. Shanan-Atidi, K. H. Bar-Eli, J. Phys. Chem. 74, 961 (1970) (formulas from memory):
    # ΔG‡_A = 4.575·10⁻³·Tc·[10.62 + log10(X/(2π(1 − Δp))) + log10(Tc/Δν)] kcal/mol
    # ΔG‡_B = 4.575·10⁻³·Tc·[10.62 + log10(X/(2π(1 + Δp))) + log10(Tc/Δν)] kcal/mol
    tc, dnu = 320.0, 45.0
    for ratio in (1.0, 1.5, 3.0, 9.0):
        dp = (ratio - 1.0) / (ratio + 1.0)
        x = _x_by_root_finding(dp)
        base = 10.62 + math.log10(tc / dnu)
        ga = 4.575e-3 * tc * (base + math.log10(x / (2 * math.pi * (1 - dp))))
        gb = 4.575e-3 * tc * (base + math.log10(x / (2 * math.pi * (1 + dp))))
        res = unequal_population_barriers(tc, dnu, ratio)
        assert res.dg_ab_kj_mol / 4.184 == pytest.approx(ga, rel=1e-3)
        assert res.dg_ba_kj_mol / 4.184 == pytest.approx(gb, rel=1e-3)


def test_equal_populations_reduce_to_gutowsky_holm() -> None:
    res = unequal_population_barriers(300.0, 100.0, 1.0)
    gh = coalescence_barrier(300.0, 100.0)
    assert res.k_ab_per_s == pytest.approx(gh.k_c_per_s, rel=1e-12)
    assert res.dg_ba_kj_mol == pytest.approx(gh.dg_kj_mol, rel=1e-12)


@given(
    st.floats(min_value=1.0, max_value=50.0),
    st.floats(min_value=150.0, max_value=450.0),
    st.floats(min_value=1.0, max_value=2000.0),
)
def test_unequal_detailed_balance(ratio: float, tc: float, dnu: float) -> None:
    # p_A·k_AB = p_B·k_BA, so ΔG‡_AB − ΔG‡_BA = R·Tc·ln(p_A/p_B), the free-energy difference
    res = unequal_population_barriers(tc, dnu, ratio)
    assert res.k_ba_per_s / res.k_ab_per_s == pytest.approx(ratio, rel=1e-9)
    diff = res.dg_ab_kj_mol - res.dg_ba_kj_mol
    assert diff == pytest.approx(8.314462618e-3 * tc * math.log(ratio), abs=1e-9)


@given(
    st.floats(min_value=100.0, max_value=450.0),
    st.floats(min_value=0.5, max_value=50.0),
    st.floats(min_value=0.1, max_value=5000.0),
)
def test_barrier_rises_with_tc_at_fixed_dnu(tc: float, step: float, dnu: float) -> None:
    low = coalescence_barrier(tc, dnu).dg_kj_mol
    high = coalescence_barrier(tc + step, dnu).dg_kj_mol
    assert high > low


@given(st.floats(min_value=150.0, max_value=450.0), st.floats(min_value=1.0, max_value=1000.0))
def test_barrier_falls_as_dnu_grows(tc: float, dnu: float) -> None:
    # a larger Δν needs a faster exchange to merge: same Tc, lower barrier
    assert coalescence_barrier(tc, 2 * dnu).dg_kj_mol < coalescence_barrier(tc, dnu).dg_kj_mol


def test_uncertainty_matches_monte_carlo() -> None:
    rng = np.random.default_rng(20240611)
    tc, tc_err, dnu, dnu_err, j, j_err = 265.0, 1.5, 40.0, 2.0, 7.0, 0.5
    res = coalescence_barrier(tc, dnu, j, tc_err, dnu_err, j_err_hz=j_err)
    n = 200_000
    samples = coalescence_barrier(
        rng.normal(tc, tc_err, n), rng.normal(dnu, dnu_err, n), rng.normal(j, j_err, n)
    )
    assert np.std(samples.dg_kj_mol) == pytest.approx(res.dg_err_kj_mol, rel=0.03)
    parts = np.array(
        [res.dg_err_from_tc_kj_mol, res.dg_err_from_dnu_kj_mol, res.dg_err_from_j_kj_mol]
    )
    assert math.sqrt((parts**2).sum()) == pytest.approx(res.dg_err_kj_mol)
    # a ±1.5 K Tc error at 265 K dominates over a 5 % Δν error: ∂ΔG‡/∂Tc ≈ ΔG‡/Tc + R
    assert res.dg_err_from_tc_kj_mol > res.dg_err_from_dnu_kj_mol


def test_unequal_uncertainty_matches_monte_carlo() -> None:
    rng = np.random.default_rng(7)
    tc, tc_err, dnu, dnu_err, ratio, ratio_err = 300.0, 2.0, 60.0, 3.0, 4.0, 0.2
    res = unequal_population_barriers(tc, dnu, ratio, tc_err, dnu_err, ratio_err)
    n = 200_000
    mc = unequal_population_barriers(
        rng.normal(tc, tc_err, n), rng.normal(dnu, dnu_err, n), rng.normal(ratio, ratio_err, n)
    )
    assert np.std(mc.dg_ab_kj_mol) == pytest.approx(res.dg_ab_err_kj_mol, rel=0.05)
    assert np.std(mc.dg_ba_kj_mol) == pytest.approx(res.dg_ba_err_kj_mol, rel=0.05)


def test_vectorized_100k_equals_scalar() -> None:
    rng = np.random.default_rng(1)
    n = 100_000
    tc = rng.uniform(180.0, 420.0, n)
    dnu = rng.uniform(2.0, 2000.0, n)
    ratio = rng.uniform(1.0, 10.0, n)
    res = coalescence_barrier(tc, dnu, tc_err_k=1.0, dnu_err_hz=0.5)
    un = unequal_population_barriers(tc, dnu, ratio, 1.0)
    assert res.dg_kj_mol.shape == (n,) and un.dg_ab_kj_mol.shape == (n,)
    for i in (0, 4242, n - 1):
        one = coalescence_barrier(float(tc[i]), float(dnu[i]), tc_err_k=1.0, dnu_err_hz=0.5)
        assert res.dg_kj_mol[i] == pytest.approx(one.dg_kj_mol, rel=1e-14)
        assert res.dg_err_kj_mol[i] == pytest.approx(one.dg_err_kj_mol, rel=1e-12)
        one_u = unequal_population_barriers(float(tc[i]), float(dnu[i]), float(ratio[i]), 1.0)
        assert un.dg_ab_kj_mol[i] == pytest.approx(one_u.dg_ab_kj_mol, rel=1e-12)


def test_result_is_frozen() -> None:
    res = coalescence_barrier(300.0, 100.0)
    with pytest.raises(AttributeError):
        res.dg_kj_mol = 1.0  # type: ignore[misc]


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: coalescence_barrier(-12.0, 27.0), "tc_k: must be above 0 K (got -12.0)"),
        (lambda: coalescence_barrier(300.0, 0.0), "dnu_hz: must be > 0 Hz (got 0.0)"),
        (lambda: coalescence_rate(-5.0), "dnu_hz: must be > 0 Hz (got -5.0)"),
        (
            lambda: coalescence_barrier(300.0, 10.0, tc_err_k=-1.0),
            "tc_err_k: must be ≥ 0 (got -1.0)",
        ),
        (
            lambda: unequal_population_barriers(300.0, 10.0, 0.5),
            "ratio: population ratio major/minor must be ≥ 1 (and finite) (got 0.5)",
        ),
        (
            lambda: unequal_population_barriers(300.0, 10.0, math.inf),
            "ratio: population ratio major/minor must be ≥ 1 (and finite) (got inf)",
        ),
        (
            lambda: unequal_population_barriers(300.0, 10.0, "lots"),
            "ratio: expected numbers (got 'lots')",
        ),
    ],
)
def test_bad_input_messages(call, message: str) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(KineticsInputError) as info:
        call()
    assert str(info.value) == message


def test_invalid_nan_mode_flags_rows_instead_of_raising() -> None:
    res = coalescence_barrier(
        np.array([300.0, -1.0, 250.0]), np.array([10.0, 10.0, 0.0]), invalid="nan"
    )
    assert math.isfinite(res.dg_kj_mol[0])
    assert math.isnan(res.dg_kj_mol[1]) and math.isnan(res.dg_kj_mol[2])
