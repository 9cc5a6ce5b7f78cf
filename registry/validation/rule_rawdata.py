"""Rule: the reported ΔG‡ against ΔG‡ recomputed from stored EXSY, transfer or course data.

The rate constants come from :mod:`.rawdata_model` (registry.kinetics computes them); the
barrier is the Eyring equation of the rate constant the entry's convention names, divided by
σ·c·κ (:func:`registry.validation.conventions.rate_basis`), at the temperature ΔG‡ is quoted
at (else the single temperature the entry states). Tolerance = ``dg_tolerance_kj_mol`` (the
floor) + coverage·√(σ_recomputed² + σ_reported²), σ_recomputed from the σ of k the computation
propagates and σ(T) as stated or as the temperature calibration gives it.

When the numbers disagree, each known slip recomputes the barrier with one thing done the
wrong way, and those that reproduce the reported value are named (the choice of
:func:`registry.validation.slips.choose`): k_ex for k_AB and back, k_rac for k_enant and back,
a path degeneracy or statistical factor, the other T1 in Forsén–Hoffman, equal populations for
unequal EXSY sites, a time unit (min, s, h; ms and s for mixing times and T1) and kcal/kJ.
An ee given in % where a fraction was meant is no slip here: ee decays to 0, so its scale
does not change k (and an ee outside −1…1 without '%' is refused when entered).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from registry.validation import conventions, slips
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.columns import present
from registry.validation.conventions import (
    RateBasis,
    basis_note,
    calibration_notes,
    default_t_sigma,
    rate_basis,
)
from registry.validation.data import CheckData
from registry.validation.rawdata_model import KIND_TITLES, NotRecomputed, Rates, kind_of, recompute
from registry.validation.reported import energy_units

#: the columns of a row the recomputation reads
_RAW = ("mixing_json", "volumes_json", "volume_err", "populations_json", "site_names",
        "ss_ratio", "ss_ratio_err", "t1_s", "t1_err_s", "t1_kind", "course_json", "x_eq")  # fmt: skip

#: time-unit slips: (kinds, factor on k, words); k scales as 1/time exactly for every method
TIME_SLIPS: tuple[tuple[frozenset[str], float, str], ...] = (
    (frozenset({"ee", "fraction", "inversion"}), 60.0, "times in min used as s"),
    (frozenset({"ee", "fraction", "inversion"}), 1 / 60.0, "times in s used as min"),
    (frozenset({"ee", "fraction", "inversion"}), 3600.0, "times in h used as s"),
    (frozenset({"ee", "fraction", "inversion"}), 1 / 3600.0, "times in s used as h"),
    (frozenset({"ee", "fraction", "inversion"}), 1 / 24.0, "times in h used as days"),
    (frozenset({"exsy", "saturation", "inversion"}), 1e-3, "times in ms used as s"),
    (frozenset({"exsy", "saturation", "inversion"}), 1e3, "times in s used as ms"),
)
#: EXSY populations that differ less than this (max/min) count as equal
_EQUAL_WITHIN = 1.02


def _rt(t_k: float) -> float:
    from registry.kinetics.constants import R_KJ_MOL_K

    return R_KJ_MOL_K * t_k


def _barrier(k: float, t_k: float, divisor: float) -> float:
    from registry.kinetics.eyring import eyring_barrier

    return float(eyring_barrier(k / divisor, t_k))


def _temperature(data: CheckData, i: int) -> float:
    """The temperature ΔG‡ refers to: as quoted, else the one temperature the entry states."""
    t = data.col("dg_t_k")[i]
    if np.isfinite(t):
        return float(t)
    lo, hi = data.col("t_min_k")[i], data.col("t_max_k")[i]
    if np.isfinite(lo) and np.isfinite(hi) and abs(hi - lo) < 0.05:
        return float(lo)
    return math.nan


class RawDataBarrier(Rule):
    """ΔG‡ as reported must match ΔG‡ recomputed from the stored raw data (module docstring)."""

    id = "raw-data-barrier"
    version = 1
    severity = "error"
    title = "ΔG‡ against the stored EXSY, transfer or time-course data"
    uses = ("dg_tolerance_kj_mol", "coverage")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        with np.errstate(invalid="ignore"):
            saturation = np.isfinite(data.col("ss_ratio")) & np.isfinite(data.col("t1_s"))
        has = present(data.text("volumes_json")) | present(data.text("course_json")) | saturation
        positions = np.flatnonzero(has)
        if positions.size == 0:
            return []
        rows = positions.tolist()
        basis = rate_basis(data, positions)
        t_err = default_t_sigma(data, positions, np.full(positions.size, np.nan))
        labels, factors = energy_units(
            data.text("dg_text")[positions], data.col("dg_kj_mol")[positions]
        )
        calibrated = calibration_notes(data, positions)
        out: list[Finding] = []
        for j, i in enumerate(rows):
            shown = (str(labels[j]), float(factors[j]))
            found = self._one(data, i, j, basis, float(t_err[j]), config, shown)
            if found is not None:
                message, values = found
                out.append(self.finding(int(data.ids[i]), message + calibrated[j], **values))
        return out

    @staticmethod
    def _row(data: CheckData, i: int) -> dict[str, Any]:
        row = {c: data.columns[c][i] for c in _RAW}
        return {k: (None if isinstance(v, float) and v != v else v) for k, v in row.items()}

    def _one(
        self, data: CheckData, i: int, j: int, basis: RateBasis, t_err: float,
        config: CheckConfig, shown: tuple[str, float],
    ) -> tuple[str, dict[str, Any]] | None:  # fmt: skip
        row = self._row(data, i)
        kind = str(kind_of(row))
        reported = float(data.col("dg_kj_mol")[i])
        t_k = _temperature(data, i)
        if not np.isfinite(reported):
            return None
        if not np.isfinite(t_k):
            return (f"ΔG‡ cannot be recomputed from {KIND_TITLES[kind]}: no temperature "
                    "(give the temperature ΔG‡ refers to)", {"severity": "warning"})  # fmt: skip
        try:
            rates = recompute(row)
        except NotRecomputed as exc:
            return (f"ΔG‡ cannot be recomputed from {KIND_TITLES[kind]}: {exc}",
                    {"severity": "warning"})  # fmt: skip
        correct = _correct(rates, basis, j, t_k, reported)
        if correct is None:
            return None
        words, k, k_err, dg = correct
        divisor = float(basis.divisor[j])
        rec_err = _rt(t_k) * (k_err or 0.0) / k
        if np.isfinite(t_err):
            rec_err = math.hypot(rec_err, (dg / t_k + _rt(1.0)) * t_err)
        rep_err = float(np.nan_to_num(data.col("dg_err_kj_mol")[i], nan=0.0))
        tol = config.dg_tolerance_kj_mol + config.coverage * math.hypot(rec_err, rep_err)
        if abs(reported - dg) <= tol:
            return None
        hits = _diagnose(_Case(row, rates, basis, j, t_k, reported, k), tol)
        unit, f = shown
        note = basis_note(basis, j)
        div = "" if divisor == 1 else f", divided by {divisor:.4g} (σ·c·κ)"
        message = (
            f"ΔG‡ {fnum(reported * f, 2)} {unit} does not match {fnum(dg * f, 2)} {unit} "
            f"recomputed from {KIND_TITLES[kind]} ({rates.detail}; {words} = {k:.4g} s⁻¹{div} "
            f"at {t_k:.1f} K): off by {(reported - dg) * f:+.2f} {unit}, tolerance "
            f"±{tol * f:.2f} {unit}" + (f"; {note}" if note else "")
        )
        cause = "; ".join(f"{h[3]} (gives {fnum(h[4] * f, 2)} {unit}) [{h[2]}]" for h in hits)
        return message, {
            "reported": opt(reported * f), "recomputed": opt(dg * f),
            "difference": opt((reported - dg) * f), "unit": unit,
            "likely_cause": cause or None, "slips": tuple(h[2] for h in hits),
        }  # fmt: skip


def _correct(
    rates: Rates, basis: RateBasis, j: int, t_k: float, reported: float
) -> tuple[str, float, float | None, float] | None:
    """The rate constant (words, k, σk) the entry's convention names, and its barrier: the sum
    of both directions for k_ex, k_obs and k_rac; else one direction's — the recorded one for
    two sites (leaving the major site: the higher barrier), or the k(i→j) whose barrier is
    nearest the reported one (a barrier of either direction, or of any pair of n sites, is a
    correct barrier when the entry does not say which it is)."""
    divisor = float(basis.divisor[j])
    if basis.summed[j] and rates.summed is not None:
        k, err = rates.summed
        return "k_ex = sum of both directions", k, err, _barrier(k, t_k, divisor)
    options = [(w, k, e, _barrier(k, t_k, divisor)) for w, k, e in rates.one if k > 0]
    if not options:
        return None
    direction = int(basis.direction[j])
    if direction and len(options) == 2:  # 1: leaving the major site, the higher barrier
        return (
            max(options, key=lambda o: o[3]) if direction == 1 else min(options, key=lambda o: o[3])
        )
    return min(options, key=lambda o: abs(o[3] - reported))


Candidate = tuple[str, bool, float, str]  # slip id, parametric, ΔG‡, words


@dataclass(frozen=True)
class _Case:
    """One flagged row, as every slip sees it: its stored raw data, the rate constants they
    give, its basis (row ``j``), the temperature, the reported ΔG‡ and the correct k."""

    row: dict[str, Any]
    rates: Rates
    basis: RateBasis
    j: int
    t_k: float
    reported: float
    k: float

    def dg(self, k: float) -> float:
        """ΔG‡ of a rate constant on this row's basis (÷ σ·c·κ)."""
        return _barrier(k, self.t_k, float(self.basis.divisor[self.j]))

    def nearest(self, ks: list[float]) -> float:
        """The barrier among those of ``ks`` nearest the reported one."""
        values = [self.dg(k) for k in ks if k > 0]
        return min(values, key=lambda dg: abs(dg - self.reported), default=math.nan)


