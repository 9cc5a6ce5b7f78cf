"""A group's own workbook, as groups write them, imports without a mapping file.

The workbook (invented data: the group and its compounds' numbers are made up) has no method
column, mixed units (a unit in the header, another written in a cell), the header spellings of
issue 16 (``Δδ (ppm)``, ``Freq / MHz``, ``Nucl.``, ``T for dG (K)``, ``Lit / DOI``, ``E:Z``),
process and nucleus texts as chemists write them, unknown and misspelt solvents, and a rates
sheet. Written as real .xlsx and .csv files.
"""

from __future__ import annotations

import re
from pathlib import Path
from typing import Any

import pytest
from test_io_import import write_csv, write_xlsx

from registry import api
from registry.api import import_table
from registry.errors import ImportRowError, UsageError
from registry.storage.database import Database

#: thermochemical calorie, J (NIST SP 811 (2008), B.8: 1 cal_th = 4.184 J)
CAL = 4.184
#: T/K = t/°C + 273.15 (NIST SP 811 (2008), 4.2.1.1)
ZERO_C = 273.15
#: 13C observe frequency / 1H frequency (IUPAC Ξ(13C) = 25.145020 %, Harris et al., Pure Appl.
#: Chem. 73, 1795 (2001), Table 1; from memory)
XI_13C = 0.25145020

HEADERS = ["Sample", "Code", "SMILES", "Process", "Nucl.", "Solvent", "Freq / MHz", "Tc (°C)",
           "Δδ (ppm)", "ΔG‡ (kcal/mol)", "T for dG (K)", "E:Z", "Lit / DOI", "Exch. rate (s-1)"]  # fmt: skip
ROWS: list[list[Any]] = [
    ["S1", "OK-1", "CC(=S)N(C)C", "thioamide rotation", "1H", "CDCl3", 400, 25, 0.12, 14.8,
     None, None, "10.0000/invented.1", None],
    ["S2", "OK-2", "CC1(C)CCCCC1", "chair-chair inversion", "H", "CD2Cl2", "500 MHz", -62,
     "48 Hz", 10.3, None, None, "10.0000/invented.2", 120],
    ["S3", "OK-3", "C1=CC2C3C2C=CC1C=C3", "degenerate Cope", "¹³C", "CDC13", 400, "248 K", 1.0,
     "62.1 kJ/mol", None, None, "10.0000/invented.3", None],
    ["S4", "OK-4", "CN(C)C(=O)c1ccccc1", "amide C–N rotation", "1H", "decalin", 400, 60, 0.08,
     16.9, 298, "60:40", "this work", None],
    ["S5", "OK-5", "CC(C)N(C(C)C)C(C)=O", "hindered rotation", "proton", "hexane", 300, 80,
     0.1, 15.0, None, None, "this work", None],
]  # fmt: skip
RATES = [["Sample", "T (K)", "k (s-1)"], ["S4", 320, 35.0], ["S4", 330, 80.0], ["S4", 340, 170.0]]


def group_workbook(tmp_path: Path, fmt: str) -> Path:
    if fmt == "xlsx":
        sheets = {"Barriers": [HEADERS, *ROWS], "Rates": RATES,
                  "notes": [["Invented data for a test: this group does not exist."]]}  # fmt: skip
        return write_xlsx(tmp_path / "group.xlsx", sheets)
    return write_csv(tmp_path / "group.csv", HEADERS, ROWS)


def _stored(database: Database) -> dict[str, dict[str, Any]]:
    """label → the measurement as stored (with its process, coalescence row and solvent)."""
    out = {}
    for row in api.list_measurements(database):
        out[row["label"]] = api.get_measurement(database, row["id"])
    return out


