"""Raw-data texts of 2D-exchange, transfer and time-course entries: read back exactly
(hypothesis), bad input refused with the field and text named, nothing written, and a sheet
whose columns carry the raw data imported. All data are invented; unit factors are the SI
definitions (1 min = 60 s, 1 h = 3600 s, 1 ms = 10⁻³ s; NIST SP 811)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from registry import api
from registry.errors import UnitError
from registry.record import rawdata
from registry.record.entry import EntryError, EntryInput, normalize_entry
from registry.storage.database import Database

numbers = st.floats(min_value=1e-6, max_value=1e6, allow_nan=False, allow_infinity=False)


@given(st.integers(min_value=1, max_value=4).flatmap(
    lambda n: st.lists(st.lists(st.lists(numbers, min_size=n, max_size=n), min_size=n,
                                max_size=n), min_size=1, max_size=3)))  # fmt: skip
@settings(max_examples=60, deadline=None)
def test_volume_matrices_read_back(mats: list[list[list[float]]]) -> None:
    text = " | ".join(";".join(",".join(repr(v) for v in row) for row in m) for m in mats)
    assert rawdata.read_volume_sets(text) == mats


@given(st.lists(st.tuples(numbers, st.sampled_from([("s", 1.0), ("ms", 1e-3), ("min", 60.0)])),
                min_size=1, max_size=5))  # fmt: skip
@settings(max_examples=60, deadline=None)
def test_mixing_times_read_in_seconds(times: list[tuple[float, tuple[str, float]]]) -> None:
    text = ", ".join(f"{v!r} {unit}" for v, (unit, _f) in times)
    got = rawdata.read_mixing(text)
    assert got == pytest.approx([v * f for v, (_u, f) in times], rel=1e-12)


@given(st.lists(st.tuples(st.floats(0, 1e4), st.floats(-100, 100)), min_size=3, max_size=12,
                unique_by=lambda p: p[0]))  # fmt: skip
@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
def test_ee_course_reads_back_as_fractions(points: list[tuple[float, float]]) -> None:
    text = "t (h),ee (%); " + "; ".join(f"{t!r},{e!r}" for t, e in points)
    course = rawdata.read_course(text)
    assert course.quantity == "ee"
    assert list(course.t_s) == pytest.approx([t * 3600.0 for t, _ in points], rel=1e-12)
    assert list(course.values[0]) == pytest.approx([e / 100.0 for _, e in points], rel=1e-12)
    assert rawdata.Course.from_json(course.as_json()) == course


def test_mixing_under_a_header_unit_is_stored_with_it() -> None:
    entry, problems = normalize_entry(EntryInput(
        method="2d-exchange", compound="U-1", mixing="0, 100, 300", volumes="1,0;0,1|0.9,0.1;"
        "0.1,0.9|0.8,0.2;0.2,0.8", units={"mixing": "ms"}))  # fmt: skip
    assert problems == []
    assert entry.measurement["mixing_text"] == "0, 100 ms, 300 ms"
    assert entry.measurement["mixing_json"] == "[0.0, 0.1, 0.3]"


@pytest.mark.parametrize(
    ("entry", "field", "words"),
    [
        ({"mixing": "0.1 s"}, "volumes", "missing"),
        ({"volumes": "1,0;0,1"}, "mixing", "missing"),
        ({"mixing": "0.1 s, 0.2 s", "volumes": "1,0;0,1"}, "volumes", "one matrix per"),
        ({"mixing": "0.1 s", "volumes": "1,0,0;0,1,0"}, "volumes", "square"),
        ({"mixing": "0.1 s", "volumes": "1,0;0,1 | 1,0,0;0,1,0;0,0,1"}, "volumes", "same number"),
        ({"mixing": "0", "volumes": "1,0;0,1"}, "mixing", "at least one mixing time > 0"),
        ({"mixing": "-0.1 s", "volumes": "1,0;0,1"}, "mixing", "negative"),
        ({"mixing": "0.1", "volumes": "1,0;0,1"}, "mixing", "no unit"),
        ({"mixing": "0.1 s", "volumes": "1,0;0,1", "site_populations": "0.7,0.2"},
         "site_populations", "sum to 0.9"),
        ({"mixing": "0.1 s", "volumes": "1,0;0,1", "site_names": "A,B,C"}, "site_names", "give 2"),
        ({"site_populations": "0.5,0.5"}, "volumes", "belong"),
        ({"mixing": "0, 0.1 s", "volumes": "1,0;0,1 | 0.9,0.1;0.1,0.9",
          "site_populations": "0.5,0.5"}, "site_populations", "not both"),
        ({"ss_ratio": "0.4"}, "t1", "missing"),
        ({"t1": "1 s"}, "ss_ratio", "missing"),
        ({"ss_ratio": "1.3", "t1": "1 s"}, "ss_ratio", "≤ 1"),
        ({"ss_ratio": "0.4", "t1": "1 s", "t1_kind": "sideways"}, "t1_kind", "apparent"),
        ({"course": "t (min),ee; 0,98; 10,90; 20,80"}, "course", "row 2: '98' lies outside"),
        ({"course": "when,ee (%); 0,98; 10,90; 20,80"}, "course", "no time column"),
        ({"course": "t (min),ee (%); 0,98; 10,90"}, "course", "at least 3 different times"),
        ({"course": "t (min),ee (%); 0,98; 10"}, "course", "1 values for 2 headers"),
        ({"course": "t (min),ee (%); 0,98; -5,90; 10,80"}, "course", "negative"),
        ({"course": "t (min),A,B; 0,1,2; 1,1,2; 2,1,2; 3,1,2", "course_quantity": "ratio"},
         "course_quantity", "one of ee"),
        ({"course": "t (min),ee (%); 0,98; 10,90; 20,80", "x_eq": "0.5"}, "x_eq", "fraction"),
        ({"course": "t (min),x; 0,0.1; 10,0.3; 20,0.4", "x_eq": "1.5"}, "x_eq", "between 0"),
        ({"x_eq": "0.5"}, "course", "missing"),
    ],
)  # fmt: skip
def test_bad_raw_data_names_field_and_writes_nothing(
    database: Database, entry: dict[str, str], field: str, words: str
) -> None:
    full = {"method": "2d-exchange", "compound": "BAD-1", **entry}
    with pytest.raises((EntryError, UnitError)) as caught:
        api.add_measurement(database, full, actor="tester")
    problems = getattr(caught.value, "problems", [caught.value])
    named = [str(p) for p in problems if p.field == field]
    assert any(words in p for p in named), problems
    assert api.list_measurements(database) == []


def test_read_mixing_refuses_junk() -> None:
    with pytest.raises(UnitError):
        rawdata.read_mixing("0.1 s,,0.2 s")
    assert math.isclose(rawdata.read_mixing("2 min")[0], 120.0)


def test_sheet_columns_carry_the_raw_data(database: Database, tmp_path: Path) -> None:
    sheet = tmp_path / "raw.csv"
    sheet.write_text(
        "compound,method,mixing time (ms),volumes,T1 (s),T1 kind,ss ratio,time course,"
        "dG (kJ/mol),T of dG (K)\n"
        'S-1,2d-exchange,100,"0.41758,0.08242;0.08242,0.41758",,,,,70.5,300\n'
        "S-2,saturation-transfer,,,1.2,apparent,0.42 ± 0.01,,,\n"
        'S-3,equilibration,,,,,,"t (min),ee (%); 0,98; 30,81.1; 60,67.1",,\n',
        encoding="utf-8",
    )
    api.import_table(database, str(sheet), actor="tester")
    rows = {r["compound"]: r["id"] for r in api.list_measurements(database)}
    exsy = api.get_measurement(database, rows["S-1"])
    assert exsy["mixing_text"] == "100 ms"
    assert exsy["raw_data"]["mixing_s"] == [0.1]
    sat = api.get_measurement(database, rows["S-2"])["raw_data"]
    assert (sat["ratio"], sat["ratio_err"], sat["t1_s"], sat["t1_kind"]) == (
        0.42, 0.01, 1.2, "apparent")  # fmt: skip
    course = api.get_measurement(database, rows["S-3"])["raw_data"]
    assert course["kind"] == "ee" and course["t_s"] == [0.0, 1800.0, 3600.0]
    assert api.verify(database)["ok"]
