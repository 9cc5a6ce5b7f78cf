"""Run the rules over loaded data and give each finding the hash of what it was computed from.

``inputs_hash`` = sha256(rule id, rule version, the rule's configuration, a digest of every
column the rules read about the measurement, and the finding's own context). A stored finding
whose hash is unchanged is the same finding: it keeps its date and any acceptance.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Callable, Sequence

from registry.validation.base import CheckConfig, Finding, Rule
from registry.validation.columns import present
from registry.validation.data import LEGACY_VARIANTS, CheckData
from registry.validation.rule_activation import (
    ArrheniusEnergyFromEnthalpy,
    FreeEnergyFromEnthalpyEntropy,
)
from registry.validation.rule_coalescence import CoalescenceBarrier
from registry.validation.rule_plausibility import (
    PpmConvertedAtObserveFrequency,
    ShiftMatchesField,
)
from registry.validation.rule_rates import BarrierInMethodRange, RateBelowLimit
from registry.validation.rule_rawdata import RawDataBarrier
from registry.validation.rule_refit import ActivationRefit
from registry.validation.rule_structure import RepeatsAgree, StructureParses
from registry.validation.rule_temperatures import (
    CoalescenceInMeasuredRange,
    SolventLiquidRange,
    TemperatureAboveZero,
    TemperatureRangeOrder,
)
from registry.validation.rule_vocabulary import SolventInTable

#: every rule, in the order findings are listed
RULES: tuple[Rule, ...] = (
    CoalescenceBarrier(),
    RawDataBarrier(),
    FreeEnergyFromEnthalpyEntropy(),
    ActivationRefit(),
    RateBelowLimit(),
    ArrheniusEnergyFromEnthalpy(),
    TemperatureAboveZero(),
    TemperatureRangeOrder(),
    CoalescenceInMeasuredRange(),
    SolventLiquidRange(),
    SolventInTable(),
    BarrierInMethodRange(),
    ShiftMatchesField(),
    PpmConvertedAtObserveFrequency(),
    StructureParses(),
    RepeatsAgree(),
)


def rule_by_id(rule_id: str) -> Rule | None:
    return next((r for r in RULES if r.id == rule_id), None)


def _params(rule: Rule, config: CheckConfig) -> str:
    return json.dumps(rule.params(config), sort_keys=True, default=list)


def _inputs_hash(rule: Rule, params: str, digest: str, context: str) -> str:
    body = f"{rule.id}|{rule.version}|{params}|{digest}|{context}"
    return hashlib.sha256(body.encode()).hexdigest()


def run_rules(data: CheckData, config: CheckConfig, rules: Sequence[Rule] = RULES) -> list[Finding]:
    """All findings of ``rules`` on ``data``, each with its ``inputs_hash``."""
    raw: list[tuple[Rule, str, Finding]] = []
    for rule in rules:
        found = rule.run(data, config)
        if found:
            params = _params(rule, config)
            raw.extend((rule, params, f) for f in found)
    if not raw:
        return []
    positions = data.positions([f.measurement_id for _, _, f in raw]).tolist()
    digests = data.digests(positions)
    for (rule, params, finding), pos in zip(raw, positions, strict=True):
        # the engine stamps the hash once, before the finding leaves it (cheaper than replace())
        object.__setattr__(
            finding, "inputs_hash", _inputs_hash(rule, params, digests[pos], finding.context)
        )
    return [f for _, _, f in raw]


def legacy_hashes(data: CheckData, config: CheckConfig) -> Callable[[Finding], list[str]]:
    """For a finding of this run, the hashes older checks stored for the same inputs (see
    :data:`registry.validation.data.LEGACY_VARIANTS`); empty where they were the same."""
    tc_text_missing = ~present(data.text("tc_text"))
    has_rates = data.rates.count > 0

    def hashes(finding: Finding) -> list[str]:
        rule = rule_by_id(finding.rule_id)
        (pos,) = data.positions([finding.measurement_id]).tolist()
        if rule is None or pos < 0:
            return []
        variants = [
            v
            for v in LEGACY_VARIANTS
            if ("tc-text-float" not in v or tc_text_missing[pos])
            and ("rate-count-int" not in v or has_rates[pos])
        ]
        params = _params(rule, config)
        return [
            _inputs_hash(rule, params, data.digests([pos], v)[pos], finding.context)
            for v in variants
        ]

    return hashes
