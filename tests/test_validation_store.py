"""Stored findings: new vs unchanged, acceptance, re-runs when inputs or rule versions change."""

from __future__ import annotations

import math

import pytest
from scipy import constants as C

from registry import api
from registry.errors import NotFoundError, UsageError
from registry.record.entry import EntryInput
from registry.storage.database import Database
from registry.validation import accept_finding, check_measurements
from registry.validation.rule_coalescence import CoalescenceBarrier

# Gutowsky–Holm + Eyring at Tc = 300 K, Δν = 50 Hz, from CODATA constants (scipy.constants)
DG_300_50 = (
    C.R / 1000 * 300 * math.log(C.Boltzmann * 300 / (C.Planck * math.pi * 50 / math.sqrt(2)))
)


def add_slipped(database: Database, label: str = "S-1", dg: float | None = None) -> int:
    value = DG_300_50 * 0.8 if dg is None else dg  # k ≈ 2×10⁴ s⁻¹: a rate coalescence sees
    entry = EntryInput(method="coalescence", compound=label, process="bond-rotation",
                       nucleus="1H", solvent="toluene-d8", field="400 MHz", tc="300 K",
                       dnu="50 Hz", dg=f"{value:.2f} kJ/mol")  # fmt: skip
    return api.add_measurement(database, entry, actor="tester")


def set_dg(database: Database, mid: int, value: float) -> None:
    database.write(
        lambda conn: conn.execute(
            "UPDATE measurement SET dg_kj_mol = :v WHERE id = :id", {"v": value, "id": mid}
        )
    )


def test_add_stores_findings(database: Database) -> None:
    mid = add_slipped(database)
    record = api.get_measurement(database, mid)
    assert [f["rule_id"] for f in record["findings"]] == ["coalescence-barrier"]


def test_second_run_has_nothing_new(database: Database) -> None:
    add_slipped(database)
    first = check_measurements(database)
    assert first.counts["error"] == 1 and first.counts["new"] == 0  # add already stored it
    again = check_measurements(database)
    assert again.counts["new"] == 0 and again.added == 0 and again.removed == 0
    assert [f.id for f in again.findings] == [f.id for f in first.findings]
    assert again.select(new_only=True) == []


def test_new_finding_is_marked_new_once(database: Database) -> None:
    mid = add_slipped(database)
    database.write(lambda conn: conn.execute("DELETE FROM validation_finding"))
    report = check_measurements(database)
    assert [f.new for f in report.findings] == [True]
    assert report.select(new_only=True)[0].measurement_id == mid
    assert check_measurements(database).counts["new"] == 0


def test_accept_records_name_and_reason(database: Database) -> None:
    mid = add_slipped(database)
    (finding,) = check_measurements(database).findings
    accepted = accept_finding(database, finding.id, "value from a line-shape fit", actor="ada")
    assert accepted.accepted_by == "ada" and accepted.accept_reason == "value from a line-shape fit"
    report = check_measurements(database)
    assert report.findings[0].accepted and report.counts["error"] == 0
    assert report.counts["accepted"] == 1 and not report.has_errors
    with database.read() as conn:
        (rev,) = conn.records("SELECT * FROM revision WHERE action = 'accept-finding'")
    assert (rev["entity"], rev["entity_id"], rev["actor"]) == ("measurement", mid, "ada")
    assert rev["reason"] == "value from a line-shape fit"


def test_acceptance_lapses_when_the_inputs_change(database: Database) -> None:
    mid = add_slipped(database)
    (finding,) = check_measurements(database).findings
    accept_finding(database, finding.id, "known", actor="ada")
    set_dg(database, mid, DG_300_50 * 1.1)  # still a rate coalescence sees: one finding
    (again,) = check_measurements(database).findings
    assert again.inputs_hash != finding.inputs_hash
    assert again.new and not again.accepted


def test_resolved_finding_disappears(database: Database) -> None:
    mid = add_slipped(database)
    set_dg(database, mid, DG_300_50)
    report = check_measurements(database)
    assert report.findings == () and report.removed == 1


def test_rule_version_change_reruns(database: Database, monkeypatch: pytest.MonkeyPatch) -> None:
    add_slipped(database)
    (finding,) = check_measurements(database).findings
    accept_finding(database, finding.id, "known", actor="ada")
    monkeypatch.setattr(CoalescenceBarrier, "version", CoalescenceBarrier.version + 1)
    (again,) = check_measurements(database).findings
    assert again.rule_version == finding.rule_version + 1
    assert again.new and not again.accepted


def test_tolerance_change_reruns(database: Database) -> None:
    from registry.validation import CheckConfig

    add_slipped(database, dg=DG_300_50 + 3.0)
    assert check_measurements(database).counts["error"] == 1
    assert check_measurements(database, config=CheckConfig(dg_tolerance_kj_mol=5.0)).findings == ()


def test_checking_some_ids_leaves_the_others(database: Database) -> None:
    a = add_slipped(database, "S-1")
    b = add_slipped(database, "S-2")
    report = check_measurements(database, [a])
    assert {f.measurement_id for f in report.findings} == {a}
    assert report.measurement_ids == (a,)
    with database.read() as conn:
        stored = conn.column("SELECT measurement_id FROM validation_finding")
    assert sorted(stored) == [a, b]


def test_retracted_measurements_lose_their_findings(database: Database) -> None:
    mid = add_slipped(database)
    database.write(
        lambda conn: conn.execute(
            "UPDATE measurement SET status = 'retracted' WHERE id = :id", {"id": mid}
        )
    )
    report = check_measurements(database)
    assert report.checked == 0 and report.findings == ()


def test_accept_errors(database: Database) -> None:
    add_slipped(database)
    (finding,) = check_measurements(database).findings
    with pytest.raises(NotFoundError, match="no finding with id 999"):
        accept_finding(database, 999, "reason")
    with pytest.raises(UsageError, match="needs a reason"):
        accept_finding(database, finding.id, "  ")


def _finding_keys(report) -> set[tuple[int, str, str | None]]:  # type: ignore[no-untyped-def]
    return {(f.measurement_id, f.rule_id, f.inputs_hash) for f in report.findings}


@pytest.mark.parametrize("share", [0.2, 0.8])
def test_checking_some_ids_equals_checking_all(database: Database, share: float) -> None:
    """A fifth or most of the measurements, by key, give the findings a whole check gives."""
    ids = []
    with api.deferred_checks(database):  # findings are written once below, not per add
        for i in range(10):
            # every other one slipped; repeats of one compound so the repeat rule has peers
            dg = DG_300_50 * (1.5 if i % 2 else 1.0) + 0.1 * i
            ids.append(add_slipped(database, label=f"S-{i % 3}", dg=dg))
    everything = check_measurements(database)
    chosen = ids[: int(len(ids) * share)]
    part = check_measurements(database, chosen)
    assert part.checked == len(chosen)
    expected = {k for k in _finding_keys(everything) if k[0] in set(chosen)}
    assert _finding_keys(part) == expected
    assert expected  # the slipped rows were found in both
    # the stored findings of the other measurements are left alone by the partial run
    again = check_measurements(database)
    assert _finding_keys(again) == _finding_keys(everything)
