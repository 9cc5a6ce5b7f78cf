"""The fit path's own statistics and special functions, checked against independent calculations.

The independent values come from scipy (scipy.stats, scipy.special, scipy.constants: different
implementations of the same functions), from handbook tables, and from asymptotic expansions
written out here; none is taken from the code under test.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as codata
from scipy import special, stats

from registry.kinetics import constants as kc
from registry.kinetics.distributions import (
    chi2_upper_tail,
    normal_quantile,
    regularized_beta,
    student_t_quantile,
    student_t_upper_tail,
)
from registry.kinetics.planning import lambert_w_of_log

PROBABILITIES = [
    1e-6, 1e-4, 1e-3, 0.01, 0.025, 0.05, 0.1, 0.2, 0.3, 0.45, 0.49,
    0.51, 0.55, 0.7, 0.8, 0.9, 0.95, 0.975, 0.99, 0.999, 0.9999, 1 - 1e-6,
]  # fmt: skip
SMALL_DOF = [1, 2, 3, 4, 5, 6, 7, 8, 10, 15, 20, 30, 50, 100]
LARGE_DOF = [1_000, 10_000, 100_000, 1_000_000]


@pytest.mark.parametrize("dof", SMALL_DOF)
def test_t_quantile_matches_scipy_for_small_dof(dof: int) -> None:
    for p in PROBABILITIES:
        expected = stats.t.ppf(p, dof)  # independent implementation (scipy.stats)
        assert student_t_quantile(p, dof) == pytest.approx(expected, rel=1e-12, abs=1e-14), p


@pytest.mark.parametrize("dof", LARGE_DOF)
def test_t_quantile_matches_scipy_for_large_dof(dof: int) -> None:
    # at large ν the tail is an incomplete beta with a = ν/2 in the hundreds of thousands;
    # both implementations carry a few 1e-12 of rounding there
    for p in PROBABILITIES:
        expected = stats.t.ppf(p, dof)
        assert student_t_quantile(p, dof) == pytest.approx(expected, rel=1e-11), p


@pytest.mark.parametrize("dof", LARGE_DOF)
def test_t_quantile_matches_the_cornish_fisher_expansion(dof: int) -> None:
    # Abramowitz & Stegun 26.7.5 (from memory): t = z + g1/ν + g2/ν² + g3/ν³ + g4/ν⁴ with
    # z the normal quantile; at ν ≥ 1000 the next term is below 1e-13 for |z| ≤ 4
    for p in (1e-4, 0.01, 0.05, 0.3, 0.7, 0.975, 0.9999):
        z = stats.norm.ppf(p)
        g1 = (z**3 + z) / 4
        g2 = (5 * z**5 + 16 * z**3 + 3 * z) / 96
        g3 = (3 * z**7 + 19 * z**5 + 17 * z**3 - 15 * z) / 384
        g4 = (79 * z**9 + 776 * z**7 + 1482 * z**5 - 1920 * z**3 - 945 * z) / 92160
        expected = z + g1 / dof + g2 / dof**2 + g3 / dof**3 + g4 / dof**4
        assert student_t_quantile(p, dof) == pytest.approx(expected, rel=1e-11, abs=1e-13), p


@pytest.mark.parametrize(
    ("dof", "t975"),
    # two-sided 95 % factors, the t table of any statistics handbook (e.g. CRC Standard
    # Probability and Statistics Tables and Formulae, 2000; from memory, 3 decimals)
    [(1, 12.706), (2, 4.303), (3, 3.182), (4, 2.776), (5, 2.571), (10, 2.228), (30, 2.042)],
)
def test_t_quantile_handbook_table(dof: int, t975: float) -> None:
    assert student_t_quantile(0.975, dof) == pytest.approx(t975, abs=5e-4)


def test_t_closed_forms_for_one_and_two_dof() -> None:
    # ν = 1 is the Cauchy distribution, F(t) = ½ + atan(t)/π; ν = 2: F(t) = ½ + t/(2√(t² + 2))
    # (A&S 26.7.5 remarks / any text on Student's t)
    # In tail form (no cancellation far out): P(T > |t|) = atan(1/|t|)/π for ν = 1 and
    # ½·(1 − |t|/√(t² + 2)) = 1/(√(t² + 2)·(√(t² + 2) + |t|)) for ν = 2.
    for p in (1e-9, 0.1, 0.4, 0.6, 0.975, 1 - 1e-9):
        tail = min(p, 1.0 - p)
        t1 = abs(student_t_quantile(p, 1))
        assert math.atan(1.0 / t1) / math.pi == pytest.approx(tail, rel=1e-12)
        t2 = abs(student_t_quantile(p, 2))
        root = math.sqrt(t2 * t2 + 2.0)
        assert 1.0 / (root * (root + t2)) == pytest.approx(tail, rel=1e-12)
        assert (student_t_quantile(p, 1) > 0) == (p > 0.5) == (student_t_quantile(p, 2) > 0)


def test_t_quantile_symmetry_centre_and_infinite_dof() -> None:
    assert student_t_quantile(0.5, 7) == 0.0
    for dof in (1, 3, 12.5, 1e4):
        assert student_t_quantile(0.25, dof) == -student_t_quantile(0.75, dof)
    assert student_t_quantile(0.975, math.inf) == pytest.approx(stats.norm.ppf(0.975), rel=1e-15)


@pytest.mark.parametrize("dof", [0.5, 1.5, 2.5, 3.7])
def test_t_quantile_non_integer_dof(dof: float) -> None:
    for p in (1e-4, 0.05, 0.3, 0.9, 0.999):
        assert student_t_quantile(p, dof) == pytest.approx(stats.t.ppf(p, dof), rel=1e-10)


@settings(max_examples=200, deadline=None)
@given(
    p=st.floats(min_value=1e-8, max_value=1 - 1e-8),
    dof=st.integers(min_value=1, max_value=5000),
)
def test_t_quantile_property_against_scipy(p: float, dof: int) -> None:
    assert student_t_quantile(p, dof) == pytest.approx(stats.t.ppf(p, dof), rel=1e-10, abs=1e-12)


@pytest.mark.parametrize(("p", "dof"), [(0.0, 3), (1.0, 3), (-0.1, 3), (math.nan, 3)])
def test_t_quantile_refuses_bad_probabilities(p: float, dof: float) -> None:
    with pytest.raises(ValueError, match="probability strictly between 0 and 1"):
        student_t_quantile(p, dof)


@pytest.mark.parametrize("dof", [0, -2, math.nan])
def test_t_quantile_refuses_bad_dof(dof: float) -> None:
    with pytest.raises(ValueError, match="degrees of freedom must be > 0"):
        student_t_quantile(0.9, dof)


def test_t_upper_tail_matches_scipy() -> None:
    for dof in (1, 2, 3, 4, 9, 40, 1e5):
        for t in (-30.0, -2.0, -0.1, 0.0, 0.3, 1.0, 2.5, 8.0, 100.0):
            expected = stats.t.sf(t, dof)
            assert student_t_upper_tail(t, dof) == pytest.approx(expected, rel=1e-10), (dof, t)


def test_regularized_beta_matches_scipy() -> None:
    for a in (0.5, 1.0, 2.5, 10.0, 300.0):
        for b in (0.5, 1.0, 4.0, 50.0):
            for x in (0.0, 1e-6, 0.01, 0.3, 0.5, 0.77, 0.999, 1.0):
                expected = special.betainc(a, b, x)  # independent implementation
                got = regularized_beta(a, b, x)
                assert got == pytest.approx(expected, rel=1e-11, abs=1e-300), (a, b, x)


def test_log_beta_at_large_argument_against_decimal_series() -> None:
    # ln B(a, ½) = ln √π − ln(Γ(a + ½)/Γ(a)), with Γ(a + ½)/Γ(a) = √a·(1 − 1/(8a) + 1/(128a²)
    # + 5/(1024a³) − 21/(32768a⁴) + …) (A&S 6.1.47 specialised; from memory), in 40 digits
    from decimal import Decimal, getcontext

    from registry.kinetics.distributions import _log_beta

    getcontext().prec = 40
    a = Decimal(500_000)
    ratio = 1 - 1 / (8 * a) + 1 / (128 * a * a) + 5 / (1024 * a**3) - 21 / (32768 * a**4)
    ln_sqrt_pi = Decimal(math.pi).ln() / 2
    expected = float(ln_sqrt_pi - (a.ln() / 2 + ratio.ln()))
    assert _log_beta(500_000.0, 0.5) == pytest.approx(expected, rel=1e-14)


def test_normal_quantile_matches_scipy() -> None:
    grid = [*np.logspace(-300, -1, 60), *np.linspace(0.02, 0.98, 49), 1 - 1e-9, 0.975]
    for p in grid:
        assert normal_quantile(float(p)) == pytest.approx(stats.norm.ppf(p), rel=1e-14), p
    assert normal_quantile(0.5) == 0.0
    # 1.959963984540054: the two-sided 95 % factor of every normal table (to 6 decimals there)
    assert normal_quantile(0.975) == pytest.approx(1.959964, abs=5e-7)


def test_chi2_upper_tail_matches_scipy() -> None:
    for dof in (1, 2, 3, 4, 5, 10, 19, 20, 21, 30, 100, 1_000, 10_000):
        for x in (0.0, 1e-8, 0.01, 0.5, 1.0, 2.0, 5.0, 10.0, 50.0, 200.0, 1e3, 1e4, 1.2e4):
            expected = stats.chi2.sf(x, dof)
            got = chi2_upper_tail(x, dof)
            assert got == pytest.approx(expected, rel=1e-11, abs=1e-300), (dof, x)
    assert math.isnan(chi2_upper_tail(math.nan, 3))
    with pytest.raises(ValueError, match="degrees of freedom"):
        chi2_upper_tail(1.0, 0)


def test_lambert_w_matches_scipy_and_its_definition() -> None:
    z = np.logspace(-300, 300, 601)
    w = lambert_w_of_log(np.log(z))
    assert np.allclose(w, special.lambertw(z).real, rtol=1e-13, atol=0)
    # beyond the float range only the definition w + ln w = ln z can check it
    ln_z = np.array([800.0, 1e4, 1e8])
    w_big = lambert_w_of_log(ln_z)
    assert np.allclose(w_big + np.log(w_big), ln_z, rtol=1e-15)
    nan_inf = lambert_w_of_log(np.array([np.nan, np.inf]))
    assert np.isnan(nan_inf[0]) and np.isposinf(nan_inf[1])


def test_constants_are_the_codata_values() -> None:
    # exact since the 2019 SI; scipy.constants carries CODATA 2018
    assert codata.Boltzmann == kc.BOLTZMANN_J_K
    assert codata.Planck == kc.PLANCK_J_S
    assert codata.Avogadro == kc.AVOGADRO_PER_MOL
    assert pytest.approx(codata.R, rel=1e-15) == kc.R_J_MOL_K
    assert codata.zero_Celsius == kc.ZERO_CELSIUS_K
    assert pytest.approx(codata.Boltzmann / codata.Planck, rel=1e-15) == kc.KB_OVER_H_PER_S_K
