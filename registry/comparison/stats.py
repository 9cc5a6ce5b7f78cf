"""How far computed barriers lie from measured ones, per level of theory, with bootstrap intervals.

For the errors e = computed − measured of one level of theory: N, the mean signed error (a
systematic over- or underestimate), the mean absolute error, the root-mean-square error and the
largest error, each with a 95 % percentile bootstrap interval (Efron & Tibshirani, *An
Introduction to the Bootstrap*, 1993, ch. 13): the pairs are resampled with replacement
:data:`RESAMPLES` times with a fixed seed, so the same registry gives the same intervals. Fewer
than :data:`MIN_FOR_INTERVAL` pairs give no interval (a bootstrap of two values says nothing).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

RESAMPLES = 2000
SEED = 20261205
MIN_FOR_INTERVAL = 5


@dataclass(frozen=True)
class ErrorStats:
    """The errors of one level of theory (kJ/mol) and their 95 % intervals (None when N is small)."""

    level: str
    n: int
    mse: float
    mae: float
    rmse: float
    max_abs: float
    max_pair: int  # index into the errors of the largest |error|
    mse_ci: tuple[float, float] | None
    mae_ci: tuple[float, float] | None
    rmse_ci: tuple[float, float] | None

    def to_dict(self) -> dict[str, Any]:
        return {
            "level": self.level, "n": self.n, "mse_kj_mol": self.mse, "mae_kj_mol": self.mae,
            "rmse_kj_mol": self.rmse, "max_abs_kj_mol": self.max_abs,
            "mse_ci95": None if self.mse_ci is None else list(self.mse_ci),
            "mae_ci95": None if self.mae_ci is None else list(self.mae_ci),
            "rmse_ci95": None if self.rmse_ci is None else list(self.rmse_ci),
        }  # fmt: skip


def error_stats(level: str, errors: Sequence[float]) -> ErrorStats:
    """Statistics of ``errors`` (computed − measured) with bootstrap intervals."""
    e = np.asarray(errors, dtype=float)
    if e.size == 0 or not np.all(np.isfinite(e)):
        raise ValueError("error_stats needs finite errors")
    largest = int(np.argmax(np.abs(e)))
    mse_ci = mae_ci = rmse_ci = None
    if e.size >= MIN_FOR_INTERVAL:
        rng = np.random.default_rng(SEED)
        samples = e[rng.integers(0, e.size, size=(RESAMPLES, e.size))]
        mse_ci = _interval(samples.mean(axis=1))
        mae_ci = _interval(np.abs(samples).mean(axis=1))
        rmse_ci = _interval(np.sqrt((samples**2).mean(axis=1)))
    return ErrorStats(
        level=level, n=int(e.size), mse=float(e.mean()), mae=float(np.abs(e).mean()),
        rmse=float(np.sqrt((e**2).mean())), max_abs=float(abs(e[largest])), max_pair=largest,
        mse_ci=mse_ci, mae_ci=mae_ci, rmse_ci=rmse_ci,
    )  # fmt: skip


def _interval(values: np.ndarray) -> tuple[float, float]:
    lo, hi = np.percentile(values, [2.5, 97.5])
    return float(lo), float(hi)
