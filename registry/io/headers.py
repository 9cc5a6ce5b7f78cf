"""Column headers as groups write them → entry fields and the unit the header gives.

A header is split into a concept and a unit (``ΔG‡ (kcal/mol)``, ``dG# / kJ mol-1``,
``Barrier [kJ/mol]``, ``T_c/K``, ``Tc, °C``, ``dnu_hz``); the concept is folded to a key
(Greek letters spelled out, daggers and punctuation dropped) and looked up in
:data:`CONCEPTS`. To teach the importer a new spelling, add its key there (see
DEVELOPERS.md); a mapping file overrides any guess.

Field names are those of :class:`registry.record.entry.EntryInput`, plus the rate-sheet fields
``t``, ``k``, ``t_err``, ``k_err``, ``rates`` (an export's embedded rate list), ``<field>_err``
for a separate uncertainty column, and the roles ``extra`` and ``ignore``.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass

from registry.errors import UnitError
from registry.record import fields

#: fields whose cells are physical values, and the quantity kind each is read as
VALUE_QUANTITY: dict[str, str] = {
    f.name: f.quantity for f in fields.FIELDS if f.quantity and f.quantity != "dimensionless"
}

#: fields whose cells are plain text (log10 A, κ, a correlation: bare numbers, read as text
#: and then parsed, never given a header's unit)
TEXT_FIELDS = (
    *(f.name for f in fields.FIELDS if not f.is_value),
    *(f.name for f in fields.FIELDS if f.quantity == "dimensionless"),
)

#: every field a column can be mapped to (besides '<value field>_err', 'extra', 'ignore')
FIELDS = (*TEXT_FIELDS, *VALUE_QUANTITY)

#: what a user calls each field, for messages and the dry-run table
FIELD_TITLES: dict[str, str] = {
    f.name: f.title for f in fields.FIELDS if f.name in VALUE_QUANTITY or f.name == "rates"
}

#: concept keys (see concept_key) → field; keys are lowercase letters and digits only
CONCEPTS: dict[str, str] = {key: f.name for f in fields.FIELDS for key in f.headers}

#: prefixes/suffixes that turn a concept into "the uncertainty of" it (σ_k, ΔG‡ err, u(Tc) …)
_ERROR_WORDS = ("sigma", "err", "error", "sd", "stdev", "std", "u", "uncertainty", "esd")

#: unit spellings written after an underscore in snake-case headers (dg_kcal_mol, tc_k)
_SUFFIX_UNITS: dict[str, str] = {
    "kjmol": "kJ/mol",
    "kj": "kJ/mol",
    "kcalmol": "kcal/mol",
    "kcal": "kcal/mol",
    "k": "K",
    "c": "°C",
    "degc": "°C",
    "hz": "Hz",
    "ppm": "ppm",
    "mhz": "MHz",
    "jmolk": "J/(mol*K)",
    "calmolk": "cal/(mol*K)",
    "eu": "e.u.",
    "pers": "1/s",
    "s1": "1/s",
    "cm1": "1/cm",
}

#: headers an export writes for values it derives; the importer skips them (recomputed)
DERIVED_MARKERS = ("(normalized)", "(derived)")
EXTRA_PREFIX = "extra:"

_GREEK = {
    "Δ": "d",
    "δ": "delta",
    "ν": "nu",
    "σ": "sigma",
    "τ": "tau",
    "Ω": "omega",
    "κ": "kappa",
}
_DAGGERS = ("‡", "≠", "#", "†", "^", "*")
#: words that join a concept without naming it ("T for ΔG‡", "temperature of coalescence")
_FILLERS = re.compile(r"\b(?:for|of|at|the|a|an)\b", re.I)
#: ``name (unit)``, the unit may hold one level of parentheses itself: ``dS (J/(mol K))``
_UNIT_BRACKETS = re.compile(
    r"^(?P<name>.*?)\s*[(\[{](?P<unit>(?:[^()\[\]{}]|\([^()\[\]{}]*\))*)[)\]}]\s*$"
)


@dataclass(frozen=True)
class HeaderGuess:
    """What a header means: the field (or None), the unit it gives, and whether it is an error column."""

    header: str
    field: str | None
    unit: str | None
    role: str  # "value", "error", "extra", "ignore", "derived"
    #: for a rate column, the rate constant its header names (``kex`` → exchange), else None
    convention: str | None = None


def concept_key(name: str) -> str:
    """Fold a header's concept to a lookup key: ``ΔG‡`` → ``dg``, ``Δν`` → ``dnu``, ``T_c`` → ``tc``."""
    text = name.strip()
    for dagger in _DAGGERS:
        text = text.replace(dagger, "")
    for greek, latin in _GREEK.items():
        text = text.replace(greek, latin)
    text = text.lower()
    text = re.sub(r"\bdelta\s*", "d", text)
    text = re.sub(r"\bdouble\s*dagger\b|\bdagger\b", "", text)
    return re.sub(r"[^a-z0-9]", "", text)


