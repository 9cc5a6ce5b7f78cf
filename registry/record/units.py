"""The one unit registry, and the reading of values as chemists write them.

Every physical value in fluxledger is kept twice: the text as reported and a float in the
canonical unit of its quantity (see :data:`CANONICAL`). Only this module converts, and
only through pint; conversions across dimensions (a wavenumber or an electron-volt per
molecule to a molar energy, ppm to Hz) go through named functions here.

The calorie is the thermochemical calorie (4.184 J exactly, NIST SP 811 (2008) B.8),
which is what "kcal/mol" and "e.u." (cal mol⁻¹ K⁻¹) mean in the kinetics literature.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

import pint

from registry.errors import UnitError


def _make_registry() -> pint.UnitRegistry:
    """Build the registry once; pint's on-disk cache of parsed definitions makes start-up fast."""
    try:
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=False, cache_folder=":auto:")
    except OSError:  # no writable cache directory: build without the cache
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=False)


ureg = _make_registry()
ureg.define("entropy_unit = calorie / mole / kelvin = eu")
Q_ = ureg.Quantity

#: canonical unit of each quantity kind; normalized columns are in these units
CANONICAL: dict[str, str] = {
    "energy": "kJ/mol",
    "temperature": "K",
    "temperature_difference": "K",
    "entropy": "J/(mol*K)",
    "frequency": "Hz",
    "shift": "Hz",
    "rate": "1/s",
    "field": "MHz",
    "time": "s",
    "concentration": "mol/L",
    "dimensionless": "",
}

#: what is written after the number for each canonical unit, in messages and exports
CANONICAL_LABEL: dict[str, str] = {
    "energy": "kJ/mol",
    "temperature": "K",
    "temperature_difference": "K",
    "entropy": "J/(mol·K)",
    "frequency": "Hz",
    "shift": "Hz",
    "rate": "s⁻¹",
    "field": "MHz",
    "time": "s",
    "concentration": "mol/L",
    "dimensionless": "",
}

_DIMENSION = {
    "energy": "[mass] * [length] ** 2 / [time] ** 2 / [substance]",
    "entropy": "[mass] * [length] ** 2 / [time] ** 2 / [substance] / [temperature]",
    "frequency": "1 / [time]",
    "shift": "1 / [time]",
    "rate": "1 / [time]",
    "field": "1 / [time]",
    "time": "[time]",
    "concentration": "[substance] / [length] ** 3",
    "temperature": "[temperature]",
    "temperature_difference": "[temperature]",
}

#: no value of any quantity we store comes near this in its canonical unit (the fastest rate,
#: k_B·T/h at 1000 K, is ~2e13 s⁻¹); larger numbers are slips that would overflow computations
MAX_MAGNITUDE = 1e15

_MINUS = str.maketrans({"−": "-", "–": "-", "‒": "-", "—": "-", "﹣": "-", "－": "-"})
_SUPERSCRIPT = str.maketrans({"⁻": "-", "¹": "1", "²": "2", "³": "3", "⁰": "0", "⁺": ""})
_NUMBER = r"[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?"
_VALUE_RE = re.compile(
    rf"^\s*(?P<num>{_NUMBER})\s*(?:\((?P<paren>\d+)\))?\s*"
    rf"(?:(?:±|\+/-|\+-|\+/−)\s*(?P<err>{_NUMBER}))?\s*(?P<unit>.*?)\s*$"
)

# Spellings of the trade that pint does not read, mapped to ones it does.
_UNIT_ALIASES: dict[str, str] = {
    "e.u.": "eu",
    "e.u": "eu",
    "eu": "eu",
    "cal/molk": "cal/(mol*K)",
    "°c": "degC",
    "ºc": "degC",
    "˚c": "degC",
    "deg c": "degC",
    "degc": "degC",
    "celsius": "degC",
    "c": "degC",
    "°f": "degF",
    "ºf": "degF",
    "degf": "degF",
    "f": "degF",
    "fahrenheit": "degF",
    "k": "K",
    "kelvin": "K",
    "°k": "K",
    "s-1": "1/s",
    "/s": "1/s",
    "sec-1": "1/s",
    "min-1": "1/min",
    "/min": "1/min",
    "h-1": "1/h",
    "/h": "1/h",
    "hz": "Hz",
    "khz": "kHz",
    "mhz": "MHz",
    "ghz": "GHz",
    "cm-1": "1/cm",
    "/cm": "1/cm",
    "wavenumbers": "1/cm",
    "ev": "eV",
    "ppm": "ppm",
    "m": "mol/L",
    "mm": "mmol/L",
    "µm": "µmol/L",
    "um": "µmol/L",
}

