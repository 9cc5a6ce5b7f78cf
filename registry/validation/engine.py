"""Run the rules over loaded data and give each finding the hash of what it was computed from.

``inputs_hash`` = sha256(rule id, rule version, the rule's configuration, a digest of every
column the rules read about the measurement, and the finding's own context). A stored finding
whose hash is unchanged is the same finding: it keeps its date and any acceptance.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Sequence

import pandas as pd

from registry.validation.base import CheckConfig, Finding, Rule
from registry.validation.data import CheckData
from registry.validation.rule_activation import (
    ArrheniusEnergyFromEnthalpy,
    FreeEnergyFromEnthalpyEntropy,
)
from registry.validation.rule_coalescence import CoalescenceBarrier
from registry.validation.rule_plausibility import (
    BarrierInMethodRange,
    PpmConvertedAtObserveFrequency,
    ShiftMatchesField,
)
from registry.validation.rule_refit import ActivationRefit
from registry.validation.rule_structure import RepeatsAgree, StructureParses
from registry.validation.rule_temperatures import (
    CoalescenceInMeasuredRange,
    SolventLiquidRange,
    TemperatureAboveZero,
    TemperatureRangeOrder,
)

#: every rule, in the order findings are listed
RULES: tuple[Rule, ...] = (
    CoalescenceBarrier(),
    FreeEnergyFromEnthalpyEntropy(),
    ActivationRefit(),
    ArrheniusEnergyFromEnthalpy(),
    TemperatureAboveZero(),
    TemperatureRangeOrder(),
    CoalescenceInMeasuredRange(),
    SolventLiquidRange(),
    BarrierInMethodRange(),
    ShiftMatchesField(),
    PpmConvertedAtObserveFrequency(),
    StructureParses(),
    RepeatsAgree(),
)


def rule_by_id(rule_id: str) -> Rule | None:
    return next((r for r in RULES if r.id == rule_id), None)


def run_rules(data: CheckData, config: CheckConfig, rules: Sequence[Rule] = RULES) -> list[Finding]:
    """All findings of ``rules`` on ``data``, each with its ``inputs_hash``."""
    raw: list[tuple[Rule, str, Finding]] = []
    for rule in rules:
        params = json.dumps(rule.params(config), sort_keys=True, default=list)
        raw.extend((rule, params, f) for f in rule.run(data, config))
    if not raw:
        return []
    index = pd.Index(data.m["id"])
    positions = index.get_indexer([f.measurement_id for _, _, f in raw])
    digests = data.digests(positions.tolist())
    out = []
    for (rule, params, finding), pos in zip(raw, positions.tolist(), strict=True):
        body = f"{rule.id}|{rule.version}|{params}|{digests[pos]}|{finding.context}"
        # the engine stamps the hash once, before the finding leaves it (cheaper than replace())
        object.__setattr__(finding, "inputs_hash", hashlib.sha256(body.encode()).hexdigest())
        out.append(finding)
    return out
