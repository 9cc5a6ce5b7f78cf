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
    identity   the uid column an export writes: read back, checked, out of the extras
    conflicts  compound label/structure conflicts and rows claiming one measurement
    matching   which stored measurement a row is: uid, then label, then natural key
    fieldtexts what the file, the registry and a snapshot say, field by field
    lineage    a measurement's past: the file's last snapshot, the revision history per field
    merge      three-way merge per field: update, keep, conflict; reviewed; --prefer
    upsert     plan: match, merge, and the changes each merge leaves (reads only)
    changes    the stored columns a merged row leaves, and writing them with revisions
    snapshots  what each import's file said per measurement (import_snapshot)
    commit     write stage: one transaction (batch row, new rows, updates, snapshots, rates)
    report     the import report, the rejected-rows file, the validation of new rows
    results    what one stage hands to the next
    importer   the orchestrator: read → check everything → one write transaction
    export     csv / xlsx / json with reported and normalized values, findings, references

The library surface is :func:`registry.api.import_table` and
:func:`registry.api.export_measurements`; importing this package loads nothing heavy.
"""
