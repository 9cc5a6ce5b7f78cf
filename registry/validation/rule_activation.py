"""Rules on activation parameters: ΔG‡(T) = ΔH‡ − TΔS‡, and Ea = ΔH‡ + RT.

ΔG‡ = ΔH‡ − TΔS‡ is the definition (Eyring 1935). For a unimolecular reaction in solution the
Arrhenius energy and the activation enthalpy differ by RT at the mean temperature of the
measurements: Ea = ΔH‡ + RT (IUPAC Gold Book, "energy of activation"; K. J. Laidler, Chemical
Kinetics, 3rd ed. (1987), §4.5 — from memory).
"""

from __future__ import annotations

import numpy as np

from registry.kinetics.constants import R_KJ_MOL_K, STANDARD_TEMPERATURE_K
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.data import CheckData
from registry.validation.reported import energy_units, kcal_per_kj


class FreeEnergyFromEnthalpyEntropy(Rule):
    """The reported ΔG‡ at its temperature must equal ΔH‡ − T·ΔS‡ within tolerance."""

    id = "dg-from-dh-ds"
    version = 1
    severity = "error"
    title = "ΔG‡(T) against ΔH‡ − TΔS‡"
    uses = ("dg_tolerance_kj_mol", "coverage")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        dg, dh, ds, t = (data.col(c) for c in ("dg_kj_mol", "dh_kj_mol", "ds_j_mol_k", "dg_t_k"))
        with np.errstate(invalid="ignore"):
            rows = np.flatnonzero(np.isfinite(dg) & np.isfinite(dh) & np.isfinite(ds) & (t > 0))
        if rows.size == 0:
            return []
        dg, dh, ds, t = dg[rows], dh[rows], ds[rows], t[rows]
        errs = [
            np.nan_to_num(data.col(c)[rows], nan=0.0) for c in ("dg_err_kj_mol", "dh_err_kj_mol")
        ]
        ds_err = np.nan_to_num(data.col("ds_err_j_mol_k")[rows], nan=0.0)
        # ΔH‡ and ΔS‡ from one fit are strongly correlated, so this sum is generous (lenient)
        sigma = np.sqrt(errs[0] ** 2 + errs[1] ** 2 + (t * ds_err / 1000.0) ** 2)
        tol = config.dg_tolerance_kj_mol + config.coverage * sigma
        recomputed = dh - t * ds / 1000.0
        diff = dg - recomputed
        bad = ~(np.abs(diff) <= tol)
        if not bad.any():
            return []
        pos = rows[bad]
        labels, factors = energy_units(data.text("dg_text")[pos], data.col("dg_kj_mol")[pos])
        dg, dh, ds, t, tol, recomputed = (a[bad] for a in (dg, dh, ds, t, tol, recomputed))
        cal = 1.0 / kcal_per_kj()  # J per cal (thermochemical), via the unit registry
        at_standard = (
            f"ΔG‡ evaluated at {STANDARD_TEMPERATURE_K:.2f} K, not at the stated temperature"
        )
        slips = {
            "ΔS‡ in cal/(mol·K) written as J/(mol·K)": dh - t * ds * cal / 1000.0,
            "ΔS‡ in J/(mol·K) written as cal/(mol·K)": dh - t * ds / cal / 1000.0,
            "the sign of ΔS‡ flipped": dh + t * ds / 1000.0,
            at_standard: dh - STANDARD_TEMPERATURE_K * ds / 1000.0,
        }
        out = []
        for i, mid in enumerate(data.ids[pos]):
            u, f = labels[i], float(factors[i])
            rep, rec = float(dg[i]) * f, float(recomputed[i]) * f
            causes = [
                f"{text} (gives {fnum(vals[i] * f, 2)} {u})"
                for text, vals in slips.items()
                if abs(vals[i] - dg[i]) <= tol[i]
            ]
            out.append(
                self.finding(
                    int(mid),
                    f"ΔG‡ {fnum(rep, 2)} {u} at {t[i]:.1f} K does not match ΔH‡ − TΔS‡ = "
                    f"{fnum(rec, 2)} {u} (ΔH‡ {fnum(dh[i] * f, 2)} {u}, ΔS‡ "
                    f"{fnum(ds[i], 1)} J/(mol·K)): off by {rep - rec:+.2f} {u}, "
                    f"tolerance ±{tol[i] * f:.2f} {u}",
                    reported=opt(rep),
                    recomputed=opt(rec),
                    difference=opt(rep - rec),
                    unit=u,
                    likely_cause="; ".join(causes) or None,
                )
            )
        return out


