"""Export measurements as CSV, XLSX or JSON: reported texts, normalized values, findings.

One row per measurement. The first column, ``uid``, is the measurement's identifier: an
import of the file matches on it first (:mod:`.matching`), so a row stays the same measurement
whatever is corrected in it. Columns named after entry fields (``dg``, ``tc``, ``dnu`` …) hold
the values *as reported*, so the file imports again unchanged; columns ending in
``(normalized)`` hold the canonical floats (their unit is in the name: ``dg_kj_mol``) and
``(derived)`` columns what the registry computed (InChIKey, findings, ``flagged``: yes when an
error finding is open, i.e. not accepted) — the importer skips both kinds, since it derives
them again. Rate points travel in one ``rates`` cell
(``k @ T; k @ T``); extra attributes as ``extra: <name>`` columns.

Text cells that a spreadsheet would evaluate (leading ``=``, ``+``, ``-``, ``@``) get a
leading apostrophe (:func:`registry.io.cells.neutralise`); numeric columns stay numbers.

The file is checked before anything is read and written whole or not at all
(:mod:`registry.outputs`). Odd stored values never stop an export: a number that is not finite
(put into the registry behind fluxledger's back) is written as ``inf``/``nan`` in csv and xlsx
and as null in JSON (which has no such numbers), a text's control characters are kept — in
xlsx in the workbook format's own escape ``_x0001_``, which Excel and the importer read back
as the character — and the result's ``notes`` say where they were.
"""

from __future__ import annotations

import csv
import json
import re
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from registry.errors import UsageError
from registry.io.cells import RATE_COLUMNS, format_rate_list, keep_apostrophes, neutralise
from registry.io.identity import UID_HEADER
from registry.outputs import OddValues, check_target, not_finite, write_atomically, write_file
from registry.record import fields
from registry.storage.database import Database

FORMATS = ("csv", "xlsx", "json", "sdf")

#: which part of a gathered record each table's columns are in
_PART = {"measurement": "m", "compound": "c", "process": "p", "coalescence": "co"}

#: reported-text columns: header (the entry field) → (part, column), in the fields table's order
REPORTED: list[tuple[str, str, str]] = [
    (f.name, _PART[f.table], f.text_column) for f in fields.FIELDS if f.entry and f.text_column
]

#: normalized numeric columns (canonical units in the names): every value field's float and
#: uncertainty, and the population ratio read from its text
NORMALIZED: list[tuple[str, str]] = [
    (_PART[f.table], column)
    for f in fields.FIELDS
    if f.entry
    for column in fields.value_columns_of_text().get(f.text_column or "", ())
    if not column.endswith("_id")  # the solvent's row in the solvent table, not a value
]

DERIVED: list[tuple[str, str]] = [
    ("m", "id"),
    ("x", "flagged"),
    ("c", "smiles_canonical"),
    ("c", "inchikey"),
    ("c", "formula"),
    ("c", "structure_problem"),
    ("x", "findings"),
    ("x", "finding_count"),
    ("m", "entered_by"),
    ("m", "entered_at"),
    ("m", "updated_at"),
    ("m", "batch_id"),
]


#: compound columns an export reads (not the binary molecule and fingerprint)
_COMPOUND_COLUMNS = (
    "id, label, name, smiles_input, smiles_canonical, inchi, inchikey, formula, net_charge, "
    "structure_ok, structure_problem, notes, created_at"
)


def gather(database: Database, ids: Sequence[int]) -> list[dict[str, Any]]:
    """Full records of measurements (compound, process, coalescence, rates, findings), by id."""
    records: dict[int, dict[str, Any]] = {}
    with database.read() as conn:
        for m in conn.records_where_in("SELECT * FROM measurement WHERE 1 = 1", "id", ids):
            records[m["id"]] = {"m": m, "c": {}, "p": {}, "co": [], "rates": [], "findings": []}
        measurements = [r["m"] for r in records.values()]
        compounds = {
            r["id"]: r
            for r in conn.records_where_in(
                f"SELECT {_COMPOUND_COLUMNS} FROM compound WHERE 1 = 1",
                "id",
                {m["compound_id"] for m in measurements},
            )
        }
        processes = {
            r["id"]: r
            for r in conn.records_where_in(
                "SELECT * FROM process WHERE 1 = 1", "id", {m["process_id"] for m in measurements}
            )
        }
        for table, key in (
            ("coalescence", "co"),
            ("rate_point", "rates"),
            ("validation_finding", "findings"),
        ):
            rows = conn.records_where_in(
                f"SELECT * FROM {table} WHERE 1 = 1", "measurement_id", records
            )
            for r in sorted(rows, key=lambda r: r["id"]):
                records[r["measurement_id"]][key].append(r)
    for rec in records.values():
        rec["c"] = compounds.get(rec["m"]["compound_id"], {})
        rec["p"] = processes.get(rec["m"]["process_id"], {})
    return [records[i] for i in ids if i in records]


