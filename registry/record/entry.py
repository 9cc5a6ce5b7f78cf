"""One measurement as a user reports it (texts) and as the registry stores it (texts + floats).

``add`` on the command line and every row of an imported spreadsheet go through
:func:`normalize_entry`, so both accept the same notations and give the same errors. All problems
of an entry are collected (not just the first), each naming the field and the text.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from dataclasses import field as dc_field
from typing import Any

from registry.errors import FluxledgerError, UnitError
from registry.record import conventions, fields, vocab
from registry.record.nuclei import observe_frequency_mhz
from registry.record.populations import parse_population_ratio
from registry.record.spelling import read_nucleus
from registry.record.theory import read_standard_state
from registry.record.units import ParsedValue, parse_value

#: value fields read on their own (the frequency is read first and Δν at it)
_PLAIN_VALUES = tuple(f.name for f in fields.VALUE_FIELDS if f.name not in ("field", "dnu"))


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
    direction: str | None = None  # which direction an unequal-population barrier refers to
    convention: str | None = None  # which rate constant k and ΔG‡ refer to
    degeneracy: str | None = None  # path degeneracy (statistical factor σ)
    kappa: str | None = None  # transmission coefficient κ
    order: str | None = None  # reaction order: 1, or 2 for bimolecular exchange
    concentration: str | None = None  # of the exchange partner, for order 2
    calibration: str | None = None  # how the probe temperature was calibrated (± σ)
    dh_ds_corr: str | None = None  # correlation of ΔH‡ and ΔS‡ from their fit
    theory: str | None = None  # a computed barrier's level of theory, as written
    functional: str | None = None  # its electronic-structure method (e.g. a DFT functional)
    basis: str | None = None  # its basis set
    solvation: str | None = None  # its solvation model
    conformers: str | None = None  # how conformers were treated
    standard_state: str | None = None  # 1 M, 1 atm or 1 bar (registry.record.theory)
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
    inp: EntryInput, known_kinds: vocab.Vocabulary | tuple[str, ...] = ()
) -> tuple[NormalizedEntry | None, list[Problem]]:
    """Check and convert one entry; returns the entry (or None) and every problem found.

    ``known_kinds`` is the registry's :class:`~registry.record.vocab.Vocabulary` (its process
    kinds and stored aliases), or just its process kinds.
    """
    problems: list[Problem] = []
    method, kind, status, nucleus = _vocabulary(inp, vocab.Vocabulary.of(known_kinds), problems)
    values = _values(inp, nucleus, problems)
    ratio = _population(inp, problems)
    recorded = _recorded(inp, values, problems)
    rates = _rates(inp, problems)
    if problems:
        return None, problems
    measurement = _measurement_columns(values)
    measurement.update(recorded)
    tc, dg_t = values.get("tc"), values.get("dg_t")
    if dg_t is None and tc is not None and values.get("dg") is not None:
        measurement["dg_t_k"] = tc.value  # ΔG‡ reported at Tc
    measurement.update(
        label=text_of(inp.label),
        method=method,
        solvent_text=text_of(inp.solvent),
        reference=text_of(inp.reference),
        status=status,
    )
    compound = {
        "label": text_of(inp.compound),
        "name": text_of(inp.name),
        "smiles_input": text_of(inp.smiles),
    }
    solvent = measurement["solvent_text"]
    return (
        NormalizedEntry(
            compound,
            _process(inp, kind, nucleus),
            measurement,
            _coalescence(inp, values, ratio),
            rates,
            vocab.solvent_key(solvent) if solvent else None,
        ),
        [],
    )


def _vocabulary(
    inp: EntryInput, vocabulary: vocab.Vocabulary, problems: list[Problem]
) -> tuple[str | None, str | None, str, str]:
    """Method, process kind, status and nucleus in the registry's own words (problems
    collected)."""
    method = kind = None
    nucleus = ""
    if blank(inp.method):
        problems.append(Problem("method", "", f"required; one of {', '.join(vocab.METHODS)}"))
    else:
        try:
            method = vocab.method_name(str(inp.method), vocabulary=vocabulary)
        except UnitError as exc:
            problems.append(Problem("method", str(inp.method), exc.reason))
    if not blank(inp.nucleus):
        try:
            nucleus = vocab.nucleus_name(str(text_of(inp.nucleus)), vocabulary)
        except UnitError as exc:
            problems.append(Problem("nucleus", str(inp.nucleus), exc.reason))
    if blank(inp.smiles) and blank(inp.compound) and blank(inp.name):
        problems.append(Problem("compound", "", "give a SMILES, a compound label or a name"))
    if not blank(inp.process):
        try:
            kind = vocab.process_kind_name(str(inp.process), vocabulary)
        except UnitError as exc:
            problems.append(Problem("process", str(inp.process), exc.reason))
    status = "draft"
    if not blank(inp.status):
        try:
            status = vocab.status_name(str(inp.status))
        except UnitError as exc:
            problems.append(Problem("status", str(inp.status), exc.reason))
    return method, kind, status, nucleus


def _values(inp: EntryInput, nucleus: str, problems: list[Problem]) -> dict[str, ParsedValue]:
    """Every value field read in its canonical unit: the frequency first, Δν (in ppm) at the
    observed nucleus' frequency; coalescence data checked for completeness."""
    values: dict[str, ParsedValue] = {}
    field_v = _parse(inp, "field", problems)
    if field_v is not None:
        values["field"] = field_v
        if field_v.value <= 0:
            problems.append(
                Problem("field", field_v.text, "the spectrometer frequency must be positive")
            )
    for name in _PLAIN_VALUES:
        parsed = _parse(inp, name, problems)
        if parsed is not None:
            values[name] = parsed
    before = len(problems)
    mhz = field_v.value if field_v else None
    observe_mhz = _observe_mhz(mhz, nucleus, inp, problems)
    dnu_refused = len(problems) > before
    dnu = None if dnu_refused else _parse(inp, "dnu", problems, mhz=observe_mhz)
    if dnu is not None:
        values["dnu"] = dnu
        if dnu.value <= 0:
            problems.append(Problem("dnu", dnu.text, "Δν must be positive"))
    if ("tc" in values) != (dnu is not None) and not dnu_refused:
        missing = "dnu" if dnu is None else "tc"
        problems.append(Problem(missing, "", "missing: coalescence data needs both Tc and Δν"))
    return values