#: quantity kinds whose values are per molecule when written in these units
_PER_MOLECULE_ENERGY = ("[length] ** -1", "[mass] * [length] ** 2 / [time] ** 2")


@dataclass(frozen=True)
class ParsedValue:
    """A value read from text: canonical float, its uncertainty, and what was written."""

    value: float
    error: float | None
    text: str
    unit: str


def clean_text(text: str) -> str:
    """Fold the Unicode variants of minus signs, superscripts and dots that spreadsheets carry."""
    out = str(text).translate(_MINUS).replace("\u00a0", " ").replace("\u2009", " ")
    out = out.replace("·", " ").replace("⋅", " ").replace("×", "*").replace("‡", "")
    out = out.replace("⁻¹", "^-1").replace("⁻²", "^-2").replace("²", "^2")
    out = out.replace("ΔG", "").strip()
    return out


def _normalise_unit_text(unit: str) -> str:
    """Rewrite a unit as written (``kcal mol-1``, ``J K-1 mol-1``) into pint's grammar."""
    u = unit.strip().translate(_SUPERSCRIPT).strip()
    key = u.lower().replace(" ", "")
    if key in _UNIT_ALIASES:
        return _UNIT_ALIASES[key]
    if u.lower() in _UNIT_ALIASES:
        return _UNIT_ALIASES[u.lower()]
    u = re.sub(r"(?<=[A-Za-z])\s*\^?\s*(-\d+)", r"^\1", u)  # mol-1 → mol^-1
    u = re.sub(r"\be\.u\.?", "eu", u)
    u = re.sub(r"(?<![A-Za-z])[°º˚]\s*C\b", "degC", u)
    u = re.sub(r"(?<![A-Za-z])[°º˚]\s*F\b", "degF", u)
    u = u.replace("Kcal", "kcal").replace("KJ", "kJ").replace("kj", "kJ")
    u = re.sub(r"\bcal/mol/K\b", "cal/(mol*K)", u)
    u = re.sub(r"\bJ/mol/K\b", "J/(mol*K)", u)
    return u


@lru_cache(maxsize=512)
def _parse_unit(unit_text: str) -> pint.Unit:
    return ureg.parse_units(unit_text)


def _to_number(text: str) -> float:
    """Read a decimal comma as a decimal point; ``1,200`` (a thousands separator?) is refused."""
    if re.fullmatch(r"[+-]?\d{1,3},\d{3}", text):
        raise ValueError(f"{text!r} is ambiguous: decimal comma or thousands separator?")
    return float(text.replace(",", "."))


def _paren_error(num: str, digits: str) -> float:
    """``14.2(3)`` means 14.2 ± 0.3: the digits count in the last decimal place written."""
    mantissa = num.split("e")[0].split("E")[0].replace(",", ".")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    exponent = re.search(r"[eE]([+-]?\d+)", num)
    scale = 10 ** (int(exponent.group(1)) if exponent else 0)
    return int(digits) * 10.0 ** (-decimals) * scale


def wavenumber_to_molar_energy(per_cm: float) -> float:
    """A wavenumber (cm⁻¹, per molecule) as kJ/mol: E = h·c·ν̃·N_A (CODATA constants)."""
    return float(Q_(per_cm, "1/cm").to("kJ/mol", "chemistry_per_molecule").magnitude)


def ppm_to_hz(ppm: float, spectrometer_mhz: float) -> float:
    """A chemical-shift difference in ppm becomes Hz at a given observe frequency (MHz)."""
    return ppm * spectrometer_mhz


