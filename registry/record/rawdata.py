"""The raw data of a 2D-exchange, transfer or time-course measurement: texts → stored columns.

Why a module of its own: these values are lists, matrices and small tables, not the single
numbers :mod:`registry.record.units` reads, yet they follow the project's rule — every
physical value is kept as reported (``*_text``) and normalized (canonical floats, here as JSON
lists in s and plain fractions), and only pint converts (each number goes through
:func:`registry.record.units.parse_value`).

Notations (one cell each, so a spreadsheet row holds a whole measurement):

* ``mixing``: the mixing time(s), ``'0.3 s'`` or ``'0, 100 ms, 300 ms'`` (``0`` marks the
  reference spectrum);
* ``volumes``: one peak-volume matrix per mixing time, rows split at ``;``, values at ``,``,
  matrices at ``|`` — ``'I_AA,I_AB;I_BA,I_BB | …'`` (any number of sites);
* ``site_populations``: ``'0.7,0.3'``, ``'70,30'`` or ``'7:3'``; ``site_names``: ``'A,B'``;
* ``t1_kind``: which T1 ``t1`` is — ``apparent`` (measured while the partner is saturated,
  the usual experiment and the default) or ``intrinsic``;
* ``course``: a small table, the header row first, rows split at ``;`` or line breaks, cells at
  ``,`` — ``'t (min),ee (%); 0,98; 30,71; 60,52'``. A time column and an ee column, a fraction
  column, or two intensity columns (inverted site, then partner) of an inversion-transfer
  experiment; units in the headers as in every sheet. ``course_quantity`` (ee, fraction,
  inversion) says which when the headers do not.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from registry.errors import FluxledgerError, UnitError

if TYPE_CHECKING:
    from registry.kinetics.series_table import SeriesTable

#: the measurement columns :func:`read_raw` fills (always all of them, None when not given)
RAW_COLUMNS = ("mixing_text", "mixing_json", "volumes_text", "volumes_json", "populations_text",
               "populations_json", "site_names", "t1_kind", "course_text", "course_json",
               "course_quantity")  # fmt: skip
#: stored text column → the JSON column read from it
JSON_OF_TEXT = {
    "mixing_text": "mixing_json",
    "volumes_text": "volumes_json",
    "populations_text": "populations_json",
    "course_text": "course_json",
}
COURSE_QUANTITIES = ("ee", "fraction", "inversion")
#: fewest different times a course needs (the fits' parameter counts, registry.kinetics)
MIN_TIMES = {"ee": 3, "fraction": 3, "inversion": 4}
COURSE_HELP = "write the header row first, e.g. 't (min),ee (%); 0,98; 30,71; 60,52'"


@dataclass(frozen=True)
class Course:
    """A time course as read: times in s and one (ee, fraction) or two (inversion) columns."""

    quantity: str
    headers: tuple[str, ...]
    t_s: tuple[float, ...]
    values: tuple[tuple[float, ...], ...]  # per value column

    def as_json(self) -> str:
        return json.dumps(
            {"quantity": self.quantity, "headers": list(self.headers), "t_s": list(self.t_s),
             "values": [list(v) for v in self.values]}
        )  # fmt: skip

    @classmethod
    def from_json(cls, text: str) -> Course:
        d = json.loads(text)
        return cls(d["quantity"], tuple(d["headers"]), tuple(d["t_s"]),
                   tuple(tuple(v) for v in d["values"]))  # fmt: skip


# ---------------------------------------------------------------- EXSY


def read_mixing(text: str, field: str = "mixing", unit: str | None = None) -> list[float]:
    """``'0, 100 ms, 0.3 s'`` → seconds; ``0`` (no unit needed) is the reference spectrum;
    ``unit``: the unit a column header gives bare numbers."""
    from registry.record.units import parse_value

    parts = [p.strip() for p in str(text).replace(";", ",").split(",")]
    if not parts or not all(parts):
        raise UnitError(field, str(text), "write the mixing times separated by ',', e.g. '0.3 s'")
    out = []
    for part in parts:
        seconds = (
            0.0
            if part in ("0", "0.0")
            else parse_value(part, "time", field=field, default_unit=unit).value
        )
        if seconds < 0:
            raise UnitError(field, part, "a mixing time cannot be negative")
        out.append(seconds)
    if not any(s > 0 for s in out):
        raise UnitError(field, str(text), "give at least one mixing time > 0 (0 is the reference)")
    return out


def read_volume_sets(text: str, field: str = "volumes") -> list[list[list[float]]]:
    """``'a,b;c,d | e,f;g,h'`` → one square matrix per mixing time, all of one size."""
    from registry.kinetics.calc_exsy import parse_volumes

    parts = [p.strip() for p in str(text).split("|")]
    if not all(parts):
        raise UnitError(field, str(text), "an empty matrix; separate matrices with '|'")
    mats = [parse_volumes(p, field) for p in parts]
    if len({len(m) for m in mats}) != 1:
        raise UnitError(field, str(text), "every matrix needs the same number of sites")
    return mats  # a negative cross peak is noise: kept as measured, the computation says so


def read_site_populations(text: str, n: int | None, field: str = "site_populations") -> list[float]:
    """``'0.7,0.3'``, ``'70,30'`` or ``'7:3'`` → fractions summing to 1 (checked as the
    EXSY computation checks them)."""
    from registry.kinetics.calc_exsy import parse_populations
    from registry.kinetics.checks import KineticsInputError
    from registry.kinetics.exsy import normalised_populations

    values = parse_populations(str(text))
    try:
        return [float(v) for v in normalised_populations(values, n or len(values))]
    except KineticsInputError as exc:
        raise UnitError(field, str(text), exc.reason) from exc


def read_site_names(text: str, n: int | None, field: str = "site_names") -> str:
    """``'A, B'`` → ``'A,B'`` (names distinct, one per site)."""
    names = [p.strip() for p in str(text).split(",")]
    if not all(names) or len(set(names)) != len(names):
        raise UnitError(field, str(text), "give distinct names separated by ',', e.g. 'A,B'")
    if n is not None and len(names) != n:
        raise UnitError(field, str(text), f"give {n} names, one per site of the volume matrix")
    return ",".join(names)


# ---------------------------------------------------------------- transfer


def read_t1_kind(text: str, field: str = "t1_kind") -> str:
    """``apparent`` (partner saturated; also ``app``, ``sat``) or ``intrinsic`` (``int``)."""
    key = "".join(ch for ch in str(text).lower() if ch.isalnum())
    spellings = {"apparent": "apparent", "app": "apparent", "sat": "apparent",
                 "saturated": "apparent", "t1app": "apparent", "intrinsic": "intrinsic",
                 "int": "intrinsic", "t1int": "intrinsic", "t10": "intrinsic"}  # fmt: skip
    if key not in spellings:
        raise UnitError(field, str(text), "one of apparent (partner saturated) or intrinsic")
    return spellings[key]


# ---------------------------------------------------------------- time courses


def _table(text: str, field: str) -> SeriesTable:
    """The course text as a small table (header row, then data rows)."""
    from registry.io.headers import concept_key, split_header
    from registry.kinetics.series_table import SeriesColumn, SeriesTable

    rows = [r.strip() for r in str(text).replace("\r", "").replace("\n", ";").split(";")]
    rows = [r for r in rows if r]
    if len(rows) < 2:
        raise UnitError(field, str(text), f"a header row and data rows are needed; {COURSE_HELP}")
    head = [h.strip() for h in rows[0].split(",")]
    if not all(head):
        raise UnitError(field, rows[0], f"an empty header; {COURSE_HELP}")
    columns = []
    for j, h in enumerate(head):
        concept, unit = split_header(h)
        columns.append(SeriesColumn(j, h, concept_key(concept), unit))
    cells = []
    for i, r in enumerate(rows[1:], start=2):
        parts = [p.strip() or None for p in r.split(",")]
        if len(parts) != len(head):
            raise UnitError(field, r, f"row {i} has {len(parts)} values for {len(head)} headers")
        cells.append(tuple(parts))
    return SeriesTable(field, None, 1, tuple(columns), tuple(range(2, len(rows) + 1)),
                       tuple(cells), ())  # fmt: skip


def read_course(text: str, quantity: str | None = None, field: str = "course") -> Course:
    """The course text → :class:`Course` (times in s; ee and fractions as fractions)."""
    from registry.errors import ImportRowError
    from registry.kinetics.calc_timecourse import EE_NAMES, FRACTION_NAMES, FRACTION_PREFIXES
    from registry.kinetics.series_table import TIME_NAMES, read_column, read_times

    table = _table(text, field)
    time = table.find(TIME_NAMES)
    if time is None:
        raise UnitError(field, str(text), f"no time column; {COURSE_HELP}")
    others = [c for c in table.columns if c is not time]
    if quantity is None:
        ee = table.find(EE_NAMES)
        frac = table.find(FRACTION_NAMES) or next(
            (c for c in others if c.concept.startswith(FRACTION_PREFIXES)), None
        )
        quantity = "ee" if ee else "fraction" if frac else "inversion" if len(others) == 2 else None
    if quantity is None:
        raise UnitError(field, str(text), "say what the course follows: ee, fraction or inversion")
    want = 2 if quantity == "inversion" else 1
    if len(others) != want:
        what = "two intensity columns (inverted site, then partner)" if want == 2 else "one column"
        raise UnitError(field, str(text), f"a {quantity} course has a time column and {what}")
    problems: list[Any] = []
    secs = read_times(table, time, problems)
    kind = "dimensionless" if quantity == "inversion" else "fraction"
    cols = [read_column(table, c, kind, problems) for c in others]
    lo = -1.0 if quantity == "ee" else 0.0
    if quantity != "inversion":
        bad = [i for i, v in enumerate(cols[0].tolist()) if not lo <= v <= 1.0]
        if bad:
            cell = table.cells[bad[0]][others[0].index]
            raise UnitError(field, str(text),
                            f"row {bad[0] + 2}: {cell!r} lies outside {lo:g}…1 as a fraction; "
                            "write '%' in the header if these are percentages")  # fmt: skip
    if problems:
        raise UnitError(field, str(text), str(ImportRowError(problems)))
    if len(set(secs.tolist())) < MIN_TIMES[quantity]:
        raise UnitError(field, str(text),
                        f"a {quantity} course needs at least {MIN_TIMES[quantity]} different "
                        "times")  # fmt: skip
    return Course(quantity, tuple(c.header for c in table.columns), tuple(secs.tolist()),
                  tuple(tuple(c.tolist()) for c in cols))  # fmt: skip


def course_text_of_file(path: str, sheet: str | None = None) -> str:
    """A course file (CSV, .xlsx …) as the one-cell text the registry stores."""
    from registry.io.headers import split_header
    from registry.kinetics.series_table import read_series

    table = read_series(path, sheet=sheet)
    heads = []
    for c in table.columns:
        name, unit = split_header(c.header)
        heads.append(f"{name} ({unit})" if unit else name)
    rows = [",".join(heads)]
    for number, cells in zip(table.row_numbers, table.cells, strict=True):
        if any(c and ("," in c or ";" in c) for c in cells):
            raise UnitError("course", f"{path} row {number}", "a cell holds ',' or ';'")
        rows.append(",".join(c or "" for c in cells))
    return "; ".join(rows)


# ---------------------------------------------------------------- an entry


class _Reader:
    """Collects the problems of one entry's raw data (each naming its field and text)."""

    def __init__(self, problems: list[Any]) -> None:
        self.problems = problems

    def __call__(self, name: str, text: str | None, read: Any) -> Any:
        from registry.record.entry import Problem

        if text is None:
            return None
        try:
            return read(text)
        except (UnitError, FluxledgerError) as exc:
            reason = getattr(exc, "reason", str(exc))
            self.problems.append(Problem(name, text, reason))
            return None


