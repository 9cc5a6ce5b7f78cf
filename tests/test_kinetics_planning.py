"""Planning: temperatures for targets, predicted Tc, exchange regime, LaPlante class, cautions."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry.errors import UsageError
from registry.kinetics import (
    atropisomer_class,
    coalescence_barrier,
    coalescence_temperature,
    exchange_regime,
    half_life,
    plan_coalescence,
    rate_at,
    safety_notes,
    temperature_for_half_life,
    temperature_for_rate,
)

KCAL = 4.184  # thermochemical calorie, NIST SP 811 (2008) B.8
ZERO_C = 273.15


@given(
    st.floats(min_value=1e-8, max_value=1e6),
    st.floats(min_value=20.0, max_value=150.0),
    st.floats(min_value=-80.0, max_value=80.0),
)
def test_temperature_for_rate_inverts_rate_at(k: float, dh: float, ds: float) -> None:
    t = temperature_for_rate(k, dh_kj_mol=dh, ds_j_mol_k=ds)
    assert rate_at(t, dh_kj_mol=dh, ds_j_mol_k=ds) == pytest.approx(k, rel=1e-9)


def test_vectorized_temperature_for_rate() -> None:
    k = np.logspace(-6, 4, 100_000)
    t = temperature_for_rate(k, 85.0)
    assert t.shape == k.shape and np.all(np.diff(t) > 0)
    assert np.allclose(rate_at(t, 85.0), k, rtol=1e-9)
    assert math.isnan(temperature_for_rate(1.0, dh_kj_mol=-5.0, ds_j_mol_k=0.0))


def test_predicted_tc_inverts_coalescence_barrier() -> None:
    tc = coalescence_temperature(27.0, 54.78)
    assert coalescence_barrier(tc, 27.0).dg_kj_mol == pytest.approx(54.78, rel=1e-10)


def test_oki_atropisomer_criterion() -> None:
    # M. Ōki, Top. Stereochem. 14, 1 (1983) (from memory): atropisomers are isolable when
    # their half-life is at least 1000 s, which at 300 K means ΔG‡ ≥ 93.3 kJ/mol (22.3 kcal/mol);
    # the figure follows for the racemization half-life ln 2/(2k)
    t = temperature_for_half_life(1000.0, 93.3, pair=True)
    assert t == pytest.approx(300.0, abs=0.3)
    # 22.3 is rounded to ±0.05 kcal/mol, i.e. ±9 % in the half-life
    assert half_life(rate_at(300.0, 22.3 * KCAL), pair=True) == pytest.approx(1000.0, rel=0.09)


def test_half_life_is_ln2_over_k() -> None:
    assert half_life(0.1) == pytest.approx(math.log(2) / 0.1)
    assert half_life(0.1, pair=True) == pytest.approx(math.log(2) / 0.2)


@pytest.mark.parametrize(
    ("kcal", "cls", "lo_s", "hi_s"),
    [
        # S. R. LaPlante et al., ChemMedChem 6, 505 (2011): class 1 < 20 kcal/mol, t½ at 37 °C
        # seconds–minutes; class 2 20–30 kcal/mol, hours–months; class 3 > 30, years
        (19.9, 1, 1.0, 60.0),
        (25.0, 2, 3600.0, 365 * 86400.0),
        (31.0, 3, 365 * 86400.0, math.inf),
    ],
)
def test_laplante_classes(kcal: float, cls: int, lo_s: float, hi_s: float) -> None:
    res = atropisomer_class(kcal * KCAL)
    assert res.stability_class == cls
    assert lo_s <= res.half_life_37c_s <= hi_s
    assert res.description.startswith(f"class {cls} ")


def test_laplante_boundaries() -> None:
    assert atropisomer_class(20.0 * KCAL - 1e-6).stability_class == 1
    assert atropisomer_class(20.0 * KCAL).stability_class == 2
    assert atropisomer_class(30.0 * KCAL).stability_class == 2
    assert atropisomer_class(30.0 * KCAL + 1e-6).stability_class == 3


def test_exchange_regimes() -> None:
    k_c = math.pi * 50.0 / math.sqrt(2.0)
    res = exchange_regime(np.array([0.01 * k_c, k_c, 100 * k_c]), 50.0)
    assert list(res.regime) == ["slow", "intermediate", "fast"]
    # slow-exchange broadening k/π; fast-exchange π·Δν²/(2k) (two equal sites; standard limits,
    # e.g. J. Sandström, Dynamic NMR Spectroscopy, Academic Press 1982, ch. 2 — from memory)
    assert res.extra_width_hz[0] == pytest.approx(0.01 * k_c / math.pi)
    assert math.isnan(res.extra_width_hz[1])
    assert res.extra_width_hz[2] == pytest.approx(math.pi * 50.0**2 / (2 * 100 * k_c))
    assert exchange_regime(1.0, 50.0).regime == "slow"


def test_dmf_n_methyls_merge_near_100_c_at_60_mhz() -> None:
    # common practice, no source: the two N-methyl singlets of N,N-dimethylformamide merge
    # near 100 °C on a 60 MHz instrument. Inputs from memory: ΔG‡(C–N rotation) ≈ 21 kcal/mol,
    # Δδ(N-CH3) ≈ 0.15 ppm.
    plan = plan_coalescence(dnu_ppm=0.15, fields_mhz=[60.0, 400.0], dg_kj_mol=21.0 * KCAL)
    tc_60 = plan.fields[0].tc_k - ZERO_C
    assert 75.0 <= tc_60 <= 130.0
    # a higher field pushes coalescence up, as every VT-NMR user learns
    assert plan.fields[1].tc_k > plan.fields[0].tc_k
    assert plan.fields[0].regime_at_t == "slow"  # two singlets at room temperature


def test_dma_merges_below_dmf() -> None:
    # from memory: ΔG‡ ≈ 18 kcal/mol for N,N-dimethylacetamide, ≈ 21 for DMF
    dma = coalescence_temperature(6.0, 18.0 * KCAL)
    dmf = coalescence_temperature(6.0, 21.0 * KCAL)
    assert dma < dmf - 40.0


def test_plan_cautions_above_boiling_point() -> None:
    # DMF's methyls measured in CDCl3 (bp 61 °C, CRC Handbook) would need ~120 °C
    plan = plan_coalescence(
        dnu_ppm=0.15, fields_mhz=[60.0], dg_kj_mol=21.0 * KCAL, solvent_bp_k=61.0 + ZERO_C
    )
    assert "above solvent bp: sealed tube" in plan.fields[0].flags
    text = " ".join(plan.cautions)
    assert "pressure-rated sealed NMR tube" in text
    assert "can burn" in text
    assert plan.cautions[-1].startswith("Follow your facility's safety rules and local regulations")


def test_safety_notes_cold_and_quiet() -> None:
    cold = safety_notes(-90.0 + ZERO_C)
    assert any("liquid nitrogen" in n for n in cold)
    assert safety_notes(25.0 + ZERO_C) == []
    frozen = safety_notes(-70.0 + ZERO_C, solvent_mp_k=-64.0 + ZERO_C)
    assert any("will freeze" in n for n in frozen)


def test_plan_input_errors() -> None:
    with pytest.raises(UsageError, match="either ΔG‡ or ΔH‡"):
        plan_coalescence(dnu_hz=10.0, dg_kj_mol=80.0, dh_kj_mol=80.0, ds_j_mol_k=0.0)
    with pytest.raises(UsageError, match="shift difference once"):
        plan_coalescence(dg_kj_mol=80.0)
    with pytest.raises(UsageError, match="one field"):
        plan_coalescence(dnu_hz=10.0, fields_mhz=[400.0, 600.0], dg_kj_mol=80.0)
