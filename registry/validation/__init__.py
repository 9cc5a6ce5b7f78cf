"""Validation: recompute every stored barrier from its raw data, flag disagreements, name the slip.

Map (data flows top to bottom):
    data               load measurements, coalescence rows and rate points (one query per
                       table, for one row or all) into numpy columns: CheckData
    columns            rows → numpy columns; per-measurement sums, means and extremes
    digest             the 64-bit digest of a measurement's checked values (inputs hash)
    reported           the unit each value was reported in (findings speak the user's units)
    base               CheckConfig (tolerances), Finding, the Rule base class
    coalescence_model  ΔG‡(Tc) for whole columns (Gutowsky–Holm, coupled AB, unequal populations)
    slips              the usual slips, each a recomputation with one thing done wrong
    rule_*             one module per family of rules, one class per rule
    engine             RULES, run_rules (+ inputs_hash per finding)
    store              reconcile a run with the stored findings; accept a finding; the status
                       rule (an open error finding ⇔ status ``flagged``)

:func:`check_measurements` is what ``fluxledger check``, ``add`` and the importer call.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field, replace
from datetime import UTC, datetime

from registry.storage.connection import Connection, utc
from registry.storage.database import Database, current_user
from registry.validation.base import SEVERITIES, SEVERITY_RANK, CheckConfig, Finding, Rule
from registry.validation.data import load_check_data
from registry.validation.engine import RULES, legacy_hashes, rule_by_id, run_rules
from registry.validation.slips import SLIP_IDS
from registry.validation.store import (
    accept,
    last_run,
    open_after_edit,
    out_of_step,
    reconcile,
    record_check_run,
    sync_status,
)

__all__ = [
    "RULES",
    "SEVERITIES",
    "SLIP_IDS",
    "CheckConfig",
    "CheckReport",
    "Finding",
    "Rule",
    "accept_finding",
    "check_measurements",
    "errors_left_open",
    "out_of_step",
    "rule_by_id",
    "sync_status",
]


@dataclass(frozen=True)
class CheckReport:
    """The findings of one check run for the measurements it covered, and their counts."""

    findings: tuple[Finding, ...]
    checked: int
    ran_at: datetime
    #: ids of the measurements checked (retracted ones and unknown ids are not)
    measurement_ids: tuple[int, ...] = ()
    actor: str | None = None
    added: int = 0
    removed: int = 0
    counts: dict[str, int] = field(default_factory=dict)
    #: statuses the run changed by the status rule: ``{"id", "before", "after"}`` each
    status_changes: tuple[dict[str, object], ...] = ()
    #: False for a view (a check with other settings): nothing was stored or changed
    stored: bool = True

    @property
    def has_errors(self) -> bool:
        """True when an error-level finding has not been accepted (``check`` then exits 1)."""
        return self.counts.get("error", 0) > 0

    def select(self, *, severity: str | None = None, new_only: bool = False) -> list[Finding]:
        """Findings at ``severity`` or more severe, optionally only those new in this run."""
        limit = SEVERITY_RANK[severity] if severity else 99
        return [
            f
            for f in self.findings
            if SEVERITY_RANK.get(f.severity, 99) <= limit and (f.new or not new_only)
        ]

    def summary(self) -> str:
        c = self.counts

        def n(count: int, word: str) -> str:
            return f"{count} {word}" + ("" if count == 1 else "s")

        found = (
            f"checked {n(self.checked, 'measurement')}: {n(c['error'], 'error')}, "
            f"{n(c['warning'], 'warning')}, {n(c['note'], 'note')}"
        )
        if not self.stored:
            return f"{found} (a view with other settings: the stored findings are unchanged)"
        return f"{found} ({c['new']} new since the last run, {c['accepted']} accepted)"


def _counts(findings: Sequence[Finding]) -> dict[str, int]:
    counts = {s: 0 for s in SEVERITIES}
    counts.update(accepted=0, new=0, total=len(findings))
    for f in findings:
        if f.accepted:
            counts["accepted"] += 1
        else:
            counts[f.severity] = counts.get(f.severity, 0) + 1
        counts["new"] += int(f.new)
    return counts


def check_measurements(
    database: Database,
    ids: Sequence[int] | None = None,
    *,
    actor: str | None = None,
    config: CheckConfig | None = None,
    record_run: bool = False,
    store: bool = True,
) -> CheckReport:
    """Run every rule on the measurements ``ids`` (None: all), store the findings, return them.

    With ``store=False`` it is a view: the findings are computed and returned, and nothing
    stored (findings, acceptances, statuses) is touched — what a check with other settings
    (another tolerance) must do, so that it cannot undo an acceptance or delete findings.

    Findings whose inputs and rule version are unchanged keep their date and acceptance; ones
    no longer produced are removed. A finding is ``new`` when this run stored it or, with
    ``record_run`` (what ``fluxledger check`` does), when it was stored after the previous
    recorded check of the whole registry (e.g. by ``add`` or an import in between); a check of
    the whole registry with ``record_run`` is itself recorded in the history under ``actor``.

    In the same transaction the status follows the findings (:func:`.store.sync_status`): a
    measurement left with an open error finding becomes ``flagged``, one with none open any
    more returns to its earlier status; each change is in the history under ``actor``.
    """
    cfg = config or CheckConfig()
    id_list = None if ids is None else sorted({int(i) for i in ids})
    with database.read() as conn:
        data = load_check_data(conn, id_list)
    findings = run_rules(data, cfg)
    now = datetime.now(UTC)

    if not store:
        return CheckReport(
            findings=tuple(findings), checked=len(data), ran_at=now,
            measurement_ids=tuple(int(i) for i in data.ids), actor=actor,
            counts=_counts(findings), stored=False,
        )  # fmt: skip
    older = legacy_hashes(data, cfg)
    who = actor or current_user()

    def work(conn: Connection) -> tuple[list[Finding], int, int, list[dict[str, object]]]:
        stored, added, removed = reconcile(conn, id_list, findings, now, older)
        changes = sync_status(conn, id_list, who)
        if not record_run:
            return stored, added, removed, changes
        previous = last_run(conn)
        if previous is not None:
            stored = [
                f if f.new or not _after(f.found_at, previous) else _as_new(f) for f in stored
            ]
        else:
            stored = [f if f.new else _as_new(f) for f in stored]
        if id_list is None:  # a partial run does not move "since the last run" for the rest
            own = {r.id: r.version for r in RULES} if cfg == CheckConfig() else None
            record_check_run(conn, who, id_list, _counts(stored), own)
        return stored, added, removed, changes

    stored, added, removed, changes = database.write(work)
    return CheckReport(
        findings=tuple(stored),
        checked=len(data),
        ran_at=now,
        measurement_ids=tuple(int(i) for i in data.ids),
        actor=actor,
        added=added,
        removed=removed,
        counts=_counts(stored),
        status_changes=tuple(changes),
    )


def _after(at: datetime | None, previous: datetime) -> bool:
    return at is not None and utc(at) > utc(previous)  # type: ignore[operator]


def _as_new(f: Finding) -> Finding:
    return replace(f, new=True)


def accept_finding(
    database: Database, finding_id: int, reason: str, *, actor: str | None = None
) -> Finding:
    """Accept one finding (it stays accepted while its inputs are unchanged); recorded by name."""
    who = actor or current_user()
    return database.write(lambda conn: accept(conn, int(finding_id), reason, who))


def errors_left_open(conn: Connection, measurement_id: int) -> list[Finding]:
    """The error findings the default check would leave open on ``measurement_id`` as ``conn``
    sees it now (inside an edit's transaction): an edit that asks for a status refuses on them
    before anything is committed."""
    findings = run_rules(load_check_data(conn, [measurement_id]), CheckConfig())
    return open_after_edit(conn, measurement_id, findings)