# A context for per-molecule energies (eV, wavenumbers, joules per molecule) ↔ molar energies.
_ctx = pint.Context("chemistry_per_molecule")
_ctx.add_transformation(
    "[length] ** -1",
    "[mass] * [length] ** 2 / [time] ** 2 / [substance]",
    lambda ureg, x: x * ureg.planck_constant * ureg.speed_of_light * ureg.avogadro_constant,
)
_ctx.add_transformation(
    "[mass] * [length] ** 2 / [time] ** 2",
    "[mass] * [length] ** 2 / [time] ** 2 / [substance]",
    lambda ureg, x: x * ureg.avogadro_constant,
)
_ctx.add_transformation(
    "[mass] * [length] ** 2 / [time] ** 2 / [substance]",
    "[length] ** -1",
    lambda ureg, x: x / (ureg.planck_constant * ureg.speed_of_light * ureg.avogadro_constant),
)
_ctx.add_transformation(
    "[mass] * [length] ** 2 / [time] ** 2 / [substance]",
    "[mass] * [length] ** 2 / [time] ** 2",
    lambda ureg, x: x / ureg.avogadro_constant,
)
ureg.add_context(_ctx)


def _check_dimension(quantity: str, unit: pint.Unit, field: str, text: str) -> None:
    problem = _dimension_problem(quantity, unit)
    if problem:
        raise UnitError(field, text, problem)


def _dimension_problem(quantity: str, unit: pint.Unit) -> str | None:
    """Why ``unit`` is not a unit of ``quantity`` (None when it is)."""
    want = ureg.get_dimensionality(_DIMENSION[quantity])
    have = unit.dimensionality
    if have == want:
        return None
    if quantity == "energy" and str(have) in (
        str(ureg.get_dimensionality(d)) for d in _PER_MOLECULE_ENERGY
    ):
        return None
    names = {
        "energy": "a molar energy (kJ/mol, kcal/mol, cm-1, eV)",
        "entropy": "an entropy (J/(mol·K), cal/(mol·K), e.u.)",
        "frequency": "a frequency (Hz)",
        "shift": "a frequency difference (Hz, or ppm with the spectrometer frequency)",
        "rate": "a rate constant (s-1)",
        "field": "a spectrometer frequency (MHz)",
        "time": "a time (s, min, h)",
        "concentration": "a concentration (mol/L, M, mM)",
        "temperature": "a temperature (K, °C, °F)",
        "temperature_difference": "a temperature difference (K)",
    }
    return f"{unit:~} is not {names[quantity]}"


def parse_value(
    text: object,
    quantity: str,
    *,
    field: str = "value",
    default_unit: str | None = None,
    spectrometer_mhz: float | None = None,
) -> ParsedValue:
    """Read ``text`` (e.g. ``"14.2 ± 0.3 kcal/mol"``) as ``quantity`` in its canonical unit.

    ``default_unit`` is the unit a column header gave; a unit written in the text wins.
    A value with no unit and no default is an error, never a silent guess.
    """
    if isinstance(text, (str, int, float)) and not isinstance(text, bool):
        try:  # spreadsheets repeat their values: read each distinct one once
            return _parse_cached(type(text), text, quantity, default_unit, spectrometer_mhz)
        except UnitError:
            pass  # not cached; read again below so the message names the right field
    return _parse(text, quantity, field, default_unit, spectrometer_mhz)


@lru_cache(maxsize=1 << 16)
def _parse_cached(
    kind: type, text: object, quantity: str, default_unit: str | None, mhz: float | None
) -> ParsedValue:
    """:func:`_parse` per distinct input; ``kind`` keeps 1, 1.0 and "1" apart."""
    return _parse(text, quantity, "value", default_unit, mhz)


