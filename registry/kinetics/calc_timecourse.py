"""Racemization and equilibration time courses from a table file, at one temperature.

The workflow behind ``fluxledger calc timecourse`` and :func:`registry.api.calc_timecourse`:
read a time column (``t (min)``, ``time / h``; a unit is required) and an ee column
(``ee (%)``, or ``ee`` as fractions) or a fraction column (``fraction``, ``x (%)``: the
fraction of the followed isomer P), fit the first-order approach to equilibrium
(:mod:`.timecourse`) and, at a temperature, give ΔG‡ by the Eyring equation.

Which k goes into the Eyring equation: the rate constant of one molecule crossing the
barrier. For racemization that is k_enant = k_rac/2 (ee decays with k_rac = 2·k_enant because
each inversion both removes one enantiomer and adds the other); for two isomers it is
k_PQ = (1 − x_eq)·k_obs (and k_QP = x_eq·k_obs for the way back). Using k_rac would lower
ΔG‡ by RT·ln 2 (1.7 kJ/mol at 300 K).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from registry.errors import FileFormatError, RowProblem, UsageError
from registry.kinetics.quantities import (
    Duration,
    Energy,
    QuantityInput,
    Temperature,
    barrier_at,
    duration,
    kj_mol,
    kj_mol_err,
    optional_temperature,
    read_fraction,
    read_temperature,
)

#: folded header names (registry.io.headers.concept_key) of an ee column and a fraction column
EE_NAMES = frozenset({"ee", "ees", "enantiomericexcess", "eevalue"})
FRACTION_NAMES = frozenset(
    {"fraction", "x", "xp", "xa", "molefraction", "isomerfraction", "fractionp", "fractiona"}
)
#: a fraction column may name its isomer: 'fraction E (%)', 'fraction of cis', 'x(anti)'
FRACTION_PREFIXES = ("fraction", "molefraction", "isomerfraction")

ENANTIOMERIZATION = "enantiomerization"
PER_SITE = "per-site"


@dataclass(frozen=True)
class TimeCourseCalc:
    """k of one molecule, the observed k, half-life and ΔG‡ from one time course."""

    quantity: str  # "ee" or "fraction"
    source: str
    columns: tuple[str, str]
    k_convention: str
    k_meaning: str
    k_per_s: float
    k_err_per_s: float | None
    k_reverse_per_s: float
    k_reverse_err_per_s: float | None
    k_obs_per_s: float
    k_obs_err_per_s: float | None
    half_life: Duration
    half_life_err_s: float | None
    start: float
    start_err: float | None
    equilibrium: float
    equilibrium_err: float | None
    equilibrium_fitted: bool
    t: Temperature | None
    dg: Energy | None
    dg_reverse: Energy | None
    kappa: float
    points: tuple[tuple[float, float, float], ...]  # t (s), value, fitted (fractions)
    rms_residual: float
    notes: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        ee = self.quantity == "ee"
        return {
            "quantity": self.quantity,
            "file": self.source,
            "time_column": self.columns[0],
            "value_column": self.columns[1],
            "n_points": len(self.points),
            "k_convention": self.k_convention,
            "k_meaning": self.k_meaning,
            "k_per_s": self.k_per_s,
            "k_err_per_s": self.k_err_per_s,
            "k_reverse_per_s": self.k_reverse_per_s,
            "k_reverse_err_per_s": self.k_reverse_err_per_s,
            "k_rac_per_s": self.k_obs_per_s if ee else None,
            "k_rac_err_per_s": self.k_obs_err_per_s if ee else None,
            "k_obs_per_s": self.k_obs_per_s,
            "k_obs_err_per_s": self.k_obs_err_per_s,
            "half_life_s": self.half_life.seconds,
            "half_life_err_s": self.half_life_err_s,
            "ee0" if ee else "x0": self.start,
            "ee0_err" if ee else "x0_err": self.start_err,
            "x_eq": None if ee else self.equilibrium,
            "x_eq_err": None if ee else self.equilibrium_err,
            "x_eq_fitted": None if ee else self.equilibrium_fitted,
            "T_K": None if self.t is None else self.t.k,
            "dg_kj_mol": kj_mol(self.dg),
            "dg_err_kj_mol": kj_mol_err(self.dg),
            "dg_reverse_kj_mol": None if ee else kj_mol(self.dg_reverse),
            "dg_reverse_err_kj_mol": None if ee else kj_mol_err(self.dg_reverse),
            "kappa": self.kappa,
            "rms_residual": self.rms_residual,
            "points": [{"t_s": t, "value": v, "fitted": f} for t, v, f in self.points],
            "notes": list(self.notes),
        }


def calc_timecourse(
    file: str,
    *,
    sheet: str | None = None,
    quantity: str | None = None,
    temperature: QuantityInput | None = None,
    x_eq: QuantityInput | None = None,
    kappa: float = 1.0,
) -> TimeCourseCalc:
    """Fit ee(t) or x(t) from ``file``; ``quantity`` ('ee' or 'fraction') picks the column when
    the table has both; ``x_eq`` fixes the equilibrium fraction (else it is fitted)."""
    from registry.kinetics.series_table import (
        TIME_NAMES,
        raise_problems,
        read_column,
        read_series,
        read_times,
        require_times,
    )
    from registry.kinetics.timecourse import fit_equilibration, fit_racemization

    if quantity not in (None, "ee", "fraction"):
        raise UsageError(f"quantity: {quantity!r} is neither 'ee' nor 'fraction'")
    t = read_temperature(temperature)
    table = read_series(file, sheet=sheet)
    time = table.find(TIME_NAMES)
    value, quantity = _value_column(table, quantity, file)
    if time is None:
        raise FileFormatError(
            file, f"no time column ({table.headers_text()}); name it e.g. 't (min)'"
        )
    if quantity == "ee" and x_eq is not None:
        raise UsageError("x_eq belongs to a fraction time course; ee always relaxes to 0")
    problems: list[RowProblem] = []
    secs = read_times(table, time, problems)
    ys = read_column(table, value, "fraction", problems)
    _check_range(table, value, ys, quantity, problems)
    raise_problems(problems)
    require_times(table, secs, 3, "a first-order fit (amplitude and k)")
    if quantity == "ee":
        res = fit_racemization(secs, ys)
        meaning = "k_enant: one molecule inverting to its enantiomer (k_rac = 2·k_enant)"
    else:
        xe = None if x_eq is None else read_fraction(x_eq, "x_eq")[0]
        res = fit_equilibration(secs, ys, x_eq=xe)
        meaning = (
            f"k(P→Q): one molecule of the followed isomer ({value.header!r}) becoming the other"
        )
    notes = list(table.notes) + list(res.notes)
    if t is None:
        notes.append("no temperature given: no ΔG‡")
    dg = barrier_at(res.k_per_s, res.k_err_per_s, t, kappa, notes)
    dgr = barrier_at(res.k_reverse_per_s, res.k_reverse_err_per_s, t, kappa, notes)
    return TimeCourseCalc(
        quantity, file, (time.header, value.header),
        ENANTIOMERIZATION if quantity == "ee" else PER_SITE, meaning,
        res.k_per_s, res.k_err_per_s, res.k_reverse_per_s, res.k_reverse_err_per_s,
        res.k_obs_per_s, res.k_obs_err_per_s, duration(res.half_life_s), res.half_life_err_s,
        res.start, res.start_err, res.equilibrium, res.equilibrium_err, res.equilibrium_fitted,
        optional_temperature(t), dg, dgr, kappa,
        tuple((float(a), float(b), float(c)) for a, b, c in zip(res.t_s, res.y, res.fitted, strict=True)),
        res.rms_residual, tuple(notes),
    )  # fmt: skip


def _value_column(table: Any, quantity: str | None, file: str) -> tuple[Any, str]:
    """The ee or fraction column the table has (``quantity`` decides when it has both)."""
    ee = table.find(EE_NAMES)
    fraction = table.find(FRACTION_NAMES) or next(
        (c for c in table.columns if c.concept.startswith(FRACTION_PREFIXES)), None
    )
    if quantity == "ee" or (quantity is None and ee is not None and fraction is None):
        if ee is None:
            raise FileFormatError(
                file, f"no ee column ({table.headers_text()}); name it e.g. 'ee (%)'"
            )
        return ee, "ee"
    if quantity == "fraction" or (quantity is None and fraction is not None and ee is None):
        if fraction is None:
            raise FileFormatError(
                file, f"no fraction column ({table.headers_text()}); name it e.g. 'fraction (%)'"
            )
        return fraction, "fraction"
    if ee is not None and fraction is not None:
        raise UsageError(f"{file} has an ee and a fraction column: say which to fit (quantity)")
    raise FileFormatError(
        file,
        f"no ee or fraction column ({table.headers_text()}); name one e.g. 'ee (%)' or 'fraction'",
    )


def _check_range(
    table: Any, column: Any, ys: Any, quantity: str, problems: list[RowProblem]
) -> None:
    """An ee outside −1…1 or a fraction outside 0…1 is a problem of its row (most often a
    percentage under a header without '%')."""
    import numpy as np

    lo = -1.0 if quantity == "ee" else 0.0
    hint = "" if column.unit else "; if these are percentages, write '%' in the header"
    index = table.columns.index(column)
    for row in np.flatnonzero((ys < lo) | (ys > 1.0)):
        text = table.cells[row][index]
        reason = f"outside {lo:g}…1 (as a fraction){hint}"
        problems.append(table.problem(column, int(row), text, reason))
