"""Rules on temperatures: above 0 K, T_min below T_max, Tc inside the measured range, and inside
the solvent's liquid range at 1 atm (from the solvent table's mp_k/bp_k).

Above the boiling point a sample builds pressure: the warning says that this needs a
pressure-rated sealed tube and defers to the facility's safety rules and local regulations.
"""

from __future__ import annotations

import numpy as np

from registry.kinetics.safety import DEFER
from registry.validation.base import CheckConfig, Finding, Rule, opt
from registry.validation.data import CheckData
from registry.validation.reported import temperature_units

#: the temperatures a measurement states, with what a user calls each and its text column
_NAMED = (("tc_k", "Tc", "tc_text"), ("t_min_k", "T_min", "t_min_text"),
          ("t_max_k", "T_max", "t_max_text"), ("dg_t_k", "the temperature of ΔG‡", "dg_t_text"))  # fmt: skip


class _Shown:
    """Temperatures of flagged rows in the unit each was written in (one pass over the texts)."""

    def __init__(self, texts: list[object]) -> None:
        self.labels, self.offset, self.scale = temperature_units(texts)

    def value(self, i: int, value_k: float) -> float:
        return float(self.offset[i] + self.scale[i] * value_k)

    def text(self, i: int, value_k: float) -> str:
        label = self.labels[i]
        shown = self.value(i, value_k)
        return f"{shown:.1f} {label}" if label == "K" else f"{shown:.1f} {label} ({value_k:.1f} K)"


class TemperatureAboveZero(Rule):
    """Every stated temperature must be above absolute zero."""

    id = "temperature-positive"
    version = 1
    severity = "error"
    title = "temperatures above 0 K"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        out: list[Finding] = []
        for col, name, _ in _NAMED:
            t = data.col(col)
            for p in np.flatnonzero(t <= 0):
                out.append(
                    self.finding(
                        int(data.ids[p]),
                        f"{name} is {t[p]:.2f} K: a temperature must be above absolute zero",
                        reported=opt(t[p]),
                        unit="K",
                        context=col,
                    )
                )
        r = data.rates
        if len(r):
            with np.errstate(invalid="ignore"):
                bad = r.t_k <= 0
            for mid, t in zip(data.ids[r.pos[bad]].tolist(), r.t_k[bad].tolist(), strict=True):
                out.append(
                    self.finding(
                        int(mid),
                        f"a rate point is at {t:.2f} K: a temperature must be above absolute zero",
                        reported=opt(t),
                        unit="K",
                        context=f"rate:{t!r}",
                    )
                )
        return out


class TemperatureRangeOrder(Rule):
    """The lowest temperature measured must be below the highest."""

    id = "temperature-range-order"
    version = 1
    severity = "error"
    title = "T_min below T_max"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        lo, hi = data.col("t_min_k"), data.col("t_max_k")
        with np.errstate(invalid="ignore"):
            rows = np.flatnonzero(lo > hi)
        lo_text, hi_text = data.text("t_min_text"), data.text("t_max_text")
        lo_shown = _Shown([lo_text[p] for p in rows])
        hi_shown = _Shown([hi_text[p] for p in rows])
        out = []
        for i, p in enumerate(rows):
            shown, shown_hi = lo_shown.value(i, lo[p]), lo_shown.value(i, hi[p])
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"T_min {lo_shown.text(i, lo[p])} is above T_max {hi_shown.text(i, hi[p])}: "
                    "the two are probably swapped or one has the wrong unit",
                    reported=opt(shown),
                    recomputed=opt(shown_hi),
                    difference=opt(shown - shown_hi),
                    unit=lo_shown.labels[i],
                )
            )
        return out


