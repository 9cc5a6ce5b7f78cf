"""Which rate constant a barrier means, and how the probe temperature was known: the readers.

A barrier is RT·ln(κ·k_B·T/(h·k)) of *some* rate constant k, and the trade uses several that
differ by whole factors: the per-site k_AB (one molecule leaving one site: Gutowsky–Holm's k_c,
the k of a line-shape fit), the exchange rate constant k_ex = k_AB + k_BA, an observed or
relaxation rate (k_obs = k_forward + k_reverse, what a time course decays with), k_enant and
k_rac = 2·k_enant. A factor 2 in k moves ΔG‡ by RT·ln 2 (1.73 kJ/mol at 300 K), as large as a
real difference between two compounds, so a measurement records which one it means
(:data:`RATE_CONVENTIONS`), its path degeneracy (statistical factor σ: the barrier of one path
is that of k/σ), the transmission coefficient κ and the reaction order (a bimolecular exchange
gives k₂ = k_obs/[X] in M⁻¹ s⁻¹, and its ΔG‡ refers to the 1 M standard state).

**What an entry without a convention means.** Nothing is guessed into the registry: the
column stays empty (existing rows included) and is shown as "unspecified". The checks read an
unspecified entry as per-site (:data:`DEFAULT_CONVENTION`) — the rate constant the coalescence
formula gives and the one a line-shape fit reports — and say so where it matters.

The probe temperature: :data:`CALIBRATIONS` are the usual ways of knowing it, each with the
standard uncertainty it gives an entry that states none (:func:`read_calibration`).
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass

from registry.errors import UnitError
from registry.record.spelling import fold

#: the rate constants a measurement may mean
RATE_CONVENTIONS: dict[str, str] = {
    "per-site": "k_AB: one molecule leaving one site (k_c of coalescence, a line-shape fit's k)",
    "exchange": "k_ex = k_AB + k_BA: the exchange rate constant of a two-site exchange",
    "observed": "an observed or relaxation rate constant, k_obs = k_forward + k_reverse",
    "enantiomerization": "k_enant: one enantiomer turning into the other",
    "racemization": "k_rac = 2·k_enant: the rate at which the enantiomeric excess decays",
}

#: what the checks read an entry without a convention as (the column itself stays empty)
DEFAULT_CONVENTION = "per-site"

#: conventions whose k is the sum of both directions of a two-site process (k_AB + k_BA):
#: with equal populations twice the per-site k
SUMMED = frozenset({"exchange", "observed", "racemization"})

#: folded spellings → convention
_CONVENTION_SPELLINGS: dict[str, str] = {
    **dict.fromkeys(
        ("persite", "kab", "kba", "k12", "kpersite", "forward", "kf", "kforward",
         "onesite", "sitetosite", "kpersiteab"),
        "per-site",
    ),
    **dict.fromkeys(
        ("exchange", "kex", "kexch", "kexchange", "exchangerate", "kabkba", "kexchangerate"),
        "exchange",
    ),
    **dict.fromkeys(
        ("observed", "kobs", "kobsd", "obs", "relaxation", "krelax", "relaxationrate",
         "apparent", "kapp", "observedrate"),
        "observed",
    ),
    **dict.fromkeys(
        ("enantiomerization", "enantiomerisation", "kenant", "kenantiomerization", "enant",
         "kenantiomerisation"),
        "enantiomerization",
    ),
    **dict.fromkeys(
        ("racemization", "racemisation", "krac", "rac", "kracemization", "kracemisation"),
        "racemization",
    ),
}  # fmt: skip

#: which direction a barrier of unequally populated sites refers to
DIRECTIONS: dict[str, str] = {
    "major-to-minor": "leaving the major site (the higher barrier)",
    "minor-to-major": "leaving the minor site (the lower barrier)",
}
_DIRECTION_SPELLINGS: dict[str, str] = {
    **dict.fromkeys(
        ("majortominor", "majorminor", "frommajor", "leavingmajor", "leavingthemajorsite",
         "majorsite", "higher", "higherbarrier", "ab"),
        "major-to-minor",
    ),
    **dict.fromkeys(
        ("minortomajor", "minormajor", "fromminor", "leavingminor", "leavingtheminorsite",
         "minorsite", "lower", "lowerbarrier", "ba"),
        "minor-to-major",
    ),
}  # fmt: skip


def _listed(names: object) -> str:
    return ", ".join(str(n) for n in names)  # type: ignore[attr-defined]


def _refuse(field: str, text: str, what: str, names: list[str], keys: dict[str, str]) -> None:
    near = difflib.get_close_matches(fold(text), list(keys), n=2, cutoff=0.75)
    hint = f"; did you mean {' or '.join(dict.fromkeys(keys[k] for k in near))}?" if near else ""
    raise UnitError(field, text, f"unknown {what}{hint} (one of {_listed(names)})")


def read_convention(text: str, field: str = "convention") -> str:
    """``kex``, ``k_ex``, ``k(AB)``, ``racemisation`` … → the convention's name."""
    found = _CONVENTION_SPELLINGS.get(fold(text))
    if found is None:
        _refuse(field, text, "rate-constant convention", list(RATE_CONVENTIONS),
                _CONVENTION_SPELLINGS)  # fmt: skip
    return found  # type: ignore[return-value]


