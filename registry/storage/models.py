"""The registry's tables as SQLAlchemy 2.0 typed declarative models.

Every physical value is stored twice: ``*_text`` holds exactly what was reported (number,
uncertainty and unit as written) and the float columns hold the value in the canonical unit
named in the column (``_kj_mol``, ``_k``, ``_hz``, ``_per_s``, ``_mhz``). Queries use the floats.
The migration in ``migrations/versions`` must create exactly these tables (a test checks).
"""

from __future__ import annotations

from datetime import datetime

from sqlalchemy import (
    BigInteger,
    Boolean,
    DateTime,
    Float,
    ForeignKey,
    Index,
    Integer,
    LargeBinary,
    MetaData,
    String,
    Text,
    UniqueConstraint,
)
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship

NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_N_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}


class Base(DeclarativeBase):
    metadata = MetaData(naming_convention=NAMING_CONVENTION)


class ProcessKind(Base):
    """Vocabulary of what moves; seeded by the migration, extensible by users."""

    __tablename__ = "process_kind"
    name: Mapped[str] = mapped_column(String(64), primary_key=True)
    description: Mapped[str] = mapped_column(Text, default="")


class Solvent(Base):
    """NMR solvents with their liquid range at 1 atm (the source of each value kept beside it)."""

    __tablename__ = "solvent"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(64), unique=True)
    formula: Mapped[str] = mapped_column(String(64), default="")
    deuterated: Mapped[bool] = mapped_column(Boolean, default=True)
    mp_k: Mapped[float | None] = mapped_column(Float)
    bp_k: Mapped[float | None] = mapped_column(Float)
    source: Mapped[str] = mapped_column(Text, default="")
    aliases: Mapped[str] = mapped_column(Text, default="")  # '|'-separated common spellings


class Compound(Base):
    """A structure as entered and as RDKit reads it; kept with a flag when RDKit cannot sanitize it."""

    __tablename__ = "compound"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    label: Mapped[str | None] = mapped_column(String(128), unique=True)
    name: Mapped[str | None] = mapped_column(Text)
    smiles_input: Mapped[str | None] = mapped_column(Text)
    smiles_canonical: Mapped[str | None] = mapped_column(Text)
    inchi: Mapped[str | None] = mapped_column(Text)
    inchikey: Mapped[str | None] = mapped_column(String(27), unique=True)
    formula: Mapped[str | None] = mapped_column(String(128))
    net_charge: Mapped[int | None] = mapped_column(Integer)
    structure_ok: Mapped[bool] = mapped_column(Boolean, default=True)
    structure_problem: Mapped[str | None] = mapped_column(Text)
    mol_binary: Mapped[bytes | None] = mapped_column(LargeBinary)
    pattern_fp: Mapped[bytes | None] = mapped_column(LargeBinary)
    notes: Mapped[str | None] = mapped_column(Text)
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))


class Process(Base):
    """What moves in a compound: the kind, the exchanging sites, the nucleus observed."""

    __tablename__ = "process"
    __table_args__ = (UniqueConstraint("compound_id", "kind", "sites", "nucleus"),)
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    compound_id: Mapped[int] = mapped_column(ForeignKey("compound.id"), index=True)
    kind: Mapped[str] = mapped_column(ForeignKey("process_kind.name"))
    sites: Mapped[str] = mapped_column(Text, default="")
    nucleus: Mapped[str] = mapped_column(String(16), default="")
    description: Mapped[str | None] = mapped_column(Text)


class ImportBatch(Base):
    """One import of one file (or sheet): who, when, what file (by hash) and what happened."""

    __tablename__ = "import_batch"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    file_name: Mapped[str] = mapped_column(Text)
    sha256: Mapped[str] = mapped_column(String(64), index=True)
    sheet: Mapped[str | None] = mapped_column(Text)
    actor: Mapped[str] = mapped_column(String(128))
    started_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
    finished_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))
    rows_total: Mapped[int] = mapped_column(Integer, default=0)
    rows_added: Mapped[int] = mapped_column(Integer, default=0)
    rows_updated: Mapped[int] = mapped_column(Integer, default=0)
    rows_unchanged: Mapped[int] = mapped_column(Integer, default=0)
    rows_rejected: Mapped[int] = mapped_column(Integer, default=0)
    status: Mapped[str] = mapped_column(String(16), default="done")


