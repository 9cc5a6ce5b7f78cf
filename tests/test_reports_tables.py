"""Tables for papers: units, uncertainty notation, condition notes, escaping, the CLI."""

from __future__ import annotations

import json
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.errors import UnitError, UsageError
from registry.reports.tables import render_latex, render_markdown, table_rows, table_units

ROWS = [
    {
        "id": 1,
        "compound": "DMA-1",
        "process": "bond-rotation",
        "method": "coalescence",
        "solvent": "CDCl3",
        "dg_kj_mol": 75.7,
        "dg_err_kj_mol": 0.4,
        "dg_t_k": 343.15,
        "reference": "J. Demo 2020, 1 & 2",
    },
    {
        "id": 2,
        "compound": "Bi_2",
        "process": "bond-rotation",
        "method": "lineshape",
        "solvent": "toluene-d8",
        "dg_kj_mol": 62.34,
        "dg_err_kj_mol": 0.14,
        "dg_t_k": 298.15,
        "dh_kj_mol": 55.1,
        "dh_err_kj_mol": 1.2,
        "ds_j_mol_k": -24.3,
        "ds_err_j_mol_k": 3.3,
    },
    {
        "id": 3,
        "compound": "DMA-2",
        "process": "bond-rotation",
        "method": "coalescence",
        "solvent": "CDCl3",
        "dg_kj_mol": 70.0,
        "dg_t_k": 320.0,
        "reference": "J. Demo 2020, 1 & 2",
    },
]


def _body(markdown: str) -> list[list[str]]:
    lines = [ln for ln in markdown.splitlines() if ln.startswith("|")]
    return [[c.strip() for c in ln.strip("|").split("|")] for ln in lines]


def test_markdown_table_in_kj() -> None:
    text = render_markdown(ROWS)
    rows = _body(text)
    assert rows[0] == [
        "Compound",
        "Process",
        "ΔG‡ / kJ mol⁻¹",
        "T / K",
        "ΔH‡ / kJ mol⁻¹",
        "ΔS‡ / J mol⁻¹ K⁻¹",
        "Ref.",
    ]
    assert rows[2] == ["DMA-1", "bond-rotation", "75.7(4) ᵃ", "343.15", "", "", "1"]
    assert rows[3] == [
        "Bi\\_2",
        "bond-rotation",
        "62.34(14) ᵇ",
        "298.15",
        "55.1(12)",
        "−24(3)",
        "",
    ]
    # the same (method, solvent) gets the same letter; the same reference the same number
    assert rows[4] == ["DMA-2", "bond-rotation", "70.0 ᵃ", "320", "", "", "1"]
    assert "ᵃ Coalescence temperature of two (or more) signals; in CDCl₃." in text
    assert "ᵇ Full line-shape fit of variable-temperature spectra; in toluene-d₈." in text
    assert "[1] J. Demo 2020, 1 & 2" in text
    assert text.count("[1]") == 1


def test_kcal_uses_the_thermochemical_calorie() -> None:
    # 1 cal = 4.184 J exactly (NIST SP 811 (2008) B.8): 75.7 kJ/mol = 18.0927… kcal/mol,
    # 0.4 kJ/mol = 0.0956… kcal/mol → rounds up to 0.10, which keeps two digits
    text = render_markdown(ROWS, energy_unit="kcal/mol", uncertainty="pm")
    rows = _body(text)
    assert rows[0][2] == "ΔG‡ / kcal mol⁻¹"
    assert rows[0][5] == "ΔS‡ / cal mol⁻¹ K⁻¹"
    assert rows[2][2] == "18.09 ± 0.10 ᵃ"
    # −24.3 J/(mol·K) / 4.184 = −5.808 cal/(mol·K), ±3.3/4.184 = 0.79 → one digit
    assert rows[3][5] == "−5.8 ± 0.8"
    assert "Uncertainties in parentheses" not in text


def test_columns_without_values_are_dropped() -> None:
    text = render_markdown([ROWS[0]])
    assert _body(text)[0] == ["Compound", "Process", "ΔG‡ / kJ mol⁻¹", "T / K", "Ref."]


def test_latex_table_escapes_and_sets_numbers_in_math() -> None:
    rows = [dict(ROWS[0], compound="A&B_1%", reference="50% {yield} #3 ~x^2 \\")]
    text = render_latex(rows, caption="Barriers of A & B")
    assert r"\begin{tabular}{llrrr}" in text
    assert r"A\&B\_1\% & bond-rotation & $75.7(4)$\textsuperscript{a} & $343.15$ & $1$ \\" in text
    assert r"\caption{Barriers of A \& B}" in text
    assert r"[1]\,50\% \{yield\} \#3 \textasciitilde{}x\textasciicircum{}2 \textbackslash{}" in text
    assert (
        r"\textsuperscript{a}\,Coalescence temperature of two (or more) signals; in CDCl$_{3}$."
        in text
    )
    assert text.count(r"\begin{table}") == 1 and text.rstrip().endswith(r"\end{table}")


