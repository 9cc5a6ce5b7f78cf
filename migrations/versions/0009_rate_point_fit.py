"""how each rate point was obtained: the line-shape fit behind it

Revision ID: 0009
Revises: 0008
Create Date: 2026-12-05 03:45:00

``rate_point`` gains ``fit_json``: for a rate fitted to a spectrum, what the fit held, fitted
or tied (Δν, populations, J, the intrinsic width and where it came from, each with its error),
what made it doubtful, and the series it belongs to (the sites and populations given, the
region and reference window, Δν's drift and the populations' van 't Hoff line the spectrum was
tied to); see ``registry.lineshape.store_link``. Canonical JSON (sorted keys), so the history
holds the same text. Existing rows and rate points from sheets get NULL: nothing recorded.
Plain ``ADD COLUMN`` (no table rebuild on SQLite).
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0009"
down_revision: str | None = "0008"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.add_column("rate_point", sa.Column("fit_json", sa.Text(), nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("rate_point") as batch_op:
        batch_op.drop_column("fit_json")
