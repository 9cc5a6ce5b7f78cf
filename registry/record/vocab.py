"""Controlled vocabularies of our own: process kinds, methods, statuses, nuclei, the solvent table.

Users write these many ways (``EXSY``, ``2D exchange``, ``VT coalescence``, ``lineshape (DNMR
fit)``, ``chair-chair inversion``); :func:`method_name`, :func:`process_kind_name` and
:func:`nucleus_name` read them (:mod:`.spelling` says how) into the stored names, and refuse
what they cannot read with the nearest names as suggestions and the known ones listed once.
A registry adds its own process kinds (the ``process_kind`` table) and stored aliases
(``vocab_alias``); both reach the readers as one :class:`Vocabulary`. The process kinds here
are the seed.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from functools import cached_property, lru_cache

from registry.errors import UnitError
from registry.record import spelling
from registry.record.spelling import Lexicon, Reading, fold

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

METHODS: dict[str, str] = {
    "coalescence": "coalescence temperature of two (or more) signals",
    "lineshape": "full line-shape fit of variable-temperature spectra",
    "2d-exchange": "2D exchange spectroscopy (EXSY / NOESY cross peaks)",
    "saturation-transfer": "saturation or inversion transfer",
    "equilibration": "equilibration or racemization kinetics (chiral HPLC, polarimetry, NMR)",
    "computed": "a computed barrier (quantum chemistry)",
}

STATUSES = ("draft", "reviewed", "flagged", "retracted")

#: what a stored alias can be for (the ``kind`` column of ``vocab_alias``)
ALIAS_KINDS = ("method", "process", "solvent", "nucleus")


def _set(words: str) -> frozenset[str]:
    return frozenset(words.split())


def _meaning(table: Mapping[str, str]) -> dict[str, frozenset[str]]:
    """``{"word other": "a b"}`` → every word → frozenset of the names it can mean."""
    out: dict[str, frozenset[str]] = {}
    for spellings, names in table.items():
        for word in spellings.split():
            out[word] = frozenset(names.split())
    return out


# fmt: off
METHOD_LEXICON = Lexicon(
    what="method",
    names=tuple(METHODS),
    spellings={
        "tc": "coalescence", "coalescencetemperature": "coalescence", "coal": "coalescence",
        "dnmr": "lineshape", "lineshapefit": "lineshape", "lineshapeanalysis": "lineshape",
        "bandshape": "lineshape", "lsa": "lineshape", "exsy": "2d-exchange",
        "2dexsy": "2d-exchange", "2dexchange": "2d-exchange", "noesy": "2d-exchange",
        "sst": "saturation-transfer", "saturationtransfer": "saturation-transfer",
        "inversiontransfer": "saturation-transfer",
        "magnetizationtransfer": "saturation-transfer", "kinetics": "equilibration",
        "racemization": "equilibration", "racemisation": "equilibration",
        "racemizationkinetics": "equilibration", "hplc": "equilibration",
        "chiralhplc": "equilibration", "eyring": "equilibration", "dft": "computed",
        "calc": "computed", "calculated": "computed", "theory": "computed",
    },
    words=_meaning({
        "coalescence coalescing coalesce coalesced tc coalescencetemperature": "coalescence",
        "lineshape bandshape lsa lineshapes simulation": "lineshape",
        "exsy noesy roesy 2d crosspeak": "2d-exchange",
        "exchange": "2d-exchange saturation-transfer",
        "saturation sst transfer inversion magnetization selective cest": "saturation-transfer",
        "equilibration racemization epimerization isomerization enantiomerization hplc "
        "polarimetry polarimetric cd gc": "equilibration",
        "dft computed computation computational calculated calculation calc theory theoretical "
        "abinitio b3lyp mp2 ccsd quantum": "computed",
    }),
    hints=_meaning({"dnmr fit fitting iterative": "lineshape",
                    "chiral kinetics kinetic eyring": "equilibration"}),
    noise=_set(
        "vt variable temperature temp nmr 1h 2h 13c 15n 19f 31p dynamic analysis spectra spectrum "
        "spectroscopy study experiment measurement measured method data of by from the and via "
        "with using full complete total rate rates exp expt experimental determined estimated "
        "approx plot at in a an"
    ),
)

PROCESS_LEXICON = Lexicon(
    what="process kind",
    names=tuple(PROCESS_KINDS),
    spellings={
        "rotation": "bond-rotation", "amiderotation": "bond-rotation", "cnrotation": "bond-rotation",
        "biarylrotation": "bond-rotation", "hinderedrotation": "bond-rotation",
        "atropisomerization": "bond-rotation", "racemization": "bond-rotation",
        "ringflip": "ring-inversion", "ringinversion": "ring-inversion",
        "inversion": "pyramidal-inversion", "ninversion": "pyramidal-inversion",
        "nitrogeninversion": "pyramidal-inversion", "pinversion": "pyramidal-inversion",
        "copee": "degenerate-rearrangement", "cope": "degenerate-rearrangement",
        "degenerate": "degenerate-rearrangement", "ringwhizzing": "haptotropic-shift",
        "metalshift": "haptotropic-shift", "haptotropic": "haptotropic-shift",
        "sigmatropic": "sigmatropic-shift", "berry": "pseudorotation", "exchange": "ligand-exchange",
    },
    words=_meaning({
        "rotation rotational rotamer rotameric rotamerization torsion torsional libration "
        "atropisomerization atropisomer amide thioamide carbamate urea thiourea enamine "
        "enamide amidine biaryl biphenyl binaphthyl": "bond-rotation",
        "ring": "ring-inversion bond-rotation haptotropic-shift",
        "inversion invert": "ring-inversion pyramidal-inversion",
        "chair boat flip reversal chairchair ringflip": "ring-inversion",
        "puckering": "ring-inversion pseudorotation",
        "pyramidal umbrella": "pyramidal-inversion",
        "isomerization": "bond-rotation pyramidal-inversion",
        "sigmatropic locant claisen": "sigmatropic-shift",
        "shift migration": "sigmatropic-shift haptotropic-shift",
        "haptotropic hapticity whizzing ringwhizzing metallotropic eta hapto": "haptotropic-shift",
        "degenerate bullvalene semibullvalene barbaralane": "degenerate-rearrangement",
        "cope": "degenerate-rearrangement",  # seen by exchange NMR: degenerate
        "rearrangement": "degenerate-rearrangement sigmatropic-shift",
        "pseudorotation berry turnstile": "pseudorotation",
        "ligand dissociation association dissociative associative decoordination":
            "ligand-exchange",
    }),
    hints=_meaning({
        "n nitrogen p phosphorus s sulfur as arsenic amine phosphine sulfoxide sulfonium "
        "aziridine": "pyramidal-inversion",
        "metal": "haptotropic-shift ligand-exchange",
        "racemization enantiomerization": "bond-rotation",
        "solvent": "ligand-exchange",
    }),
    noise=_set(
        "of the about around in at a an and bond axis group groups process dynamic dynamics "
        "barrier conformational interconversion exchange site sites c h o e z hindered "
        "restricted slow fast"
    ),
)
# fmt: on


@dataclass(frozen=True)
class Vocabulary:
    """What one registry understands beyond the built-in words: its process kinds (the seed and
    its own) and the aliases its users stored, as ``(kind, spelling, target)``.

    Passed to :func:`registry.record.entry.normalize_entry` (``add``, ``edit``, every import
    row) so that all of them read a text the same way; picklable for the import's pool.
    """

    kinds: tuple[str, ...] = ()
    aliases: tuple[tuple[str, str, str], ...] = ()

    @classmethod
    def of(cls, value: Vocabulary | Iterable[str] | None) -> Vocabulary:
        """A vocabulary from what callers pass: one already, or a tuple of process kinds."""
        if isinstance(value, Vocabulary):
            return value
        return cls(tuple(value or ()))

    @cached_property
    def _by_kind(self) -> dict[str, dict[str, str]]:
        out: dict[str, dict[str, str]] = {kind: {} for kind in ALIAS_KINDS}
        for kind, alias, target in self.aliases:
            out.setdefault(kind, {})[fold(alias)] = target
        return out

    def aliases_of(self, kind: str) -> dict[str, str]:
        """Folded spelling → target, for one kind of alias."""
        return self._by_kind.get(kind, {})

    @property
    def process_kinds(self) -> tuple[str, ...]:
        """The seed kinds, then the registry's own (each once)."""
        return tuple(dict.fromkeys((*PROCESS_KINDS, *self.kinds)))


