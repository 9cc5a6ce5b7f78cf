"""the raw data of 2D-exchange, transfer and time-course measurements

Revision ID: 0008
Revises: 0007
Create Date: 2026-12-05 02:45:00

``measurement`` gains the raw data a 2D-exchange (EXSY), saturation- or inversion-transfer
or equilibration/racemization measurement is recomputed from (see
``registry.record.rawdata``): the mixing time(s) and one peak-volume matrix per mixing time
(+ the σ of a volume, the site populations and site names); the steady-state ratio
M_ss/M0 (+ σ) and a T1 of the observed site (+ σ) with which T1 it is (``apparent`` while
the partner is saturated, or ``intrinsic``); a time course (time against ee, a fraction, or
two magnetizations after a selective inversion) with what it follows and the equilibrium
fraction if given. Each as reported (``*_text``) and read (canonical floats; lists and
matrices as JSON). Existing rows get NULL. Plain ``ADD COLUMN`` (no table rebuild on SQLite,
so the change-counter triggers of 0003 stay).
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0008"
down_revision: str | None = "0007"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

#: the new measurement columns: name → type (all nullable)
_COLUMNS = (
    ("mixing_text", sa.Text()),
    ("mixing_json", sa.Text()),
    ("volumes_text", sa.Text()),
    ("volumes_json", sa.Text()),
    ("volume_err", sa.Float()),
    ("volume_err_text", sa.Text()),
    ("populations_text", sa.Text()),
    ("populations_json", sa.Text()),
    ("site_names", sa.Text()),
    ("ss_ratio", sa.Float()),
    ("ss_ratio_err", sa.Float()),
    ("ss_ratio_text", sa.Text()),
    ("t1_s", sa.Float()),
    ("t1_err_s", sa.Float()),
    ("t1_text", sa.Text()),
    ("t1_kind", sa.String(length=16)),
    ("course_text", sa.Text()),
    ("course_json", sa.Text()),
    ("course_quantity", sa.String(length=16)),
    ("x_eq", sa.Float()),
    ("x_eq_text", sa.Text()),
)


def upgrade() -> None:
    for name, kind in _COLUMNS:
        op.add_column("measurement", sa.Column(name, kind, nullable=True))


def downgrade() -> None:
    with op.batch_alter_table("measurement") as batch_op:
        for name, _kind in reversed(_COLUMNS):
            batch_op.drop_column(name)
