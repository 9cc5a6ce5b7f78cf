"""Plausibility rules: Δν consistent with the stated field and nucleus. (What each method can
measure: :mod:`.rule_rates`.)
"""

from __future__ import annotations

import numpy as np

from registry.record.nuclei import FREQUENCY_RATIO_TO_1H
from registry.validation.base import CheckConfig, Finding, Rule, opt
from registry.validation.data import CheckData
from registry.validation.reported import leading_number, unit_part

#: spectrometer (1H) frequencies outside this range are not NMR magnets (common practice, no source)
FIELD_MIN_MHZ, FIELD_MAX_MHZ = 40.0, 1300.0


def _nuclei(data: CheckData) -> list[str]:
    """The observed nucleus of each row ('' where none is stored)."""
    return ["" if x is None else str(x) for x in data.text("nucleus").tolist()]


class ShiftMatchesField(Rule):
    """Δν (Hz) divided by the nucleus' observe frequency must be a plausible shift difference."""

    id = "dnu-field"
    version = 1
    severity = "warning"
    title = "Δν consistent with the field and nucleus"
    uses = ("max_shift_ppm",)

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        out: list[Finding] = []
        field = data.col("co_field_mhz")
        field = np.where(np.isfinite(field), field, data.col("field_mhz"))
        with np.errstate(invalid="ignore"):
            odd_field = np.isfinite(field) & ((field < FIELD_MIN_MHZ) | (field > FIELD_MAX_MHZ))
        for p in np.flatnonzero(odd_field):
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"spectrometer frequency {field[p]:g} MHz is outside {FIELD_MIN_MHZ:g}–"
                    f"{FIELD_MAX_MHZ:g} MHz: not a 1H frequency of an NMR magnet; check the "
                    "field and its unit",
                    reported=opt(field[p]),
                    unit="MHz",
                    context="field",
                )
            )
        nucleus = _nuclei(data)
        ratio = np.array([FREQUENCY_RATIO_TO_1H.get(x, np.nan) for x in nucleus], dtype=float)
        limit = np.array([config.max_shift_ppm.get(x, np.nan) for x in nucleus], dtype=float)
        dnu = data.col("dnu_hz")
        with np.errstate(invalid="ignore", divide="ignore"):
            observe = field * ratio
            ppm = dnu / observe
            rows = np.flatnonzero(~odd_field & np.isfinite(ppm) & (ppm > limit))
        for p in rows:
            note = "" if nucleus[p] == "1H" else f" ({nucleus[p]} observed at {observe[p]:.1f} MHz)"
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"Δν {dnu[p]:.4g} Hz at {field[p]:g} MHz{note} is {ppm[p]:.3g} ppm, more than "
                    f"the ~{limit[p]:g} ppm a {nucleus[p]} shift difference can plausibly be: "
                    "Hz and ppm, or the field, may be mixed up",
                    reported=opt(ppm[p]),
                    recomputed=opt(limit[p]),
                    difference=opt(ppm[p] - limit[p]),
                    unit="ppm",
                    context="dnu",
                )
            )
        return out


class PpmConvertedAtObserveFrequency(Rule):
    """A Δν written in ppm for a nucleus other than ¹H must be converted at that nucleus' own
    observe frequency (field × Ξ), not at the spectrometer's ¹H frequency."""

    id = "dnu-ppm-nucleus"
    version = 1
    severity = "warning"
    title = "Δν in ppm converted at the observed nucleus' frequency"

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        nucleus = _nuclei(data)
        ratio = np.array([FREQUENCY_RATIO_TO_1H.get(x, np.nan) for x in nucleus], dtype=float)
        other = np.flatnonzero(np.isfinite(ratio) & (ratio < 0.999))
        texts = data.text("dnu_text")[other].tolist()
        in_ppm = np.array([(unit_part(t) or "").lower() == "ppm" for t in texts], dtype=bool)
        rows = other[in_ppm]
        if rows.size == 0:
            return []
        field = data.col("co_field_mhz")[rows]
        field = np.where(np.isfinite(field), field, data.col("field_mhz")[rows])
        ppm = np.array([leading_number(t) for t in data.text("dnu_text")[rows].tolist()])
        dnu = data.col("dnu_hz")[rows]
        with np.errstate(invalid="ignore", divide="ignore"):
            at_proton = np.abs(dnu - ppm * field) <= 1e-6 * np.maximum(np.abs(dnu), 1.0)
        out = []
        for i in np.flatnonzero(at_proton & np.isfinite(ppm)):
            p = rows[i]
            observe = field[i] * ratio[p]
            right = ppm[i] * observe
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"Δν {ppm[i]:g} ppm of {nucleus[p]} was converted with the 1H frequency "
                    f"({field[i]:g} MHz) to {dnu[i]:.4g} Hz; {nucleus[p]} is observed at "
                    f"{observe:.1f} MHz on that magnet, so Δν is {right:.4g} Hz and the barrier "
                    "recomputed from it changes; re-enter Δν in Hz",
                    reported=opt(dnu[i]),
                    recomputed=opt(right),
                    difference=opt(dnu[i] - right),
                    unit="Hz",
                )
            )
        return out
