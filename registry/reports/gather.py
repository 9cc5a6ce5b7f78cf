"""What the figures and pages need from the registry, read in a few queries.

Reads only; every function takes an open :class:`registry.storage.database.Database`. Retracted
measurements are left out of overviews and pages unless asked for, as in listings.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray
from sqlalchemy import select

from registry.errors import NotFoundError, UsageError
from registry.storage.database import Database
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    Measurement,
    Process,
    RatePoint,
    Solvent,
    ValidationFinding,
)

#: the group of compounds that match no motif
NO_MOTIF = "(no motif)"


@dataclass(frozen=True)
class RateSeries:
    """The rate points of one measurement (or file), ready for :func:`registry.kinetics.fit_eyring`."""

    t_k: NDArray[np.float64]
    k_per_s: NDArray[np.float64]
    k_err_per_s: NDArray[np.float64] | None
    title: str


def rate_series(database: Database, measurement_id: int) -> RateSeries:
    """The stored rate points of a measurement; σ_k only when every point has one."""
    with database.read() as conn:
        head = conn.execute(
            select(Measurement.id, Measurement.label, Compound.label, Compound.name)
            .join(Compound, Compound.id == Measurement.compound_id)
            .where(Measurement.id == measurement_id)
        ).first()
        if head is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        points = conn.execute(
            select(RatePoint.t_k, RatePoint.k_per_s, RatePoint.k_err_per_s)
            .where(RatePoint.measurement_id == measurement_id)
            .order_by(RatePoint.t_k)
        ).all()
    if len(points) < 2:
        raise UsageError(
            f"measurement {measurement_id} has {len(points)} rate point(s); an Eyring plot needs"
            " at least 2 (add them with 'fluxledger add --rate' or an import)"
        )
    errs = [p[2] for p in points]
    err = np.array(errs, dtype=float) if all(e and e > 0 for e in errs) else None
    return RateSeries(
        np.array([p[0] for p in points], dtype=float),
        np.array([p[1] for p in points], dtype=float),
        err,
        _title(measurement_id, head[1], head[2], head[3]),
    )


def _title(mid: int, m_label: str | None, c_label: str | None, c_name: str | None) -> str:
    who = " ".join(x for x in (c_label, f"({c_name})" if c_name else None) if x)
    return (
        f"measurement {mid}" + (f" — {who}" if who else "") + (f" [{m_label}]" if m_label else "")
    )


def observed_coalescence(
    database: Database, *, measurement_id: int | None = None, compound: str | None = None
) -> list[dict[str, Any]]:
    """Coalescence observations (field, Tc, Δν, the measurement's ΔG‡) of a measurement or of
    every measurement of the compounds whose label or name contains ``compound``."""
    if measurement_id is None and not compound:
        return []
    query = (
        select(
            Measurement.id.label("measurement_id"),
            Compound.label.label("compound"),
            Compound.name.label("compound_name"),
            CoalescenceObservation.tc_k,
            CoalescenceObservation.dnu_hz,
            CoalescenceObservation.j_hz,
            CoalescenceObservation.field_mhz.label("obs_field_mhz"),
            Measurement.field_mhz.label("m_field_mhz"),
            Measurement.dg_kj_mol,
            Measurement.dg_err_kj_mol,
            Measurement.solvent_text,
        )
        .join(Measurement, Measurement.id == CoalescenceObservation.measurement_id)
        .join(Compound, Compound.id == Measurement.compound_id)
        .where(Measurement.status != "retracted")
        .order_by(Measurement.id, CoalescenceObservation.id)
    )
    if measurement_id is not None:
        query = query.where(Measurement.id == measurement_id)
    if compound:
        like = f"%{compound}%"
        query = query.where(Compound.label.ilike(like) | Compound.name.ilike(like))
    with database.read() as conn:
        rows = [dict(r) for r in conn.execute(query).mappings()]
        if measurement_id is not None and not rows:
            exists = conn.execute(
                select(Measurement.id).where(Measurement.id == measurement_id)
            ).scalar()
            if exists is None:
                raise NotFoundError(f"no measurement with id {measurement_id}")
    out = []
    for r in rows:
        field = r.pop("obs_field_mhz") or r.pop("m_field_mhz", None)
        r.pop("m_field_mhz", None)
        r["field_mhz"] = field
        r["dnu_ppm"] = r["dnu_hz"] / field if field else None
        r["label"] = f"#{r['measurement_id']}"
        out.append(r)
    return out


def solvent_range(database: Database, text: str) -> dict[str, Any] | None:
    """The solvent table's liquid range (K) for a solvent as written, or None when unknown."""
    from registry.record import vocab

    key = vocab.solvent_key(text)
    with database.read() as conn:
        for name, formula, aliases, mp_k, bp_k in conn.execute(
            select(Solvent.name, Solvent.formula, Solvent.aliases, Solvent.mp_k, Solvent.bp_k)
        ):
            spellings = (name, formula, *(aliases or "").split("|"))
            if any(s and vocab.solvent_key(s) == key for s in spellings):
                return {"name": name, "formula": formula, "mp_k": mp_k, "bp_k": bp_k}
    return None


def barriers_by_kind(
    database: Database, *, include_retracted: bool = False
) -> dict[str, list[float]]:
    """ΔG‡ (kJ/mol) of every measurement that has one, grouped by process kind."""
    query = (
        select(Process.kind, Measurement.dg_kj_mol)
        .select_from(Measurement)
        .outerjoin(Process, Process.id == Measurement.process_id)
        .where(Measurement.dg_kj_mol.is_not(None))
        .order_by(Process.kind, Measurement.id)
    )
    if not include_retracted:
        query = query.where(Measurement.status != "retracted")
    groups: dict[str, list[float]] = defaultdict(list)
    with database.read() as conn:
        for kind, dg in conn.execute(query):
            groups[kind or "(no process kind)"].append(float(dg))
    return dict(sorted(groups.items(), key=lambda kv: (-len(kv[1]), kv[0])))


def barriers_by_motif(
    database: Database, *, include_retracted: bool = False
) -> dict[str, list[float]] | None:
    """ΔG‡ grouped by structural motif when :mod:`registry.search` offers motif matching.

    Returns None when it does not (the caller falls back to process kinds). A compound that
    matches several motifs counts in each of them; one that matches none is in ``(no motif)``.
    """
    try:
        from registry import search  # written by another part of the project
    except ImportError:  # structure search is a separate part of the project
        return None
    matcher = getattr(search, "motif_matches", None)
    if matcher is None:
        return None
    matches = matcher(database)  # {motif name: [compound ids]}
    query = select(Measurement.compound_id, Measurement.dg_kj_mol).where(
        Measurement.dg_kj_mol.is_not(None)
    )
    if not include_retracted:
        query = query.where(Measurement.status != "retracted")
    by_compound: dict[int, list[float]] = defaultdict(list)
    with database.read() as conn:
        for cid, dg in conn.execute(query):
            by_compound[cid].append(float(dg))
    groups = {
        motif: [dg for cid in ids for dg in by_compound.get(cid, [])]
        for motif, ids in matches.items()
    }
    matched = {cid for ids in matches.values() for cid in ids}
    groups[NO_MOTIF] = [dg for cid, dgs in by_compound.items() if cid not in matched for dg in dgs]
    groups = {k: v for k, v in groups.items() if v}
    return dict(sorted(groups.items(), key=lambda kv: (-len(kv[1]), kv[0])))


# --- for the HTML report ---------------------------------------------------------------------


def compounds(database: Database, *, include_retracted: bool = False) -> list[dict[str, Any]]:
    """Every compound that has at least one (non-retracted) measurement, with its structure."""
    used = select(Measurement.compound_id)
    if not include_retracted:
        used = used.where(Measurement.status != "retracted")
    query = select(Compound.__table__).where(Compound.id.in_(used))
    with database.read() as conn:
        return [dict(r) for r in conn.execute(query.order_by(Compound.id)).mappings()]


def measurements_for_report(
    database: Database, *, include_retracted: bool = False
) -> list[dict[str, Any]]:
    """Measurements with compound, process, coalescence, rate points and findings attached."""
    from registry import api

    rows = api.list_measurements(database, include_retracted=include_retracted)
    ids = [r["id"] for r in rows]
    extra_cols = (
        Measurement.id,
        Measurement.compound_id,
        Measurement.dh_err_kj_mol,
        Measurement.ds_err_j_mol_k,
        Measurement.dg_text,
        Measurement.dh_text,
        Measurement.ds_text,
        Measurement.label,
        Process.sites,
    )
    with database.read() as conn:
        extra = {
            r[0]: r
            for r in conn.execute(
                select(*extra_cols)
                .outerjoin(Process, Process.id == Measurement.process_id)
                .where(Measurement.id.in_(ids))
            )
        }
        co = _grouped(conn, CoalescenceObservation, ids, CoalescenceObservation.id)
        rates = _grouped(conn, RatePoint, ids, RatePoint.t_k)
        findings = _grouped(conn, ValidationFinding, ids, ValidationFinding.id)
    for r in rows:
        e = extra[r["id"]]
        r.update(
            compound_id=e[1],
            dh_err_kj_mol=e[2],
            ds_err_j_mol_k=e[3],
            dg_text=e[4],
            dh_text=e[5],
            ds_text=e[6],
            sites=e[8],
            coalescence=co.get(r["id"], []),
            rate_points=rates.get(r["id"], []),
            findings=findings.get(r["id"], []),
        )
    return rows


def _grouped(conn: Any, model: Any, ids: Sequence[int], order: Any) -> dict[int, list[dict]]:
    out: dict[int, list[dict]] = defaultdict(list)
    if not ids:
        return out
    table = model.__table__
    for chunk in range(0, len(ids), 500):
        part = ids[chunk : chunk + 500]
        for r in conn.execute(
            select(table).where(table.c.measurement_id.in_(part)).order_by(order)
        ).mappings():
            out[r["measurement_id"]].append(dict(r))
    return out
