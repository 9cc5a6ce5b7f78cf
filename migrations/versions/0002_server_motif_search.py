"""server-side motif search column (PostgreSQL with the RDKit cartridge only)

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-02 02:50:00

On SQLite this revision does nothing. On PostgreSQL it adds ``compound.mol`` (the cartridge's
molecule type), a trigger that fills it from ``smiles_canonical`` on every write, and a GiST
index, when the ``rdkit`` extension is installed or can be created. Without the cartridge it
also does nothing; ``fluxledger server-search --enable`` adds the column later. The column is
deliberately not in ``registry.storage.models`` (migrations/env.py leaves it out of drift checks).
"""

from collections.abc import Sequence

from alembic import op

revision: str = "0002"
down_revision: str | None = "0001"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    conn = op.get_bind()
    if conn.dialect.name == "postgresql":
        from registry.pg import cartridge

        cartridge.install_mol_column(conn)


def downgrade() -> None:
    conn = op.get_bind()
    if conn.dialect.name == "postgresql":
        from registry.pg import cartridge

        cartridge.remove_mol_column(conn)
