"""Tables for a paper's supporting information: one library call per ``fluxledger si-table``.

The paper table itself (values with lettered condition footnotes) is written by
:func:`registry.api.export_measurements` to a ``.tex`` or ``.md`` file.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from registry.storage.database import Database


def export_si_table(
    database: Database,
    out: str | Path,
    *,
    format: str | None = None,
    energy_unit: str = "kJ/mol",
    uncertainty: str = "paren",
    caption: str | None = None,
    include_flagged: bool = False,
    columns: Sequence[str] = (),
    **filters: Any,
) -> dict[str, Any]:
    """Write the measurements the filters select (the keywords of
    :func:`registry.api.list_measurements`) as a supporting-information table: for each, the
    ΔG‡, ΔH‡ and ΔS‡ as reported and normalised (in ``energy_unit``), the method and solvent
    (normalised: ``DMSO-D6`` and ``DMSO-d6`` are one solvent), the temperature of the ΔG‡ and
    the reference. ``format`` latex, markdown or xlsx (default: the suffix .tex, .md, .xlsx);
    the workbook has one column per quantity, its unit in the header, numbers as numbers.
    Flagged measurements are left out unless ``include_flagged`` (then marked). ``columns``
    adds the group's own columns kept with each measurement (operator, notebook page …).
    ``out`` is checked first and written whole or not at all. Returns what was written."""
    from registry.reports.table_file import export_si_table as write

    return write(
        database, out, format, energy_unit=energy_unit, uncertainty=uncertainty,
        caption=caption, include_flagged=include_flagged, columns=tuple(columns), **filters,
    )  # fmt: skip
