"""verify replays each measurement's history and holds the stored rows against it, and holds the
findings and statuses against what the history and the rules account for.

Every registry here is invented demo data. Check values: 1 kcal = 4.184 kJ exactly
(thermochemical calorie, NIST SP 811 (2008) B.8); T/K = t/°C + 273.15 (NIST SP 811 (2008)
4.2.1.1). The texts a message names are the ones the test typed.
"""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path
from typing import Any

import pytest
from test_io_import import write_csv
from test_lineshape_store import series
from test_tamper import _sql
from test_validation_paths import _load_dump

from registry import api
from registry.record.entry import EntryInput
from registry.storage.database import Database

pytest_plugins = ("conftest_pg",)

KCAL = 4.184  # kJ per thermochemical kcal (NIST SP 811 (2008) B.8)

ADD_1 = [
    "add", "--method", "coalescence", "--smiles", "CN(C)C(=O)c1ccc(Cl)cc1", "--compound", "AM-1",
    "--process", "bond-rotation", "--nucleus", "1H", "--solvent", "CDCl3", "--mhz", "400",
    "--tc", "-12 °C", "--dnu", "0.045 ppm", "--dg", "14.2 ± 0.3 kcal/mol",
]  # fmt: skip
ADD_2 = [
    "add", "--method", "lineshape", "--smiles", "CN(C)C=O", "--compound", "AM-2",
    "--solvent", "toluene-d8", "--dg", "21 kcal/mol", "--dg-t", "300 K",
]  # fmt: skip
ADD_3 = [
    "add", "--method", "lineshape", "--compound", "AM-3", "--name", "a biaryl",
    "--dh", "70 kJ/mol", "--rate", "250 K, 12.5 s-1", "--rate", "260 K, 30 s-1",
]  # fmt: skip


def _scalar(path: Path, statement: str) -> Any:
    conn = sqlite3.connect(path)
    try:
        return conn.execute(statement).fetchone()[0]
    finally:
        conn.close()


def _revision(path: Path, mid: int, action: str) -> int:
    """The newest revision of one action on one measurement, as the revision table holds it."""
    return int(
        _scalar(
            path,
            f"SELECT max(id) FROM revision WHERE entity = 'measurement' AND entity_id = {mid} "
            f"AND action = '{action}'",
        )
    )


def _problems(registry: str | Path) -> dict[str, list[str]]:
    report = api.verify(str(registry))
    return {c["check"]: c["problems"] for c in report["checks"] if not c["ok"]}


@pytest.fixture
def three(cli, db_path: Path) -> Path:  # type: ignore[no-untyped-def]
    """AM-1 (coalescence; its ΔG‡ disagrees with Tc and Δν, so it is flagged), AM-2 and AM-3
    (line shape; AM-3 with two rate points)."""
    assert cli(*ADD_1).exit_code == 0
    assert cli(*ADD_2).exit_code == 0
    assert cli(*ADD_3).exit_code == 0
    assert _scalar(db_path, "SELECT status FROM measurement WHERE id = 1") == "flagged"
    assert _problems(db_path) == {}
    return db_path


# ---------------------------------------------------------------- columns changed by hand


def test_a_value_rewritten_consistently_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    """The text and its float changed together, so every value reads right: only the history
    can tell (issue 17: 20 kcal/mol = 83.68 kJ/mol, 21 kcal/mol = 87.864 kJ/mol)."""
    _sql(three, "UPDATE measurement SET dg_text = '20 kcal/mol', dg_kj_mol = 83.68 WHERE id = 2")
    added = _revision(three, 2, "add")
    expected = [
        f"measurement 2: dg_text is '20 kcal/mol' but its history ends at '21 kcal/mol' "
        f"(revision {added}): changed without a revision",
        f"measurement 2: dg_kj_mol is 83.68 but its history ends at {21 * KCAL:.10g} "
        f"(revision {added}): changed without a revision",
    ]
    assert _problems(three) == {"state": expected}
    result = cli("verify")
    assert result.exit_code == 1
    assert "  PROBLEM state  2 problem(s)  (3 measurements replayed from the history)" in (
        result.stdout
    )
    assert f"          {expected[0]}" in result.stdout.splitlines()
    as_json = cli("verify", "--json")
    assert as_json.exit_code == 1
    state = {c["check"]: c for c in json.loads(as_json.stdout)["checks"]}["state"]
    assert (state["ok"], state["problem_count"], state["problems"]) == (False, 2, expected)