def _diagnose(case: _Case, tol: float) -> list[slips.Hit]:
    cands = [c for make in _CANDIDATES for c in make(case)]
    hits = [
        (int(par), abs(case.reported - dg), slip_id, words, dg)
        for slip_id, par, dg, words in cands
        if np.isfinite(dg) and abs(case.reported - dg) <= tol
    ]
    return slips.choose(hits)


def _units(case: _Case) -> list[Candidate]:
    from registry.record import units

    kcal = units.convert(1.0, "kcal/mol", "kJ/mol")
    dg = case.dg(case.k)
    return [("kcal-as-kj", False, dg / kcal, "a kcal/mol value labelled kJ/mol"),
            ("kj-as-kcal", False, dg * kcal, "a kJ/mol value labelled kcal/mol")]  # fmt: skip


_TO_SUM = ("k-exchange-as-per-site", "racemization-as-enantiomerization")
_TO_ONE = ("k-per-site-as-exchange", "enantiomerization-as-racemization")
_K_RAC_WORDS = (
    "ΔG‡ computed from k_rac = 2·k_enant (the decay rate of ee) while the measurement means k_enant"
)


def _factors(case: _Case) -> list[Candidate]:
    """The factor slips of :mod:`.conventions` the entry's convention allows, computed with
    the other rate constant the raw data give (exact for unequal populations); for an ee
    course the sum of both directions is k_rac, so those slips carry the racemization names."""
    rates, out = case.rates, []
    options = conventions.factor_options(
        case.basis.convention[case.j], float(case.basis.degeneracy[case.j])
    )
    for slip_id, factor, words in options:
        if slip_id in _TO_SUM:
            if rates.summed is None:
                continue
            if rates.kind == "ee":
                slip_id, words = "racemization-as-enantiomerization", _K_RAC_WORDS
            out.append((slip_id, False, case.dg(rates.summed[0]), words))
        elif slip_id in _TO_ONE:
            if rates.kind == "ee":
                slip_id = "enantiomerization-as-racemization"
            out.append((slip_id, False, case.nearest([k for _w, k, _e in rates.one]), words))
        else:
            parametric = slip_id == conventions.STATISTICAL_FACTOR
            out.append((slip_id, parametric, case.dg(case.k * factor), words))
    return out