class Measurement(Base):
    """One reported barrier determination, with every value as reported and normalized."""

    __tablename__ = "measurement"
    __table_args__ = (
        Index("ix_measurement_dg_kj_mol", "dg_kj_mol"),
        Index("ix_measurement_match_key", "compound_id", "process_id", "method", "solvent_text"),
        Index("ix_measurement_uid", "uid", unique=True),
    )
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    #: a random identifier that travels with the measurement through exports and registries
    uid: Mapped[str | None] = mapped_column(String(32))
    compound_id: Mapped[int] = mapped_column(ForeignKey("compound.id"), index=True)
    process_id: Mapped[int | None] = mapped_column(ForeignKey("process.id"))
    label: Mapped[str | None] = mapped_column(String(128))
    method: Mapped[str] = mapped_column(String(32))
    solvent_id: Mapped[int | None] = mapped_column(ForeignKey("solvent.id"))
    solvent_text: Mapped[str | None] = mapped_column(Text)
    field_mhz: Mapped[float | None] = mapped_column(Float)
    field_text: Mapped[str | None] = mapped_column(Text)
    t_min_k: Mapped[float | None] = mapped_column(Float)
    t_min_text: Mapped[str | None] = mapped_column(Text)
    t_max_k: Mapped[float | None] = mapped_column(Float)
    t_max_text: Mapped[str | None] = mapped_column(Text)
    dg_kj_mol: Mapped[float | None] = mapped_column(Float)
    dg_err_kj_mol: Mapped[float | None] = mapped_column(Float)
    dg_text: Mapped[str | None] = mapped_column(Text)
    dg_t_k: Mapped[float | None] = mapped_column(Float)
    dg_t_text: Mapped[str | None] = mapped_column(Text)
    dh_kj_mol: Mapped[float | None] = mapped_column(Float)
    dh_err_kj_mol: Mapped[float | None] = mapped_column(Float)
    dh_text: Mapped[str | None] = mapped_column(Text)
    ds_j_mol_k: Mapped[float | None] = mapped_column(Float)
    ds_err_j_mol_k: Mapped[float | None] = mapped_column(Float)
    ds_text: Mapped[str | None] = mapped_column(Text)
    ea_kj_mol: Mapped[float | None] = mapped_column(Float)
    ea_err_kj_mol: Mapped[float | None] = mapped_column(Float)
    ea_text: Mapped[str | None] = mapped_column(Text)
    log10_a: Mapped[float | None] = mapped_column(Float)
    log10_a_err: Mapped[float | None] = mapped_column(Float)
    log10_a_text: Mapped[str | None] = mapped_column(Text)
    reference: Mapped[str | None] = mapped_column(Text)
    # which rate constant k and ΔG‡ refer to, and how (migration 0005; NULL = unspecified,
    # see registry.record.conventions): per-site, exchange, observed, enantiomerization,
    # racemization; the path degeneracy σ, the transmission coefficient κ, the reaction order
    # (2: bimolecular, with the partner's concentration in mol/L), the direction of an
    # unequal-population barrier, the probe temperature's calibration and its σ(T) in K, and
    # the correlation of ΔH‡ and ΔS‡ from their fit
    k_convention: Mapped[str | None] = mapped_column(String(32))
    path_degeneracy: Mapped[int | None] = mapped_column(Integer)
    kappa: Mapped[float | None] = mapped_column(Float)
    kappa_text: Mapped[str | None] = mapped_column(Text)
    reaction_order: Mapped[int | None] = mapped_column(Integer)
    concentration_m: Mapped[float | None] = mapped_column(Float)
    concentration_err_m: Mapped[float | None] = mapped_column(Float)
    concentration_text: Mapped[str | None] = mapped_column(Text)
    dg_direction: Mapped[str | None] = mapped_column(String(16))
    t_calibration: Mapped[str | None] = mapped_column(String(32))
    t_calibration_text: Mapped[str | None] = mapped_column(Text)
    t_calibration_err_k: Mapped[float | None] = mapped_column(Float)
    dh_ds_corr: Mapped[float | None] = mapped_column(Float)
    dh_ds_corr_text: Mapped[str | None] = mapped_column(Text)
    # the raw data of a 2D-exchange, transfer or time-course measurement (migration 0008; see
    # registry.record.rawdata): each as reported (``*_text``) and read (canonical floats;
    # lists and matrices as JSON of floats in s and fractions)
    mixing_text: Mapped[str | None] = mapped_column(Text)
    mixing_json: Mapped[str | None] = mapped_column(Text)
    volumes_text: Mapped[str | None] = mapped_column(Text)
    volumes_json: Mapped[str | None] = mapped_column(Text)
    volume_err: Mapped[float | None] = mapped_column(Float)
    volume_err_text: Mapped[str | None] = mapped_column(Text)
    populations_text: Mapped[str | None] = mapped_column(Text)
    populations_json: Mapped[str | None] = mapped_column(Text)
    site_names: Mapped[str | None] = mapped_column(Text)
    ss_ratio: Mapped[float | None] = mapped_column(Float)
    ss_ratio_err: Mapped[float | None] = mapped_column(Float)
    ss_ratio_text: Mapped[str | None] = mapped_column(Text)
    t1_s: Mapped[float | None] = mapped_column(Float)
    t1_err_s: Mapped[float | None] = mapped_column(Float)
    t1_text: Mapped[str | None] = mapped_column(Text)
    t1_kind: Mapped[str | None] = mapped_column(String(16))
    course_text: Mapped[str | None] = mapped_column(Text)
    course_json: Mapped[str | None] = mapped_column(Text)
    course_quantity: Mapped[str | None] = mapped_column(String(16))
    x_eq: Mapped[float | None] = mapped_column(Float)
    x_eq_text: Mapped[str | None] = mapped_column(Text)
    # how a computed barrier was computed (migration 0007; registry.record.theory): level of
    # theory as written, method, basis set, solvation model, conformer treatment, and the
    # standard state (1 M, 1 atm, 1 bar) it refers to
    theory_level: Mapped[str | None] = mapped_column(Text)
    theory_method: Mapped[str | None] = mapped_column(Text)
    theory_basis: Mapped[str | None] = mapped_column(Text)
    theory_solvation: Mapped[str | None] = mapped_column(Text)
    theory_conformers: Mapped[str | None] = mapped_column(Text)
    standard_state: Mapped[str | None] = mapped_column(String(8))
    extra_json: Mapped[str | None] = mapped_column(Text)  # unknown spreadsheet columns, kept
    entered_by: Mapped[str] = mapped_column(String(128))
    entered_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
    updated_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))
    status: Mapped[str] = mapped_column(String(16), default="draft", index=True)
    batch_id: Mapped[int | None] = mapped_column(ForeignKey("import_batch.id"))
    source_row: Mapped[int | None] = mapped_column(Integer)

    coalescence: Mapped[list[CoalescenceObservation]] = relationship(
        back_populates="measurement", cascade="all, delete-orphan"
    )
    rate_points: Mapped[list[RatePoint]] = relationship(
        back_populates="measurement", cascade="all, delete-orphan"
    )


