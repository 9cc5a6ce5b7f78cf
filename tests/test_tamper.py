"""verify finds changes made behind fluxledger's back that the hash chain alone cannot show."""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

import pytest

from registry import api

ADD = [
    "add", "--method", "coalescence", "--smiles", "CN(C)C(=O)c1ccc(Cl)cc1", "--compound", "AM-1",
    "--solvent", "CDCl3", "--mhz", "400", "--tc", "-12 °C", "--dnu", "0.045 ppm",
    "--dg", "14.2 ± 0.3 kcal/mol",
]  # fmt: skip


def _sql(path: Path, *statements: str) -> None:
    conn = sqlite3.connect(path)
    conn.execute("PRAGMA foreign_keys = OFF")  # as a careless or hostile hand would
    for statement in statements:
        conn.execute(statement)
    conn.commit()
    conn.close()


def _problems(path: Path, anchor: str | None = None) -> dict[str, list[str]]:
    report = api.verify(str(path), anchor=anchor)
    return {c["check"]: c["problems"] for c in report["checks"] if not c["ok"]}


@pytest.fixture
def filled(cli, db_path: Path) -> Path:  # type: ignore[no-untyped-def]
    assert cli(*ADD).exit_code in (0, 1)
    assert cli(*ADD[:6], "AM-2", "--smiles", "CN(C)C=O", "--dg", "21 kcal/mol").exit_code == 0
    assert cli("edit", "2", "--set", "reference=notebook 7").exit_code == 0
    return db_path


def test_a_clean_registry_reaches_its_own_anchor(filled: Path) -> None:
    head = api.history_anchor(str(filled))
    assert head is not None
    assert _problems(filled, head) == {}


def test_removing_the_newest_revision_is_seen_through_the_anchor(filled: Path) -> None:
    head = api.history_anchor(str(filled))
    newest = int(head.split(":")[0])  # type: ignore[union-attr]
    _sql(filled, f"DELETE FROM revision WHERE id = {newest}")
    # the chain alone is still whole; the edit that revision recorded is not accounted for
    unrecorded = {
        "state": [
            f"measurement 2: reference is 'notebook 7' but its history ends at (none) "
            f"(revision {newest - 1}): changed without a revision"
        ]
    }
    assert _problems(filled) == unrecorded
    assert _problems(filled, head) == {
        "history": [
            f"revision {newest} of the kept anchor is gone (the history ends at {newest - 1}): "
            "revisions were removed"
        ],
        **unrecorded,
    }


def test_a_rewritten_head_is_seen_through_the_anchor(filled: Path) -> None:
    head = api.history_anchor(str(filled))
    newest = head.split(":")[0]  # type: ignore[union-attr]
    other_first = "CASE WHEN substr(hash, 1, 1) = 'f' THEN 'e' ELSE 'f' END"  # always a change
    _sql(filled, f"UPDATE revision SET hash = {other_first} || substr(hash, 2) WHERE id = {newest}")
    assert _problems(filled, head)["history"][-1] == (
        f"revision {newest} no longer has the kept hash {head.split(':')[1]}…: it was rewritten"  # type: ignore[union-attr]
    )


def test_removing_every_revision_is_seen(filled: Path) -> None:
    head = api.history_anchor(str(filled))
    _sql(filled, "DELETE FROM revision")
    found = _problems(filled, head)
    assert found["accounted"] == [
        "measurement 1 has no revision that created it (inserted by hand?)",
        "measurement 2 has no revision that created it (inserted by hand?)",
    ]
    newest = head.split(":")[0]  # type: ignore[union-attr]
    assert found["history"][0] == (
        f"revision {newest} of the kept anchor is gone (the history ends at nothing): "
        "revisions were removed"
    )


def test_a_measurement_inserted_or_deleted_by_hand_is_seen(filled: Path) -> None:
    _sql(
        filled,
        "INSERT INTO measurement (id, compound_id, method, entered_by, entered_at, status) "
        "VALUES (9, 1, 'coalescence', 'mallory', '2026-01-01 00:00:00.000000', 'draft')",
    )
    assert _problems(filled) == {
        "accounted": ["measurement 9 has no revision that created it (inserted by hand?)"]
    }
    _sql(
        filled,
        "DELETE FROM measurement WHERE id = 9",
        "DELETE FROM coalescence WHERE measurement_id = 2",
        "DELETE FROM validation_finding WHERE measurement_id = 2",
        "DELETE FROM measurement WHERE id = 2",
    )
    assert _problems(filled)["accounted"] == [
        "measurement 2 is in the history but not in the registry (deleted?)"
    ]


def test_an_acceptance_written_by_hand_is_seen(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    findings = json.loads(cli("check", "--json").stdout)
    assert findings, "the first entry carries a planted slip (kcal read as kJ)"
    fid = findings[0]["id"]
    assert cli("accept", str(fid), "--reason", "checked the spectra").exit_code == 0
    assert _problems(filled) == {}  # accepted through fluxledger: recorded
    _sql(filled, f"UPDATE validation_finding SET accepted_by = 'mallory' WHERE id = {fid}")
    assert _problems(filled) == {
        "accounted": [
            f"finding {fid} of measurement {findings[0]['measurement_id']} is accepted by "
            "'mallory' without a recorded acceptance"
        ]
    }


def test_infinity_written_by_hand_is_seen(filled: Path) -> None:
    _sql(filled, "UPDATE measurement SET dg_err_kj_mol = 9e999 WHERE id = 2")
    assert _problems(filled)["numbers"] == [
        "measurement 2: dg_err_kj_mol is inf, not a finite number"
    ]


def test_an_anchor_in_the_wrong_form_is_a_usage_error(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli("verify", "--anchor", "yesterday")
    assert result.exit_code == 2
    assert result.stderr == (
        "error: anchor 'yesterday': write REVISION:HASH as backup and history print it\n"
    )


def test_backup_and_history_print_the_anchor(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    head = api.history_anchor(str(filled))
    made = cli("backup", str(tmp_path / "b.sqlite"))
    assert made.exit_code == 0
    assert f"history anchor {head}: keep it" in made.stdout
    assert json.loads(cli("backup", str(tmp_path / "c.sqlite"), "--json").stdout)["anchor"] == head
    shown = cli("history")
    assert f"history anchor {head} (keep it: 'fluxledger verify --anchor {head}')" in shown.stderr
    assert cli("verify", "--anchor", head).exit_code == 0  # type: ignore[arg-type]