def test_latex_pm_and_negative_values() -> None:
    text = render_latex([ROWS[1]], uncertainty="pm")
    assert r"$62.34 \pm 0.14$\textsuperscript{a}" in text
    assert r"$-24 \pm 3$" in text
    assert r"toluene-$d_{8}$" in text


def test_markdown_escapes_table_syntax() -> None:
    text = render_markdown([dict(ROWS[0], compound="a|b *c*", process="<x>")])
    assert r"a\|b \*c\*" in text and r"\<x\>" in text


def test_errors() -> None:
    with pytest.raises(UsageError, match="no measurements"):
        render_markdown([])
    with pytest.raises(UnitError, match=r"^energy_unit: cannot read 'K'"):
        table_units("K")
    with pytest.raises(UnitError):
        render_latex(ROWS, energy_unit="parsec")


def test_table_rows_from_the_registry(database) -> None:  # type: ignore[no-untyped-def]
    from registry import api
    from registry.record.entry import EntryInput

    mid = api.add_measurement(
        database,
        EntryInput(
            method="lineshape",
            compound="DEMO-T1",
            smiles="CC(=O)N(C)C",
            process="bond-rotation",
            solvent="CDCl3",
            dg="74.0 ± 0.3 kJ/mol",
            dg_t="298.15 K",
            dh="70.1 ± 1.1 kJ/mol",
            ds="-13 ± 4 J/(mol*K)",
        ),
    )
    rows = table_rows(database, ids=[mid])
    assert rows[0]["dh_err_kj_mol"] == pytest.approx(1.1)
    assert rows[0]["ds_err_j_mol_k"] == pytest.approx(4.0)
    body = _body(render_markdown(rows))
    assert body[2][2:6] == ["74.0(3) ᵃ", "298.15", "70.1(11)", "−13(4)"]