def _listed(names: Iterable[str]) -> str:
    return ", ".join(names)


def _refusal(what: str, reading: Reading, known: Iterable[str]) -> str:
    """Why a text was not read, with suggestions and the known names (listed once)."""
    if reading.candidates:
        head = f"could be {' or '.join(reading.candidates)}; write the one meant"
    elif reading.suggestions:
        head = f"unknown {what}; did you mean {' or '.join(reading.suggestions)}?"
    else:
        head = f"unknown {what}"
    return f"{head} (known: {_listed(known)})"


# An import reads the same few texts on every row: each reading is kept (texts and vocabularies
# are hashable, readings immutable).
@lru_cache(maxsize=4096)
def read_method(text: str, vocabulary: Vocabulary | None = None) -> Reading:
    """How ``text`` reads as a method (see :mod:`.spelling`)."""
    aliases = vocabulary.aliases_of("method") if vocabulary else None
    return spelling.read(METHOD_LEXICON, text, aliases=aliases)


@lru_cache(maxsize=4096)
def read_process_kind(text: str, vocabulary: Vocabulary | None = None) -> Reading:
    """How ``text`` reads as a process kind (see :mod:`.spelling`)."""
    voc = vocabulary or Vocabulary()
    return spelling.read(
        PROCESS_LEXICON, text, extra_names=voc.kinds, aliases=voc.aliases_of("process")
    )


