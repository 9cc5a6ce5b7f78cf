"""The ``uid`` column: the identifier an export writes for each measurement, read back on import.

Every measurement has a random identifier (``measurement.uid``, 32 hexadecimal digits; row ids
are only unique within one registry). An export writes it in a column headed ``uid``; an
import matches on it before anything else (see :mod:`.matching`), so a row keeps its identity
whatever else is corrected in it. A column headed ``uid`` that holds none of our identifiers
(a group's own sample codes, say) stays an ordinary extra attribute, with a note; one that
holds some, and text in other cells, is a problem in those cells.
"""

from __future__ import annotations

import re

from registry.errors import RowProblem
from registry.io.results import ReadResult

#: the header of the identifier column an export writes
UID_HEADER = "uid"
#: the role the column plan gives it (shown by --dry-run)
UID_ROLE = "identity"
_UID = re.compile(r"^[0-9a-f]{32}$")


def is_uid(text: str | None) -> bool:
    return text is not None and bool(_UID.match(text.strip().lower()))


def take_uids(read: ReadResult) -> None:
    """Fill ``read.uids`` (one per entry) from the sheets' uid columns; take them out of the
    extra attributes; a cell that is not an identifier becomes a problem of its row."""
    read.uids = [None] * len(read.inputs)
    columns = {}
    for plan in read.plans:
        for col in plan.columns:
            if col.role == "extra" and col.header.strip().lower() == UID_HEADER:
                columns[id(plan)] = col
    if not columns:
        return
    rows = [(i, src, columns[id(src.plan)]) for i, src in enumerate(read.sources)]
    rows = [(i, src, col) for i, src, col in rows if id(src.plan) in columns]
    ours = {id(src.plan) for _, src, col in rows if is_uid(src.texts[col.index][src.offset])}
    for plan in read.plans:
        col = columns.get(id(plan))
        if col is None:
            continue
        if id(plan) in ours:
            col.role = UID_ROLE
        else:
            where = f"sheet {plan.sheet!r}: " if plan.sheet else ""
            read.notes.append(
                f"{where}column {col.letter} {col.header!r} holds no measurement identifiers "
                "(32 hexadecimal digits, as an export writes them); kept as an extra attribute"
            )
    for i, src, col in rows:
        if id(src.plan) not in ours:
            continue
        read.inputs[i].extra.pop(col.header, None)
        text = src.texts[col.index][src.offset]
        if text is None:
            continue
        if is_uid(text):
            read.uids[i] = text.strip().lower()
        else:
            read.problems.append(
                RowProblem(
                    read.file, src.sheet, src.row, col.header, text,
                    "not a measurement identifier: an export writes 32 hexadecimal digits here; "
                    "leave the cell empty for a new measurement",
                )
            )  # fmt: skip
