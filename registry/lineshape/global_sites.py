"""The site parameters of the global fit: Δν, p₁ and J, shared by the series or per spectrum.

The per-temperature series fit (:mod:`registry.lineshape.series`) ties Δν and the populations to
smooth functions of temperature; the global fit fits those functions *with* ΔH‡ and ΔS‡, in one
least-squares problem, so the errors of the rates and of ΔH‡, ΔS‡ include what Δν and the
populations are not known to. A :class:`SitePlan` says how each enters:

* Δν — ``drift``: Δν(T) = a + b·(T − T̄), shared by every spectrum (T̄ the mean temperature);
  ``level``: one Δν for all; ``own``: each spectrum its own; ``held``: each spectrum's value
  from its series fit (the value given, when that was held);
* the populations, as y = ln K = ln(p₂/p₁) — ``van 't Hoff``: y(T) = a + b·(1/T − 1/T_m),
  b = −ΔH°/R, shared (T_m the harmonic mean temperature, which decorrelates a and b); ``level``,
  ``own`` and ``held`` as for Δν;
* J of a coupled AB pair — ``shared`` (one J, temperature-independent) or ``held``.

Why every spectrum shares the trend (rather than keeping its own Δν where its series fit
determined it): a spectrum that determines Δν pulls the shared line by its own weight, and one
that does not (fast exchange, where only p₁p₂Δν²/k is seen) borrows the line without adding a
parameter it cannot fix. A free Δν there would trade off with k and leave the joint covariance
near-singular. The price is that the trend must describe the series: over the 50–70 K of a VT
series shifts drift linearly and the site equilibrium follows van 't Hoff; a χ²/dof well above
one says it does not.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from registry.errors import UsageError
from registry.lineshape.coupled import CoupledABModel
from registry.lineshape.fit_core import FloatArray, LineShapeFit
from registry.lineshape.series import SiteOptions, Trend, pair
from registry.lineshape.simulate import ExchangeModel

#: how Δν, the populations and J may enter (see the module docstring)
DELTA_PLANS = ("held", "own", "level", "drift")
POPULATION_PLANS = ("held", "own", "level", "van 't Hoff")
COUPLING_PLANS = ("held", "shared")


@dataclass(frozen=True)
class SitePlan:
    """How Δν (``delta``), the populations and J enter the global fit."""

    delta: str = "held"
    population: str = "held"
    coupling: str = "held"

    def __post_init__(self) -> None:
        for name, allowed in (("delta", DELTA_PLANS), ("population", POPULATION_PLANS),
                              ("coupling", COUPLING_PLANS)):  # fmt: skip
            if getattr(self, name) not in allowed:
                raise UsageError(
                    f"global fit: {name} must be one of {', '.join(allowed)}, "
                    f"not {getattr(self, name)!r}"
                )

    @property
    def all_held(self) -> bool:
        return self.delta == self.population == self.coupling == "held"

    def shared(self) -> list[str]:
        """The shared site parameters, in the order of θ after ΔG‡(T_m), ΔH‡."""
        out = []
        if self.delta in ("level", "drift"):
            out.append("delta_0")
        if self.delta == "drift":
            out.append("delta_1")
        if self.population in ("level", "van 't Hoff"):
            out.append("lnk_0")
        if self.population == "van 't Hoff":
            out.append("lnk_1")
        if self.coupling == "shared":
            out.append("coupling")
        return out

    def own(self) -> list[str]:
        """The site parameters each spectrum has for itself."""
        return [n for n, m in (("delta", self.delta), ("lnk", self.population)) if m == "own"]


def site_values(
    plan: SitePlan,
    theta: FloatArray,
    columns: dict[str, int],
    held: dict[str, float],
    x_drift: float,
    x_vh: float,
) -> tuple[dict[str, float], dict[str, list[tuple[int, float]]]]:
    """Δν, ln K and J of one spectrum, and for each the (column, ∂value/∂θ) it depends on.

    ``columns`` maps the shared and this spectrum's own parameter names to their index in θ;
    ``held`` holds the spectrum's own values for what is held.
    """
    values, grads = dict(held), {}
    for name, plan_of, x in (("delta", plan.delta, x_drift), ("lnk", plan.population, x_vh)):
        if plan_of == "own":
            values[name] = float(theta[columns[name]])
            grads[name] = [(columns[name], 1.0)]
        elif plan_of != "held":
            values[name] = float(theta[columns[f"{name}_0"]])
            grads[name] = [(columns[f"{name}_0"], 1.0)]
            if f"{name}_1" in columns:
                values[name] += x * float(theta[columns[f"{name}_1"]])
                grads[name].append((columns[f"{name}_1"], x))
    if plan.coupling == "shared":
        values["coupling"] = float(theta[columns["coupling"]])
        grads["coupling"] = [(columns["coupling"], 1.0)]
    return values, grads


def population(ln_k: float) -> float:
    """p₁ from ln K = ln(p₂/p₁)."""
    return 1.0 / (1.0 + math.exp(min(max(ln_k, -30.0), 30.0)))


def start_values(
    plan: SitePlan, fits: Sequence[LineShapeFit], held: Sequence[dict[str, float]], t_bar: float,
    t_m: float,
) -> dict[str, float]:  # fmt: skip
    """Starting values of the shared site parameters: straight lines through the values the
    series fit found (``held``, one dict per spectrum, in order)."""
    temps = np.array([f.t_k for f in fits], dtype=float)
    out: dict[str, float] = {}
    for name, x in (("delta", temps - t_bar), ("lnk", 1.0 / temps - 1.0 / t_m)):
        y = np.array([h[name] for h in held])
        if f"{name}_1" in plan.shared():
            slope, level = np.polyfit(x, y, 1)
            out[f"{name}_0"], out[f"{name}_1"] = float(level), float(slope)
        elif f"{name}_0" in plan.shared():
            out[f"{name}_0"] = float(np.mean(y))
    if plan.coupling == "shared":
        out["coupling"] = float(np.mean([h["coupling"] for h in held]))
    return out


def trends(
    plan: SitePlan,
    theta: FloatArray,
    cov: FloatArray | None,
    columns: dict[str, int],
    t_bar: float,
    t_m: float,
    sources: tuple[str, ...],
) -> tuple[Trend, ...]:
    """The shared Δν and population lines as :class:`~registry.lineshape.series.Trend` records
    (the series fit's type, so JSON and tables show them alike); J as a constant."""
    out = []

    def block(names: list[str]) -> FloatArray:
        if cov is None:
            return np.full((len(names), len(names)), math.nan)
        idx = [columns[n] for n in names]
        return cov[np.ix_(idx, idx)]

    for name, kind in (("delta", "linear drift"), ("lnk", "van 't Hoff")):
        label = "delta" if name == "delta" else "population"
        if f"{name}_1" in columns:
            a, b = float(theta[columns[f"{name}_0"]]), float(theta[columns[f"{name}_1"]])
            c = block([f"{name}_0", f"{name}_1"])
            if name == "delta":
                out.append(Trend(label, kind, a, b, pair(c), t_bar, sources))
            else:  # y = a + b(1/T − 1/T_m) = (a − b/T_m) + b/T: the Trend's x is 1/T
                move = np.array([[1.0, -1.0 / t_m], [0.0, 1.0]])
                out.append(Trend(label, kind, a - b / t_m, b, pair(move @ c @ move.T), 0.0,
                                 sources))  # fmt: skip
        elif f"{name}_0" in columns:
            a = float(theta[columns[f"{name}_0"]])
            c = block([f"{name}_0"])
            out.append(Trend(label, "constant", a, 0.0, ((float(c[0, 0]), 0.0), (0.0, 0.0)),
                             0.0, sources))  # fmt: skip
    if "coupling" in columns:
        c = block(["coupling"])
        out.append(Trend("coupling", "constant", float(theta[columns["coupling"]]), 0.0,
                         ((float(c[0, 0]), 0.0), (0.0, 0.0)), 0.0, sources))  # fmt: skip
    return tuple(out)


def value_error(grads: list[tuple[int, float]], cov: FloatArray | None) -> float | None:
    """σ of a site value that is a linear combination of θ (its ``grads``)."""
    if cov is None:
        return None
    g = np.zeros(cov.shape[0])
    for col, factor in grads:
        g[col] += factor
    var = float(g @ cov @ g)
    return math.sqrt(var) if math.isfinite(var) and var >= 0 else None


def plan_for(
    model: ExchangeModel | CoupledABModel, options: SiteOptions, series_trends: Sequence[Trend]
) -> SitePlan:
    """The plan for the series' modes (``options.shifts``, ``options.populations``: see
    :mod:`registry.lineshape.series`): 'auto' and 'tie' share the trend the series fit drew
    (a line through two or more spectra, one value through one; held where no spectrum
    determined it), 'fit' leaves each spectrum its own, 'hold' holds. J is shared when the
    series fitted it and a spectrum fixed it (else held, as the series fit held it). More than
    two sites keep everything held."""
    if len(model.shifts_hz) != 2:
        return SitePlan()
    drawn = {t.name: len(t.sources) for t in series_trends}
    coupled = isinstance(model, CoupledABModel)
    out = {}
    for name, mode, line in (("delta", options.shifts, "drift"),
                             ("population", options.populations, "van 't Hoff")):  # fmt: skip
        if (coupled and name == "population") or mode == "hold":
            out[name] = "held"
        elif mode == "fit":
            out[name] = "own"
        else:
            n = drawn.get(name, 0)
            out[name] = line if n >= 2 else ("level" if n == 1 else "held")
    fit_j = coupled and options.fit_coupling and drawn.get("coupling", 0) >= 1
    return SitePlan(out["delta"], out["population"], "shared" if fit_j else "held")