def method_name(text: str, field: str = "method", vocabulary: Vocabulary | None = None) -> str:
    """The stored method name for a usual spelling; what cannot be read is an error, not a guess."""
    reading = read_method(text, vocabulary)
    if reading.name is None:
        raise UnitError(field, text, _refusal("method", reading, METHODS))
    return reading.name


def process_kind_name(
    text: str, known: Vocabulary | Iterable[str] | None = None, field: str = "process"
) -> str:
    """The stored process kind for a usual spelling (``known``: the registry's vocabulary, or
    its own kinds as a tuple)."""
    vocabulary = Vocabulary.of(known)
    reading = read_process_kind(text, vocabulary)
    if reading.name is None:
        raise UnitError(field, text, _refusal("process kind", reading, vocabulary.process_kinds))
    return reading.name


@lru_cache(maxsize=1024)
def read_nucleus(text: str, vocabulary: Vocabulary | None = None) -> Reading:
    """How ``text`` reads as an observed nucleus (``1H``, ``13C`` …)."""
    aliases = vocabulary.aliases_of("nucleus") if vocabulary else {}
    key = fold(text)
    if key in aliases:
        return Reading(text, aliases[key], "alias")
    nucleus = spelling.read_nucleus(text)
    if nucleus is not None:
        return Reading(text, nucleus, "name" if nucleus == str(text).strip() else "spelling")
    near = spelling.close_spellings(text, spelling.nucleus_spellings(), cutoff=0.7)
    return Reading(text, None, "", (), tuple(near))


def nucleus_name(text: str, vocabulary: Vocabulary | None = None, field: str = "nucleus") -> str:
    """The stored form of an observed nucleus (``H-1`` → ``1H``); unreadable texts are errors."""
    reading = read_nucleus(text, vocabulary)
    if reading.name is None:
        hint = f"; did you mean {' or '.join(reading.suggestions)}?" if reading.suggestions else ""
        raise UnitError(
            field,
            text,
            f"unknown nucleus{hint} (write the mass number and the element: 1H, 13C, 19F, 31P)",
        )
    return reading.name


def status_name(text: str, field: str = "status") -> str:
    key = fold(text)
    for name in STATUSES:
        if key == name:
            return name
    raise UnitError(field, text, f"unknown status; known: {_listed(STATUSES)}")


def solvent_key(text: str) -> str:
    """The comparison key of a solvent spelling: lowercase letters and digits only."""
    return fold(text)


def builtin_solvent_spellings() -> dict[str, str]:
    """Folded spelling → ``formula (name)`` of every seed solvent, for suggestions."""
    out: dict[str, str] = {}
    for name, formula, _deut, _mp, _bp, _src, aliases in SOLVENTS:
        shown = f"{formula} ({name})"
        for spelled in (name, formula, *aliases):
            out.setdefault(fold(spelled), shown)
    return out


def solvent_suggestions(text: str, spellings: Mapping[str, str] | None = None) -> list[str]:
    """Solvents spelled nearly like ``text`` (``CDC13`` → ``CDCl3 (chloroform-d)``)."""
    return spelling.close_spellings(text, spellings or builtin_solvent_spellings())


# Liquid ranges at 1 atm. Values for the deuterated solvents differ from the protio parents by a
# few kelvin at most; where only the parent's value is known to us it is used and said so.
_CRC = "CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory"
_DEUT = "deuterated-solvent supplier data sheet value; from memory"
_D2O = (
    "CRC Handbook of Chemistry and Physics, properties of heavy water D2O (mp 3.82 °C, "
    "bp 101.42 °C at 1 atm); from memory"
)
_H2O = (
    "CRC Handbook of Chemistry and Physics, fixed points of ordinary water H2O (mp 0.00 °C, "
    "bp 99.97 °C at 1 atm, ITS-90); from memory"
)
_DMSO_D6 = (
    "deuterated-solvent supplier data sheet (DMSO-d6: mp 20.2 °C, bp 189 °C; from memory, not "
    "found in a handbook we could search), not the parent DMSO's 18.5 °C (Dictionary of Organic "
    "Compounds, as quoted at www.chm.bris.ac.uk/webprojects2006/Moss/properties.htm)"
)
#: solvent rows as an older seed wrote them, which migration 0005 brings up to date:
#: name → (old mp °C, old bp °C, old aliases)
SEED_CORRECTIONS: dict[str, tuple[float, float, str]] = {
    "dimethyl sulfoxide-d6": (18.5, 189.0, "dmsod6|d6dmso|dmso|cd32so|dimethylsulfoxide"),
    "deuterium oxide": (3.8, 101.4, "d2o|heavywater|water|deuteriumoxide"),
}

