"""A stored line-shape rate keeps how it was fitted (rate_point.fit_json, migration 0009): the
site parameters with their status and error, the width's source, the series' settings and
trends; the history holds the same record, ``verify`` holds the rows against it, an import that
repeats a point keeps its record, and ``show``/``history``/export say it.

The spectra are simulated, invented for these tests (two sites drifting apart with
temperature, 55:45-like populations, a non-exchanging reference line, 1 % noise). The checks
here are about what is stored, not about the fitted values (those are checked against
independent calculations in test_lineshape*.py).
"""

from __future__ import annotations

import json
import math
import sqlite3
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants as C
from test_io_import import write_csv

from registry import api
from registry.errors import UsageError
from registry.lineshape.simulate import two_site_spectrum
from registry.lineshape.spectrum import Spectrum
from registry.lineshape.store_link import fit_json, value_with_error_text
from registry.record.units import parse_value
from registry.storage.database import Database

pytest_plugins = ("conftest_pg",)

TEMPS = (270.0, 285.0, 300.0, 315.0)


def series(seed: int = 7) -> list[Spectrum]:
    """Four spectra, 1,536 points each: sites 50→53 / −50→−49 Hz, p₁ 0.57→0.54, k from a
    58 kJ/mol barrier (invented), width 1.2 Hz measured on a line at −250 Hz."""
    rng = np.random.default_rng(seed)
    freq = np.linspace(-300.0, 300.0, 1536)
    out = []
    for i, t in enumerate(TEMPS):
        # Eyring k = (k_B T/h)·exp(−ΔH‡/RT + ΔS‡/R), constants CODATA (scipy.constants)
        k = C.k * t / C.h * math.exp(-58000.0 / (C.R * t) - 7.0 / C.R)
        y = two_site_spectrum(freq, 50.0 + i, -50.0 + i / 3, k, 0.57 - 0.01 * i, 1.2, 1.2)
        y = y + 0.5 * (0.6 / math.pi) / ((freq + 250.0) ** 2 + 0.36)
        y = y + rng.normal(0.0, 0.01 * y.max(), freq.size)
        out.append(Spectrum(freq, y, "Hz", f"vt_{t:.0f}.csv", t_k=t, t_text=f"{t:.0f} K"))
    return out


def _store(database: Database, mid: int, **extra: Any) -> Any:
    return api.fit_lineshapes(
        series(), "50,-50 Hz", populations="0.55,0.45", region="-200,300 Hz",  # type: ignore[arg-type]
        reference="-280,-220 Hz", database=database, measurement_id=mid, actor="ana",
        store_doubtful=True, **extra,
    )  # fmt: skip


def _problems(database: Database) -> dict[str, list[str]]:
    report = api.verify(database)
    return {c["check"]: c["problems"] for c in report["checks"] if not c["ok"]}


@pytest.fixture
def stored(database: Database) -> tuple[Database, int, Any]:
    mid = api.add_measurement(
        database, {"method": "lineshape", "compound": "AM-9", "solvent": "toluene-d8"},
        actor="ana",
    )  # fmt: skip
    return database, mid, _store(database, mid)


def test_each_stored_rate_keeps_how_it_was_fitted(stored: tuple[Database, int, Any]) -> None:
    database, mid, result = stored
    assert result.stored_rate_points == len(TEMPS)
    points = api.get_measurement(database, mid)["rate_points"]
    assert [p["t_k"] for p in points] == list(TEMPS)
    for point, fit in zip(points, result.fits, strict=True):
        record = point["fit"]
        assert record["spectrum"] == fit.source
        assert record["k_per_s"] == fit.k_per_s  # unrounded, beside the rounded text's reading
        how = {p["name"]: p["how"] for p in record["parameters"]}
        assert how == {n: h for n, _v, _e, h in fit.parameters}
        assert how["width"] == "reference"
        assert record["series"]["reference_hz"] == [-280.0, -220.0]
        assert record["series"]["populations_given"] == [0.55, 0.45]
        assert record["series"]["trends"] == [t.to_dict() for t in result.trends]
    # what is stored is what the text reads as (verify re-reads texts)
    for point in points:
        assert parse_value(point["k_text"], "rate").value == pytest.approx(point["k_per_s"], 1e-12)
    assert _problems(database) == {}


