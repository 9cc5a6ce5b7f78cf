"""``import`` and ``export``: spreadsheets in and out (:func:`registry.api.import_table`,
:func:`registry.api.export_measurements`)."""

from __future__ import annotations

import sys
from typing import Any

import typer

from registry.cli import flags
from registry.cli.context import state
from registry.cli.output import print_json, table_text

#: imports of fewer rows (and structures) than this show no progress bar
PROGRESS_MIN_ROWS = 5000


def register(app: typer.Typer) -> None:
    app.command(
        "import",
        help=(
            "Import a spreadsheet (.xlsx, .ods, .csv, .tsv) of measurements and/or rate points.\n\n"
            "Headers are recognised in their usual spellings with units in the header "
            "('ΔG‡ (kcal/mol)', 'Tc (°C)', 'Δν (Hz)'); a unit written in a cell wins. Unknown "
            "columns are kept as extra attributes. The whole file is one transaction: all rows or "
            "none (with --skip-bad the rejected rows go to a side CSV). Importing the same file "
            "again adds nothing; a corrected file updates the matching measurements (by uid, "
            "then label, then compound, process, solvent, method and reference).\n\n"
            "A re-import never silently undoes work done in the registry: a value changed there "
            "since the file was last imported is kept (and the summary says so); a value changed "
            "in both is a conflict, and nothing is written for that measurement unless --prefer "
            "decides. A reviewed measurement changes only with --prefer file. Columns the file "
            "does not have change nothing; empty cells change nothing without --empty-clears.\n\n"
            "Exit status: 0 when the import succeeded (also when validation findings were "
            "reported — they are listed in the summary), 1 when the data has problems (nothing "
            "written) or conflicts held measurements back (the rest was written), 2 for usage "
            "errors."
        ),
    )(import_cmd)
    app.command(
        "export",
        help=(
            "Export measurements (filters as for 'list') as csv, xlsx or json: each one's uid "
            "(first column; importing the file again matches on it), reported texts, normalized "
            "values, findings, 'flagged' (an open error finding) and references. Text cells that "
            "a spreadsheet would evaluate get a leading apostrophe; the importer removes it "
            "again.\n\n"
            "latex (.tex) or markdown (.md) writes a table for a paper instead: ΔG‡ (ΔH‡, ΔS‡) in "
            "--energy-unit with uncertainties as 62.3(4) or 62.3 ± 0.4 (--uncertainty), lettered "
            "notes for methods and solvents, numbered references."
        ),
    )(export_cmd)


def import_cmd(
    ctx: typer.Context,
    file: str = typer.Argument(..., help="The spreadsheet: .xlsx, .ods, .csv or .tsv."),
    sheet: str = typer.Option(None, "--sheet", help="Import only this sheet of a workbook."),
    map_file: str = typer.Option(
        None, "--map", help="Mapping file (TOML): columns, units, defaults, sheets."
    ),
    dry_run: bool = typer.Option(
        False,
        "--dry-run",
        help=(
            "Show the inferred mapping, the first rows as stored, what would change field by "
            "field (updates, kept values, conflicts) and the problems; write nothing."
        ),
    ),
    skip_bad: bool = typer.Option(
        False,
        "--skip-bad",
        help="Import the good rows; write the rejected ones (row, column, reason) to a side CSV.",
    ),
    rejects: str = typer.Option(
        None, "--rejects", help="Where --skip-bad writes rejected rows (default FILE.rejected.csv)."
    ),
    prefer: str = typer.Option(
        None,
        "--prefer",
        help=(
            "Decide conflicts (a field changed in the file and in the registry since the last "
            "import; any change to a reviewed measurement): 'file' or 'registry'. Without it "
            "nothing is written for such a measurement."
        ),
    ),
    empty_clears: bool = typer.Option(
        False,
        "--empty-clears",
        help="An empty cell clears the value (without it, an empty cell changes nothing).",
    ),
    as_json: bool = typer.Option(False, "--json", help="Print the summary as JSON."),
) -> None:
    from registry import api

    st = state(ctx)
    database = api.open_registry(st.db)
    bar = None if as_json else ProgressBar()
    try:
        summary = api.import_table(
            database,
            file,
            sheet=sheet,
            mapping=map_file,
            dry_run=dry_run,
            skip_bad=skip_bad,
            rejects=rejects,
            actor=st.actor,
            progress=bar,
            prefer=prefer,
            empty_clears=empty_clears,
        )
    finally:
        if bar is not None:
            bar.close()
    if as_json:
        print_json(summary)
    else:
        typer.echo(render_summary(summary))
    if summary.get("rejects_error"):  # the import was written; its side file was not
        typer.echo(f"error: {summary['rejects_error']}", err=True)
    if (dry_run and summary["problems"] and not skip_bad) or summary["held"]:
        raise typer.Exit(1)
    if summary.get("rejects_error"):
        raise typer.Exit(1)


