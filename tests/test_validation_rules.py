"""Hand-made cases for the rules other than the coalescence barrier.

Check values come from the published relations, computed here with CODATA constants from
scipy.constants: ΔG‡ = ΔH‡ − TΔS‡ and the Eyring equation k = (k_B·T/h)·exp(−ΔG‡/RT)
(H. Eyring, J. Chem. Phys. 3, 107 (1935)); Ea = ΔH‡ + RT for a unimolecular reaction in
solution (K. J. Laidler, Chemical Kinetics, 3rd ed. (1987), §4.5; from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as C

from registry import api, kinetics
from registry.record.entry import EntryInput
from registry.storage.database import Database
from registry.validation import Finding, check_measurements
from registry.validation.reported import energy_units
from registry.validation.rule_refit import grouped_eyring_fit

R_KJ = C.R / 1000.0
KB_H = C.Boltzmann / C.Planck
_counter = iter(range(1, 10**6))


def add(database: Database, **texts: object) -> int:
    base: dict[str, object] = {"method": "lineshape", "process": "bond-rotation",
                               "nucleus": "1H", "solvent": "toluene-d8"}  # fmt: skip
    base.update(texts)
    base.setdefault("compound", f"R-{next(_counter)}")
    return api.add_measurement(database, EntryInput(**base), actor="tester")  # type: ignore[arg-type]


def findings(database: Database, mid: int, rule: str) -> list[Finding]:
    return [f for f in check_measurements(database, [mid]).findings if f.rule_id == rule]


# --- ΔG‡ against ΔH‡ − TΔS‡ ------------------------------------------------------------------


def test_dg_from_dh_ds_consistent(database: Database) -> None:
    mid = add(database, dh="60 kJ/mol", ds="-20 J/(mol K)", dg="66.0 kJ/mol", dg_t="300 K")
    assert findings(database, mid, "dg-from-dh-ds") == []


def test_dg_from_dh_ds_inconsistent_names_entropy_unit(database: Database) -> None:
    # ΔS‡ really −20 cal/(mol·K) but labelled J: ΔG‡ = 60 + 300·20·4.184/1000 = 85.1 kJ/mol
    dg = 60.0 + 300.0 * 20.0 * C.calorie / 1000.0
    mid = add(database, dh="60 kJ/mol", ds="-20 J/(mol K)", dg=f"{dg:.2f} kJ/mol", dg_t="300 K")
    (f,) = findings(database, mid, "dg-from-dh-ds")
    assert f.severity == "error"
    assert f.recomputed == pytest.approx(66.0)
    assert "cal/(mol·K) written as J/(mol·K)" in (f.likely_cause or "")


def test_dg_from_dh_ds_in_kcal(database: Database) -> None:
    mid = add(database, dh="14 kcal/mol", ds="-5 e.u.", dg="17.0 kcal/mol", dg_t="300 K")
    (f,) = findings(database, mid, "dg-from-dh-ds")
    assert f.unit == "kcal/mol"
    assert f.recomputed == pytest.approx(14.0 + 300 * 5 / 1000, abs=1e-9)  # 15.5 kcal/mol


# --- Ea against ΔH‡ + RT --------------------------------------------------------------------


def test_ea_matches_dh_plus_rt(database: Database) -> None:
    ea = 60.0 + R_KJ * 300.0
    mid = add(database, dh="60 kJ/mol", ea=f"{ea:.2f} kJ/mol", t_min="280 K", t_max="320 K")
    assert findings(database, mid, "ea-from-dh") == []


def test_ea_equal_to_dh_is_flagged(database: Database) -> None:
    mid = add(database, dh="60 kJ/mol", ea="60 kJ/mol", t_min="290 K", t_max="310 K")
    (f,) = findings(database, mid, "ea-from-dh")
    assert f.recomputed == pytest.approx(60.0 + R_KJ * 300.0)
    assert "RT term left out" in (f.likely_cause or "")


# --- refit of the rate points ---------------------------------------------------------------


def eyring_k(dh: float, ds: float, t: float) -> float:
    return KB_H * t * math.exp(ds / C.R) * math.exp(-dh / (R_KJ * t))


def rate_texts(dh: float, ds: float) -> list[tuple[str, str]]:
    return [(f"{t} K", f"{eyring_k(dh, ds, t):.6g} s-1") for t in (280, 295, 310, 325, 340)]


def test_refit_agrees_with_reported(database: Database) -> None:
    mid = add(database, dh="55 kJ/mol", ds="-10 J/(mol K)", rates=rate_texts(55.0, -10.0))
    assert findings(database, mid, "activation-refit") == []


def test_refit_flags_wrong_dh_and_ds(database: Database) -> None:
    mid = add(database, dh="65 kJ/mol", ds="+20 J/(mol K)", rates=rate_texts(55.0, -10.0))
    found = {f.message.split()[0]: f for f in findings(database, mid, "activation-refit")}
    assert set(found) == {"ΔH‡", "ΔS‡"}
    assert found["ΔH‡"].recomputed == pytest.approx(55.0, abs=0.01)
    assert found["ΔS‡"].recomputed == pytest.approx(-10.0, abs=0.05)


def test_grouped_fit_matches_kinetics_fit_eyring() -> None:
    rng = np.random.default_rng(3)
    groups, ts, ks, errs, expected = [], [], [], [], []
    for g in range(6):
        t = np.sort(rng.uniform(250, 380, size=5 + g))
        k = np.array([eyring_k(50 + 3 * g, -15 + 4 * g, x) for x in t]) * rng.lognormal(
            0, 0.05, t.size
        )
        err = 0.05 * k if g % 2 else np.full(t.size, np.nan)
        fit = kinetics.fit_eyring(t, k, None if g % 2 == 0 else err)
        expected.append(fit)
        groups.append(np.full(t.size, g))
        ts.append(t)
        ks.append(k)
        errs.append(err)
    got = grouped_eyring_fit(
        np.concatenate(groups), 6, np.concatenate(ts), np.concatenate(ks), np.concatenate(errs)
    )
    for g, fit in enumerate(expected):
        assert got.dh_kj_mol[g] == pytest.approx(fit.dh_kj_mol, rel=1e-9)
        assert got.ds_j_mol_k[g] == pytest.approx(fit.ds_j_mol_k, rel=1e-9, abs=1e-9)
        assert got.dh_err_kj_mol[g] == pytest.approx(fit.dh_err_kj_mol, rel=1e-6)
        assert got.ds_err_j_mol_k[g] == pytest.approx(fit.ds_err_j_mol_k, rel=1e-6)
        dg, dg_err = got.dg_at(np.array([298.15]))
        ref = fit.dg_at(298.15)
        assert dg[g] == pytest.approx(ref.dg_kj_mol, rel=1e-9)
        assert dg_err[g] == pytest.approx(ref.dg_err_kj_mol, rel=1e-6)


# --- temperatures ---------------------------------------------------------------------------


def test_zero_kelvin_is_an_error(database: Database) -> None:
    mid = add(database, t_min="0 K", t_max="300 K", dg="60 kJ/mol", dg_t="300 K")
    (f,) = findings(database, mid, "temperature-positive")
    assert f.severity == "error" and "absolute zero" in f.message


def test_swapped_range_is_an_error(database: Database) -> None:
    mid = add(database, t_min="30 °C", t_max="-20 °C")
    (f,) = findings(database, mid, "temperature-range-order")
    assert (
        f.unit == "°C"
        and f.reported == pytest.approx(30.0)
        and f.recomputed == pytest.approx(-20.0)
    )


def test_tc_outside_the_measured_range(database: Database) -> None:
    mid = add(database, method="coalescence", tc="330 K", dnu="40 Hz", t_min="250 K", t_max="320 K")
    (f,) = findings(database, mid, "tc-in-range")
    assert f.severity == "warning" and f.difference == pytest.approx(10.0)


def test_above_the_boiling_point_carries_the_caution(database: Database) -> None:
    # CDCl3 boils at 61 °C (CRC Handbook, chloroform; from memory)
    mid = add(database, solvent="CDCl3", method="coalescence", tc="70 °C", dnu="40 Hz")
    (f,) = findings(database, mid, "solvent-liquid-range")
    assert "pressure-rated sealed" in f.message
    assert "local regulations" in f.message
    assert (
        f.unit == "°C" and f.reported == pytest.approx(70.0) and f.recomputed == pytest.approx(61.0)
    )


def test_below_the_melting_point(database: Database) -> None:
    # DMSO melts at 18.5 °C (CRC Handbook; from memory)
    mid = add(database, solvent="DMSO-d6", t_min="0 °C", t_max="80 °C")
    (f,) = findings(database, mid, "solvent-liquid-range")
    assert "frozen" in f.message


def test_inside_the_liquid_range_is_quiet(database: Database) -> None:
    mid = add(database, solvent="toluene-d8", t_min="-60 °C", t_max="100 °C")
    assert findings(database, mid, "solvent-liquid-range") == []


# --- plausibility ---------------------------------------------------------------------------


def test_barrier_outside_the_nmr_range(database: Database) -> None:
    # 3.5 kcal/mol at 150 K is k ≈ 2.5×10⁷ s⁻¹, faster than a line shape sees (≤ 10⁶ s⁻¹):
    # the edge is ΔG‡ of k = 10⁶ s⁻¹ at 150 K, RT·ln(k_B·T/(h·10⁶)) (Eyring 1935)
    mid = add(database, dg="3.5 kcal/mol", dg_t="150 K")
    (f,) = findings(database, mid, "barrier-method-range")
    assert f.unit == "kcal/mol"
    edge_kj = R_KJ * 150.0 * math.log(KB_H * 150.0 / 1.0e6)
    assert f.recomputed == pytest.approx(edge_kj / C.calorie)
    assert "faster than lineshape can measure" in f.message


def test_barrier_without_temperature_uses_the_energy_window(database: Database) -> None:
    mid = add(database, dg="3.5 kcal/mol")
    (f,) = findings(database, mid, "barrier-method-range")
    assert f.recomputed == pytest.approx(20.0 / C.calorie)
    assert "no temperature is stored" in f.message


def test_slow_exsy_at_high_temperature_is_plausible(database: Database) -> None:
    # 108 kJ/mol at 400 K: k = (k_B·T/h)·exp(−ΔG‡/RT) ≈ 0.066 s⁻¹, inside what EXSY measures
    k = KB_H * 400.0 * math.exp(-108.0 / (R_KJ * 400.0))
    assert 0.01 < k < 0.1
    mid = add(database, method="2d-exchange", dg="108 kJ/mol", dg_t="400 K")
    assert findings(database, mid, "barrier-method-range") == []
    # the same barrier at 300 K is k ≈ 10⁻⁶ s⁻¹: no cross peaks build up
    slow = add(database, method="2d-exchange", dg="108 kJ/mol", dg_t="300 K")
    (f,) = findings(database, slow, "barrier-method-range")
    assert "slower than 2d-exchange" in f.message


def test_slow_kinetics_are_not_an_nmr_barrier(database: Database) -> None:
    mid = add(database, method="equilibration", dg="110 kJ/mol", dg_t="350 K")
    assert findings(database, mid, "barrier-method-range") == []


def test_dnu_too_wide_for_1h(database: Database) -> None:
    mid = add(database, method="coalescence", field="400 MHz", tc="300 K", dnu="8000 Hz")
    (f,) = findings(database, mid, "dnu-field")
    assert f.reported == pytest.approx(20.0) and f.unit == "ppm"


def test_13c_uses_the_13c_frequency(database: Database) -> None:
    # 2000 Hz at 400 MHz would be 5 ppm for 1H, 19.9 ppm for 13C (observed at 100.6 MHz)
    mid = add(
        database, method="coalescence", nucleus="13C", field="400 MHz", tc="300 K", dnu="2000 Hz"
    )
    assert findings(database, mid, "dnu-field") == []
    mid = add(
        database, method="coalescence", nucleus="1H", field="400 MHz", tc="300 K", dnu="2000 Hz"
    )
    assert findings(database, mid, "dnu-field") == []
    mid = add(database, method="coalescence", nucleus="1H", field="40 kHz", tc="300 K", dnu="20 Hz")
    assert [f.severity for f in findings(database, mid, "dnu-field")] == ["warning"]


# --- structure and repeats ------------------------------------------------------------------


def test_unparsable_smiles_is_a_note(database: Database) -> None:
    mid = add(database, smiles="C(C)(C)(C)(C)C", dg="60 kJ/mol", dg_t="300 K")
    (f,) = findings(database, mid, "structure-parse")
    assert f.severity == "note" and "valence" in f.message


def test_structure_flag_from_the_table(database: Database) -> None:
    mid = add(database, smiles="CC(=O)N(C)C", dg="60 kJ/mol", dg_t="300 K")
    assert findings(database, mid, "structure-parse") == []
    database.write(
        lambda conn: conn.execute(
            "UPDATE compound SET structure_ok = :ok, structure_problem = 'hand-edited'",
            {"ok": False},
        )
    )
    (f,) = findings(database, mid, "structure-parse")
    assert "hand-edited" in f.message


def test_repeats_that_disagree(database: Database) -> None:
    a = add(database, compound="DUP-1", dg="60 kJ/mol", dg_t="300 K", solvent="CDCl3")
    b = add(database, compound="DUP-1", dg="65 kJ/mol", dg_t="305 K", solvent="chloroform-d")
    fa = findings(database, a, "repeat-disagrees")
    fb = findings(database, b, "repeat-disagrees")
    assert len(fa) == 1 and len(fb) == 1
    assert f"measurement {b}" in fa[0].message and fa[0].difference == pytest.approx(-5.0)


def test_repeats_within_their_uncertainty(database: Database) -> None:
    a = add(database, compound="DUP-2", dg="60 ± 3 kJ/mol", dg_t="300 K")
    add(database, compound="DUP-2", dg="65 ± 3 kJ/mol", dg_t="300 K")
    assert findings(database, a, "repeat-disagrees") == []


def test_repeats_in_other_solvents_are_not_compared(database: Database) -> None:
    a = add(database, compound="DUP-3", dg="60 kJ/mol", dg_t="300 K", solvent="CDCl3")
    add(database, compound="DUP-3", dg="66 kJ/mol", dg_t="300 K", solvent="DMSO-d6")
    assert findings(database, a, "repeat-disagrees") == []


# --- the units a value was reported in ------------------------------------------------------

_ENERGY_SPELLINGS = {"kJ/mol": 1.0, "kcal/mol": 1 / C.calorie, "kcal mol-1": 1 / C.calorie,
                     "kJ mol⁻¹": 1.0, "kcal/mol ": 1 / C.calorie}  # fmt: skip


@given(
    value=st.floats(min_value=0.5, max_value=500, allow_nan=False),
    err=st.one_of(st.none(), st.floats(min_value=0.01, max_value=5)),
    spelling=st.sampled_from(sorted(_ENERGY_SPELLINGS)),
)
@settings(max_examples=60, deadline=None)
def test_energy_units_read_back_the_written_unit(
    value: float, err: float | None, spelling: str
) -> None:
    from registry.record.units import parse_value

    text = f"{value:.3f}" + (f" ± {err:.2f}" if err else "") + f" {spelling}"
    stored = parse_value(text, "energy").value
    labels, factors = energy_units([text, None], [stored, np.nan])
    assert labels[0] == ("kJ/mol" if _ENERGY_SPELLINGS[spelling] == 1.0 else "kcal/mol")
    assert stored * factors[0] == pytest.approx(float(f"{value:.3f}"), rel=1e-9)
    assert labels[1] == "kJ/mol" and factors[1] == 1.0


def test_header_unit_is_recovered_from_the_ratio() -> None:
    # a bare number whose unit came from a spreadsheet header ("ΔG‡ (kcal/mol)")
    labels, factors = energy_units(["15.2", "63.6"], [15.2 * C.calorie, 63.6])
    assert list(labels) == ["kcal/mol", "kJ/mol"]
    assert factors[0] == pytest.approx(1 / C.calorie)


def test_13c_ppm_converted_at_the_1h_frequency(database: Database) -> None:
    # 13C observe frequency = 400 MHz × Ξ(13C)/Ξ(1H) = 400 × 0.25145020 = 100.58 MHz
    # (Ξ from R. K. Harris et al., Pure Appl. Chem. 73, 1795 (2001); from memory)
    mid = add(
        database, method="coalescence", nucleus="13C", field="400 MHz", tc="300 K", dnu="1.5 ppm"
    )
    # entries are now converted at the 13C frequency, so a new entry is clean …
    assert findings(database, mid, "dnu-ppm-nucleus") == []
    # … and a row stored the old way (at the 1H frequency) is flagged
    database.write(
        lambda conn: conn.execute(
            "UPDATE coalescence SET dnu_hz = 600.0 WHERE measurement_id = :m", {"m": mid}
        )
    )
    (f,) = findings(database, mid, "dnu-ppm-nucleus")
    assert f.reported == pytest.approx(600.0)
    assert f.recomputed == pytest.approx(1.5 * 400 * 0.25145020)
    mid = add(
        database, method="coalescence", nucleus="1H", field="400 MHz", tc="300 K", dnu="0.5 ppm"
    )
    assert findings(database, mid, "dnu-ppm-nucleus") == []
    mid = add(
        database, method="coalescence", nucleus="13C", field="400 MHz", tc="300 K", dnu="150 Hz"
    )
    assert findings(database, mid, "dnu-ppm-nucleus") == []