class CoalescenceObservation(Base):
    """Tc and the slow-exchange separation (plus J and populations when known) of one signal pair."""

    __tablename__ = "coalescence"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    measurement_id: Mapped[int] = mapped_column(ForeignKey("measurement.id"), index=True)
    tc_k: Mapped[float] = mapped_column(Float)
    tc_err_k: Mapped[float | None] = mapped_column(Float)
    tc_text: Mapped[str] = mapped_column(Text)
    dnu_hz: Mapped[float] = mapped_column(Float)
    dnu_err_hz: Mapped[float | None] = mapped_column(Float)
    dnu_text: Mapped[str] = mapped_column(Text)
    j_hz: Mapped[float | None] = mapped_column(Float)
    j_text: Mapped[str | None] = mapped_column(Text)
    population_ratio: Mapped[float | None] = mapped_column(Float)  # major/minor, >= 1
    population_text: Mapped[str | None] = mapped_column(Text)
    field_mhz: Mapped[float | None] = mapped_column(Float)
    field_text: Mapped[str | None] = mapped_column(Text)

    measurement: Mapped[Measurement] = relationship(back_populates="coalescence")


class RatePoint(Base):
    """One rate constant at one temperature, from line-shape fits, EXSY or kinetics."""

    __tablename__ = "rate_point"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    measurement_id: Mapped[int] = mapped_column(ForeignKey("measurement.id"), index=True)
    t_k: Mapped[float] = mapped_column(Float)
    t_err_k: Mapped[float | None] = mapped_column(Float)
    t_text: Mapped[str] = mapped_column(Text)
    k_per_s: Mapped[float] = mapped_column(Float)
    k_err_per_s: Mapped[float | None] = mapped_column(Float)
    k_text: Mapped[str] = mapped_column(Text)
    #: how the rate was obtained (a line-shape fit's parameters and series; migration 0009)
    fit_json: Mapped[str | None] = mapped_column(Text)

    measurement: Mapped[Measurement] = relationship(back_populates="rate_points")


