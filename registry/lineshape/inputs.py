"""Reading what a caller gives the line-shape workflows: texts as chemists write them, or numbers.

Shifts are ppm unless a unit says otherwise (``'3.10,2.95'``, ``'-60,60 Hz'``, or a list such as
``[3.10, 2.95]`` or ``['-60 Hz', '60 Hz']``); a unit after the last value of a list applies to
every value written without one. Every value goes through the one unit layer
(:func:`registry.record.units.parse_value`), and every error names the field it came from
(``sites``, ``populations``, ``width`` …) and the text, never a command-line flag.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from typing import TYPE_CHECKING

from registry.errors import UnitError, UsageError
from registry.record.units import ParsedValue, clean_text, parse_value, ppm_to_hz

if TYPE_CHECKING:  # simulate pulls in numpy
    from registry.lineshape.simulate import ExchangeModel

#: a quantity as a caller may give it: a text with or without unit, or a plain number
Quantity = str | float
#: a list of values: one text with commas, or a sequence of texts/numbers
QuantityList = str | Sequence[str | float]

_ITEM = re.compile(
    r"^\s*(?P<num>[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(?P<unit>.*?)\s*$"
)


def count(n: int, word: str) -> str:
    """``1 file``, ``3 files``."""
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _as_text(value: QuantityList) -> str:
    """A list as one text, for messages."""
    return value if isinstance(value, str) else ", ".join(str(v) for v in value)


def split_list(value: QuantityList, field: str) -> list[tuple[str, str | None]]:
    """``'3.10, 2.95 ppm'`` → [('3.10', 'ppm'), ('2.95', 'ppm')].

    A unit after the last value applies to every value written without one. Use a decimal
    point in a text list: the comma separates values.
    """
    raw = value.split(",") if isinstance(value, str) else [str(v) for v in value]
    items = [clean_text(t) for t in raw]
    parsed = []
    for item in items or [""]:
        match = _ITEM.match(item)
        if not item or not match:
            raise UnitError(
                field, _as_text(value), "write numbers separated by commas, e.g. '3.10,2.95'"
            )
        parsed.append((match["num"], match["unit"] or None))
    last_unit = parsed[-1][1]
    return [(num, unit or last_unit) for num, unit in parsed]


def read_shifts(value: QuantityList, field: str = "sites") -> tuple[list[float], str]:
    """Numbers and their unit ('ppm' or 'Hz'), as written; ppm unless a unit says otherwise."""
    items = split_list(value, field)
    units = {("ppm" if u is None or u.lower() == "ppm" else u) for _, u in items}
    if len(units) > 1:
        raise UnitError(field, _as_text(value), "write all values in one unit")
    unit = units.pop()
    if unit == "ppm":
        return [parse_value(n, "dimensionless", field=field).value for n, _ in items], "ppm"
    return [parse_value(f"{n} {unit}", "shift", field=field).value for n, _ in items], "Hz"


def shifts_in_hz(values: list[float], unit: str, mhz: float | None, field: str) -> list[float]:
    """Shifts in Hz; ppm needs the spectrometer frequency, which is never guessed."""
    if unit == "Hz":
        return values
    if not mhz:
        raise UsageError(f"{field} is in ppm: give the spectrometer frequency as field (MHz)")
    return [ppm_to_hz(v, mhz) for v in values]


def read_field(value: Quantity | None) -> float | None:
    """The spectrometer (observe) frequency in MHz; a bare number means MHz."""
    if value is None:
        return None
    mhz = parse_value(value, "field", field="field", default_unit="MHz").value
    if mhz <= 0:
        raise UnitError("field", str(value), "the spectrometer frequency must be > 0 MHz")
    return mhz


def read_positive(value: Quantity, quantity: str, field: str, default_unit: str) -> float:
    """One quantity that must be > 0 (a rate, a width, a boiling point in K)."""
    parsed = parse_value(value, quantity, field=field, default_unit=default_unit).value
    if not parsed > 0:
        raise UnitError(field, str(value), "must be > 0")
    return parsed


def read_temperature(value: Quantity, field: str = "temperature") -> ParsedValue:
    """One temperature, K unless written (``'298 K'``, ``'-20 °C'``)."""
    return parse_value(value, "temperature", field=field, default_unit="K")


def read_temperatures(value: QuantityList, n_files: int) -> list[ParsedValue]:
    """One temperature per file, in order; K unless written (``'-20,-10,0 °C'``)."""
    items = split_list(value, "temps")
    if len(items) != n_files:
        raise UsageError(
            f"temps gives {count(len(items), 'temperature')} for {count(n_files, 'file')}"
        )
    return [read_temperature(f"{n} {u or ''}".strip(), "temps") for n, u in items]


def read_populations(value: QuantityList | None, n_sites: int) -> tuple[float, ...]:
    """Relative populations, normalised to sum 1; equal when not given."""
    if value is None:
        return tuple([1.0 / n_sites] * n_sites)
    text = _as_text(value)
    items = split_list(value, "populations")
    if any(unit for _, unit in items):
        raise UnitError("populations", text, "populations are plain numbers")
    values = [parse_value(n, "dimensionless", field="populations").value for n, _ in items]
    if len(values) != n_sites:
        raise UsageError(
            f"populations gives {count(len(values), 'value')} for {count(n_sites, 'site')}"
        )
    if any(not v > 0 for v in values):
        raise UnitError("populations", text, "every population must be > 0")
    total = sum(values)
    return tuple(v / total for v in values)


def exchange_model(sites_hz: list[float], pops: tuple[float, ...], scheme: str) -> ExchangeModel:
    """The sites and the scheme tying their exchange to one k, checked for a usable model."""
    from registry.lineshape.simulate import SCHEMES, ExchangeModel

    if scheme not in SCHEMES:
        raise UsageError(f"scheme must be one of {', '.join(SCHEMES)}, not {scheme!r}")
    if len(sites_hz) < 2:
        raise UsageError("sites needs at least two shifts")
    if len(set(sites_hz)) < len(sites_hz):
        raise UsageError("sites: two sites at the same shift give no exchange broadening")
    return ExchangeModel(tuple(sites_hz), pops, scheme)


def read_sites(
    sites: QuantityList, populations: QuantityList | None, scheme: str, mhz: float | None
) -> tuple[ExchangeModel, str]:
    """The exchange model of ``sites`` (Hz) and the unit the sites were written in."""
    values, unit = read_shifts(sites, "sites")
    sites_hz = shifts_in_hz(values, unit, mhz, "sites")
    return exchange_model(sites_hz, read_populations(populations, len(values)), scheme), unit


def read_window(
    value: QuantityList, field: str, unit: str, mhz: float | None
) -> tuple[float, float]:
    """A 'lo,hi' pair in the sites' unit (or a unit written after it), returned in Hz."""
    items = split_list(value, field)
    text = _as_text(value)
    if len(items) != 2:
        raise UnitError(field, text, "give two values, e.g. '3.5,2.5'")
    written = items[1][1] or unit
    values, vunit = read_shifts(f"{items[0][0]},{items[1][0]} {written}", field)
    lo, hi = sorted(shifts_in_hz(values, vunit, mhz, field))
    if lo == hi:
        raise UnitError(field, text, "the two ends must differ")
    return lo, hi


def read_x_unit(value: str | None) -> str | None:
    """'ppm' or 'Hz' (any case), the unit of a CSV shift column whose header does not say."""
    if value is None:
        return None
    unit = {"ppm": "ppm", "hz": "Hz"}.get(value.lower())
    if unit is None:
        raise UsageError(f"x_unit must be 'ppm' or 'Hz', not {value!r}")
    return unit


def read_coupling(value: Quantity | None) -> float | None:
    """J of a coupled AB pair in Hz (a bare number means Hz); may be zero or negative."""
    if value is None:
        return None
    return parse_value(value, "shift", field="coupling", default_unit="Hz").value


def coupled_model(model: ExchangeModel, j_hz: float, populations_given: bool):  # type: ignore[no-untyped-def]
    """The coupled AB pair of two sites; mutual exchange of its spins keeps populations equal."""
    from registry.lineshape.coupled import CoupledABModel

    if len(model.shifts_hz) != 2:
        raise UsageError("coupling: a coupled AB pair has exactly two sites")
    if populations_given:
        raise UsageError(
            "populations: the two spins of a coupled AB pair trade places, so their sites are "
            "equally populated; leave the populations out"
        )
    return CoupledABModel((model.shifts_hz[0], model.shifts_hz[1]), j_hz)
