"""Rule: the reported ΔG‡ against ΔG‡(Tc) recomputed from the stored coalescence data."""

from __future__ import annotations

import numpy as np

from registry.validation import slips
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.coalescence_model import CoalescenceInputs, recompute, uncertainty
from registry.validation.columns import present
from registry.validation.conventions import (
    basis_note,
    calibration_notes,
    default_t_sigma,
    rate_basis,
)
from registry.validation.data import CheckData
from registry.validation.reported import as_temperature, energy_units, temperature_units


def coalescence_inputs(data: CheckData, rows: np.ndarray) -> CoalescenceInputs:
    """The coalescence columns of ``rows`` (row positions in ``data``)."""
    field = data.col("co_field_mhz")[rows]
    field = np.where(np.isfinite(field), field, data.col("field_mhz")[rows])
    stated = present(data.text("dg_t_text")[rows])
    basis = rate_basis(data, rows)
    return CoalescenceInputs(
        tc_k=data.col("tc_k")[rows],
        dnu_hz=data.col("dnu_hz")[rows],
        j_hz=np.nan_to_num(data.col("j_hz")[rows], nan=0.0),
        ratio=data.col("population_ratio")[rows],
        field_mhz=field,
        dg_t_k=np.where(stated, data.col("dg_t_k")[rows], np.nan),
        reported_kj_mol=data.col("dg_kj_mol")[rows],
        summed=basis.summed,
        divisor=basis.divisor,
        direction=basis.direction,
        convention=np.array(basis.convention, dtype=object),
        degeneracy=basis.degeneracy,
    )


class CoalescenceBarrier(Rule):
    """ΔG‡ as reported must match ΔG‡(Tc) from Tc and Δν (and J, populations) within tolerance.

    Tolerance = ``dg_tolerance_kj_mol`` + coverage·√(σ_recomputed² + σ_reported²), plus
    |T − Tc|·``ds_allowance`` when ΔG‡ is quoted at a temperature T other than Tc. When the
    numbers disagree, :func:`registry.validation.slips.diagnose` names the slip(s) that
    reproduce the reported value.
    """

    id = "coalescence-barrier"
    version = 2
    severity = "error"
    title = "ΔG‡ against the coalescence data"
    uses = ("dg_tolerance_kj_mol", "coverage", "ds_allowance_j_mol_k", "standard_fields_mhz")

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        tc = data.col("tc_k")
        dnu = data.col("dnu_hz")
        dg = data.col("dg_kj_mol")
        with np.errstate(invalid="ignore"):
            rows = np.flatnonzero((tc > 0) & (dnu > 0) & np.isfinite(dg))
        if rows.size == 0:
            return []
        inp = coalescence_inputs(data, rows)
        rec = recompute(inp)
        recomputed, first = rec.nearest(inp.reported_kj_mol)
        tol = _tolerance(data, rows, inp, first, config)
        diff = inp.reported_kj_mol - recomputed
        with np.errstate(invalid="ignore"):
            bad = np.isfinite(recomputed) & ~(np.abs(diff) <= tol)
        if not bad.any():
            return []
        sub = inp.take(bad)
        positions = rows[bad]
        diagnosis = slips.diagnose(sub, rec.take(bad), tol[bad], config.standard_fields_mhz)
        labels, factors = energy_units(
            data.text("dg_text")[positions], data.col("dg_kj_mol")[positions]
        )
        tc_labels, _, _ = temperature_units(data.text("tc_text")[positions])
        k1 = rec.k1_per_s[bad].tolist()
        k2 = rec.k2_per_s[bad].tolist()
        rec_bad, tol_bad, first_bad = recomputed[bad].tolist(), tol[bad].tolist(), first[bad]
        kinds = np.where(sub.unequal, 2, np.where(sub.coupled, 1, 0)).tolist()
        ids = data.ids[positions]
        calibrated = calibration_notes(data, positions)
        out: list[Finding] = []
        for i in range(positions.size):
            unit, f = labels[i], float(factors[i])
            rep_u = float(sub.reported_kj_mol[i]) * f
            rec_u = rec_bad[i] * f
            tol_u = tol_bad[i] * f
            formula = _formula_text(sub, i, kinds[i], bool(first_bad[i]), k1[i], k2[i])
            where = ""
            if np.isfinite(sub.dg_t_k[i]) and abs(sub.dg_t_k[i] - sub.tc_k[i]) > 0.5:
                where = (
                    f" (ΔG‡ is quoted at {sub.dg_t_k[i]:.1f} K; compared allowing for a small ΔS‡)"
                )
            message = (
                f"ΔG‡ {fnum(rep_u, 2)} {unit} does not match {fnum(rec_u, 2)} {unit} recomputed "
                f"from Tc {as_temperature(float(sub.tc_k[i]), tc_labels[i])} and Δν "
                f"{sub.dnu_hz[i]:.4g} Hz ({formula}): off by {rep_u - rec_u:+.2f} {unit}, "
                f"tolerance ±{tol_u:.2f} {unit}{where}{_basis(sub, i)}{calibrated[i]}"
            )
            cause = None
            if diagnosis.slips[i]:
                parts = [
                    f"{detail} (gives {fnum(value * f, 2)} {unit}) [{slip}]"
                    for slip, detail, value in zip(
                        diagnosis.slips[i],
                        diagnosis.details[i],
                        diagnosis.values_kj_mol[i],
                        strict=True,
                    )
                ]
                cause = "; ".join(parts)
            out.append(
                self.finding(
                    int(ids[i]),
                    message,
                    reported=opt(rep_u),
                    recomputed=opt(rec_u),
                    difference=opt(rep_u - rec_u),
                    unit=unit,
                    likely_cause=cause,
                    slips=diagnosis.slips[i],
                )
            )
        return out