def test_export_command_writes_paper_tables(cli, tmp_path) -> None:  # type: ignore[no-untyped-def]
    # 20.9 kcal/mol = 87.4 kJ/mol is not what Tc = 393.15 K and Δν = 25 Hz give: 84.06 kJ/mol
    # (Gutowsky–Holm k_c = πΔν/√2 with the Eyring equation, CODATA constants via
    # scipy.constants; computed beside this test), so the value is flagged: a paper table
    # leaves it out unless asked for, and then footnotes it
    added = cli(
        "add", "--method", "coalescence", "--compound", "DEMO-T2", "--smiles", "CN(C)C=O",
        "--process", "bond-rotation", "--solvent", "CDCl3", "--mhz", "400",
        "--tc", "120 °C", "--dnu", "25 Hz", "--dg", "20.9 ± 0.2 kcal/mol",
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    out = tmp_path / "t.tex"
    refused = cli("export", "-o", str(out), "--energy-unit", "kcal/mol")
    assert (refused.exit_code, refused.stderr) == (
        2,
        "error: no measurements to put in a table: the 1 selected are flagged (an error finding"
        " is open); include flagged values to show them with a footnote\n",
    )
    assert not out.exists()
    result = cli("export", "-o", str(out), "--energy-unit", "kcal/mol", "--include-flagged")
    assert result.exit_code == 0, result.stderr
    assert result.stdout == f"exported 1 measurement(s) to {out} as a latex table (kcal/mol)\n"
    text = out.read_text(encoding="utf-8")
    assert r"DEMO-T2 & bond-rotation & $20.9(2)$\textsuperscript{a,\dag} & $393.15$ \\" in text
    assert r"\textsuperscript{\dag}\,Flagged in the registry: an error-level check" in text
    md = cli(
        "export", "-o", str(tmp_path / "t.txt"), "--format", "markdown", "--json",
        "--include-flagged",
    )  # fmt: skip
    assert md.exit_code == 0, md.stderr
    assert json.loads(md.stdout)["flagged_included"] == 1
    written = (tmp_path / "t.txt").read_text(encoding="utf-8")
    assert "| DEMO-T2 | bond-rotation | 87.4(8) ᵃ † | 393.15 |" in written
    assert "† Flagged in the registry: an error-level check of this entry is open" in written
    bad = cli("export", "-o", str(tmp_path / "t.md"), "--energy-unit", "eV")
    assert bad.exit_code == 2
    assert bad.stderr == "error: energy_unit 'eV': use kJ/mol or kcal/mol\n"
    csv_still = cli("export", "-o", str(tmp_path / "t.csv"))
    assert csv_still.exit_code == 0 and "(csv)" in csv_still.stdout


def test_export_table_files(database, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from registry import api
    from registry.record.entry import EntryInput
    from registry.reports.table_file import export_table

    api.add_measurement(
        database,
        EntryInput(
            method="coalescence",
            compound="DEMO-T3",
            smiles="CC(=O)N(C)C",
            process="bond-rotation",
            solvent="CDCl3",
            dg="18.1 ± 0.2 kcal/mol",
            dg_t="343.15 K",
        ),
    )
    result = export_table(database, tmp_path / "t.tex", energy_unit="kcal/mol")
    assert result == {
        "file": str(tmp_path / "t.tex"),
        "format": "latex",
        "measurements": 1,
        "energy_unit": "kcal/mol",
        "uncertainty": "paren",
        "flagged_included": 0,
        "flagged_left_out": 0,
        "notes": [],
    }
    assert r"DEMO-T3 & bond-rotation & $18.1(2)$\textsuperscript{a} & $343.15$ \\" in (
        tmp_path / "t.tex"
    ).read_text(encoding="utf-8")
    md = export_table(database, tmp_path / "t.txt", "md", uncertainty="pm", compound="T3")
    assert md["format"] == "markdown"
    assert "| DEMO-T3 | bond-rotation | 75.7 ± 0.8 ᵃ | 343.15 |" in (tmp_path / "t.txt").read_text(
        encoding="utf-8"
    )
    with pytest.raises(UsageError, match=r"latex \(\.tex\) or markdown \(\.md\)"):
        export_table(database, tmp_path / "t.csv")
    with pytest.raises(UsageError, match="no measurements"):
        export_table(database, tmp_path / "none.md", compound="nothing-like-this")


def test_no_uncertainty_note_without_uncertainties() -> None:
    text = render_markdown([dict(ROWS[2], ds_j_mol_k=-4.2)])
    assert "Uncertainties in parentheses" not in text
    assert _body(text)[2][4] == "−4.2"  # an entropy without uncertainty keeps one decimal
    assert "Uncertainties in parentheses" in render_markdown([ROWS[0]])


def test_export_table_takes_the_listing_filters(database, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from registry import api
    from registry.record.entry import EntryInput
    from registry.reports.table_file import export_table

    def add(label: str, smiles: str, dg: str) -> int:
        return api.add_measurement(
            database,
            EntryInput(method="coalescence", compound=label, smiles=smiles,
                       process="bond-rotation", solvent="CDCl3", dg=dg),
            check=False,
        )  # fmt: skip

    add("DEMO-LOW", "CN(C)C=O", "60.0 kJ/mol")
    high = add("DEMO-HIGH", "CC(=O)N(C)C", "80.0 kJ/mol")
    out = tmp_path / "t.md"
    assert export_table(database, out, barrier_min="70 kJ/mol")["measurements"] == 1
    assert "DEMO-HIGH" in out.read_text(encoding="utf-8")
    # 17 kcal/mol = 71.128 kJ/mol (thermochemical calorie, NIST SP 811 (2008) B.8)
    assert export_table(database, out, barrier="<= 17 kcal/mol")["measurements"] == 1
    assert "DEMO-LOW" in out.read_text(encoding="utf-8")
    api.retract_measurement(database, high, "demo: retracted")
    assert export_table(database, out)["measurements"] == 1
    assert export_table(database, out, include_retracted=True)["measurements"] == 2
    assert export_table(database, out, ids=[high], include_retracted=True)["measurements"] == 1
    before = out.read_text(encoding="utf-8")
    with pytest.raises(UsageError, match=r"uncertainty 'sd': use paren"):
        export_table(database, out, uncertainty="sd")
    with pytest.raises(UsageError, match=r"folder .* does not exist"):
        export_table(database, tmp_path / "missing" / "t.md")
    with pytest.raises(UnitError, match=r"^barrier_min: cannot read 'lots'"):
        export_table(database, out, barrier_min="lots")
    assert out.read_text(encoding="utf-8") == before  # a refused call leaves the file alone


@settings(max_examples=150, deadline=None)
@given(text=st.text(min_size=1, max_size=40))
def test_any_user_text_stays_inside_its_cell(text: str) -> None:
    """Whatever a compound label or reference holds, the table keeps its shape: Markdown rows
    keep their number of unescaped pipes, and LaTeX rows their number of unescaped '&'."""
    row = dict(ROWS[0], compound=text, reference=text)
    markdown = render_markdown([row])
    lines = [ln for ln in markdown.splitlines() if ln.startswith("|")]
    pipes = [len(re.findall(r"(?<!\\)\|", ln)) for ln in lines]
    assert len(lines) == 3 and pipes == [pipes[0]] * 3
    latex = render_latex([row])
    body = [ln for ln in latex.splitlines() if ln.startswith("    ") and ln.endswith("\\\\")]
    amps = [len(re.findall(r"(?<!\\)&", ln)) for ln in body]
    assert len(body) == 2 and amps[0] == amps[1]
    assert r"\end{table}" in latex and latex.count(r"\begin{tabular}") == 1
