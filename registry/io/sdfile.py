"""SD files in and out: each record's connection table is the structure, its data items a row.

An SD file (MDL/BIOVIA's open "structure-data" format) is how structure editors and other
cheminformatics tools hand over many molecules with properties. On import each record becomes
one row of a sheet: a ``smiles`` column from the record's Molfile
(:func:`registry.record.chem.smiles_from_molfile`), a ``name`` column from its name item or else
its title line (unless the title is only the record's label), and one column per data item, so data items are mapped exactly
like spreadsheet headers (``dG (kJ/mol)``, ``Tc (°C)``, a mapping file). On export the same
columns as a CSV export are written as data items beside a Molfile of the stored structure,
so an exported file imports again as the same measurements (matched by their uid).
"""

from __future__ import annotations

import re
from collections.abc import Iterator, Sequence
from pathlib import Path
from typing import Any

from registry.errors import FileFormatError, MolfileError
from registry.io import workbook_xml
from registry.io.cells import unneutralise
from registry.outputs import write_atomically

SUFFIXES = (".sdf", ".sd")
#: the columns an SD record gives besides its data items
STRUCTURE_COLUMN = "smiles"
TITLE_COLUMN = "name"
_ITEM_HEADER = re.compile(r"^>.*?<([^>]*)>")
_END = "$$$$"
#: a record's problems are listed up to this many, then counted
_SHOWN = 20


def read_sd(path: Path, text: str) -> tuple[list[list[str | None]], list[str]]:
    """Rows of cells (row 0: the column names) and notes for the import summary.

    Every record's Molfile is read; records whose Molfile cannot be read are all named in one
    error (the file is one transaction, like a sheet with bad rows)."""
    records = list(_records(text))
    if not records:
        raise FileFormatError(str(path), "no SD records (a record ends with a '$$$$' line)")
    names: dict[str, None] = {}
    for _, _, items in records:
        names.update(dict.fromkeys(items))
    if len(records) * (len(names) + 2) > workbook_xml.MAX_SHEET_CELLS:
        raise FileFormatError(str(path), f"{len(records):,} records are more than one import takes")
    smiles_item, name_item, label_item = _structure_and_title(names)
    others = [n for n in names if n not in (smiles_item, name_item)]
    columns = [STRUCTURE_COLUMN, TITLE_COLUMN, *others]
    merged = _same_field_items(records, others)
    if merged:
        columns = [c for c in columns if c not in merged or merged[c][0] == c]
    rows: list[list[str | None]] = [list(columns)]
    problems: list[str] = []
    ignored_smiles = 0
    for number, (title, block, items) in enumerate(records, start=1):
        try:
            smiles = _structure(block, f"record {number}" + (f" ({title})" if title else ""))
        except MolfileError as exc:
            problems.append(str(exc))
            continue
        if smiles_item is not None and items.get(smiles_item):
            if smiles:
                ignored_smiles += 1
            else:
                smiles = items[smiles_item]
        name = items.get(name_item) if name_item is not None else None
        label = items.get(label_item) if label_item is not None else None
        if not name and title != (unneutralise(label) if label else None):
            name = title
        head = [smiles or None, name or None]
        rows.append(head + [_cell(items, n, merged) for n in columns[len(head) :]])
    if problems:
        shown = "\n  ".join(problems[:_SHOWN])
        more = f"\n  … and {len(problems) - _SHOWN} more" if len(problems) > _SHOWN else ""
        raise FileFormatError(
            str(path),
            f"{len(problems)} record(s) with a Molfile that cannot be read; nothing was "
            f"written:\n  {shown}{more}",
        )
    notes = [
        f"{path.name}: {len(records)} SD record(s); in messages, row N is record N − 1 (row 1 "
        "holds the data item names)"
    ]
    if ignored_smiles:
        notes.append(
            f"{path.name}: {ignored_smiles} record(s) have both a drawn structure and a "
            f"'{smiles_item}' data item; the drawn structure (the Molfile) was taken"
        )
    return rows, notes


