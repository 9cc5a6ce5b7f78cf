"""The coalescence rule against the published equations, computed here from CODATA constants.

Eyring: ΔG‡ = RT·ln(k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)); constants from
scipy.constants (CODATA). Gutowsky–Holm k_c = πΔν/√2 (J. Chem. Phys. 25, 1228 (1956)); coupled
AB k_c = π√(Δν² + 6J²)/√2 (Kurland, Rubin, Wise, J. Chem. Phys. 40, 2426 (1964)); unequal
populations from the coalescence condition of Shanan-Atidi and Bar-Eli (J. Phys. Chem. 74, 961
(1970)), solved here with scipy's brentq, independently of registry.kinetics.
"""

from __future__ import annotations

import math

import pytest
from scipy import constants as C
from scipy.optimize import brentq

from registry import api
from registry.record.entry import EntryInput
from registry.storage.database import Database
from registry.validation import CheckConfig, Finding, check_measurements

R_KJ = C.R / 1000.0
KB_H = C.Boltzmann / C.Planck
KCAL = C.calorie  # kJ per kcal (thermochemical calorie, 4.184 J; NIST SP 811 B.8)


def eyring(k: float, t: float) -> float:
    return R_KJ * t * math.log(KB_H * t / k)


def gutowsky_holm(tc: float, dnu: float, j: float = 0.0) -> float:
    return eyring(math.pi * math.sqrt(dnu * dnu + 6 * j * j) / math.sqrt(2), tc)


def shanan_atidi(tc: float, dnu: float, ratio: float) -> tuple[float, float]:
    p_a, p_b = ratio / (1 + ratio), 1 / (1 + ratio)
    x = brentq(lambda x: ((x * x - 2) / 3) ** 1.5 / x - (p_a - p_b), math.sqrt(2) + 1e-12, 50)
    tau = x / (2 * math.pi * dnu)
    return eyring(p_b / tau, tc), eyring(p_a / tau, tc)


def add(database: Database, **texts: str) -> int:
    base = {"method": "coalescence", "process": "bond-rotation", "nucleus": "1H",
            "field": "400 MHz", "solvent": "toluene-d8"}  # fmt: skip
    base.update(texts)
    base.setdefault("compound", f"C-{len(texts)}-{abs(hash(tuple(sorted(texts.items())))) % 10**8}")
    return api.add_measurement(database, EntryInput(**base), actor="tester")


def coalescence_findings(database: Database, mid: int, **config: float) -> list[Finding]:
    report = check_measurements(database, [mid], config=CheckConfig(**config))
    return [f for f in report.findings if f.rule_id == "coalescence-barrier"]


def test_textbook_form_agrees_with_eyring() -> None:
    # ΔG‡ = 19.14·Tc·(9.97 + log10(Tc/Δν)) J/mol, the Gutowsky–Holm + Eyring combination as
    # printed in H. Friebolin, Basic One- and Two-Dimensional NMR Spectroscopy (from memory)
    for tc, dnu in ((250.0, 30.0), (300.0, 50.0), (400.0, 200.0)):
        textbook = 19.14e-3 * tc * (9.97 + math.log10(tc / dnu))
        assert gutowsky_holm(tc, dnu) == pytest.approx(textbook, abs=0.05)


def test_matching_barrier_gives_no_finding(database: Database) -> None:
    dg = gutowsky_holm(300.0, 50.0)
    mid = add(database, tc="300 K", dnu="50 Hz", dg=f"{dg:.2f} kJ/mol")
    assert coalescence_findings(database, mid) == []


def test_disagreement_is_an_error_with_values(database: Database) -> None:
    dg = gutowsky_holm(300.0, 50.0)
    mid = add(database, tc="300 K", dnu="50 Hz", dg=f"{dg + 2.0:.3f} kJ/mol")
    (f,) = coalescence_findings(database, mid)
    assert f.severity == "error"
    assert f.unit == "kJ/mol"
    assert f.recomputed == pytest.approx(dg, abs=1e-3)
    assert f.difference == pytest.approx(2.0, abs=2e-3)
    assert "Gutowsky–Holm" in f.message and "tolerance ±1.00 kJ/mol" in f.message


def test_values_are_in_the_reported_unit(database: Database) -> None:
    dg = gutowsky_holm(260.0, 120.0)  # kJ/mol
    mid = add(database, tc="-13.15 °C", dnu="0.3 ppm", dg=f"{dg / KCAL + 0.5:.3f} kcal/mol")
    (f,) = coalescence_findings(database, mid)
    assert f.unit == "kcal/mol"
    assert f.recomputed == pytest.approx(dg / KCAL, abs=2e-3)
    assert f.difference == pytest.approx(0.5, abs=2e-3)
    assert "°C" in f.message  # Tc shown as the user wrote it


def test_coupled_pair_uses_the_ab_formula(database: Database) -> None:
    coupled = gutowsky_holm(280.0, 15.0, j=10.0)
    uncoupled = gutowsky_holm(280.0, 15.0)
    assert uncoupled - coupled > 1.5
    ok = add(database, tc="280 K", dnu="15 Hz", j="10 Hz", dg=f"{coupled:.2f} kJ/mol")
    assert coalescence_findings(database, ok) == []
    slip = add(database, tc="280 K", dnu="15 Hz", j="10 Hz", dg=f"{uncoupled:.2f} kJ/mol")
    (f,) = coalescence_findings(database, slip)
    assert f.slips[0] == "coupled-as-uncoupled"
    assert "coupled AB" in f.message


