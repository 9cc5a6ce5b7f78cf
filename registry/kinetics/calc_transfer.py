"""k from saturation transfer (ratio and T1) or from an inversion-transfer file, at the bench.

The workflow behind ``fluxledger calc transfer`` and :func:`registry.api.calc_transfer`
(:mod:`.transfer` computes). Saturation transfer takes the ratio r = M_ss/M0 of the observed
site while its partner is saturated and *one* T1 of the observed site: ``t1`` measured while
the partner is saturated (T1_app, the usual experiment), or ``t1_intrinsic`` (without
exchange) — two names, because the same number read as the other T1 gives a k that is off by
the factor r. An inversion-transfer file has a time column (``t (s)``, ``delay / ms``) and two
intensity columns: the inverted site first, then its partner, unless ``inverted`` names the
inverted site's column. k is k(observed or inverted site → partner), one molecule's rate
constant; with a temperature its ΔG‡ follows (Eyring).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from registry.errors import FileFormatError, RowProblem, UsageError
from registry.kinetics.quantities import (
    Energy,
    QuantityInput,
    Temperature,
    barrier_at,
    kj_mol,
    kj_mol_err,
    optional_temperature,
    read_fraction,
    read_quantity,
    read_temperature,
)


@dataclass(frozen=True)
class SaturationCalc:
    """k(observed → partner) by Forsén–Hoffman, with both T1s of the observed site."""

    method: str
    k_per_s: float
    k_err_per_s: float | None
    ratio: float
    ratio_err: float | None
    t1_given: str  # "apparent" (partner saturated) or "intrinsic"
    t1_apparent_s: float
    t1_intrinsic_s: float
    t: Temperature | None
    dg: Energy | None
    kappa: float
    notes: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "method": self.method,
            "k_convention": "per-site",
            "k_per_s": self.k_per_s,
            "k_err_per_s": self.k_err_per_s,
            "ratio": self.ratio,
            "ratio_err": self.ratio_err,
            "t1_given": self.t1_given,
            "t1_apparent_s": self.t1_apparent_s,
            "t1_intrinsic_s": self.t1_intrinsic_s,
            "T_K": None if self.t is None else self.t.k,
            "dg_kj_mol": kj_mol(self.dg),
            "dg_err_kj_mol": kj_mol_err(self.dg),
            "kappa": self.kappa,
            "notes": list(self.notes),
        }


@dataclass(frozen=True)
class InversionCalc:
    """The fitted inversion-transfer course: k(inverted → partner) and the rest of the model."""

    method: str
    source: str
    columns: tuple[str, str]  # inverted site, partner
    k_per_s: float
    k_err_per_s: float | None
    k_reverse_per_s: float
    k_reverse_err_per_s: float | None
    t1_s: tuple[float, float]
    t1_err_s: tuple[float | None, float | None]
    m0: tuple[float, float]
    m_start: tuple[float, float]
    points: tuple[tuple[float, float, float, float, float], ...]  # t, M_A, M_B, fits
    rms_residual: float
    t: Temperature | None
    dg: Energy | None
    kappa: float
    notes: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "method": self.method,
            "file": self.source,
            "inverted_column": self.columns[0],
            "partner_column": self.columns[1],
            "k_convention": "per-site",
            "k_per_s": self.k_per_s,
            "k_err_per_s": self.k_err_per_s,
            "k_reverse_per_s": self.k_reverse_per_s,
            "k_reverse_err_per_s": self.k_reverse_err_per_s,
            "t1_inverted_s": self.t1_s[0],
            "t1_inverted_err_s": self.t1_err_s[0],
            "t1_partner_s": self.t1_s[1],
            "t1_partner_err_s": self.t1_err_s[1],
            "m0_inverted": self.m0[0],
            "m0_partner": self.m0[1],
            "m_start_inverted": self.m_start[0],
            "m_start_partner": self.m_start[1],
            "rms_residual": self.rms_residual,
            "points": [
                {
                    "t_s": p[0],
                    "inverted": p[1],
                    "partner": p[2],
                    "fit_inverted": p[3],
                    "fit_partner": p[4],
                }
                for p in self.points
            ],
            "T_K": None if self.t is None else self.t.k,
            "dg_kj_mol": kj_mol(self.dg),
            "dg_err_kj_mol": kj_mol_err(self.dg),
            "kappa": self.kappa,
            "notes": list(self.notes),
        }


FORSEN_HOFFMAN = "saturation transfer (Forsén–Hoffman)"
INVERSION = "inversion transfer (two-site Bloch–McConnell fit)"


def calc_transfer(
    *,
    ratio: QuantityInput | None = None,
    t1: QuantityInput | None = None,
    t1_intrinsic: QuantityInput | None = None,
    ratio_err: QuantityInput | None = None,
    t1_err: QuantityInput | None = None,
    file: str | None = None,
    sheet: str | None = None,
    inverted: str | None = None,
    intensity_err: QuantityInput | None = None,
    temperature: QuantityInput | None = None,
    kappa: float = 1.0,
) -> SaturationCalc | InversionCalc:
    """Forsén–Hoffman k from ``ratio`` and ``t1`` (or ``t1_intrinsic``), or the fit of an
    inversion-transfer ``file``."""
    t = read_temperature(temperature)
    if file is not None:
        if any(v is not None for v in (ratio, t1, t1_intrinsic, ratio_err, t1_err)):
            raise UsageError("give an inversion-transfer file, or a ratio with a T1, not both")
        return _inversion(file, sheet, inverted, intensity_err, t, kappa)
    if sheet is not None or inverted is not None or intensity_err is not None:
        raise UsageError("sheet, inverted and intensity_err belong to an inversion-transfer file")
    if ratio is None:
        raise UsageError("give the ratio M_ss/M0 with a T1, or an inversion-transfer file")
    if (t1 is None) == (t1_intrinsic is None):
        raise UsageError(
            "give one T1 of the observed site: t1 (measured while the partner is saturated) "
            "or t1_intrinsic (without exchange)"
        )
    return _saturation(ratio, t1, t1_intrinsic, ratio_err, t1_err, t, kappa)


def _saturation(
    ratio: QuantityInput,
    t1: QuantityInput | None,
    t1_intrinsic: QuantityInput | None,
    ratio_err: QuantityInput | None,
    t1_err: QuantityInput | None,
    t: tuple[float, float | None] | None,
    kappa: float,
) -> SaturationCalc:
    from registry.kinetics.transfer import saturation_transfer

    r, r_err = read_fraction(ratio, "ratio")
    if ratio_err is not None:
        r_err = read_fraction(ratio_err, "ratio_err")[0]
    field = "t1" if t1 is not None else "t1_intrinsic"
    t1_s, t1_e = read_quantity(t1 if t1 is not None else t1_intrinsic, "time", field)  # type: ignore[arg-type]
    if t1_err is not None:
        t1_e = read_quantity(t1_err, "time", "t1_err")[0]
    kind = "apparent" if t1 is not None else "intrinsic"
    res = saturation_transfer(r, t1_s, t1_kind=kind, ratio_err=r_err, t1_err_s=t1_e)
    notes = []
    if res.k_err_per_s is None:
        notes.append("no σ of the ratio or of T1 given: no uncertainty propagated")
    dg = barrier_at(res.k_per_s, res.k_err_per_s, t, kappa, notes)
    return SaturationCalc(
        FORSEN_HOFFMAN, res.k_per_s, res.k_err_per_s, r, r_err, kind, res.t1_apparent_s,
        res.t1_intrinsic_s, optional_temperature(t), dg, kappa, tuple(notes),
    )  # fmt: skip


def _inversion(
    file: str,
    sheet: str | None,
    inverted: str | None,
    intensity_err: QuantityInput | None,
    t: tuple[float, float | None] | None,
    kappa: float,
) -> InversionCalc:
    from registry.kinetics.series_table import (
        TIME_NAMES,
        raise_problems,
        read_column,
        read_series,
        read_times,
        require_times,
    )
    from registry.kinetics.transfer import fit_inversion_transfer

    table = read_series(file, sheet=sheet)
    time = table.find(TIME_NAMES)
    if time is None:
        raise FileFormatError(
            file, f"no time column ({table.headers_text()}); name it e.g. 't (s)'"
        )
    others = [c for c in table.columns if c is not time]
    if inverted is not None:
        first = next((c for c in others if c.header == inverted), None)
        if first is None:
            raise UsageError(f"inverted: no column {inverted!r} in {file} ({table.headers_text()})")
        others = [first] + [c for c in others if c is not first]
    if len(others) != 2:
        raise FileFormatError(
            file,
            f"an inversion-transfer table has a time column and two intensity columns (inverted "
            f"site, then partner); found {len(others)} intensity column(s) ({table.headers_text()})",
        )
    problems: list[RowProblem] = []
    secs = read_times(table, time, problems)
    ma = read_column(table, others[0], "dimensionless", problems)
    mb = read_column(table, others[1], "dimensionless", problems)
    raise_problems(problems)
    require_times(table, secs, 4, "an inversion-transfer fit (7 parameters, two signals)")
    err = (
        None
        if intensity_err is None
        else read_quantity(intensity_err, "dimensionless", "intensity_err")[0]
    )
    res = fit_inversion_transfer(secs, ma, mb, intensity_err=err)
    notes = list(table.notes) + list(res.notes)
    if not ma[secs.argmin()] < ma[secs.argmax()]:
        notes.append(
            f"column {others[0].header!r} does not rise from its first delay to its last: is it "
            "the inverted site? (name the inverted column)"
        )
    dg = barrier_at(res.k_per_s, res.k_err_per_s, t, kappa, notes)
    points = tuple(
        (float(a), float(b), float(c), float(d), float(e))
        for a, b, c, d, e in zip(
            res.delays_s, res.fitted[0] + res.residuals[0], res.fitted[1] + res.residuals[1],
            res.fitted[0], res.fitted[1], strict=True,
        )
    )  # fmt: skip
    return InversionCalc(
        INVERSION, file, (others[0].header, others[1].header), res.k_per_s, res.k_err_per_s,
        res.k_reverse_per_s, res.k_reverse_err_per_s, res.t1_s, res.t1_err_s, res.m0,
        res.m_start, points, res.rms_residual, optional_temperature(t), dg, kappa,
        tuple(notes),
    )  # fmt: skip
