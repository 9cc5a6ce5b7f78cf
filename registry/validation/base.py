"""What every validation rule shares: its configuration, the finding it emits, and its shape.

A rule is a small class with a stable ``id`` of our own, an integer ``version`` (raise it whenever
the rule's logic or wording changes, so stored findings are recomputed), a ``severity`` and a
``run`` method that looks at a whole :class:`~registry.validation.data.CheckData` (numpy
columns for every measurement checked: one row when ``add`` checks, all of them when ``check``
does — the same code decides both) and returns findings for the rows it flags.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from dataclasses import asdict, dataclass, field
from datetime import datetime
from typing import TYPE_CHECKING, Any, ClassVar

if TYPE_CHECKING:
    from registry.validation.data import CheckData

SEVERITIES = ("error", "warning", "note")
SEVERITY_RANK = {"error": 0, "warning": 1, "note": 2}

#: 1H shift range of ordinary organic compounds is ~15 ppm; the others scale with their shift
#: ranges (common practice, no source). Keys are normalized nucleus names ('1H', '13C' …).
DEFAULT_MAX_SHIFT_PPM: dict[str, float] = {
    "1H": 15.0,
    "2H": 15.0,
    "13C": 250.0,
    "15N": 900.0,
    "19F": 400.0,
    "29Si": 400.0,
    "31P": 600.0,
    "11B": 200.0,
    "7Li": 30.0,
}

#: spectrometer (1H) frequencies of the magnets in common use since the 1980s, MHz; the fields
#: tried when diagnosing "Δν read at a different field" (common practice, no source)
STANDARD_FIELDS_MHZ: tuple[float, ...] = (200.0, 250.0, 300.0, 400.0, 500.0, 600.0, 700.0, 800.0,
                                          900.0, 1000.0)  # fmt: skip


@dataclass(frozen=True)
class CheckConfig:
    """Tolerances and limits of the rules; every value a rule reads goes into its findings' hash."""

    #: base tolerance of recomputed-vs-reported ΔG‡ before adding the propagated uncertainty
    dg_tolerance_kj_mol: float = 1.0
    #: how many standard uncertainties widen a tolerance (1 = one σ)
    coverage: float = 1.0
    #: when ΔG‡ is quoted at T ≠ Tc, allow |T − Tc|·this for an unknown ΔS‡, J/(mol·K)
    #: (common practice, no source: |ΔS‡| of conformational processes is usually small)
    ds_allowance_j_mol_k: float = 10.0
    #: reported ΔH‡ against the refit of the stored rate points
    dh_tolerance_kj_mol: float = 2.0
    #: reported ΔS‡ against the refit of the stored rate points
    ds_tolerance_j_mol_k: float = 6.0
    #: Ea against ΔH‡ + RT
    ea_tolerance_kj_mol: float = 1.0
    #: fewest rate points worth refitting
    min_rate_points: int = 3
    #: the range dynamic NMR can measure (common practice, no source)
    nmr_barrier_min_kj_mol: float = 20.0
    nmr_barrier_max_kj_mol: float = 100.0
    #: rounding slack on the solvent's melting and boiling points
    liquid_range_slack_k: float = 1.0
    #: Tc may sit this far outside the stated temperature range (rounding)
    tc_range_slack_k: float = 1.0
    #: largest plausible Δν per nucleus, ppm
    max_shift_ppm: dict[str, float] = field(default_factory=lambda: dict(DEFAULT_MAX_SHIFT_PPM))
    #: repeated measurements are compared only when quoted within this many kelvin of each other
    duplicate_max_dt_k: float = 20.0
    #: fields to try when diagnosing "Δν read at a different field"
    standard_fields_mhz: tuple[float, ...] = STANDARD_FIELDS_MHZ

    def as_dict(self) -> dict[str, Any]:
        return asdict(self)


@dataclass(frozen=True)
class Finding:
    """One thing one rule found about one measurement, with values in the user's unit."""

    measurement_id: int
    rule_id: str
    rule_version: int
    severity: str
    message: str
    reported: float | None = None
    recomputed: float | None = None
    difference: float | None = None
    unit: str | None = None
    likely_cause: str | None = None
    #: slip ids named in ``likely_cause``, best fit first
    slips: tuple[str, ...] = ()
    #: what else (beyond the measurement's own data) the finding depends on; part of the hash
    context: str = ""
    # filled in when stored
    id: int | None = None
    inputs_hash: str | None = None
    found_at: datetime | None = None
    new: bool = False
    accepted_by: str | None = None
    accepted_at: datetime | None = None
    accept_reason: str | None = None

    @property
    def accepted(self) -> bool:
        return self.accepted_by is not None

    def as_dict(self) -> dict[str, Any]:
        """The JSON form: one object per finding."""
        return {
            "id": self.id,
            "measurement_id": self.measurement_id,
            "rule": self.rule_id,
            "rule_version": self.rule_version,
            "severity": self.severity,
            "message": self.message,
            "reported": self.reported,
            "recomputed": self.recomputed,
            "difference": self.difference,
            "unit": self.unit,
            "likely_cause": self.likely_cause,
            "slips": list(self.slips),
            "new": self.new,
            "found_at": self.found_at,
            "accepted_by": self.accepted_by,
            "accepted_at": self.accepted_at,
            "accept_reason": self.accept_reason,
        }


class Rule(ABC):
    """Base class of a validation rule. Subclasses set the class attributes and ``run``."""

    id: ClassVar[str]
    version: ClassVar[int]
    severity: ClassVar[str]
    title: ClassVar[str]
    #: names of the :class:`CheckConfig` fields this rule reads (hashed into its findings)
    uses: ClassVar[tuple[str, ...]] = ()

    def params(self, config: CheckConfig) -> dict[str, Any]:
        return {name: getattr(config, name) for name in self.uses}

    @abstractmethod
    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        """Every finding of this rule over the loaded measurements."""

    def finding(self, measurement_id: int, message: str, **values: Any) -> Finding:
        """A finding of this rule (severity defaults to the rule's own)."""
        severity = values.pop("severity", self.severity)
        return Finding(
            measurement_id=int(measurement_id),
            rule_id=self.id,
            rule_version=self.version,
            severity=severity,
            message=message,
            **values,
        )


def fnum(value: float, digits: int = 1) -> str:
    """A number for a message: fixed decimals, no '-0.0'."""
    text = f"{value:.{digits}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text


def opt(value: Any) -> float | None:
    """A float for storage: None for NaN/None."""
    if value is None:
        return None
    v = float(value)
    return None if v != v else v
