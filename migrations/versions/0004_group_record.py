"""the group's record: a stable identity per measurement, what each import said, shared aliases

Revision ID: 0004
Revises: 0003
Create Date: 2026-12-05 00:10:00

* ``measurement.uid`` — a random identifier that travels with the measurement (exports write
  it, imports match on it first; ids are only unique within one registry). Existing rows get
  one here. A unique index, not a constraint, so SQLite needs no table rebuild (which would
  drop the change-counter triggers of 0003).
* ``import_snapshot`` — for each measurement an import wrote or matched, the texts the file
  gave per field, so that a later import of the same sheet can tell what the file changed
  from what was changed in the registry since.
* ``vocab_alias`` — spellings a group adds for methods, process kinds, solvents and nuclei,
  shared by everyone who opens the registry; their changes move the ``vocabulary`` counter.
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0004"
down_revision: str | None = "0003"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

_ALIAS_TRIGGERS = (
    ("trg_vocab_alias_vocabulary_insert", "INSERT"),
    ("trg_vocab_alias_vocabulary_update", "UPDATE"),
    ("trg_vocab_alias_vocabulary_delete", "DELETE"),
)


def upgrade() -> None:
    postgres = op.get_bind().dialect.name == "postgresql"
    op.add_column("measurement", sa.Column("uid", sa.String(length=32), nullable=True))
    if postgres:
        op.execute(
            "UPDATE measurement SET uid = md5(random()::text || id::text || clock_timestamp()::text)"
        )
    else:
        op.execute("UPDATE measurement SET uid = lower(hex(randomblob(16)))")
    op.create_index("ix_measurement_uid", "measurement", ["uid"], unique=True)

    op.create_table(
        "import_snapshot",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("measurement_id", sa.Integer(), nullable=False),
        sa.Column("batch_id", sa.Integer(), nullable=False),
        sa.Column("source_row", sa.Integer(), nullable=True),
        sa.Column("fields_json", sa.Text(), nullable=False),
        sa.ForeignKeyConstraint(
            ["batch_id"], ["import_batch.id"], name=op.f("fk_import_snapshot_batch_id_import_batch")
        ),
        sa.ForeignKeyConstraint(
            ["measurement_id"],
            ["measurement.id"],
            name=op.f("fk_import_snapshot_measurement_id_measurement"),
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_import_snapshot")),
    )
    op.create_index(
        op.f("ix_import_snapshot_measurement_id"), "import_snapshot", ["measurement_id"]
    )

    op.create_table(
        "vocab_alias",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("kind", sa.String(length=16), nullable=False),
        sa.Column("alias", sa.String(length=128), nullable=False),
        sa.Column("target", sa.String(length=128), nullable=False),
        sa.Column("created_by", sa.String(length=128), nullable=False),
        sa.Column("created_at", sa.DateTime(timezone=True), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_vocab_alias")),
        sa.UniqueConstraint("kind", "alias", name=op.f("uq_vocab_alias_kind_alias")),
    )
    for name, event in _ALIAS_TRIGGERS:
        if postgres:
            op.execute(
                f"CREATE TRIGGER {name} AFTER {event} ON vocab_alias "
                "FOR EACH STATEMENT EXECUTE FUNCTION bump_vocabulary()"
            )
        else:
            op.execute(
                f"CREATE TRIGGER {name} AFTER {event} ON vocab_alias FOR EACH ROW BEGIN "
                "UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END"
            )


def downgrade() -> None:
    postgres = op.get_bind().dialect.name == "postgresql"
    for name, _event in _ALIAS_TRIGGERS:
        op.execute(f"DROP TRIGGER IF EXISTS {name}" + (" ON vocab_alias" if postgres else ""))
    op.drop_table("vocab_alias")
    op.drop_index(op.f("ix_import_snapshot_measurement_id"), table_name="import_snapshot")
    op.drop_table("import_snapshot")
    op.drop_index("ix_measurement_uid", table_name="measurement")
    with op.batch_alter_table("measurement") as batch_op:
        batch_op.drop_column("uid")
