"""Rate points: a rates sheet's rows, rate lists in one cell, and rates for stored measurements.

A workbook may hold a rates sheet (``label, T, k, σ_k``): each row is one rate constant at one
temperature for the measurement with that label — an entry of the same file, or one already in
the registry. An export writes a measurement's rate points into one cell (``k @ T; k @ T``),
which :func:`registry.io.cells.parse_rate_list` reads back.
"""

from __future__ import annotations

from collections import defaultdict
from typing import Any

from registry.errors import RowProblem, UnitError
from registry.io import upsert
from registry.io.cells import cell_text, combine_error, is_formula_text, with_unit
from registry.io.entries import take_convention
from registry.io.mapping import Column, SheetPlan
from registry.io.readers import RawSheet
from registry.io.results import RateRow, ReadResult
from registry.record import fields
from registry.record.units import parse_value
from registry.storage import audit
from registry.storage.connection import Connection
from registry.storage.writer import carry_fit_records, history_rates

# ---------------------------------------------------------------- reading a rates sheet


def read_rates(result: ReadResult, rs: RawSheet, plan: SheetPlan, head: int) -> None:
    """Add the sheet's rate rows (or their problems) to ``result``."""
    rows = rs.frame.iloc[head + 1 :].to_numpy(dtype=object, na_value=None).tolist()
    for offset, cells in enumerate(rows):
        texts = [cell_text(v) for v in cells]
        if not any(texts):
            continue
        row0 = head + 1 + offset
        problems: list[RowProblem] = []
        rate = _rate_row(result.file, rs, plan, row0, cells, texts, problems)
        if rate is None:
            result.problems.extend(problems)
            result.bad_rate_rows.add((rs.name, row0 + 1))
        else:
            result.rate_rows.append(rate)


def _rate_row(
    file: str,
    rs: RawSheet,
    plan: SheetPlan,
    row0: int,
    cells: list[Any],
    texts: list[str | None],
    problems: list[RowProblem],
) -> RateRow | None:
    """One rate row read and parsed, or None with its problems added to ``problems``."""
    values = plan.value_columns()
    errors = plan.error_columns()
    label_col, t_col, k_col = values["label"], values["t"], values["k"]
    row_no = row0 + 1
    for col in (label_col, t_col, k_col, *errors.values()):
        raw = cells[col.index] if col.index < len(cells) else None
        formula = rs.formulas.get((row0, col.index))
        if formula or (isinstance(raw, str) and is_formula_text(raw.strip())):
            reason = "the cell holds a formula; paste the value instead"
            problems.append(
                RowProblem(file, rs.name, row_no, col.header, formula or str(raw), reason)
            )
    label = texts[label_col.index]
    if not label:
        reason = "a rate point needs the label of its measurement"
        problems.append(RowProblem(file, rs.name, row_no, label_col.header, None, reason))
    parsed: dict[str, Any] = {}
    for col, name in ((t_col, "t"), (k_col, "k")):
        text = _rate_value(file, rs.name, row_no, col, name, texts, errors, parsed, problems)
        if text is not None:
            parsed[f"{name}_full"] = text
    if problems:
        return None
    return RateRow(
        rs.name,
        row_no,
        label or "",
        parsed.pop("t_full"),
        parsed.pop("k_full"),
        parsed,
        {c.header: texts[c.index] for c in plan.columns if c.index < len(texts)},
        k_col.convention,
        k_col.header,
    )


def _rate_value(
    file: str,
    sheet: str | None,
    row_no: int,
    col: Column,
    name: str,
    texts: list[str | None],
    errors: dict[str, Column],
    parsed: dict[str, Any],
    problems: list[RowProblem],
) -> str | None:
    """Read T or k of a rate row into ``parsed`` (rate_point columns); the full text, or None."""
    text = texts[col.index]
    if not text:
        problems.append(RowProblem(file, sheet, row_no, col.header, None, "empty value"))
        return None
    field = fields.BY_NAME[name]
    err_col = errors.get(name)
    full = with_unit(combine_error(text, texts[err_col.index] if err_col else None), col.unit)
    try:
        pv = parse_value(full, field.quantity or "", field=col.header, default_unit=col.unit)
        if name == "k" and pv.value <= 0:
            raise UnitError(col.header, text, "a rate constant must be positive")
    except UnitError as exc:
        problems.append(RowProblem(file, sheet, row_no, col.header, text, exc.reason))
        return None
    parsed[field.value_column or ""] = pv.value
    parsed[field.error_column or ""] = pv.error
    parsed[field.text_column or ""] = pv.text
    return full


