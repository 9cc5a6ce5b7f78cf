"""Rules on rates: what each method can measure, and no rate faster than transition-state theory.

**What each method can measure.** A technique sees exchange in a window of *rate constants* at
the temperature it was run at, not in a window of barriers: a 108 kJ/mol barrier at 400 K is
k ≈ 0.07 s⁻¹, well inside what 2D exchange measures, while the same barrier at 300 K is years.
:data:`METHOD_RATE_WINDOWS` are the windows (common practice, no source; each a decade or so
generous at both ends): the reported ΔG‡ at its temperature gives k = (k_B·T/h)·exp(−ΔG‡/RT)
(Eyring 1935, CODATA constants), which must fall inside its method's window. Without a
temperature the dynamic-NMR methods fall back to the configured barrier window.

**No rate above κ·k_B·T/h.** The Eyring equation's prefactor is the fastest rate any barrier
gives (ΔG‡ = 0); a stored rate point above it (a line-shape fit run to its bound, a unit slip)
is not a measurement.
"""

from __future__ import annotations

import numpy as np

from registry.kinetics.constants import KB_OVER_H_PER_S_K, R_KJ_MOL_K
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.conventions import calibration_notes
from registry.validation.data import CheckData
from registry.validation.reported import energy_units

#: method → (slowest, fastest) rate constant it measures, s⁻¹ (common practice, no source)
METHOD_RATE_WINDOWS: dict[str, tuple[float, float]] = {
    # k_c = πΔν/√2 with Δν from ~0.5 Hz to tens of kHz (13C, 19F at high field)
    "coalescence": (1.0, 1.0e5),
    # broadening of ~0.1 Hz up to fast-exchange narrowing
    "lineshape": (0.1, 1.0e6),
    # cross peaks build up over mixing times of ~10 ms to a few T1
    "2d-exchange": (0.01, 100.0),
    # k must compete with 1/T1 (T1 ~ 0.1–10 s)
    "saturation-transfer": (0.01, 100.0),
    # half-lives from seconds (fast sampling) to years (chiral HPLC of atropisomers)
    "equilibration": (1.0e-9, 1.0),
}
#: the dynamic-NMR methods (the barrier window applies to them when no temperature is stored)
DYNAMIC_NMR_METHODS = ("coalescence", "lineshape", "2d-exchange", "saturation-transfer")


def eyring_k(dg_kj_mol: np.ndarray, t_k: np.ndarray) -> np.ndarray:
    """k = (k_B·T/h)·exp(−ΔG‡/RT), κ = 1."""
    return KB_OVER_H_PER_S_K * t_k * np.exp(-dg_kj_mol / (R_KJ_MOL_K * t_k))


def eyring_dg(k_per_s: float, t_k: float) -> float:
    """ΔG‡ = RT·ln(k_B·T/(h·k)), κ = 1."""
    return float(R_KJ_MOL_K * t_k * np.log(KB_OVER_H_PER_S_K * t_k / k_per_s))


def _temperature(data: CheckData) -> np.ndarray:
    """The temperature ΔG‡ refers to: as stated, else Tc (ΔG‡ of coalescence is at Tc)."""
    t = data.col("dg_t_k")
    return np.where(np.isfinite(t), t, data.col("tc_k"))


