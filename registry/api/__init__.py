"""The library: one function per user action; the CLI and notebooks call the same functions.

Every action on a registry takes the handle :func:`open_registry` returns (a
:class:`~registry.storage.database.Database`) and returns data — dicts, lists of dicts, frozen
records, DataFrames on request — never printed text. Write actions run in one transaction each
(all or nothing). Importing this package is cheap: each function loads what it needs (units,
RDKit, pandas, matplotlib) when it is called.

Grouped by what they act on:

* ``registry``  — :func:`init_registry`, :func:`open_registry`, :func:`registry_info`
* ``records``   — :func:`add_measurement`, :func:`deferred_checks`, :func:`get_measurement`,
  :func:`list_measurements`, :func:`edit_measurement`, :func:`retract_measurement`,
  :func:`add_rate_points`, :func:`history`
* ``checks``    — :func:`check`, :func:`accept_finding`
* ``admin``     — :func:`backup`, :func:`restore`, :func:`verify`, :func:`schema_state`,
  :func:`upgrade_schema`
* ``values``    — :func:`read_value`, :func:`convert`, :func:`canonical_unit`
* ``lineshape`` — :func:`simulate_lineshape`, :func:`fit_lineshapes`, :func:`value_with_error_text`
* ``figures``   — :func:`plot_eyring`, :func:`plot_coalescence`, :func:`plot_overview`,
  :func:`build_report`; ``paper_tables`` — :func:`export_si_table`
* ``calc``      — :func:`calc_coalescence`, :func:`calc_eyring`, :func:`calc_rate`,
  :func:`calc_halflife`, :func:`calc_plan`, :func:`calc_exsy`, :func:`calc_transfer`,
  :func:`calc_timecourse` (kinetics at the bench, no database)
* ``files``     — :func:`import_table`, :func:`export_measurements` (csv, xlsx, ods, SD files)
* ``structures`` — :func:`smiles_from_molfile` (a Molfile read into the SMILES ``add`` takes)
* ``comparison`` — :func:`compare_computed` (computed barriers against measured ones)
* ``estimate``  — :func:`estimate_barrier` (a barrier from the nearest measured compounds, and a plan)
* ``search``    — :func:`find`, :func:`motif_matches`, :func:`list_motifs`, :func:`get_motif`,
  :func:`add_motif`, :func:`add_motifs_from_file`, :func:`remove_motif`, :func:`motif_database`
* ``server``    — :func:`migrate_to`, :func:`server_search_status`, :func:`enable_server_search`
* ``vocabulary`` — :func:`read_term`, :func:`list_aliases`, :func:`add_alias`,
  :func:`remove_alias`, :func:`add_solvent`, :func:`list_solvents`, :func:`unlinked_solvents`
"""

from __future__ import annotations

from registry.api.admin import (
    backup,
    history_anchor,
    restore,
    schema_state,
    upgrade_schema,
    verify,
)
from registry.api.calc import (
    calc_coalescence,
    calc_exsy,
    calc_eyring,
    calc_halflife,
    calc_plan,
    calc_rate,
    calc_timecourse,
    calc_transfer,
)
from registry.api.checks import accept_finding, check
from registry.api.comparison import Comparison, compare_computed
from registry.api.estimate import BarrierEstimate, estimate_barrier
from registry.api.figures import build_report, plot_coalescence, plot_eyring, plot_overview
from registry.api.files import export_measurements, import_table
from registry.api.lineshape import fit_lineshapes, simulate_lineshape, value_with_error_text
from registry.api.paper_tables import export_si_table
from registry.api.records import (
    add_measurement,
    add_rate_points,
    deferred_checks,
    edit_measurement,
    get_measurement,
    history,
    list_measurements,
    retract_measurement,
    summarize_change,
)
from registry.api.registry import actor_name, init_registry, open_registry, registry_info
from registry.api.search import (
    add_motif,
    add_motifs_from_file,
    find,
    get_motif,
    list_motifs,
    motif_database,
    motif_matches,
    remove_motif,
)
from registry.api.server import enable_server_search, migrate_to, server_search_status
from registry.api.structures import smiles_from_molfile
from registry.api.values import canonical_unit, convert, read_value, spreadsheet_safe
from registry.api.vocabulary import (
    add_alias,
    add_solvent,
    list_aliases,
    list_solvents,
    read_term,
    remove_alias,
    unlinked_solvents,
)
from registry.record.fields import TABLE_COLUMNS
from registry.record.ids import as_id
from registry.storage.database import Database, take_warnings

__all__ = [
    "TABLE_COLUMNS",
    "BarrierEstimate",
    "Comparison",
    "Database",
    "accept_finding",
    "actor_name",
    "add_alias",
    "add_measurement",
    "add_motif",
    "add_motifs_from_file",
    "add_rate_points",
    "add_solvent",
    "as_id",
    "backup",
    "build_report",
    "calc_coalescence",
    "calc_exsy",
    "calc_eyring",
    "calc_halflife",
    "calc_plan",
    "calc_rate",
    "calc_timecourse",
    "calc_transfer",
    "canonical_unit",
    "check",
    "compare_computed",
    "convert",
    "deferred_checks",
    "edit_measurement",
    "enable_server_search",
    "estimate_barrier",
    "export_measurements",
    "export_si_table",
    "find",
    "fit_lineshapes",
    "get_measurement",
    "get_motif",
    "history",
    "history_anchor",
    "import_table",
    "init_registry",
    "list_aliases",
    "list_measurements",
    "list_motifs",
    "list_solvents",
    "migrate_to",
    "motif_database",
    "motif_matches",
    "open_registry",
    "plot_coalescence",
    "plot_eyring",
    "plot_overview",
    "read_term",
    "read_value",
    "registry_info",
    "remove_alias",
    "remove_motif",
    "restore",
    "retract_measurement",
    "schema_state",
    "server_search_status",
    "simulate_lineshape",
    "smiles_from_molfile",
    "spreadsheet_safe",
    "summarize_change",
    "take_warnings",
    "unlinked_solvents",
    "upgrade_schema",
    "value_with_error_text",
    "verify",
]
