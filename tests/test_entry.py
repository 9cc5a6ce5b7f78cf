"""Normalizing one reported entry: units, nuclei, population ratios, every problem listed."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry.errors import UnitError
from registry.record.entry import (
    EntryInput,
    normalize_entry,
    normalize_nucleus,
)
from registry.record.populations import parse_population_ratio
from registry.record.vocab import Vocabulary


def _entry(**kw: str) -> EntryInput:
    base = {"method": "coalescence", "compound": "X", "tc": "250 K", "field": "400 MHz"}
    base.update(kw)
    return EntryInput(**base)


def test_ppm_of_carbon_is_converted_at_the_carbon_frequency() -> None:
    # 13C observe frequency = 0.25145020 × 1H frequency (IUPAC Ξ, Harris et al. 2001; from memory)
    entry, problems = normalize_entry(_entry(dnu="0.5 ppm", nucleus="13C"))
    assert problems == []
    assert entry is not None and entry.coalescence is not None
    assert entry.coalescence["dnu_hz"] == pytest.approx(0.5 * 400 * 0.25145020)


def test_ppm_of_protons_uses_the_spectrometer_frequency() -> None:
    entry, _ = normalize_entry(_entry(dnu="0.5 ppm", nucleus="1H"))
    assert entry is not None and entry.coalescence is not None
    assert entry.coalescence["dnu_hz"] == pytest.approx(200.0)


def test_ppm_of_an_unknown_nucleus_is_refused() -> None:
    entry, problems = normalize_entry(_entry(dnu="0.5 ppm", nucleus="195Pt"))
    assert entry is None
    assert [p.field for p in problems] == ["dnu"]
    assert "give Δν in Hz" in problems[0].reason


def test_hz_of_any_nucleus_is_kept() -> None:
    entry, _ = normalize_entry(_entry(dnu="120 Hz", nucleus="195Pt"))
    assert entry is not None and entry.coalescence is not None
    assert entry.coalescence["dnu_hz"] == 120.0


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("1H", "1H"),
        ("H-1", "1H"),
        ("¹³C", "13C"),
        ("19f", "19F"),
        ("P31", "31P"),
        ("proton", "1H"),
        ("not a nucleus", "not a nucleus"),
    ],  # filters keep what they cannot read
)
def test_nucleus_spellings(text: str, expected: str) -> None:
    assert normalize_nucleus(text) == expected


def test_an_entry_is_read_with_the_registry_vocabulary() -> None:
    voc = Vocabulary(
        ("helix-inversion",),
        (("method", "VT protocol B", "coalescence"), ("nucleus", "obs. proton", "1H")),
    )
    entry, problems = normalize_entry(
        _entry(method="vt-protocol b", process="helix inversion", nucleus="Obs. proton",
               dnu="0.5 ppm"),
        voc,
    )  # fmt: skip
    assert problems == []
    assert entry is not None and entry.process is not None and entry.coalescence is not None
    assert (entry.measurement["method"], entry.process["kind"], entry.process["nucleus"]) == (
        "coalescence", "helix-inversion", "1H",
    )  # fmt: skip
    assert entry.coalescence["dnu_hz"] == pytest.approx(200.0)  # 0.5 ppm × 400 MHz (¹H)
    # the same texts without the registry's words: every one is a problem, with its field
    _, problems = normalize_entry(
        _entry(method="vt-protocol b", process="helix inversion", nucleus="Obs. proton",
               dnu="20 Hz")
    )  # fmt: skip
    assert sorted(p.field for p in problems) == ["method", "nucleus", "process"]


@pytest.mark.parametrize(
    ("text", "ratio"),
    [("60:40", 1.5), ("40:60", 1.5), ("1.5", 1.5), ("60%", 1.5), ("p = 0.4", 1.5), ("1", 1.0),
     ("3:1", 3.0), ("1:3", 3.0), ("25 %", 3.0), ("x_A = 0.25", 3.0), ("60/40", 1.5)],
)  # fmt: skip
def test_population_ratio_forms(text: str, ratio: float) -> None:
    assert parse_population_ratio(text) == pytest.approx(ratio)


@pytest.mark.parametrize("bad", ["0", "-2", "a:b", "60:0", "nan", "0.5", "0.25", "100%", "p = 1"])
def test_bad_population_ratio(bad: str) -> None:
    with pytest.raises(UnitError):
        parse_population_ratio(bad)


def test_dg_temperature_defaults_to_tc() -> None:
    entry, _ = normalize_entry(_entry(dnu="20 Hz", dg="60 kJ/mol"))
    assert entry is not None
    assert entry.measurement["dg_t_k"] == 250.0
    assert entry.measurement["dg_t_text"] is None  # derived, not reported


@given(
    st.dictionaries(
        st.sampled_from(
            ["dg", "dh", "ds", "tc", "dnu", "j", "field", "t_min", "population", "method"]
        ),
        st.text(max_size=20),
    )
)
def test_any_texts_give_an_entry_or_listed_problems(fields: dict[str, str]) -> None:
    entry, problems = normalize_entry(
        EntryInput(**{"method": "computed", "compound": "Z", **fields})
    )
    assert (entry is None) == bool(problems)
    for problem in problems:
        assert problem.field and problem.reason
