"""Trend index ends with sweep_id, so the trend's ORDER BY needs no sort step.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-02 10:40:00
"""

from collections.abc import Sequence

from alembic import op

revision: str = "0002"
down_revision: str | Sequence[str] | None = "0001"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    with op.batch_alter_table("sweep_metrics", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_metrics_trend")
        batch_op.create_index(
            "ix_sweep_metrics_trend",
            ["antenna_id", "band", "plane", "measured_at", "sweep_id"],
            unique=False,
        )


def downgrade() -> None:
    with op.batch_alter_table("sweep_metrics", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_metrics_trend")
        batch_op.create_index(
            "ix_sweep_metrics_trend", ["antenna_id", "band", "plane", "measured_at"], unique=False
        )