def _parse(
    text: object,
    quantity: str,
    field: str,
    default_unit: str | None,
    spectrometer_mhz: float | None,
) -> ParsedValue:
    if quantity not in CANONICAL:
        raise ValueError(f"unknown quantity kind {quantity!r}")
    raw = "" if text is None else str(text)
    if isinstance(text, float) and math.isnan(text):
        raw = ""
    cleaned = clean_text(raw)
    if not cleaned:
        raise UnitError(field, raw, "empty value")
    match = _VALUE_RE.match(cleaned)
    if not match:
        raise UnitError(field, raw, "no number found")
    try:
        number = _to_number(match["num"])
        error = _to_number(match["err"]) if match["err"] else None
        if match["paren"]:
            error = _paren_error(match["num"], match["paren"])
    except ValueError as exc:
        raise UnitError(field, raw, str(exc)) from exc
    if not math.isfinite(number) or (error is not None and not math.isfinite(error)):
        raise UnitError(field, raw, "number is not finite")
    if abs(number) > MAX_MAGNITUDE or (error is not None and error > MAX_MAGNITUDE):
        raise UnitError(field, raw, f"implausibly large (more than {MAX_MAGNITUDE:.0e})")
    if error is not None and error < 0:
        raise UnitError(field, raw, "an uncertainty cannot be negative")
    unit_written = match["unit"].strip()
    if quantity == "dimensionless":
        if unit_written:
            raise UnitError(field, raw, f"expected a plain number, found unit {unit_written!r}")
        return ParsedValue(number, error, raw, "")
    unit_text = unit_written or default_unit
    if not unit_text:
        raise UnitError(
            field, raw, f"no unit given; write one, e.g. '{number:g} {CANONICAL[quantity]}'"
        )
    return _convert(number, error, unit_text, quantity, field, raw, spectrometer_mhz)


@dataclass(frozen=True)
class _LinearMap:
    """canonical = scale·number + offset; an uncertainty (a difference) maps by scale alone."""

    scale: float
    offset: float
    problem: str | None = None


@lru_cache(maxsize=2048)
def _linear_map(unit_text: str, quantity: str) -> _LinearMap:
    """How a number in ``unit_text`` becomes the canonical unit of ``quantity``, worked out once.

    Every conversion we accept is affine (°C and °F carry an offset, the rest a factor), so pint is
    asked once per distinct unit spelling; reading a large sheet then costs a regex and two float
    operations per value.
    """
    normal = _normalise_unit_text(unit_text)
    if quantity in ("energy", "entropy") and normal.lower() in ("kcal", "kj", "cal", "j"):
        return _LinearMap(
            math.nan, math.nan, f"{unit_text!r} lacks 'per mol'; write e.g. '{unit_text}/mol'"
        )
    try:
        unit = _parse_unit(normal)
    except Exception:  # pint raises a variety of tokenizer errors on garbage
        return _LinearMap(math.nan, math.nan, f"unknown unit {unit_text!r}")
    problem = _dimension_problem(quantity, unit)
    if problem:
        return _LinearMap(math.nan, math.nan, problem)
    target = CANONICAL[quantity]
    angular = _radian_power(unit)
    if angular:
        return _angular_map(unit_text, unit, quantity, angular)
    try:
        if quantity == "temperature":
            offset = float(Q_(0.0, unit).to(target).magnitude)
            scale = float(Q_(1.0, unit).to(target).magnitude) - offset
        elif quantity == "temperature_difference":
            offset, scale = 0.0, _delta(1.0, unit)
        else:
            offset = 0.0
            scale = float(Q_(1.0, unit).to(target, "chemistry_per_molecule").magnitude)
    except pint.errors.DimensionalityError:
        return _LinearMap(math.nan, math.nan, f"{unit_text!r} cannot be read as {quantity}")
    return _LinearMap(scale, offset)


#: quantities whose values are frequencies in Hz (or MHz): an angular frequency is one of them
#: divided by 2π (ω = 2πν)
_FREQUENCIES = ("frequency", "shift", "field")


def _radian_power(unit: pint.Unit) -> int:
    """The power of the radian in ``unit``'s root units (rad/s → 1, Hz → 0, turn/s → 1).

    pint counts the radian as dimensionless, so ``628.3 rad/s`` would convert to 628.3 Hz; an
    angular frequency ω is 2π times the frequency ν. Angles written in degrees, turns or
    cycles all reduce to radians here.
    """
    root = Q_(1.0, unit).to_root_units()
    return int(dict(root.units._units).get("radian", 0))