#: name, formula, deuterated, mp °C, bp °C, source, aliases
# fmt: off
SOLVENTS: list[tuple[str, str, bool, float, float, str, tuple[str, ...]]] = [
    ("chloroform-d", "CDCl3", True, -64.0, 61.0, _CRC,
     ("cdcl3", "chloroform", "deuterochloroform", "dcloroform", "chcl3")),
    ("dichloromethane-d2", "CD2Cl2", True, -97.0, 40.0, _CRC,
     ("cd2cl2", "dcm", "dcmd2", "dichloromethane", "methylenechloride", "ch2cl2", "d2dcm")),
    ("dimethyl sulfoxide-d6", "C2D6OS", True, 20.2, 189.0, _DMSO_D6,
     ("dmsod6", "d6dmso", "dmso", "cd32so", "dimethylsulfoxide")),
    ("acetone-d6", "C3D6O", True, -95.0, 56.0, _CRC,
     ("acetoned6", "d6acetone", "acetone", "cd32co")),
    ("toluene-d8", "C7D8", True, -95.0, 111.0, _CRC,
     ("toluened8", "d8toluene", "toluene", "told8", "c7d8", "tol")),
    ("benzene-d6", "C6D6", True, 6.8, 79.0, _DEUT,
     ("c6d6", "benzened6", "d6benzene", "benzene")),
    ("methanol-d4", "CD3OD", True, -98.0, 65.0, _CRC,
     ("cd3od", "methanold4", "d4methanol", "methanol", "meod", "meodd4")),
    ("deuterium oxide", "D2O", True, 3.82, 101.42, _D2O,
     ("d2o", "heavywater", "deuteriumoxide", "heavyh2o")),
    ("water", "H2O", False, 0.0, 99.97, _H2O,
     ("h2o", "protiowater", "ordinarywater", "lightwater", "h2od2o")),
    ("acetonitrile-d3", "CD3CN", True, -45.0, 82.0, _CRC,
     ("cd3cn", "acetonitriled3", "d3acetonitrile", "acetonitrile", "mecn", "mecnd3")),
    ("tetrahydrofuran-d8", "C4D8O", True, -108.0, 66.0, _CRC,
     ("thfd8", "d8thf", "thf", "tetrahydrofuran")),
    ("pyridine-d5", "C5D5N", True, -42.0, 115.0, _CRC,
     ("pyridined5", "d5pyridine", "pyridine", "c5d5n", "pyd5")),
    ("1,1,2,2-tetrachloroethane-d2", "C2D2Cl4", True, -44.0, 146.0, _CRC,
     ("tced2", "c2d2cl4", "tetrachloroethane", "tetrachloroethaned2", "1122tetrachloroethaned2", "tce")),
    ("nitrobenzene-d5", "C6D5NO2", True, 5.7, 211.0, _CRC,
     ("nitrobenzened5", "nitrobenzene", "c6d5no2")),
    ("N,N-dimethylformamide-d7", "C3D7NO", True, -61.0, 153.0, _CRC,
     ("dmfd7", "d7dmf", "dmf", "dimethylformamide", "nndimethylformamided7")),
    ("1,2-dichlorobenzene-d4", "C6D4Cl2", True, -17.0, 180.0, _CRC,
     ("odcbd4", "odichlorobenzene", "12dichlorobenzened4", "dichlorobenzene", "odcb")),
    ("chlorobenzene-d5", "C6D5Cl", True, -45.0, 132.0, _CRC,
     ("chlorobenzened5", "chlorobenzene", "c6d5cl", "phcl")),
    ("1,4-dioxane-d8", "C4D8O2", True, 12.0, 101.0, _CRC,
     ("dioxaned8", "dioxane", "14dioxaned8", "14dioxane")),
    ("diethyl ether-d10", "C4D10O", True, -116.0, 35.0, _CRC,
     ("et2od10", "diethylether", "ether", "et2o", "diethyletherd10")),
    ("carbon disulfide", "CS2", False, -112.0, 46.0, _CRC,
     ("cs2", "carbondisulfide")),
    ("dimethyl ether-d6", "C2D6O", True, -141.0, -24.0, _CRC,
     ("dimethylether", "me2o", "me2od6", "dimethyletherd6")),
]
# fmt: on


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
