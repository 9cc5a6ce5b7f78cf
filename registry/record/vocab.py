"""Controlled vocabularies of our own: process kinds, methods, statuses, and the solvent table.

Users write these many ways ("EXSY", "2D exchange", "line shape"); :func:`method_name` and
:func:`process_kind_name` map the usual spellings to the stored names and refuse unknown ones
with a message that lists what is known. Process kinds are extensible (the ``process_kind`` table);
the list here is the seed.
"""

from __future__ import annotations

import re

from registry.errors import UnitError

PROCESS_KINDS: dict[str, str] = {
    "bond-rotation": "hindered rotation about a single or partial double bond (amide C–N, biaryl axis …)",
    "ring-inversion": "ring flip / ring inversion of a cyclic framework",
    "sigmatropic-shift": "a [1,j] or [i,j] sigmatropic migration",
    "degenerate-rearrangement": "a rearrangement whose product is the starting structure (Cope-type …)",
    "haptotropic-shift": "a metal fragment moving between ring positions or hapticities",
    "pyramidal-inversion": "inversion at a pyramidal N, P, S or As centre",
    "pseudorotation": "Berry or turnstile pseudorotation at a five-coordinate centre",
    "ligand-exchange": "exchange of ligands between sites or with free ligand",
    "other": "anything not covered above (describe it in the process notes)",
}

_KIND_ALIASES = {
    "rotation": "bond-rotation",
    "amiderotation": "bond-rotation",
    "cnrotation": "bond-rotation",
    "biarylrotation": "bond-rotation",
    "hinderedrotation": "bond-rotation",
    "atropisomerization": "bond-rotation",
    "racemization": "bond-rotation",
    "ringflip": "ring-inversion",
    "ringinversion": "ring-inversion",
    "inversion": "pyramidal-inversion",
    "ninversion": "pyramidal-inversion",
    "nitrogeninversion": "pyramidal-inversion",
    "pinversion": "pyramidal-inversion",
    "copee": "degenerate-rearrangement",
    "cope": "degenerate-rearrangement",
    "degenerate": "degenerate-rearrangement",
    "ringwhizzing": "haptotropic-shift",
    "metalshift": "haptotropic-shift",
    "haptotropic": "haptotropic-shift",
    "sigmatropic": "sigmatropic-shift",
    "berry": "pseudorotation",
    "exchange": "ligand-exchange",
}

METHODS: dict[str, str] = {
    "coalescence": "coalescence temperature of two (or more) signals",
    "lineshape": "full line-shape fit of variable-temperature spectra",
    "2d-exchange": "2D exchange spectroscopy (EXSY / NOESY cross peaks)",
    "saturation-transfer": "saturation or inversion transfer",
    "equilibration": "equilibration or racemization kinetics (chiral HPLC, polarimetry, NMR)",
    "computed": "a computed barrier (quantum chemistry)",
}

_METHOD_ALIASES = {
    "tc": "coalescence",
    "coalescencetemperature": "coalescence",
    "coal": "coalescence",
    "dnmr": "lineshape",
    "lineshapefit": "lineshape",
    "lineshapeanalysis": "lineshape",
    "bandshape": "lineshape",
    "lsa": "lineshape",
    "exsy": "2d-exchange",
    "2dexsy": "2d-exchange",
    "2dexchange": "2d-exchange",
    "noesy": "2d-exchange",
    "sst": "saturation-transfer",
    "saturationtransfer": "saturation-transfer",
    "inversiontransfer": "saturation-transfer",
    "magnetizationtransfer": "saturation-transfer",
    "kinetics": "equilibration",
    "racemization": "equilibration",
    "racemisation": "equilibration",
    "racemizationkinetics": "equilibration",
    "hplc": "equilibration",
    "chiralhplc": "equilibration",
    "eyring": "equilibration",
    "dft": "computed",
    "calc": "computed",
    "calculated": "computed",
    "theory": "computed",
}

