"""The Eyring equation and its constants, against CODATA and textbook values."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants as sc

from registry.kinetics import KineticsInputError, dg_from_dh_ds, eyring_barrier, eyring_rate
from registry.kinetics import constants as kc


def test_constants_are_codata_exact_si_values() -> None:
    # SI Brochure, 9th ed. (BIPM 2019), defining constants; CODATA 2018 via scipy.constants
    assert kc.BOLTZMANN_J_K == 1.380649e-23
    assert kc.PLANCK_J_S == 6.62607015e-34
    assert kc.AVOGADRO_PER_MOL == 6.02214076e23
    assert pytest.approx(1.380649e-23 * 6.02214076e23, rel=1e-15) == kc.R_J_MOL_K
    assert kc.R_J_MOL_K == sc.R
    # CODATA 2018: R = 8.314 462 618... J mol⁻¹ K⁻¹ (exact since 2019)
    assert pytest.approx(8.314462618, abs=1e-9) == kc.R_J_MOL_K


def test_frequency_factor_at_25_c() -> None:
    # k_B·T/h at 298.15 K ≈ 6.21 × 10¹² s⁻¹ (from memory; the usual textbook figure)
    assert eyring_rate(0.0, 298.15) == pytest.approx(6.2124e12, rel=1e-4)


def test_eyring_rate_known_value() -> None:
    # ΔG‡ = 80 kJ/mol at 298.15 K: k = (k_B T/h)·exp(−80000/(R·298.15)), evaluated by hand
    # with CODATA values: 6.21244e12 · exp(−32.27164) = 0.05996 s⁻¹
    assert eyring_rate(80.0, 298.15) == pytest.approx(0.05996, rel=2e-4)


def test_tenfold_per_5_7_kj_mol() -> None:
    # common practice, no source: near room temperature every 5.7 kJ/mol (≈1.36 kcal/mol)
    # slows a reaction tenfold, because RT·ln 10 = 5.708 kJ/mol at 298.15 K
    ratio = eyring_rate(70.0, 298.15) / eyring_rate(75.708, 298.15)
    assert ratio == pytest.approx(10.0, rel=1e-3)


def test_kappa_scales_the_rate() -> None:
    assert eyring_rate(60.0, 300.0, kappa=0.5) == pytest.approx(0.5 * eyring_rate(60.0, 300.0))
    k = eyring_rate(60.0, 300.0, kappa=0.5)
    assert eyring_barrier(k, 300.0, kappa=0.5) == pytest.approx(60.0, rel=1e-12)


@given(
    st.floats(min_value=1e-10, max_value=1e10),
    st.floats(min_value=50.0, max_value=1000.0),
)
def test_k_to_barrier_to_k_round_trip(k: float, t: float) -> None:
    back = eyring_rate(eyring_barrier(k, t), t)
    assert back == pytest.approx(k, rel=1e-9)


@given(st.floats(min_value=-20.0, max_value=200.0), st.floats(min_value=50.0, max_value=1000.0))
def test_barrier_to_k_to_barrier_round_trip(dg: float, t: float) -> None:
    assert eyring_barrier(eyring_rate(dg, t), t) == pytest.approx(dg, abs=1e-9)


def test_vectorized_and_broadcast() -> None:
    dg = np.linspace(40.0, 120.0, 100_000)
    t = np.full_like(dg, 310.0)
    k = eyring_rate(dg, t)
    assert isinstance(k, np.ndarray) and k.shape == dg.shape
    assert np.allclose(eyring_barrier(k, 310.0), dg, rtol=1e-12)
    for i in (0, 12_345, 99_999):
        assert k[i] == pytest.approx(eyring_rate(float(dg[i]), 310.0), rel=1e-14)
    assert isinstance(eyring_rate(80.0, 298.15), float)


def test_dg_from_dh_ds() -> None:
    # ΔG‡ = ΔH‡ − TΔS‡ with ΔS‡ in J/(mol·K): 80 − 300·(−20)/1000 = 86 kJ/mol
    assert dg_from_dh_ds(80.0, -20.0, 300.0) == pytest.approx(86.0)


@pytest.mark.parametrize(
    ("call", "field"),
    [
        (lambda: eyring_rate(80.0, -5.0), "t_k"),
        (lambda: eyring_rate(80.0, 0.0), "t_k"),
        (lambda: eyring_barrier(0.0, 300.0), "k_per_s"),
        (lambda: eyring_barrier(-1.0, 300.0), "k_per_s"),
        (lambda: eyring_barrier(1.0, 300.0, kappa=0.0), "kappa"),
        (lambda: eyring_rate("abc", 300.0), "dg_kj_mol"),
    ],
)
def test_bad_input_names_the_argument(call, field: str) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(KineticsInputError) as info:
        call()
    assert str(info.value).startswith(f"{field}: ")


def test_bad_entry_in_an_array_is_located() -> None:
    t = np.array([300.0, 310.0, -1.0, 0.0])
    with pytest.raises(KineticsInputError) as info:
        eyring_rate(80.0, t)
    assert str(info.value) == "t_k: must be above 0 K; 2 of 4 values are not (entry 2: -1.0)"


def test_nan_passes_and_invalid_nan_mode() -> None:
    k = eyring_rate(80.0, np.array([300.0, np.nan]))
    assert math.isfinite(k[0]) and math.isnan(k[1])
    k = eyring_rate(80.0, np.array([300.0, -3.0]), invalid="nan")
    assert math.isfinite(k[0]) and math.isnan(k[1])