def test_un_retracting_by_sql_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli("retract", "2", "--reason", "wrong compound").exit_code == 0
    retracted = _revision(three, 2, "retract")
    assert _problems(three) == {}
    # a retraction is the status 'retracted' and its revision (with the reason); nothing else
    _sql(three, "UPDATE measurement SET status = 'draft' WHERE id = 2")
    assert _problems(three) == {
        "state": [
            f"measurement 2: status is 'draft' but its history ends at 'retracted' "
            f"(revision {retracted}): changed without a revision"
        ]
    }


def test_a_status_and_texts_set_by_hand_are_seen(three: Path) -> None:
    _sql(
        three,
        "UPDATE measurement SET status = 'reviewed', method = 'coalescence', "
        "solvent_text = 'C6D6', reference = 'notebook 9' WHERE id = 2",
    )
    added = _revision(three, 2, "add")
    tail = f"(revision {added}): changed without a revision"
    assert _problems(three) == {
        "state": [
            f"measurement 2: method is 'coalescence' but its history ends at 'lineshape' {tail}",
            f"measurement 2: solvent_text is 'C6D6' but its history ends at 'toluene-d8' {tail}",
            f"measurement 2: reference is 'notebook 9' but its history ends at (none) {tail}",
            f"measurement 2: status is 'reviewed' but its history ends at 'draft' {tail}",
        ]
    }


def test_the_process_moved_by_hand_is_seen(three: Path) -> None:
    _sql(three, "UPDATE process SET kind = 'ring-inversion' WHERE id = 1")
    assert _problems(three) == {
        "state": [
            "measurement 1: process is ring-inversion 1H but its history ends at "
            "bond-rotation 1H (revision 1): changed without a revision"
        ]
    }


def test_coalescence_rows_changed_removed_or_added_by_hand_are_seen(three: Path) -> None:
    # −10 °C = 263.15 K; the history keeps −12 °C = 261.15 K (NIST SP 811 4.2.1.1)
    _sql(three, "UPDATE coalescence SET tc_text = '-10 °C', tc_k = 263.15 WHERE measurement_id = 1")
    tail = "(revision 1): changed without a revision"
    assert _problems(three) == {
        "state": [
            f"measurement 1: coalescence tc_text is '-10 °C' but its history ends at '-12 °C' {tail}",
            f"measurement 1: coalescence tc_k is 263.15 but its history ends at 261.15 {tail}",
        ]
    }
    _sql(
        three,
        "DELETE FROM coalescence WHERE measurement_id = 1",
        "INSERT INTO coalescence (measurement_id, tc_k, tc_text, dnu_hz, dnu_text) "
        "VALUES (2, 300.0, '300 K', 50.0, '50 Hz')",
    )
    added = _revision(three, 2, "add")
    assert _problems(three)["state"] == [
        "measurement 1: no coalescence row, but its history ends with 1 coalescence row "
        "(revision 1): removed without a revision",
        "measurement 2: 1 coalescence row, but its history ends with no coalescence row "
        f"(revision {added}): added without a revision",
    ]


def test_rate_points_changed_removed_or_added_by_hand_are_seen(three: Path) -> None:
    database = api.open_registry(str(three))
    try:  # 270 K, 70 s-1 added through fluxledger: a rate-points revision
        api.add_rate_points(
            database, 3, [{"t_k": 270.0, "t_text": "270 K", "k_per_s": 70.0, "k_text": "70 s-1"}]
        )
    finally:
        database.close()
    points = _revision(three, 3, "rate-points")
    assert _problems(three) == {}
    _sql(three, "UPDATE rate_point SET k_text = '13.5 s-1', k_per_s = 13.5 WHERE id = 1")
    assert _problems(three) == {
        "state": [
            "measurement 3: rate point 1 is ('250 K', '13.5 s-1') but its history ends at "
            f"('250 K', '12.5 s-1') (revision {points}): changed without a revision"
        ]
    }
    _sql(three, "DELETE FROM rate_point WHERE id = 1")
    assert _problems(three)["state"] == [
        f"measurement 3: 2 rate points, but its history ends with 3 rate points (revision "
        f"{points}): removed without a revision"
    ]
    _sql(
        three,
        "INSERT INTO rate_point (id, measurement_id, t_k, t_text, k_per_s, k_text) "
        "VALUES (1, 3, 250.0, '250 K', 12.5, '12.5 s-1'), "
        "(9, 3, 280.0, '280 K', 150.0, '150 s-1')",
    )
    assert _problems(three)["state"] == [
        f"measurement 3: 4 rate points, but its history ends with 3 rate points (revision "
        f"{points}): added without a revision"
    ]


