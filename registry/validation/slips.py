"""The usual slips behind a coalescence barrier that does not match its data, and how to spot them.

Each slip recomputes ΔG‡ from the stored data with one thing done the wrong way. A slip is
named only when it reproduces the reported number within the same tolerance the check used;
when several do, all are named, best first (slips without a free choice before those that pick
a field or a temperature from a list, then by closeness). The list mirrors the errors that
recur in the dynamic-NMR literature (common practice, no source): unit mix-ups, Celsius taken
for kelvin, ppm taken for Hz, the wrong k_c expression, log10 for ln, the wrong temperature,
and a factor in k — k_ex for k_AB, k_rac for k_enant, a statistical factor
(:mod:`.conventions`; which of them can apply depends on the convention the entry records).
Where a factor slip reproduces the number, k_c = πΔν and 2πΔν — which sit RT·ln√2 on either
side of a factor 2 — are named only if they do so as well (:data:`NAMING_MARGIN_KJ_MOL`): an
RT·ln 2 difference is a factor 2 in k, not both k_c forms at once.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import NDArray

from registry.validation import conventions
from registry.validation.coalescence_model import (
    CoalescenceInputs,
    Recomputed,
    on_basis,
    rates,
    recompute,
    stack,
)

Array = NDArray[np.float64]


@lru_cache(maxsize=1)
def _constants() -> tuple[float, float, float]:
    """0 °C in kelvin, kJ per kcal, and 25 °C in kelvin (the temperature a barrier is wrongly
    evaluated at in one slip), through the unit registry, not inline; loaded when a barrier is
    first diagnosed, so a check that flags nothing does not load the unit registry."""
    from registry.record import units

    return (
        units.convert(0.0, "degC", "K"),
        units.convert(1.0, "kcal/mol", "kJ/mol"),
        units.convert(25.0, "degC", "K"),
    )


@dataclass(frozen=True)
class Candidate:
    """A slip's ΔG‡ for each row (NaN where it cannot apply) and a per-row detail for the text."""

    values: Array
    detail: list[str]


@dataclass(frozen=True)
class Slip:
    id: str
    #: True when the slip picks something from a list (a field, a temperature) to fit
    parametric: bool
    compute: Callable[[CoalescenceInputs, Recomputed, tuple[float, ...]], Candidate]


def _best(inp: CoalescenceInputs, options: list[tuple[Array, list[str]]]) -> Candidate:
    """Per row, the option closest to the reported value."""
    n = inp.tc_k.size
    values = np.full(n, np.nan)
    detail = [""] * n
    best = np.full(n, np.inf)
    for vals, texts in options:
        dist = np.abs(inp.reported_kj_mol - vals)
        better = np.isfinite(dist) & (dist < best)
        for i in np.flatnonzero(better):
            detail[i] = texts[i]
        values = np.where(better, vals, values)
        best = np.where(better, dist, best)
    return Candidate(values, detail)


def _nearest(inp: CoalescenceInputs, **kwargs: object) -> Array:
    return recompute(inp, **kwargs).nearest(inp.reported_kj_mol)[0]  # type: ignore[arg-type]


def _same_rates(correct: Recomputed) -> tuple[Array, Array]:
    """The correct rates, for a slip that changes only the temperature or the k_c factor."""
    return correct.k1_per_s, correct.k2_per_s


def _nearest_of_each(
    versions: list[CoalescenceInputs], t_eyring_k: list[Array] | None = None, **kwargs: object
) -> list[Array]:
    """:func:`_nearest` of several versions of the rows, recomputed in one pass."""
    n = versions[0].tc_k.size
    t = None if t_eyring_k is None else np.concatenate(t_eyring_k)
    values = _nearest(stack(versions), t_eyring_k=t, **kwargs)
    return [values[i * n : (i + 1) * n] for i in range(len(versions))]


def _scaled(inp: CoalescenceInputs, correct: Recomputed, factor: float) -> Array:
    """Both directions' barriers times ``factor``, whichever is nearer the reported value."""
    scaled = correct.with_barriers(correct.dg1_kj_mol * factor, correct.dg2_kj_mol * factor)
    return scaled.nearest(inp.reported_kj_mol)[0]


