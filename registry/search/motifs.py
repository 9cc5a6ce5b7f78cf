"""The built-in motif library, user motifs (database table or TOML file), and name lookup.

A motif is a named SMARTS (or a few alternative SMARTS: the motif matches when any of them does)
for a structural unit whose dynamics people measure: a hindered axis, a partial double bond, a
ring that inverts, a unit that rearranges. The names are our own. Every built-in motif carries
example structures that must match (``positives``) and near misses that must not
(``negatives``); ``tests/test_search_motifs.py`` checks them all.

Amide tautomers: some data sets write amides in the iminol form ``N=C(O)``. The registry keeps
structures as reported (see :mod:`registry.record.chem`), so the amide-type motifs (``amide``,
``n-aryl-amide``) match **both** forms: ``C(=O)-N`` and ``C(-OH)=N``. Other motifs match what
they say only.

User motifs: ``fluxledger motifs add NAME SMARTS`` stores one in the ``motif`` table (recorded in
the history); a TOML file with ``[[motif]]`` tables (keys ``name``, ``smarts`` — a string or a list
of alternatives — and optional ``description``, ``stereo_smarts``) can be passed to ``find`` with
``--motif-file`` or loaded into the table with ``motifs add --file``. Built-in names cannot be
reused, so a name always means one thing.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.errors import FileFormatError, NotFoundError, UsageError

if TYPE_CHECKING:
    from registry.storage.connection import Connection
    from registry.storage.database import Database

#: d- and f-block metals plus the main-group metals that carry σ-cyclopentadienyls
_METALS = (
    "#13,#21,#22,#23,#24,#25,#26,#27,#28,#29,#30,#31,#32,#39,#40,#41,#42,#43,#44,#45,#46,#47,"
    "#48,#49,#50,#57,#58,#59,#60,#62,#63,#64,#65,#66,#67,#68,#69,#70,#71,#72,#73,#74,#75,#76,"
    "#77,#78,#79,#80,#81,#82,#90,#92"
)

# A carbonyl/iminol carbon with one N and one O and otherwise C or H (not a carbamate or urea).
_AMIDE_C = (
    "[CX3;!$(C(~[#7,#8,#16])(~[#7,#8,#16])~[#7,#8,#16]);$(C(=[OX1])-[#7X3]),$(C(-[OX2H1])=[#7X2])]"
)


@dataclass(frozen=True)
class Motif:
    """A named structural unit: SMARTS alternatives, what it is for, and where it came from."""

    name: str
    smarts: tuple[str, ...]
    description: str = ""
    process: str = ""  # the process kind usually measured on it (a hint for users)
    stereo_smarts: tuple[str, ...] = ()  # used instead of ``smarts`` by stereo-aware searches
    positives: tuple[str, ...] = ()
    negatives: tuple[str, ...] = ()
    source: str = "built-in"  # built-in, registry (the motif table) or a TOML file path
    created_by: str | None = None

    def as_dict(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "smarts": list(self.smarts),
            "stereo_smarts": list(self.stereo_smarts),
            "description": self.description,
            "process": self.process,
            "source": self.source,
            "created_by": self.created_by,
        }


# Example molecules are textbook structures for each class; common practice, no source.
BUILTIN: tuple[Motif, ...] = (
    Motif(
        "biaryl-ortho",
        ("[a;D3]:a-!@a:[a;D3]",),
        "hindered biaryl axis: two aromatic rings joined by a non-ring single bond, each ring "
        "with at least one ortho substituent or ortho ring fusion",
        "bond-rotation",
        positives=(
            "Cc1ccccc1-c1ccccc1C",  # 2,2'-dimethylbiphenyl
            "Oc1ccc2ccccc2c1-c1c(O)ccc2ccccc12",  # 1,1'-bi-2-naphthol
            "COC(=O)c1ccccc1-c1c(C)cccc1[N+](=O)[O-]",
        ),
        negatives=(
            "c1ccccc1-c1ccccc1",  # biphenyl
            "Cc1ccccc1-c1ccccc1",  # 2-methylbiphenyl: one side only
            "Cc1ccc(cc1)-c1ccc(C)cc1",  # 4,4'-dimethylbiphenyl
            "c1ccc2c(c1)Cc1ccccc1-2",  # fluorene: the bond is in a ring
        ),
    ),
    Motif(
        "biaryl",
        ("a-!@a",),
        "any aryl–aryl single bond outside a ring (hindered or not)",
        "bond-rotation",
        positives=("c1ccccc1-c1ccccc1", "c1ccc(nc1)-c1ccccn1"),
        negatives=("c1ccc2ccccc2c1", "c1ccccc1Cc1ccccc1"),
    ),
    Motif(
        "amide",
        (f"{_AMIDE_C}(~[#8;X1,X2H1])~[#7]",),
        "amide C–N partial double bond (formamides, acetamides, lactams, imides); matches the "
        "amide C(=O)N and the iminol C(OH)=N spelling; carbamates and ureas have motifs of "
        "their own",
        "bond-rotation",
        positives=(
            "CC(=O)N(C)C",  # N,N-dimethylacetamide
            "O=CN(C)C",  # N,N-dimethylformamide
            "CC(O)=NC",  # N-methylacetamide written as the iminol
            "O=C1CCCN1C",  # N-methylpyrrolidone
            "CC(=O)n1cccc1",  # N-acetylpyrrole
        ),
        negatives=(
            "COC(=O)N(C)C",  # carbamate
            "CN(C)C(=O)N(C)C",  # urea
            "CC(=S)N(C)C",  # thioamide
            "CC(=O)OC",  # ester
            "CC(=N)N",  # amidine
        ),
    ),
    Motif(
        "thioamide",
        ("[CX3;!$(C(~[#7,#8,#16])(~[#7,#8,#16])~[#7,#8,#16])](=[SX1])-[#7X3]",),
        "thioamide C–N bond (higher barriers than the oxo amides)",
        "bond-rotation",
        positives=("CC(=S)N(C)C", "S=CN(C)C", "S=C(N1CCCC1)c1ccccc1"),
        negatives=("CC(=O)N(C)C", "CN(C)C(=S)N(C)C", "CSC(=S)N(C)C"),
    ),
    Motif(
        "carbamate",
        ("[OX2][CX3](=[OX1])[#7X3]",),
        "carbamate (urethane) C–N bond, e.g. Boc and Cbz groups",
        "bond-rotation",
        positives=("COC(=O)N(C)C", "CNC(=O)OC(C)(C)C", "O=C(OCc1ccccc1)N1CCCC1"),
        negatives=("CC(=O)N(C)C", "CN(C)C(=O)N(C)C", "COC(=O)OC", "COC(=O)C"),
    ),
    Motif(
        "urea",
        ("[#7X3][CX3](=[OX1])[#7X3]",),
        "urea C–N bonds",
        "bond-rotation",
        positives=("CN(C)C(=O)N(C)C", "O=C(Nc1ccccc1)Nc1ccccc1", "O=C1NCCN1"),
        negatives=("CC(=O)N(C)C", "COC(=O)N(C)C", "CN(C)C(=N)N(C)C", "CN(C)C(=S)N(C)C"),
    ),
    Motif(
        "sulfonamide",
        ("[SX4](=[OX1])(=[OX1])-[#7X3]",),
        "sulfonamide S–N bond",
        "bond-rotation",
        positives=("CS(=O)(=O)N(C)C", "Cc1ccc(cc1)S(=O)(=O)N(C)Cc1ccccc1"),
        negatives=("CS(=O)(=O)OC", "CS(C)(=O)=O", "CS(=O)N(C)C"),
    ),
    Motif(
        "enamine",
        ("[CX3]=[CX3]-[NX3;!a;!$(N-[#6,#16,#15]=[#8,#16,#7])]",),
        "enamine C–N bond (including vinylogous amides); N-acyl enamines excluded",
        "bond-rotation",
        positives=("C1CCC(=CC1)N1CCCC1", "CN(C)/C=C/C(C)=O", "CC=CN(C)C"),
        negatives=("CC(=O)N(C)C", "CN(C)c1ccccc1", "C=CNC(C)=O", "C=COC"),
    ),
    Motif(
        "n-aryl-amide",
        (f"{_AMIDE_C}(~[#8;X1,X2H1])~[#7]-a",),
        "amide (or its iminol spelling) whose nitrogen carries an aryl group: the N–aryl axis "
        "and the amide C–N bond",
        "bond-rotation",
        positives=("CC(=O)Nc1ccccc1", "CC(=O)N(C)c1ccccc1C", "CC(O)=Nc1ccccc1"),
        negatives=("NC(=O)c1ccccc1", "CC(=O)N(C)C", "CNC(=O)Oc1ccccc1"),
    ),
    Motif(
        "aryl-carbonyl",
        ("a-!@[CX3]=[OX1]",),
        "aryl–carbonyl axis (aryl ketones, aldehydes, esters, benzamides) outside a ring",
        "bond-rotation",
        positives=("O=Cc1ccccc1", "CC(=O)c1c(C)cc(C)cc1C", "CC(C)N(C(C)C)C(=O)c1ccccc1"),
        negatives=("CC(=O)Cc1ccccc1", "CC(=O)C1CCCCC1", "O=C1CCc2ccccc12", "CC(=O)Nc1ccccc1"),
    ),
    Motif(
        "ring6-carbocycle",
        ("[#6;!a]1-[#6;!a]-[#6;!a]-[#6;!a]-[#6;!a]-[#6;!a]-1",),
        "six-membered carbocycle with single ring bonds (cyclohexane chair inversion; "
        "exocyclic double bonds allowed, e.g. cyclohexanone)",
        "ring-inversion",
        positives=("C1CCCCC1", "CC1CCCCC1", "O=C1CCCCC1", "C1CCC2CCCCC2C1"),
        negatives=("c1ccccc1", "C1CCCC1", "C1=CCCCC1", "C1CCNCC1"),
    ),
    Motif(
        "ring6-heterocycle",
        ("[!#6;!#1;!a]1-[!a]-[!a]-[!a]-[!a]-[!a]-1",),
        "six-membered ring with at least one heteroatom and single ring bonds (piperidine, "
        "tetrahydropyran, 1,3-dioxane, morpholine … ring inversion)",
        "ring-inversion",
        positives=("C1CCNCC1", "C1CCOCC1", "C1COCOC1", "C1COCCN1", "CN1CCCCC1"),
        negatives=("c1ccncc1", "C1CCCCC1", "C1COC=CC1", "C1CCNC1"),
    ),
    Motif(
        "hexadiene-1,5",
        ("C=C-[CX4]-[CX4]-C=C",),
        "1,5-hexadiene unit: the six carbons of a [3,3] sigmatropic (Cope) shift, degenerate "
        "in bullvalene-type cages",
        "degenerate-rearrangement",
        positives=("C=CCCC=C", "C1(C=CC2C3C=C1)C=CC23", "C1=CC2CC2C=CC1"),
        negatives=("C=CCC=C", "C=CC=C", "C=CCCCC=C", "c1ccccc1CCc1ccccc1"),
    ),
    Motif(
        "divinylcyclopropane",
        ("C=C-[#6]1-[#6]-[#6]-1-C=C",),
        "1,2-divinylcyclopropane unit (Cope shift through a boat transition state). The [3,3] "
        "shift needs the cis isomer: in cages (homotropilidene, barbaralane, bullvalene) it is "
        "cis by constraint; a stereo-aware search asks for the cis configuration "
        "on molecules whose stereocentres are specified",
        "degenerate-rearrangement",
        stereo_smarts=("C=C[C@H]1C[C@H]1C=C",),
        positives=("C=C[C@H]1C[C@H]1C=C", "C1=CC2CC2C=CC1", "C1(C=CC2C3C=C1)C=CC23"),
        negatives=("C=CC1CCC1C=C", "C=CC1(C=C)CC1", "C=CCC1CC1"),
    ),
    Motif(
        "cp-metal",
        (
            f"[{_METALS}]~[#6]1~[#6]:,=[#6]~[#6]~[#6]~1",
            f"[#6-;a]1:[#6]:[#6]:[#6]:[#6]:1.[{_METALS}]",
        ),
        "cyclopentadienyl on a metal: a five-carbon ring bonded to a metal (η¹ or η⁵ written "
        "with bonds) or an aromatic cyclopentadienide beside a metal ion (the ionic spelling "
        "of metallocenes); ring whizzing and haptotropic shifts",
        "haptotropic-shift",
        positives=(
            "[cH-]1cccc1.[cH-]1cccc1.[Fe+2]",  # ferrocene, ionic spelling
            "C[Sn](C)(C)C1C=CC=C1",  # σ-cyclopentadienyl(trimethyl)tin
            "[Fe]C1C=CC=C1",
        ),
        negatives=("C1=CCC=C1", "[cH-]1cccc1.[Na+]", "[Fe]C1CCCC1", "c1ccccc1.[Fe]"),
    ),
    Motif(
        "pyramidal-np",
        (
            "[NX3;v3;+0;!a;!$(N-a);!$(N-[#6,#16,#15]=[#8,#16,#7]);!$(N-C=C);!$(N-N=*)]",
            "[PX3;v3;+0;!a]",
        ),
        "pyramidal three-coordinate N or P (amines, aziridines, hydroxylamines, phosphines); "
        "N bonded to an aryl, alkene, C=O/C=S/C=N, S=O or P=O group (flattened or nearly "
        "so by conjugation) is left out",
        "pyramidal-inversion",
        positives=("CCN(CC)CC", "CN1CC1", "CP(c1ccccc1)c1ccccc1", "ClN1CCCCC1", "CON(C)C"),
        negatives=("CN(C)c1ccccc1", "CC(=O)N(C)C", "c1cc[nH]c1", "CP(C)(C)=O", "C[N+](C)(C)C"),
    ),
)

_NAME_RE = re.compile(r"^[a-z0-9][a-z0-9,._+-]{0,63}$")


def builtin_motifs() -> dict[str, Motif]:
    return {m.name: m for m in BUILTIN}


def check_name(name: str) -> str:
    """Motif names are lowercase words with digits and ``-,._+``; built-in names are taken."""
    clean = (name or "").strip()
    if not _NAME_RE.match(clean):
        raise UsageError(
            f"motif name {name!r}: use lowercase letters, digits and -,._+ (at most 64 characters)"
        )
    if clean in builtin_motifs():
        raise UsageError(f"motif name {clean!r} is a built-in motif; choose another name")
    return clean


def _as_tuple(value: Any, where: str, key: str) -> tuple[str, ...]:
    if value is None:
        return ()
    if isinstance(value, str):
        return (value,)
    if isinstance(value, list) and value and all(isinstance(v, str) for v in value):
        return tuple(value)
    raise FileFormatError(where, f"'{key}' must be a SMARTS string or a list of them")


def load_motif_file(path: str | Path) -> list[Motif]:
    """Read ``[[motif]]`` tables from a TOML file; every SMARTS is checked before use."""
    from registry.search.patterns import compile_smarts

    where = str(path)
    try:
        data = tomllib.loads(Path(path).read_text(encoding="utf-8"))
    except FileNotFoundError as exc:
        raise FileFormatError(where, "no such file") from exc
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise FileFormatError(where, f"not a valid TOML file: {exc}") from exc
    tables = data.get("motif")
    if not isinstance(tables, list) or not tables:
        raise FileFormatError(where, "no [[motif]] tables found")
    out: list[Motif] = []
    seen: set[str] = set()
    for number, table in enumerate(tables, start=1):
        if not isinstance(table, dict) or "name" not in table or "smarts" not in table:
            raise FileFormatError(where, f"motif #{number} needs 'name' and 'smarts'")
        name = check_name(str(table["name"]))
        if name in seen:
            raise FileFormatError(where, f"motif {name!r} appears twice")
        seen.add(name)
        smarts = _as_tuple(table["smarts"], where, "smarts")
        stereo = _as_tuple(table.get("stereo_smarts"), where, "stereo_smarts")
        for text in (*smarts, *stereo):
            compile_smarts(text, field=f"{where}: motif {name!r}")
        out.append(
            Motif(
                name,
                smarts,
                str(table.get("description", "")),
                str(table.get("process", "")),
                stereo,
                source=where,
            )
        )
    return out


def _split(stored: str) -> tuple[str, ...]:
    """The motif table keeps alternatives one per line."""
    return tuple(line.strip() for line in stored.splitlines() if line.strip())


def registry_motifs(database: Database) -> list[Motif]:
    """User motifs kept in the registry's ``motif`` table."""
    with database.read() as conn:
        rows = conn.rows("SELECT name, smarts, description, created_by FROM motif ORDER BY name")
    return [
        Motif(name, _split(smarts), description or "", source="registry", created_by=who)
        for name, smarts, description, who in rows
    ]


