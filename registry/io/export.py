"""Export measurements as CSV, XLSX or JSON: reported texts, normalized values, findings.

One row per measurement. Columns named after entry fields (``dg``, ``tc``, ``dnu`` …) hold
the values *as reported*, so the file imports again unchanged; columns ending in
``(normalized)`` hold the canonical floats (their unit is in the name: ``dg_kj_mol``) and
``(derived)`` columns what the registry computed (InChIKey, findings …) — the importer skips
both kinds, since it derives them again. Rate points travel in one ``rates`` cell
(``k @ T; k @ T``); extra attributes as ``extra: <name>`` columns.

Text cells that a spreadsheet would evaluate (leading ``=``, ``+``, ``-``, ``@``) get a
leading apostrophe (:func:`registry.io.cells.neutralise`); numeric columns stay numbers.
"""

from __future__ import annotations

import csv
import json
from collections import defaultdict
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from sqlalchemy import select

from registry.errors import UsageError
from registry.io.cells import neutralise
from registry.io.importer import format_rate_list
from registry.storage.database import Database
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    Measurement,
    Process,
    RatePoint,
    ValidationFinding,
)

FORMATS = ("csv", "xlsx", "json")

#: reported-text columns: header → (table, column)
REPORTED: list[tuple[str, str, str]] = [
    ("label", "m", "label"),
    ("compound", "c", "label"),
    ("name", "c", "name"),
    ("smiles", "c", "smiles_input"),
    ("process", "p", "kind"),
    ("sites", "p", "sites"),
    ("nucleus", "p", "nucleus"),
    ("method", "m", "method"),
    ("solvent", "m", "solvent_text"),
    ("field", "m", "field_text"),
    ("t_min", "m", "t_min_text"),
    ("t_max", "m", "t_max_text"),
    ("dg", "m", "dg_text"),
    ("dg_t", "m", "dg_t_text"),
    ("dh", "m", "dh_text"),
    ("ds", "m", "ds_text"),
    ("ea", "m", "ea_text"),
    ("log10_a", "m", "log10_a_text"),
    ("tc", "co", "tc_text"),
    ("dnu", "co", "dnu_text"),
    ("j", "co", "j_text"),
    ("population", "co", "population_text"),
    ("reference", "m", "reference"),
    ("status", "m", "status"),
]

#: normalized numeric columns (canonical units in the names)
NORMALIZED: list[tuple[str, str]] = [
    ("m", "field_mhz"),
    ("m", "t_min_k"),
    ("m", "t_max_k"),
    ("m", "dg_kj_mol"),
    ("m", "dg_err_kj_mol"),
    ("m", "dg_t_k"),
    ("m", "dh_kj_mol"),
    ("m", "dh_err_kj_mol"),
    ("m", "ds_j_mol_k"),
    ("m", "ds_err_j_mol_k"),
    ("m", "ea_kj_mol"),
    ("m", "ea_err_kj_mol"),
    ("m", "log10_a"),
    ("co", "tc_k"),
    ("co", "tc_err_k"),
    ("co", "dnu_hz"),
    ("co", "dnu_err_hz"),
    ("co", "j_hz"),
    ("co", "population_ratio"),
]

