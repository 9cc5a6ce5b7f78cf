"""Eyring and Arrhenius fits from rate points as a chemist has them: a table file or typed points.

The workflow behind ``fluxledger calc eyring`` and :func:`registry.api.calc_eyring`: gather
(T, k, σk) from a CSV/spreadsheet (:mod:`.rate_table`, pandas only then) and from point texts
``'T, k'`` / ``'T; k; σk'`` or number tuples, fit both lines (:mod:`.fits`, numpy only), give
ΔG‡ at the temperatures asked for, and collect the warnings.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Any

from registry.errors import UsageError
from registry.kinetics.quantities import (
    Energy,
    Entropy,
    QuantityInput,
    Temperature,
    energy,
    entropy,
    read_quantity,
    temperature,
)

#: a rate point: a text ``'T, k'`` / ``'T; k; σk'``, or numbers (T in K, k and σk in s⁻¹)
PointInput = str | Sequence[QuantityInput]


@dataclass(frozen=True)
class RatePoint:
    """One fitted point with its residual in ln(k/T)."""

    t_k: float
    k_per_s: float
    k_err_per_s: float | None
    residual_ln: float


@dataclass(frozen=True)
class BarrierAtT:
    """ΔG‡ (± its standard error) at one temperature of the fit."""

    t_k: float
    dg: Energy


@dataclass(frozen=True)
class EyringCalc:
    """Activation parameters from an Eyring fit, the Arrhenius pair, and the fitted points."""

    n_points: int
    weighted: bool
    t_min: Temperature
    t_max: Temperature
    dh: Energy
    ds: Entropy
    corr_dh_ds: float
    t_best_k: float
    dg_best: Energy
    dg_at: tuple[BarrierAtT, ...]
    ea: Energy
    log10_a_per_s: float
    log10_a_err: float
    ci95_factor: float
    r_squared: float
    chi2_reduced: float
    kappa: float
    points: tuple[RatePoint, ...]
    warnings: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "n_points": self.n_points,
            "weighted": self.weighted,
            "T_min_K": self.t_min.k,
            "T_max_K": self.t_max.k,
            "dh_kj_mol": self.dh.kj_mol,
            "dh_err_kj_mol": self.dh.err_kj_mol,
            "ds_j_mol_k": self.ds.j_mol_k,
            "ds_err_j_mol_k": self.ds.err_j_mol_k,
            "corr_dh_ds": self.corr_dh_ds,
            "T_best_K": self.t_best_k,
            "dg_best_kj_mol": self.dg_best.kj_mol,
            "dg_best_err_kj_mol": self.dg_best.err_kj_mol,
            "dg_at": [
                {"T_K": b.t_k, "dg_kj_mol": b.dg.kj_mol, "dg_err_kj_mol": b.dg.err_kj_mol}
                for b in self.dg_at
            ],
            "ea_kj_mol": self.ea.kj_mol,
            "ea_err_kj_mol": self.ea.err_kj_mol,
            "log10_a_per_s": self.log10_a_per_s,
            "log10_a_err": self.log10_a_err,
            "ci95_factor": self.ci95_factor,
            "r_squared": self.r_squared,
            "chi2_reduced": self.chi2_reduced,
            "kappa": self.kappa,
            "points": [
                {
                    "T_K": p.t_k,
                    "k_per_s": p.k_per_s,
                    "k_err_per_s": p.k_err_per_s,
                    "residual_ln": p.residual_ln,
                }
                for p in self.points
            ],
            "warnings": list(self.warnings),
        }


def calc_eyring(
    points: Iterable[PointInput] | None = None,
    *,
    file: str | None = None,
    sheet: str | None = None,
    t: QuantityInput | Sequence[QuantityInput] | None = None,
    kappa: float = 1.0,
) -> EyringCalc:
    """Fit ln(k/T) and ln k against 1/T; ΔG‡ at each of ``t`` (default 25 °C) and at T*.

    ``file`` is a CSV/TSV or spreadsheet with T and k columns (optional σk), units in the
    headers; ``points`` are added after the file's rows. σk is used when every point has one.
    """
    from registry.kinetics.constants import STANDARD_TEMPERATURE_K

    ts, ks, errs = _gather(points, file, sheet)
    if any(e is None for e in errs) and not all(e is None for e in errs):
        raise UsageError("σk is given for some points but not all; give it for all or none")
    temps = [t] if isinstance(t, (str, int, float)) else list(t or [])
    t_refs = [read_quantity(x, "temperature", "t")[0] for x in temps] or [STANDARD_TEMPERATURE_K]
    return _fit(ts, ks, errs, t_refs, kappa)


def _gather(
    points: Iterable[PointInput] | None, file: str | None, sheet: str | None
) -> tuple[list[float], list[float], list[float | None]]:
    from registry.kinetics.rate_table import parse_point

    point_list = [] if points is None else [points] if isinstance(points, str) else list(points)
    if not file and not point_list:
        raise UsageError("give a table file, or rate points 'T, k'")
    ts: list[float] = []
    ks: list[float] = []
    errs: list[float | None] = []
    if file:
        from registry.kinetics.rate_table import read_rate_table

        pts = read_rate_table(file, sheet=sheet)
        ts += pts.t_k.tolist()
        ks += pts.k_per_s.tolist()
        errs += [None] * len(pts.t_k) if pts.k_err_per_s is None else pts.k_err_per_s.tolist()
    elif sheet:
        raise UsageError("a sheet needs a spreadsheet file")
    for number, item in enumerate(point_list, start=1):
        name = f"point {number}"
        if isinstance(item, str):
            t_k, k, e = parse_point(item, field=name)
        else:
            t_k, k, e = _point_from_values(item, name)
        ts.append(t_k)
        ks.append(k)
        errs.append(e)
    return ts, ks, errs


def _point_from_values(
    item: Sequence[QuantityInput], name: str
) -> tuple[float, float, float | None]:
    """(T, k) or (T, k, σk) given as numbers in K and s⁻¹, or as texts with units."""
    from registry.errors import UnitError

    values = list(item) if isinstance(item, (list, tuple)) else None
    if values is None or len(values) not in (2, 3):
        raise UsageError(f"{name}: give (T, k) or (T, k, σk); got {item!r}")
    t_k, _ = read_quantity(values[0], "temperature", name, default_unit="K")
    k, k_err = read_quantity(values[1], "rate", name, default_unit="1/s")
    if len(values) == 3:
        k_err = read_quantity(values[2], "rate", name, default_unit="1/s")[0]
    if not t_k > 0:
        raise UnitError(name, str(values[0]), "must be above 0 K")
    if not k > 0:
        raise UnitError(name, str(values[1]), "a rate constant must be > 0")
    if k_err is not None and not k_err > 0:
        raise UnitError(name, str(values[2] if len(values) == 3 else values[1]), "σk must be > 0")
    return t_k, k, k_err


def _fit(
    ts: list[float], ks: list[float], errs: list[float | None], t_refs: list[float], kappa: float
) -> EyringCalc:
    import numpy as np

    from registry.kinetics.fits import fit_arrhenius, fit_eyring

    k_err = None if errs[0] is None else np.array(errs, dtype=float)
    fit = fit_eyring(ts, ks, k_err, t_ref_k=t_refs[0], kappa=kappa)
    arr = fit_arrhenius(ts, ks, k_err)
    at = [fit.dg_at(x) for x in t_refs]
    warnings = list(fit.warnings)
    for b in at[1:]:
        if b.warning and b.warning not in warnings:
            warnings.append(b.warning)
    return EyringCalc(
        n_points=fit.n_points,
        weighted=fit.weighted,
        t_min=temperature(float(fit.t_k.min())),
        t_max=temperature(float(fit.t_k.max())),
        dh=energy(fit.dh_kj_mol, fit.dh_err_kj_mol),
        ds=entropy(fit.ds_j_mol_k, fit.ds_err_j_mol_k),
        corr_dh_ds=fit.corr_dh_ds,
        t_best_k=fit.t_best_k,
        dg_best=energy(fit.dg_best_kj_mol, fit.dg_best_err_kj_mol),
        dg_at=tuple(BarrierAtT(b.t_k, energy(b.dg_kj_mol, b.dg_err_kj_mol)) for b in at),
        ea=energy(arr.ea_kj_mol, arr.ea_err_kj_mol),
        log10_a_per_s=arr.log10_a,
        log10_a_err=arr.log10_a_err,
        ci95_factor=fit.ci95_factor,
        r_squared=fit.r_squared,
        chi2_reduced=fit.chi2_reduced,
        kappa=fit.kappa,
        points=tuple(
            RatePoint(float(tk), float(kk), ee, float(r))
            for tk, kk, ee, r in zip(fit.t_k, fit.k_per_s, errs, fit.residuals_ln, strict=True)
        ),
        warnings=tuple(warnings),
    )