class ValidationFinding(Base):
    """What one validation rule (at one version) found about one measurement."""

    __tablename__ = "validation_finding"
    __table_args__ = (Index("ix_validation_finding_rule", "measurement_id", "rule_id"),)
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    measurement_id: Mapped[int] = mapped_column(ForeignKey("measurement.id"), index=True)
    rule_id: Mapped[str] = mapped_column(String(64))
    rule_version: Mapped[int] = mapped_column(Integer)
    severity: Mapped[str] = mapped_column(String(16))
    message: Mapped[str] = mapped_column(Text)
    reported: Mapped[float | None] = mapped_column(Float)
    recomputed: Mapped[float | None] = mapped_column(Float)
    difference: Mapped[float | None] = mapped_column(Float)
    unit: Mapped[str | None] = mapped_column(String(32))
    likely_cause: Mapped[str | None] = mapped_column(Text)
    inputs_hash: Mapped[str | None] = mapped_column(String(64))
    found_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
    accepted_by: Mapped[str | None] = mapped_column(String(128))
    accepted_at: Mapped[datetime | None] = mapped_column(DateTime(timezone=True))
    accept_reason: Mapped[str | None] = mapped_column(Text)


class Revision(Base):
    """Append-only history: who changed what, when, before and after; chained by hash."""

    __tablename__ = "revision"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    entity: Mapped[str] = mapped_column(String(32))
    entity_id: Mapped[int] = mapped_column(Integer)
    action: Mapped[str] = mapped_column(String(32))
    actor: Mapped[str] = mapped_column(String(128))
    at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
    before_json: Mapped[str | None] = mapped_column(Text)
    after_json: Mapped[str | None] = mapped_column(Text)
    reason: Mapped[str | None] = mapped_column(Text)
    batch_id: Mapped[int | None] = mapped_column(ForeignKey("import_batch.id"))
    prev_hash: Mapped[str] = mapped_column(String(64))
    hash: Mapped[str] = mapped_column(String(64), unique=True)

    __table_args__ = (Index("ix_revision_entity", "entity", "entity_id"),)


class Motif(Base):
    """A user-defined structural motif (name + SMARTS); the built-in library lives in code."""

    __tablename__ = "motif"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    name: Mapped[str] = mapped_column(String(64), unique=True)
    smarts: Mapped[str] = mapped_column(Text)
    description: Mapped[str] = mapped_column(Text, default="")
    created_by: Mapped[str] = mapped_column(String(128))
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))


class ChangeCounter(Base):
    """How often each kind of change has happened; triggers keep it (migration 0003), caches
    compare it (:mod:`registry.storage.changes`)."""

    __tablename__ = "change_counter"
    name: Mapped[str] = mapped_column(String(32), primary_key=True)
    n: Mapped[int] = mapped_column(BigInteger)


class ImportSnapshot(Base):
    """What one import's file said about one measurement (texts per field), for later imports
    of the same sheet to tell the file's changes from the registry's."""

    __tablename__ = "import_snapshot"
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    measurement_id: Mapped[int] = mapped_column(ForeignKey("measurement.id"), index=True)
    batch_id: Mapped[int] = mapped_column(ForeignKey("import_batch.id"))
    source_row: Mapped[int | None] = mapped_column(Integer)
    fields_json: Mapped[str] = mapped_column(Text)


class VocabAlias(Base):
    """A spelling a group added for a method, process kind, solvent or nucleus."""

    __tablename__ = "vocab_alias"
    __table_args__ = (UniqueConstraint("kind", "alias"),)
    id: Mapped[int] = mapped_column(Integer, primary_key=True)
    kind: Mapped[str] = mapped_column(String(16))
    alias: Mapped[str] = mapped_column(String(128))
    target: Mapped[str] = mapped_column(String(128))
    created_by: Mapped[str] = mapped_column(String(128))
    created_at: Mapped[datetime] = mapped_column(DateTime(timezone=True))