@pytest.mark.parametrize("fmt", ["xlsx", "csv"])
def test_a_group_workbook_without_a_method_column_imports_without_a_mapping_file(
    database: Database, tmp_path: Path, fmt: str
) -> None:
    report = import_table(database, group_workbook(tmp_path, fmt))
    assert report["problems"] == []
    assert report["added"] == 5
    where = "sheet 'Barriers'" if fmt == "xlsx" else "group.csv"
    assert (
        f"{where} has Tc and Δν columns but no method column: 5 row(s) giving both were read "
        "as coalescence data (a method column or a mapping-file default says otherwise)"
    ) in report["notes"]
    hint = [n for n in report["notes"] if "'Exch. rate (s-1)'" in n]
    assert len(hint) == 1 and "probably k (rate point);" in hint[0]

    m = _stored(database)
    assert {k: v["method"] for k, v in m.items()} == dict.fromkeys(m, "coalescence")
    kinds = {k: v["process"]["kind"] for k, v in m.items()}
    assert kinds == {"S1": "bond-rotation", "S2": "ring-inversion",
                     "S3": "degenerate-rearrangement", "S4": "bond-rotation",
                     "S5": "bond-rotation"}  # fmt: skip
    nuclei = {k: v["process"]["nucleus"] for k, v in m.items()}
    assert nuclei == {"S1": "1H", "S2": "1H", "S3": "13C", "S4": "1H", "S5": "1H"}
    co = {k: v["coalescence"][0] for k, v in m.items()}
    # Tc: the header's °C, or the cell's own K
    assert co["S1"]["tc_k"] == pytest.approx(25 + ZERO_C)
    assert co["S2"]["tc_k"] == pytest.approx(-62 + ZERO_C)
    assert co["S3"]["tc_k"] == pytest.approx(248.0)
    # Δν: ppm × the observe frequency of the nucleus (Δν/Hz = Δδ/ppm × ν0/MHz), or the cell's Hz
    assert co["S1"]["dnu_hz"] == pytest.approx(0.12 * 400)
    assert co["S2"]["dnu_hz"] == pytest.approx(48.0)
    assert co["S3"]["dnu_hz"] == pytest.approx(1.0 * 400 * XI_13C)
    assert co["S5"]["dnu_hz"] == pytest.approx(0.1 * 300)
    assert m["S2"]["field_mhz"] == 500.0
    # ΔG‡: kcal/mol from the header, or kJ/mol written in the cell
    assert m["S1"]["dg_kj_mol"] == pytest.approx(14.8 * CAL)
    assert m["S3"]["dg_kj_mol"] == pytest.approx(62.1)
    assert m["S4"]["dg_t_k"] == pytest.approx(298.0)  # "T for dG (K)"
    assert co["S4"]["population_ratio"] == pytest.approx(60 / 40)  # "E:Z"
    assert m["S1"]["reference"] == "10.0000/invented.1"  # "Lit / DOI"
    assert m["S2"]["extra"] == {"Exch. rate (s-1)": "120"}  # kept, with the hint above
    assert m["S1"]["solvent"]["name"] == "chloroform-d"
    assert [m[k]["solvent"] for k in ("S3", "S4", "S5")] == [None, None, None]
    if fmt == "xlsx":  # the rates sheet: three rate points for S4
        assert [r["t_k"] for r in m["S4"]["rate_points"]] == [320.0, 330.0, 340.0]


def test_unknown_solvents_are_accepted_with_a_warning_and_a_suggestion(
    database: Database, tmp_path: Path
) -> None:
    report = import_table(database, group_workbook(tmp_path, "xlsx"))
    ids = {v["label"]: k for k, v in ((r["id"], r) for r in api.list_measurements(database))}
    found = {
        f["measurement_id"]: f["message"]
        for f in report["validation"]["list"]
        if f["rule_id"] == "solvent-in-table"
    }
    assert set(found) == {ids["S3"], ids["S4"], ids["S5"]}
    assert found[ids["S3"]].startswith(
        "solvent 'CDC13' is not in the registry's solvent table — did you mean CDCl3 "
        "(chloroform-d)? Its liquid range is unknown, so no temperature is checked against its "
        "melting and boiling points; store the spelling as an alias of a known solvent, or add "
        "the solvent with its melting and boiling points and their source."
    )
    assert found[ids["S4"]].startswith(  # no near spelling
        "solvent 'decalin' is not in the registry's solvent table. Its liquid range is unknown"
    )
    assert "pressure-rated sealed NMR tube" in found[ids["S5"]]
    unlinked = {u["text"]: u for u in api.unlinked_solvents(database)}
    assert set(unlinked) == {"CDC13", "decalin", "hexane"}
    assert unlinked["CDC13"]["suggestions"] == ["chloroform-d"]


