"""how a computed barrier was computed: level of theory and standard state

Revision ID: 0007
Revises: 0005
Create Date: 2026-12-05 02:40:00

``measurement`` gains the level of theory of a computed barrier as written
(``theory_level``), its structured parts (``theory_method``, ``theory_basis``,
``theory_solvation``, ``theory_conformers``) and the standard state it refers to
(``standard_state``: 1 M, 1 atm or 1 bar; see ``registry.record.theory``). Existing rows get
NULL: unspecified. Plain ``ADD COLUMN`` (no table rebuild on SQLite, so the change-counter
triggers of 0003 stay).
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0007"
down_revision: str | None = "0005"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

_COLUMNS = (
    ("theory_level", sa.Text()),
    ("theory_method", sa.Text()),
    ("theory_basis", sa.Text()),
    ("theory_solvation", sa.Text()),
    ("theory_conformers", sa.Text()),
    ("standard_state", sa.String(length=8)),
)


def upgrade() -> None:
    for name, kind in _COLUMNS:
        op.add_column("measurement", sa.Column(name, kind, nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("measurement") as batch:
        for name, _ in reversed(_COLUMNS):
            batch.drop_column(name)