class CoalescenceInMeasuredRange(Rule):
    """Tc must lie inside the temperature range the spectra were recorded over."""

    id = "tc-in-range"
    version = 1
    severity = "warning"
    title = "Tc inside the measured temperature range"
    uses = ("tc_range_slack_k",)

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        tc, lo, hi = data.col("tc_k"), data.col("t_min_k"), data.col("t_max_k")
        slack = config.tc_range_slack_k
        with np.errstate(invalid="ignore"):
            below = np.isfinite(tc) & (tc < lo - slack)
            above = np.isfinite(tc) & (tc > hi + slack)
        rows = np.flatnonzero(below | above)
        tc_text = data.text("tc_text")
        shown_t = _Shown([tc_text[p] for p in rows])
        out = []
        for i, p in enumerate(rows):
            edge, edge_name = (lo[p], "T_min") if below[p] else (hi[p], "T_max")
            shown, edge_shown = shown_t.value(i, tc[p]), shown_t.value(i, edge)
            side = "below" if below[p] else "above"
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"Tc {shown_t.text(i, tc[p])} is {side} the measured range ({edge_name} "
                    f"{shown_t.text(i, edge)}): coalescence cannot have been observed there; "
                    "check Tc, the range, or their units",
                    reported=opt(shown),
                    recomputed=opt(edge_shown),
                    difference=opt(shown - edge_shown),
                    unit=shown_t.labels[i],
                )
            )
        return out


class SolventLiquidRange(Rule):
    """Every temperature must lie between the solvent's melting and boiling points at 1 atm."""

    id = "solvent-liquid-range"
    version = 1
    severity = "warning"
    title = "temperatures inside the solvent's liquid range"
    uses = ("liquid_range_slack_k",)

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        mp, bp = data.col("mp_k"), data.col("bp_k")
        if not (np.isfinite(mp).any() or np.isfinite(bp).any()):
            return []
        r_lo, r_hi = data.rates.t_extremes
        names = ["Tc", "T_min", "T_max", "a rate point", "a rate point"]
        texts = ["tc_text", "t_min_text", "t_max_text", None, None]
        stack = np.vstack([data.col("tc_k"), data.col("t_min_k"), data.col("t_max_k"), r_lo, r_hi])
        finite = np.isfinite(stack)
        high = np.where(finite, stack, -np.inf)
        low = np.where(finite, stack, np.inf)
        i_hi, i_lo = high.argmax(axis=0), low.argmin(axis=0)
        n = stack.shape[1]
        t_hi, t_lo = high[i_hi, np.arange(n)], low[i_lo, np.arange(n)]
        slack = config.liquid_range_slack_k
        with np.errstate(invalid="ignore"):
            hot = np.isfinite(t_hi) & (t_hi > bp + slack)
            cold = np.isfinite(t_lo) & (t_lo < mp - slack)
        solvent = data.text("solvent_name")
        text_cols = {name: data.text(name) for name in texts if name}
        out: list[Finding] = []
        for side, mask, which_of, temps, limits in (
            ("bp", hot, i_hi, t_hi, bp),
            ("mp", cold, i_lo, t_lo, mp),
        ):
            rows = np.flatnonzero(mask)
            which = which_of[rows]
            shown = _Shown([text_cols[texts[w]][p] if texts[w] else None
                            for w, p in zip(which, rows, strict=True)])  # fmt: skip
            for i, p in enumerate(rows):
                t, limit = temps[p], limits[p]
                name = names[int(which[i])]
                value, limit_shown = shown.value(i, t), shown.value(i, limit)
                if side == "bp":
                    message = (
                        f"{name} {shown.text(i, t)} is above the boiling point of {solvent[p]} at "
                        f"1 atm ({shown.text(i, limit)}): heating a sample above its boiling "
                        "point needs a pressure-rated sealed NMR tube used within its rating. "
                        f"{DEFER} If no sealed tube was used, check the temperature, its unit, "
                        "or the solvent."
                    )
                else:
                    message = (
                        f"{name} {shown.text(i, t)} is below the melting point of {solvent[p]} "
                        f"({shown.text(i, limit)}): the sample would be frozen; check the "
                        "temperature, its unit, or the solvent"
                    )
                out.append(
                    self.finding(
                        int(data.ids[p]),
                        message,
                        reported=opt(value),
                        recomputed=opt(limit_shown),
                        difference=opt(value - limit_shown),
                        unit=shown.labels[i],
                        context=side,
                    )
                )
        return out


__all__ = [
    "CoalescenceInMeasuredRange",
    "SolventLiquidRange",
    "TemperatureAboveZero",
    "TemperatureRangeOrder",
]