class ProgressBar:
    """A progress bar on stderr for big imports, on a terminal only (never with --json)."""

    def __init__(self, stream: Any = None) -> None:
        self.stream = stream or sys.stderr
        self.bar: Any = None
        self.stage: str | None = None

    def __call__(self, stage: str, done: int, total: int) -> None:
        if total < PROGRESS_MIN_ROWS or not self.stream.isatty():
            return
        if self.bar is None:
            from tqdm import tqdm

            self.bar = tqdm(total=total, unit="row", file=self.stream, leave=False)
        if stage != self.stage:
            self.stage = stage
            self.bar.set_description(stage)
            self.bar.refresh()
        self.bar.update(done)

    def close(self) -> None:
        if self.bar is not None:
            self.bar.close()
            self.bar = None


def render_summary(s: dict[str, Any]) -> str:
    """The import report as text (the --json form carries the same data)."""
    if s["dry_run"]:
        lines = [*_dry_run_lines(s), *merge_lines(s)]
    else:  # what the import did to the registry first, then the findings on it
        head, *rest = _written_lines(s)
        lines = [head, *merge_lines(s), *rest]
    lines.extend(f"note: {note}" for note in s["notes"])
    if s["problems"]:
        lines.append(f"{len(s['problems'])} problem(s):")
        for p in s["problems"][:50]:
            where = ", ".join(
                x
                for x in (
                    f"sheet {p['sheet']!r}" if p["sheet"] else "",
                    f"row {p['row']}" if p["row"] is not None else "",
                    f"column {p['column']!r}" if p["column"] else "",
                )
                if x
            )
            text = f" {p['text']!r}:" if p["text"] else ""
            lines.append(f"  {where}:{text} {p['reason']}")
        if len(s["problems"]) > 50:
            lines.append(f"  … and {len(s['problems']) - 50} more")
    return "\n".join(lines)


_PREVIEW_COLUMNS = [
    "compound", "method", "solvent", "dg_kj_mol", "dg_text", "tc_k", "dnu_hz", "field_mhz",
    "rate_points", "inchikey",
]  # fmt: skip


def _dry_run_lines(s: dict[str, Any]) -> list[str]:
    lines = [f"dry run of {s['file']} — nothing written"]
    for sheet, rows in s["mapping"].items():
        lines.append(f"\nsheet {sheet} ({s['sheet_kinds'][sheet]}): columns")
        lines.append(
            _indent(table_text(rows, ["column", "header", "field", "unit", "role", "from"]))
        )
    if s.get("preview"):
        lines.append("\nfirst rows as they would be stored")
        lines.append(_indent(table_text(s["preview"], _PREVIEW_COLUMNS)))
    held = f", hold back {s['would_hold']} (conflicts)" if s["would_hold"] else ""
    lines.append(
        f"\nwould add {s['would_add']}, update {s['would_update']}, leave "
        f"{s['unchanged']} unchanged{held}; {s['would_reject']} row(s) with problems"
    )
    return lines


#: merge lines the text summary shows (--json has them all)
MERGE_LINES = 200


def merge_lines(s: dict[str, Any]) -> list[str]:
    """The three-way merge, one line per field: updates, kept values, conflicts."""
    lines = [f"update {u['measurement_id']}: {u['field']} {_t(u['registry'])} → {_t(u['file'])}"
             + (" (your choice: --prefer file)" if u["resolved"] == "file" else "")
             for u in s["updates"]]  # fmt: skip
    lines += [f"update {u['measurement_id']}: {u['field']} {_t(u['registry'])} → {_t(u['file'])}"
              " (held back with the conflict below)" for u in s["pending"]]  # fmt: skip
    for k in s["kept"]:
        if k["resolved"] == "registry":
            continue  # listed with the conflicts
        lines.append(
            f"kept {k['measurement_id']}: {k['field']} {_t(k['registry'])}{_setter(k)}; "
            f"the file says {_t(k['file'])}: {k['why']}"
        )
    for c in s["conflicts"]:
        outcome = {
            "file": "decided for the file (--prefer file)",
            "registry": "decided for the registry (--prefer registry)",
        }.get(c["resolved"] or "", "nothing written for this measurement")
        lines.append(
            f"conflict {c['measurement_id']}: {c['field']}: file {_t(c['file'])}, registry "
            f"{_t(c['registry'])}{_setter(c)}"
            + (f", at the last import {_t(c['last_import'])}" if c["last_import"] else "")
            + f" — {c['why']}; {outcome}"
        )
    if len(lines) > MERGE_LINES:
        more = len(lines) - MERGE_LINES
        lines = [*lines[:MERGE_LINES], f"… and {more} more (--json lists all)"]
    if s["held"]:
        ids = ", ".join(map(str, s["held"][:20])) + (" …" if len(s["held"]) > 20 else "")
        lines.append(
            f"{len(s['held'])} measurement(s) held back by conflicts ({ids}): nothing written for "
            "them; choose with --prefer file or --prefer registry"
        )
    return lines


