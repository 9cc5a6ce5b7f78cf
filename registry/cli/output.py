"""Rendering shared by every result-printing command: a readable table, ``--json`` or ``--csv``.

Commands return data (dicts, lists of dicts, DataFrames); only this module turns it into text.
"""

from __future__ import annotations

import csv
import io
import json
import math
import sys
from collections.abc import Iterable, Mapping, Sequence
from typing import Any

import typer

JsonOption = typer.Option(False, "--json", help="Print machine-readable JSON instead of a table.")
CsvOption = typer.Option(False, "--csv", help="Print CSV instead of a table.")


def _jsonable(value: Any) -> Any:
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if hasattr(value, "isoformat"):
        return value.isoformat()
    if isinstance(value, Mapping):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    if hasattr(value, "item") and callable(value.item):  # numpy scalars
        return value.item()
    return value


def to_json(data: Any) -> str:
    """JSON with NaN/inf as null and datetimes as ISO text, so any consumer can read it."""
    return json.dumps(_jsonable(data), ensure_ascii=False, indent=2)


def print_json(data: Any) -> None:
    sys.stdout.write(to_json(data) + "\n")


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        if not math.isfinite(value):
            return ""
        return (
            f"{value:.4g}"
            if abs(value) >= 1e5 or (value != 0 and abs(value) < 1e-3)
            else f"{value:.2f}".rstrip("0").rstrip(".")
        )
    return str(value)


def table_text(rows: Sequence[Mapping[str, Any]], columns: Sequence[str] | None = None) -> str:
    """A plain aligned text table; wide cells are cut so a terminal stays readable."""
    if not rows:
        return "(no rows)"
    cols = list(columns or rows[0].keys())
    cells = [[_cell(r.get(c))[:60] for c in cols] for r in rows]
    widths = [max(len(c), *(len(row[i]) for row in cells)) for i, c in enumerate(cols)]
    head = "  ".join(c.ljust(w) for c, w in zip(cols, widths, strict=True))
    rule = "  ".join("-" * w for w in widths)
    body = [
        "  ".join(v.ljust(w) for v, w in zip(row, widths, strict=True)).rstrip() for row in cells
    ]
    return "\n".join([head.rstrip(), rule, *body])


def csv_text(rows: Iterable[Mapping[str, Any]], columns: Sequence[str] | None = None) -> str:
    """CSV for a spreadsheet: texts a spreadsheet would evaluate get a guarding apostrophe,
    and every text is quoted (so a reader splitting on ';' or tabs cannot cut a formula out
    of one)."""
    from registry import api

    rows = list(rows)
    out = io.StringIO()
    cols = list(columns or (rows[0].keys() if rows else []))
    csv.writer(out, lineterminator="\n").writerow(cols)  # plain column names
    writer = csv.writer(out, lineterminator="\n", quoting=csv.QUOTE_NONNUMERIC)
    for r in rows:
        writer.writerow([_csv_cell(api.spreadsheet_safe(_jsonable(r.get(c)))) for c in cols])
    return out.getvalue()


def _csv_cell(value: Any) -> Any:
    """Numbers stay numbers; anything else (None included) is written as quoted text."""
    if value is None:
        return ""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return str(value)
    return value


def render_rows(
    rows: Sequence[Mapping[str, Any]],
    *,
    as_json: bool = False,
    as_csv: bool = False,
    columns: Sequence[str] | None = None,
) -> None:
    """Print a listing in the format the user chose."""
    if as_json:
        print_json(list(rows))
    elif as_csv:
        sys.stdout.write(csv_text(rows, columns))
    else:
        typer.echo(table_text(rows, columns))


def render_record(
    record: Mapping[str, Any], *, as_json: bool = False, title: str | None = None
) -> None:
    """Print one record as ``key: value`` lines, or as JSON."""
    if as_json:
        print_json(record)
        return
    if title:
        typer.echo(title)
    width = max((len(k) for k in record), default=0)
    for key, value in record.items():
        if isinstance(value, (list, dict)):
            continue
        typer.echo(f"  {key.ljust(width)}  {_cell(value)}")