def _tolerance(
    data: CheckData, rows: np.ndarray, inp: CoalescenceInputs, first: np.ndarray,
    config: CheckConfig,
) -> np.ndarray:  # fmt: skip
    """Base tolerance + coverage·√(σ_recomputed² + σ_reported²) + |T − Tc|·ΔS‡ allowance, with
    σ(Tc) as stated, else the one the recorded temperature calibration gives."""
    tc_err = default_t_sigma(data, rows, data.col("tc_err_k")[rows])
    e1, e2 = uncertainty(inp, tc_err, data.col("dnu_err_hz")[rows])
    rec_err = np.where(first, e1, e2)
    rep_err = np.nan_to_num(data.col("dg_err_kj_mol")[rows], nan=0.0)
    away = np.nan_to_num(np.abs(inp.dg_t_k - inp.tc_k), nan=0.0)
    return (
        config.dg_tolerance_kj_mol
        + config.coverage * np.sqrt(rec_err**2 + rep_err**2)
        + away * config.ds_allowance_j_mol_k / 1000.0
    )


def _formula_text(
    inp: CoalescenceInputs, i: int, kind: int, major: bool, k1: float, k2: float
) -> str:
    """Which formula was used (kind 0 Gutowsky–Holm, 1 coupled AB, 2 unequal populations)."""
    if kind == 2:
        which = "leaving the major site" if major else "leaving the minor site"
        k = k1 if major else k2
        return (
            f"unequal populations {inp.ratio[i]:.2f}:1, Shanan-Atidi–Bar-Eli, {which}, "
            f"k = {k:.4g} s⁻¹"
        )
    if kind == 1:
        return f"coupled AB, J = {inp.j_hz[i]:.3g} Hz, k_c = π√(Δν²+6J²)/√2 = {k1:.4g} s⁻¹"
    return f"Gutowsky–Holm, k_c = πΔν/√2 = {k1:.4g} s⁻¹"


def _basis(inp: CoalescenceInputs, i: int) -> str:
    """'; k as exchange …' for a message: which rate constant the barrier was recomputed for."""
    from registry.validation.conventions import RateBasis

    basis = RateBasis(inp.summed, inp.divisor, inp.direction, list(inp.convention),
                      inp.degeneracy)  # fmt: skip
    note = basis_note(basis, i)
    return f"; {note}" if note else ""