def _with_unit(text: str | None, unit: str | None) -> str | None:
    """Mixing times under a header that gives their unit (``mixing time (ms)``: ``100, 300``)
    are stored with it (``100 ms, 300 ms``): the stored text then reads alone, as ``edit`` and
    ``verify`` read it again."""
    if text is None or not unit:
        return text
    parts = [p.strip() for p in text.replace(";", ",").split(",")]
    bare = [p and p.replace(".", "", 1).replace("e", "", 1).lstrip("+-").isdigit() for p in parts]
    if not any(bare):
        return text
    return ", ".join(f"{p} {unit}" if b and p not in ("0", "0.0") else p
                     for p, b in zip(parts, bare, strict=True))  # fmt: skip


def read_raw(inp: Any, values: dict[str, Any], problems: list[Any]) -> dict[str, Any]:
    """The raw-data columns of one entry (:data:`RAW_COLUMNS`), checked for completeness."""
    from registry.record.entry import Problem, text_of

    out: dict[str, Any] = dict.fromkeys(RAW_COLUMNS)
    read = _Reader(problems)
    mixing, volumes = _with_unit(text_of(inp.mixing), inp.units.get("mixing")), text_of(inp.volumes)
    taus = read("mixing", mixing, read_mixing)
    mats = read("volumes", volumes, read_volume_sets)
    n = len(mats[0]) if mats else None
    if (mixing is None) != (volumes is None):
        problems.append(
            Problem(
                "mixing" if mixing is None else "volumes",
                "",
                "missing: EXSY data needs the mixing time(s) and the volumes",
            )
        )
    if taus is not None and mats is not None and len(taus) != len(mats):
        problems.append(
            Problem(
                "volumes",
                volumes or "",
                f"{len(mats)} matrices for {len(taus)} mixing time(s): one matrix per mixing time",
            )
        )
    pops_text = text_of(inp.site_populations)
    pops = read("site_populations", pops_text, lambda t: read_site_populations(t, n))
    if pops is not None and taus is not None and 0.0 in taus:
        problems.append(Problem("site_populations", pops_text or "", "give the populations or "
                                "a τm = 0 reference spectrum, not both"))  # fmt: skip
    names = read("site_names", text_of(inp.site_names), lambda t: read_site_names(t, n))
    out.update(
        mixing_text=mixing, mixing_json=None if taus is None else json.dumps(taus),
        volumes_text=volumes, volumes_json=None if mats is None else json.dumps(mats),
        populations_text=pops_text, populations_json=None if pops is None else json.dumps(pops),
        site_names=names,
    )  # fmt: skip
    if (pops_text or names or "volume_err" in values) and volumes is None:
        problems.append(Problem("volumes", "", "populations, site names and a volume σ belong "
                                "to EXSY volumes"))  # fmt: skip
    _transfer(inp, values, out, read, problems)
    _course(inp, values, out, read, problems)
    return out