def convention_of_header(key: str) -> str | None:
    """The convention a rate column's folded header names (``kex`` → exchange), else None."""
    return _CONVENTION_SPELLINGS.get(key)


def read_direction(text: str, field: str = "direction") -> str:
    """``major→minor``, ``from the minor site``, ``higher barrier`` … → the direction's name."""
    key = fold(text)
    if text.strip() in DIRECTIONS:
        return text.strip()
    found = _DIRECTION_SPELLINGS.get(key) or _DIRECTION_SPELLINGS.get(key.replace("to", ""))
    if found is None:
        _refuse(field, text, "direction", list(DIRECTIONS), _DIRECTION_SPELLINGS)
    return found  # type: ignore[return-value]


_WHOLE = re.compile(r"^\s*[+]?(\d+)(?:\.0*)?\s*$")


def read_degeneracy(text: str, field: str = "degeneracy") -> int:
    """The path degeneracy (statistical factor σ): a whole number ≥ 1."""
    m = _WHOLE.match(str(text))
    if not m or int(m.group(1)) < 1:
        raise UnitError(field, str(text), "the path degeneracy is a whole number ≥ 1, e.g. 2")
    value = int(m.group(1))
    if value > 1000:
        raise UnitError(field, str(text), "a path degeneracy above 1000 is not plausible")
    return value


_ORDERS = {
    "1": 1, "first": 1, "firstorder": 1, "unimolecular": 1, "1storder": 1, "1st": 1,
    "2": 2, "second": 2, "secondorder": 2, "bimolecular": 2, "2ndorder": 2, "2nd": 2,
}  # fmt: skip


def read_order(text: str, field: str = "order") -> int:
    """The reaction order of the exchange: 1 (intramolecular) or 2 (bimolecular)."""
    raw = str(text).strip()
    key = fold(raw.removesuffix(".0")) if re.fullmatch(r"\d\.0", raw) else fold(raw)
    if key not in _ORDERS:
        raise UnitError(
            field, raw, "the reaction order is 1 (first order) or 2 (bimolecular exchange)"
        )
    return _ORDERS[key]


# ---------------------------------------------------------------- temperature calibration


@dataclass(frozen=True)
class Calibration:
    """One way of knowing the sample temperature, and what it gives an entry by default."""

    name: str
    description: str
    #: the standard uncertainty of a temperature so calibrated, K (when the entry gives none)
    sigma_k: float
    #: the range over which the calibrant is used, K (None: no such limit)
    range_k: tuple[float, float] | None
    source: str


#: the default σ(T) of each calibration; see each source
CALIBRATIONS: dict[str, Calibration] = {
    "methanol": Calibration(
        "methanol",
        "the shift difference of neat methanol's OH and CH3 signals",
        0.5,  # common practice, no source: the curve is good to a few 0.1 K; gradients add
        (178.0, 330.0),  # A. L. Van Geet, Anal. Chem. 42, 679 (1970); from memory
        "A. L. Van Geet, Anal. Chem. 40, 2227 (1968) and 42, 679 (1970); σ: common practice",
    ),
    "ethylene-glycol": Calibration(
        "ethylene-glycol",
        "the shift difference of (80 % or neat) ethylene glycol's OH and CH2 signals",
        0.5,  # common practice, no source
        (273.0, 416.0),  # A. L. Van Geet, Anal. Chem. 40, 2227 (1968); from memory
        "A. L. Van Geet, Anal. Chem. 40, 2227 (1968); σ: common practice",
    ),
    "thermocouple": Calibration(
        "thermocouple",
        "a thermocouple or resistance thermometer in the probe's gas stream or a dummy tube",
        1.0,  # common practice, no source: it reads the gas, not the sample
        None,
        "common practice, no source",
    ),
    "none": Calibration(
        "none",
        "not calibrated or not known: the VT unit's set point or display",
        2.0,  # common practice, no source: displays are often off by several K far from 298 K
        None,
        "common practice, no source",
    ),
    "other": Calibration(
        "other",
        "another calibration, described in the text",
        1.0,  # common practice, no source
        None,
        "common practice, no source",
    ),
}