def _kcal_as_kj(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    values = _scaled(inp, correct, 1.0 / _constants()[1])
    return Candidate(values, ["a kcal/mol value labelled kJ/mol"] * values.size)


def _kj_as_kcal(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    values = _scaled(inp, correct, _constants()[1])
    return Candidate(values, ["a kJ/mol value labelled kcal/mol"] * values.size)


def _tc_celsius_as_kelvin(
    inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]
) -> Candidate:
    t = inp.tc_k - _constants()[0]
    t = np.where(t > 0, t, np.nan)
    values = _nearest(inp, t_eyring_k=t, rates_per_s=_same_rates(correct))
    detail = [
        f"Tc in °C put into the Eyring equation as kelvin (T = {x:.1f} 'K')" for x in t.tolist()
    ]
    return Candidate(values, detail)


def _tc_celsius_labelled_kelvin(
    inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]
) -> Candidate:
    t = inp.tc_k + _constants()[0]
    values = _nearest(inp.with_(tc_k=t), t_eyring_k=t)
    detail = [
        f"Tc written in K but really in °C (the barrier fits Tc = {x:.1f} K)" for x in t.tolist()
    ]
    return Candidate(values, detail)


def _dnu_ppm_as_hz(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    with np.errstate(invalid="ignore", divide="ignore"):
        ppm = np.where(inp.field_mhz > 0, inp.dnu_hz / inp.field_mhz, np.nan)
    values = _nearest(inp.with_(dnu_hz=ppm))
    detail = [f"Δν in ppm ({x:.3g}) used as if it were Hz" for x in ppm.tolist()]
    return Candidate(values, detail)


def _dnu_other_field(
    inp: CoalescenceInputs, correct: Recomputed, fields: tuple[float, ...]
) -> Candidate:
    versions = []
    for f in fields:
        with np.errstate(invalid="ignore", divide="ignore"):
            scale = np.where(
                (inp.field_mhz > 0) & (np.abs(inp.field_mhz - f) > 1.0), f / inp.field_mhz, np.nan
            )
        versions.append(inp.with_(dnu_hz=inp.dnu_hz * scale))
    options = []
    for f, vals in zip(fields, _nearest_of_each(versions), strict=True):
        texts = [
            f"Δν in Hz read at {f:g} MHz, not at the stated {fm:g} MHz"
            for fm in inp.field_mhz.tolist()
        ]
        options.append((vals, texts))
    return _best(inp, options)


def _coupled_as_uncoupled(
    inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]
) -> Candidate:
    coupled = inp.coupled
    values = np.full(coupled.size, np.nan)
    if coupled.any():
        values = np.where(coupled, _nearest(inp.with_(j_hz=np.zeros_like(inp.j_hz))), np.nan)
    detail = [
        f"the coupled AB pair (J = {j:.1f} Hz) treated with the uncoupled k_c = πΔν/√2"
        for j in inp.j_hz.tolist()
    ]
    return Candidate(values, detail)


def _populations_ignored(
    inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]
) -> Candidate:
    """Only where the entry records which direction its barrier refers to: the equal-population
    value lies within ~0.4 kJ/mol of the barrier for leaving the minor site at every ratio, so
    without a direction that value is a correct barrier and the slip cannot be told from it."""
    unequal = inp.unequal & (inp.direction > 0)
    values = np.full(unequal.size, np.nan)
    if unequal.any():
        values = np.where(unequal, _nearest(inp.with_(ratio=np.ones_like(inp.ratio))), np.nan)
    detail = [
        f"the unequal populations ({r:.2f}:1) treated with the equal-population formula"
        for r in inp.ratio.tolist()
    ]
    return Candidate(values, detail)