def _time_units(case: _Case) -> list[Candidate]:
    return [
        ("time-unit", True, case.dg(case.k * f), f"{words} (k {f:.4g}× the true k)")
        for kinds, f, words in TIME_SLIPS
        if case.rates.kind in kinds
    ]


def _t1_swapped(case: _Case) -> list[Candidate]:
    if case.rates.kind != "saturation":
        return []
    stored = case.row.get("t1_kind") or "apparent"
    other = "intrinsic" if stored == "apparent" else "apparent"
    try:
        swapped = recompute(case.row, t1_kind=other).one[0][1]
    except NotRecomputed:
        return []
    words = (
        f"the {stored} T1 used as if it were the {other} one in Forsén–Hoffman "
        "(k off by the factor M_ss/M0)"
    )
    return [("t1-kind-swapped", False, case.dg(swapped), words)]


def _populations(case: _Case) -> list[Candidate]:
    pops = case.rates.populations
    if case.rates.kind != "exsy" or not pops or max(pops) / min(pops) < _EQUAL_WITHIN:
        return []
    try:
        equal = recompute(case.row, equal_populations=True)
    except NotRecomputed:
        return []
    ks = [k for _w, k, _e in equal.one]
    if case.basis.summed[case.j] and equal.summed is not None:
        ks = [equal.summed[0]]
    shown = ":".join(f"{p:.2g}" for p in pops)
    words = f"the unequal site populations ({shown}) taken as equal in the EXSY computation"
    return [("populations-ignored", False, case.nearest(ks), words)]


_CANDIDATES: tuple[Callable[[_Case], list[Candidate]], ...] = (
    _units, _factors, _t1_swapped, _populations, _time_units,
)  # fmt: skip
