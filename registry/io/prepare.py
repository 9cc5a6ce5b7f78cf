"""Normalize stage: every entry through the unit layer, every distinct SMILES through RDKit.

Up to the write, an import only reads: :func:`prepare` reads the file (:mod:`.sheets`; the
SMILES column goes to the process pool of :mod:`.parallel` as soon as it is read), normalizes
the entries (:func:`registry.record.entry.normalize_entry`, the same path as ``add``), attaches
the parsed structures, and turns every problem into a :class:`~registry.errors.RowProblem`
naming the sheet, row, column and text. Rows the registry would refuse (compound conflicts,
duplicates) are screened by :mod:`.conflicts`.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from pathlib import Path

from registry.errors import RowProblem
from registry.io import identity, parallel, results
from registry.io.conflicts import screen_entries
from registry.io.headers import FIELD_TITLES
from registry.io.mapping import Column
from registry.io.results import Prepared, Progress, ReadResult, RowSource, by_row
from registry.io.sheets import read_input
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry, Problem, text_of
from registry.storage.database import Database
from registry.storage.writer import known_process_kinds, solvent_index

Normalized = list[tuple[NormalizedEntry | None, list[Problem]]]


def prepare(
    database: Database,
    path: Path,
    *,
    sheet: str | None = None,
    mapping: str | Path | None = None,
    workers: int | None = None,
    progress: Progress | None = None,
    stop_early: bool = False,
) -> Prepared:
    """Everything up to the write: read, normalize, parse structures, check; problems collected.

    ``stop_early``: when reading a big file already found problems (formulas, text in number
    columns, headers), report those without the costly unit and structure pass.
    """
    with parallel.Workers(workers) as pool:
        read = read_input(
            path, sheet=sheet, mapping=mapping, stop_early=stop_early,
            on_smiles=pool.submit_structures,
        )  # fmt: skip
        identity.take_uids(read)
        big = len(read.inputs) >= results.EARLY_STOP_MIN_ROWS  # small: every problem at once
        if read.problems and ((stop_early and big) or (not read.inputs and not read.rate_rows)):
            return Prepared(read, [], [], [], by_row(read.problems))
        with database.read() as conn:
            kinds = known_process_kinds(conn)
            solvents = solvent_index(conn)
        normalized, parsed = _normalize(read, kinds, pool, progress)
    problems = list(read.problems)
    entries, structures, kept = _accepted(read, normalized, parsed, problems)
    with database.read() as conn:
        entries, structures, kept = screen_entries(
            conn, read, entries, structures, kept, solvents, problems
        )
    # an entry whose rate row was bad is imported without that point only when skipping bad rows
    return Prepared(read, entries, structures, kept, by_row(problems))


def _normalize(
    read: ReadResult,
    kinds: tuple[str, ...],
    pool: parallel.Workers,
    progress: Progress | None,
) -> tuple[Normalized, dict[str, parallel.StructureResult]]:
    """Normalized entries (with their problems) and each distinct SMILES's structure.

    While the pool parses structures, this process normalizes; without structures to parse,
    the pool normalizes.
    """
    n = len(read.inputs)
    total = n + len({t for t in (text_of(inp.smiles) for inp in read.inputs) if t})

    def tick(stage: str) -> Callable[[int], None] | None:
        if progress is None:
            return None
        return lambda done: progress(stage, done, total)

    normalized = parallel.normalize_all(
        read.inputs,
        kinds,
        None if pool.parsing else pool.pool(n, parallel.PARALLEL_MIN_ROWS),
        tick("rows"),
    )
    smiles = [
        ne.compound["smiles_input"]
        for ne, _ in normalized
        if ne is not None and ne.compound.get("smiles_input")
    ]
    return normalized, pool.structures(smiles, tick("structures"))


def _accepted(
    read: ReadResult,
    normalized: Normalized,
    parsed: dict[str, parallel.StructureResult],
    problems: list[RowProblem],
) -> tuple[list[NormalizedEntry], list[Structure | None], list[int]]:
    """The entries that normalized and whose SMILES could be read; the others' problems."""
    entries: list[NormalizedEntry] = []
    structures: list[Structure | None] = []
    kept: list[int] = []
    bad_rows = {(p.sheet, p.row) for p in problems}
    for i, ((ne, probs), src) in enumerate(zip(normalized, read.sources, strict=True)):
        if (src.sheet, src.row) in bad_rows:
            # already rejected while reading (formula, merged or unreadable cell): what the
            # later checks say of it would only echo the blank left by that cell
            continue
        if probs:
            problems.extend(_without_echoes([problem_at(read.file, src, p) for p in probs]))
            continue
        assert ne is not None
        structure = None
        smiles_text = ne.compound.get("smiles_input")
        if smiles_text:
            structure, why = parsed[smiles_text]
            if structure is None:
                col = src.plan.value_columns().get("smiles")
                problems.append(
                    RowProblem(
                        read.file, src.sheet, src.row, col.header if col else "SMILES",
                        smiles_text, f"unreadable SMILES: {why}",
                    )
                )  # fmt: skip
                continue
        entries.append(ne)
        structures.append(structure)
        kept.append(i)
    return entries, structures, kept


def problem_at(file: str, src: RowSource, p: Problem) -> RowProblem:
    """An entry's problem (named by field) at the sheet, row and column it came from."""
    m = re.match(r"rate (\d+) ([Tk])", p.field)
    if m:
        i = int(m[1]) - 1
        sheet, row = src.rates[i] if i < len(src.rates) else (src.sheet, src.row)
        return RowProblem(file, sheet, row, f"rate point {m[2]}", p.text, p.reason)
    name = p.field.split(" ", 1)[0]
    col: Column | None = src.plan.value_columns().get(name)
    if col is None and name == "dg_t":
        col = src.plan.value_columns().get("t")
    column = col.header if col is not None else FIELD_TITLES.get(name, name)
    return RowProblem(file, src.sheet, src.row, column, p.text or None, p.reason)


def _without_echoes(problems: Sequence[RowProblem]) -> list[RowProblem]:
    """Drop "coalescence data needs both Tc and Δν" when Tc or Δν itself was the problem."""
    flagged = {p.column for p in problems if p.text}
    pair = [p for p in problems if "needs both Tc and Δν" in p.reason]
    if pair and len(problems) > len(pair) and flagged:
        return [p for p in problems if p not in pair]
    return list(problems)