def _structure_and_title(names: dict[str, None]) -> tuple[str | None, str | None, str | None]:
    """The data items that hold a SMILES, the compound's name and its label (each or None).

    A record's title line is the compound's name when it has no name item and the title is
    not just its label (an exported record's title is its name, else its label)."""
    from registry.io.headers import guess_header

    fields = {n: guess_header(n).field for n in names}

    def first(wanted: str) -> str | None:
        return next((n for n, f in fields.items() if f == wanted), None)

    return first("smiles"), first("name"), first("compound")


def _same_field_items(
    records: list[tuple[str, str, dict[str, str]]], names: list[str]
) -> dict[str, tuple[str, str | None]]:
    """Data items that give one quantity in different units (``ΔG‡ (kcal/mol)`` in some
    records, ``ΔG‡ (kJ/mol)`` in others — records gathered from several sources do this) and
    never both in one record: item → (the first item of its group, its unit). Their values
    are read as one column with the unit written in each cell. Items that share a record stay
    apart, and the importer then asks for a mapping, as for such a sheet."""
    from registry.io.headers import guess_header

    groups: dict[str, list[tuple[str, str | None]]] = {}
    for name in names:
        guess = guess_header(name)
        if guess.role == "value" and guess.field is not None:
            groups.setdefault(guess.field, []).append((name, guess.unit))
    merged: dict[str, tuple[str, str | None]] = {}
    for group in groups.values():
        if len(group) < 2:
            continue
        if any(sum(1 for n, _ in group if items.get(n)) > 1 for _, _, items in records):
            continue
        merged.update({name: (group[0][0], unit) for name, unit in group})
    return merged


def _cell(items: dict[str, str], column: str, merged: dict[str, tuple[str, str | None]]) -> Any:
    """A record's value for ``column``: for a merged quantity, whichever item it has, its
    unit written after the number (a unit in the cell wins over the header's)."""
    if column not in merged:
        return items.get(column)
    for name, (first, unit) in merged.items():
        if first == column and items.get(name):
            value = items[name]
            return f"{value} {unit}" if unit else value
    return None


def _structure(block: str, source: str) -> str:
    from registry.record.chem import smiles_from_molfile

    return smiles_from_molfile(block, source)


def _records(text: str) -> Iterator[tuple[str, str, dict[str, str]]]:
    """(title, Molfile, data items) of each record; a last record without '$$$$' counts."""
    lines: list[str] = []
    for line in text.splitlines():
        if line.strip() == _END:
            yield _record(lines)
            lines = []
        else:
            lines.append(line)
    if any(line.strip() for line in lines):
        yield _record(lines)


def _record(lines: list[str]) -> tuple[str, str, dict[str, str]]:
    end = next((i for i, line in enumerate(lines) if line.startswith("M  END")), None)
    if end is None:  # no connection table: the whole record is handed on and refused there
        return ("", "\n".join(lines), {})
    title = lines[0].strip() if lines else ""
    block = "\n".join(lines[: end + 1])
    items: dict[str, str] = {}
    name: str | None = None
    value: list[str] = []
    for line in lines[end + 1 :]:
        header = _ITEM_HEADER.match(line)
        if header and name is None:
            name, value = header.group(1).strip(), []
        elif name is not None and not line.strip():
            items[name] = "\n".join(value).strip()
            name = None
        elif name is not None:
            value.append(line)
    if name is not None:
        items[name] = "\n".join(value).strip()
    return title, block, items


def write_sd(
    path: Path, structures: Sequence[tuple[str | None, str]], rows: Sequence[dict[str, Any]],
    columns: Sequence[str],
) -> None:  # fmt: skip
    """One record per row: the Molfile of ``structures[i]`` (SMILES, title) and the row's
    cells as data items (empty cells left out; values on one line, since a blank line ends a
    data item)."""
    from registry.record.chem import molfile_from_smiles

    items = [c for c in columns if c != STRUCTURE_COLUMN]
    with write_atomically(path) as fh:
        for (smiles, title), row in zip(structures, rows, strict=True):
            fh.write(molfile_from_smiles(smiles, title).rstrip("\n") + "\n")
            for column in items:
                value = row.get(column)
                if value is None or value == "":
                    continue
                fh.write(f">  <{column}>\n{_one_line(value)}\n\n")
            fh.write(_END + "\n")


def _one_line(value: Any) -> str:
    text = repr(value) if isinstance(value, float) else str(value)
    return " ".join(text.split()) if "\n" in text or "\r" in text else text