_CALIBRATION_SPELLINGS: dict[str, str] = {
    **dict.fromkeys(("methanol", "meoh", "ch3oh", "cd3od", "methanolthermometer",
                     "neatmethanol", "methanolshift"), "methanol"),
    **dict.fromkeys(("ethyleneglycol", "glycol", "eg", "ethanediol", "12ethanediol",
                     "80ethyleneglycol", "ethyleneglycolthermometer", "80glycol",
                     "ethyleneglycol80", "ethyleneglycolindmsod6", "80ethyleneglycolindmsod6"),
                    "ethylene-glycol"),
    **dict.fromkeys(("thermocouple", "tc", "thermometer", "pt100", "rtd", "sensor",
                     "resistancethermometer", "probethermocouple", "externalthermometer"),
                    "thermocouple"),
    **dict.fromkeys(("none", "unknown", "uncalibrated", "notcalibrated", "nocalibration",
                     "nominal", "setpoint", "display", "na", "notknown", "unspecified"),
                    "none"),
    "other": "other",
}  # fmt: skip

_SIGMA = re.compile(
    r"(?:±|\+/-|\+-|σ\s*=?|sigma\s*=?|u\s*=)\s*(?P<num>\d+(?:[.,]\d*)?|[.,]\d+)\s*"
    r"(?P<unit>K|°C|ºC|degC|C|mK)?\b",
    re.I,
)


@dataclass(frozen=True)
class CalibrationReading:
    """A calibration text read: the calibration, σ(T) in K and whether σ was the default."""

    name: str
    sigma_k: float
    default_sigma: bool
    text: str


def read_calibration(text: str, field: str = "calibration") -> CalibrationReading:
    """``methanol``, ``80% ethylene glycol ± 0.3 K``, ``thermocouple (±1 °C)``, ``none`` …

    The words name the calibration; an uncertainty written with ``±`` (K, °C or mK; a
    temperature *difference*, so °C and K are the same size) sets σ(T), otherwise the
    calibration's default applies. A text naming none of the known calibrations is ``other``
    (the text says what it was) unless it is a near miss of one (``methnol``): then it is refused
    with the suggestion.
    """
    raw = str(text).strip()
    if not raw:
        raise UnitError(field, raw, "empty calibration")
    sigma = None
    m = _SIGMA.search(raw)
    if m:
        number = float(m["num"].replace(",", "."))
        sigma = number / 1000.0 if (m["unit"] or "").lower() == "mk" else number
        if not (math.isfinite(sigma) and 0 < sigma <= 50):
            raise UnitError(field, raw, "σ(T) of a calibration must be above 0 and at most 50 K")
    words = _SIGMA.sub(" ", raw)
    words = re.sub(r"[()\[\]]", " ", words)
    name = _calibration_name(words, raw, field)
    cal = CALIBRATIONS[name]
    return CalibrationReading(name, cal.sigma_k if sigma is None else sigma, sigma is None, raw)


def _calibration_name(words: str, raw: str, field: str) -> str:
    key = fold(re.sub(r"\b\d+\s*%", " ", words))
    if not key:
        raise UnitError(field, raw, f"name the calibration ({_listed(CALIBRATIONS)})")
    if key in _CALIBRATION_SPELLINGS:
        return _CALIBRATION_SPELLINGS[key]
    if key.startswith("other"):
        return "other"
    for spelled, name in sorted(_CALIBRATION_SPELLINGS.items(), key=lambda kv: -len(kv[0])):
        if len(spelled) >= 5 and spelled in key:
            return name
    near = difflib.get_close_matches(key, list(_CALIBRATION_SPELLINGS), n=1, cutoff=0.8)
    if near:
        which = _CALIBRATION_SPELLINGS[near[0]]
        raise UnitError(
            field,
            raw,
            f"unknown calibration; did you mean {which}? (write 'other: …' for another kind)",
        )
    return "other"


def default_sigma_k(name: str | None) -> float | None:
    """σ(T) a calibration gives an entry that states none (None: no calibration recorded)."""
    return None if name is None else CALIBRATIONS[name].sigma_k


# ---------------------------------------------------------------- what a stored row records


def recorded(row: dict[str, object]) -> dict[str, object]:
    """What a stored measurement row records about its rate constant and temperatures, with
    the meaning of each and what the checks assume where nothing is recorded (for ``show``)."""
    name = row.get("k_convention")
    order = row.get("reaction_order")
    calibration = row.get("t_calibration")
    cal = CALIBRATIONS.get(str(calibration)) if calibration else None
    sigma = row.get("t_calibration_err_k")
    return {
        "convention": name,
        "convention_meaning": RATE_CONVENTIONS.get(str(name)) if name else None,
        "convention_read_as": name or DEFAULT_CONVENTION,
        "degeneracy": row.get("path_degeneracy"),
        "kappa": row.get("kappa"),
        "order": order,
        "concentration_m": row.get("concentration_m"),
        "standard_state": "1 M" if order == 2 else None,
        "direction": row.get("dg_direction"),
        "calibration": calibration,
        "calibration_sigma_k": sigma,
        "calibration_default_sigma": cal is not None
        and not _SIGMA.search(str(row.get("t_calibration_text") or "")),
        "calibration_range_k": cal.range_k if cal else None,
        "calibration_source": cal.source if cal else None,
    }