def split_header(header: str) -> tuple[str, str | None]:
    """(concept part, unit part or None): ``Tc (°C)``, ``dG# / kJ mol-1``, ``Tc, K``, ``dG in kJ/mol``."""
    text = " ".join(str(header).split())
    m = _UNIT_BRACKETS.match(text)
    if m and m["name"]:
        return m["name"], m["unit"].strip() or None
    m = re.match(r"^(?P<name>.+?)\s+in\s+(?P<unit>\S+)$", text)
    if m:
        return m["name"], m["unit"].strip()
    if "/" in text:
        name, unit = text.split("/", 1)
        if name.strip() and unit.strip():
            return name.strip(), unit.strip()
    m = re.match(r"^(?P<name>.+?)\s*,\s*(?P<unit>[^,]+)$", text)
    if m:
        return m["name"], m["unit"].strip()
    return text, None


def _snake_unit(name: str) -> tuple[str, str | None]:
    """``dg_kcal_mol`` → (``dg``, kcal/mol); ``tc_k`` → (``tc``, K); else (name, None)."""
    parts = re.split(r"[_\s]+", name.strip())
    for cut in range(1, len(parts)):
        suffix = re.sub(r"[^a-z0-9]", "", "".join(parts[cut:]).lower())
        if suffix in _SUFFIX_UNITS:
            return "_".join(parts[:cut]), _SUFFIX_UNITS[suffix]
    return name, None


def _lookup(concept: str) -> tuple[str | None, bool]:
    """(field, is_error_column) for a concept part (filler words such as "for" dropped when the
    whole concept is not known: ``T for dG`` is ``T dG``)."""
    key = concept_key(concept)
    if key in CONCEPTS:
        return CONCEPTS[key], False
    plain = concept_key(_FILLERS.sub(" ", concept))
    if plain and plain in CONCEPTS:
        return CONCEPTS[plain], False
    if key in ("", "pm", "plusminus") or concept.strip() in ("±", "+/-", "+-"):
        return None, True  # a bare "±" column: the error of the column before it
    for word in _ERROR_WORDS:
        for stem in (key.removeprefix(word), key.removesuffix(word)):
            if stem != key and stem in CONCEPTS:
                return CONCEPTS[stem], True
    return None, False