def test_adding_the_solvents_links_the_rows_and_their_liquid_range_is_checked(
    database: Database, tmp_path: Path
) -> None:
    import_table(database, group_workbook(tmp_path, "xlsx"))
    ids = {r["label"]: r["id"] for r in api.list_measurements(database)}
    # n-hexane: mp −95.3 °C, bp 68.7 °C (CRC Handbook of Chemistry and Physics, physical
    # constants of organic compounds; from memory)
    done = api.add_solvent(database, "hexane", mp="-95.3 °C", bp="68.7 °C", formula="C6H14",
                           source="CRC Handbook, n-hexane; from memory")  # fmt: skip
    assert done["measurements_linked"] == [ids["S5"]]
    assert done["mp_k"] == pytest.approx(-95.3 + ZERO_C) and done["deuterated"] is False
    findings = api.get_measurement(database, ids["S5"])["findings"]
    rules = {f["rule_id"]: f for f in findings}
    assert "solvent-in-table" not in rules  # checked again at once
    hot = rules["solvent-liquid-range"]  # Tc 80 °C is above hexane's boiling point
    assert "above the boiling point of hexane" in hot["message"]
    assert "pressure-rated sealed NMR tube" in hot["message"]
    # an alias links the misspelt chloroform; the history says what was linked
    api.add_alias(database, "solvent", "CDC13", "CDCl3", actor="anna", reason="typo in the sheet")
    assert api.get_measurement(database, ids["S3"])["solvent"]["name"] == "chloroform-d"
    last = api.history(database, limit=1)[0]
    assert last["actor"] == "anna" and last["reason"] == "typo in the sheet"
    assert last["summary"] == (
        f"add-alias: solvent 'CDC13' → chloroform-d; linked measurement(s) {ids['S3']}"
    )
    assert [u["text"] for u in api.unlinked_solvents(database)] == ["decalin"]
    assert "solvent-in-table" not in {
        f["rule_id"] for f in api.get_measurement(database, ids["S3"])["findings"]
    }
    # removing the alias unlinks the row again, and the warning comes back
    done = api.remove_alias(database, "solvent", "cdc-13", actor="ben")
    assert done["measurements_unlinked"] == [ids["S3"]]
    again = api.get_measurement(database, ids["S3"])
    assert again["solvent"] is None
    assert "solvent-in-table" in {f["rule_id"] for f in again["findings"]}
    assert api.history(database, limit=1)[0]["summary"] == (
        f"remove-alias: solvent 'CDC13' → chloroform-d; unlinked measurement(s) {ids['S3']}"
    )


def test_a_row_without_tc_and_dnu_still_needs_a_method(database: Database, tmp_path: Path) -> None:
    rows = [ROWS[0], ["S9", "OK-9", "CCO", "rotation", "1H", "CDCl3", 400, None, None, 14.0,
                      298, None, None, None]]  # fmt: skip
    path = write_csv(tmp_path / "half.csv", HEADERS, rows)
    with pytest.raises(ImportRowError) as err:
        import_table(database, path)
    (problem,) = err.value.problems
    assert (problem.row, problem.column) == (3, "method")
    assert problem.reason.startswith("required; one of coalescence, lineshape")


def test_a_rates_sheet_naming_compounds_instead_of_labels_is_told_what_it_needs(
    database: Database, tmp_path: Path
) -> None:
    path = write_xlsx(
        tmp_path / "rates.xlsx",
        {"rates": [["Compound", "T (K)", "k (s-1)"], ["OK-1", 300, 1.2], ["OK-1", 310, 3.1]]},
    )
    with pytest.raises(ImportRowError) as err:
        import_table(database, path)
    (problem,) = err.value.problems  # one sheet-level problem, not "method required" per row
    assert (problem.sheet, problem.row, problem.column) == ("rates", 1, None)
    assert "T and k columns but no label column" in problem.reason
    assert len(api.list_measurements(database)) == 0


# ---------------------------------------------------------------- mapping files


_ODD = ["label", "compound", "method", "process", "nucleus", "solvent", "Tc (K)", "Δν (Hz)"]
_ODD_ROWS = [["M1", "Q-1", "VT-NMR (protocol B)", "wobble", "proton (decoupled)",
              "CDCl3/CS2 (3:1)", 250, 30]]  # fmt: skip


