"""fluxledger: a shared registry of measured barriers of dynamic molecular processes.

Data flows spreadsheet → ``io`` → ``record`` → ``storage`` → ``validation`` → ``search`` /
``reports``, and every user action enters through ``api``:

* ``api``         the library: one function per user action; the CLI and notebooks call it
* ``cli``         typer commands that parse options, call ``api`` and render (tables, --json)
* ``record``      the record model: ``fields`` (the table of fields), ``units`` (the one pint
                  registry), ``vocab`` and ``spelling`` (names and how texts read as them),
                  ``chem`` (every RDKit call), ``nuclei``, ``entry`` (one measurement as
                  reported → normalized)
* ``storage``     the one data layer: ``database`` (open, read snapshots, write transactions),
                  ``connection`` (SQL text on SQLite or PostgreSQL), ``writer``, ``audit`` (the
                  hash-chained history), ``changes`` (counters for caches), ``models`` and
                  ``migrate`` (Alembic)
* ``admin``       edits and retractions, the history's summaries, verify, backup, upgrade,
                  a group's stored aliases and solvents
* ``io``          spreadsheet import (header recognition, atomic batches) and export
* ``validation``  rules that recompute barriers from raw data and diagnose the likely slip
* ``kinetics``    Eyring, coalescence formulas, Eyring/Arrhenius fits, planning (no database)
* ``lineshape``   exchange-broadened spectra: simulation, JCAMP-DX/CSV input, fits of k
* ``search``      motif library, fingerprint screen + substructure confirmation
* ``reports``     plots, the static HTML registry view, tables for papers
* ``pg``          PostgreSQL specifics (RDKit cartridge screen, copying between databases)

Lower packages never import ``api`` or ``cli``; ``cli`` imports only ``api`` and ``errors``.
"""
