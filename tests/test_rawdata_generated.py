"""Generated raw-data entries with one planted slip each (and as many without): the rule must
flag none of the correct ones and name the planted slip among those it gives for nearly all.

The planted numbers are computed here from the published relations (Forsén–Hoffman,
S. Forsén and R. A. Hoffman, J. Chem. Phys. 39, 2892 (1963); first-order decay of ee,
k_rac = 2·k_enant; the Eyring equation with CODATA constants from ``scipy.constants``), not
with ``registry.kinetics``. The data are invented (seeded random numbers).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from scipy import constants as codata

from registry import api
from registry.storage.database import Database

R_KJ = codata.R / 1000.0


#: an entry without ΔG‡, its temperature, the planted slip, the correct k and the slip's k
Planted = tuple[dict[str, Any], float, str, float, float]


def eyring_dg(k: float, t: float) -> float:
    return R_KJ * t * math.log(codata.k * t / (codata.h * k))


def _saturation(rng: np.random.Generator, i: int) -> Planted:
    r, t1, t = rng.uniform(0.15, 0.7), rng.uniform(0.3, 4.0), rng.uniform(280.0, 360.0)
    k = (1 - r) / t1
    slip, wrong = [("t1-kind-swapped", k / r), ("time-unit", k / 1000.0)][i % 2]
    entry = {"method": "saturation-transfer", "ss_ratio": f"{r:.4f}", "t1": f"{t1:.4f} s",
             "dg_t": f"{t:.2f} K"}  # fmt: skip
    return entry, t, slip, k, wrong


def _course(rng: np.random.Generator, i: int) -> Planted:
    k_rac, t = 10 ** rng.uniform(-5.5, -3.0), rng.uniform(300.0, 380.0)
    half = math.log(2) / k_rac / 60.0  # min
    minutes = [0.0, *(half * f for f in (0.3, 0.7, 1.2, 2.0, 3.0))]
    rows = "; ".join(f"{m:.4g},{97.0 * math.exp(-k_rac * 60 * m):.5f}" for m in minutes)
    entry = {"method": "equilibration", "course": f"t (min),ee (%); {rows}", "dg_t": f"{t:.2f} K"}
    k = k_rac / 2
    slip, wrong = [("racemization-as-enantiomerization", k_rac), ("time-unit", k * 60.0)][i % 2]
    return entry, t, slip, k, wrong


def test_planted_slips_are_named_and_correct_values_pass(database: Database) -> None:
    rng = np.random.default_rng(20261205)
    named = planted = false_alarms = 0
    for i in range(24):
        make = _saturation if i < 12 else _course
        entry, t, slip, k, wrong = make(rng, i)
        for value, expect in ((k, None), (wrong, slip)):
            body = {**entry, "compound": f"G-{i}-{expect or 'ok'}",
                    "dg": f"{eyring_dg(value, t):.2f} kJ/mol"}  # fmt: skip
            rec = api.get_measurement(database, api.add_measurement(database, body, actor="t"))
            found = [f for f in rec["findings"] if f["rule_id"] == "raw-data-barrier"]
            if expect is None:
                false_alarms += bool(found)
                continue
            planted += 1
            cause = found[0]["likely_cause"] if found else ""
            named += bool(cause) and f"[{expect}]" in cause
    assert false_alarms == 0
    assert named / planted >= 0.9, (named, planted)
