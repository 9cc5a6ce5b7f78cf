"""Header recognition, header units, mapping files, and the formula-injection guard."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry.errors import RowProblem, UnitError, UsageError
from registry.io.cells import (
    RATE_COLUMNS,
    cell_text,
    combine_error,
    format_rate_list,
    neutralise,
    parse_rate_list,
    unneutralise,
    with_unit,
)
from registry.io.headers import concept_key, guess_header, quantity_hint, split_header
from registry.io.mapping import MappingFile, load_mapping, plan_sheet


@pytest.mark.parametrize(
    ("header", "field", "unit"),
    [
        ("ΔG‡ (kcal/mol)", "dg", "kcal/mol"),
        ("dG# / kJ mol-1", "dg", "kJ mol-1"),
        ("Barrier [kJ/mol]", "dg", "kJ/mol"),
        ("DeltaG", "dg", None),
        ("Tc (°C)", "tc", "°C"),
        ("T_c/K", "tc", "K"),
        ("coalescence temp", "tc", None),
        ("Δν (Hz)", "dnu", "Hz"),
        ("dnu", "dnu", None),
        ("delta nu (ppm)", "dnu", "ppm"),
        ("J (Hz)", "j", "Hz"),
        ("J_AB", "j", None),
        ("field (MHz)", "field", "MHz"),
        ("spectrometer", "field", None),
        ("solvent", "solvent", None),
        ("method", "method", None),
        ("SMILES", "smiles", None),
        ("compound", "compound", None),
        ("label", "label", None),
        ("ref", "reference", None),
        ("DOI", "reference", None),
        ("ΔH‡", "dh", None),
        ("ΔS‡ (e.u.)", "ds", "e.u."),
        ("Ea", "ea", None),
        ("k", "k", None),
        ("T", "t", None),
        ("tc_k", "tc", "K"),
        ("dg_kcal_mol", "dg", "kcal/mol"),
        ("Tc, K", "tc", "K"),
        ("ΔG‡ in kJ/mol", "dg", "kJ/mol"),
        # issue 16: spellings from a group's own workbook
        ("Δδ (ppm)", "dnu", "ppm"),
        ("Freq / MHz", "field", "MHz"),
        ("Nucl.", "nucleus", None),
        ("T for dG (K)", "dg_t", "K"),
        ("temperature of ΔG‡ (K)", "dg_t", "K"),
        ("E:Z", "population", None),
        ("E/Z", "population", None),
        ("ratio", "population", None),
    ],
)
def test_usual_spellings_are_recognised(header: str, field: str, unit: str | None) -> None:
    guess = guess_header(header)
    assert (guess.field, guess.unit, guess.role) == (field, unit, "value")


@pytest.mark.parametrize(
    ("header", "field"),
    [
        ("σ_k", "k"),
        ("sigma k", "k"),
        ("ΔG‡ err", "dg"),
        ("k_err", "k"),
        ("Tc error", "tc"),
        ("u(Tc)", "tc"),
        ("σ(ΔG‡)", "dg"),
    ],
)
def test_uncertainty_columns(header: str, field: str) -> None:
    guess = guess_header(header)
    assert (guess.field, guess.role) == (field, "error")


def test_a_slash_inside_a_text_header_is_not_a_unit() -> None:
    guess = guess_header("Lit / DOI")
    assert (guess.field, guess.role) == ("reference", "value")
    plan, problems = _plan(["compound", "method", "Lit / DOI"])
    assert problems == [] and plan.value_columns()["reference"].unit is None  # type: ignore[attr-defined]


@pytest.mark.parametrize(
    ("header", "likely"),
    [
        ("Exch. rate (s-1)", ["k"]),
        ("Coal. temp (°C)", ["tc"]),
        ("Obs freq (MHz)", ["field"]),
        ("ΔGcalc", ["dg"]),
        ("Value (kJ/mol)", ["dg", "dh", "ea"]),  # an energy, nothing says which
        ("notebook page", []),
        ("Yield (%)", []),
    ],
)
def test_headers_that_look_like_a_quantity_get_a_hint(header: str, likely: list[str]) -> None:
    assert guess_header(header).role == "extra"
    assert quantity_hint(header) == likely


def test_the_hint_is_a_note_of_the_sheet_plan() -> None:
    plan, problems = _plan(["compound", "method", "ΔG‡ (kJ/mol)", "Coal. temp (°C)"])
    assert problems == []
    assert plan.notes == [  # type: ignore[attr-defined]
        "column D 'Coal. temp (°C)' looks like a quantity but was not recognised: probably Tc; "
        "kept as an extra attribute — rename the header or map it in a mapping file "
        '([columns] "Coal. temp (°C)" = "tc")'
    ]


def test_unknown_headers_are_kept_as_extra_and_derived_ones_skipped() -> None:
    assert guess_header("notebook page").role == "extra"
    assert guess_header("dg_kj_mol (normalized)").role == "derived"
    assert guess_header("extra: operator").role == "extra"


def test_concept_key_folds_greek_and_daggers() -> None:
    assert concept_key("ΔG‡") == "dg"
    assert concept_key("Δν") == "dnu"
    assert concept_key("ΔG^‡") == "dg"
    assert split_header("Tc (°C)") == ("Tc", "°C")


def _plan(
    headers: list[str], mapping: MappingFile | None = None
) -> tuple[object, list[RowProblem]]:
    problems: list[RowProblem] = []
    plan = plan_sheet("f.csv", None, headers, 1, mapping or MappingFile(), problems)
    return plan, problems


def test_temperature_unit_over_an_energy_column_is_a_header_problem() -> None:
    _, problems = _plan(["compound", "method", "ΔG‡ (K)"])
    assert len(problems) == 1
    p = problems[0]
    assert (p.row, p.column, p.text) == (1, "ΔG‡ (K)", "K")
    assert "does not fit dg" in p.reason


def test_a_word_in_brackets_is_a_remark_not_a_unit() -> None:
    plan, problems = _plan(["compound", "method", "Tc (coalescence)"])
    assert problems == []
    assert plan.value_columns()["tc"].unit is None  # type: ignore[attr-defined]
    assert any("not a unit" in n for n in plan.notes)  # type: ignore[attr-defined]


def test_second_column_for_the_same_field_is_kept_as_extra_with_a_note() -> None:
    plan, _ = _plan(["compound", "method", "ΔG‡ (kcal/mol)", "Barrier [kJ/mol]"])
    cols = {c.header: c.role for c in plan.columns}  # type: ignore[attr-defined]
    assert cols["Barrier [kJ/mol]"] == "extra"
    assert any("also looks like dg" in n for n in plan.notes)  # type: ignore[attr-defined]


def test_in_an_entries_sheet_T_is_the_temperature_of_the_barrier() -> None:
    plan, _ = _plan(["compound", "method", "ΔG‡ (kJ/mol)", "T (K)"])
    assert "dg_t" in plan.value_columns()  # type: ignore[attr-defined]
    rates, _ = _plan(["label", "T (K)", "k (s-1)"])
    assert rates.kind == "rates"  # type: ignore[attr-defined]


def test_mapping_file_overrides_the_guess(tmp_path: Path) -> None:
    path = tmp_path / "map.toml"
    path.write_text(
        '[columns]\n"Temp." = "tc"\n"Barrier" = { field = "dg", unit = "kcal/mol" }\n'
        '"ref" = "extra"\n[units]\ntc = "°C"\n[defaults]\nmethod = "coalescence"\n',
        encoding="utf-8",
    )
    mapping = load_mapping(path)
    plan, problems = _plan(["compound", "Temp.", "Barrier", "ref"], mapping)
    assert problems == []
    v = plan.value_columns()  # type: ignore[attr-defined]
    assert (v["tc"].unit, v["dg"].unit, v["tc"].source) == ("°C", "kcal/mol", "mapping file")
    assert [c.header for c in plan.extra_columns()] == ["ref"]  # type: ignore[attr-defined]
    assert plan.defaults == {"method": "coalescence"}  # type: ignore[attr-defined]
    rates, _ = _plan(["label", "T (K)", "k (s-1)"], mapping)
    assert (rates.kind, rates.defaults) == ("rates", {})  # type: ignore[attr-defined]


def test_mapping_file_errors_name_the_key(tmp_path: Path) -> None:
    path = tmp_path / "map.toml"
    path.write_text('[columns]\n"x" = "barrier_height"\n', encoding="utf-8")
    with pytest.raises(UsageError, match="'x' → 'barrier_height' is not a field"):
        load_mapping(path)
    path.write_text("[columns\n", encoding="utf-8")
    with pytest.raises(UsageError, match="not valid TOML"):
        load_mapping(path)


@pytest.mark.parametrize("text", ["=1+2", "+SUM(A1)", "-20 °C", "@cmd", "\tx"])
def test_formula_triggers_are_neutralised_and_restored(text: str) -> None:
    guarded = neutralise(text)
    assert guarded.startswith("'")
    assert unneutralise(guarded) == text


@given(st.text(max_size=30).filter(lambda s: not s.startswith("'")))
def test_neutralise_round_trip(text: str) -> None:
    assert unneutralise(neutralise(text)) == text


def test_cell_text_keeps_numbers_as_written() -> None:
    assert cell_text(400.0) == "400"
    assert cell_text(14.2) == "14.2"
    assert cell_text(1.5e-5) == "1.5e-05"
    assert cell_text(float("nan")) is None
    assert cell_text("  '-20 °C ") == "-20 °C"


_rate_text = st.text(
    st.characters(blacklist_characters=";@,", blacklist_categories=("Cs", "Cc", "Zs", "Zl", "Zp")),
    min_size=1,
    max_size=10,
)


@given(st.lists(st.tuples(_rate_text, _rate_text), max_size=6))
def test_rate_lists_round_trip(rates: list[tuple[str, str]]) -> None:
    assert parse_rate_list(format_rate_list(rates)) == rates


def test_rate_lists_as_groups_write_them() -> None:
    assert parse_rate_list("12.5 s-1 @ 300 K; 40 s-1 @ 310 K;") == [
        ("300 K", "12.5 s-1"),
        ("310 K", "40 s-1"),
    ]
    assert parse_rate_list("300 K, 12.5 s-1") == [("300 K", "12.5 s-1")]  # T, k
    with pytest.raises(UnitError, match="write rate points as 'k @ T; k @ T'"):
        parse_rate_list("12.5 at 300 K")


def test_uncertainty_columns_and_header_units_are_folded_into_the_text() -> None:
    assert combine_error("14.2", "0.3") == "14.2 ± 0.3"
    assert combine_error("14.2 kcal/mol", "0.3") == "14.2 ± 0.3 kcal/mol"
    assert combine_error("14.2 ± 0.2", "0.3") == "14.2 ± 0.2"  # the cell's own error wins
    assert combine_error("14.2", None) == "14.2"
    assert with_unit("14.2 ± 0.3", "kcal/mol") == "14.2 ± 0.3 kcal/mol"
    assert with_unit("14.2(3)", "kcal/mol") == "14.2(3) kcal/mol"
    assert with_unit("-20 °C", "K") == "-20 °C"  # a unit written in the cell wins
    assert with_unit("14,2", None) == "14,2"


def test_rate_point_columns_come_from_the_fields_table() -> None:
    # the columns of the rate_point table (registry/storage/models.py, the first migration)
    assert RATE_COLUMNS == ("t_k", "t_err_k", "t_text", "k_per_s", "k_err_per_s", "k_text")
