"""Validation: recompute every barrier from its raw data, and accept a finding with a reason."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import TYPE_CHECKING

from registry.api.registry import actor_name
from registry.errors import UnitError, UsageError
from registry.record.ids import as_id, as_ids
from registry.storage.database import Database

if TYPE_CHECKING:
    from registry.validation import CheckReport, Finding

SEVERITIES = ("error", "warning", "note")


def check(
    database: Database,
    ids: Sequence[int] | None = None,
    *,
    tolerance: str | float | None = None,
    actor: str | None = None,
) -> CheckReport:
    """Run every rule on the measurements ``ids`` (None: all) and store the findings.

    ``tolerance`` is the base tolerance of a recomputed ΔG‡ (a text with a unit such as
    ``'0.2 kcal/mol'``, or kJ/mol). A check with a tolerance other than the registry's is a
    view: its findings are returned and nothing stored changes (the stored findings, their
    acceptances and the statuses stay those of the registry's own settings). A check of the
    whole registry with its own settings is recorded in the history.
    """
    from registry.record.units import parse_value
    from registry.validation import CheckConfig, check_measurements

    config = CheckConfig()
    if tolerance is not None:
        if isinstance(tolerance, str):
            try:
                value = parse_value(tolerance, "energy", field="tolerance").value
            except UnitError as exc:  # a setting, not data: a usage error
                raise UsageError(str(exc)) from exc
        else:
            value = float(tolerance)
        if not (value > 0 and math.isfinite(value) and value < 1000):
            raise UsageError(f"tolerance {tolerance!r}: give a positive energy below 1000 kJ/mol")
        config = CheckConfig(dg_tolerance_kj_mol=value)
    own = config == CheckConfig()
    return check_measurements(
        database, (as_ids(ids) or None) if ids else None, actor=actor_name(actor), config=config, record_run=own,
        store=own,
    )  # fmt: skip


def accept_finding(
    database: Database, finding_id: int, reason: str, *, actor: str | None = None
) -> Finding:
    """Accept one finding with a reason; it stays accepted while its inputs are unchanged."""
    from registry.validation import accept_finding as accept

    return accept(database, as_id(finding_id, "finding"), reason, actor=actor_name(actor))
