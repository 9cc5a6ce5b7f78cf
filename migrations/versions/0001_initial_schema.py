"""initial schema

Revision ID: 0001
Revises:
Create Date: 2026-12-02 02:35:24.644835
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

from registry.record.vocab import seed_reference_data

revision: str = "0001"
down_revision: str | None = None
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.create_table(
        "compound",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("label", sa.String(length=128), nullable=True),
        sa.Column("name", sa.Text(), nullable=True),
        sa.Column("smiles_input", sa.Text(), nullable=True),
        sa.Column("smiles_canonical", sa.Text(), nullable=True),
        sa.Column("inchi", sa.Text(), nullable=True),
        sa.Column("inchikey", sa.String(length=27), nullable=True),
        sa.Column("formula", sa.String(length=128), nullable=True),
        sa.Column("net_charge", sa.Integer(), nullable=True),
        sa.Column("structure_ok", sa.Boolean(), nullable=False),
        sa.Column("structure_problem", sa.Text(), nullable=True),
        sa.Column("mol_binary", sa.LargeBinary(), nullable=True),
        sa.Column("pattern_fp", sa.LargeBinary(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=True),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_compound")),
        sa.UniqueConstraint("inchikey", name=op.f("uq_compound_inchikey")),
        sa.UniqueConstraint("label", name=op.f("uq_compound_label")),
    )
    op.create_table(
        "import_batch",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("file_name", sa.Text(), nullable=False),
        sa.Column("sha256", sa.String(length=64), nullable=False),
        sa.Column("sheet", sa.Text(), nullable=True),
        sa.Column("actor", sa.String(length=128), nullable=False),
        sa.Column("started_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("finished_at", sa.DateTime(timezone=True), nullable=True),
        sa.Column("rows_total", sa.Integer(), nullable=False),
        sa.Column("rows_added", sa.Integer(), nullable=False),
        sa.Column("rows_updated", sa.Integer(), nullable=False),
        sa.Column("rows_unchanged", sa.Integer(), nullable=False),
        sa.Column("rows_rejected", sa.Integer(), nullable=False),
        sa.Column("status", sa.String(length=16), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_import_batch")),
    )
    with op.batch_alter_table("import_batch", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_import_batch_sha256"), ["sha256"], unique=False)

    op.create_table(
        "process_kind",
        sa.Column("name", sa.String(length=64), nullable=False),
        sa.Column("description", sa.Text(), nullable=False),
        sa.PrimaryKeyConstraint("name", name=op.f("pk_process_kind")),
    )
    op.create_table(
        "solvent",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=64), nullable=False),
        sa.Column("formula", sa.String(length=64), nullable=False),
        sa.Column("deuterated", sa.Boolean(), nullable=False),
        sa.Column("mp_k", sa.Float(), nullable=True),
        sa.Column("bp_k", sa.Float(), nullable=True),
        sa.Column("source", sa.Text(), nullable=False),
        sa.Column("aliases", sa.Text(), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_solvent")),
        sa.UniqueConstraint("name", name=op.f("uq_solvent_name")),
    )
    op.create_table(
        "process",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("compound_id", sa.Integer(), nullable=False),
        sa.Column("kind", sa.String(length=64), nullable=False),
        sa.Column("sites", sa.Text(), nullable=False),
        sa.Column("nucleus", sa.String(length=16), nullable=False),
        sa.Column("description", sa.Text(), nullable=True),
        sa.ForeignKeyConstraint(
            ["compound_id"], ["compound.id"], name=op.f("fk_process_compound_id_compound")
        ),
        sa.ForeignKeyConstraint(
            ["kind"], ["process_kind.name"], name=op.f("fk_process_kind_process_kind")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_process")),
        sa.UniqueConstraint(
            "compound_id",
            "kind",
            "sites",
            "nucleus",
            name=op.f("uq_process_compound_id_kind_sites_nucleus"),
        ),
    )
    with op.batch_alter_table("process", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_process_compound_id"), ["compound_id"], unique=False)

    op.create_table(
        "revision",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("entity", sa.String(length=32), nullable=False),
        sa.Column("entity_id", sa.Integer(), nullable=False),
        sa.Column("action", sa.String(length=32), nullable=False),
        sa.Column("actor", sa.String(length=128), nullable=False),
        sa.Column("at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("before_json", sa.Text(), nullable=True),
        sa.Column("after_json", sa.Text(), nullable=True),
        sa.Column("reason", sa.Text(), nullable=True),
        sa.Column("batch_id", sa.Integer(), nullable=True),
        sa.Column("prev_hash", sa.String(length=64), nullable=False),
        sa.Column("hash", sa.String(length=64), nullable=False),
        sa.ForeignKeyConstraint(
            ["batch_id"], ["import_batch.id"], name=op.f("fk_revision_batch_id_import_batch")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_revision")),
        sa.UniqueConstraint("hash", name=op.f("uq_revision_hash")),
    )
    with op.batch_alter_table("revision", schema=None) as batch_op:
        batch_op.create_index("ix_revision_entity", ["entity", "entity_id"], unique=False)

    op.create_table(
        "measurement",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("compound_id", sa.Integer(), nullable=False),
        sa.Column("process_id", sa.Integer(), nullable=True),
        sa.Column("label", sa.String(length=128), nullable=True),
        sa.Column("method", sa.String(length=32), nullable=False),
        sa.Column("solvent_id", sa.Integer(), nullable=True),
        sa.Column("solvent_text", sa.Text(), nullable=True),
        sa.Column("field_mhz", sa.Float(), nullable=True),
        sa.Column("field_text", sa.Text(), nullable=True),
        sa.Column("t_min_k", sa.Float(), nullable=True),
        sa.Column("t_min_text", sa.Text(), nullable=True),
        sa.Column("t_max_k", sa.Float(), nullable=True),
        sa.Column("t_max_text", sa.Text(), nullable=True),
        sa.Column("dg_kj_mol", sa.Float(), nullable=True),
        sa.Column("dg_err_kj_mol", sa.Float(), nullable=True),
        sa.Column("dg_text", sa.Text(), nullable=True),
        sa.Column("dg_t_k", sa.Float(), nullable=True),
        sa.Column("dg_t_text", sa.Text(), nullable=True),
        sa.Column("dh_kj_mol", sa.Float(), nullable=True),
        sa.Column("dh_err_kj_mol", sa.Float(), nullable=True),
        sa.Column("dh_text", sa.Text(), nullable=True),
        sa.Column("ds_j_mol_k", sa.Float(), nullable=True),
        sa.Column("ds_err_j_mol_k", sa.Float(), nullable=True),
        sa.Column("ds_text", sa.Text(), nullable=True),
        sa.Column("ea_kj_mol", sa.Float(), nullable=True),
        sa.Column("ea_err_kj_mol", sa.Float(), nullable=True),
        sa.Column("ea_text", sa.Text(), nullable=True),
        sa.Column("log10_a", sa.Float(), nullable=True),
        sa.Column("log10_a_err", sa.Float(), nullable=True),
        sa.Column("log10_a_text", sa.Text(), nullable=True),
        sa.Column("reference", sa.Text(), nullable=True),
        sa.Column("extra_json", sa.Text(), nullable=True),
        sa.Column("entered_by", sa.String(length=128), nullable=False),
        sa.Column("entered_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("updated_at", sa.DateTime(timezone=True), nullable=True),
        sa.Column("status", sa.String(length=16), nullable=False),
        sa.Column("batch_id", sa.Integer(), nullable=True),
        sa.Column("source_row", sa.Integer(), nullable=True),
        sa.ForeignKeyConstraint(
            ["batch_id"], ["import_batch.id"], name=op.f("fk_measurement_batch_id_import_batch")
        ),
        sa.ForeignKeyConstraint(
            ["compound_id"], ["compound.id"], name=op.f("fk_measurement_compound_id_compound")
        ),
        sa.ForeignKeyConstraint(
            ["process_id"], ["process.id"], name=op.f("fk_measurement_process_id_process")
        ),
        sa.ForeignKeyConstraint(
            ["solvent_id"], ["solvent.id"], name=op.f("fk_measurement_solvent_id_solvent")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_measurement")),
    )
    with op.batch_alter_table("measurement", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_measurement_compound_id"), ["compound_id"], unique=False
        )
        batch_op.create_index("ix_measurement_dg_kj_mol", ["dg_kj_mol"], unique=False)
        batch_op.create_index(
            "ix_measurement_match_key",
            ["compound_id", "process_id", "method", "solvent_text"],
            unique=False,
        )
        batch_op.create_index(batch_op.f("ix_measurement_status"), ["status"], unique=False)

    op.create_table(
        "coalescence",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("measurement_id", sa.Integer(), nullable=False),
        sa.Column("tc_k", sa.Float(), nullable=False),
        sa.Column("tc_err_k", sa.Float(), nullable=True),
        sa.Column("tc_text", sa.Text(), nullable=False),
        sa.Column("dnu_hz", sa.Float(), nullable=False),
        sa.Column("dnu_err_hz", sa.Float(), nullable=True),
        sa.Column("dnu_text", sa.Text(), nullable=False),
        sa.Column("j_hz", sa.Float(), nullable=True),
        sa.Column("j_text", sa.Text(), nullable=True),
        sa.Column("population_ratio", sa.Float(), nullable=True),
        sa.Column("population_text", sa.Text(), nullable=True),
        sa.Column("field_mhz", sa.Float(), nullable=True),
        sa.Column("field_text", sa.Text(), nullable=True),
        sa.ForeignKeyConstraint(
            ["measurement_id"],
            ["measurement.id"],
            name=op.f("fk_coalescence_measurement_id_measurement"),
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_coalescence")),
    )
    with op.batch_alter_table("coalescence", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_coalescence_measurement_id"), ["measurement_id"], unique=False
        )

    op.create_table(
        "rate_point",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("measurement_id", sa.Integer(), nullable=False),
        sa.Column("t_k", sa.Float(), nullable=False),
        sa.Column("t_err_k", sa.Float(), nullable=True),
        sa.Column("t_text", sa.Text(), nullable=False),
        sa.Column("k_per_s", sa.Float(), nullable=False),
        sa.Column("k_err_per_s", sa.Float(), nullable=True),
        sa.Column("k_text", sa.Text(), nullable=False),
        sa.ForeignKeyConstraint(
            ["measurement_id"],
            ["measurement.id"],
            name=op.f("fk_rate_point_measurement_id_measurement"),
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_rate_point")),
    )
    with op.batch_alter_table("rate_point", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_rate_point_measurement_id"), ["measurement_id"], unique=False
        )

    op.create_table(
        "validation_finding",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("measurement_id", sa.Integer(), nullable=False),
        sa.Column("rule_id", sa.String(length=64), nullable=False),
        sa.Column("rule_version", sa.Integer(), nullable=False),
        sa.Column("severity", sa.String(length=16), nullable=False),
        sa.Column("message", sa.Text(), nullable=False),
        sa.Column("reported", sa.Float(), nullable=True),
        sa.Column("recomputed", sa.Float(), nullable=True),
        sa.Column("difference", sa.Float(), nullable=True),
        sa.Column("unit", sa.String(length=32), nullable=True),
        sa.Column("likely_cause", sa.Text(), nullable=True),
        sa.Column("inputs_hash", sa.String(length=64), nullable=True),
        sa.Column("found_at", sa.DateTime(timezone=True), nullable=False),
        sa.Column("accepted_by", sa.String(length=128), nullable=True),
        sa.Column("accepted_at", sa.DateTime(timezone=True), nullable=True),
        sa.Column("accept_reason", sa.Text(), nullable=True),
        sa.ForeignKeyConstraint(
            ["measurement_id"],
            ["measurement.id"],
            name=op.f("fk_validation_finding_measurement_id_measurement"),
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_validation_finding")),
    )
    with op.batch_alter_table("validation_finding", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_validation_finding_measurement_id"), ["measurement_id"], unique=False
        )
        batch_op.create_index(
            "ix_validation_finding_rule", ["measurement_id", "rule_id"], unique=False
        )

    op.create_table(
        "motif",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=64), nullable=False),
        sa.Column("smarts", sa.Text(), nullable=False),
        sa.Column("description", sa.Text(), nullable=False),
        sa.Column("created_by", sa.String(length=128), nullable=False),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_motif")),
        sa.UniqueConstraint("name", name=op.f("uq_motif_name")),
    )
    seed_reference_data(op.get_bind())


def downgrade() -> None:
    op.drop_table("motif")
    with op.batch_alter_table("validation_finding", schema=None) as batch_op:
        batch_op.drop_index("ix_validation_finding_rule")
        batch_op.drop_index(batch_op.f("ix_validation_finding_measurement_id"))

    op.drop_table("validation_finding")
    with op.batch_alter_table("rate_point", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_rate_point_measurement_id"))

    op.drop_table("rate_point")
    with op.batch_alter_table("coalescence", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_coalescence_measurement_id"))

    op.drop_table("coalescence")
    with op.batch_alter_table("measurement", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_measurement_status"))
        batch_op.drop_index("ix_measurement_match_key")
        batch_op.drop_index("ix_measurement_dg_kj_mol")
        batch_op.drop_index(batch_op.f("ix_measurement_compound_id"))

    op.drop_table("measurement")
    with op.batch_alter_table("revision", schema=None) as batch_op:
        batch_op.drop_index("ix_revision_entity")

    op.drop_table("revision")
    with op.batch_alter_table("process", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_process_compound_id"))

    op.drop_table("process")
    op.drop_table("solvent")
    op.drop_table("process_kind")
    with op.batch_alter_table("import_batch", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_import_batch_sha256"))

    op.drop_table("import_batch")
    op.drop_table("compound")
