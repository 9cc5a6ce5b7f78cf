"""change counters kept by triggers, so that caches see every change (plain SQL included)

Revision ID: 0003
Revises: 0002
Create Date: 2026-12-04 23:00:00

``change_counter`` holds one row per kind of change; triggers add one to it whenever a row is
updated or deleted (and, for the reference tables, inserted):

* ``structure``  — a compound's structure columns change, or a compound is deleted;
* ``listing``    — any measurement, compound or process row is updated or deleted;
* ``vocabulary`` — a solvent or process kind is added, changed or removed.

New rows of the big tables fire no trigger (an import adds 100,000 of them): a cache notices
them by the table's row count and largest id. SQLite triggers run per row, PostgreSQL's per
statement; both move the counter whenever something changed.
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0003"
down_revision: str | None = "0002"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

COUNTERS = ("structure", "listing", "vocabulary")

#: (trigger name, event, table, counter)
TRIGGERS = (
    ("trg_compound_structure_update",
     "UPDATE OF smiles_canonical, mol_binary, pattern_fp, structure_ok", "compound", "structure"),
    ("trg_compound_structure_delete", "DELETE", "compound", "structure"),
    ("trg_compound_listing_update", "UPDATE", "compound", "listing"),
    ("trg_compound_listing_delete", "DELETE", "compound", "listing"),
    ("trg_measurement_listing_update", "UPDATE", "measurement", "listing"),
    ("trg_measurement_listing_delete", "DELETE", "measurement", "listing"),
    ("trg_process_listing_update", "UPDATE", "process", "listing"),
    ("trg_process_listing_delete", "DELETE", "process", "listing"),
    ("trg_solvent_vocabulary_insert", "INSERT", "solvent", "vocabulary"),
    ("trg_solvent_vocabulary_update", "UPDATE", "solvent", "vocabulary"),
    ("trg_solvent_vocabulary_delete", "DELETE", "solvent", "vocabulary"),
    ("trg_process_kind_vocabulary_insert", "INSERT", "process_kind", "vocabulary"),
    ("trg_process_kind_vocabulary_update", "UPDATE", "process_kind", "vocabulary"),
    ("trg_process_kind_vocabulary_delete", "DELETE", "process_kind", "vocabulary"),
)  # fmt: skip


def upgrade() -> None:
    op.create_table(
        "change_counter",
        sa.Column("name", sa.String(length=32), nullable=False),
        sa.Column("n", sa.BigInteger(), nullable=False),
        sa.PrimaryKeyConstraint("name", name=op.f("pk_change_counter")),
    )
    op.bulk_insert(
        sa.table("change_counter", sa.column("name", sa.String), sa.column("n", sa.BigInteger)),
        [{"name": name, "n": 0} for name in COUNTERS],
    )
    postgres = op.get_bind().dialect.name == "postgresql"
    if postgres:
        for counter in COUNTERS:
            op.execute(
                f"CREATE FUNCTION bump_{counter}() RETURNS trigger LANGUAGE plpgsql AS $$ "
                f"BEGIN UPDATE change_counter SET n = n + 1 WHERE name = '{counter}'; "
                "RETURN NULL; END $$"
            )
    for name, event, table, counter in TRIGGERS:
        if postgres:
            op.execute(
                f"CREATE TRIGGER {name} AFTER {event} ON {table} "
                f"FOR EACH STATEMENT EXECUTE FUNCTION bump_{counter}()"
            )
        else:
            op.execute(
                f"CREATE TRIGGER {name} AFTER {event} ON {table} FOR EACH ROW BEGIN "
                f"UPDATE change_counter SET n = n + 1 WHERE name = '{counter}'; END"
            )


def downgrade() -> None:
    postgres = op.get_bind().dialect.name == "postgresql"
    for name, _event, table, _counter in TRIGGERS:
        op.execute(f"DROP TRIGGER IF EXISTS {name}" + (f" ON {table}" if postgres else ""))
    if postgres:
        for counter in COUNTERS:
            op.execute(f"DROP FUNCTION IF EXISTS bump_{counter}()")
    op.drop_table("change_counter")
