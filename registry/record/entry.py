"""One measurement as a user reports it (texts) and as the registry stores it (texts + floats).

``add`` on the command line and every row of an imported spreadsheet go through
:func:`normalize_entry`, so both accept the same notations and give the same errors. All problems
of an entry are collected (not just the first), each naming the field and the text.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from dataclasses import field as dc_field
from typing import Any

from registry.errors import FluxledgerError, UnitError
from registry.record import fields, vocab
from registry.record.nuclei import observe_frequency_mhz
from registry.record.units import ParsedValue, parse_value

#: value fields read on their own (the frequency first, Δν at it, log10 A without a unit)
_PLAIN_VALUES = tuple(
    f.name for f in fields.VALUE_FIELDS if f.name not in ("field", "dnu", "log10_a")
)


@dataclass
class EntryInput:
    """What a user reported for one measurement, as text. ``units`` holds header units per field."""

    method: str | None = None
    label: str | None = None
    compound: str | None = None  # the group's compound code
    name: str | None = None
    smiles: str | None = None
    process: str | None = None
    sites: str | None = None
    nucleus: str | None = None
    solvent: str | None = None
    field: str | None = None
    t_min: str | None = None
    t_max: str | None = None
    dg: str | None = None
    dg_t: str | None = None
    dh: str | None = None
    ds: str | None = None
    ea: str | None = None
    log10_a: str | None = None
    tc: str | None = None
    dnu: str | None = None
    j: str | None = None
    population: str | None = None
    reference: str | None = None
    status: str | None = None
    extra: dict[str, Any] = dc_field(default_factory=dict)
    rates: list[tuple[str, str]] = dc_field(default_factory=list)  # (T text, k text)
    units: dict[str, str] = dc_field(default_factory=dict)


@dataclass
class Problem:
    field: str
    text: str
    reason: str

    def __str__(self) -> str:
        return (
            f"{self.field}: {self.text!r}: {self.reason}"
            if self.text
            else f"{self.field}: {self.reason}"
        )


class EntryError(FluxledgerError):
    """Several problems in one entry; each names its field and text. Nothing was written."""

    def __init__(self, problems: list[Problem]) -> None:
        super().__init__(problems)
        self.problems = problems

    def __str__(self) -> str:
        body = "\n  ".join(str(p) for p in self.problems)
        return f"{len(self.problems)} problems; nothing was written\n  {body}"


@dataclass
class NormalizedEntry:
    """An entry ready to write: compound identity, process, measurement columns, children."""

    compound: dict[str, Any]
    process: dict[str, Any] | None
    measurement: dict[str, Any]
    coalescence: dict[str, Any] | None
    rates: list[dict[str, Any]]
    solvent_key: str | None


def blank(value: object) -> bool:
    """True for None, NaN and whitespace-only text (an empty spreadsheet cell)."""
    if value is None:
        return True
    if isinstance(value, float) and math.isnan(value):
        return True
    return isinstance(value, str) and not value.strip()


def text_of(value: object) -> str | None:
    """A cell as text; floats that are whole numbers lose their '.0'."""
    if blank(value):
        return None
    if isinstance(value, float) and value.is_integer() and abs(value) < 1e15:
        return str(int(value))
    return str(value).strip()


def parse_population_ratio(text: str, field_name: str = "population") -> float:
    """``60:40``, ``1.5`` (major/minor) or ``0.6`` (one site's fraction) → ratio major/minor ≥ 1."""
    t = text.strip().replace("/", ":")
    try:
        if ":" in t:
            a, b = (float(x) for x in t.split(":", 1))
            if a <= 0 or b <= 0:
                raise ValueError
            return max(a, b) / min(a, b)
        x = float(t)
    except ValueError as exc:
        raise UnitError(field_name, text, "expected a ratio such as '60:40' or '1.5'") from exc
    if x <= 0 or not math.isfinite(x):
        raise UnitError(field_name, text, "a population ratio must be positive")
    if x < 1:  # a fraction of one site: the ratio is the same whichever site it names
        return max(x, 1 - x) / min(x, 1 - x)
    return x


def _parse(
    inp: EntryInput, name: str, problems: list[Problem], *, mhz: float | None = None
) -> ParsedValue | None:
    raw = getattr(inp, name)
    if blank(raw):
        return None
    quantity = fields.quantity_of(name)
    try:
        return parse_value(
            raw, quantity, field=name, default_unit=inp.units.get(name), spectrometer_mhz=mhz
        )
    except UnitError as exc:
        problems.append(Problem(name, str(raw), exc.reason))
        return None


def normalize_entry(
    inp: EntryInput, known_kinds: tuple[str, ...] = ()
) -> tuple[NormalizedEntry | None, list[Problem]]:
    """Check and convert one entry; returns the entry (or None) and every problem found."""
    problems: list[Problem] = []
    method = None
    if blank(inp.method):
        problems.append(Problem("method", "", f"required; one of {', '.join(vocab.METHODS)}"))
    else:
        try:
            method = vocab.method_name(str(inp.method))
        except UnitError as exc:
            problems.append(Problem("method", str(inp.method), exc.reason))
    if blank(inp.smiles) and blank(inp.compound) and blank(inp.name):
        problems.append(Problem("compound", "", "give a SMILES, a compound label or a name"))
    kind = None
    if not blank(inp.process):
        try:
            kind = vocab.process_kind_name(str(inp.process), known_kinds)
        except UnitError as exc:
            problems.append(Problem("process", str(inp.process), exc.reason))
    status = "draft"
    if not blank(inp.status):
        try:
            status = vocab.status_name(str(inp.status))
        except UnitError as exc:
            problems.append(Problem("status", str(inp.status), exc.reason))

    field_v = _parse(inp, "field", problems)
    mhz = field_v.value if field_v else None
    values = {n: _parse(inp, n, problems) for n in _PLAIN_VALUES}
    nucleus = normalize_nucleus(inp.nucleus)
    before = len(problems)
    observe_mhz = _observe_mhz(mhz, nucleus, inp, problems)
    dnu_refused = len(problems) > before
    dnu = None if dnu_refused else _parse(inp, "dnu", problems, mhz=observe_mhz)
    log10_a = None
    if not blank(inp.log10_a):
        try:
            log10_a = parse_value(inp.log10_a, "dimensionless", field="log10_a")
        except UnitError as exc:
            problems.append(Problem("log10_a", str(inp.log10_a), exc.reason))
    ratio = None
    if not blank(inp.population):
        try:
            ratio = parse_population_ratio(str(inp.population))
        except UnitError as exc:
            problems.append(Problem("population", str(inp.population), exc.reason))

    tc = values["tc"]
    if (tc is None) != (dnu is None) and not dnu_refused:
        missing = "dnu" if dnu is None else "tc"
        problems.append(Problem(missing, "", "missing: coalescence data needs both Tc and Δν"))
    if dnu is not None and dnu.value <= 0:
        problems.append(Problem("dnu", dnu.text, "Δν must be positive"))
    if field_v is not None and field_v.value <= 0:
        problems.append(
            Problem("field", field_v.text, "the spectrometer frequency must be positive")
        )

    rates = []
    for i, (t_text, k_text) in enumerate(inp.rates, start=1):
        try:
            t = parse_value(
                t_text, "temperature", field=f"rate {i} T", default_unit=inp.units.get("t")
            )
            k = parse_value(k_text, "rate", field=f"rate {i} k", default_unit=inp.units.get("k"))
            if k.value <= 0:
                raise UnitError(f"rate {i} k", k_text, "a rate constant must be positive")
            rates.append(
                {
                    "t_k": t.value,
                    "t_err_k": t.error,
                    "t_text": t.text,
                    "k_per_s": k.value,
                    "k_err_per_s": k.error,
                    "k_text": k.text,
                }
            )
        except UnitError as exc:
            problems.append(Problem(exc.field, exc.text, exc.reason))

    if problems:
        return None, problems

    def v(name: str, attr: str = "value") -> Any:
        pv = values[name]
        return getattr(pv, attr) if pv is not None else None

    dg_t_k = v("dg_t")
    if dg_t_k is None and tc is not None and values["dg"] is not None:
        dg_t_k = tc.value
    measurement = {
        "label": text_of(inp.label),
        "method": method,
        "solvent_text": text_of(inp.solvent),
        "field_mhz": mhz,
        "field_text": field_v.text if field_v else None,
        "t_min_k": v("t_min"),
        "t_min_text": v("t_min", "text"),
        "t_max_k": v("t_max"),
        "t_max_text": v("t_max", "text"),
        "dg_kj_mol": v("dg"),
        "dg_err_kj_mol": v("dg", "error"),
        "dg_text": v("dg", "text"),
        "dg_t_k": dg_t_k,
        "dg_t_text": v("dg_t", "text"),
        "dh_kj_mol": v("dh"),
        "dh_err_kj_mol": v("dh", "error"),
        "dh_text": v("dh", "text"),
        "ds_j_mol_k": v("ds"),
        "ds_err_j_mol_k": v("ds", "error"),
        "ds_text": v("ds", "text"),
        "ea_kj_mol": v("ea"),
        "ea_err_kj_mol": v("ea", "error"),
        "ea_text": v("ea", "text"),
        "log10_a": log10_a.value if log10_a else None,
        "log10_a_err": log10_a.error if log10_a else None,
        "log10_a_text": log10_a.text if log10_a else None,
        "reference": text_of(inp.reference),
        "status": status,
    }
    coalescence = None
    if tc is not None and dnu is not None:
        jv = values["j"]
        coalescence = {
            "tc_k": tc.value,
            "tc_err_k": tc.error,
            "tc_text": tc.text,
            "dnu_hz": dnu.value,
            "dnu_err_hz": dnu.error,
            "dnu_text": dnu.text,
            "j_hz": jv.value if jv else None,
            "j_text": jv.text if jv else None,
            "population_ratio": ratio,
            "population_text": text_of(inp.population),
            "field_mhz": mhz,
            "field_text": field_v.text if field_v else None,
        }
    compound = {
        "label": text_of(inp.compound),
        "name": text_of(inp.name),
        "smiles_input": text_of(inp.smiles),
    }
    process = None
    if kind is not None:
        process = {
            "kind": kind,
            "sites": text_of(inp.sites) or "",
            "nucleus": normalize_nucleus(inp.nucleus),
        }
    elif not blank(inp.sites) or not blank(inp.nucleus):
        process = {
            "kind": "other",
            "sites": text_of(inp.sites) or "",
            "nucleus": normalize_nucleus(inp.nucleus),
        }
    solvent_key = (
        vocab.solvent_key(measurement["solvent_text"]) if measurement["solvent_text"] else None
    )
    return NormalizedEntry(compound, process, measurement, coalescence, rates, solvent_key), []


def _observe_mhz(
    proton_mhz: float | None, nucleus: str, inp: EntryInput, problems: list[Problem]
) -> float | None:
    """The frequency at which a Δν in ppm becomes Hz: the observed nucleus' own, not ¹H's."""
    if proton_mhz is None or not nucleus or nucleus == "1H":
        return proton_mhz
    observe = observe_frequency_mhz(proton_mhz, nucleus)
    if (
        observe is None
        and not blank(inp.dnu)
        and "ppm" in str(inp.dnu).lower() + inp.units.get("dnu", "").lower()
    ):
        problems.append(
            Problem(
                "dnu",
                str(inp.dnu),
                f"give Δν in Hz: the observe frequency of {nucleus} is not known to fluxledger",
            )
        )
    return observe


def normalize_nucleus(text: object) -> str:
    """'1H', 'H-1', '¹H', '13C' … → '1H', '13C'."""
    t = text_of(text)
    if not t:
        return ""
    sup = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
    t = t.translate(sup).replace(" ", "")
    m = re.fullmatch(r"(\d+)([A-Za-z]{1,2})", t) or re.fullmatch(r"([A-Za-z]{1,2})-?(\d+)", t)
    if not m:
        return t
    a, b = m.groups()
    mass, sym = (a, b) if a.isdigit() else (b, a)
    return f"{mass}{sym[0].upper()}{sym[1:].lower()}"
