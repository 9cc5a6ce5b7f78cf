"""Filters on the measurements a search returns: barrier and temperature ranges in any unit,
solvent (by name, alias or class), method, process kind, nucleus, status, reference, and
flagged or clean (an open error finding, :data:`registry.record.fields.OPEN_ERROR_SQL`, or none).

Ranges are written as chemists write them: ``">= 22 kcal/mol"``, ``"< 90 kJ/mol"``,
``"80-100 kJ/mol"``, ``"80 to 100 kJ/mol"``, ``"-40 to -10 °C"``, ``"95 ± 5 kJ/mol"``. Every bound is
read by :func:`registry.record.units.parse_value`, so the units are the registry's (kcal is the
thermochemical calorie). Filters become SQL conditions (plain text with named parameters) on
the joined measurement query.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

from registry.errors import UnitError, UsageError
from registry.storage.connection import Connection

_NUM = r"[-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?"
_COMPARE = re.compile(r"^\s*(>=|<=|=>|=<|≥|≤|>|<)\s*(.+?)\s*$")
_BETWEEN = re.compile(
    rf"^\s*(?P<lo>{_NUM})\s*(?P<lo_unit>(?!to\b)[^\d\s±+-][^±]*?)??\s*"
    rf"(?:-|–|—|\.\.|to)\s*(?P<hi>{_NUM})\s*(?P<unit>.*?)\s*$"
)
_MINUS = str.maketrans({"−": "-", "–": "-", "—": "-"})
_PLUSMINUS = re.compile(r"±|\+/-|\+-")

#: Solvent classes by static dielectric constant near 20–25 °C (CRC Handbook of Chemistry and
#: Physics, "Permittivity (dielectric constant) of liquids"; from memory): non-polar ε < 4.5,
#: chlorinated as the name says, polar aprotic ε > 15 without O–H/N–H, protic with O–H.
SOLVENT_CLASSES: dict[str, tuple[str, ...]] = {
    "nonpolar": (
        "toluene-d8",  # ε 2.4
        "benzene-d6",  # ε 2.3
        "carbon disulfide",  # ε 2.6
        "1,4-dioxane-d8",  # ε 2.2
        "diethyl ether-d10",  # ε 4.3
    ),
    "chlorinated": (
        "chloroform-d",
        "dichloromethane-d2",
        "1,1,2,2-tetrachloroethane-d2",
        "1,2-dichlorobenzene-d4",
        "chlorobenzene-d5",
    ),
    "polar-aprotic": (
        "dimethyl sulfoxide-d6",  # ε 47
        "acetone-d6",  # ε 21
        "acetonitrile-d3",  # ε 36
        "N,N-dimethylformamide-d7",  # ε 38
        "nitrobenzene-d5",  # ε 35
    ),
    "protic": ("methanol-d4", "deuterium oxide", "water"),
}
_CLASS_ALIASES = {"nonpolar": "nonpolar", "apolar": "nonpolar", "chlorinated": "chlorinated"}
_CLASS_ALIASES |= {"polaraprotic": "polar-aprotic", "aprotic": "polar-aprotic"}
_CLASS_ALIASES |= {"protic": "protic", "polarprotic": "protic"}


@dataclass(frozen=True)
class Range:
    """An interval in the canonical unit; ``None`` bounds are open."""

    lo: float | None
    hi: float | None
    lo_inclusive: bool = True
    hi_inclusive: bool = True
    text: str = ""

    def contains(self, value: float | None) -> bool:
        if value is None:
            return False
        if self.lo is not None and (
            value < self.lo or (value == self.lo and not self.lo_inclusive)
        ):
            return False
        return not (
            self.hi is not None
            and (value > self.hi or (value == self.hi and not self.hi_inclusive))
        )

    def sql(self, column: str, name: str, params: dict[str, Any]) -> str:
        """``column >= :name_lo AND column <= :name_hi`` (open bounds left out)."""
        parts = []
        if self.lo is not None:
            params[f"{name}_lo"] = self.lo
            parts.append(f"{column} {'>=' if self.lo_inclusive else '>'} :{name}_lo")
        if self.hi is not None:
            params[f"{name}_hi"] = self.hi
            parts.append(f"{column} {'<=' if self.hi_inclusive else '<'} :{name}_hi")
        return " AND ".join(parts) or "1 = 1"


def _value(
    text: str, quantity: str, field_name: str, unit: str | None = None
) -> tuple[float, float | None]:
    from registry.record.units import parse_value

    parsed = parse_value(text, quantity, field=field_name, default_unit=unit or None)
    return parsed.value, parsed.error


def parse_range(text: str, quantity: str, field_name: str) -> Range:
    """``>= 22 kcal/mol``, ``80-100 kJ/mol``, ``95 ± 5 kJ/mol`` … as a :class:`Range` (canonical units)."""
    raw = (text or "").strip().translate(_MINUS)
    if not raw:
        raise UnitError(field_name, text or "", "empty range")
    compare = _COMPARE.match(raw)
    if compare:
        op, rest = compare.groups()
        value, _ = _value(rest, quantity, field_name)
        if op in (">=", "=>", "≥"):
            return Range(value, None, True, True, raw)
        if op == ">":
            return Range(value, None, False, True, raw)
        if op in ("<=", "=<", "≤"):
            return Range(None, value, True, True, raw)
        return Range(None, value, True, False, raw)
    if _PLUSMINUS.search(raw):
        value, error = _value(raw, quantity, field_name)
        if error is None:  # pragma: no cover - the regex saw a ±
            raise UnitError(field_name, raw, "cannot read the ± part")
        return Range(value - error, value + error, True, True, raw)
    between = _BETWEEN.match(raw)
    if between:
        unit = between["unit"] or between["lo_unit"]
        lo, _ = _value(
            f"{between['lo']} {between['lo_unit'] or ''}".strip(), quantity, field_name, unit
        )
        hi, _ = _value(
            f"{between['hi']} {between['unit'] or ''}".strip(), quantity, field_name, unit
        )
        if lo > hi:
            raise UnitError(field_name, raw, "the lower bound is above the upper bound")
        return Range(lo, hi, True, True, raw)
    raise UnitError(
        field_name,
        raw,
        "write a comparison or a range, e.g. '>= 22 kcal/mol', '80-100 kJ/mol' or '95 ± 5 kJ/mol'",
    )


def _nucleus(text: str) -> str:
    from registry.record.entry import normalize_nucleus  # imports the unit layer; only when needed

    return normalize_nucleus(text)


def solvent_class(text: str) -> str | None:
    key = re.sub(r"[^a-z]", "", text.lower())
    return _CLASS_ALIASES.get(key)


@dataclass
class Filters:
    """What the user asked to keep; texts as given, parsed on construction by :func:`make_filters`."""

    barrier: Range | None = None
    temperature: Range | None = None
    solvents: list[str] = field(default_factory=list)
    method: str | None = None
    process: str | None = None
    nucleus: str | None = None
    status: str | None = None
    reference: str | None = None
    compound: str | None = None  # compound label or name contains this text
    include_retracted: bool = False
    #: True: only flagged measurements (an open error finding); False: only clean ones
    flagged: bool | None = None
    #: the common temperature (K) the barrier filter and sort refer to: ΔG‡ at it
    #: (:mod:`.at_temperature`); None: each ΔG‡ at its own temperature
    at_t_k: float | None = None

    def active(self) -> bool:
        """Does any filter narrow the measurements beyond 'not retracted'?"""
        return bool(self.describe())

    def describe(self) -> dict[str, Any]:
        out: dict[str, Any] = {}
        if self.barrier:
            out["barrier"] = self.barrier.text
        if self.temperature:
            out["temperature"] = self.temperature.text
        for key in ("method", "process", "nucleus", "status", "reference", "compound"):
            if getattr(self, key):
                out[key] = getattr(self, key)
        if self.solvents:
            out["solvent"] = list(self.solvents)
        if self.include_retracted:
            out["include_retracted"] = True
        if self.flagged is not None:
            out["flagged" if self.flagged else "clean"] = True
        if self.at_t_k is not None:
            out["at_t_k"] = self.at_t_k
        return out


def make_filters(
    *,
    barrier: str | None = None,
    temperature: str | None = None,
    solvent: list[str] | str | None = None,
    method: str | None = None,
    process: str | None = None,
    nucleus: str | None = None,
    status: str | None = None,
    reference: str | None = None,
    compound: str | None = None,
    include_retracted: bool = False,
    flagged: bool | None = None,
    at: str | float | None = None,
) -> Filters:
    """Check and normalize filter texts (vocabulary names, units) before any query runs.

    ``flagged=True`` keeps only flagged measurements (an error finding nobody accepted),
    ``flagged=False`` only clean ones; None keeps both. ``at`` (a temperature, text with a
    unit or kelvin) makes the barrier filter and sort use ΔG‡ at that temperature
    (:mod:`registry.search.at_temperature`).
    """
    from registry.record import vocab

    solvents: list[str] = []
    for item in [solvent] if isinstance(solvent, str) else solvent or []:
        solvents += [s.strip() for s in item.split(",") if s.strip()]
    return Filters(
        barrier=parse_range(barrier, "energy", "barrier") if barrier else None,
        temperature=parse_range(temperature, "temperature", "temperature") if temperature else None,
        solvents=solvents,
        method=vocab.method_name(method, field="method") if method else None,
        process=process.strip() if process else None,
        nucleus=_nucleus(nucleus) if nucleus else None,
        status=vocab.status_name(status, field="status") if status else None,
        reference=reference.strip() if reference else None,
        compound=compound.strip() if compound and compound.strip() else None,
        include_retracted=include_retracted,
        flagged=_flag_choice(flagged),
        at_t_k=read_at(at),
    )


def read_at(at: str | float | None) -> float | None:
    """The common temperature asked for, in K (a text with a unit, or a number in kelvin)."""
    if at is None:
        return None
    if isinstance(at, bool):
        raise UsageError(f"at {at!r}: give a temperature, e.g. '298.15 K' or '25 °C'")
    if isinstance(at, (int, float)):
        value = float(at)
    else:
        value, _ = _value(str(at), "temperature", "at", "K")
    if not (value > 0 and value < 2000):
        raise UnitError("at", str(at), "a common temperature must lie between 0 and 2000 K")
    return value


def _flag_choice(flagged: Any) -> bool | None:
    if flagged is None or isinstance(flagged, bool):
        return flagged
    raise UsageError(f"flagged {flagged!r}: True (only flagged), False (only clean) or None")


def with_bounds(filters: Filters, lo: str | float | None, hi: str | float | None) -> Filters:
    """``filters`` with the barrier narrowed to ``lo``/``hi`` (texts with a unit, or kJ/mol)."""
    if lo is None and hi is None:
        return filters

    def bound(value: str | float, name: str) -> float:
        if isinstance(value, (int, float)):
            return float(value)
        return _value(value, "energy", name)[0]

    current = filters.barrier or Range(None, None)
    low = current.lo if lo is None else bound(lo, "barrier_min")
    high = current.hi if hi is None else bound(hi, "barrier_max")
    if current.lo is not None and low is not None:
        low = max(low, current.lo)
    if current.hi is not None and high is not None:
        high = min(high, current.hi)
    text = " and ".join(t for t in (current.text, f">= {lo}" if lo is not None else "",
                                    f"<= {hi}" if hi is not None else "") if t)  # fmt: skip
    filters.barrier = Range(low, high, True, True, text)
    return filters


@dataclass
class Where:
    """SQL conditions on ``measurement m`` (joined with ``process p`` when ``needs_process``,
    with ``compound c`` when ``needs_compound``) and their named parameters."""

    clauses: list[str] = field(default_factory=list)
    params: dict[str, Any] = field(default_factory=dict)
    needs_process: bool = False
    needs_compound: bool = False

    def sql(self) -> str:
        return " AND ".join(f"({c})" for c in self.clauses) or "1 = 1"

    def joins(self) -> str:
        """The joins these conditions need on top of ``measurement m``."""
        out = " JOIN compound c ON c.id = m.compound_id" if self.needs_compound else ""
        if self.needs_process:
            out += " LEFT OUTER JOIN process p ON p.id = m.process_id"
        return out


def _contains(column: str, name: str, dialect: str) -> str:
    """Case-insensitive 'contains' (the parameter carries the %…%), one text per database."""
    if dialect == "postgresql":
        return f"{column} ILIKE :{name}"
    return f"lower({column}) LIKE lower(:{name})"


def conditions(conn: Connection, filters: Filters) -> Where:
    """SQL conditions on (measurement m, process p, compound c) for these filters."""
    from registry.record import vocab

    dialect = conn.dialect
    out = Where()
    params = out.params
    if filters.barrier:
        column = "m.dg_kj_mol"
        if filters.at_t_k is not None:
            from registry.search.at_temperature import DG_AT_SQL

            column, params["at_t"] = DG_AT_SQL, filters.at_t_k
        out.clauses.append(filters.barrier.sql(column, "barrier", params))
    if filters.temperature:
        out.clauses.append(filters.temperature.sql("m.dg_t_k", "temperature", params))
    if filters.method:
        params["method"] = filters.method
        out.clauses.append("m.method = :method")
    if filters.process:
        known = tuple(conn.column("SELECT name FROM process_kind"))
        params["process"] = vocab.process_kind_name(filters.process, known, "process")
        out.clauses.append("p.kind = :process")
        out.needs_process = True
    if filters.nucleus:
        params["nucleus"] = filters.nucleus
        out.clauses.append("p.nucleus = :nucleus")
        out.needs_process = True
    if filters.status:
        params["status"] = filters.status
        out.clauses.append("m.status = :status")
    elif not filters.include_retracted:
        params["retracted"] = "retracted"
        out.clauses.append("m.status != :retracted")
    if filters.reference:
        params["reference"] = f"%{filters.reference}%"
        out.clauses.append(_contains("m.reference", "reference", dialect))
    if filters.solvents:
        index: dict[str, int] = {}  # every spelling key of every solvent → its id
        names: dict[str, int] = {}
        for sid, name, formula, aliases in conn.rows(
            "SELECT id, name, formula, aliases FROM solvent"
        ):
            names[name] = sid
            for spelling in (name, formula, *(aliases or "").split("|")):
                if spelling:
                    index.setdefault(vocab.solvent_key(spelling), sid)
        ids: set[int] = set()
        texts: list[str] = []
        for text in filters.solvents:
            cls = solvent_class(text)
            if cls:
                ids |= {names[n] for n in SOLVENT_CLASSES[cls] if n in names}
            elif vocab.solvent_key(text) in index:
                ids.add(index[vocab.solvent_key(text)])
            else:
                texts.append(text)
        # solvent ids are integers read from the table just now: written into the SQL as such
        parts = [f"m.solvent_id IN ({', '.join(map(str, sorted(ids)))})"] if ids else []
        for i, text in enumerate(texts):
            params[f"solvent_text{i}"] = f"%{text}%"
            parts.append(_contains("m.solvent_text", f"solvent_text{i}", dialect))
        if not parts:  # pragma: no cover - solvents given but nothing to match
            raise UsageError("solvent: nothing to match")
        out.clauses.append(" OR ".join(parts))
    if filters.flagged is not None:
        from registry.record.fields import OPEN_ERROR_SQL

        out.clauses.append(OPEN_ERROR_SQL if filters.flagged else f"NOT {OPEN_ERROR_SQL}")
    if filters.compound:
        params["compound"] = f"%{filters.compound}%"
        out.clauses.append(
            f"{_contains('c.label', 'compound', dialect)} OR {_contains('c.name', 'compound', dialect)}"
        )
        out.needs_compound = True
    return out


def listing_filters(
    *,
    compound: str | None = None,
    method: str | None = None,
    solvent: str | list[str] | None = None,
    process: str | None = None,
    status: str | None = None,
    barrier: str | None = None,
    barrier_min: str | float | None = None,
    barrier_max: str | float | None = None,
    include_retracted: bool = False,
    flagged: bool | None = None,
    at: str | float | None = None,
) -> Filters:
    """The filters a listing takes (``list``, exports, paper tables), read and checked.

    ``barrier`` is a range as chemists write it (``'>= 22 kcal/mol'``, ``'80-100 kJ/mol'``);
    ``barrier_min``/``barrier_max`` are single bounds, texts with a unit or floats in kJ/mol;
    ``solvent`` a name, an alias, a class (``chlorinated`` …) or a part of the text;
    ``flagged`` True keeps only flagged measurements, False only clean ones.
    """
    found = make_filters(
        barrier=barrier, solvent=solvent, method=method, process=process, status=status,
        compound=compound, include_retracted=include_retracted, flagged=flagged, at=at,
    )  # fmt: skip
    return with_bounds(found, barrier_min, barrier_max)


def listing_rows(
    conn: Connection,
    filters: Filters,
    *,
    ids: Any = None,
    limit: int | None = None,
    columns: dict[str, str] | None = None,
    sort: str | None = None,
) -> list[dict[str, Any]]:
    """The measurements passing ``filters`` as listing rows (dicts), in id order or ``sort``.

    The one listing query: ``list``, exports and reports read through it. ``columns`` (name →
    SQL over ``measurement m``, ``compound c``, ``process p``) default to
    :data:`registry.record.fields.LISTING_COLUMNS`; ``ids`` narrows to those measurements.
    With a common temperature (``filters.at_t_k``) each row also carries ΔG‡ at it
    (:data:`registry.search.at_temperature.SHOWN`). ``sort`` is a sort name of ``find``
    (``barrier``, ``-temperature`` …), sorted as ``find`` sorts (missing values last, ties in
    id order); with a common temperature ``barrier`` means ΔG‡ at it.
    """
    from registry.record.fields import LISTING_COLUMNS, LISTING_FROM
    from registry.search.result import listing_order, sort_rows

    chosen = dict(columns or LISTING_COLUMNS)
    where = conditions(conn, filters)
    at = filters.at_t_k is not None
    if at:
        from registry.search.at_temperature import AT_COLUMNS

        chosen.update(AT_COLUMNS)
        where.params["at_t"] = filters.at_t_k
    column, descending = listing_order(sort, at)
    sql = f"SELECT {', '.join(chosen.values())} FROM {LISTING_FROM} WHERE {where.sql()}"
    names = list(chosen)
    if ids is not None:
        rows = sorted(conn.rows_where_in(sql, "m.id", ids, where.params), key=lambda r: r[0])
    else:
        by_id = column == "id"
        sql += " ORDER BY m.id" + (f" LIMIT {int(limit)}" if limit and by_id else "")
        rows = conn.rows(sql, where.params)
    if column != "id":  # in Python, as find sorts: the same order on every server
        sort_rows(rows, names, column, descending)
    rows = rows[:limit] if limit else rows
    out = [dict(zip(names, r, strict=True)) for r in rows]
    if at:
        from registry.search.at_temperature import finish

        out = finish(out)
    return out