def flagged(rec: dict[str, Any]) -> bool:
    """Whether a measurement has an error finding nobody has accepted."""
    return any(f["severity"] == "error" and not f.get("accepted_by") for f in rec["findings"])


def flat_row(rec: dict[str, Any]) -> dict[str, Any]:
    """One record as an export row (header → cell)."""
    co = rec["co"][0] if rec["co"] else {}
    parts = {"m": rec["m"], "c": rec["c"], "p": rec["p"], "co": co}
    row: dict[str, Any] = {UID_HEADER: rec["m"].get("uid")}
    for header, part, column in REPORTED:
        row[header] = parts[part].get(column)
    row["rates"] = (
        format_rate_list([(r["t_text"], r["k_text"]) for r in rec["rates"]])
        if rec["rates"]
        else None
    )
    extra = json.loads(rec["m"]["extra_json"]) if rec["m"].get("extra_json") else {}
    for key, value in extra.items():
        row[f"extra: {key}"] = None if value is None else str(value)
    for part, column in NORMALIZED:
        row[f"{column} (normalized)"] = parts[part].get(column)
    findings = [f for f in rec["findings"] if not f.get("accepted_by")]
    for part, column in DERIVED:
        if column == "flagged":
            value: Any = "yes" if flagged(rec) else "no"
        elif column == "findings":
            value = "; ".join(
                f"{f['severity']} [{f['rule_id']}] {f['message']}" for f in rec["findings"]
            )
        elif column == "finding_count":
            value = len(findings)
        else:
            value = parts[part].get(column)
            if hasattr(value, "isoformat"):
                value = value.isoformat()
        row[f"{column} (derived)"] = value if value != "" else None
    return row


def json_record(rec: dict[str, Any]) -> dict[str, Any]:
    """One record for the JSON export: nested, with reported and normalized values apart."""
    flat = flat_row(rec)
    m, c, p = rec["m"], rec["c"], rec["p"]
    return {
        "id": m["id"],
        "uid": m.get("uid"),
        "label": m["label"],
        "compound": {
            k: c.get(k)
            for k in ("label", "name", "smiles_input", "smiles_canonical", "inchikey", "formula")
        }
        | {"structure_ok": c.get("structure_ok"), "structure_problem": c.get("structure_problem")},
        "process": {k: p.get(k) for k in ("kind", "sites", "nucleus")} if p else None,
        "method": m["method"],
        "solvent": m["solvent_text"],
        "reported": {h: flat[h] for h, _, _ in REPORTED if flat[h] is not None},
        "normalized": {
            col: flat[f"{col} (normalized)"]
            for _, col in NORMALIZED
            if flat[f"{col} (normalized)"] is not None
        },
        "rate_points": [
            {**{k: r[k] for k in RATE_COLUMNS}, "fit": json.loads(r.get("fit_json") or "null")}
            for r in rec["rates"]
        ],
        "extra": json.loads(m["extra_json"]) if m.get("extra_json") else {},
        "findings": [
            {
                k: (f[k].isoformat() if hasattr(f[k], "isoformat") else f[k])
                for k in (
                    "rule_id",
                    "rule_version",
                    "severity",
                    "message",
                    "reported",
                    "recomputed",
                    "difference",
                    "unit",
                    "likely_cause",
                    "accepted_by",
                    "accept_reason",
                )
            }
            for f in rec["findings"]
        ],
        "flagged": flagged(rec),
        "reference": m["reference"],
        "status": m["status"],
        "entered_by": m["entered_by"],
        "entered_at": m["entered_at"].isoformat() if m.get("entered_at") else None,
    }


def _columns(rows: Sequence[dict[str, Any]]) -> list[str]:
    cols = [UID_HEADER] + [h for h, _, _ in REPORTED] + ["rates"]
    extras = sorted({k for r in rows for k in r if k.startswith("extra: ")})
    cols += extras
    cols += [f"{c} (normalized)" for _, c in NORMALIZED]
    cols += [f"{c} (derived)" for _, c in DERIVED]
    return cols


def _safe(value: Any) -> Any:
    """Numbers stay numbers; text is guarded against formula evaluation."""
    if value is None:
        return None
    if isinstance(value, bool):
        return value
    if isinstance(value, (int, float)):
        return value
    return neutralise(str(value))


