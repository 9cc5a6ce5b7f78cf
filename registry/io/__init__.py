"""Spreadsheets in and out: import group tables, export clean ones.

Map (data flows top to bottom on import)::

    readers    .xlsx/.ods (pandas + calamine), .csv/.tsv (UTF-8, else cp1252 with a note);
               formulas and merged cells read from the workbook itself
    headers    header text → field + unit ("ΔG‡ (kcal/mol)", "T_c/K", "Δν (Hz)" …)
    mapping    a sheet's column plan; a TOML mapping file overrides the guess
    cells      cell → text; formula-injection guard (export) and its undoing (import)
    parallel   normalize entries and parse distinct SMILES in a process pool
    upsert     match existing measurements; update them with before/after revisions
    importer   the whole import: read → check everything → one write transaction
    export     csv / xlsx / json with reported and normalized values, findings, references

Public entry points: :func:`import_table` and :func:`export_measurements`.
"""

from registry.io.export import export_measurements
from registry.io.importer import import_table

__all__ = ["export_measurements", "import_table"]