def _transfer(inp: Any, values: dict[str, Any], out: dict[str, Any], read: _Reader,
              problems: list[Any]) -> None:  # fmt: skip
    from registry.record.entry import Problem, text_of

    ratio, t1 = values.get("ss_ratio"), values.get("t1")
    kind = read("t1_kind", text_of(inp.t1_kind), read_t1_kind)
    if (ratio is None) != (t1 is None):
        missing = "t1" if t1 is None else "ss_ratio"
        problems.append(Problem(missing, "", "missing: saturation transfer needs the ratio "
                                "M_ss/M0 and a T1 of the observed site"))  # fmt: skip
    if ratio is not None and not 0.0 < ratio.value <= 1.0:
        problems.append(Problem("ss_ratio", ratio.text, "M_ss/M0 must be > 0 and ≤ 1"))
    if t1 is not None and not t1.value > 0:
        problems.append(Problem("t1", t1.text, "T1 must be > 0 s"))
    if kind is not None and t1 is None:
        problems.append(Problem("t1_kind", str(inp.t1_kind), "belongs to a T1"))
    out["t1_kind"] = kind or ("apparent" if t1 is not None else None)


def _course(inp: Any, values: dict[str, Any], out: dict[str, Any], read: _Reader,
            problems: list[Any]) -> None:  # fmt: skip
    from registry.record.entry import Problem, text_of

    text = text_of(inp.course)
    quantity = read("course_quantity", text_of(inp.course_quantity), _read_quantity)
    course = read("course", text, lambda t: read_course(t, quantity))
    x_eq = values.get("x_eq")
    if x_eq is not None and not 0.0 < x_eq.value < 1.0:
        problems.append(Problem("x_eq", x_eq.text, "an equilibrium fraction lies between 0 and 1"))
    if x_eq is not None and course is not None and course.quantity != "fraction":
        problems.append(Problem("x_eq", x_eq.text, "belongs to a fraction course"))
    if text is None and (quantity is not None or x_eq is not None):
        problems.append(Problem("course", "", "missing: course_quantity and x_eq belong to it"))
    out.update(course_text=text, course_json=None if course is None else course.as_json(),
               course_quantity=None if course is None else course.quantity)  # fmt: skip


