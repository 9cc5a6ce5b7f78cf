"""rate-constant conventions, temperature calibration, and separate water and heavy water

Revision ID: 0005
Revises: 0004
Create Date: 2026-12-05 02:00:00

* ``measurement`` gains what a barrier's rate constant is (see
  ``registry.record.conventions``): ``k_convention`` (per-site, exchange, observed,
  enantiomerization, racemization), ``path_degeneracy``, ``kappa`` (+ text),
  ``reaction_order`` and ``concentration_m`` (+ error, text) for a bimolecular exchange,
  ``dg_direction`` (which direction an unequal-population barrier refers to), the probe
  temperature's calibration (``t_calibration``, its text, ``t_calibration_err_k``) and the
  correlation of ΔH‡ and ΔS‡ (``dh_ds_corr`` + text). Existing rows get NULL everywhere:
  unspecified, never a guess. Plain ``ADD COLUMN`` (no table rebuild on SQLite, so the
  change-counter triggers of 0003 stay).
* Solvents: ordinary water (H2O) becomes a solvent of its own; the spelling ``water`` no
  longer names deuterium oxide, whose melting and boiling points are the CRC values
  (3.82 °C, 101.42 °C); DMSO-d6 gets its own melting point (20.2 °C) instead of the parent's.
  Rows still holding the older seed values are corrected; a value a group changed is kept.
  Measurements whose solvent text is ``water`` or ``H2O`` and were linked to D2O are linked
  to water (only where no stored alias of the group says ``water`` means D2O).
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

from registry.record.spelling import fold
from registry.record.vocab import SEED_CORRECTIONS, SOLVENTS, seed_reference_data

revision: str = "0005"
down_revision: str | None = "0004"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

#: the new measurement columns: name → type (all nullable)
_COLUMNS = (
    ("k_convention", sa.String(length=32)),
    ("path_degeneracy", sa.Integer()),
    ("kappa", sa.Float()),
    ("kappa_text", sa.Text()),
    ("reaction_order", sa.Integer()),
    ("concentration_m", sa.Float()),
    ("concentration_err_m", sa.Float()),
    ("concentration_text", sa.Text()),
    ("dg_direction", sa.String(length=16)),
    ("t_calibration", sa.String(length=32)),
    ("t_calibration_text", sa.Text()),
    ("t_calibration_err_k", sa.Float()),
    ("dh_ds_corr", sa.Float()),
    ("dh_ds_corr_text", sa.Text()),
)


def upgrade() -> None:
    for name, kind in _COLUMNS:
        op.add_column("measurement", sa.Column(name, kind, nullable=True))
    bind = op.get_bind()
    seed_reference_data(bind)  # inserts water (H2O) where it is missing
    _correct_seed_rows(bind)
    _relink_water(bind)


def _correct_seed_rows(bind: sa.engine.Connection) -> None:
    """Rows still as the older seed wrote them get the current values (and sources)."""
    current = {name: (mp, bp, src, "|".join(aliases))
               for name, _f, _d, mp, bp, src, aliases in SOLVENTS}  # fmt: skip
    for name, (old_mp, old_bp, old_aliases) in SEED_CORRECTIONS.items():
        mp, bp, src, aliases = current[name]
        row = bind.execute(
            sa.text("SELECT id, mp_k, bp_k, aliases FROM solvent WHERE name = :name"),
            {"name": name},
        ).first()
        if row is None:
            continue
        changes = {}
        if row[1] is not None and abs(row[1] - round(old_mp + 273.15, 2)) < 1e-6:
            changes["mp_k"] = round(mp + 273.15, 2)
        if row[2] is not None and abs(row[2] - round(old_bp + 273.15, 2)) < 1e-6:
            changes["bp_k"] = round(bp + 273.15, 2)
        if row[3] == old_aliases:
            changes["aliases"] = aliases
        if changes:
            changes["source"] = src
            sets = ", ".join(f"{k} = :{k}" for k in changes)
            bind.execute(sa.text(f"UPDATE solvent SET {sets} WHERE id = :id"),
                         {**changes, "id": row[0]})  # fmt: skip


def _relink_water(bind: sa.engine.Connection) -> None:
    """Measurements of 'water' that the old alias linked to D2O now name H2O."""
    ids = dict(bind.execute(sa.text("SELECT name, id FROM solvent")).all())
    d2o, water = ids.get("deuterium oxide"), ids.get("water")
    if d2o is None or water is None:
        return
    kept = bind.execute(sa.text("SELECT alias FROM vocab_alias WHERE kind = 'solvent'")).scalars()
    if any(fold(a) in ("water", "h2o") for a in kept):
        return  # the group said what 'water' means in its registry
    rows = bind.execute(
        sa.text("SELECT id, solvent_text FROM measurement WHERE solvent_id = :d2o"), {"d2o": d2o}
    ).all()
    moved = [
        {"id": mid, "water": water} for mid, text in rows if fold(text or "") in ("water", "h2o")
    ]
    if moved:
        bind.execute(sa.text("UPDATE measurement SET solvent_id = :water WHERE id = :id"), moved)


def downgrade() -> None:
    with op.batch_alter_table("measurement") as batch_op:
        for name, _kind in reversed(_COLUMNS):
            batch_op.drop_column(name)
