"""Reading and converting single values as chemists write them (``14.2(3) kcal/mol``, ``-12 °C``,
``0.045 ppm`` at a field), for callers that take quantities as text: notebooks and the CLI.

Every conversion goes through the one unit registry (:mod:`registry.record.units`, pint).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from registry.record.units import ParsedValue

#: the quantity kinds a value can be read as, and the canonical unit each is stored in
QUANTITIES = (
    "energy",
    "temperature",
    "temperature_difference",
    "entropy",
    "frequency",
    "shift",
    "rate",
    "field",
    "time",
    "dimensionless",
)


def read_value(
    text: str,
    quantity: str,
    *,
    field: str = "value",
    default_unit: str | None = None,
    spectrometer_mhz: float | None = None,
) -> ParsedValue:
    """``text`` read as ``quantity``: the value (and its uncertainty) in the canonical unit,
    the text as written and the unit it was written in. A text without a unit needs
    ``default_unit``; ppm needs ``spectrometer_mhz``. Errors name ``field`` and the text."""
    from registry.record.units import parse_value

    return parse_value(
        text, quantity, field=field, default_unit=default_unit, spectrometer_mhz=spectrometer_mhz
    )


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """A plain float from one unit to another (offset temperatures allowed)."""
    from registry.record.units import convert as run

    return run(value, from_unit, to_unit)


def canonical_unit(quantity: str) -> str:
    """The unit values of ``quantity`` are stored in (``energy`` → ``kJ/mol``)."""
    from registry.record.units import CANONICAL_LABEL

    return CANONICAL_LABEL[quantity]


def spreadsheet_safe(value: object) -> object:
    """A cell value as it may leave for a spreadsheet: text that a spreadsheet would evaluate
    as a formula gets a guarding apostrophe (which the importer takes off again); numbers and
    empty values pass as they are."""
    if not isinstance(value, str):
        return value
    from registry.io.cells import neutralise

    return neutralise(value)