def attach_rates(result: ReadResult) -> None:
    """Give rate-sheet rows to the entries of this file that carry their label."""
    by_label: dict[str, list[int]] = defaultdict(list)
    for i, inp in enumerate(result.inputs):
        if inp.label:
            by_label[str(inp.label)].append(i)
    remaining = []
    for rr in result.rate_rows:
        idx = by_label.get(rr.label, [])
        if len(idx) > 1:
            reason = f"{len(idx)} entries carry this label; rate points need a unique label"
            result.problems.append(
                RowProblem(result.file, rr.sheet, rr.row, "label", rr.label, reason)
            )
            result.bad_rate_rows.add((rr.sheet, rr.row))
        elif idx:
            entry = result.inputs[idx[0]]
            problem = take_convention(entry, rr.convention, rr.k_header)
            if problem:
                result.problems.append(
                    RowProblem(result.file, rr.sheet, rr.row, rr.k_header, rr.convention, problem)
                )
                result.bad_rate_rows.add((rr.sheet, rr.row))
                continue
            entry.rates.append((rr.t_text, rr.k_text))
            result.sources[idx[0]].rates.append((rr.sheet, rr.row))
        else:
            remaining.append(rr)
    result.rate_rows = remaining  # rate points for measurements already in the registry


# ---------------------------------------------------------------- rates for stored measurements


def plan_rate_rows(
    conn: Connection, read: ReadResult
) -> tuple[dict[int, list[dict[str, Any]]], list[RowProblem]]:
    """Rate rows whose label names a measurement already in the registry → {id: points}."""
    ids: dict[str, list[int]] = defaultdict(list)
    stated: dict[int, str | None] = {}
    for mid, label, convention in sorted(
        conn.rows_where_in(
            "SELECT id, label, k_convention FROM measurement WHERE 1 = 1",
            "label",
            {rr.label for rr in read.rate_rows},
        )
    ):
        ids[label].append(mid)
        stated[mid] = convention
    problems: list[RowProblem] = []
    plan: dict[int, list[dict[str, Any]]] = defaultdict(list)
    for rr in read.rate_rows:
        found = ids.get(rr.label, [])
        if len(found) != 1:
            reason = (
                f"no measurement labelled {rr.label!r} in this file or the registry"
                if not found
                else f"{len(found)} measurements in the registry carry this label"
            )
            problems.append(RowProblem(read.file, rr.sheet, rr.row, "label", rr.label, reason))
            continue
        if rr.convention is not None and stated[found[0]] != rr.convention:
            now = stated[found[0]] or "no convention (unspecified)"
            reason = (
                f"the column holds {rr.convention} rate constants, but measurement {found[0]} "
                f"records {now}; record its convention first (edit measurement {found[0]}: "
                f"convention={rr.convention}) or fix the header"
            )
            problems.append(
                RowProblem(read.file, rr.sheet, rr.row, rr.k_header, rr.convention, reason)
            )
            continue
        plan[found[0]].append(rr.parsed)
    return dict(plan), problems


def apply_rate_plan(
    conn: Connection, plan: dict[int, list[dict[str, Any]]], actor: str, batch_id: int
) -> int:
    """Replace rate points of existing measurements where the file's set differs; count them."""
    if not plan:
        return 0
    stored = upsert.stored_rates(conn, list(plan))
    changed = []
    for mid, points in plan.items():
        if upsert.same_rates(stored.get(mid, []), points):
            continue
        points = carry_fit_records(stored.get(mid, []), points)
        upsert.replace_rate_points(conn, mid, points)
        changed.append(
            {
                "entity": "measurement",
                "entity_id": mid,
                "action": "import-rates",
                "before": {"rates": history_rates(stored.get(mid, []))},
                "after": {"rates": history_rates(points)},
                "batch_id": batch_id,
            }
        )
    if changed:
        audit.record_many(conn, changed, actor)
    return len(changed)