DERIVED: list[tuple[str, str]] = [
    ("m", "id"),
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


def _chunks(items: Sequence[Any], size: int = 500) -> list[Sequence[Any]]:
    return [items[i : i + size] for i in range(0, len(items), size)]


def gather(database: Database, ids: Sequence[int]) -> list[dict[str, Any]]:
    """Full records of measurements (compound, process, coalescence, rates, findings), by id."""
    m_t, c_t, p_t = Measurement.__table__, Compound.__table__, Process.__table__
    co_t, r_t, f_t = (
        CoalescenceObservation.__table__,
        RatePoint.__table__,
        ValidationFinding.__table__,
    )
    records: dict[int, dict[str, Any]] = {}
    with database.read() as conn:
        for chunk in _chunks(list(ids)):
            for m in conn.execute(select(m_t).where(m_t.c.id.in_(chunk))).mappings():
                records[m["id"]] = {
                    "m": dict(m),
                    "c": {},
                    "p": {},
                    "co": [],
                    "rates": [],
                    "findings": [],
                }
            cids = sorted({records[i]["m"]["compound_id"] for i in chunk if i in records})
            pids = sorted({records[i]["m"]["process_id"] for i in chunk if i in records} - {None})
            cols = [c for c in c_t.c if c.name not in ("mol_binary", "pattern_fp")]
            compounds = {
                r["id"]: dict(r)
                for r in conn.execute(select(*cols).where(c_t.c.id.in_(cids))).mappings()
            }
            processes = {
                r["id"]: dict(r)
                for r in conn.execute(select(p_t).where(p_t.c.id.in_(pids))).mappings()
            }
            for i in chunk:
                if i in records:
                    rec = records[i]
                    rec["c"] = compounds.get(rec["m"]["compound_id"], {})
                    rec["p"] = processes.get(rec["m"]["process_id"], {}) or {}
            for table, key in ((co_t, "co"), (r_t, "rates"), (f_t, "findings")):
                for r in conn.execute(
                    select(table).where(table.c.measurement_id.in_(chunk)).order_by(table.c.id)
                ).mappings():
                    records[r["measurement_id"]][key].append(dict(r))
    return [records[i] for i in ids if i in records]


def flat_row(rec: dict[str, Any]) -> dict[str, Any]:
    """One record as an export row (header → cell)."""
    co = rec["co"][0] if rec["co"] else {}
    parts = {"m": rec["m"], "c": rec["c"], "p": rec["p"], "co": co}
    row: dict[str, Any] = {}
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
        if column == "findings":
            value: Any = "; ".join(
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
            {k: r[k] for k in ("t_k", "t_err_k", "t_text", "k_per_s", "k_err_per_s", "k_text")}
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
        "reference": m["reference"],
        "status": m["status"],
        "entered_by": m["entered_by"],
        "entered_at": m["entered_at"].isoformat() if m.get("entered_at") else None,
    }


def _columns(rows: Sequence[dict[str, Any]]) -> list[str]:
    cols = [h for h, _, _ in REPORTED] + ["rates"]
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


def export_measurements(
    database: Database, output: str | Path, fmt: str | None = None, **filters: Any
) -> dict[str, Any]:
    """Write the measurements that ``filters`` (those of :func:`registry.api.list_measurements`) select."""
    from registry import api

    path = Path(output)
    fmt = (fmt or path.suffix.lstrip(".")).lower()
    if fmt not in FORMATS:
        raise UsageError(f"--format must be one of {', '.join(FORMATS)} (got {fmt!r})")
    if not path.parent.exists():
        raise UsageError(f"folder {path.parent} does not exist")
    ids = [r["id"] for r in api.list_measurements(database, **filters)]
    records = gather(database, ids)
    if fmt == "json":
        path.write_text(
            json.dumps([json_record(r) for r in records], ensure_ascii=False, indent=2, default=str)
            + "\n",
            encoding="utf-8",
        )
    else:
        rows = [flat_row(r) for r in records]
        columns = _columns(rows)
        if fmt == "csv":
            _write_csv(path, rows, columns)
        else:
            _write_xlsx(path, rows, columns)
    return {
        "file": str(path),
        "format": fmt,
        "measurements": len(records),
        "rate_points": sum(len(r["rates"]) for r in records),
        "findings": sum(len(r["findings"]) for r in records),
    }


def _write_csv(path: Path, rows: Sequence[dict[str, Any]], columns: list[str]) -> None:
    with path.open("w", newline="", encoding="utf-8") as fh:
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


def _write_xlsx(path: Path, rows: Sequence[dict[str, Any]], columns: list[str]) -> None:
    from openpyxl import Workbook

    book = Workbook(write_only=True)
    sheet = book.create_sheet("entries")
    sheet.append(columns)
    for row in rows:
        sheet.append([_safe(row.get(c)) for c in columns])
    book.save(path)


def _counts_by_severity(records: Sequence[dict[str, Any]]) -> dict[str, int]:
    out: dict[str, int] = defaultdict(int)
    for r in records:
        for f in r["findings"]:
            out[f["severity"]] += 1
    return dict(out)