def write_export(
    database: Database, ids: Sequence[int], output: str | Path, fmt: str | None = None
) -> dict[str, Any]:
    """Write the measurements ``ids`` as csv, xlsx, json or sdf (``fmt``, else the file's
    suffix)."""
    path = check_target(output, what="export", protect=database.path)
    fmt = (fmt or path.suffix.lstrip(".")).lower()
    if fmt not in FORMATS:
        raise UsageError(f"format must be one of {', '.join(FORMATS)} (got {fmt!r})")
    records = gather(database, ids)
    rows = [flat_row(r) for r in records]
    odd = OddValues()
    for rec, row in zip(records, rows, strict=True):
        odd.scan(row, f"measurement {rec['m']['id']}")
    if fmt == "json":
        text = json.dumps([_finite(json_record(r)) for r in records], ensure_ascii=False,
                          indent=2, default=str, allow_nan=False)  # fmt: skip
        with write_atomically(path) as fh:
            fh.write(text + "\n")
    elif fmt == "csv":
        _write_csv(path, rows, _columns(rows))
    elif fmt == "sdf":
        from registry.io.sdfile import write_sd

        titles = [(r["c"].get("smiles_input"), _title(r)) for r in records]
        safe = [{c: _sd_text(v) for c, v in row.items()} for row in rows]
        write_sd(path, titles, safe, _columns(rows))
    else:
        write_file(path, lambda tmp: _write_xlsx(tmp, rows, _columns(rows)))
    return {
        "file": str(path),
        "format": fmt,
        "measurements": len(records),
        "rate_points": sum(len(r["rates"]) for r in records),
        "findings": sum(len(r["findings"]) for r in records),
        "notes": odd.notes(numbers=_ODD_NUMBERS[fmt], texts=_ODD_TEXTS[fmt]),
    }


#: what each format does with a stored number that is not finite, and with control characters
_ODD_NUMBERS = {
    "csv": "written as inf or nan",
    "xlsx": "written as the text inf or nan",
    "json": "written as null (JSON has no inf or nan; the reported texts are kept)",
    "sdf": "written as inf or nan",
}
_ODD_TEXTS = {
    "csv": "kept as they are",
    "xlsx": "kept, written as _x0001_ and the like, which Excel and 'fluxledger import' read "
    "back as the character",
    "json": "kept (written as \\u0001 and the like)",
    "sdf": "kept as they are",
}


def _sd_text(value: Any) -> Any:
    """An SD data item is no spreadsheet cell: texts as they are, apostrophes kept on import."""
    return keep_apostrophes(value) if isinstance(value, str) else value


def _title(rec: dict[str, Any]) -> str:
    """The Molfile's name line: the compound's name, else its label (the import reads a title
    that is not the label as the name)."""
    c = rec["c"]
    return c.get("name") or c.get("label") or f"measurement {rec['m']['id']}"


def _finite(value: Any) -> Any:
    """``value`` with every non-finite float replaced by None (JSON has no inf or nan)."""
    if isinstance(value, dict):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_finite(v) for v in value]
    return None if not_finite(value) else value


def _write_csv(path: Path, rows: Sequence[dict[str, Any]], columns: list[str]) -> None:
    with write_atomically(path, newline="") as fh:
        writer = csv.writer(fh)
        writer.writerow(columns)
        for row in rows:
            writer.writerow(
                ["" if (v := _safe(row.get(c))) is None else _csv_cell(v) for c in columns]
            )


def _csv_cell(value: Any) -> Any:
    if isinstance(value, float):
        return repr(value)
    return value


#: what the workbook format cannot hold as is: characters XML 1.0 forbids, a carriage return
#: (an XML reader turns it into a line feed) and a literal ``_xHHHH_`` (a reader would take it
#: for an escape)
_OOXML_ESCAPE = re.compile(r"_(?=x[0-9A-Fa-f]{4}_)|[\x00-\x08\x0b-\x1f\ufffe\uffff]")


def _ooxml_escape(match: re.Match[str]) -> str:
    char = match.group()
    if char == "_":  # starts a literal '_x0041_' (overlapping ones too): escaped itself
        return "_x005F_"
    if char in "\ufffe\uffff":  # noncharacters no workbook holds, escaped or not
        return "\ufffd"
    return f"_x{ord(char):04X}_"


def workbook_text(text: str) -> str:
    """``text`` as a workbook cell holds it: escaped the format's own way (ECMA-376
    ST_Xstring: ``\\x01`` → ``_x0001_``, a literal ``_x0041_`` → ``_x005F_x0041_``), which
    Excel and the importer read back as the original text. The noncharacters U+FFFE and
    U+FFFF, which no workbook can hold, become U+FFFD."""
    return _OOXML_ESCAPE.sub(_ooxml_escape, text)


def _xlsx_cell(value: Any) -> Any:
    """A cell a workbook can hold: a guarded text escaped (:func:`workbook_text`), a
    non-finite number as its text."""
    value = _safe(value)
    if isinstance(value, str):
        return workbook_text(value)
    if not_finite(value):
        return repr(value)
    return value


def _write_xlsx(path: Path, rows: Sequence[dict[str, Any]], columns: list[str]) -> None:
    from openpyxl import Workbook

    book = Workbook(write_only=True)
    sheet = book.create_sheet("entries")
    sheet.append([workbook_text(c) for c in columns])
    for row in rows:
        sheet.append([_xlsx_cell(row.get(c)) for c in columns])
    book.save(path)