def _measured_rates(data: CheckData) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row, a temperature and k where the method actually measured, and which rows have
    one: the rate points (their slowest and fastest k) first; else ΔG‡ at its temperature when
    that lies inside the measured range (or no range is stored); else ΔH‡ − T·ΔS‡ at the middle
    of the range. A ΔG‡ quoted outside the range (extrapolated to 298 K, say) says nothing of
    what the method saw."""
    n = len(data)
    k_lo, k_hi = np.full(n, np.inf), np.full(n, -np.inf)
    r = data.rates
    if len(r):
        with np.errstate(invalid="ignore"):
            ok = (r.k_per_s > 0) & (r.t_k > 0)
        np.minimum.at(k_lo, r.pos[ok], r.k_per_s[ok])
        np.maximum.at(k_hi, r.pos[ok], r.k_per_s[ok])
    has_points = np.isfinite(k_lo)
    dg, t = data.col("dg_kj_mol"), _temperature(data)
    lo, hi = data.col("t_min_k"), data.col("t_max_k")
    ranged = np.isfinite(lo) & np.isfinite(hi)
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        inside = np.isfinite(t) & (t > 0) & (~ranged | ((t >= lo - 1.0) & (t <= hi + 1.0)))
        k_dg = eyring_k(dg, np.where(inside, t, np.nan))
        mid = (lo + hi) / 2.0
        dg_mid = data.col("dh_kj_mol") - mid * data.col("ds_j_mol_k") / 1000.0
        k_mid = eyring_k(dg_mid, mid)
    use_dg = ~has_points & inside & np.isfinite(k_dg)
    use_mid = ~has_points & ~use_dg & ranged & np.isfinite(k_mid)
    single = np.where(use_dg, k_dg, k_mid)
    chosen = use_dg | use_mid
    k_lo = np.where(chosen, single, k_lo)
    k_hi = np.where(chosen, single, k_hi)
    return k_lo, k_hi, has_points | chosen


class BarrierInMethodRange(Rule):
    """ΔG‡ at its temperature must mean a rate constant the method can measure.

    See the module: a window of k per method at the measurement's own temperature; for a
    dynamic-NMR barrier without a temperature, the configured barrier window.
    """

    id = "barrier-method-range"
    version = 2
    severity = "warning"
    title = "barrier inside the range the method can measure"
    uses = ("nmr_barrier_min_kj_mol", "nmr_barrier_max_kj_mol")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        dg, t = data.col("dg_kj_mol"), _temperature(data)
        methods = [str(m) for m in data.text("method").tolist()]
        lo = np.array([METHOD_RATE_WINDOWS.get(m, (np.nan, np.nan))[0] for m in methods])
        hi = np.array([METHOD_RATE_WINDOWS.get(m, (np.nan, np.nan))[1] for m in methods])
        nmr = np.array([m in DYNAMIC_NMR_METHODS for m in methods], dtype=bool)
        k_slow, k_fast, has_k = _measured_rates(data)
        with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
            k = eyring_k(dg, np.where(np.isfinite(t) & (t > 0), t, np.nan))
            by_rate = has_k & np.isfinite(lo) & ((k_fast < lo) | (k_slow > hi))
            e_lo, e_hi = config.nmr_barrier_min_kj_mol, config.nmr_barrier_max_kj_mol
            by_energy = ~has_k & nmr & np.isfinite(dg) & ((dg < e_lo) | (dg > e_hi))
        rows = np.flatnonzero(by_rate | by_energy)
        if rows.size == 0:
            return []
        labels, factors = energy_units(data.text("dg_text")[rows], dg[rows])
        notes = calibration_notes(data, rows)
        out = []
        for i, p in enumerate(rows.tolist()):
            u, f = labels[i], float(factors[i])
            if by_rate[p]:
                slow = k_fast[p] < lo[p]
                seen = k_fast[p] if slow else k_slow[p]
                at_t = np.isfinite(k[p]) and abs(k[p] - seen) <= 1e-9 * seen
                edge = eyring_dg(lo[p] if slow else hi[p], float(t[p])) if at_t else np.nan
                what = (
                    f"ΔG‡ {fnum(dg[p] * f, 2)} {u} at {t[p]:.1f} K means k ≈ {seen:.2g} s⁻¹"
                    if at_t
                    else f"the rate it saw is k ≈ {seen:.2g} s⁻¹"
                    if k_slow[p] == k_fast[p]
                    else f"the measured rates reach k ≈ {seen:.2g} s⁻¹ at most"
                    if slow
                    else f"the measured rates are k ≈ {seen:.2g} s⁻¹ or more"
                )
                there = f", i.e. ΔG‡ {'at most' if slow else 'at least'} " if at_t else ""
                there += f"{fnum(edge * f, 1)} {u} there" if at_t else ""
                text = (
                    f"{what}, {'slower' if slow else 'faster'} than {methods[p]} can measure "
                    f"(about {lo[p]:g}–{hi[p]:g} s⁻¹ at its temperature{there}): check the "
                    f"value, its unit, its temperature or the method{notes[i]}"
                )
            else:
                edge = e_lo if dg[p] < e_lo else e_hi
                side = "below" if dg[p] < e_lo else "above"
                text = (
                    f"ΔG‡ {fnum(dg[p] * f, 2)} {u} is {side} the range dynamic NMR can measure "
                    f"(about {fnum(e_lo * f, 0)}–{fnum(e_hi * f, 0)} {u}; no temperature is "
                    f"stored to judge its rate) for a {methods[p]} measurement: check the "
                    "value, its unit, or the method"
                )
            out.append(
                self.finding(
                    int(data.ids[p]),
                    text,
                    reported=opt(dg[p] * f),
                    recomputed=opt(edge * f),
                    difference=opt((dg[p] - edge) * f),
                    unit=u,
                )
            )
        return out


class RateBelowLimit(Rule):
    """No stored rate point may exceed κ·k_B·T/h, the rate of a zero barrier."""

    id = "rate-above-limit"
    version = 1
    severity = "error"
    title = "rate points below κ·k_B·T/h"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        r = data.rates
        if len(r) == 0:
            return []
        kappa = np.nan_to_num(data.col("kappa")[r.pos], nan=1.0)
        with np.errstate(invalid="ignore"):
            limit = kappa * KB_OVER_H_PER_S_K * r.t_k
            bad = np.flatnonzero((r.t_k > 0) & (r.k_per_s > limit))
        out = []
        for i in bad.tolist():
            p = int(r.pos[i])
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"rate point k = {r.k_per_s[i]:.3g} s⁻¹ at {r.t_k[i]:.2f} K exceeds "
                    f"κ·k_B·T/h = {limit[i]:.3g} s⁻¹ (κ = {kappa[i]:g}), the rate of a zero "
                    "barrier: not a measurement (a fit run to its bound, or a unit slip)",
                    reported=opt(float(r.k_per_s[i])),
                    recomputed=opt(float(limit[i])),
                    difference=opt(float(r.k_per_s[i] - limit[i])),
                    unit="s⁻¹",
                    context=f"rate at {r.t_k[i]:.2f} K",
                )
            )
        return out
