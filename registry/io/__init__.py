"""Spreadsheets in and out: import group tables, export clean ones.

Map (data flows top to bottom on import; :mod:`.importer` runs the stages in order)::

    readers    .xlsx/.ods (pandas + calamine), .csv/.tsv (UTF-8, else cp1252 with a note);
               formulas and merged cells read from the workbook itself
    headers    header text → field + unit ("ΔG‡ (kcal/mol)", "T_c/K", "Δν (Hz)" …), from the
               fields table (registry.record.fields)
    mapping    a sheet's column plan; a TOML mapping file overrides the guess
    cells      cell → text; formula-injection guard (export) and its undoing (import)
    sheets     read stage: each sheet's header row and plan, handed to entries or rates
    entries    build stage: one EntryInput per row of an entries sheet
    rates      rates sheets, rate lists in one cell, rate points of stored measurements
    prepare    normalize stage: units and structures (parallel: a process pool for big files)
    conflicts  compound label/structure conflicts and duplicate rows, before the write
    upsert     match existing measurements; update them with before/after revisions
    commit     write stage: one transaction (batch row, new rows, updates, rate points)
    report     the import report, the rejected-rows file, the validation of new rows
    results    what one stage hands to the next
    importer   the orchestrator: read → check everything → one write transaction
    export     csv / xlsx / json with reported and normalized values, findings, references

The library surface is :func:`registry.api.import_table` and
:func:`registry.api.export_measurements`; importing this package loads nothing heavy.
"""