def test_the_history_holds_the_record_and_says_so_briefly(
    stored: tuple[Database, int, Any],
) -> None:
    database, mid, _result = stored
    entries = api.history(database, mid)
    last = entries[-1]
    assert last["action"] == "rate-points"
    assert last["summary"].endswith(f"({len(TEMPS)} with fit records)")
    assert len(last["summary"]) < 400  # the records themselves are not printed
    kept = last["after"]["rates"]
    stored_rows = api.get_measurement(database, mid)["rate_points"]
    assert [json.loads(p[2]) for p in kept] == [r["fit"] for r in stored_rows]


def _sql(database: Database, statement: str) -> None:
    assert database.path is not None
    conn = sqlite3.connect(database.path)
    try:
        conn.execute(statement)
        conn.commit()
    finally:
        conn.close()


def test_a_fit_record_changed_by_hand_is_seen(stored: tuple[Database, int, Any]) -> None:
    database, mid, _result = stored
    rid = api.get_measurement(database, mid)["rate_points"][1]["id"]
    _sql(database, f"UPDATE rate_point SET fit_json = replace(fit_json, '\"fitted\"', "
                   f"'\"held\"') WHERE id = {rid}")  # fmt: skip
    problems = _problems(database)
    assert problems["state"] == [
        f"measurement {mid}: the fit record of rate point 2 ('285 K', "
        f"{api.get_measurement(database, mid)['rate_points'][1]['k_text']!r}, with a fit record) "
        f"is not the one its history ends with (revision {_last_revision(database)}): changed "
        "without a revision"
    ]
    _sql(database, f"UPDATE rate_point SET fit_json = 'not json' WHERE id = {rid}")
    assert (
        f"measurement {mid} rate point {rid}: fit_json is not JSON" in _problems(database)["values"]
    )
    _sql(database, f"UPDATE rate_point SET fit_json = '[1, 2]' WHERE id = {rid}")
    assert any("is not a JSON object" in p for p in _problems(database)["values"])


def _last_revision(database: Database) -> int:
    with database.read() as conn:
        return int(conn.scalar("SELECT max(id) FROM revision"))


def test_records_removed_with_their_points_and_replaced(stored: tuple[Database, int, Any]) -> None:
    database, mid, _result = stored
    api.add_rate_points(database, mid, [{"t_k": 330.0, "k_per_s": 9000.0}], replace=True)
    points = api.get_measurement(database, mid)["rate_points"]
    assert [(p["k_text"], p["fit"]) for p in points] == [("9000 s-1", None)]
    _store(database, mid)  # appended again after the hand-typed point
    assert [p["fit"] is not None for p in api.get_measurement(database, mid)["rate_points"]] == [
        True, True, True, True, False
    ]  # fmt: skip
    assert _problems(database) == {}


def test_an_import_keeps_the_records_of_the_points_it_repeats(
    stored: tuple[Database, int, Any], tmp_path: Path
) -> None:
    """Correcting one rate in a rates sheet drops that point's record only."""
    database, mid, _result = stored
    label = "AM-9"
    api.edit_measurement(database, mid, {"label": label}, actor="ana")
    before = api.get_measurement(database, mid)["rate_points"]
    rows = [[label, p["t_text"], p["k_text"]] for p in before]
    rows[0][2] = "99 ± 3 s-1"  # a corrected first rate (invented)
    sheet = tmp_path / "rates.csv"
    write_csv(sheet, ["label", "T", "k"], rows)
    result = api.import_table(database, sheet, actor="kofi", prefer="file")
    assert result["updated"] == 1
    after = api.get_measurement(database, mid)["rate_points"]
    assert [p["k_text"] for p in after] == [r[2] for r in rows]
    assert after[0]["fit"] is None
    assert [p["fit"] for p in after[1:]] == [p["fit"] for p in before[1:]]
    assert _problems(database) == {}