def _population(inp: EntryInput, problems: list[Problem]) -> float | None:
    if blank(inp.population):
        return None
    try:
        return parse_population_ratio(
            str(text_of(inp.population)), unit=inp.units.get("population")
        )
    except UnitError as exc:
        problems.append(Problem("population", str(inp.population), exc.reason))
        return None


#: the measurement columns :func:`_recorded` fills (always all of them, None when not given)
RECORDED_COLUMNS = ("k_convention", "path_degeneracy", "reaction_order", "dg_direction",
                    "t_calibration_text", "t_calibration", "t_calibration_err_k",
                    "theory_level", "theory_method", "theory_basis", "theory_solvation",
                    "theory_conformers", "standard_state")  # fmt: skip
#: a computed barrier's free texts: field → column (stored as written)
_THEORY_TEXTS = (("theory", "theory_level"), ("functional", "theory_method"),
                 ("basis", "theory_basis"), ("solvation", "theory_solvation"),
                 ("conformers", "theory_conformers"))  # fmt: skip


def _recorded(
    inp: EntryInput, values: dict[str, ParsedValue], problems: list[Problem]
) -> dict[str, Any]:
    """What the entry records about its rate constant and its temperatures (see
    :mod:`registry.record.conventions`), checked: the readers' words, κ > 0, −1 ≤ r ≤ 1, and
    a concentration for a bimolecular exchange."""
    out: dict[str, Any] = dict.fromkeys(RECORDED_COLUMNS)
    readers = (
        ("convention", "k_convention", conventions.read_convention),
        ("degeneracy", "path_degeneracy", conventions.read_degeneracy),
        ("order", "reaction_order", conventions.read_order),
        ("direction", "dg_direction", conventions.read_direction),
    )
    for name, column, read in readers:
        raw = text_of(getattr(inp, name))
        if raw is None:
            continue
        try:
            out[column] = read(raw, name)
        except UnitError as exc:
            problems.append(Problem(name, raw, exc.reason))
    calibration = text_of(inp.calibration)
    if calibration is not None:
        try:
            cal = conventions.read_calibration(calibration)
        except UnitError as exc:
            problems.append(Problem("calibration", calibration, exc.reason))
        else:
            out.update(t_calibration_text=cal.text, t_calibration=cal.name,
                       t_calibration_err_k=cal.sigma_k)  # fmt: skip
    for name, column in _THEORY_TEXTS:
        out[column] = text_of(getattr(inp, name))
    state = text_of(inp.standard_state)
    if state is not None:
        try:
            out["standard_state"] = read_standard_state(state)
        except UnitError as exc:
            problems.append(Problem("standard_state", state, exc.reason))
    _check_ranges(values, out, problems)
    return out