def _kc_pi(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    values = _nearest(inp, kc_scale=float(np.sqrt(2.0)), rates_per_s=_same_rates(correct))
    return Candidate(values, ["k_c taken as πΔν instead of πΔν/√2"] * values.size)


def _kc_2pi(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    values = _nearest(inp, kc_scale=float(2.0 * np.sqrt(2.0)), rates_per_s=_same_rates(correct))
    return Candidate(values, ["k_c taken as 2πΔν instead of πΔν/√2"] * values.size)


def _log10(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
    values = _nearest(inp, log10=True, rates_per_s=_same_rates(correct))
    return Candidate(values, ["log10 used where ln belongs in the Eyring equation"] * values.size)


def _other_temperature(
    inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]
) -> Candidate:
    options = []
    standard = _constants()[2]
    with np.errstate(invalid="ignore"):
        t_std = np.where(np.abs(inp.tc_k - standard) > 2.0, standard, np.nan)
        t_stated = np.where(np.abs(inp.dg_t_k - inp.tc_k) > 2.0, inp.dg_t_k, np.nan)
    k1, k2 = _same_rates(correct)
    both = _nearest_of_each(
        [inp, inp], [t_std, t_stated], rates_per_s=(np.r_[k1, k1], np.r_[k2, k2])
    )
    for t, vals in zip((t_std, t_stated), both, strict=True):
        texts = [
            f"ΔG‡ evaluated at {x:.1f} K with the rate at Tc ({tc:.1f} K)"
            for x, tc in zip(t.tolist(), inp.tc_k.tolist(), strict=True)
        ]
        options.append((vals, texts))
    return _best(inp, options)


#: factor slips that take the sum of both directions for one direction's k, and the reverse
_TO_SUM = ("k-exchange-as-per-site", "racemization-as-enantiomerization")
_TO_ONE = ("k-per-site-as-exchange", "enantiomerization-as-racemization")

SlipFunction = Callable[[CoalescenceInputs, Recomputed, tuple[float, ...]], Candidate]


def _factor_slip(slip_id: str) -> SlipFunction:
    """The coalescence form of a factor slip of :mod:`.conventions` (the barrier from k·f),
    for the rows whose recorded convention and degeneracy allow it."""

    def compute(inp: CoalescenceInputs, correct: Recomputed, _f: tuple[float, ...]) -> Candidate:
        n = inp.tc_k.size
        options: dict[float, tuple[NDArray[np.bool_], list[str]]] = {}
        for i, (conv, sigma) in enumerate(zip(inp.convention, inp.degeneracy, strict=True)):
            for found, factor, text in conventions.factor_options(conv, float(sigma)):
                if found == slip_id:
                    mask, texts = options.setdefault(factor, (np.zeros(n, bool), [""] * n))
                    mask[i], texts[i] = True, text
        if not options:
            return Candidate(np.full(n, np.nan), [""] * n)
        k1, k2 = _same_rates(correct)
        if slip_id in _TO_ONE:  # one direction's k where the sum belongs
            k1, k2 = on_basis(inp.with_(summed=np.zeros(n, dtype=bool)), *rates(inp))
        factors = list(options)
        versions = [
            (k1 + k2, k1 + k2) if slip_id in _TO_SUM else (k1, k2) if slip_id in _TO_ONE
            else (k1 * f, k2 * f)
            for f in factors
        ]  # fmt: skip
        values = _nearest_of_each([inp] * len(factors), rates_per_s=(
            np.concatenate([v[0] for v in versions]), np.concatenate([v[1] for v in versions])
        ))  # fmt: skip
        return _best(inp, [(np.where(options[f][0], vals, np.nan), options[f][1])
                           for f, vals in zip(factors, values, strict=True)])  # fmt: skip

    return compute


SLIPS: tuple[Slip, ...] = (
    Slip("kcal-as-kj", False, _kcal_as_kj),
    Slip("kj-as-kcal", False, _kj_as_kcal),
    Slip("tc-celsius-as-kelvin", False, _tc_celsius_as_kelvin),
    Slip("tc-celsius-labelled-kelvin", False, _tc_celsius_labelled_kelvin),
    Slip("dnu-ppm-as-hz", False, _dnu_ppm_as_hz),
    Slip("coupled-as-uncoupled", False, _coupled_as_uncoupled),
    Slip("populations-ignored", False, _populations_ignored),
    Slip("kc-pi-dnu", False, _kc_pi),
    Slip("kc-2pi-dnu", False, _kc_2pi),
    Slip("log10-for-ln", False, _log10),
    *(
        Slip(slip_id, slip_id == conventions.STATISTICAL_FACTOR, _factor_slip(slip_id))
        for slip_id in conventions.FACTOR_SLIP_IDS
    ),
    Slip("dnu-other-field", True, _dnu_other_field),
    Slip("dg-other-temperature", True, _other_temperature),
)

#: every slip a rule can name: the coalescence ones, and those only raw data can show
SLIP_IDS = (*(s.id for s in SLIPS), "t1-kind-swapped", "time-unit")

#: slips whose recomputed ΔG‡ lies further than this beyond the best one's from the reported
#: value are not named. A slip is arithmetic on the very numbers stored, so the true one
#: reproduces the report to its rounding; the margin is half of RT·ln√2 (0.49 kJ/mol at
#: 170 K), what separates k_c = πΔν (×√2) and 2πΔν (×2√2) from a factor 2 in k
#: (common practice, no source)
NAMING_MARGIN_KJ_MOL = 0.25
#: the k_c slips that sit RT·ln√2 on either side of a factor 2 in k
_KC_FORMS = ("kc-pi-dnu", "kc-2pi-dnu")


@dataclass(frozen=True)
class Diagnosis:
    """For each row: the slips that reproduce the reported ΔG‡, best first."""

    slips: list[tuple[str, ...]]
    details: list[tuple[str, ...]]
    values_kj_mol: list[tuple[float, ...]]


def diagnose(
    inp: CoalescenceInputs,
    correct: Recomputed,
    tolerance_kj_mol: Array,
    fields_mhz: tuple[float, ...],
) -> Diagnosis:
    """Which slips reproduce ``inp.reported_kj_mol`` within ``tolerance_kj_mol`` (per row)."""
    n = inp.tc_k.size
    found: list[list[Hit]] = [[] for _ in range(n)]
    for slip in SLIPS:
        cand = slip.compute(inp, correct, fields_mhz)
        resid = np.abs(inp.reported_kj_mol - cand.values)
        ok = np.isfinite(resid) & (resid <= tolerance_kj_mol)
        for i in np.flatnonzero(ok):
            found[i].append(
                (
                    int(slip.parametric),
                    float(resid[i]),
                    slip.id,
                    cand.detail[i],
                    float(cand.values[i]),
                )
            )
    slips, details, values = [], [], []
    for hits in found:
        hits = choose(hits)
        slips.append(tuple(h[2] for h in hits))
        details.append(tuple(h[3] for h in hits))
        values.append(tuple(h[4] for h in hits))
    return Diagnosis(slips, details, values)


#: one slip that reproduces a reported value: (1 if it picks from a list else 0, |residual|,
#: slip id, detail, the slip's ΔG‡ in kJ/mol)
Hit = tuple[int, float, str, str, float]


def choose(hits: list[Hit]) -> list[Hit]:
    """The slips worth naming among those that reproduce one row's value, best first: a
    statistical factor the entry does not record only when nothing else explains it, a factor
    in k only if as good as the best other explanation, and the k_c forms only if as good as
    a factor in k (the rules of this module's docstring; the raw-data rule uses them too)."""
    if any(h[2] != conventions.STATISTICAL_FACTOR for h in hits):
        hits = [h for h in hits if h[2] != conventions.STATISTICAL_FACTOR]
    if hits:
        best = min(h[1] for h in hits)
        hits = [h for h in hits if h[2] not in conventions.FACTOR_SLIP_IDS
                or h[1] <= best + NAMING_MARGIN_KJ_MOL]  # fmt: skip
    factors = [h[1] for h in hits if h[2] in conventions.FACTOR_SLIP_IDS]
    if factors:
        best = min(factors)
        hits = [h for h in hits
                if h[2] not in _KC_FORMS or h[1] <= best + NAMING_MARGIN_KJ_MOL]  # fmt: skip
    return sorted(hits, key=lambda h: (h[0], h[1]))
