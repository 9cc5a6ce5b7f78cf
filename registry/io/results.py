"""What one import stage hands to the next, and how a problem is reported.

The stages (see :mod:`registry.io.importer`) pass plain dataclasses: :class:`ReadResult`
(everything read from the file, nothing looked up), then :class:`Prepared` (entries normalized,
structures parsed, every problem collected). Nothing here touches the database.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

from registry.errors import RowProblem
from registry.io.mapping import SheetPlan
from registry.record.chem import Structure
from registry.record.entry import EntryInput, NormalizedEntry

#: ``progress(stage, done, total)``: ``done`` more units of ``total`` finished in ``stage``
#: ("rows" while entries are normalized, "structures" while SMILES are parsed)
Progress = Callable[[str, int, int], None]

#: sheets at least this long stop after the cheap screen when it finds problems (speed)
EARLY_STOP_MIN_ROWS = 20_000


@dataclass
class RowSource:
    """Where an entry came from, to name the sheet, row and columns in messages."""

    sheet: str | None
    row: int
    plan: SheetPlan
    texts: dict[int, list[str | None]]  # the sheet's cell texts by column (shared by its rows)
    offset: int  # this row's position in those lists
    rates: list[tuple[str | None, int]] = field(default_factory=list)  # (sheet, row) per rate

    @property
    def cells(self) -> dict[str, Any]:
        """Header → raw text, for the rejected-rows file (built only for rows that need it)."""
        return {
            c.header: self.texts[c.index][self.offset]
            for c in self.plan.columns
            if c.index in self.texts
        }


@dataclass
class RateRow:
    """One row of a rates sheet: a rate constant at a temperature for a labelled measurement."""

    sheet: str | None
    row: int
    label: str
    t_text: str
    k_text: str
    parsed: dict[str, Any]  # the rate_point columns
    cells: dict[str, Any]
    #: the rate constant the k column's header names (``kex`` → exchange), else None
    convention: str | None = None
    k_header: str = "k"


@dataclass
class ReadResult:
    """Everything read from a file, before anything touches the database."""

    file: str
    sha256: str
    plans: list[SheetPlan]
    inputs: list[EntryInput]
    sources: list[RowSource]
    rate_rows: list[RateRow]
    problems: list[RowProblem]
    bad_rate_rows: set[tuple[str | None, int]]
    notes: list[str]
    blank_markers: int = 0
    stop_early: bool = False
    uids: list[str | None] = field(default_factory=list)  # per input: its ``uid`` cell (.identity)


@dataclass
class Prepared:
    """Entries ready to match and write, and every rejected row with its problems."""

    read: ReadResult
    entries: list[NormalizedEntry]
    structures: list[Structure | None]
    kept: list[int]  # index into read.inputs of each prepared entry
    rejected: dict[tuple[str | None, int], list[RowProblem]]

    @property
    def uids(self) -> list[str | None]:
        """The identifier each prepared entry's row gives (None: no uid column or an empty cell)."""
        if not self.read.uids:
            return [None] * len(self.kept)
        return [self.read.uids[i] for i in self.kept]

    def problems(self) -> list[RowProblem]:
        """Every problem, ordered by sheet, row and column."""
        out = [p for probs in self.rejected.values() for p in probs]
        return sorted(out, key=lambda p: (p.sheet or "", p.row or 0, p.column or ""))


def by_row(problems: Sequence[RowProblem]) -> dict[tuple[str | None, int], list[RowProblem]]:
    """Problems grouped by (sheet, row)."""
    out: dict[tuple[str | None, int], list[RowProblem]] = defaultdict(list)
    for p in problems:
        out[(p.sheet, p.row if p.row is not None else 0)].append(p)
    return out


def problem_record(p: RowProblem) -> dict[str, Any]:
    """A problem as the import report lists it."""
    return {
        "file": p.file,
        "sheet": p.sheet,
        "row": p.row,
        "column": p.column,
        "text": p.text,
        "reason": p.reason,
    }
