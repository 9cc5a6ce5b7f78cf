"""The figure calls of the library (``registry.api.plot_*``, ``build_report``): records returned,
files written, inputs checked before any work, and only what a figure needs imported.

Check values come from the published equations evaluated here with CODATA constants
(scipy.constants), never from the code under test. Demo values are invented.
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import constants as codata

from registry import api
from registry.errors import FluxledgerError, NotFoundError, UnitError, UsageError
from registry.record.entry import EntryInput

#: invented activation parameters; rates made from them are exact Eyring rates
DH_KJ_MOL, DS_J_MOL_K = 64.0, -8.0
TEMPS_K = (263.0, 273.0, 283.0, 293.0, 303.0, 313.0)
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def eyring_k(t_k: float, dh_kj_mol: float = DH_KJ_MOL, ds_j_mol_k: float = DS_J_MOL_K) -> float:
    """k = (k_B·T/h)·exp(ΔS‡/R − ΔH‡/RT) (H. Eyring, J. Chem. Phys. 3, 107 (1935)); CODATA."""
    return (
        codata.k
        * t_k
        / codata.h
        * math.exp(ds_j_mol_k / codata.R - dh_kj_mol * 1000.0 / (codata.R * t_k))
    )


def _with_rates(database, temps=TEMPS_K, label: str = "DEMO-E1") -> int:  # type: ignore[no-untyped-def]
    rates = [(f"{t:g} K", f"{eyring_k(t):.10g} s-1") for t in temps]
    return api.add_measurement(
        database,
        EntryInput(
            method="lineshape",
            compound=label,
            name="N,N-dimethylacetamide",
            smiles="CC(=O)N(C)C",
            process="bond-rotation",
            solvent="toluene-d8",
            field="400 MHz",
            dg="66.4 kJ/mol",
            dg_t="298.15 K",
            rates=rates,
        ),
        check=False,
    )


# ---------------------------------------------------------------- Eyring


def test_eyring_from_a_stored_measurement(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    mid = _with_rates(database)
    drawn = api.plot_eyring(database, measurement_id=mid, out=tmp_path / "e.png")
    assert Path(drawn.file) == tmp_path / "e.png"
    assert (tmp_path / "e.png").read_bytes().startswith(PNG_MAGIC)
    assert drawn.source == f"measurement {mid}"
    assert drawn.title == "DEMO-E1 (N,N-dimethylacetamide)"  # the compound, not a row number
    s = drawn.summary
    assert s.n_points == 6
    # exact Eyring rates: the straight line gives back ΔH‡ and ΔS‡ (to the 10 digits stored)
    assert s.dh_kj_mol == pytest.approx(DH_KJ_MOL, abs=1e-6)
    assert s.ds_j_mol_k == pytest.approx(DS_J_MOL_K, abs=1e-5)
    # ΔG‡ = ΔH‡ − T·ΔS‡ (Gibbs) at 25 °C: 64 + 298.15·0.008 = 66.3852 kJ/mol
    assert s.dg_ref_kj_mol == pytest.approx(66.3852, abs=1e-5)
    assert s.t_ref_k == 298.15
    assert drawn.lines[0].startswith("ΔH‡ = 64.0")
    data = drawn.as_dict()
    assert data["file"] == str(tmp_path / "e.png") and data["n_points"] == 6
    assert data["energy_unit"] == "kJ/mol" and data["lines"] == list(drawn.lines)
    json.dumps(data)  # a record a notebook or the CLI can print as JSON


def test_eyring_from_points_texts_tuples_and_a_file_agree(tmp_path: Path) -> None:
    texts = [f"{t - 273.15:.2f} °C, {eyring_k(t):.10g} s-1" for t in TEMPS_K]
    tuples = [(t, eyring_k(t)) for t in TEMPS_K]
    table = tmp_path / "rates.csv"
    table.write_text(
        "T (K),k (s-1)\n" + "".join(f"{t},{eyring_k(t):.10g}\n" for t in TEMPS_K), encoding="utf-8"
    )
    from_texts = api.plot_eyring(points=texts, out=tmp_path / "a.svg", t_ref="25 °C")
    from_tuples = api.plot_eyring(points=tuples, out=tmp_path / "b.svg", t_ref=298.15)
    from_file = api.plot_eyring(file=table, out=tmp_path / "c.svg", energy_unit="kcal/mol")
    for drawn in (from_texts, from_tuples, from_file):
        assert drawn.summary.dh_kj_mol == pytest.approx(DH_KJ_MOL, abs=1e-5)
        assert drawn.summary.dg_ref_kj_mol == pytest.approx(66.3852, abs=1e-4)
    assert from_texts.source == "points" and from_file.source == str(table)
    assert from_file.title == "rates.csv"
    # kcal/mol on the figure: the thermochemical calorie, 4.184 J (NIST SP 811 (2008) B.8)
    shown = re.match(r"ΔH‡ = ([\d.]+) ± [\d.]+ kcal/mol$", from_file.lines[0])
    assert shown and float(shown.group(1)) == pytest.approx(DH_KJ_MOL / 4.184, rel=1e-9)
    assert "kcal/mol" in (tmp_path / "c.svg").read_text(encoding="utf-8")


def test_eyring_with_k_errors_weights_the_fit(tmp_path: Path) -> None:
    # σ_k = 5 % of k on every point: a weighted fit whose band uses z(0.975) (normal quantile)
    points = [(t, eyring_k(t), 0.05 * eyring_k(t)) for t in TEMPS_K]
    drawn = api.plot_eyring(points=points, out=tmp_path / "w.svg")
    assert drawn.summary.band
    assert drawn.summary.dh_kj_mol == pytest.approx(DH_KJ_MOL, abs=1e-6)
    # σ(ΔH‡) = R·σ(slope), σ(slope)² = 1/Σw(x − x̄_w)² with w = 1/σ_y², σ_y = σ_k/k = 0.05
    x = 1.0 / np.array(TEMPS_K)
    sxx = float(((x - x.mean()) ** 2).sum()) / 0.05**2
    assert drawn.summary.dh_err_kj_mol == pytest.approx(codata.R * math.sqrt(1 / sxx) / 1e3)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({}, "give one source of rate points: measurement_id, points or file"),
        (
            {"measurement_id": 1, "points": ["300 K, 1 s-1", "310 K, 2 s-1"]},
            "give one source of rate points: measurement_id, points or file "
            "(got measurement_id, points)",
        ),
        ({"measurement_id": 1}, "measurement_id 1: needs an open registry (database)"),
        ({"points": ["300 K, 1 s-1"]}, "points: 1 rate point(s); an Eyring plot needs at least 2"),
        (
            {"points": [(300.0, 1.0, 0.1), (310.0, 2.0)]},
            "points: σk is given for some points but not all; give all or none",
        ),
        ({"points": [(300.0,), (310.0, 2.0)]}, "points[1] (300.0,): give (T in K, k in s⁻¹)"),
        (
            {"points": [(300.0, 1.0), (310.0, 2.0)], "sheet": "Sheet1"},
            "sheet: applies to a spreadsheet file only",
        ),
        (
            {"points": [(300.0, 1.0), (310.0, 2.0)], "energy_unit": "eV"},
            "energy_unit 'eV': use kJ/mol or kcal/mol",
        ),
    ],
)
def test_eyring_bad_calls_are_usage_errors(tmp_path: Path, kwargs, message) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "x.png"
    with pytest.raises(UsageError) as caught:
        api.plot_eyring(out=out, **kwargs)
    assert str(caught.value).startswith(message)
    assert not out.exists()


def test_eyring_output_is_checked_before_any_work(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    mid = _with_rates(database)
    with pytest.raises(UsageError, match=r"x\.jpg: write a \.png, \.svg or \.pdf file"):
        api.plot_eyring(database, measurement_id=mid, out=tmp_path / "x.jpg")
    missing = tmp_path / "no-such-folder" / "x.png"
    with pytest.raises(UsageError, match=r"folder .*no-such-folder does not exist"):
        api.plot_eyring(database, measurement_id=mid, out=missing)
    # the output is checked first: a bad suffix wins over a measurement that does not exist
    with pytest.raises(UsageError, match=r"write a \.png, \.svg or \.pdf"):
        api.plot_eyring(database, measurement_id=999, out=tmp_path / "x.gif")


def test_eyring_data_problems(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "x.svg"
    with pytest.raises(NotFoundError, match="no measurement with id 999"):
        api.plot_eyring(database, measurement_id=999, out=out)
    one = _with_rates(database, temps=(300.0,), label="DEMO-E2")
    with pytest.raises(UsageError, match=f"measurement {one} has 1 rate point"):
        api.plot_eyring(database, measurement_id=one, out=out)
    with pytest.raises(NotFoundError, match=r"no-such\.csv: no such file"):
        api.plot_eyring(file=tmp_path / "no-such.csv", out=out)
    with pytest.raises(UnitError, match=r"^t_ref: cannot read 'warm'"):
        api.plot_eyring(points=[(300.0, 1.0), (310.0, 2.0)], out=out, t_ref="warm")
    with pytest.raises(FluxledgerError):  # k must be > 0: the kinetics engine refuses it
        api.plot_eyring(points=[(300.0, -1.0), (310.0, 2.0)], out=out)
    assert not out.exists()


# ---------------------------------------------------------------- coalescence


def _tc_check(tc_k: float, dnu_hz: float, dg_kj_mol: float) -> None:
    """At Tc the Eyring rate equals k_c = π·Δν/√2 (Gutowsky and Holm, J. Chem. Phys. 25, 1228
    (1956))."""
    k_eyring = codata.k * tc_k / codata.h * math.exp(-dg_kj_mol * 1000.0 / (codata.R * tc_k))
    assert k_eyring == pytest.approx(math.pi * dnu_hz / math.sqrt(2.0), rel=1e-8)


def test_coalescence_without_a_registry(tmp_path: Path) -> None:
    drawn = api.plot_coalescence(out=tmp_path / "c.png", barrier=65.0, dnu=0.25)
    assert (tmp_path / "c.png").read_bytes().startswith(PNG_MAGIC)
    assert drawn.field_range_mhz == (60.0, 1000.0)
    by_field = {p["field_mhz"]: p for p in drawn.predicted}
    assert sorted(by_field) == [300.0, 400.0, 500.0, 600.0, 800.0]
    for f, p in by_field.items():
        _tc_check(p["tc_k"], 0.25 * f, 65.0)  # Δν(Hz) = Δν(ppm)·field(MHz)
        assert p["tc_c"] == pytest.approx(p["tc_k"] - 273.15)
    assert drawn.tc_range_k[0] < by_field[300.0]["tc_k"] < drawn.tc_range_k[1]
    assert drawn.observed == () and drawn.solvent is None


def test_coalescence_texts_in_any_unit(tmp_path: Path) -> None:
    # 15 kcal/mol = 62.76 kJ/mol (thermochemical calorie, NIST SP 811 (2008) B.8); 30 Hz
    # measured at 300 MHz is 0.1 ppm
    drawn = api.plot_coalescence(
        out=tmp_path / "c.svg",
        barrier="15 ± 0.1 kcal/mol",
        dnu="30 Hz",
        dnu_field="300 MHz",
        min_field="200 MHz",
        max_field="0.6 GHz",
    )
    assert drawn.dg_kj_mol == pytest.approx(62.76)
    assert drawn.dg_err_kj_mol == pytest.approx(0.4184)
    assert drawn.dnu_ppm == pytest.approx(0.1)
    assert drawn.field_range_mhz == pytest.approx((200.0, 600.0))
    _tc_check(drawn.predicted[0]["tc_k"], 0.1 * 300.0, 62.76)


def test_coalescence_cautions(tmp_path: Path, database) -> None:  # type: ignore[no-untyped-def]
    # ΔG‡ 80 kJ/mol coalesces far above dichloromethane's boiling point, 40 °C (CRC Handbook):
    # the pressure-rated sealed tube caution, and the line that defers to the facility's rules
    hot = api.plot_coalescence(
        database, out=tmp_path / "hot.svg", barrier=80.0, dnu=0.5, solvent="CD2Cl2"
    )
    assert hot.solvent is not None and hot.solvent["name"] == "dichloromethane-d2"
    assert any("pressure-rated sealed NMR tube" in c for c in hot.cautions)
    assert hot.cautions[-1].startswith("Follow your facility's safety rules")
    assert "pressure-rated sealed tube" in (tmp_path / "hot.svg").read_text(encoding="utf-8")
    # 40 kJ/mol with Δν 0.1 ppm coalesces near −75 °C: cooling with liquid nitrogen
    cold = api.plot_coalescence(out=tmp_path / "cold.svg", barrier=40.0, dnu=0.1)
    assert cold.tc_range_k[1] < 233.15
    assert any("cryogenic cooling" in c for c in cold.cautions)
    unknown = api.plot_coalescence(
        database, out=tmp_path / "u.svg", barrier=60.0, dnu=0.2, solvent="moonshine"
    )
    assert unknown.notes == (
        "solvent 'moonshine' is not in the solvent table; no liquid range drawn",
    )


def test_coalescence_from_a_measurement(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    mid = api.add_measurement(
        database,
        EntryInput(
            method="coalescence",
            compound="DEMO-C1",
            smiles="CN(C)C=O",
            process="bond-rotation",
            solvent="CDCl3",
            field="400 MHz",
            tc="45 °C",
            dnu="0.2 ppm",
            dg="66.0 ± 0.4 kJ/mol",
        ),
        check=False,
    )
    drawn = api.plot_coalescence(database, out=tmp_path / "m.svg", measurement_id=mid)
    assert drawn.dg_kj_mol == pytest.approx(66.0) and drawn.dg_err_kj_mol == pytest.approx(0.4)
    assert drawn.dnu_ppm == pytest.approx(0.2)
    assert drawn.solvent is not None and drawn.solvent["name"] == "chloroform-d"
    assert drawn.observed == (
        {
            "measurement_id": mid,
            "compound": "DEMO-C1",
            "field_mhz": 400.0,
            "tc_k": pytest.approx(318.15),
            "dnu_ppm": pytest.approx(0.2),
            "flagged": False,  # added unchecked: no finding
        },
    )
    svg = (tmp_path / "m.svg").read_text(encoding="utf-8")
    assert "DEMO-C1" in svg and f"#{mid}" not in svg  # the point says which compound
    by_name = api.plot_coalescence(database, out=tmp_path / "n.svg", barrier=66.0, dnu=0.2,
                                   compound="c1")  # fmt: skip
    assert [o["measurement_id"] for o in by_name.observed] == [mid]  # case-insensitive match


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"dnu": 0.2}, "barrier: give ΔG‡, or a measurement with a stored ΔG‡"),
        ({"barrier": 60.0}, "dnu: give Δν, or a measurement with a stored coalescence Δν"),
        ({"barrier": 60.0, "dnu": -0.2}, "dnu -0.2: Δν must be > 0 (ppm)"),
        (
            {"barrier": 60.0, "dnu": "25 Hz"},
            "dnu '25 Hz': a Δν in Hz holds at one field only; give the field it was measured at",
        ),
        (
            {"barrier": 60.0, "dnu": 0.2, "min_field": 500.0, "max_field": 400.0},
            "min_field 500 MHz must be above 0 and below max_field (400 MHz)",
        ),
        ({"barrier": 60.0, "dnu": 0.2, "measurement_id": 3}, "measurement_id: looking it up"),
        ({"barrier": 60.0, "dnu": 0.2, "solvent": "CDCl3"}, "solvent: looking it up needs an"),
        ({"barrier": 60.0, "dnu": 0.2, "energy_unit": "K"}, "energy_unit 'K': use kJ/mol"),
    ],
)
def test_coalescence_bad_calls(tmp_path: Path, kwargs, message) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "x.svg"
    with pytest.raises(UsageError) as caught:
        api.plot_coalescence(out=out, **kwargs)
    assert str(caught.value).startswith(message)
    assert not out.exists()


def test_coalescence_unknown_measurement(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(NotFoundError, match="no measurement with id 42"):
        api.plot_coalescence(database, out=tmp_path / "x.svg", measurement_id=42)
    with pytest.raises(UnitError, match=r"^barrier: cannot read 'high'"):
        api.plot_coalescence(out=tmp_path / "x.svg", barrier="high", dnu=0.2)


# ---------------------------------------------------------------- overview and report


def test_overview(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(UsageError, match="no barriers"):
        api.plot_overview(database, out=tmp_path / "empty.svg", by="kind")
    _with_rates(database)
    second = api.add_measurement(
        database,
        EntryInput(method="coalescence", compound="DEMO-O2", smiles="C1CCCCC1",
                   process="ring-inversion", dg="43 kJ/mol"),
        check=False,
    )  # fmt: skip
    drawn = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
    assert drawn.grouped_by == "process kind"
    assert drawn.groups == (
        {"group": "bond-rotation", "n": 1, "min_kj_mol": 66.4, "max_kj_mol": 66.4, "flagged": 0},
        {"group": "ring-inversion", "n": 1, "min_kj_mol": 43.0, "max_kj_mol": 43.0, "flagged": 0},
    )
    assert (drawn.include_flagged, drawn.left_out_flagged) == (False, 0)
    api.retract_measurement(database, second, "demo: retracted")
    shown = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
    assert [g["group"] for g in shown.groups] == ["bond-rotation"]
    every = api.plot_overview(database, out=tmp_path / "o.svg", by="kind", include_retracted=True)
    assert len(every.groups) == 2
    with pytest.raises(UsageError, match="by 'colour': use kind, motif or auto"):
        api.plot_overview(database, out=tmp_path / "o.svg", by="colour")
    with pytest.raises(UsageError, match=r"write a \.png, \.svg or \.pdf"):
        api.plot_overview(database, out=tmp_path / "o.eps", by="kind")


def test_build_report_returns_what_it_wrote(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    mid = _with_rates(database)
    result = api.build_report(database, tmp_path / "site", title="Demo")
    assert result.measurements == 1 and result.compound_pages == 1 and result.eyring_plots == 1
    assert (tmp_path / "site" / "plots" / f"eyring-m{mid}.svg").exists()
    assert result.as_dict()["index"] == str(tmp_path / "site" / "index.html")
    with pytest.raises(UsageError, match="is not a folder"):
        api.build_report(database, tmp_path / "site" / "index.html")


# ---------------------------------------------------------------- what a plot imports


def test_a_plot_of_stored_data_imports_only_what_it_needs(db_path: Path, tmp_path: Path) -> None:
    """Plotting stored rate points in kJ/mol needs numpy and matplotlib's object API: not the
    unit registry (pint), pandas, SQLAlchemy, RDKit or pyplot (see PERFORMANCE.md)."""
    database = api.open_registry(str(db_path))
    mid = _with_rates(database)
    database.close()
    code = (
        "import sys\n"
        "from registry import api\n"
        f"database = api.open_registry({str(db_path)!r})\n"
        f"api.plot_eyring(database, measurement_id={mid}, out={str(tmp_path / 'i.png')!r})\n"
        "heavy = ('pint', 'pandas', 'sqlalchemy', 'rdkit', 'matplotlib.pyplot')\n"
        "print(','.join(m for m in heavy if m in sys.modules))\n"
        "print('matplotlib' in sys.modules)\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True
    )
    loaded, matplotlib_used = done.stdout.splitlines()
    assert loaded == ""
    assert matplotlib_used == "True"  # the check can see a module that was imported
    assert (tmp_path / "i.png").read_bytes().startswith(PNG_MAGIC)