def guess_header(header: str) -> HeaderGuess:
    """Recognise one header; unknown headers become extra attributes, never dropped."""
    raw = str(header).strip()
    low = raw.lower()
    if any(low.endswith(marker) for marker in DERIVED_MARKERS):
        return HeaderGuess(raw, None, None, "derived")
    if low.startswith(EXTRA_PREFIX):
        return HeaderGuess(raw, None, None, "extra")
    whole = concept_key(raw)
    if "/" in raw and len(whole) > 4 and whole in CONCEPTS:  # "ΔH‡/ΔS‡ corr": one name
        return HeaderGuess(raw, CONCEPTS[whole], None, "value")
    concept, unit = split_header(raw)
    field, is_error = _lookup(concept)
    if field is None and unit and concept_key(concept) in _ERROR_WORDS:
        inner, inner_is_error = _lookup(unit)  # "u(Tc)", "σ(ΔG‡)": the uncertainty of Tc, ΔG‡
        if inner is not None and not inner_is_error:
            return HeaderGuess(raw, inner, None, "error")
    if field is None and not is_error:
        stem, suffix_unit = _snake_unit(concept)
        if suffix_unit is not None:
            field, is_error = _lookup(stem)
            if field is not None or is_error:
                unit = unit or suffix_unit
    if field is None and not is_error and unit is None:
        # "ΔG‡ kcal/mol": a unit written after the concept with only a space between
        m = re.match(r"^(?P<name>\S+)\s+(?P<unit>\S+(?:\s+\S+)?)$", raw)
        if m:
            field2, err2 = _lookup(m["name"])
            if field2 is not None and not err2 and field2 in VALUE_QUANTITY:
                return HeaderGuess(raw, field2, m["unit"], "value")
    if is_error:
        return HeaderGuess(raw, field, unit, "error")
    if field is None and "/" in raw:  # "E/Z", "Ref/DOI": a slash inside the name, not a unit
        whole = concept_key(raw)
        if whole in CONCEPTS:
            return HeaderGuess(raw, CONCEPTS[whole], None, "value")
    if field is None:
        return HeaderGuess(raw, None, None, "extra")
    if field == "field" and unit is None and concept_key(concept) == "mhz":
        unit = "MHz"
    if field == "k":
        return _rate_header(raw, concept, unit)
    return HeaderGuess(raw, field, unit, "value")


def _rate_header(raw: str, concept: str, unit: str | None) -> HeaderGuess:
    """A rate column: the convention its name (``kex``, ``k_rac``) or remark (``k (per site)``,
    ``k(AB)``) names; a remark that names one is not a unit."""
    from registry.record.conventions import convention_of_header

    key = concept_key(concept)
    convention = convention_of_header(key)
    if unit is not None:
        remark = concept_key(unit)
        named = convention_of_header(remark) or convention_of_header("k" + remark)
        if named is not None:
            convention, unit = convention or named, None
    return HeaderGuess(raw, "k", unit, "value", convention)


# ---------------------------------------------------------------- hints for unknown headers

#: fields a hint may name: the value fields of an entry, and a rate constant
_HINT_FIELDS = tuple(
    f.name for f in fields.FIELDS if f.name in VALUE_QUANTITY and (f.entry or f.name == "k")
)


def quantity_hint(header: str) -> list[str]:
    """The fields an unrecognised header probably names, best first (empty: no quantity).

    A header looks like a quantity when its unit part is a unit (``Freq / MHz``: a frequency)
    or its name begins with a field's symbol (``ΔG‡ calc``). Among the fields of that
    quantity, the one whose header spellings are nearest the name is named alone when it is
    clearly nearest; otherwise all of them are.
    """
    concept, unit = split_header(header)
    key = concept_key(concept)
    if unit:
        fits = [f for f in _HINT_FIELDS if _unit_fits(unit, VALUE_QUANTITY[f])]
    else:
        fits = [f for f in _HINT_FIELDS if any(_begins(key, h) for h in fields.BY_NAME[f].headers)]
    if len(fits) <= 1 or not key:
        return fits
    score = {f: _likeness(key, f) for f in fits}
    best = max(fits, key=lambda f: score[f])
    return [best] if score[best] >= 0.5 else fits


def _begins(key: str, spelling: str) -> bool:
    """``dgcalc`` begins with the symbol ``dg`` (symbols: spellings of two to three characters)."""
    return 2 <= len(spelling) <= 3 and key.startswith(spelling) and key != spelling


def _likeness(key: str, name: str) -> float:
    """How near ``key`` is to the field's header spellings (1: begins with its symbol)."""
    spellings = fields.BY_NAME[name].headers
    if any(_begins(key, h) for h in spellings):
        return 1.0
    return max((difflib.SequenceMatcher(None, key, h).ratio() for h in spellings), default=0.0)


def _unit_fits(unit: str, quantity: str) -> bool:
    from registry.record.units import unit_of  # pint: loaded by the import anyway

    try:
        unit_of(unit, quantity)
    except UnitError:
        return False
    except Exception:  # pint's parser raises assorted errors on odd text
        return False
    return True