def _t(text: str | None) -> str:
    return "(empty)" if text is None else text


def _setter(item: dict[str, Any]) -> str:
    if not item["changed_by"]:
        return ""
    when = (item["changed_at"] or "").replace("T", " ")[:16]
    return f" ({item['change']} by {item['changed_by']}, {when})"


def _written_lines(s: dict[str, Any]) -> list[str]:
    lines = [
        f"imported {s['file']} (batch {s['batch_id']}): {s['added']} added, "
        f"{s['updated']} updated, {s['unchanged']} unchanged, {s['rejected']} rejected"
        + (f", {len(s['held'])} held back" if s["held"] else "")
    ]
    v = s.get("validation") or {}
    if v.get("available"):
        counts = v.get("findings") or {}
        text = ", ".join(f"{n} {sev}" for sev, n in sorted(counts.items()) if n) or "none"
        lines.append(f"validation findings on the new/changed rows: {text}")
        for f in v.get("list", [])[:20]:
            message = f["message"] if len(f["message"]) <= 160 else f["message"][:157] + "…"
            lines.append(
                f"  measurement {f['measurement_id']}: {f['severity']} [{f['rule_id']}] {message}"
            )
        if len(v.get("list", [])) > 20:
            lines.append(f"  … and {len(v['list']) - 20} more ('fluxledger check' lists all)")
    else:
        lines.append("validation: not available in this installation (rules not installed)")
    if s.get("rejects_file"):
        lines.append(f"rejected rows written to {s['rejects_file']}")
    return lines


def _indent(text: str) -> str:
    return "\n".join("  " + line for line in text.splitlines())


def export_cmd(
    ctx: typer.Context,
    output: str = typer.Option(..., "-o", "--output", help="File to write."),
    fmt: str = typer.Option(
        None,
        "--format",
        help="csv, xlsx, json, sdf, latex or markdown (default: from the file name; .tex, .md).",
    ),
    compound: str = typer.Option(None, help="Compound label or name contains this text."),
    method: str = typer.Option(None, help="Only this method."),
    solvent: str = typer.Option(None, help="Solvent contains this text."),
    process: str = typer.Option(None, help="Only this process kind."),
    status: str = typer.Option(None, help="Only this status."),
    barrier_min: str = typer.Option(None, "--barrier-min", help="Lowest ΔG‡, any unit."),
    barrier_max: str = typer.Option(None, "--barrier-max", help="Highest ΔG‡, any unit."),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Export retracted measurements too."
    ),
    flagged: bool = flags.FLAGGED,
    clean: bool = flags.CLEAN,
    include_flagged: bool = flags.include_option("a latex/markdown table, footnoted"),
    energy_unit: str = typer.Option(
        "kJ/mol", "--energy-unit", help="latex/markdown: kJ/mol or kcal/mol."
    ),
    uncertainty: str = typer.Option(
        "paren", "--uncertainty", help="latex/markdown: 'paren' 62.3(4) or 'pm' 62.3 ± 0.4."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print the summary as JSON."),
) -> None:
    from registry import api

    database = api.open_registry(state(ctx).db)
    result = api.export_measurements(
        database,
        output,
        format=fmt,
        compound=compound,
        method=method,
        solvent=solvent,
        process=process,
        status=status,
        barrier_min=barrier_min,
        barrier_max=barrier_max,
        include_retracted=include_retracted,
        flagged=flags.choice(flagged, clean),
        include_flagged=include_flagged,
        energy_unit=energy_unit,
        uncertainty=uncertainty,
    )
    if as_json:
        print_json(result)
    elif "energy_unit" in result:  # a table for a paper
        typer.echo(
            f"exported {result['measurements']} measurement(s) to {result['file']} as a "
            f"{result['format']} table ({result['energy_unit']})"
        )
        if result["flagged_left_out"]:
            typer.echo(
                f"note: {result['flagged_left_out']} flagged measurement(s) left out (an error "
                "finding is open); --include-flagged adds them with a footnote"
            )
    else:
        typer.echo(
            f"exported {result['measurements']} measurement(s), {result['rate_points']} rate "
            f"point(s), {result['findings']} finding(s) to {result['file']} ({result['format']})"
        )
    for note in [] if as_json else result.get("notes", []):
        typer.echo(f"note: {note}")
