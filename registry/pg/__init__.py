"""PostgreSQL support: the same registry on a server, shared by several groups.

- :mod:`registry.pg.cartridge` — the optional RDKit cartridge: a ``mol`` column on ``compound``
  (filled by a trigger from ``smiles_canonical``) with a GiST index, and :func:`server_screen`,
  which sends a SMARTS to the server and returns candidate compound ids for the client's RDKit to
  confirm (``None`` when the server has no cartridge, so callers fall back to the client screen).
- :mod:`registry.pg.copy` — ``migrate-to``: copy a whole registry between SQLite and PostgreSQL
  (either way), preserving ids, then check row counts and the revision hash chain.

Nothing here is needed on SQLite; everything degrades to the client-side path when absent.
"""