STATUSES = ("draft", "reviewed", "flagged", "retracted")


def _key(text: str) -> str:
    return re.sub(r"[^a-z0-9]", "", text.lower())


def method_name(text: str, field: str = "method") -> str:
    """The stored method name for a usual spelling; unknown methods are an error, not a guess."""
    key = _key(text)
    for name in METHODS:
        if key == _key(name):
            return name
    if key in _METHOD_ALIASES:
        return _METHOD_ALIASES[key]
    raise UnitError(field, text, f"unknown method; known: {', '.join(METHODS)}")


def process_kind_name(
    text: str, known: tuple[str, ...] | None = None, field: str = "process"
) -> str:
    """The stored process kind for a usual spelling (``known`` adds user-defined kinds)."""
    kinds = tuple(PROCESS_KINDS) + tuple(known or ())
    key = _key(text)
    for name in kinds:
        if key == _key(name):
            return name
    if key in _KIND_ALIASES:
        return _KIND_ALIASES[key]
    raise UnitError(field, text, f"unknown process kind; known: {', '.join(kinds)}")


def status_name(text: str, field: str = "status") -> str:
    key = _key(text)
    for name in STATUSES:
        if key == name:
            return name
    raise UnitError(field, text, f"unknown status; known: {', '.join(STATUSES)}")


# Liquid ranges at 1 atm. Values for the deuterated solvents differ from the protio parents by a
# few kelvin at most; where only the parent's value is known to us it is used and said so.
_CRC = "CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory"
_DEUT = "deuterated-solvent supplier data sheet value; from memory"