def _angular_map(unit_text: str, unit: pint.Unit, quantity: str, power: int) -> _LinearMap:
    """An angular frequency as a frequency: divided by one turn (2π rad), through pint; refused
    for a rate constant (a number of events per second, not an angle per second)."""
    if quantity == "rate":
        reason = (
            f"{unit_text!r} is an angular frequency: a rate constant counts events per second; "
            "give it in s-1"
        )
        return _LinearMap(math.nan, math.nan, reason)
    if quantity not in _FREQUENCIES or power != 1:
        reason = f"{unit_text!r} is not a frequency: only an angle per time (rad/s) converts, by 2π"
        return _LinearMap(math.nan, math.nan, reason)
    per_turn = Q_(1.0, unit) / Q_(1.0, "turn")  # ω/2π: rad/s → Hz
    return _LinearMap(float(per_turn.to(CANONICAL[quantity]).magnitude), 0.0)


def _convert(
    number: float,
    error: float | None,
    unit_text: str,
    quantity: str,
    field: str,
    raw: str,
    spectrometer_mhz: float | None,
) -> ParsedValue:
    if quantity in ("shift", "frequency") and _normalise_unit_text(unit_text) == "ppm":
        if quantity == "frequency":
            raise UnitError(field, raw, "ppm is a shift, not a frequency")
        if spectrometer_mhz is None or spectrometer_mhz <= 0:
            raise UnitError(field, raw, "a value in ppm needs the spectrometer frequency (MHz)")
        hz = ppm_to_hz(number, spectrometer_mhz)
        err = ppm_to_hz(error, spectrometer_mhz) if error is not None else None
        return _finite(ParsedValue(hz, err, raw, unit_text), quantity, field)
    mapping = _linear_map(unit_text, quantity)
    if mapping.problem:
        raise UnitError(field, raw, mapping.problem)
    value = mapping.scale * number + mapping.offset
    if quantity == "temperature" and value < 0:
        raise UnitError(field, raw, "below absolute zero")
    err = None if error is None else abs(mapping.scale) * error
    return _finite(ParsedValue(float(value), err, raw, unit_text), quantity, field)


def _finite(parsed: ParsedValue, quantity: str, field: str) -> ParsedValue:
    """Refuse a value that is no longer a plausible finite number once converted (1e308 kcal/mol
    overflows to infinity in kJ/mol): nothing but finite numbers is ever stored."""
    values = (parsed.value,) if parsed.error is None else (parsed.value, parsed.error)
    if not all(math.isfinite(v) and abs(v) <= MAX_MAGNITUDE for v in values):
        raise UnitError(
            field,
            parsed.text,
            f"not a plausible finite value once converted to {CANONICAL_LABEL[quantity]}",
        )
    return parsed


def _delta(amount: float, unit: pint.Unit) -> float:
    """A temperature *difference* in kelvin: ±1 °C is ±1 K, ±1 °F is ±5/9 K (no offset)."""
    name = str(unit)
    if name in ("degree_Celsius", "degC"):
        return float(amount)
    if name in ("degree_Fahrenheit", "degF"):
        return float(Q_(amount, "delta_degF").to("K").magnitude)
    return float(Q_(amount, unit).to("K").magnitude)


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """Convert a plain float between two units that pint knows (offset temperatures allowed)."""
    frm = _parse_unit(_normalise_unit_text(from_unit))
    to = _parse_unit(_normalise_unit_text(to_unit))
    return float(Q_(value, frm).to(to, "chemistry_per_molecule").magnitude)


def energy_from_kj(value_kj_mol: float, unit: str) -> float:
    """Express a canonical energy (kJ/mol) in ``unit`` (kJ/mol or kcal/mol …) for display."""
    return convert(value_kj_mol, "kJ/mol", unit)


def unit_of(text: str, quantity: str, field: str = "unit") -> str:
    """Check that ``text`` is a unit of ``quantity`` and return it in pint's grammar."""
    normal = _normalise_unit_text(text)
    if quantity == "shift" and normal == "ppm":
        return "ppm"
    try:
        unit = _parse_unit(normal)
    except Exception as exc:
        raise UnitError(field, text, f"unknown unit {text!r}") from exc
    _check_dimension(quantity, unit, field, text)
    return normal
