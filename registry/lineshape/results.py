"""What the line-shape workflows return: frozen records with a ``to_dict`` for JSON.

Light to import (no numpy): :mod:`registry.api` names these types without loading the numerical
stack.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    import numpy as np
    from numpy.typing import NDArray

    from registry.kinetics.fits import EyringFit
    from registry.lineshape.fit_core import LineShapeFit
    from registry.lineshape.fit_global import GlobalFit
    from registry.lineshape.reference import ReferenceWidth
    from registry.lineshape.series import Trend

#: which k every result means (see registry.lineshape.simulate)
K_CONVENTION = "k = rate constant for leaving site 1 (k_AB = 1/tau_A), s-1"

#: what the Eyring line through the per-temperature rates reports, in this order
_EYRING_LINE_KEYS = (
    "dh_kj_mol",
    "dh_err_kj_mol",
    "ds_j_mol_k",
    "ds_err_j_mol_k",
    "corr_dh_ds",
    "t_ref_k",
    "dg_ref_kj_mol",
    "dg_ref_err_kj_mol",
    "t_best_k",
    "dg_best_kj_mol",
    "dg_best_err_kj_mol",
    "chi2_reduced",
    "n_points",
    "weighted",
)


@dataclass(frozen=True, eq=False)
class SimulatedSpectrum:
    """A simulated spectrum: how it was made, and (not in ``to_dict``) its points."""

    file: str | None
    points: int
    x_unit: str
    sites_hz: tuple[float, ...]
    populations: tuple[float, ...]
    scheme: str
    k_per_s: float
    width_hz: float
    observe_mhz: float | None
    window_hz: tuple[float, float]
    noise: float
    seed: int | None
    t_k: float | None
    #: J of a coupled AB pair (Hz), and the non-exchanging reference line's position (Hz)
    coupling_hz: float | None = None
    reference_hz: float | None = None
    #: abscissa in ``x_unit`` (ppm when the sites were given in ppm with a field), intensities
    x: NDArray[np.float64] | None = field(default=None, repr=False)
    intensity: NDArray[np.float64] | None = field(default=None, repr=False)

    def to_dict(self) -> dict[str, Any]:
        """Plain values for JSON (the arrays are left out)."""
        return {
            "file": self.file,
            "points": self.points,
            "x_unit": self.x_unit,
            "sites_hz": list(self.sites_hz),
            "populations": list(self.populations),
            "scheme": self.scheme,
            "k_per_s": self.k_per_s,
            "width_hz": self.width_hz,
            "observe_mhz": self.observe_mhz,
            "window_hz": list(self.window_hz),
            "noise": self.noise,
            "seed": self.seed,
            "t_k": self.t_k,
            "coupling_hz": self.coupling_hz,
            "reference_hz": self.reference_hz,
        }


@dataclass(frozen=True, eq=False)
class LineShapeAnalysis:
    """Rates fitted to a set of spectra, their Eyring analysis, and what was written or stored.

    ``fits`` are the per-temperature fits (what ``rate_points`` holds and what is stored);
    ``global_fit`` the Eyring-tied fit when asked for. ``cautions`` are the safety notes for
    the temperatures measured.
    """

    sites_hz: tuple[float, ...]
    populations: tuple[float, ...]
    scheme: str
    observe_mhz: float | None
    fits: tuple[LineShapeFit, ...]
    eyring_line: EyringFit | None
    global_fit: GlobalFit | None
    rate_points: tuple[dict[str, Any], ...]
    plots: tuple[str, ...]
    cautions: tuple[str, ...]
    stored_rate_points: int | None = None
    measurement_id: int | None = None
    k_convention: str = K_CONVENTION
    #: Δν's drift and the populations' van 't Hoff line the spectra were tied to
    trends: tuple[Trend, ...] = ()
    #: the intrinsic width measured on each spectrum's reference line, and the tied value
    reference_widths: tuple[ReferenceWidth, ...] = ()
    tied_width: ReferenceWidth | None = None
    #: what the series fit says (parameters held for want of data, rates not stored)
    series_notes: tuple[str, ...] = ()

    @property
    def fit_notes(self) -> tuple[str, ...]:
        """``file: message`` for each fit that needs a second look (see ``LineShapeFit.remark``)."""
        return tuple(f"{Path(f.source).name}: {f.full_note}" for f in self.fits if f.remark)

    @property
    def global_note(self) -> str | None:
        """Why the global fit stopped, when it did not converge."""
        if self.global_fit is None or self.global_fit.converged:
            return None
        return f"global fit: {self.global_fit.message}"

    @property
    def notes(self) -> tuple[str, ...]:
        """Every note: the fits', the Eyring line's warnings, the global fit's."""
        line = tuple(self.eyring_line.warnings) if self.eyring_line is not None else ()
        last = (self.global_note,) if self.global_note else ()
        if self.global_fit is not None:
            last += tuple(f"global fit: {w}" for w in self.global_fit.warnings)
        return self.fit_notes + self.series_notes + line + last

    def to_dict(self) -> dict[str, Any]:
        """Plain values for JSON; keys carry their unit."""
        return {
            "k_convention": self.k_convention,
            "sites_hz": list(self.sites_hz),
            "populations": list(self.populations),
            "scheme": self.scheme,
            "observe_mhz": self.observe_mhz,
            "fits": [f.to_dict() for f in self.fits],
            "eyring_line": None if self.eyring_line is None else _line_dict(self.eyring_line),
            "global": None if self.global_fit is None else _global_dict(self.global_fit),
            "rate_points": [dict(p) for p in self.rate_points],
            "plots": list(self.plots),
            "stored_rate_points": self.stored_rate_points,
            "measurement_id": self.measurement_id,
            "cautions": list(self.cautions),
            "notes": list(self.notes),
            "trends": [t.to_dict() for t in self.trends],
            "reference_widths": [w.to_dict() for w in self.reference_widths],
            "tied_width": None if self.tied_width is None else self.tied_width.to_dict(),
        }


def _line_dict(line: EyringFit) -> dict[str, Any]:
    out = {k: getattr(line, k) for k in _EYRING_LINE_KEYS}
    out["warnings"] = list(line.warnings)
    out["method"] = "weighted Eyring line through the per-temperature rates"
    return out


def _global_dict(result: GlobalFit) -> dict[str, Any]:
    return {
        **result.eyring.to_dict(),
        "converged": result.converged,
        "message": result.message,
        "warnings": list(result.warnings),
        "n_points": result.n_points,
        "trends": [t.to_dict() for t in result.trends],
        "fits": [f.to_dict() for f in result.fits],
    }
