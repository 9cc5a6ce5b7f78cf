"""Validation: recompute every barrier from its raw data, and accept a finding with a reason."""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

from registry.api.registry import actor_name
from registry.errors import UsageError
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
    ``'0.2 kcal/mol'``, or kJ/mol); a check of the whole registry is recorded in the history.
    """
    from registry.record.units import parse_value
    from registry.validation import CheckConfig, check_measurements

    config = CheckConfig()
    if tolerance is not None:
        if isinstance(tolerance, str):
            value = parse_value(tolerance, "energy", field="tolerance").value
        else:
            value = float(tolerance)
        if not value > 0:
            raise UsageError(f"tolerance {tolerance!r}: must be positive")
        config = CheckConfig(dg_tolerance_kj_mol=value)
    return check_measurements(
        database, ids or None, actor=actor_name(actor), config=config, record_run=True
    )


def accept_finding(
    database: Database, finding_id: int, reason: str, *, actor: str | None = None
) -> Finding:
    """Accept one finding with a reason; it stays accepted while its inputs are unchanged."""
    from registry.validation import accept_finding as accept

    return accept(database, finding_id, reason, actor=actor_name(actor))
