"""The record model: what one measurement is, before any database.

``fields`` (the table of fields), ``units`` (the one pint registry), ``vocab`` (process kinds,
methods, statuses, solvents, and a registry's own words), ``spelling`` (how a text is read into
them), ``chem`` (every RDKit call), ``nuclei`` (observe frequencies) and ``entry`` (an entry as
reported → normalized).
"""