def test_unequal_populations_either_direction(database: Database) -> None:
    major, minor = shanan_atidi(320.0, 100.0, 9.0)
    # ΔG‡(A→B) − ΔG‡(B→A) = RT·ln(ratio), the free-energy difference of the sites
    assert major - minor == pytest.approx(R_KJ * 320.0 * math.log(9.0), abs=1e-6)
    for value in (major, minor):
        mid = add(database, tc="320 K", dnu="100 Hz", population="90:10", dg=f"{value:.2f} kJ/mol")
        assert coalescence_findings(database, mid) == []
    equal = gutowsky_holm(320.0, 100.0)
    mid = add(database, tc="320 K", dnu="100 Hz", population="90:10", dg=f"{equal - 3:.2f} kJ/mol")
    (f,) = coalescence_findings(database, mid)
    assert "unequal populations" in f.message


def test_stated_uncertainties_widen_the_tolerance(database: Database) -> None:
    dg = gutowsky_holm(300.0, 20.0)
    tight = add(database, tc="300 K", dnu="20 Hz", dg=f"{dg + 1.5:.2f} kJ/mol")
    assert len(coalescence_findings(database, tight)) == 1
    loose = add(database, tc="300 ± 5 K", dnu="20 ± 4 Hz", dg=f"{dg + 1.5:.2f} kJ/mol")
    assert coalescence_findings(database, loose) == []
    assert coalescence_findings(database, tight, dg_tolerance_kj_mol=2.0) == []


SLIP_CASES = {
    # slip id: function of (Tc, Δν, field) giving the reported ΔG‡ in kJ/mol, and texts
    "kcal-as-kj": (lambda: gutowsky_holm(380.0, 40.0) / KCAL, {}),
    "kj-as-kcal": (lambda: gutowsky_holm(380.0, 40.0) * KCAL, {}),
    "tc-celsius-as-kelvin": (
        lambda: eyring(math.pi * 40.0 / math.sqrt(2), 380.0 - C.zero_Celsius),
        {},
    ),
    "dnu-ppm-as-hz": (lambda: gutowsky_holm(380.0, 40.0 / 400.0), {}),
    # 500 MHz, not 800: Δν read at twice the field is a factor 2 in k, which a k_ex taken for
    # k_AB reproduces exactly as well (both are named: test_factor_two_names_both_causes)
    "dnu-other-field": (lambda: gutowsky_holm(380.0, 40.0 * 500.0 / 400.0), {}),
    "kc-pi-dnu": (lambda: eyring(math.pi * 40.0, 380.0), {}),
    "kc-2pi-dnu": (lambda: eyring(2 * math.pi * 40.0, 380.0), {}),
    "log10-for-ln": (lambda: gutowsky_holm(380.0, 40.0) / math.log(10), {}),
    "dg-other-temperature": (lambda: eyring(math.pi * 40.0 / math.sqrt(2), 298.15), {}),
}


@pytest.mark.parametrize("slip", sorted(SLIP_CASES))
def test_each_slip_is_named(database: Database, slip: str) -> None:
    make, _ = SLIP_CASES[slip]
    reported = make()
    mid = add(database, tc="380 K", dnu="40 Hz", dg=f"{reported:.3f} kJ/mol")
    (f,) = coalescence_findings(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips and f.slips[0] == slip, f.likely_cause
    assert f"[{slip}]" in (f.likely_cause or "")


def test_factor_two_names_both_causes(database: Database) -> None:
    # Δν read at 800 instead of 400 MHz doubles k_c exactly as k_ex = 2·k_AB does: both named
    reported = gutowsky_holm(380.0, 80.0)
    mid = add(database, tc="380 K", dnu="40 Hz", dg=f"{reported:.3f} kJ/mol")
    (f,) = coalescence_findings(database, mid, dg_tolerance_kj_mol=0.3)
    assert set(f.slips) == {"k-exchange-as-per-site", "dnu-other-field"}, f.likely_cause


def test_celsius_written_as_kelvin_is_named(database: Database) -> None:
    true_tc = 340.0
    reported = gutowsky_holm(true_tc, 40.0)
    mid = add(
        database, tc=f"{true_tc - C.zero_Celsius:.2f} K", dnu="40 Hz", dg=f"{reported:.2f} kJ/mol"
    )
    (f,) = coalescence_findings(database, mid)
    assert f.slips[0] == "tc-celsius-labelled-kelvin"


def test_two_fitting_slips_are_both_named(database: Database) -> None:
    # 2√2 on k_c is the same as Δν read at a field 2.83× higher: 283 MHz data called 800 MHz
    # is not a standard pair, but 2√2 ≈ 700/250 within 1 %; both must be named
    reported = eyring(2 * math.pi * 40.0, 380.0)
    mid = add(database, tc="380 K", dnu="40 Hz", field="250 MHz", dg=f"{reported:.3f} kJ/mol")
    (f,) = coalescence_findings(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips[0] == "kc-2pi-dnu"
    assert "dnu-other-field" in f.slips


def test_no_slip_named_when_none_fits(database: Database) -> None:
    reported = gutowsky_holm(300.0, 50.0) + 7.3
    mid = add(database, tc="300 K", dnu="50 Hz", dg=f"{reported:.2f} kJ/mol")
    (f,) = coalescence_findings(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips == () and f.likely_cause is None


def test_quoted_at_another_temperature_gets_an_allowance(database: Database) -> None:
    dg_tc = gutowsky_holm(250.0, 50.0)
    # quoted at 298 K: with |ΔS‡| ≤ 10 J/(mol·K) the value may move by up to 0.48 kJ/mol
    mid = add(database, tc="250 K", dnu="50 Hz", dg=f"{dg_tc + 1.3:.2f} kJ/mol", dg_t="298 K")
    assert coalescence_findings(database, mid) == []
    mid = add(database, tc="250 K", dnu="50 Hz", dg=f"{dg_tc + 1.3:.2f} kJ/mol")
    assert len(coalescence_findings(database, mid)) == 1
