"""``show``'s lines for how stored rates were obtained, and the trend lines ``lineshape fit``
prints: one wording for a series' trends wherever they are shown."""

from __future__ import annotations

from typing import Any

from registry.api import value_with_error_text as pm

#: the site parameters shown for each rate, in this order, with their unit
_SHOWN = (("delta", "Δν", "Hz"), ("population", "p1", ""), ("coupling", "J", "Hz"),
          ("width", "width", "Hz"))  # fmt: skip


def trend_text(trend: dict[str, Any], whence: str | None = None) -> str | None:
    """One line for a trend's ``to_dict``: a Δν drift, a van 't Hoff line of the populations or
    one shared value; ``whence`` says where it came from (default: how many spectra drew it).
    None for one spectrum's value (shown in that spectrum's row)."""
    kind = trend["kind"]
    if kind == "one spectrum's value":
        return None
    if whence is None:
        n = len(trend.get("from") or [])
        whence = f"from {n} spectr{'um' if n == 1 else 'a'}"
    if kind == "linear drift":
        return (
            f"Δν drift ({whence}): {pm(trend['value_hz'], trend['error_hz'], 'Hz')} at "
            f"{trend['at_k']:.1f} K, "
            f"{pm(trend['slope_hz_per_k'], trend['slope_err_hz_per_k'], 'Hz/K')}"
        )
    if kind == "constant":
        name, unit = _CONSTANT_WORDS.get(trend["parameter"], (trend["parameter"], ""))
        return f"{name} ({whence}, one value): {pm(trend['value'], trend['error'], unit).strip()}"
    return (
        f"populations, van 't Hoff ({whence}; K = p2/p1): "
        f"ΔH° = {pm(trend['dh_kj_mol'], trend['dh_err_kj_mol'], 'kJ/mol')}, "
        f"ΔS° = {pm(trend['ds_j_mol_k'], trend['ds_err_j_mol_k'], 'J/(mol·K)')}"
    )


#: a shared value's name and unit, by parameter
_CONSTANT_WORDS = {"delta": ("Δν", "Hz"), "population": ("p1", ""), "coupling": ("J", "Hz")}


def rate_fit_lines(rates: list[dict[str, Any]]) -> list[str]:
    """Under each rate point, how its site parameters were set; then each series once."""
    lines: list[str] = []
    series: list[dict[str, Any]] = []
    for rate in rates:
        fit = rate.get("fit")
        lines.append(
            f"               T {rate['t_k']:.1f} K   k {rate['k_per_s']:.4g} s⁻¹   "
            f"({rate['t_text']}; {rate['k_text']})"
        )
        if not fit:
            continue
        lines.append(f"                 {_parameters(fit)}   [{fit.get('spectrum')}]")
        lines += [f"                 doubtful: {p}" for p in fit.get("problems") or []]
        if fit.get("series") and fit["series"] not in series:
            series.append(fit["series"])
    for one in series:
        lines += _series_lines(one)
    return lines


def _parameters(fit: dict[str, Any]) -> str:
    by_name = {p["name"]: p for p in fit.get("parameters") or []}
    parts = []
    for name, title, unit in _SHOWN:
        p = by_name.get(name)
        if p is None or p.get("value") is None:
            continue
        parts.append(f"{title} {pm(p['value'], p.get('error'), unit).strip()} {p['how']}")
    return " · ".join(parts) or fit.get("method", "")


def _series_lines(series: dict[str, Any]) -> list[str]:
    sites = ", ".join(f"{v:g}" for v in series.get("sites_hz") or [])
    pops = ", ".join(f"{v:g}" for v in series.get("populations_given") or [])
    head = (
        f"  line shape   {series.get('spectra')} spectra, {series.get('scheme')}; sites {sites} Hz"
        f" (populations {pops}) given; Δν {series.get('shifts_mode')}, populations "
        f"{series.get('populations_mode')}; width {series.get('width')}"
    )
    lines = [head]
    for key, title in (("region_hz", "region"), ("reference_hz", "reference window")):
        if series.get(key):
            lo, hi = series[key]
            lines.append(f"               {title} {lo:g} … {hi:g} Hz")
    for trend in series.get("trends") or []:
        text = trend_text(trend)
        if text:
            lines.append(f"               {text}")
    tied = series.get("tied_width")
    if tied:
        lines.append(
            f"               intrinsic width {tied['how']}: "
            f"{pm(tied['width_hz'], tied['width_err_hz'], 'Hz')}"
        )
    return lines