def list_motifs(database: Database | None = None, files: list[str] | None = None) -> list[Motif]:
    """Built-in motifs, then the registry's, then those of the given TOML files."""
    out = list(BUILTIN)
    if database is not None:
        out += registry_motifs(database)
    for path in files or []:
        out += load_motif_file(path)
    return out


def get_motif(name: str, database: Database | None = None, files: list[str] | None = None) -> Motif:
    """The motif of that name; an unknown name lists the known ones."""
    wanted = (name or "").strip().lower()
    motifs = list_motifs(database, files)
    for motif in reversed(motifs):  # a file given on the command line wins over the table
        if motif.name == wanted:
            return motif
    known = ", ".join(m.name for m in motifs)
    raise NotFoundError(f"no motif named {name!r}; known motifs: {known}")


def add_motif(
    database: Database,
    name: str,
    smarts: str | list[str] | tuple[str, ...],
    *,
    description: str = "",
    actor: str | None = None,
) -> Motif:
    """Store a user motif (SMARTS checked first) and record it in the history."""
    from registry.search.patterns import compile_smarts
    from registry.storage import audit
    from registry.storage.database import current_user

    clean = check_name(name)
    alternatives = (smarts,) if isinstance(smarts, str) else tuple(smarts)
    alternatives = tuple(s.strip() for s in alternatives if s and s.strip())
    if not alternatives:
        raise UsageError(f"motif {clean!r}: give a SMARTS")
    for text in alternatives:
        compile_smarts(text, field=f"motif {clean!r}")
    who = actor or current_user()

    def work(conn: Connection) -> int:
        if conn.scalar("SELECT id FROM motif WHERE name = :name", {"name": clean}) is not None:
            raise UsageError(f"a motif named {clean!r} exists already; remove it first")
        row = {
            "name": clean,
            "smarts": "\n".join(alternatives),
            "description": description or "",
            "created_by": who,
            "created_at": datetime.now(UTC),
        }
        motif_id = int(conn.insert("motif", row, returning="id"))
        audit.record(
            conn,
            entity="motif",
            entity_id=motif_id,
            action="add",
            actor=who,
            before=None,
            after={k: row[k] for k in ("name", "smarts", "description")},
        )
        return motif_id

    database.write(work)
    return Motif(clean, alternatives, description or "", source="registry", created_by=who)


def remove_motif(
    database: Database, name: str, *, actor: str | None = None, reason: str | None = None
) -> Motif:
    """Delete a user motif (built-in ones cannot be removed); the history keeps what it was."""
    from registry.storage import audit
    from registry.storage.database import current_user

    wanted = (name or "").strip().lower()
    if wanted in builtin_motifs():
        raise UsageError(f"{wanted!r} is a built-in motif and cannot be removed")
    who = actor or current_user()

    def work(conn: Connection) -> Motif:
        row = conn.first(
            "SELECT id, smarts, description FROM motif WHERE name = :name", {"name": wanted}
        )
        if row is None:
            raise NotFoundError(f"no user motif named {name!r} in this registry")
        motif_id, smarts, description = row
        conn.execute("DELETE FROM motif WHERE id = :id", {"id": motif_id})
        audit.record(
            conn,
            entity="motif",
            entity_id=motif_id,
            action="remove",
            actor=who,
            before={"name": wanted, "smarts": smarts, "description": description},
            after=None,
            reason=reason,
        )
        return Motif(wanted, _split(smarts), description or "", source="registry")

    return database.write(work)
