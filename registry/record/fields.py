"""The table of fields: what each reported value is, where it is stored, how headers name it.

Knowledge as data, written once. Entry normalisation (:mod:`registry.record.entry`), ``edit``
and the history's summaries (:mod:`registry.admin.edits`), ``verify`` (which re-reads every
stored text), the importer's header recognition (:mod:`registry.io.headers`), the export and the
listings all read this table; none keeps a list of its own.

A field is named as :class:`registry.record.entry.EntryInput` names it (``dg``, ``tc``). Value
fields have a quantity kind (read by :func:`registry.record.units.parse_value`; the canonical
unit is :data:`registry.record.units.CANONICAL` of that kind) and up to three columns: the text
as reported, the canonical float, and its uncertainty. ``headers`` are the folded header keys
(see :func:`registry.io.headers.concept_key`: ``ΔG‡`` → ``dg``) by which spreadsheets name it.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Field:
    """One thing a measurement reports (see the module docstring)."""

    name: str
    title: str  # what a chemist calls it, in messages
    table: str  # measurement, coalescence, compound, process, rate_point
    quantity: str | None = None  # None: a text field
    text_column: str | None = None
    value_column: str | None = None
    error_column: str | None = None
    headers: tuple[str, ...] = ()
    editable: bool = True
    entry: bool = True  # a field of one entry (rate-sheet columns are not)

    @property
    def is_value(self) -> bool:
        return self.quantity is not None


def _value(
    name: str,
    title: str,
    quantity: str,
    table: str,
    value_column: str,
    *,
    error: bool = True,
    headers: tuple[str, ...] = (),
    text_column: str | None = None,
    editable: bool = True,
    entry: bool = True,
) -> Field:
    text = text_column or f"{name}_text"
    stem = value_column.split("_", 1)
    error_column = None
    if error:
        error_column = (
            f"{value_column}_err" if len(stem) == 1 or name == "log10_a" else _err(value_column)
        )
    return Field(
        name, title, table, quantity, text, value_column, error_column, headers, editable, entry
    )


def _err(value_column: str) -> str:
    """``dg_kj_mol`` → ``dg_err_kj_mol``; ``tc_k`` → ``tc_err_k``; ``k_per_s`` → ``k_err_per_s``."""
    head, unit = value_column.split("_", 1)
    for prefix in ("t_min", "t_max", "dg_t"):
        if value_column.startswith(prefix + "_"):
            head, unit = prefix, value_column[len(prefix) + 1 :]
    return f"{head}_err_{unit}"


def _text(
    name: str,
    title: str,
    table: str,
    column: str | None,
    *,
    headers: tuple[str, ...] = (),
    editable: bool = True,
    entry: bool = True,
) -> Field:
    return Field(name, title, table, None, column, None, None, headers, editable, entry)


#: folded headers of a rate column that also name the convention (see conventions.py)
RATE_HEADERS = (
    "kex", "kexch", "kexchange", "kobs", "kobsd", "kobserved", "krac", "kracemization",
    "kracemisation", "kenant", "kenantiomerization", "kenantiomerisation", "kab", "kba",
    "kpersite", "kapp", "krelax", "kf", "kforward",
)  # fmt: skip

#: every field, in the order an export writes them
# fmt: off
FIELDS: tuple[Field, ...] = (
    _text("label", "measurement label", "measurement", "label", headers=(
        "label", "measurement", "measurementlabel", "measurementid", "run", "sample")),
    _text("compound", "compound label", "compound", "label", editable=False, headers=(
        "compound", "cmpd", "cpd", "compoundid", "compoundlabel", "compoundno", "code")),
    _text("name", "compound name", "compound", "name", editable=False, headers=(
        "name", "compoundname", "molecule", "iupacname", "chemicalname", "substance")),
    _text("smiles", "SMILES", "compound", "smiles_input", editable=False, headers=(
        "smiles", "structure", "smilesstring", "inputsmiles")),
    _text("process", "process kind", "process", "kind", headers=(
        "process", "processkind", "kind", "dynamics", "dynamicprocess", "motion")),
    _text("sites", "exchanging sites", "process", "sites", headers=(
        "sites", "exchangingsites", "signals", "groups", "probe", "probesignal")),
    _text("nucleus", "observed nucleus", "process", "nucleus", headers=(
        "nucleus", "nuc", "nucl", "nuclei", "observednucleus", "obsnucleus", "isotope",
        "nuclide")),
    _text("method", "method", "measurement", "method", headers=(
        "method", "technique", "methodology", "approach", "nmrmethod")),
    _text("solvent", "solvent", "measurement", "solvent_text", headers=(
        "solvent", "solv", "medium", "solvents", "nmrsolvent")),
    _value("field", "spectrometer frequency", "field", "measurement", "field_mhz", error=False,
           headers=("field", "spectrometer", "spectrometerfrequency", "frequency", "nmrfield",
                    "b0", "observefrequency", "sf", "instrument", "magnet", "nmrfrequency",
                    "mhz", "freq", "specfreq", "spectrometerfreq", "nmrfreq", "fieldstrength")),
    _value("t_min", "lowest temperature", "temperature", "measurement", "t_min_k", error=False,
           headers=("tmin", "tlow", "lowestt", "tstart")),
    _value("t_max", "highest temperature", "temperature", "measurement", "t_max_k", error=False,
           headers=("tmax", "thigh", "highestt", "tend")),
    _value("dg", "ΔG‡", "energy", "measurement", "dg_kj_mol", headers=(
        "dg", "g", "dgc", "dgtc", "dga", "dgact", "dgdagger", "dgrot", "dgexp", "dgdouble",
        "barrier", "barriers", "barrierheight", "rotationalbarrier", "rotationbarrier",
        "inversionbarrier", "freeenergy", "freeenergybarrier", "freeenergyofactivation",
        "activationfreeenergy", "gibbsenergyofactivation", "gibbs", "gact")),
    _value("dg_t", "temperature of ΔG‡", "temperature", "measurement", "dg_t_k", error=False,
           headers=("tdg", "dgt", "tofdg", "temperatureofdg", "tref", "dgat", "att",
                    "atemperature")),
    _value("dh", "ΔH‡", "energy", "measurement", "dh_kj_mol", headers=(
        "dh", "dhact", "dhdagger", "enthalpy", "activationenthalpy", "enthalpyofactivation")),
    _value("ds", "ΔS‡", "entropy", "measurement", "ds_j_mol_k", headers=(
        "ds", "dsact", "dsdagger", "entropy", "activationentropy", "entropyofactivation")),
    _value("ea", "Ea", "energy", "measurement", "ea_kj_mol", headers=(
        "ea", "eact", "activationenergy", "arrheniusenergy", "arrheniusea")),
    _value("log10_a", "log10 A", "dimensionless", "measurement", "log10_a", headers=(
        "loga", "log10a", "lga", "logafactor", "lgafactor", "log10afactor")),
    _value("tc", "Tc", "temperature", "coalescence", "tc_k", headers=(
        "tc", "tcoal", "tcoalescence", "coalescencetemp", "coalescencetemperature",
        "coalescencet", "tcoalesc")),
    _value("dnu", "Δν", "shift", "coalescence", "dnu_hz", headers=(
        "dnu", "dv", "dnu0", "dv0", "dd", "dnuab", "dvab", "shiftdifference", "dshift",
        "separation", "peakseparation", "signalseparation", "splitting", "frequencydifference",
        "ddelta", "shiftdiff", "chemicalshiftdifference")),
    _value("j", "J", "frequency", "coalescence", "j_hz", error=False, headers=(
        "j", "jab", "jhh", "coupling", "couplingconstant", "jcoupling", "2j")),
    _text("population", "population ratio", "coalescence", "population_text", headers=(
        "population", "populations", "popratio", "papb", "ratio", "majorminor", "pop",
        "populationratio", "ez", "ze", "ezratio", "isomerratio", "rotamerratio",
        "conformerratio")),
    _text("direction", "direction of ΔG‡ (unequal populations)", "measurement", "dg_direction",
          headers=("direction", "dgdirection", "barrierdirection", "whichdirection")),
    _text("convention", "rate-constant convention", "measurement", "k_convention", headers=(
        "convention", "kconvention", "rateconvention", "ktype", "rateconstanttype",
        "kdefinition", "whichk", "rateconstantconvention")),
    _text("degeneracy", "path degeneracy", "measurement", "path_degeneracy", headers=(
        "degeneracy", "pathdegeneracy", "statisticalfactor", "statfactor", "reactionpathdegeneracy")),
    _value("kappa", "transmission coefficient κ", "dimensionless", "measurement", "kappa",
           error=False, headers=("kappa", "transmissioncoefficient", "transmission")),
    _text("order", "reaction order", "measurement", "reaction_order", headers=(
        "order", "reactionorder", "kineticorder", "molecularity")),
    _value("concentration", "concentration (bimolecular exchange)", "concentration",
           "measurement", "concentration_m", headers=(
               "concentration", "conc", "partnerconcentration", "ligandconcentration")),
    _text("calibration", "temperature calibration", "measurement", "t_calibration_text",
          headers=("calibration", "tcalibration", "temperaturecalibration", "thermometer",
                   "tcal", "vtcalibration", "calibrant")),
    _value("dh_ds_corr", "correlation of ΔH‡ and ΔS‡", "dimensionless", "measurement",
           "dh_ds_corr", error=False, text_column="dh_ds_corr_text", headers=(
               "dhdscorr", "corrdhds", "rdhds", "correlationdhds", "dhdscorrelation")),
    # how a computed barrier was computed (registry.record.theory): free texts as written
    _text("theory", "level of theory", "measurement", "theory_level", headers=(
        "theory", "leveloftheory", "level", "theorylevel", "computationallevel",
        "computationalmethod", "modelchemistry")),
    _text("functional", "electronic-structure method", "measurement", "theory_method", headers=(
        "functional", "dftfunctional", "qmmethod", "theorymethod", "electronicstructuremethod",
        "dft")),
    _text("basis", "basis set", "measurement", "theory_basis", headers=(
        "basis", "basisset", "basissets")),
    _text("solvation", "solvation model", "measurement", "theory_solvation", headers=(
        "solvation", "solvationmodel", "solventmodel", "implicitsolvent", "continuummodel",
        "pcm")),
    _text("conformers", "conformer treatment", "measurement", "theory_conformers", headers=(
        "conformers", "conformertreatment", "conformersearch", "conformations")),
    _text("standard_state", "standard state", "measurement", "standard_state", headers=(
        "standardstate", "stdstate", "referencestate")),
    _text("reference", "reference", "measurement", "reference", headers=(
        "ref", "reference", "references", "doi", "citation", "source", "literature", "lit",
        "litref")),
    _text("status", "status", "measurement", "status", headers=("status",)),
    # the columns of a rates sheet: one rate constant at one temperature
    _value("t", "T (rate point)", "temperature", "rate_point", "t_k", editable=False,
           entry=False, headers=("t", "temp", "temperature")),
    # a rate column's header may also say which rate constant it holds (``kex``, ``k_rac``):
    # registry.record.conventions.convention_of_header reads it
    _value("k", "k (rate point)", "rate", "rate_point", "k_per_s", editable=False, entry=False,
           headers=("k", "rate", "rateconstant", *RATE_HEADERS)),
    _text("rates", "rate points", "rate_point", None, editable=False, entry=False,
          headers=("rates", "ratepoints", "ratesktt")),
)
# fmt: on

BY_NAME: dict[str, Field] = {f.name: f for f in FIELDS}

#: the fields of one entry whose cells are physical values (in table order)
VALUE_FIELDS: tuple[Field, ...] = tuple(f for f in FIELDS if f.is_value and f.entry)
#: the fields of one entry a user may change with ``edit``
EDITABLE: tuple[Field, ...] = tuple(f for f in FIELDS if f.editable)
#: other names ``edit --set`` accepts for a field
EDIT_ALIASES: dict[str, str] = {
    "mhz": "field",
    "solvent_text": "solvent",
    "log_a": "log10_a",
    "delta_nu": "dnu",
    "k_convention": "convention",
    "rate_convention": "convention",
    "path_degeneracy": "degeneracy",
    "statistical_factor": "degeneracy",
    "reaction_order": "order",
    "t_calibration": "calibration",
    "temperature_calibration": "calibration",
    "corr": "dh_ds_corr",
    "κ": "kappa",
    "level_of_theory": "theory",
    "basis_set": "basis",
    "solvation_model": "solvation",
}


def field(name: str) -> Field:
    return BY_NAME[name]


_STORED: dict[str, tuple[Field, ...]] = {}
for _f in FIELDS:
    if _f.is_value:
        _STORED[_f.table] = (*_STORED.get(_f.table, ()), _f)


def stored_values(table: str) -> tuple[Field, ...]:
    """The value fields stored in one table (``measurement``, ``coalescence``, ``rate_point``)."""
    return _STORED.get(table, ())


def quantity_of(name: str) -> str:
    """The quantity kind a value field is read as (``dnu`` → ``shift``)."""
    kind = BY_NAME[name].quantity
    if kind is None:
        raise KeyError(f"{name} is not a value field")
    return kind


def value_columns_of_text() -> dict[str, tuple[str, ...]]:
    """Text column → the float columns read from it (a summary shows the text, not the floats)."""
    out: dict[str, tuple[str, ...]] = {}
    for f in FIELDS:
        if f.is_value and f.text_column:
            out[f.text_column] = tuple(c for c in (f.value_column, f.error_column) if c)
    out["solvent_text"] = ("solvent_id",)
    out["population_text"] = ("population_ratio",)
    out["t_calibration_text"] = ("t_calibration", "t_calibration_err_k")
    return out


# ---------------------------------------------------------------- the rows of a listing

#: SQL over ``measurement m``: true while the measurement has an error-level validation finding
#: nobody has accepted. Such a measurement is *flagged*: marked wherever it is listed, and left
#: out of aggregates (barrier ranges, overview plots, paper tables) unless asked for. The one
#: definition: the listing column, the filter and the status rule all use this text.
OPEN_ERROR_SQL = (
    "EXISTS (SELECT 1 FROM validation_finding vf WHERE vf.measurement_id = m.id "
    "AND vf.severity = 'error' AND vf.accepted_by IS NULL)"
)

#: the columns a measurement listing carries (``list``, ``find``, exports of hits), as SQL over
#: ``measurement m JOIN compound c LEFT JOIN process p``; ``list`` and ``find`` print subsets
LISTING_COLUMNS: dict[str, str] = {
    "id": "m.id",
    "label": "m.label",
    "compound": "c.label",
    "compound_name": "c.name",
    "smiles": "c.smiles_canonical",
    "process": "p.kind",
    "nucleus": "p.nucleus",
    "method": "m.method",
    "solvent": "m.solvent_text",
    "field_mhz": "m.field_mhz",
    "dg_kj_mol": "m.dg_kj_mol",
    "dg_err_kj_mol": "m.dg_err_kj_mol",
    "dg_t_k": "m.dg_t_k",
    "dh_kj_mol": "m.dh_kj_mol",
    "ds_j_mol_k": "m.ds_j_mol_k",
    "status": "m.status",
    "reference": "m.reference",
    "compound_id": "m.compound_id",
    "t_min_k": "m.t_min_k",
    "t_max_k": "m.t_max_k",
    # which rate constant ΔG‡ refers to (migration 0005; None: unspecified)
    "k_convention": "m.k_convention",
    # 1 while an error finding is open (OPEN_ERROR_SQL), else 0: the same integer on SQLite
    # and PostgreSQL (a bare EXISTS would be an integer on one and a boolean on the other)
    "flagged": f"CASE WHEN {OPEN_ERROR_SQL} THEN 1 ELSE 0 END",
}
LISTING_FROM = (
    "measurement m JOIN compound c ON c.id = m.compound_id "
    "LEFT OUTER JOIN process p ON p.id = m.process_id"
)
LISTING_SELECT = f"SELECT {', '.join(LISTING_COLUMNS.values())} FROM {LISTING_FROM}"

#: what a printed table shows of a listing, per command
TABLE_COLUMNS: dict[str, tuple[str, ...]] = {
    "list": (
        "id",
        "compound",
        "process",
        "method",
        "solvent",
        "dg_kj_mol",
        "dg_t_k",
        "k_convention",
        "status",
        "flagged",
    ),
    "find": (
        "id",
        "compound",
        "process",
        "nucleus",
        "method",
        "solvent",
        "dg_kj_mol",
        "dg_t_k",
        "status",
        "flagged",
        "reference",
    ),
    "find_csv": (
        "id",
        "compound_id",
        "compound",
        "process",
        "nucleus",
        "method",
        "solvent",
        "dg_kj_mol",
        "dg_t_k",
        "status",
        "reference",
        "smiles",
        "dg_err_kj_mol",
        "flagged",
    ),
}