def test_show_and_export_say_how_each_rate_was_fitted(cli, db_path: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database = api.open_registry(str(db_path))
    try:
        mid = api.add_measurement(database, {"method": "lineshape", "compound": "AM-9"})
        _store(database, mid)
    finally:
        database.close()
    shown = cli("show", str(mid))
    assert shown.exit_code == 0, shown.output
    assert "reference   [vt_270.csv]" in shown.stdout
    assert "line shape   4 spectra, mutual; sites 50, -50 Hz (populations 0.55, 0.45) given" in (
        shown.stdout
    )
    assert "reference window -280 … -220 Hz" in shown.stdout
    as_json = json.loads(cli("show", str(mid), "--json").stdout)
    assert all(p["fit"]["series"]["spectra"] == 4 for p in as_json["rate_points"])
    out = tmp_path / "all.json"
    assert cli("export", "-o", str(out)).exit_code == 0
    exported = json.loads(out.read_text(encoding="utf-8"))
    records = [p["fit"] for m in exported for p in m["rate_points"]]
    assert [r["spectrum"] for r in records] == [f"vt_{t:.0f}.csv" for t in TEMPS]


def test_a_fit_record_must_be_a_json_object(database: Database) -> None:
    mid = api.add_measurement(database, {"method": "lineshape", "compound": "AM-9"})
    point = {"t_k": 300.0, "k_per_s": 10.0}
    with pytest.raises(UsageError, match="fit_json: not JSON"):
        api.add_rate_points(database, mid, [{**point, "fit_json": "{oops"}])
    with pytest.raises(UsageError, match="must be a JSON object"):
        api.add_rate_points(database, mid, [{**point, "fit_json": "[1]"}])
    assert api.get_measurement(database, mid)["rate_points"] == []  # nothing half-written
    api.add_rate_points(database, mid, [{**point, "fit_json": {"b": 1.5, "a": [None, 2]}}])
    with database.read() as conn:
        assert conn.scalar("SELECT fit_json FROM rate_point") == '{"a":[null,2],"b":1.5}'


_JSON = st.recursive(
    st.none() | st.booleans() | st.integers(-(2**53), 2**53) | st.text(max_size=8)
    | st.floats(allow_nan=True, allow_infinity=True),
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=6), inner,
                                                                  max_size=4),
    max_leaves=20,
)  # fmt: skip


@given(st.dictionaries(st.text(max_size=6), _JSON, max_size=6))
def test_fit_records_are_canonical(record: dict[str, Any]) -> None:
    """The text is its own canonical form (what verify asks of a stored record); non-finite
    numbers become null (JSON has none)."""
    text = fit_json(record)
    assert fit_json(json.loads(text)) == text

    def refuse(name: str) -> None:
        raise AssertionError(f"{name} in a fit record")

    json.loads(text, parse_constant=refuse)


@given(
    st.floats(1e-6, 1e9, allow_nan=False),
    st.one_of(st.none(), st.floats(1e-7, 1e8, allow_nan=False)),
)
def test_rate_texts_read_back_exactly_as_stored(k: float, err: float | None) -> None:
    """The stored k and σ are the text's reading: rounded to σ's second figure, by at most
    half a unit there (1/20 of σ or less) — checked with pint's reading of the text."""
    from registry.lineshape.store_link import _numbers_of

    text = value_with_error_text(k, err, "s-1")
    value, error = _numbers_of(text)
    parsed = parse_value(text, "rate")
    assert parsed.value == pytest.approx(value, rel=1e-12)
    if err is None:
        assert error is None and value == pytest.approx(k, rel=1e-3)  # 4 significant figures
    else:
        assert parsed.error == pytest.approx(error, rel=1e-12)
        assert abs(value - k) <= 0.0501 * err + 1e-12 * k


@pytest.mark.postgres
def test_a_server_registry_keeps_fit_records_and_verifies(pg_url: str) -> None:
    api.init_registry(pg_url)
    database = api.open_registry(pg_url)
    try:
        mid = api.add_measurement(database, {"method": "lineshape", "compound": "AM-9"})
        _store(database, mid)
        points = api.get_measurement(database, mid)["rate_points"]
        assert all(p["fit"]["series"]["width"] == "reference line per spectrum" for p in points)
        assert _problems(database) == {}
    finally:
        database.close()
