"""fluxledger: a shared registry of measured barriers of dynamic molecular processes.

Data flows spreadsheet → ``io`` → ``entry``/``units`` → ``writer``/``store`` → ``validation`` →
``search`` / ``reports``:

* ``units``       the one pint registry; reads values as chemists write them (canonical units)
* ``chem``        every use of RDKit (parsing, InChIKey, fingerprints), imported lazily
* ``vocab``       process kinds, methods, statuses, the solvent table's seed
* ``entry``       one measurement as reported (texts) → normalized (texts + canonical floats)
* ``models``      the tables (SQLAlchemy); ``migrations/`` (Alembic) creates them, ``migrate`` drives it
* ``store``       engines, WAL, write transactions with retries; ``writer`` inserts entries in bulk
* ``audit``       the append-only, hash-chained history of every change
* ``kinetics``    Eyring, coalescence formulas, Eyring/Arrhenius fits, planning (no database)
* ``lineshape``   exchange-broadened spectra: simulation, JCAMP-DX/CSV input, fits of k
* ``io``          spreadsheet import (header recognition, atomic batches) and export
* ``validation``  rules that recompute barriers from raw data and diagnose the likely slip
* ``search``      motif library, fingerprint screen + substructure confirmation
* ``reports``     plots, the static HTML registry view, tables for papers
* ``pg``          PostgreSQL specifics (RDKit cartridge screen, copying between databases)
* ``api``         one function per user action; ``cli`` parses, calls ``api`` and renders
"""