def _check_ranges(
    values: dict[str, ParsedValue], recorded: dict[str, Any], problems: list[Problem]
) -> None:
    kappa, corr, conc = values.get("kappa"), values.get("dh_ds_corr"), values.get("concentration")
    if kappa is not None and not 0.0 < kappa.value <= 100.0:
        problems.append(Problem("kappa", kappa.text, "the transmission coefficient κ must be > 0"))
    if corr is not None and not -1.0 <= corr.value <= 1.0:
        problems.append(Problem("dh_ds_corr", corr.text, "a correlation lies between −1 and 1"))
    if conc is not None and conc.value <= 0:
        problems.append(Problem("concentration", conc.text, "a concentration must be positive"))
    if recorded.get("reaction_order") == 2 and conc is None:
        problems.append(
            Problem(
                "concentration",
                "",
                "a bimolecular exchange (order 2) needs the concentration of its partner: "
                "k₂ = k/[X], and its ΔG‡ refers to the 1 M standard state",
            )
        )


def _rates(inp: EntryInput, problems: list[Problem]) -> list[dict[str, Any]]:
    """The rate points (T, k) of the entry, each read with its unit."""
    rates = []
    for i, (t_text, k_text) in enumerate(inp.rates, start=1):
        try:
            t = parse_value(
                t_text, "temperature", field=f"rate {i} T", default_unit=inp.units.get("t")
            )
            k = parse_value(k_text, "rate", field=f"rate {i} k", default_unit=inp.units.get("k"))
            if k.value <= 0:
                raise UnitError(f"rate {i} k", k_text, "a rate constant must be positive")
        except UnitError as exc:
            problems.append(Problem(exc.field, exc.text, exc.reason))
            continue
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
    return rates


def _stored(f: fields.Field, parsed: ParsedValue | None) -> dict[str, Any]:
    """The columns one value field fills (text, canonical value, uncertainty)."""
    out: dict[str, Any] = {
        f.text_column: parsed.text if parsed else None,
        f.value_column: parsed.value if parsed else None,
    }
    if f.error_column:
        out[f.error_column] = parsed.error if parsed else None
    return out


def _measurement_columns(values: dict[str, ParsedValue]) -> dict[str, Any]:
    columns: dict[str, Any] = {}
    for f in fields.stored_values("measurement"):
        columns.update(_stored(f, values.get(f.name)))
    return columns


def _coalescence(
    inp: EntryInput, values: dict[str, ParsedValue], ratio: float | None
) -> dict[str, Any] | None:
    if "tc" not in values or "dnu" not in values:
        return None
    row: dict[str, Any] = {}
    for f in fields.stored_values("coalescence"):
        row.update(_stored(f, values.get(f.name)))
    field_v = values.get("field")
    row.update(
        population_ratio=ratio,
        population_text=text_of(inp.population),
        field_mhz=field_v.value if field_v else None,
        field_text=field_v.text if field_v else None,
    )
    return row


def _process(inp: EntryInput, kind: str | None, nucleus: str) -> dict[str, Any] | None:
    """What moves: the kind given, or ``other`` when only sites or a nucleus are given."""
    if kind is None and blank(inp.sites) and blank(inp.nucleus):
        return None
    return {
        "kind": kind or "other",
        "sites": text_of(inp.sites) or "",
        "nucleus": nucleus,
    }


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
    """'1H', 'H-1', '¹H', '13C', 'proton' … → '1H', '13C'; a text that is no nucleus comes back
    as written (for filters; entries refuse it, see :func:`registry.record.vocab.nucleus_name`)."""
    t = text_of(text)
    if not t:
        return ""
    return read_nucleus(t) or t
