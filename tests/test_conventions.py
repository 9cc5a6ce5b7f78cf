"""Rate-constant conventions, temperature calibration and ΔG‡ at a common temperature.

Check values are computed here, never taken from the code under test: the Eyring equation
k = κ·(k_B·T/h)·exp(−ΔG‡/RT) (H. Eyring, J. Chem. Phys. 3, 107 (1935)) with CODATA constants
from scipy.constants; the Gutowsky–Holm rate at coalescence k_c = πΔν/√2 (H. S. Gutowsky and
C. H. Holm, J. Chem. Phys. 25, 1228 (1956)); k_ex = k_AB + k_BA = 2·k_AB for equal
populations and k_rac = 2·k_enant (both by definition, e.g. J. Sandström, Dynamic NMR
Spectroscopy (1982); from memory); ΔG‡(T) = ΔH‡ − T·ΔS‡; the angular frequency ω = 2πν
(NIST SP 811, §8.2: rad/s and Hz are not interchangeable).
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as C

from registry import api
from registry.errors import FluxledgerError, ImportRowError, UnitError
from registry.io.headers import guess_header
from registry.record.conventions import read_calibration, read_convention
from registry.record.entry import EntryInput
from registry.record.populations import parse_population_ratio
from registry.record.units import parse_value
from registry.storage.database import Database
from registry.validation import check_measurements

R_KJ = C.R / 1000.0
KB_H = C.Boltzmann / C.Planck
_counter = iter(range(1, 10**6))


def eyring_dg(k: float, t: float) -> float:
    """ΔG‡ in kJ/mol from k (s⁻¹) at T (K), κ = 1."""
    return R_KJ * t * math.log(KB_H * t / k)


def gh_rate(dnu: float) -> float:
    return math.pi * dnu / math.sqrt(2.0)


def add(database: Database, **texts: object) -> int:
    base: dict[str, object] = {"method": "coalescence", "process": "bond-rotation",
                               "nucleus": "1H", "solvent": "toluene-d8", "field": "400 MHz"}  # fmt: skip
    base.update(texts)
    base.setdefault("compound", f"CV-{next(_counter)}")
    return api.add_measurement(database, EntryInput(**base), actor="tester")  # type: ignore[arg-type]


def coalescence(database: Database, mid: int, **config: float) -> list:  # type: ignore[type-arg]
    from registry.validation import CheckConfig

    result = check_measurements(database, [mid], config=CheckConfig(**config))
    return [f for f in result.findings if f.rule_id == "coalescence-barrier"]


# ---------------------------------------------------------------- readers


@pytest.mark.parametrize(
    ("text", "name"),
    [("kex", "exchange"), ("k_ex", "exchange"), ("k(AB)", "per-site"), ("k_rac", "racemization"),
     ("racemisation", "racemization"), ("k_enant", "enantiomerization"), ("kobs", "observed"),
     ("per-site", "per-site")],
)  # fmt: skip
def test_convention_words(text: str, name: str) -> None:
    assert read_convention(text) == name


def test_unknown_convention_is_refused_with_a_suggestion() -> None:
    with pytest.raises(UnitError, match=r"did you mean exchange\?"):
        read_convention("kexx")


_RATE_HEADS = {"kex": "exchange", "k_ex": "exchange", "kobs": "observed", "k_rac": "racemization",
               "k_enant": "enantiomerization", "k_AB": "per-site", "k": None, "rate": None}  # fmt: skip


@settings(max_examples=60, deadline=None)
@given(
    head=st.sampled_from(sorted(_RATE_HEADS)),
    unit=st.sampled_from(["s-1", "1/s", "s^-1", "min-1", "h-1"]),
    style=st.sampled_from(["{h} ({u})", "{h} / {u}", "{h} [{u}]", " {h}  ({u}) "]),
)
def test_rate_headers_name_their_convention(head: str, unit: str, style: str) -> None:
    guess = guess_header(style.format(h=head, u=unit))
    assert guess.field == "k"
    assert guess.convention == _RATE_HEADS[head]
    assert guess.unit is not None and guess.unit.replace(" ", "") == unit


# ---------------------------------------------------------------- populations as written


@settings(max_examples=80, deadline=None)
@given(a=st.integers(1, 999), b=st.integers(1, 999), sep=st.sampled_from([":", "/", " : "]))
def test_population_pairs_read_as_written(a: int, b: int, sep: str) -> None:
    assert parse_population_ratio(f"{a}{sep}{b}") == pytest.approx(max(a, b) / min(a, b))


@settings(max_examples=80, deadline=None)
@given(p=st.integers(1, 99))
def test_population_percent_and_fraction(p: int) -> None:
    expected = max(p, 100 - p) / min(p, 100 - p)
    assert parse_population_ratio(f"{p}%") == pytest.approx(expected)
    assert parse_population_ratio(f"p = {p / 100:.2f}") == pytest.approx(expected)


@settings(max_examples=80, deadline=None)
@given(x=st.floats(0.01, 0.99).map(lambda v: round(v, 3)).filter(lambda v: 0 < v < 1))
def test_bare_number_below_one_is_refused_not_guessed(x: float) -> None:
    # 0.5 used to become 1 (equal) and 0.25 to become 3: both readings are possible, so neither
    with pytest.raises(UnitError, match="ambiguous"):
        parse_population_ratio(f"{x:g}")
    assert parse_population_ratio(f"{x:g}", unit="ratio") == pytest.approx(1.0 / x)


def test_population_half_is_not_one(database: Database) -> None:
    with pytest.raises(FluxledgerError, match="population"):
        add(database, tc="320 K", dnu="100 Hz", population="0.5", dg="60 kJ/mol")


# ---------------------------------------------------------------- angular frequencies


def test_rad_per_second_is_divided_by_two_pi() -> None:
    omega = 628.3185
    got = parse_value(f"{omega} rad/s", "frequency", field="dnu")
    assert got.value == pytest.approx(omega / (2 * math.pi))  # ω = 2πν: 100.0 Hz, not 628 Hz
    with pytest.raises(UnitError, match="angular frequency"):
        parse_value("628 rad/s", "rate", field="k")


# ---------------------------------------------------------------- temperature calibration


@pytest.mark.parametrize(
    ("text", "name", "sigma"),
    [("methanol", "methanol", 0.5), ("80% ethylene glycol ± 0.3 K", "ethylene-glycol", 0.3),
     ("thermocouple (±1 °C)", "thermocouple", 1.0), ("none", "none", 2.0),
     ("MeOH ± 200 mK", "methanol", 0.2)],
)  # fmt: skip
def test_calibration_texts(text: str, name: str, sigma: float) -> None:
    got = read_calibration(text)
    assert (got.name, got.sigma_k) == (name, pytest.approx(sigma))


def test_misspelled_calibration_is_refused() -> None:
    with pytest.raises(UnitError, match="did you mean methanol"):
        read_calibration("methnol")


def test_calibration_sets_the_default_sigma_of_tc(database: Database) -> None:
    # σ(Tc) = 2 K ("none") widens the tolerance by ≈ (ΔG‡/Tc)·2 K ≈ 0.4 kJ/mol at 340 K
    dg = eyring_dg(gh_rate(25.0), 340.0) + 1.2
    bare = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.2f} kJ/mol")
    (f,) = coalescence(database, bare)
    assert "calibrat" not in f.message  # nothing recorded: the message as it always was
    loose = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.2f} kJ/mol", calibration="none")
    assert coalescence(database, loose) == []
    tight = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.2f} kJ/mol",
                calibration="methanol ± 0.1 K")  # fmt: skip
    (f,) = coalescence(database, tight)
    assert "temperature calibrated by methanol (σ(T) 0.1 K)" in f.message


# ---------------------------------------------------------------- conventions in the check


def test_exchange_convention_recomputes_with_k_ex(database: Database) -> None:
    k_ex = 2 * gh_rate(25.0)
    dg = eyring_dg(k_ex, 340.0)
    ok = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.2f} kJ/mol", convention="kex")
    assert coalescence(database, ok) == []
    # the same number without a convention is read as per-site: off by RT·ln 2, named
    mid = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.2f} kJ/mol")
    (f,) = coalescence(database, mid)
    assert f.difference == pytest.approx(-R_KJ * 340.0 * math.log(2.0), abs=0.01)
    assert "k-exchange-as-per-site" in f.slips
    # RT·ln 2 is not blamed on k_c = πΔν and 2πΔν at once
    assert not {"kc-pi-dnu", "kc-2pi-dnu"} <= set(f.slips)


@pytest.mark.parametrize("tc", [300.0, 347.0, 380.0, 420.0])
def test_factor_two_is_named_at_every_temperature(database: Database, tc: float) -> None:
    dg = eyring_dg(2 * gh_rate(30.0), tc)
    mid = add(database, tc=f"{tc} K", dnu="30 Hz", dg=f"{dg:.3f} kJ/mol")
    (f,) = coalescence(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips and f.slips[0] == "k-exchange-as-per-site", f.likely_cause
    assert "kc-pi-dnu" not in f.slips and "kc-2pi-dnu" not in f.slips


def test_per_site_value_under_exchange_convention_is_named(database: Database) -> None:
    dg = eyring_dg(gh_rate(25.0), 340.0)  # computed from k_AB while the entry says k_ex
    mid = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.3f} kJ/mol", convention="exchange")
    (f,) = coalescence(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips[0] == "k-per-site-as-exchange"


def test_racemization_and_enantiomerization(database: Database) -> None:
    k_enant = gh_rate(25.0)
    # barrier of k_rac = 2·k_enant reported for an entry that says enantiomerization
    dg = eyring_dg(2 * k_enant, 340.0)
    mid = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.3f} kJ/mol",
              convention="enantiomerization")  # fmt: skip
    (f,) = coalescence(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips[0] == "racemization-as-enantiomerization"
    ok = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.3f} kJ/mol", convention="k_rac")
    assert coalescence(database, ok) == []


def test_path_degeneracy(database: Database) -> None:
    # σ = 3 paths (a methyl rotor): the barrier of one path is that of k/3
    dg = eyring_dg(gh_rate(25.0) / 3, 340.0)
    ok = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.3f} kJ/mol", degeneracy="3")
    assert coalescence(database, ok, dg_tolerance_kj_mol=0.3) == []
    plain = eyring_dg(gh_rate(25.0), 340.0)
    mid = add(database, tc="340 K", dnu="25 Hz", dg=f"{plain:.3f} kJ/mol", degeneracy="3")
    (f,) = coalescence(database, mid, dg_tolerance_kj_mol=0.3)
    assert f.slips[0] == "degeneracy-ignored"


def test_bimolecular_exchange_needs_its_concentration(database: Database) -> None:
    with pytest.raises(FluxledgerError, match="1 M standard state"):
        add(database, tc="340 K", dnu="25 Hz", dg="70 kJ/mol", order="2")
    # k₂ = k/[X] at 0.05 M: ΔG‡ refers to 1 M
    dg = eyring_dg(gh_rate(25.0) / 0.05, 340.0)
    ok = add(database, tc="340 K", dnu="25 Hz", dg=f"{dg:.3f} kJ/mol", order="2",
             concentration="50 mM")  # fmt: skip
    assert coalescence(database, ok, dg_tolerance_kj_mol=0.3) == []


def _major_minor(tc: float, dnu: float, ratio: float) -> tuple[float, float]:
    """ΔG‡ leaving the major and the minor site at coalescence, Shanan-Atidi & Bar-Eli (J. Phys.
    Chem. 74, 961 (1970)): X solves Δp = [(X² − 2)/3]^{3/2}/X with Δp = p_A − p_B, τ = X/(2πΔν)
    and τ_A = τ/p_B, τ_B = τ/p_A (k = 1/τ of each site); solved here by bisection."""
    from scipy.optimize import brentq

    p_a = ratio / (1 + ratio)
    p_b = 1 - p_a
    dp = p_a - p_b
    x = brentq(lambda x: ((x * x - 2) / 3) ** 1.5 / x - dp, math.sqrt(2) + 1e-12, 50.0)
    tau = x / (2 * math.pi * dnu)
    k_a, k_b = 1 / (tau / p_b), 1 / (tau / p_a)  # τ_A = τ/p_B: leaving A (major) is slower
    return eyring_dg(k_a, tc), eyring_dg(k_b, tc)


def test_populations_ignored_needs_the_direction(database: Database) -> None:
    major, minor = _major_minor(320.0, 100.0, 9.0)
    assert major - minor == pytest.approx(R_KJ * 320.0 * math.log(9.0), abs=1e-6)
    equal = eyring_dg(gh_rate(100.0), 320.0)  # the populations ignored
    # without a direction the equal-population value is close to the minor-site barrier: quiet
    quiet = add(database, tc="320 K", dnu="100 Hz", population="90:10", dg=f"{equal:.2f} kJ/mol")
    assert coalescence(database, quiet) == []
    # with the direction recorded (major → minor) the same number is the slip, and named
    mid = add(database, tc="320 K", dnu="100 Hz", population="90:10", dg=f"{equal:.2f} kJ/mol",
              direction="major-to-minor")  # fmt: skip
    (f,) = coalescence(database, mid)
    assert "populations-ignored" in f.slips
    fine = add(database, tc="320 K", dnu="100 Hz", population="90:10", dg=f"{major:.2f} kJ/mol",
               direction="major-to-minor")  # fmt: skip
    assert coalescence(database, fine) == []


# ---------------------------------------------------------------- recorded, shown, edited


def test_recorded_and_shown_and_edited(database: Database) -> None:
    mid = add(database, tc="340 K", dnu="25 Hz", dg="71 kJ/mol", convention="kex",
              calibration="methanol ± 0.3 K", kappa="0.8")  # fmt: skip
    got = api.get_measurement(database, mid)
    rec = got["recorded"]
    assert (rec["convention"], rec["calibration"], rec["calibration_sigma_k"]) == (
        "exchange",
        "methanol",
        pytest.approx(0.3),
    )
    assert got["kappa"] == pytest.approx(0.8)
    assert api.list_measurements(database, ids=[mid])[0]["k_convention"] == "exchange"
    api.edit_measurement(database, mid, ["convention=per-site", "calibration=thermocouple"],
                         actor="tester", reason="the paper uses k_AB")  # fmt: skip
    got = api.get_measurement(database, mid)
    assert got["k_convention"] == "per-site"
    assert got["t_calibration_err_k"] == pytest.approx(1.0)
    texts = " ".join(str(h) for h in api.history(database, mid))
    assert "k_convention" in texts and "exchange" in texts  # the old value stays in the history
    assert api.verify(database)["ok"]


def test_cli_add_show_and_bad_word(tmp_path: Path) -> None:
    import subprocess

    exe = str(Path(sys.executable).with_name("fluxledger"))
    db = str(tmp_path / "c.sqlite")

    def run(*args: str) -> subprocess.CompletedProcess[str]:
        return subprocess.run([exe, "--db", db, *args], capture_output=True, text=True,
                              timeout=120)  # fmt: skip

    assert run("init").returncode == 0
    base = ["add", "--method", "coalescence", "--compound", "X1", "--process", "bond-rotation",
            "--nucleus", "1H", "--solvent", "toluene-d8", "--field", "400", "--tc", "340 K",
            "--dnu", "25 Hz", "--dg", "70.4 kJ/mol"]  # fmt: skip
    bad = run(*base, "--convention", "kexx")
    assert bad.returncode == 1
    assert "convention" in bad.stderr and "did you mean exchange" in bad.stderr
    assert "Traceback" not in bad.stderr
    good = run(*base, "--convention", "kex", "--calibration", "methanol")
    assert good.returncode == 0, good.stderr
    shown = run("show", "1").stdout
    assert "exchange: k_ex = k_AB + k_BA" in shown
    assert "methanol: σ(T) 0.5 K (default for it)" in shown


# ---------------------------------------------------------------- import headers


def _csv(path: Path, rows: list[list[str]]) -> Path:
    path.write_text("\n".join(",".join(r) for r in rows) + "\n", encoding="utf-8")
    return path


def test_import_reads_the_convention_from_the_rate_header(database: Database,
                                                         tmp_path: Path) -> None:  # fmt: skip
    entries = _csv(tmp_path / "e.csv", [
        ["label", "compound", "method", "process", "nucleus", "solvent", "convention"],
        ["R1", "CV-R1", "equilibration", "bond-rotation", "1H", "toluene-d8", "racemization"],
        ["R2", "CV-R2", "equilibration", "bond-rotation", "1H", "toluene-d8", "per-site"],
    ])  # fmt: skip
    api.import_table(database, entries)
    ok = _csv(tmp_path / "ok.csv", [["label", "T (K)", "k_rac (s-1)"],
                                    ["R1", "330", "1.0e-4"], ["R1", "340", "3.1e-4"]])  # fmt: skip
    api.import_table(database, ok)
    bad = _csv(tmp_path / "bad.csv", [["label", "T (K)", "k_rac (s-1)"], ["R2", "330", "1e-4"]])
    with pytest.raises(ImportRowError) as info:
        api.import_table(database, bad)
    (problem,) = info.value.problems
    assert (problem.file, problem.row, problem.column) == ("bad.csv", 2, "k_rac (s-1)")
    assert "racemization" in problem.reason and "per-site" in problem.reason


def test_import_unknown_convention_names_file_row_column(database: Database,
                                                        tmp_path: Path) -> None:  # fmt: skip
    entries = _csv(tmp_path / "u.csv", [
        ["compound", "method", "process", "nucleus", "solvent", "ΔG‡ (kJ/mol)", "convention"],
        ["CV-U1", "coalescence", "bond-rotation", "1H", "toluene-d8", "70", "per-site"],
        ["CV-U2", "coalescence", "bond-rotation", "1H", "toluene-d8", "70", "k-something"],
    ])  # fmt: skip
    with pytest.raises(ImportRowError) as info:
        api.import_table(database, entries)
    (problem,) = info.value.problems
    assert (problem.file, problem.row, problem.column) == ("u.csv", 3, "convention")
    assert api.list_measurements(database) == []  # nothing half-written


# ---------------------------------------------------------------- ΔG‡ at a common temperature


def test_barriers_at_a_common_temperature(database: Database) -> None:
    inside = add(database, method="lineshape", dh="62 ± 1 kJ/mol", ds="-10 ± 3 J/(mol K)",
                 dh_ds_corr="0.99", t_min="280 K", t_max="320 K")  # fmt: skip
    beyond = add(database, method="lineshape", dh="70 kJ/mol", ds="20 J/(mol K)",
                 t_min="340 K", t_max="380 K")  # fmt: skip
    quoted = add(database, dg="66 kJ/mol", dg_t="298 K")
    elsewhere = add(database, dg="60 kJ/mol", dg_t="340 K")
    rows = {r["id"]: r for r in api.list_measurements(database, at="298.15 K")}
    t = 298.15
    assert rows[inside]["dg_at_kj_mol"] == pytest.approx(62.0 + t * 10.0 / 1000.0)
    # σ² = σ_H² + T²σ_S² − 2T·r·σ_H·σ_S
    var = 1.0 + (t * 0.003) ** 2 - 2 * t * 0.99 * 1.0 * 0.003
    assert rows[inside]["dg_at_err_kj_mol"] == pytest.approx(math.sqrt(var))
    assert rows[inside]["extrapolated"] == "no"
    assert rows[beyond]["dg_at_kj_mol"] == pytest.approx(70.0 - t * 20.0 / 1000.0)
    assert rows[beyond]["extrapolated"] == "yes"
    assert rows[quoted]["dg_at_kj_mol"] == pytest.approx(66.0)  # quoted at 298 K
    assert rows[elsewhere]["dg_at_kj_mol"] is None  # 340 K and no ΔS‡: not known at 298 K
    picked = api.list_measurements(database, at="25 °C", barrier=">= 64.5 kJ/mol")
    assert {r["id"] for r in picked} == {inside, quoted}
    ordered = [r["id"] for r in api.list_measurements(database, at="298.15 K", sort="-barrier")]
    assert ordered == [quoted, inside, beyond, elsewhere]


def test_repeat_rule_moves_dg_with_ds(database: Database) -> None:
    # ΔH‡ 60, ΔS‡ −30 J/(mol·K): ΔG‡(300 K) = 69.0, ΔG‡(340 K) = 70.2 kJ/mol — one process
    first = add(database, compound="CV-REP", method="lineshape", dg="69.0 kJ/mol",
                dg_t="300 K", dh="60 kJ/mol", ds="-30 J/(mol K)")  # fmt: skip
    second = add(database, compound="CV-REP", method="lineshape", dg="70.2 kJ/mol", dg_t="340 K")
    found = check_measurements(database, [first, second]).findings
    assert [f for f in found if f.rule_id == "repeat-disagrees"] == []
    third = add(database, compound="CV-REP", method="lineshape", dg="72.7 kJ/mol", dg_t="300 K")
    found = check_measurements(database, [third]).findings
    hits = [
        f
        for f in found
        if f.rule_id == "repeat-disagrees" and f.measurement_id == third and f.severity == "warning"
    ]  # (a note says it was not compared with the 340 K one)
    (f,) = hits
    assert f.reported == pytest.approx(72.7)
    # measurement 2 moved from 340 to 300 K with ΔS‡ of measurement 1: 70.2 − 40·0.030 = 69.0
    assert f.recomputed == pytest.approx(69.0, abs=1e-9)


def test_repeats_far_apart_without_entropy_are_not_compared(database: Database) -> None:
    a = add(database, compound="CV-FAR", method="lineshape", dg="60.0 kJ/mol", dg_t="250 K")
    b = add(database, compound="CV-FAR", method="lineshape", dg="66.0 kJ/mol", dg_t="350 K")
    found = check_measurements(database, [a, b]).findings
    repeats = [f for f in found if f.rule_id == "repeat-disagrees"]
    assert {(f.measurement_id, f.severity) for f in repeats} == {(a, "note"), (b, "note")}
    assert "100 K apart" in repeats[0].message  # not compared, and said so
    # 15 K apart without ΔS‡: compared, with 15 K × 10 J/(mol·K) = 0.15 kJ/mol more room
    c = add(database, compound="CV-FAR", method="lineshape", dg="61.1 kJ/mol", dg_t="265 K")
    found = check_measurements(database, [c]).findings
    assert [f for f in found if f.rule_id == "repeat-disagrees" and f.severity != "note"] == []


# ---------------------------------------------------------------- solvents


def test_water_is_h2o_and_dmso_d6_has_its_own_melting_point(database: Database) -> None:
    from registry.record.vocab import SOLVENTS

    table = {name: (formula, mp) for name, formula, _d, mp, _b, _s, _a in SOLVENTS}
    assert table["water"] == ("H2O", 0.0)  # CRC Handbook: 0.00 °C at 1 atm
    assert table["dimethyl sulfoxide-d6"][1] != 18.5  # the parent DMSO's melting point
    # an H2O sample at 1 °C is liquid: no 'frozen' finding
    mid = add(database, solvent="water", t_min="1 °C", t_max="60 °C", method="lineshape")
    assert api.get_measurement(database, mid)["solvent"]["name"] == "water"
    found = check_measurements(database, [mid]).findings
    assert [f for f in found if f.rule_id == "solvent-liquid-range"] == []
    heavy = add(database, solvent="D2O", t_min="1 °C", t_max="60 °C", method="lineshape")
    found = check_measurements(database, [heavy]).findings
    assert [f for f in found if f.rule_id == "solvent-liquid-range"]  # D2O melts at 3.82 °C


# ---------------------------------------------------------------- rates above k_B·T/h


def test_rate_point_above_kbt_over_h_is_an_error(database: Database) -> None:
    limit = KB_H * 300.0  # 6.25×10¹² s⁻¹ at 300 K
    mid = add(database, method="lineshape", rates=[("300 K", f"{2 * limit:.4g} s-1"),
                                                   ("310 K", "50 s-1")])  # fmt: skip
    found = [f for f in check_measurements(database, [mid]).findings
             if f.rule_id == "rate-above-limit"]  # fmt: skip
    (f,) = found
    assert f.recomputed == pytest.approx(limit, rel=1e-9)
    assert f.severity == "error"


def test_find_at_a_common_temperature(database: Database) -> None:
    low = add(database, method="lineshape", smiles="CN(C)C(=O)c1ccccc1", dh="62 kJ/mol",
              ds="-10 J/(mol K)", t_min="280 K", t_max="320 K")  # fmt: skip
    high = add(database, method="lineshape", smiles="CCN(CC)C(=O)c1ccccc1", dh="75 kJ/mol",
               ds="10 J/(mol K)", t_min="340 K", t_max="380 K")  # fmt: skip
    result = api.find(database, smarts="C(=O)N", at="298.15 K", barrier=">= 65 kJ/mol",
                      sort="-barrier")  # fmt: skip
    assert [r["id"] for r in result.rows] == [high]
    row = result.rows[0]
    assert row["dg_at_kj_mol"] == pytest.approx(75.0 - 298.15 * 10.0 / 1000.0)
    assert row["extrapolated"] == "yes"
    every = api.find(database, smarts="C(=O)N", at="25 °C", sort="barrier")
    assert [r["id"] for r in every.rows] == [low, high]
    with pytest.raises(FluxledgerError):
        api.find(database, smarts="C(=O)N", at="-5 K")


def _eyring_k(t: float, dh_kj: float, ds_j: float, kappa: float = 1.0) -> float:
    """k = κ·(k_B·T/h)·exp(ΔS‡/R)·exp(−ΔH‡/RT) (Eyring 1935) with CODATA constants."""
    return kappa * C.k * t / C.h * math.exp(ds_j / C.R) * math.exp(-dh_kj * 1000 / (C.R * t))


@pytest.mark.parametrize(("recorded", "flagged"), [("0.1", False), (None, True)])
def test_the_refit_uses_the_recorded_kappa(
    database: Database, recorded: str | None, flagged: bool
) -> None:
    """Rate points made with κ = 0.1 and ΔH‡ 60 kJ/mol, ΔS‡ −10 J/(mol·K): with κ recorded the
    reported values match the refit; without it the refit's ΔS‡ is lower by R·ln 10 =
    19.1 J/(mol·K) (CODATA R) and the rule says so."""
    rates = [
        (f"{t} K", f"{_eyring_k(t, 60.0, -10.0, 0.1)!r} s-1") for t in (250, 260, 270, 280, 290)
    ]
    mid = api.add_measurement(database, {"method": "lineshape", "compound": "K1", "dh": "60 kJ/mol",
        "ds": "-10 J/(mol K)", "rates": rates, "kappa": recorded})  # fmt: skip
    rules = {f["rule_id"] for f in api.get_measurement(database, mid)["findings"]}
    assert ("activation-refit" in rules) is flagged


def test_repeats_too_far_apart_in_temperature_are_said_not_compared(database: Database) -> None:
    same = {"method": "lineshape", "compound": "R1", "process": "bond-rotation",
            "solvent": "CDCl3"}  # fmt: skip
    low = api.add_measurement(database, {**same, "label": "a", "dg": "60 kJ/mol", "dg_t": "250 K"})
    high = api.add_measurement(database, {**same, "label": "b", "dg": "66 kJ/mol", "dg_t": "320 K"})
    api.check(database)
    notes = [f for f in api.get_measurement(database, high)["findings"]
             if f["rule_id"] == "repeat-disagrees"]  # fmt: skip
    assert [f["severity"] for f in notes] == ["note"]
    assert f"not compared with measurement {low}" in notes[0]["message"]
    assert "70 K apart" in notes[0]["message"]