def mean_temperature(data: CheckData) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The mean temperature of each measurement's data, its half-span, and where it came from.

    Rate points first, then the stated range, then ΔG‡'s temperature, then 298.15 K.
    Source codes: 0 rate points, 1 range, 2 ΔG‡ temperature, 3 assumed.
    """
    n = len(data)
    t = np.full(n, np.nan)
    half = np.zeros(n)
    src = np.full(n, 3)
    has = data.rates.count > 0
    if has.any():
        sums, counts = data.rates.t_sum_count
        low, high = data.rates.t_extremes
        with np.errstate(invalid="ignore", divide="ignore"):
            t[has] = sums[has] / counts[has]  # the compensated sum, as stored digests used
        half[has] = (high[has] - low[has]) / 2.0
        src[has] = 0
    lo, hi = data.col("t_min_k"), data.col("t_max_k")
    use = ~np.isfinite(t) & np.isfinite(lo) & np.isfinite(hi)
    t = np.where(use, (lo + hi) / 2.0, t)
    half = np.where(use, np.abs(hi - lo) / 2.0, half)
    src = np.where(use, 1, src)
    dgt = data.col("dg_t_k")
    use = ~np.isfinite(t) & np.isfinite(dgt)
    t = np.where(use, dgt, t)
    src = np.where(use, 2, src)
    use = ~np.isfinite(t)
    t = np.where(use, STANDARD_TEMPERATURE_K, t)
    return t, half, src


class ArrheniusEnergyFromEnthalpy(Rule):
    """Ea must equal ΔH‡ + RT at the mean temperature of the data (unimolecular, solution)."""

    id = "ea-from-dh"
    version = 1
    severity = "warning"
    title = "Ea against ΔH‡ + RT"
    uses = ("ea_tolerance_kj_mol", "coverage")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        ea, dh = data.col("ea_kj_mol"), data.col("dh_kj_mol")
        rows = np.flatnonzero(np.isfinite(ea) & np.isfinite(dh))
        if rows.size == 0:
            return []
        t_all, half_all, src_all = mean_temperature(data)
        t, half, src = t_all[rows], half_all[rows], src_all[rows]
        sigma = np.sqrt(
            np.nan_to_num(data.col("ea_err_kj_mol")[rows], nan=0.0) ** 2
            + np.nan_to_num(data.col("dh_err_kj_mol")[rows], nan=0.0) ** 2
        )
        # the RT term is uncertain by R·(half the temperature span) when T is not pinned down
        tol = config.ea_tolerance_kj_mol + config.coverage * sigma + R_KJ_MOL_K * half
        recomputed = dh[rows] + R_KJ_MOL_K * t
        diff = ea[rows] - recomputed
        bad = ~(np.abs(diff) <= tol)
        if not bad.any():
            return []
        pos = rows[bad]
        labels, factors = energy_units(data.text("ea_text")[pos], data.col("ea_kj_mol")[pos])
        where = ("mean of the rate points", "middle of the stated range", "ΔG‡'s temperature",
                 "assumed; no temperature stored")  # fmt: skip
        ea_b, dh_b = ea[pos], dh[pos]
        rec_b, tol_b, t_b, src_b = recomputed[bad], tol[bad], t[bad], src[bad]
        out = []
        for i, mid in enumerate(data.ids[pos]):
            u, f = labels[i], float(factors[i])
            rep, rec = float(ea_b[i]) * f, float(rec_b[i]) * f
            equal = abs(ea_b[i] - dh_b[i]) <= tol_b[i]
            cause = "Ea and ΔH‡ given the same value (the RT term left out)" if equal else None
            out.append(
                self.finding(
                    int(mid),
                    f"Ea {fnum(rep, 2)} {u} does not match ΔH‡ + RT = {fnum(rec, 2)} {u} at "
                    f"{t_b[i]:.1f} K ({where[int(src_b[i])]}): off by {rep - rec:+.2f} {u}, "
                    f"tolerance ±{tol_b[i] * f:.2f} {u}",
                    reported=opt(rep),
                    recomputed=opt(rec),
                    difference=opt(rep - rec),
                    unit=u,
                    likely_cause=cause,
                )
            )
        return out
