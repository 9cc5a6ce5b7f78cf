"""Paper tables normalise method and solvent before footnoting; supporting-information tables
list every value as reported and normalised, the method, the solvent, the temperature of each
ΔG‡ and the reference, in Markdown, LaTeX and a workbook (one column per quantity, unit in
the header, numbers as numbers).

Demo values are invented. The calorie is the thermochemical one, 4.184 J exactly (NIST SP 811,
B.8), so 15.0 kcal/mol = 62.76 kJ/mol — computed here, not by the code under test.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from registry import api
from registry.errors import UsageError
from registry.record.entry import EntryInput
from registry.reports.si_tables import render_si_latex, render_si_markdown
from registry.reports.tables import normalised_conditions, render_latex, render_markdown

KCAL = 4.184  # J per thermochemical calorie (NIST SP 811, B.8)

ROWS = [
    {"id": 1, "compound": "DEMO-T1", "process": "bond-rotation", "method": "coalescence",
     "solvent": "DMSO-D6", "dg_kj_mol": 66.1, "dg_err_kj_mol": 0.3, "dg_t_k": 340.0,
     "dg_text": "15.8 ± 0.07 kcal/mol", "reference": "demo: invented"},
    {"id": 2, "compound": "DEMO-T2", "process": "bond-rotation", "method": "Coalescence",
     "solvent": "DMSO-d6", "dg_kj_mol": 70.2, "dg_t_k": 355.0, "dg_text": "70.2 kJ/mol"},
    {"id": 3, "compound": "DEMO-T3", "process": "ring-inversion", "method": "lineshape",
     "solvent": "CDCl3", "dg_kj_mol": 45.0, "dh_kj_mol": 40.0, "dh_err_kj_mol": 1.0,
     "dh_text": "40 ± 1 kJ/mol", "ds_j_mol_k": -15.0, "ds_err_j_mol_k": 3.0,
     "ds_text": "-15 ± 3 J/(mol K)", "dg_t_k": 298.15},
]  # fmt: skip


def test_one_footnote_per_solvent_however_spelled() -> None:
    assert normalised_conditions(ROWS) == [
        ("coalescence", "DMSO-d6"),  # the first spelling, its deuterium label in lower case
        ("coalescence", "DMSO-d6"),
        ("lineshape", "CDCl3"),
    ]
    md = render_markdown(ROWS)
    notes = [ln for ln in md.splitlines() if ln.startswith(("ᵃ", "ᵇ", "ᶜ"))]
    assert len(notes) == 2, md  # DMSO-D6 and DMSO-d6 are one condition, not two
    assert notes[0].startswith("ᵃ Coalescence") and "DMSO-d₆" in notes[0]
    assert "DMSO-D" not in md
    tex = render_latex(ROWS)
    assert tex.count(r"\textsuperscript{b}\,") == 1 and r"\textsuperscript{c}" not in tex


def test_the_solvent_table_decides_when_linked() -> None:
    rows = [dict(ROWS[0], solvent="d6-DMSO", solvent_name="dimethyl sulfoxide-d6"),
            dict(ROWS[1], solvent="(CD3)2SO", solvent_name="dimethyl sulfoxide-d6")]  # fmt: skip
    assert {s for _, s in normalised_conditions(rows)} == {"d6-DMSO"}
    # unlinked, the built-in table still knows the usual spellings of one solvent
    rows = [dict(ROWS[0], solvent="CDCl3"), dict(ROWS[1], solvent="chloroform-d")]
    assert {s for _, s in normalised_conditions(rows)} == {"CDCl3"}


def test_si_markdown_lists_reported_and_normalised_values() -> None:
    md = render_si_markdown(ROWS, energy_unit="kcal/mol")
    head = md.splitlines()[0]
    for title in ("Compound", "Method", "Solvent", "T / K", "ΔG‡ / kcal mol⁻¹", "ΔG‡ as reported",
                  "ΔH‡ / kcal mol⁻¹", "ΔS‡ / cal mol⁻¹ K⁻¹", "Reference"):  # fmt: skip
        assert title in head, title
    first = md.splitlines()[2]
    # 66.1 kJ/mol ± 0.3 is 15.80 ± 0.07 kcal/mol (÷ 4.184): rounded to its uncertainty
    assert f"{66.1 / KCAL:.2f}({round(0.3 / KCAL * 100):d})" in first
    assert "15.8 ± 0.07 kcal/mol" in first and "| 340 |" in first and "DMSO-d₆" in first
    assert "demo: invented" in first
    third = md.splitlines()[4]
    assert f"{-15.0 / KCAL:.1f}".replace("-", "−") in third  # −3.6 cal/(mol·K)


def test_si_latex_is_a_longtable() -> None:
    tex = render_si_latex(ROWS, caption="Barriers (demo)")
    assert r"\begin{longtable}" in tex and r"\end{longtable}" in tex and r"\endhead" in tex
    assert r"DMSO-$d_{6}$" in tex and "DMSO-D" not in tex
    assert r"$\Delta G^{\ddagger}$ as reported" in tex
    assert "15.8 $\\pm$ 0.07 kcal/mol" in tex  # the reported text, escaped for LaTeX
    assert r"holds at." in tex and "ΔG" not in tex  # no raw Greek letters in LaTeX text


def _fill(database) -> None:  # type: ignore[no-untyped-def]
    for label, smiles, solvent, dg, extra in (
        (
            "DEMO-W1",
            "CC(=O)N(C)C",
            "DMSO-D6",
            "15.0 ± 0.1 kcal/mol",
            {"operator": "A. Demo", "notebook page": 12},
        ),
        ("=HYPERLINK(1)", "CN(C)C=O", "DMSO-d6", "70 kJ/mol", {}),
    ):
        api.add_measurement(
            database,
            EntryInput(method="coalescence", compound=label, smiles=smiles, solvent=solvent,
                       process="bond-rotation", dg=dg, dg_t="330 K",
                       reference="demo: invented", extra=extra),
            check=False,
        )  # fmt: skip


def test_si_workbook_has_one_column_per_quantity(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from openpyxl import load_workbook

    _fill(database)
    done = api.export_si_table(database, tmp_path / "si.xlsx")
    assert done["format"] == "xlsx" and done["measurements"] == 2
    sheet = load_workbook(tmp_path / "si.xlsx").active
    rows = list(sheet.iter_rows(values_only=True))
    head = list(rows[0])
    for title in ("T of ΔG‡ (K)", "ΔG‡ (kJ/mol)", "σ ΔG‡ (kJ/mol)", "ΔG‡ as reported",
                  "ΔH‡ (kJ/mol)", "ΔS‡ (J/(mol·K))", "method", "solvent", "reference"):  # fmt: skip
        assert title in head, title
    first = dict(zip(head, rows[1], strict=True))
    assert first["ΔG‡ (kJ/mol)"] == pytest.approx(15.0 * KCAL)  # a number, converted
    assert first["σ ΔG‡ (kJ/mol)"] == pytest.approx(0.1 * KCAL)
    assert first["T of ΔG‡ (K)"] == pytest.approx(330.0)
    assert first["ΔG‡ as reported"] == "15.0 ± 0.1 kcal/mol"
    second = dict(zip(head, rows[2], strict=True))
    assert {first["solvent"], second["solvent"]} == {first["solvent"]}  # one spelling
    assert "D6" not in first["solvent"]
    assert second["compound"] == "'=HYPERLINK(1)"  # a formula is never evaluated


def test_si_table_takes_the_groups_own_columns(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from openpyxl import load_workbook

    _fill(database)
    done = api.export_si_table(
        database, tmp_path / "si.xlsx", columns=["Operator", "notebook page", "shoe size"]
    )
    assert done["columns"] == ["Operator", "notebook page", "shoe size"]
    assert any("'shoe size': no selected measurement has it" in n for n in done["notes"])
    rows = list(load_workbook(tmp_path / "si.xlsx").active.iter_rows(values_only=True))
    head = list(rows[0])
    first = dict(zip(head, rows[1], strict=True))
    assert first["Operator"] == "A. Demo" and first["notebook page"] == 12  # a number stays one
    assert dict(zip(head, rows[2], strict=True))["Operator"] is None
    md = api.export_si_table(database, tmp_path / "si.md", columns=["operator"])
    text = Path(md["file"]).read_text(encoding="utf-8")
    assert "| operator |" in text.splitlines()[0] + " " and "A. Demo" in text


def test_si_table_checks_before_writing(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    _fill(database)
    with pytest.raises(UsageError, match=r"latex \(\.tex\), markdown \(\.md\) or xlsx"):
        api.export_si_table(database, tmp_path / "si.csv")
    with pytest.raises(UsageError, match="uncertainty 'x'"):
        api.export_si_table(database, tmp_path / "si.md", uncertainty="x")
    assert not (tmp_path / "si.md").exists() and not (tmp_path / "si.csv").exists()


def test_si_table_command(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    added = cli(
        "add", "--method", "coalescence", "--compound", "DEMO-C9", "--smiles", "CC(=O)N(C)C",
        "--process", "bond-rotation", "--solvent", "DMSO-D6", "--dg", "66 kJ/mol",
        "--reference", "demo: invented",
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    for suffix in ("md", "tex", "xlsx"):
        out = tmp_path / f"si.{suffix}"
        result = cli("si-table", "-o", str(out), "--json")
        assert result.exit_code == 0, result.stderr
        data = json.loads(result.stdout)
        assert data["measurements"] == 1 and data["layout"] == "supporting information"
        assert out.stat().st_size > 0
    assert "DMSO-d₆" in (tmp_path / "si.md").read_text(encoding="utf-8")
