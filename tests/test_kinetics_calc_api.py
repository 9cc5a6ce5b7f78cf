"""``registry.api.calc_*``: the bench calculations as library calls (texts or floats in, records out).

Expected values are computed here from the published equations with CODATA constants
(scipy.constants), never taken from the code under test.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as codata

from registry import api
from registry.errors import FileFormatError, UnitError, UsageError
from registry.kinetics import KineticsInputError

KB_H = codata.Boltzmann / codata.Planck
R_KJ = codata.R / 1000
KCAL = 4.184  # thermochemical calorie, kJ (NIST SP 811 (2008) B.8)


def eyring_dg(k: float, t: float) -> float:
    """ΔG‡ = RT·ln(k_B·T/(h·k)) in kJ/mol (H. Eyring, J. Chem. Phys. 3, 107 (1935))."""
    return R_KJ * t * math.log(KB_H * t / k)


def eyring_k(dg: float, t: float) -> float:
    return KB_H * t * math.exp(-dg / (R_KJ * t))


# --- coalescence -------------------------------------------------------------------------------


def test_coalescence_texts_against_gutowsky_holm() -> None:
    res = api.calc_coalescence(tc="-12 °C", dnu="0.045 ppm", field="600 MHz", tc_err="1 K")
    k_c = math.pi * 27.0 / math.sqrt(2)  # Gutowsky & Holm, J. Chem. Phys. 25, 1228 (1956)
    assert res.k_c_per_s == pytest.approx(k_c)
    assert res.dg.kj_mol == pytest.approx(eyring_dg(k_c, 261.15), rel=1e-12)
    assert res.dg.kcal_mol == pytest.approx(res.dg.kj_mol / KCAL, rel=1e-12)
    assert res.tc.celsius == pytest.approx(-12.0)
    # ∂ΔG‡/∂Tc = ΔG‡/Tc + R (differentiate RT·ln(k_B·T/(h·k_c)) by T), times σTc = 1 K
    assert res.dg.err_kj_mol == pytest.approx(res.dg.kj_mol / 261.15 + R_KJ, rel=1e-9)
    assert res.field_mhz == 600.0 and res.method == "equal populations (Gutowsky–Holm)"
    assert res.notes == ("no Δν uncertainty given: taken as 0",)


def test_coalescence_floats_are_canonical_units() -> None:
    text = api.calc_coalescence(tc="300 K", dnu="100 Hz", tc_err="1 K", dnu_err="2 Hz")
    numbers = api.calc_coalescence(tc=300.0, dnu=100, tc_err=1.0, dnu_err=2.0)
    assert numbers.to_dict() == text.to_dict()
    # ∂ΔG‡/∂Δν = −RT/Δν, times σΔν = 2 Hz
    assert numbers.dg_err_from_dnu_kj_mol == pytest.approx(R_KJ * 300.0 / 100.0 * 2.0)


def test_coalescence_default_tc_error_is_said() -> None:
    res = api.calc_coalescence(tc=250.0, dnu=40.0)
    assert res.tc.err_k == 2.0
    assert "±2 K assumed" in res.notes[0]


def test_coalescence_coupled_ab() -> None:
    res = api.calc_coalescence(tc="300 K", dnu="20 Hz", j="12 Hz", j_err=0.5)
    # π·√(Δν² + 6J²)/√2 (Kurland, Rubin, Wise, J. Chem. Phys. 40, 2426 (1964))
    k_c = math.pi * math.sqrt(20.0**2 + 6 * 12.0**2) / math.sqrt(2)
    assert res.k_c_per_s == pytest.approx(k_c)
    assert res.coupled and res.method.startswith("coupled AB")
    # ∂ΔG‡/∂J = −RT·6J/(Δν² + 6J²), times σJ = 0.5 Hz
    assert res.dg_err_from_j_kj_mol == pytest.approx(R_KJ * 300 * 72 / (400 + 864) * 0.5)


@pytest.mark.parametrize("ratio", ["3", "3:1", "75:25", 3.0, 3])
def test_coalescence_unequal_ratio_forms(ratio: object) -> None:
    res = api.calc_coalescence(tc="300 K", dnu="100 Hz", ratio=ratio)  # type: ignore[arg-type]
    assert res.ratio == pytest.approx(3.0)
    # ΔG‡(A→B) − ΔG‡(B→A) = RT·ln(pA/pB) (detailed balance)
    diff = res.dg_major_to_minor.kj_mol - res.dg_minor_to_major.kj_mol
    assert diff == pytest.approx(R_KJ * 300.0 * math.log(3.0))
    # Shanan-Atidi & Bar-Eli, J. Phys. Chem. 74, 961 (1970): Δp = ((X² − 2)/3)^(3/2)/X
    dp = 0.5
    x = res.x
    assert ((x * x - 2) / 3) ** 1.5 / x == pytest.approx(dp, rel=1e-12)
    tau = x / (2 * math.pi * 100.0)
    assert res.k_major_to_minor_per_s == pytest.approx(0.25 / tau)
    assert set(res.to_dict()) >= {"k_major_to_minor_per_s", "dg_minor_to_major_kcal_mol"}


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"tc": "0 K", "dnu": "20 Hz"}, UnitError, "tc: cannot read '0 K': must be > 0"),
        ({"tc": 0.0, "dnu": 20.0}, UnitError, "tc: cannot read '0.0': must be > 0"),
        ({"tc": -5.0, "dnu": 20.0}, UnitError, "tc: cannot read '-5.0': must be > 0"),
        ({"tc": math.nan, "dnu": 20.0}, UnitError, "tc: cannot read 'nan': number is not finite"),
        ({"tc": "300 K", "dnu": "0 Hz"}, UnitError, "dnu: cannot read '0 Hz': must be > 0"),
        (
            {"tc": "300 K", "dnu": "0.1 ppm"},
            UnitError,
            "dnu: cannot read '0.1 ppm': a value in ppm needs the spectrometer frequency (MHz)",
        ),
        (
            {"tc": "300 K", "dnu": "20 Hz", "field": 0},
            UnitError,
            "field: cannot read '0': the spectrometer frequency must be > 0 MHz",
        ),
        ({"tc": "300 kg", "dnu": "20 Hz"}, UnitError, "tc: cannot read '300 kg': kg is not"),
        ({"tc": [300], "dnu": "20 Hz"}, UnitError, "tc: cannot read '[300]': expected a number"),
        ({"tc": True, "dnu": "20 Hz"}, UnitError, "tc: cannot read 'True': expected a number"),
        (
            {"tc": "300 K", "dnu": "20 Hz", "tc_err": "-1 K"},
            KineticsInputError,
            "tc_err_k: must be ≥ 0",
        ),
        (
            {"tc": "300 K", "dnu": "20 Hz", "ratio": "1:2:3"},
            UnitError,
            "ratio: cannot read '1:2:3': write the ratio as '3' or '75:25'",
        ),
        (
            {"tc": "300 K", "dnu": "20 Hz", "ratio": 0.5},
            UnitError,
            "ratio: cannot read '0.5': the ratio is major/minor and must be ≥ 1",
        ),
        (
            {"tc": "300 K", "dnu": "20 Hz", "ratio": "0:1"},
            UnitError,
            "ratio: cannot read '0:1': populations must be > 0",
        ),
        (
            {"tc": "300 K", "dnu": "20 Hz", "ratio": 2, "j": 5},
            UsageError,
            "ratio (unequal populations) and j (coupled AB) cannot be combined",
        ),
        ({"tc": "300 K", "dnu": "20 Hz", "kappa": 0.0}, KineticsInputError, "kappa: must be > 0"),
    ],
)
def test_coalescence_bad_input_names_the_field(
    kwargs: dict, error: type[Exception], message: str
) -> None:
    with pytest.raises(error) as info:
        api.calc_coalescence(**kwargs)
    assert message in str(info.value)
    assert "--" not in str(info.value)  # library errors never name CLI flags


# --- Eyring ------------------------------------------------------------------------------------

TEMPS = (280.0, 290.0, 300.0, 310.0, 320.0, 330.0)


def _points(dh: float = 70.0, ds: float = -12.0) -> list[tuple[float, float]]:
    return [(t, eyring_k(dh - t * ds / 1000, t)) for t in TEMPS]


def test_eyring_from_number_tuples_recovers_the_parameters() -> None:
    res = api.calc_eyring(_points(), t=["25 °C", 350.0])
    assert res.dh.kj_mol == pytest.approx(70.0, abs=1e-8)
    assert res.ds.j_mol_k == pytest.approx(-12.0, abs=1e-7)
    assert res.ds.eu == pytest.approx(-12.0 / 4.184, abs=1e-7)  # e.u. = cal mol⁻¹ K⁻¹
    assert [b.t_k for b in res.dg_at] == pytest.approx([298.15, 350.0])
    assert res.dg_at[1].dg.kj_mol == pytest.approx(70.0 + 350.0 * 12.0 / 1000, abs=1e-8)
    assert res.n_points == 6 and not res.weighted
    # Arrhenius: Ea = ΔH‡ + R·T at the middle of 1/T, for noise-free Eyring data only to
    # about the curvature of ln k in 1/T over the range (K. J. Laidler, Chemical Kinetics)
    t_mid = 1 / (sum(1 / t for t in TEMPS) / len(TEMPS))
    assert res.ea.kj_mol == pytest.approx(70.0 + R_KJ * t_mid, abs=0.02)
    assert res.t_min.celsius == pytest.approx(280.0 - 273.15)


def test_eyring_texts_equal_numbers() -> None:
    texts = [f"{t} K, {k!r}" for t, k in _points()]
    assert api.calc_eyring(texts).to_dict() == api.calc_eyring(_points()).to_dict()
    mixed = [(f"{t - 273.15:.2f} °C", f"{k * 60!r} min-1") for t, k in _points()]
    res = api.calc_eyring(mixed)
    assert res.dh.kj_mol == pytest.approx(70.0, abs=1e-6)


def test_eyring_t_quantile_is_the_student_t() -> None:
    pts = _points()
    pts[2] = (pts[2][0], pts[2][1] * 1.1)  # scatter, so there is something to estimate
    res = api.calc_eyring(pts)
    # t(0.975, 4): 2.776 in every t table (e.g. CRC Standard Probability and Statistics Tables)
    assert res.ci95_factor == pytest.approx(2.776, abs=5e-4)
    weighted = api.calc_eyring([(t, k, 0.05 * k) for t, k in pts])
    assert weighted.weighted
    assert weighted.ci95_factor == pytest.approx(1.959964, abs=1e-6)  # normal 97.5 % point


def test_eyring_from_a_file_and_points(tmp_path: Path) -> None:
    path = tmp_path / "rates.csv"
    lines = ["T (K),k (s-1)"] + [f"{t},{k!r}" for t, k in _points()[:4]]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    res = api.calc_eyring(_points()[4:], file=str(path))
    assert res.n_points == 6
    assert res.dh.kj_mol == pytest.approx(70.0, abs=1e-7)


@pytest.mark.parametrize(
    ("points", "kwargs", "error", "message"),
    [
        (None, {}, UsageError, "give a table file, or rate points 'T, k'"),
        ([], {}, UsageError, "give a table file, or rate points 'T, k'"),
        (["300 K, 0.01", "bad"], {}, UsageError, "point 2: cannot read 'bad'"),
        (["300 K, 0.01", "50, 0.02"], {}, UnitError, "point 2: cannot read '50, 0.02': 50 K?"),
        ([(300.0, 0.01), (310.0,)], {}, UsageError, "point 2: give (T, k) or (T, k, σk)"),
        ([(300.0, 0.01), (310.0, -1.0)], {}, UnitError, "a rate constant must be > 0"),
        ([(300.0, 0.01), (0.0, 0.1)], {}, UnitError, "point 2: cannot read '0.0': must be above"),
        (
            [(300.0, 0.01, 0.001), (310.0, 0.02)],
            {},
            UsageError,
            "σk is given for some points but not all",
        ),
        ([(300.0, 0.01), (300.0, 0.02)], {}, KineticsInputError, "all points are at the same"),
        (["300 K, 0.01", "310 K, 0.02"], {"t": "hot"}, UnitError, "t: cannot read 'hot'"),
        (["300 K, 0.01", "310 K, 0.02"], {"sheet": "S1"}, UsageError, "a sheet needs"),
    ],
)
def test_eyring_bad_input(
    points: list | None, kwargs: dict, error: type[Exception], message: str
) -> None:
    with pytest.raises(error) as info:
        api.calc_eyring(points, **kwargs)
    assert message in str(info.value)
    assert "--" not in str(info.value)


def test_eyring_sheet_on_a_text_table(tmp_path: Path) -> None:
    path = tmp_path / "r.csv"
    path.write_text("T (K),k (s-1)\n300,0.01\n310,0.02\n", encoding="utf-8")
    with pytest.raises(UsageError, match="only spreadsheets have sheets"):
        api.calc_eyring(file=str(path), sheet="Sheet1")
    with pytest.raises(FileFormatError):
        api.calc_eyring(file=str(tmp_path))


# --- rate, half-life, plan ---------------------------------------------------------------------


def test_rate_from_dg_and_from_dh_ds() -> None:
    res = api.calc_rate(t=["25 °C", 373.15], dg="21 kcal/mol")
    k25 = eyring_k(21 * KCAL, 298.15)
    assert res.rows[0].k_per_s == pytest.approx(k25, rel=1e-12)
    assert res.rows[0].half_life.seconds == pytest.approx(math.log(2) / k25)
    assert res.rows[1].t.celsius == pytest.approx(100.0)
    pair = api.calc_rate(t=310.0, dh=80.0, ds=-10.0, pair=True)
    k = eyring_k(80.0 + 310.0 * 10.0 / 1000, 310.0)
    assert pair.rows[0].half_life.seconds == pytest.approx(math.log(2) / (2 * k))
    assert pair.to_dict()["pair"] is True


def test_durations_in_the_largest_unit() -> None:
    # a barrier whose 25 °C half-life is one Julian year (365.25 d; IAU / NIST SP 811 B.8)
    year = 365.25 * 86400
    dg = eyring_dg(math.log(2) / year, 298.15)
    row = api.calc_rate(dg=dg * 1.0001).rows[0]  # a little more than a year
    assert row.half_life.unit == "years" and row.half_life.value == pytest.approx(1.0, rel=0.01)
    short = api.calc_rate(dg="40 kJ/mol").rows[0].half_life
    assert short.unit == "s" and short.value == short.seconds
    hours = api.calc_rate(dg=eyring_dg(math.log(2) / 7200.0, 298.15)).rows[0].half_life
    assert (hours.unit, round(hours.value, 9)) == ("h", 2.0)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({}, "give the barrier: dg, or both dh and ds"),
        ({"dh": 80.0}, "give the barrier: dg, or both dh and ds"),
        ({"dg": 80.0, "ds": 1.0}, "give dg, or dh with ds, not both"),
    ],
)
def test_rate_barrier_usage_errors(kwargs: dict, message: str) -> None:
    with pytest.raises(UsageError) as info:
        api.calc_rate(**kwargs)
    assert str(info.value) == message


def test_rate_unit_errors_name_the_field() -> None:
    with pytest.raises(UnitError, match=r"^dg: cannot read '80 kJ'"):
        api.calc_rate(dg="80 kJ")
    with pytest.raises(UnitError, match=r"^ds: cannot read '5 kJ/mol'"):
        api.calc_rate(dh="80 kJ/mol", ds="5 kJ/mol")
    with pytest.raises(UnitError, match=r"^t: cannot read '-500 °C': below absolute zero"):
        api.calc_rate(dg=80.0, t="-500 °C")


def test_halflife_oki_and_cautions() -> None:
    # M. Ōki, Top. Stereochem. 14, 1 (1983) (from memory): racemization t½ = 1000 s at 300 K
    # for ΔG‡ ≈ 93.3 kJ/mol; here checked exactly against ln2/(2k) = 1000 s
    res = api.calc_halflife(target="1000 s", dg=93.3, pair=True)
    assert math.log(2) / (2 * eyring_k(93.3, res.t.k)) == pytest.approx(1000.0, rel=1e-9)
    assert res.cautions == ()
    hot = api.calc_halflife(target="10 min", dg="110 kJ/mol", solvent_bp="61 °C")
    text = " ".join(hot.cautions)
    assert "pressure-rated sealed NMR tube" in text
    assert "Follow your facility's safety rules and local regulations" in text
    cold = api.calc_halflife(target="1 h", dg="50 kJ/mol", solvent_mp="-64 °C")
    assert any("liquid nitrogen" in c for c in cold.cautions)
    assert any("below the solvent's melting point" in c for c in cold.cautions)


def test_halflife_errors() -> None:
    with pytest.raises(UnitError, match=r"^target: cannot read '0 s': a half-life must be > 0"):
        api.calc_halflife(target="0 s", dg=90.0)
    with pytest.raises(UnitError, match=r"^target: cannot read '5 K'"):
        api.calc_halflife(target="5 K", dg=90.0)
    with pytest.raises(UsageError, match="no positive temperature"):
        api.calc_halflife(target="1 h", dh=-5.0, ds=-50.0)


def test_plan_per_field_and_cautions() -> None:
    res = api.calc_plan(dnu="0.15 ppm", field=["60", 400.0], dg="21 kcal/mol", solvent_bp="61 °C")
    assert [f.field_mhz for f in res.fields] == [60.0, 400.0]
    assert [f.dnu_hz for f in res.fields] == pytest.approx([9.0, 60.0])
    for f in res.fields:  # at Tc the Eyring rate equals k_c = πΔν/√2
        assert eyring_k(21 * KCAL, f.tc.k) == pytest.approx(math.pi * f.dnu_hz / math.sqrt(2))
    assert "above solvent bp: sealed tube" in res.fields[0].flags
    assert any("pressure-rated sealed NMR tube" in c for c in res.cautions)
    assert res.atropisomer_class == 2
    assert res.to_dict()["fields"][1]["field_MHz"] == 400.0


def test_plan_hz_and_errors() -> None:
    res = api.calc_plan(dnu=25.0, field=400, dh="60 kJ/mol", ds="-20 e.u.", t=233.15)
    assert res.fields[0].dnu_hz == 25.0 and res.t.celsius == pytest.approx(-40.0)
    with pytest.raises(UsageError, match="a Δν in Hz belongs to one field"):
        api.calc_plan(dnu="25 Hz", field=[400, 600], dg=60.0)
    with pytest.raises(UnitError, match=r"^field: cannot read '-1'"):
        api.calc_plan(dnu="0.1 ppm", field="-1", dg=60.0)
    with pytest.raises(UnitError, match=r"^dnu: cannot read '3 K'"):
        api.calc_plan(dnu="3 K", dg=60.0)


def test_records_are_frozen_and_json_ready() -> None:
    res = api.calc_coalescence(tc=300.0, dnu=50.0)
    with pytest.raises(AttributeError):
        res.dnu_hz = 1.0  # type: ignore[misc]
    json.dumps(res.to_dict())
    json.dumps(api.calc_plan(dnu="0.2 ppm", dg=70.0).to_dict())


def test_fast_paths_import_no_scipy_submodule_and_no_pandas() -> None:
    # the everyday calculations must not pay for scipy.stats/optimize/special or pandas
    code = (
        "import sys\n"
        "from registry import api\n"
        "light = sorted(m for m in ('numpy', 'pint', 'registry.kinetics') if m in sys.modules)\n"
        "api.calc_coalescence(tc='-12 °C', dnu='0.045 ppm', field=600)\n"
        "api.calc_eyring(['280 K, 0.002', '290 K, 0.006', '300 K, 0.02'], t=['25 °C'])\n"
        "api.calc_halflife(target='10 min', dg='90 kJ/mol')\n"
        "api.calc_plan(dnu='0.1 ppm', dg='60 kJ/mol')\n"
        "heavy = sorted(m for m in sys.modules if m.startswith(('scipy.', 'pandas'))\n"
        "               and m.split('.')[1:2] not in (['_lib'], ['version'], ['__config__'],\n"
        "               ['_distributor_init'], ['_distributor_init_local'], ['_cyutility']))\n"
        "print(light, heavy)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert out.stdout.strip() == "[] []"


@settings(max_examples=60, deadline=None)
@given(
    tc=st.floats(min_value=120.0, max_value=480.0),
    dnu=st.floats(min_value=0.5, max_value=5000.0),
    field=st.sampled_from([60.0, 400.0, 600.0]),
)
def test_texts_and_canonical_numbers_agree(tc: float, dnu: float, field: float) -> None:
    ppm = f"{dnu / field!r} ppm"
    text = api.calc_coalescence(tc=f"{tc - 273.15!r} °C", dnu=ppm, field=f"{field!r} MHz")
    number = api.calc_coalescence(tc=tc, dnu=dnu, field=field)
    assert text.tc.k == pytest.approx(tc, rel=1e-12)
    assert text.dnu_hz == pytest.approx(dnu, rel=1e-12)
    k_c = math.pi * dnu / math.sqrt(2)  # Gutowsky–Holm
    for res in (text, number):
        assert res.dg.kj_mol == pytest.approx(eyring_dg(k_c, tc), rel=1e-9)
