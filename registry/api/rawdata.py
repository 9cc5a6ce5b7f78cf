"""Raw data of 2D-exchange, transfer and time-course measurements: the library surface.

Entering them goes through :func:`registry.api.add_measurement` (fields ``mixing``,
``volumes``, ``ss_ratio``, ``t1``, ``course`` …; :mod:`registry.record.rawdata` reads them);
this module adds what the command line needs besides.
"""

from __future__ import annotations


def course_text(path: str, sheet: str | None = None) -> str:
    """A time-course file (CSV, .xlsx, .ods: a time column with its unit, then ee, a fraction
    or two intensities) as the one-cell text the registry stores in the field ``course``."""
    from registry.record.rawdata import course_text_of_file

    return course_text_of_file(path, sheet)