def _read_quantity(text: str) -> str:
    key = str(text).strip().lower()
    if key not in COURSE_QUANTITIES:
        raise UnitError("course_quantity", str(text), f"one of {', '.join(COURSE_QUANTITIES)}")
    return key


def _floats(value: Any) -> float | None:
    return None if value is None or (isinstance(value, float) and value != value) else value


def raw_summary(m: dict[str, Any]) -> dict[str, Any] | None:
    """A stored row's raw data, read back for ``show`` and the JSON of a record (None: none)."""
    if m.get("volumes_json"):
        names = m.get("site_names")
        return {
            "kind": "exsy",
            "mixing_text": m.get("mixing_text"),
            "mixing_s": json.loads(m["mixing_json"]),
            "volumes_text": m.get("volumes_text"),
            "volumes": json.loads(m["volumes_json"]),
            "volume_err": _floats(m.get("volume_err")),
            "populations_text": m.get("populations_text"),
            "populations": json.loads(m["populations_json"]) if m.get("populations_json") else None,
            "site_names": names.split(",") if names else None,
        }
    if _floats(m.get("ss_ratio")) is not None:
        return {
            "kind": "saturation",
            "ratio_text": m.get("ss_ratio_text"),
            "ratio": m["ss_ratio"],
            "ratio_err": _floats(m.get("ss_ratio_err")),
            "t1_text": m.get("t1_text"),
            "t1_s": _floats(m.get("t1_s")),
            "t1_err_s": _floats(m.get("t1_err_s")),
            "t1_kind": m.get("t1_kind"),
        }
    if m.get("course_json"):
        course = Course.from_json(m["course_json"])
        return {
            "kind": course.quantity,
            "course_text": m.get("course_text"),
            "headers": list(course.headers),
            "t_s": list(course.t_s),
            "values": [list(v) for v in course.values],
            "x_eq_text": m.get("x_eq_text"),
            "x_eq": _floats(m.get("x_eq")),
        }
    return None