def test_a_change_by_hand_that_a_later_edit_overwrote_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    """The stored row is what the edit left, but the edit's ``before`` shows the hand's change."""
    _sql(three, "UPDATE measurement SET reference = 'planted' WHERE id = 2")
    assert cli("edit", "2", "--set", "reference=notebook 8").exit_code == 0
    edited, added = _revision(three, 2, "edit"), _revision(three, 2, "add")
    assert _problems(three) == {
        "state": [
            f"measurement 2: revision {edited} found reference 'planted' where its history had "
            f"(none) (revision {added}): changed without a revision in between"
        ]
    }


def test_removing_the_newest_revision_shows_in_the_state_it_recorded(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli("edit", "2", "--set", "dg=20 kcal/mol").exit_code == 0
    edited = _revision(three, 2, "edit")
    _sql(three, f"DELETE FROM revision WHERE id = {edited}")
    added = _revision(three, 2, "add")
    assert _problems(three)["state"] == [
        f"measurement 2: dg_text is '20 kcal/mol' but its history ends at '21 kcal/mol' "
        f"(revision {added}): changed without a revision",
        f"measurement 2: dg_kj_mol is 83.68 but its history ends at {21 * KCAL:.10g} "
        f"(revision {added}): changed without a revision",
    ]


# ---------------------------------------------------------------- findings and statuses


def _findings(cli) -> list[dict[str, Any]]:  # type: ignore[no-untyped-def]
    found = cli("check", "--json")
    assert found.exit_code in (0, 1), found.stderr
    return json.loads(found.stdout)


def test_a_finding_deleted_by_hand_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    (error,) = [f for f in _findings(cli) if f["measurement_id"] == 1 and f["severity"] == "error"]
    run = int(_scalar(three, "SELECT max(id) FROM revision WHERE action = 'check'"))
    assert _problems(three) == {}
    _sql(three, f"DELETE FROM validation_finding WHERE id = {error['id']}")
    assert _problems(three) == {
        "findings": [
            "measurement 1: status is 'flagged' but no error finding is open: one was removed "
            "or accepted without fluxledger (or an edit stopped before its check: "
            "'fluxledger check' puts it in step)",
            f"measurement 1: the rules give {error['rule']} ({error['message']!r}) but no "
            f"such finding is stored, though nothing changed since the check of revision {run}: "
            "deleted without fluxledger",
        ]
    }


def test_a_finding_inserted_by_hand_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    _findings(cli)
    run = int(_scalar(three, "SELECT max(id) FROM revision WHERE action = 'check'"))
    _sql(
        three,
        "INSERT INTO validation_finding (id, measurement_id, rule_id, rule_version, severity, "
        "message, found_at) VALUES (99, 2, 'barrier-method-range', 1, 'warning', "
        "'planted', '2026-01-01 00:00:00.000000')",
    )
    assert _problems(three) == {
        "findings": [
            "finding 99 of measurement 2 (barrier-method-range: 'planted') is stored, but the "
            f"rules do not give it for the measurement unchanged since the check of revision "
            f"{run}: written without fluxledger"
        ]
    }
    # an error finding inserted by hand also leaves the status out of step
    _sql(three, "UPDATE validation_finding SET severity = 'error' WHERE id = 99")
    assert _problems(three)["findings"][0] == (
        "measurement 2: status is 'draft' while error finding 99 [barrier-method-range] is "
        "open: changed without a revision (or an edit stopped before its check: "
        "'fluxledger check' puts it in step)"
    )


def test_a_finding_rewritten_by_hand_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    """An error turned into a warning, and the status returned to draft by the same hand."""
    (error,) = [f for f in _findings(cli) if f["measurement_id"] == 1 and f["severity"] == "error"]
    _sql(
        three,
        f"UPDATE validation_finding SET severity = 'warning' WHERE id = {error['id']}",
        "UPDATE measurement SET status = 'draft' WHERE id = 1",
    )
    flagged = _revision(three, 1, "flag")
    assert _problems(three) == {
        "state": [
            "measurement 1: status is 'draft' but its history ends at 'flagged' "
            f"(revision {flagged}): changed without a revision"
        ],
        "findings": [
            f"finding {error['id']} of measurement 1: severity is 'warning' but the rules give "
            "'error' for the same inputs: changed without fluxledger"
        ],
    }


def test_an_acceptance_rewritten_by_hand_is_seen(cli, three: Path) -> None:  # type: ignore[no-untyped-def]
    (error,) = [f for f in _findings(cli) if f["measurement_id"] == 1 and f["severity"] == "error"]
    assert cli("accept", str(error["id"]), "--reason", "checked the spectra").exit_code == 0
    accepted = _revision(three, 1, "accept-finding")
    assert _problems(three) == {}
    _sql(three, f"UPDATE validation_finding SET accept_reason = 'fine' WHERE id = {error['id']}")
    assert _problems(three) == {
        "accounted": [
            f"finding {error['id']} of measurement 1: accept_reason is 'fine' but revision "
            f"{accepted} recorded 'checked the spectra': changed without a revision"
        ]
    }


def test_findings_are_not_derived_again_where_the_data_changed_since_the_check(
    cli, three: Path
) -> None:  # type: ignore[no-untyped-def]
    """After an edit the stored findings may be behind (its check runs in a transaction of its
    own), so they are compared only for measurements unchanged since the last check."""
    _findings(cli)
    assert cli("edit", "2", "--set", "reference=notebook 8").exit_code == 0
    report = api.verify(str(three))
    findings = {c["check"]: c for c in report["checks"]}["findings"]
    assert findings["ok"] and "findings of 2 measurements derived again" in findings["detail"]
    _sql(three, "DELETE FROM validation_finding WHERE measurement_id = 2")  # none to delete
    _sql(three, "UPDATE measurement SET status = 'draft' WHERE id = 1")  # flagged before
    assert "findings" in _problems(three)


def test_without_a_recorded_check_statuses_out_of_step_are_a_note(three: Path) -> None:
    """A registry checked only by a fluxledger from before statuses followed the findings holds
    error findings on draft measurements: noted, not blamed."""
    _sql(three, "UPDATE measurement SET status = 'draft' WHERE id = 1")  # as such a one did
    _sql(three, "DELETE FROM revision WHERE action = 'flag'")  # (and never flagged it)
    report = api.verify(str(three))
    findings = {c["check"]: c for c in report["checks"]}["findings"]
    assert findings["ok"]
    assert findings["notes"][0].startswith(
        "1 measurement(s) whose status does not follow the findings (the first: measurement 1, "
        "draft with error finding "
    )


# ---------------------------------------------------------------- no false alarms


HEADERS = ["label", "compound", "SMILES", "method", "solvent", "field (MHz)", "Tc (°C)",
           "Δν (Hz)", "ΔG‡ (kcal/mol)", "ref"]  # fmt: skip
ROWS = [
    ["m1", "HG-A1", "CN(C)C(=O)c1ccccc1", "coalescence", "CDC13", 400, 12, 38.5, 6.3, "r1"],
    ["m2", "HG-A2", "CC(=O)N1CCCCC1", "coalescence", "CDCl3", 400, -20, 48, 4.2, "r2"],
    ["m3", "HG-A3", "CC(C)N(C(C)C)C(=O)C", "coalescence", "tol-d8", 400, 95, 62, 18.1, "r3"],
]  # fmt: skip


def _every_command(database: Database, tmp_path: Path) -> None:
    """A registry written through every command that changes one (invented demo data)."""
    who = {"actor": "ingrid"}
    api.add_measurement(database, EntryInput(
        method="coalescence", compound="AM-1", smiles="CN(C)C(=O)c1ccc(Cl)cc1",
        process="bond-rotation", nucleus="1H", solvent="CDCl3", field="400 MHz", tc="-12 °C",
        dnu="0.045 ppm", dg="14.2 ± 0.3 kcal/mol"), **who)  # fmt: skip
    api.add_measurement(database, EntryInput(
        method="lineshape", compound="AM-3", name="a biaryl", dh="70 kJ/mol", solvent="TCE",
        rates=[("250 K", "12.5 s-1"), ("260 K", "30 s-1")], status="reviewed"), **who)  # fmt: skip
    sheet = tmp_path / "group.csv"
    write_csv(sheet, HEADERS, ROWS)
    first = api.import_table(database, sheet, actor="kofi")
    m1, m2, m3 = first["measurement_ids"]["added"]
    api.edit_measurement(database, m1, {"dg": "6.5 kcal/mol", "tc": "13 °C"}, **who)
    write_csv(sheet, HEADERS, [[*r[:8], 4.4 if r[0] == "m2" else r[8], r[9]] for r in ROWS])
    assert api.import_table(database, sheet, actor="kofi")["updated"] == 1  # import-update
    write_csv(sheet, HEADERS, [[*r[:8], 6.6 if r[0] == "m1" else r[8], r[9] + "+"] for r in ROWS])
    assert api.import_table(database, sheet, actor="kofi", prefer="file")["updated"] == 3
    rates = tmp_path / "rates.csv"
    write_csv(rates, ["label", "T (°C)", "k (s-1)"], [["m3", 90, 60.0], ["m3", 100, 140.0]])
    assert api.import_table(database, rates, actor="kofi")["updated"] == 1  # import-rates
    api.add_rate_points(database, m3, [{"t_k": 383.15, "t_text": "110 °C", "k_per_s": 300.0,
                                        "k_text": "300 s-1"}], **who)  # fmt: skip
    api.add_rate_points(database, 2, [{"t_k": 270.0, "k_per_s": 70.0}], replace=True, **who)
    api.fit_lineshapes(
        series(), "50,-50 Hz", populations="0.55,0.45", region="-200,300 Hz",  # type: ignore[arg-type]
        reference="-280,-220 Hz", database=database, measurement_id=2, store_doubtful=True, **who,
    )  # fmt: skip
    write_csv(rates, ["label", "T (°C)", "k (s-1)"], [["m3", 90, 61.0], ["m3", 100, 140.0]])
    assert api.import_table(database, rates, actor="kofi", prefer="file")["updated"] == 1
    api.edit_measurement(database, 1, {"reference": "notebook 7", "field": "500 MHz"}, **who)
    api.edit_measurement(database, m2, {"process": "ring inversion", "nucleus": "1H"}, **who)
    api.edit_measurement(database, m3, {"tc": None, "dnu": None}, **who)  # the row goes
    api.edit_measurement(database, m3, {"tc": "95 °C", "dnu": "62 Hz"}, **who)  # and comes back
    api.retract_measurement(database, m2, "wrong compound", **who)
    api.edit_measurement(database, m2, {"status": "draft"}, reason="restored", **who)
    api.add_alias(database, "solvent", "CDC13", "chloroform-d", **who)  # links m1
    api.add_solvent(database, "sulfolane-d8", mp="27.5 °C", bp="285 °C", spellings=["TMS-d8"],
                    source="invented for this test", **who)  # fmt: skip
    report = api.check(database, actor="ingrid")  # the whole registry: records its rules
    error = next(f for f in report.findings if f.severity == "error" and not f.accepted)
    api.accept_finding(database, error.id, "checked the spectra", actor="curator")
    api.add_measurement(
        database,
        EntryInput(
            method="coalescence",
            compound="AM-1",
            solvent="TMS-d8",
            field="400 MHz",
            tc="-10 °C",
            dnu="0.045 ppm",
            dg="13.4 kcal/mol",
        ),
        **who,
    )  # fmt: skip (a repeat, after the check)


def _all_ok(report: dict[str, Any]) -> None:
    failed = {c["check"]: c["problems"] for c in report["checks"] if not c["ok"]}
    assert failed == {} and report["ok"]
    assert not [c for c in report["checks"] if c.get("notes")]


def _state_and_findings(report: dict[str, Any]) -> tuple[str, str]:
    checks = {c["check"]: c for c in report["checks"]}
    return checks["state"]["detail"], checks["findings"]["detail"]


def test_a_registry_made_through_every_command_verifies(database: Database, tmp_path: Path) -> None:
    _every_command(database, tmp_path)
    report = api.verify(database)
    _all_ok(report)
    state, findings = _state_and_findings(report)
    assert state == "6 measurements replayed from the history"
    assert findings.startswith("statuses follow the findings; findings of ")
    api.check(database)  # everything unchanged since: every measurement's findings compared
    report = api.verify(database)
    _all_ok(report)
    assert _state_and_findings(report)[1].startswith(
        "statuses follow the findings; findings of 6 measurements derived again"
    )


@pytest.mark.postgres
def test_a_server_registry_made_through_every_command_verifies(pg_url: str, tmp_path: Path) -> None:
    api.init_registry(pg_url)
    database = api.open_registry(pg_url)
    try:
        _every_command(database, tmp_path)
        _all_ok(api.verify(database))
        api.check(database)
        report = api.verify(database)
        _all_ok(report)
        assert "findings of 6 measurements derived again" in _state_and_findings(report)[1]

        def hand(conn):  # type: ignore[no-untyped-def]
            conn.execute("UPDATE measurement SET dg_text = '20 kcal/mol', dg_kj_mol = 83.68 "
                         "WHERE id = 1")  # fmt: skip

        database.write(hand)
        state = {c["check"]: c for c in api.verify(database)["checks"]}["state"]
        assert state["problems"][0].startswith(
            "measurement 1: dg_text is '20 kcal/mol' but its history ends at '14.2 ± 0.3 kcal/mol'"
        )
    finally:
        database.close()


SEED = Path(__file__).resolve().parent.parent / "seed_demo"


def test_the_demo_registry_verifies(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    """The steps of seed_demo/run_demo.sh that write to the registry (invented demo data)."""
    for name in ("halvorsen_barriers.xlsx", "literature_barriers.csv", "halvorsen_barriers.xlsx"):
        assert cli("import", str(SEED / name)).exit_code in (0, 1)
    assert cli(
        "add", "--method", "coalescence", "--compound", "DEMO-ADD-1", "--name",
        "N,N-dimethylacetamide", "--smiles", "CC(=O)N(C)C", "--process", "bond-rotation",
        "--nucleus", "1H", "--solvent", "toluene-d8", "--mhz", "400", "--tc", "70 ± 1 °C",
        "--dnu", "0.12 ppm", "--dg", "17.0 kcal/mol", "--reference", "demo: invented value",
    ).exit_code == 0  # fmt: skip
    errors = [f for f in _findings(cli) if f["severity"] == "error"]
    assert errors, "the demo plants slips"
    assert cli("accept", str(errors[0]["id"]), "--reason", "demo: confirmed").exit_code == 0
    assert cli("--as", "demo-reviewer", "edit", "41", "--set", "status=reviewed").exit_code == 0
    verified = cli("verify")
    assert verified.exit_code == 0, verified.stdout
    assert "  ok      state  (41 measurements replayed from the history)" in verified.stdout


def test_an_older_registry_upgraded_shows_exactly_its_changes_by_hand(tmp_path: Path) -> None:
    """tests/data/validation_legacy_registry.sql: schema 0003, written by an older fluxledger,
    then changed by SQL as tests/test_validation_paths.py build_varied says (twice, tags A and
    B). verify names those changes and nothing else; the older checker's statuses (it did not
    keep them in step with the findings) are a note, not a problem."""
    db = tmp_path / "legacy.sqlite"
    _load_dump(Path(__file__).parent / "data" / "validation_legacy_registry.sql", db)
    api.upgrade_schema(str(db), no_backup=True)

    def ids(label: str) -> int:
        return int(_scalar(db, "SELECT m.id FROM measurement m JOIN compound c ON "
                               f"c.id = m.compound_id WHERE c.label = '{label}' ORDER BY m.id"))  # fmt: skip

    def added(mid: int) -> int:
        return _revision(db, mid, "add")

    # 1.5 ppm of 13C at 400 MHz: 1.5 × 400 × 0.25145020 Hz (IUPAC Ξ(13C) = 25.145020 %,
    # Harris et al., Pure Appl. Chem. 73, 1795 (2001))
    dnu_13c = 1.5 * 400 * 0.25145020
    expected = []
    for tag in ("A", "B"):
        gh, kcal, c13, gone = (ids(f"{tag}-{n}") for n in ("GH", "KCAL", "C13", "GONE"))
        dg_text = _scalar(db, f"SELECT after_json FROM revision WHERE id = {added(kcal)}")
        was = json.loads(dg_text)["dg_text"]
        expected += [
            f"measurement {gh}: 2 coalescence rows, but its history ends with 1 coalescence "
            f"row (revision {added(gh)}): added without a revision",
            f"measurement {gh}: 2 rate points, but its history ends with no rate points "
            f"(revision {added(gh)}): added without a revision",
            f"measurement {kcal}: dg_text is '14.76' but its history ends at {was!r} "
            f"(revision {added(kcal)}): changed without a revision",
            f"measurement {c13}: coalescence dnu_hz is 600 but its history ends at "
            f"{dnu_13c:.10g} (revision {added(c13)}): changed without a revision",
            f"measurement {gone}: status is 'retracted' but its history ends at 'draft' "
            f"(revision {added(gone)}): changed without a revision",
        ]
    report = api.verify(str(db))
    checks = {c["check"]: c for c in report["checks"]}
    assert checks["state"]["problems"] == expected
    assert checks["findings"]["ok"] and checks["accounted"]["ok"]
    assert checks["findings"]["notes"][0].startswith(
        "13 measurement(s) whose status does not follow the findings"
    )
