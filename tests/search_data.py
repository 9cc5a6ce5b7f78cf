"""Registries for the structure-search tests, written through the real entry/writer path.

``generated_smiles`` makes a few thousand simple, valid molecules by joining fragments through
linkers (amides, esters, amines, sulfonamides …); ``write_registry`` stores them with one
measurement each. Barrier values there are arbitrary numbers for filter logic, not chemistry.
``known_barriers`` is a handful of textbook structures with literature-sized barriers.
"""

from __future__ import annotations

import itertools
from pathlib import Path

from registry import api
from registry.record.chem import read_structure
from registry.record.entry import EntryInput, normalize_entry
from registry.storage.writer import known_process_kinds, write_entries

FRAGMENTS = (
    "C",
    "CC",
    "CC(C)",
    "C(C)(C)C",
    "C1CCCCC1",
    "C1CC1",
    "c1ccccc1",
    "c1ccc(C)cc1",
    "c1ccccc1C",
    "c1ccncc1",
    "Cc1ccccc1",
    "CCOC",
    "C1CCOCC1",
    "c1ccc(Cl)cc1",
    "c1cc(F)ccc1",
    "C=CC",
    "c1ccc2ccccc2c1",
    "C(C(F)(F)F)",
)
LINKERS = (
    "C(=O)N",
    "C(=O)N(C)",
    "CC(=O)N",
    "C(=O)NC",
    "C(=O)O",
    "NC(=O)N",
    "S(=O)(=O)N",
    "CN",
    "O",
)


def generated_smiles(
    fragments: tuple[str, ...] = FRAGMENTS, linkers: tuple[str, ...] = LINKERS
) -> list[str]:
    """``A-linker-B`` for every pair of fragments and every linker (duplicates removed later)."""
    return [f"{a}{link}{b}" for link in linkers for a, b in itertools.product(fragments, repeat=2)]


#: (SMILES, name, process kind, ΔG‡ text, solvent, method) — textbook cases; values from memory
KNOWN = (
    (
        "CC(=O)N(C)C",
        "N,N-dimethylacetamide",
        "bond-rotation",
        "18.1 kcal/mol",
        "CDCl3",
        "coalescence",
    ),
    (
        "O=CN(C)C",
        "N,N-dimethylformamide",
        "bond-rotation",
        "21.0 kcal/mol",
        "toluene-d8",
        "lineshape",
    ),
    (
        "CC(=S)N(C)C",
        "N,N-dimethylthioacetamide",
        "bond-rotation",
        "20.8 kcal/mol",
        "C6D6",
        "lineshape",
    ),
    ("C1CCCCC1", "cyclohexane-d11", "ring-inversion", "10.3 kcal/mol", "CS2", "lineshape"),
    (
        "Oc1ccc2ccccc2c1-c1c(O)ccc2ccccc12",
        "BINOL",
        "bond-rotation",
        "158 kJ/mol",
        "diphenyl ether",
        "equilibration",
    ),
    (
        "OC=NC",
        "N-methylformamide (iminol spelling)",
        "bond-rotation",
        "88 kJ/mol",
        "DMSO-d6",
        "2d-exchange",
    ),
    (
        "C1(C=CC2C3C=C1)C=CC23",
        "bullvalene",
        "degenerate-rearrangement",
        "12.8 kcal/mol",
        "CS2",
        "lineshape",
    ),
    ("CN1CC1", "N-methylaziridine", "pyramidal-inversion", "19 kcal/mol", "CDCl3", "coalescence"),
)


def entries_for(smiles: list[str], conn, *, dg_start: float = 40.0) -> tuple[list, list]:  # type: ignore[no-untyped-def]
    kinds = known_process_kinds(conn)
    normalized, structures = [], []
    seen: set[str] = {read_structure(k[0]).inchikey or k[0] for k in KNOWN}  # kept apart
    solvents = ("CDCl3", "toluene-d8", "DMSO-d6", "C6D6")
    for i, smi in enumerate(smiles):
        structure = read_structure(smi)
        if structure.inchikey in seen:
            continue
        seen.add(structure.inchikey or smi)
        entry = EntryInput(
            method="lineshape",
            smiles=smi,
            compound=f"G{i:05d}",
            process="bond-rotation",
            nucleus="1H",
            solvent=solvents[i % len(solvents)],
            dg=f"{dg_start + (i % 80):.1f} kJ/mol",
            dg_t=f"{250 + (i % 100)} K",
            reference=f"generated set row {i}",
        )
        norm, problems = normalize_entry(entry, kinds)
        assert norm is not None, problems
        normalized.append(norm)
        structures.append(structure)
    return normalized, structures


def write_registry(path: Path, smiles: list[str], known: bool = True) -> None:
    """A fresh registry at ``path`` with the generated molecules (+ the textbook cases)."""
    api.init_registry(str(path))
    database = api.open_registry(str(path))
    try:

        def work(conn):  # type: ignore[no-untyped-def]
            normalized, structures = entries_for(smiles, conn)
            write_entries(conn, normalized, structures, actor="tester", record_history=False)
            if known:
                kinds = known_process_kinds(conn)
                for smi, name, kind, dg, solvent, method in KNOWN:
                    norm, problems = normalize_entry(
                        EntryInput(
                            method=method, smiles=smi, name=name, process=kind, nucleus="1H",
                            solvent=solvent, dg=dg, dg_t="298 K", reference="textbook value",
                        ),
                        kinds,
                    )  # fmt: skip
                    assert norm is not None, problems
                    write_entries(conn, [norm], [read_structure(smi)], actor="tester")

        database.write(work)
    finally:
        database.dispose()


_BUILT: dict[str, Path] = {}


def registry_copy(
    name: str, tmp_path: Path, factory, *, step: int = 15, sql: tuple[str, ...] = ()
) -> Path:  # type: ignore[no-untyped-def]
    """A copy (per test) of a registry of every ``step``-th generated molecule, built once per
    session under ``name`` and then changed by the plain ``sql`` statements (no history)."""
    import sqlite3

    if name not in _BUILT:
        base = factory.mktemp(name) / "registry.sqlite"
        write_registry(base, generated_smiles()[::step])
        with sqlite3.connect(base) as conn:
            for statement in sql:
                conn.execute(statement)
        _BUILT[name] = base
    target = tmp_path / "registry.sqlite"
    with sqlite3.connect(_BUILT[name]) as source, sqlite3.connect(target) as copy:
        source.backup(copy)  # a consistent copy whatever the WAL holds
    return target
