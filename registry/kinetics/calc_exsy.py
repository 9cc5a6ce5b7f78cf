"""Rate constants (and barriers) from 2D exchange spectra as a chemist has them at the bench.

The workflow behind ``fluxledger calc exsy`` and :func:`registry.api.calc_exsy`: read the
mixing times (``'0.3 s'``, ``'300 ms'``) and one volume matrix per mixing time
(``'I_AA,I_AB;I_BA,I_BB'``: rows separated by ``;``, values by ``,``, any number of sites; or
nested lists of numbers), choose the computation and run it (:mod:`.exsy`, :mod:`.exsy_fit`):

* one mixing time, two sites: the closed form (equal T1s, as Perrin and Dwyer's column-sum
  normalisation assumes);
* one mixing time, more sites, or two sites with a τm = 0 spectrum: the general matrix method
  (the τm = 0 spectrum gives M0, so unequal T1s are allowed and reported);
* two or more non-zero mixing times: one least-squares fit of all volumes (a τm = 0 spectrum
  joins it as one more mixing time).

A mixing time of 0 marks the reference spectrum. With a temperature, ΔG‡ of every k(i→j)
follows (Eyring; the rate constant of one molecule leaving a site is the one a barrier
belongs to). Returns a frozen record whose :meth:`~ExsyCalc.to_dict` is the JSON.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from registry.errors import UnitError, UsageError
from registry.kinetics.quantities import (
    Energy,
    QuantityInput,
    Temperature,
    barrier_at,
    kj_mol,
    kj_mol_err,
    optional_temperature,
    read_quantity,
    read_temperature,
)

#: a volume matrix: ``'a,b;c,d'`` or rows of numbers
VolumesInput = str | Sequence[Sequence[float]]


@dataclass(frozen=True)
class RateConstant:
    """k(i→j) with its σ and, at a temperature, its ΔG‡."""

    source: str
    target: str
    k_per_s: float
    k_err_per_s: float | None
    dg: Energy | None


@dataclass(frozen=True)
class ExsyCalc:
    """Rate constants between the sites; for two, k_AB (A→B), k_BA and k_ex = k_AB + k_BA."""

    method: str
    sites: tuple[str, ...]
    mixing_s: tuple[float, ...]
    populations: tuple[float, ...]
    populations_from: str
    rates: tuple[RateConstant, ...]
    rate_matrix_per_s: tuple[tuple[float, ...], ...]
    rate_matrix_err_per_s: tuple[tuple[float, ...], ...] | None
    k_exchange_per_s: float | None
    k_exchange_err_per_s: float | None
    r1_per_s: tuple[float, ...] | None
    r1_err_per_s: tuple[float, ...] | None
    t: Temperature | None
    kappa: float
    chi2_reduced: float | None
    notes: tuple[str, ...]

    def rate(self, source: str, target: str) -> RateConstant:
        return next(r for r in self.rates if r.source == source and r.target == target)

    def to_dict(self) -> dict[str, Any]:
        two = len(self.sites) == 2
        ab = self.rate(*self.sites) if two else None
        ba = self.rate(self.sites[1], self.sites[0]) if two else None
        return {
            "method": self.method,
            "sites": list(self.sites),
            "mixing_s": list(self.mixing_s),
            "populations": list(self.populations),
            "populations_from": self.populations_from,
            "k_convention": "per-site",
            "k_per_s": ab.k_per_s if ab else None,
            "k_err_per_s": ab.k_err_per_s if ab else None,
            "k_reverse_per_s": ba.k_per_s if ba else None,
            "k_reverse_err_per_s": ba.k_err_per_s if ba else None,
            "k_exchange_per_s": self.k_exchange_per_s,
            "k_exchange_err_per_s": self.k_exchange_err_per_s,
            "rate_matrix_per_s": [list(r) for r in self.rate_matrix_per_s],
            "rate_matrix_err_per_s": None
            if self.rate_matrix_err_per_s is None
            else [list(r) for r in self.rate_matrix_err_per_s],
            "rates": [
                {
                    "from": r.source,
                    "to": r.target,
                    "k_per_s": r.k_per_s,
                    "k_err_per_s": r.k_err_per_s,
                    "dg_kj_mol": kj_mol(r.dg),
                    "dg_err_kj_mol": kj_mol_err(r.dg),
                }
                for r in self.rates
            ],
            "dg_kj_mol": kj_mol(ab.dg) if ab else None,
            "dg_err_kj_mol": kj_mol_err(ab.dg) if ab else None,
            "dg_reverse_kj_mol": kj_mol(ba.dg) if ba else None,
            "dg_reverse_err_kj_mol": kj_mol_err(ba.dg) if ba else None,
            "r1_per_s": None if self.r1_per_s is None else list(self.r1_per_s),
            "r1_err_per_s": None if self.r1_err_per_s is None else list(self.r1_err_per_s),
            "T_K": None if self.t is None else self.t.k,
            "kappa": self.kappa,
            "chi2_reduced": self.chi2_reduced,
            "notes": list(self.notes),
        }


def parse_volumes(text: str, field: str = "volumes") -> list[list[float]]:
    """``'I_AA,I_AB;I_BA,I_BB'`` → rows of numbers (rows split at ';', values at ',')."""
    from registry.record.units import parse_value

    body = str(text).strip().rstrip(";").strip()
    if not body:
        raise UnitError(field, str(text), "empty; write the matrix as 'I_AA,I_AB;I_BA,I_BB'")
    rows = []
    for row_text in body.split(";"):
        parts = [p.strip() for p in row_text.split(",")]
        if not all(parts):
            raise UnitError(
                field, str(text), "a value is missing; write rows 'a,b;c,d' (',' between values)"
            )
        rows.append([parse_value(p, "dimensionless", field=field).value for p in parts])
    width = {len(r) for r in rows}
    if len(width) != 1 or width != {len(rows)}:
        raise UnitError(
            field,
            str(text),
            f"the matrix must be square: {len(rows)} rows of {sorted(width)} values "
            "(one row and one column per site)",
        )
    return rows


def parse_numbers(text: QuantityInput | Sequence[float], field: str) -> list[float]:
    """``'0.7,0.3'``, ``'70:30'`` or a sequence of numbers."""
    from registry.record.units import parse_value

    if isinstance(text, str):
        parts = [p.strip() for p in text.replace(":", ",").split(",")]
        if not all(parts):
            raise UnitError(field, text, "write the numbers separated by ',', e.g. '0.7,0.3'")
        return [parse_value(p, "dimensionless", field=field).value for p in parts]
    if isinstance(text, (int, float)):
        return [float(text)]
    return [read_quantity(v, "dimensionless", field)[0] for v in text]


def parse_populations(text: QuantityInput | Sequence[float]) -> list[float]:
    """``'0.7,0.3'`` or ``'70,30'`` (checked to sum to 1 or 100 later) or a ratio ``'7:3'``
    (any positive scale, normalised here)."""
    if isinstance(text, str) and ":" in text:
        nums = parse_numbers(text, "populations")
        if all(v > 0 for v in nums):
            total = sum(nums)
            return [v / total for v in nums]
        raise UnitError("populations", text, "every part of the ratio must be > 0")
    return parse_numbers(text, "populations")


def _as_list(value: Any) -> list[Any]:
    return [value] if isinstance(value, (str, int, float)) else list(value)


def _read_pairs(
    mixing: QuantityInput | Sequence[QuantityInput], volumes: VolumesInput | Sequence[VolumesInput]
) -> list[tuple[float, list[list[float]]]]:
    taus = _as_list(mixing)
    mats = [volumes] if isinstance(volumes, str) or _is_matrix(volumes) else list(volumes)
    if len(taus) != len(mats):
        raise UsageError(
            f"{len(taus)} mixing time(s) but {len(mats)} volume matrices: give one matrix per "
            "mixing time, in the same order"
        )
    pairs = []
    for i, (tau, mat) in enumerate(zip(taus, mats, strict=True), start=1):
        field = "mixing" if len(taus) == 1 else f"mixing {i}"
        zero = isinstance(tau, str) and tau.strip() in ("0", "0.0")  # no unit needed for none
        seconds = 0.0 if zero else read_quantity(tau, "time", field)[0]
        if seconds < 0:
            raise UnitError(field, str(tau), "a mixing time cannot be negative")
        rows = (
            parse_volumes(mat, f"volumes {i}" if len(mats) > 1 else "volumes")
            if isinstance(mat, str)
            else [list(map(float, r)) for r in mat]
        )
        pairs.append((seconds, rows))
    return pairs


def _is_matrix(value: Any) -> bool:
    """True for rows of numbers (one matrix), False for a list of matrices or texts."""
    try:
        return all(isinstance(x, (int, float)) for row in value for x in row)
    except TypeError:
        return False


def calc_exsy(
    *,
    mixing: QuantityInput | Sequence[QuantityInput],
    volumes: VolumesInput | Sequence[VolumesInput],
    populations: QuantityInput | Sequence[float] | None = None,
    volume_err: QuantityInput | None = None,
    sites: str | Sequence[str] | None = None,
    temperature: QuantityInput | None = None,
    kappa: float = 1.0,
) -> ExsyCalc:
    """Rate constants from EXSY volumes at one or more mixing times (0 = reference spectrum)."""
    from registry.kinetics.exsy import exsy_rates, exsy_two_site
    from registry.kinetics.exsy_fit import fit_exsy

    pairs = _read_pairs(mixing, volumes)
    pops = None if populations is None else parse_populations(populations)
    err = None
    if volume_err is not None:
        err = read_quantity(volume_err, "dimensionless", "volume_err")[0]
        if not err > 0:
            raise UnitError("volume_err", str(volume_err), "must be > 0")
    names = [s.strip() for s in sites.split(",")] if isinstance(sites, str) else sites
    refs = [v for t, v in pairs if t == 0]
    timed = [(t, v) for t, v in pairs if t > 0]
    if not timed:
        raise UsageError("give at least one mixing time > 0 (a mixing time of 0 is the reference)")
    if refs and pops is not None:
        raise UsageError("give the populations or a τm = 0 spectrum, not both")
    if len(timed) >= 2:
        res = fit_exsy(
            [v for _, v in pairs], [t for t, _ in pairs], populations=pops, volume_err=err,
            sites=names,
        )  # fmt: skip
    elif len(refs) > 1:
        raise UsageError("give one τm = 0 spectrum (or several mixing times > 0 to fit)")
    elif len(timed[0][1]) == 2 and not refs:
        res = exsy_two_site(timed[0][1], timed[0][0], populations=pops, volume_err=err, sites=names)
    else:
        res = exsy_rates(
            timed[0][1], timed[0][0], populations=pops, reference=refs[0] if refs else None,
            volume_err=err, sites=names,
        )  # fmt: skip
    notes = list(res.notes)
    if err is None and res.chi2_reduced is None and len(timed) == 1:
        notes.append("no σ of the volumes given (volume_err): no uncertainties propagated")
    return _calc_record(res, read_temperature(temperature), kappa, notes)


def _calc_record(
    res: Any, t: tuple[float, float | None] | None, kappa: float, notes: list[str]
) -> ExsyCalc:
    import numpy as np

    n = res.n_sites
    rates = []
    for i in range(n):
        for j in range(n):
            if i == j:
                continue
            k = float(res.k_per_s[i, j])
            k_err = None if res.k_err_per_s is None else float(res.k_err_per_s[i, j])
            dg = barrier_at(k, k_err, t, kappa, notes)
            rates.append(RateConstant(res.sites[i], res.sites[j], k, k_err, dg))
    matrix = res.rate_matrix_per_s
    err = None if res.k_err_per_s is None else res.k_err_per_s.copy()
    if err is not None:
        err[np.diag_indices_from(err)] = np.nan  # the diagonal's σ would need the covariances
    return ExsyCalc(
        method=res.method,
        sites=res.sites,
        mixing_s=res.mixing_s,
        populations=tuple(float(p) for p in res.populations),
        populations_from=res.populations_from,
        rates=tuple(rates),
        rate_matrix_per_s=tuple(tuple(float(v) for v in row) for row in matrix),
        rate_matrix_err_per_s=None
        if err is None
        else tuple(tuple(float(v) for v in r) for r in err),
        k_exchange_per_s=res.k_exchange_per_s,
        k_exchange_err_per_s=res.k_exchange_err_per_s,
        r1_per_s=None if res.r1_per_s is None else tuple(float(v) for v in res.r1_per_s),
        r1_err_per_s=None
        if res.r1_err_per_s is None
        else tuple(float(v) for v in res.r1_err_per_s),
        t=optional_temperature(t),
        kappa=kappa,
        chi2_reduced=res.chi2_reduced,
        notes=tuple(notes),
    )