def _close(a: Any, b: Any) -> bool:
    """Two JSON values equal, floats to 1e-9 relative (what ``edit`` and ``verify`` allow)."""
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_close(a[k], b[k]) for k in a)
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_close(x, y) for x, y in zip(a, b, strict=True))
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-12)
    return bool(a == b)


def reread_problems(where: str, row: dict[str, Any]) -> tuple[list[str], int]:
    """Each stored raw-data text read again against its stored JSON (for ``verify``); the
    problems and how many texts were read."""
    n = len(json.loads(row["volumes_json"])[0]) if row.get("volumes_json") else None
    readers = {
        "mixing_text": read_mixing,
        "volumes_text": read_volume_sets,
        "populations_text": lambda t: read_site_populations(t, n),
        "course_text": lambda t: json.loads(read_course(t, row.get("course_quantity")).as_json()),
    }
    problems, count = [], 0
    for text_column, read in readers.items():
        text, stored = row.get(text_column), row.get(JSON_OF_TEXT[text_column])
        if text is None:
            if stored is not None:
                problems.append(f"{where}: {JSON_OF_TEXT[text_column]} is stored without its text")
            continue
        count += 1
        try:
            again = read(text)
        except (UnitError, FluxledgerError) as exc:
            problems.append(f"{where}: {text_column} {text!r} does not read any more: {exc}")
            continue
        if stored is None or not _close(again, json.loads(stored)):
            problems.append(f"{where}: {text_column} {text!r} reads as {json.dumps(again)}, "
                            f"stored {stored}")  # fmt: skip
    return problems, count
