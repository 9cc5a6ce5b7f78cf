"""The registry's vocabulary: stored aliases, solvents with their liquid range, how a text reads.

A group teaches the registry its own spellings once (``add_alias(db, "method", "VT-NMR (Tc)",
"coalescence")``) and everyone who opens the registry reads sheets and entries the same way;
each change is recorded in the history. Measurements a solvent alias or a new solvent links
are checked again at once (their liquid-range findings follow).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from registry.api.registry import actor_name
from registry.storage.database import Database


def read_term(database: Database, kind: str, text: str) -> dict[str, Any]:
    """How the registry reads ``text`` as a ``method``, ``process``, ``solvent`` or ``nucleus``:
    ``reads_as`` (None when it cannot), ``how`` (name, alias, spelling, words), and the
    ``candidates`` of an ambiguous text or ``suggestions`` for an unknown one."""
    from registry.admin import vocabulary

    return vocabulary.read_term(database, kind, text)


def list_aliases(database: Database, kind: str | None = None) -> list[dict[str, Any]]:
    """The aliases stored in the registry (of one kind), with who added them and when."""
    from registry.admin import vocabulary

    return vocabulary.list_aliases(database, kind)


def add_alias(
    database: Database,
    kind: str,
    alias: str,
    target: str,
    *,
    actor: str | None = None,
    reason: str | None = None,
    check: bool = True,
) -> dict[str, Any]:
    """Store that ``alias`` means ``target`` (a method, process kind, solvent or nucleus of the
    registry). Refused: an unknown kind or target, an alias stored already, a spelling that
    already means ``target`` or names another solvent or nucleus. A built-in reading of the
    spelling may be overridden (returned as ``overrides``). Measurements a solvent alias links
    are checked again unless ``check=False``."""
    from registry.admin import vocabulary

    done = vocabulary.add_alias(
        database, kind, alias, target, actor=actor_name(actor), reason=reason
    )
    _recheck(database, done["measurements_linked"], actor, check)
    return done


def remove_alias(
    database: Database,
    kind: str,
    alias: str,
    *,
    actor: str | None = None,
    reason: str | None = None,
    check: bool = True,
) -> dict[str, Any]:
    """Delete a stored alias (the history keeps it); measurements it linked are unlinked and
    checked again unless ``check=False``."""
    from registry.admin import vocabulary

    done = vocabulary.remove_alias(database, kind, alias, actor=actor_name(actor), reason=reason)
    _recheck(database, done["measurements_unlinked"], actor, check)
    return done


def add_solvent(
    database: Database,
    name: str,
    *,
    mp: str | float,
    bp: str | float,
    source: str,
    formula: str = "",
    deuterated: bool | None = None,
    spellings: Sequence[str] = (),
    actor: str | None = None,
    reason: str | None = None,
    check: bool = True,
) -> dict[str, Any]:
    """Add a solvent with its melting and boiling points at 1 atm (``"-30.4 °C"``, or floats in
    K) and their ``source``; ``spellings`` are other names it goes by. Measurements whose
    solvent text it names are linked and checked again unless ``check=False``."""
    from registry.admin import vocabulary

    done = vocabulary.add_solvent(
        database, name, mp=mp, bp=bp, source=source, formula=formula, deuterated=deuterated,
        spellings=spellings, actor=actor_name(actor), reason=reason,
    )  # fmt: skip
    _recheck(database, done["measurements_linked"], actor, check)
    return done


def list_solvents(database: Database) -> list[dict[str, Any]]:
    """The solvent table with each liquid range, its source and every spelling."""
    from registry.admin import vocabulary

    return vocabulary.list_solvents(database)


def unlinked_solvents(database: Database) -> list[dict[str, Any]]:
    """Solvent texts of live measurements that name no solvent of the registry (no liquid range,
    no solvent class): the text, how many measurements use it, near spellings."""
    from registry.admin import vocabulary

    return vocabulary.unlinked_solvents(database)


def _recheck(database: Database, ids: Sequence[int], actor: str | None, check: bool) -> None:
    if check and ids:
        from registry.validation import check_measurements

        check_measurements(database, list(ids), actor=actor_name(actor))
