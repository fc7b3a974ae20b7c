"""Sweep timeline index covers id and status (the health hook reads no table rows).

Revision ID: 0003
Revises: 0002
Create Date: 2026-12-02 15:30:00
"""

from collections.abc import Sequence

from alembic import op

revision: str = "0003"
down_revision: str | Sequence[str] | None = "0002"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("sweep", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_antenna_measured")
        batch_op.create_index(
            "ix_sweep_antenna_measured",
            ["antenna_id", "measured_at", "id", "status"],
            unique=False,
        )


def downgrade() -> None:
    with op.batch_alter_table("sweep", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_antenna_measured")
        batch_op.create_index(
            "ix_sweep_antenna_measured", ["antenna_id", "measured_at"], unique=False
        )