def test_mapping_file_spellings_translate_cell_values(database: Database, tmp_path: Path) -> None:
    path = write_csv(tmp_path / "odd.csv", _ODD, _ODD_ROWS)
    with pytest.raises(ImportRowError) as err:
        import_table(database, path)
    reasons = {p.column: p.reason for p in err.value.problems}
    assert set(reasons) == {"method", "process", "nucleus"}  # the solvent is accepted (warned)
    mapping = tmp_path / "map.toml"
    mapping.write_text(
        '[spellings.method]\n"VT-NMR (protocol B)" = "coalescence"\n'
        '[spellings.process]\n"Wobble" = "ring-inversion"\n'
        '[spellings.nucleus]\n"proton (decoupled)" = "H-1"\n'
        '[spellings.solvent]\n"cdcl3/cs2 (3:1)" = "chloroform-d"\n',
        encoding="utf-8",
    )
    report = import_table(database, path, mapping=mapping)
    assert report["added"] == 1
    (m,) = _stored(database).values()
    assert (m["method"], m["process"]["kind"], m["process"]["nucleus"]) == (
        "coalescence", "ring-inversion", "1H",
    )  # fmt: skip
    assert (m["solvent_text"], m["solvent"]["name"]) == ("chloroform-d", "chloroform-d")


def test_mapping_file_spelling_targets_are_checked(tmp_path: Path) -> None:
    from registry.io.mapping import load_mapping

    path = tmp_path / "map.toml"
    path.write_text('[spellings.method]\n"VT" = "coalesence"\n', encoding="utf-8")
    with pytest.raises(UsageError) as err:
        load_mapping(path)
    assert str(err.value) == (
        f"mapping file {path}: [spellings.method] 'VT' → 'coalesence': unknown method; did you "
        "mean coalescence? (known: coalescence, lineshape, 2d-exchange, saturation-transfer, "
        "equilibration, computed)"
    )
    path.write_text('[spellings.colour]\n"x" = "y"\n', encoding="utf-8")
    with pytest.raises(UsageError, match=r"spellings are for method, process, solvent, nucleus"):
        load_mapping(path)


def test_mapping_file_defaults_apply_only_to_their_sheets(
    database: Database, tmp_path: Path
) -> None:
    entries = [["label", "compound", "ΔG‡ (kJ/mol)", "T (K)"], ["L1", "R-1", 60.0, 300]]
    lit = [["label", "compound", "ΔG‡ (kJ/mol)", "T (K)"], ["L2", "R-2", 70.0, 310]]
    rates = [["label", "T (K)", "k (s-1)"], ["L1", 290, 5.0], ["L1", 300, 12.0]]
    path = write_xlsx(tmp_path / "book.xlsx", {"Ours": entries, "Lit": lit, "Rates": rates})
    mapping = tmp_path / "map.toml"
    mapping.write_text(
        '[defaults]\nmethod = "lineshape"\nsolvent = "toluene-d8"\n'
        '[defaults."Lit"]\nmethod = "computed"\n[defaults."Gone"]\nmethod = "computed"\n',
        encoding="utf-8",
    )
    report = import_table(database, path, mapping=mapping)
    assert report["sheet_kinds"] == {"Ours": "entries", "Lit": "entries", "Rates": "rates"}
    assert report["added"] == 2 and report["problems"] == []
    assert "mapping file: [defaults.'Gone'] names no sheet of this file" in report["notes"]
    m = _stored(database)
    assert (m["L1"]["method"], m["L2"]["method"]) == ("lineshape", "computed")
    assert m["L2"]["solvent_text"] == "toluene-d8"  # the file's defaults, then the sheet's
    assert [r["k_per_s"] for r in m["L1"]["rate_points"]] == [5.0, 12.0]


def test_dry_run_says_the_rows_were_read_as_coalescence_data(
    cli: Any, tmp_path: Path, database: Database
) -> None:
    path = group_workbook(tmp_path, "xlsx")
    result = cli("import", str(path), "--dry-run")
    assert result.exit_code == 0, result.output
    assert (
        "note: sheet 'Barriers' has Tc and Δν columns but no method column: 5 row(s) giving "
        "both were read as coalescence data"
    ) in result.stdout
    assert re.search(r"\n  I +Δδ \(ppm\) +dnu +ppm +value +guess\n", result.stdout)
    assert re.search(r"\n  E +Nucl\. +nucleus +value +guess\n", result.stdout)
    assert api.list_measurements(database) == []  # a dry run writes nothing
