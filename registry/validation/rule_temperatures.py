"""Rules on temperatures: above 0 K, T_min below T_max, Tc inside the measured range, and inside
the solvent's liquid range at 1 atm (from the solvent table's mp_k/bp_k).

Above the boiling point a sample builds pressure: the warning says that this needs a
pressure-rated sealed tube and defers to the facility's safety rules and local regulations.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from registry.kinetics.safety import DEFER
from registry.validation.base import CheckConfig, Finding, Rule, opt
from registry.validation.data import CheckData, temperature_units

#: the temperatures a measurement states, with what a user calls each and its text column
_NAMED = (("tc_k", "Tc", "tc_text"), ("t_min_k", "T_min", "t_min_text"),
          ("t_max_k", "T_max", "t_max_text"), ("dg_t_k", "the temperature of ΔG‡", "dg_t_text"))  # fmt: skip


def _display(value_k: float, text: object) -> tuple[float, str, float, float]:
    """(value in the user's unit, label, offset, scale) for one temperature."""
    labels, offset, scale = temperature_units(pd.Series([text], dtype=object))
    return float(offset[0] + scale[0] * value_k), str(labels[0]), float(offset[0]), float(scale[0])


def _fmt(value_k: float, text: object) -> str:
    shown, label, _, _ = _display(value_k, text)
    return f"{shown:.1f} {label}" if label == "K" else f"{shown:.1f} {label} ({value_k:.1f} K)"


def _rate_extremes(data: CheckData) -> tuple[np.ndarray, np.ndarray]:
    n = len(data.m)
    lo, hi = np.full(n, np.nan), np.full(n, np.nan)
    if not data.rates.empty:
        g = data.rates.groupby("id")["t_k"].agg(["min", "max"])
        pos = pd.Index(data.m["id"]).get_indexer(g.index)
        lo[pos] = g["min"].to_numpy()
        hi[pos] = g["max"].to_numpy()
    return lo, hi


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
        if not data.rates.empty:
            bad = data.rates[data.rates["t_k"] <= 0]
            for mid, t in zip(bad["id"].tolist(), bad["t_k"].tolist(), strict=True):
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
        out = []
        for p in rows:
            shown, label, _, _ = _display(lo[p], lo_text[p])
            shown_hi = _display(hi[p], lo_text[p])[0]
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"T_min {_fmt(lo[p], lo_text[p])} is above T_max {_fmt(hi[p], hi_text[p])}: "
                    "the two are probably swapped or one has the wrong unit",
                    reported=opt(shown),
                    recomputed=opt(shown_hi),
                    difference=opt(shown - shown_hi),
                    unit=label,
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
        tc_text = data.text("tc_text")
        out = []
        for p in np.flatnonzero(below | above):
            edge, edge_name = (lo[p], "T_min") if below[p] else (hi[p], "T_max")
            shown, label, _, _ = _display(tc[p], tc_text[p])
            edge_shown = _display(edge, tc_text[p])[0]
            side = "below" if below[p] else "above"
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"Tc {_fmt(tc[p], tc_text[p])} is {side} the measured range ({edge_name} "
                    f"{_fmt(edge, tc_text[p])}): coalescence cannot have been observed there; "
                    "check Tc, the range, or their units",
                    reported=opt(shown),
                    recomputed=opt(edge_shown),
                    difference=opt(shown - edge_shown),
                    unit=label,
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
        r_lo, r_hi = _rate_extremes(data)
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
        out: list[Finding] = []
        for p in np.flatnonzero(hot):
            which = int(i_hi[p])
            text = data.m[texts[which]].iloc[p] if texts[which] else None
            shown, label, off, scale = _display(t_hi[p], text)
            limit = off + scale * bp[p]
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"{names[which]} {_fmt(t_hi[p], text)} is above the boiling point of "
                    f"{solvent[p]} at 1 atm ({_fmt(bp[p], text)}): heating a sample above its "
                    "boiling point needs a pressure-rated sealed NMR tube used within its "
                    f"rating. {DEFER} If no sealed tube was used, check the temperature, its "
                    "unit, or the solvent.",
                    reported=opt(shown),
                    recomputed=opt(limit),
                    difference=opt(shown - limit),
                    unit=label,
                    context="bp",
                )
            )
        for p in np.flatnonzero(cold):
            which = int(i_lo[p])
            text = data.m[texts[which]].iloc[p] if texts[which] else None
            shown, label, off, scale = _display(t_lo[p], text)
            limit = off + scale * mp[p]
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"{names[which]} {_fmt(t_lo[p], text)} is below the melting point of "
                    f"{solvent[p]} ({_fmt(mp[p], text)}): the sample would be frozen; check the "
                    "temperature, its unit, or the solvent",
                    reported=opt(shown),
                    recomputed=opt(limit),
                    difference=opt(shown - limit),
                    unit=label,
                    context="mp",
                )
            )
        return out


__all__ = [
    "CoalescenceInMeasuredRange",
    "SolventLiquidRange",
    "TemperatureAboveZero",
    "TemperatureRangeOrder",
]