#: name, formula, deuterated, mp °C, bp °C, source, aliases
SOLVENTS: list[tuple[str, str, bool, float, float, str, tuple[str, ...]]] = [
    (
        "chloroform-d",
        "CDCl3",
        True,
        -64.0,
        61.0,
        _CRC,
        ("cdcl3", "chloroform", "deuterochloroform", "dcloroform", "chcl3"),
    ),
    (
        "dichloromethane-d2",
        "CD2Cl2",
        True,
        -97.0,
        40.0,
        _CRC,
        ("cd2cl2", "dcm", "dcmd2", "dichloromethane", "methylenechloride", "ch2cl2", "d2dcm"),
    ),
    (
        "dimethyl sulfoxide-d6",
        "C2D6OS",
        True,
        18.5,
        189.0,
        _CRC,
        ("dmsod6", "d6dmso", "dmso", "cd32so", "dimethylsulfoxide"),
    ),
    (
        "acetone-d6",
        "C3D6O",
        True,
        -95.0,
        56.0,
        _CRC,
        ("acetoned6", "d6acetone", "acetone", "cd32co"),
    ),
    (
        "toluene-d8",
        "C7D8",
        True,
        -95.0,
        111.0,
        _CRC,
        ("toluened8", "d8toluene", "toluene", "told8", "c7d8", "tol"),
    ),
    ("benzene-d6", "C6D6", True, 6.8, 79.0, _DEUT, ("c6d6", "benzened6", "d6benzene", "benzene")),
    (
        "methanol-d4",
        "CD3OD",
        True,
        -98.0,
        65.0,
        _CRC,
        ("cd3od", "methanold4", "d4methanol", "methanol", "meod", "meodd4"),
    ),
    (
        "deuterium oxide",
        "D2O",
        True,
        3.8,
        101.4,
        _DEUT,
        ("d2o", "heavywater", "water", "deuteriumoxide"),
    ),
    (
        "acetonitrile-d3",
        "CD3CN",
        True,
        -45.0,
        82.0,
        _CRC,
        ("cd3cn", "acetonitriled3", "d3acetonitrile", "acetonitrile", "mecn", "mecnd3"),
    ),
    (
        "tetrahydrofuran-d8",
        "C4D8O",
        True,
        -108.0,
        66.0,
        _CRC,
        ("thfd8", "d8thf", "thf", "tetrahydrofuran"),
    ),
    (
        "pyridine-d5",
        "C5D5N",
        True,
        -42.0,
        115.0,
        _CRC,
        ("pyridined5", "d5pyridine", "pyridine", "c5d5n", "pyd5"),
    ),
    (
        "1,1,2,2-tetrachloroethane-d2",
        "C2D2Cl4",
        True,
        -44.0,
        146.0,
        _CRC,
        (
            "tced2",
            "c2d2cl4",
            "tetrachloroethane",
            "tetrachloroethaned2",
            "1122tetrachloroethaned2",
            "tce",
        ),
    ),
    (
        "nitrobenzene-d5",
        "C6D5NO2",
        True,
        5.7,
        211.0,
        _CRC,
        ("nitrobenzened5", "nitrobenzene", "c6d5no2"),
    ),
    (
        "N,N-dimethylformamide-d7",
        "C3D7NO",
        True,
        -61.0,
        153.0,
        _CRC,
        ("dmfd7", "d7dmf", "dmf", "dimethylformamide", "nndimethylformamided7"),
    ),
    (
        "1,2-dichlorobenzene-d4",
        "C6D4Cl2",
        True,
        -17.0,
        180.0,
        _CRC,
        ("odcbd4", "odichlorobenzene", "12dichlorobenzened4", "dichlorobenzene", "odcb"),
    ),
    (
        "chlorobenzene-d5",
        "C6D5Cl",
        True,
        -45.0,
        132.0,
        _CRC,
        ("chlorobenzened5", "chlorobenzene", "c6d5cl", "phcl"),
    ),
    (
        "1,4-dioxane-d8",
        "C4D8O2",
        True,
        12.0,
        101.0,
        _CRC,
        ("dioxaned8", "dioxane", "14dioxaned8", "14dioxane"),
    ),
    (
        "diethyl ether-d10",
        "C4D10O",
        True,
        -116.0,
        35.0,
        _CRC,
        ("et2od10", "diethylether", "ether", "et2o", "diethyletherd10"),
    ),
    ("carbon disulfide", "CS2", False, -112.0, 46.0, _CRC, ("cs2", "carbondisulfide")),
    (
        "dimethyl ether-d6",
        "C2D6O",
        True,
        -141.0,
        -24.0,
        _CRC,
        ("dimethylether", "me2o", "me2od6", "dimethyletherd6"),
    ),
]


def solvent_key(text: str) -> str:
    """The comparison key of a solvent spelling: lowercase letters and digits only."""
    return _key(text)


def seed_reference_data(conn: object) -> None:
    """Insert the seed process kinds and solvents that are missing (idempotent).

    Called by the first migration and again by any later migration that extends the lists, so
    existing registries gain new entries without duplicates.
    """
    from sqlalchemy import column, insert, select, table

    kinds = table("process_kind", column("name"), column("description"))
    have = {r[0] for r in conn.execute(select(kinds.c.name))}  # type: ignore[attr-defined]
    rows = [{"name": k, "description": d} for k, d in PROCESS_KINDS.items() if k not in have]
    if rows:
        conn.execute(insert(kinds), rows)  # type: ignore[attr-defined]
    solvents = table(
        "solvent",
        column("name"),
        column("formula"),
        column("deuterated"),
        column("mp_k"),
        column("bp_k"),
        column("source"),
        column("aliases"),
    )
    have = {r[0] for r in conn.execute(select(solvents.c.name))}  # type: ignore[attr-defined]
    rows = [
        {
            "name": name,
            "formula": formula,
            "deuterated": deut,
            "mp_k": round(mp + 273.15, 2),
            "bp_k": round(bp + 273.15, 2),
            "source": source,
            "aliases": "|".join(aliases),
        }
        for name, formula, deut, mp, bp, source, aliases in SOLVENTS
        if name not in have
    ]
    if rows:
        conn.execute(insert(solvents), rows)  # type: ignore[attr-defined]
