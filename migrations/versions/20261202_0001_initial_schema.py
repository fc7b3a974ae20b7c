"""Initial schema: sites, antennas, cable types, feedlines, sweeps, metrics, baselines,
events, notifications.

Revision ID: 0001
Revises:
Create Date: 2026-12-02 10:00:14.664983
"""

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

import mastwatch.db.types

revision: str = "0001"
down_revision: str | Sequence[str] | None = None
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    op.create_table(
        "cable_type",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=100), nullable=False),
        sa.Column("z0_ohm", sa.Float(), nullable=False),
        sa.Column("velocity_factor", sa.Float(), nullable=False),
        sa.Column("k0", sa.Float(), nullable=False),
        sa.Column("k1", sa.Float(), nullable=False),
        sa.Column("k2", sa.Float(), nullable=False),
        sa.Column("kind", sa.String(length=20), nullable=False),
        sa.Column("source", sa.Text(), nullable=False),
        sa.Column("builtin", sa.Boolean(), nullable=False),
        sa.Column("measured_points", sa.JSON(), nullable=True),
        sa.Column("created_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.CheckConstraint(
            "velocity_factor > 0 AND velocity_factor <= 1",
            name=op.f("ck_cable_type_velocity_factor"),
        ),
        sa.CheckConstraint("z0_ohm > 0", name=op.f("ck_cable_type_z0_ohm")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_cable_type")),
        sa.UniqueConstraint("name", name=op.f("uq_cable_type_name")),
    )
    op.create_table(
        "site",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=200), nullable=False),
        sa.Column("itu_region", sa.Integer(), nullable=False),
        sa.Column("locator", sa.String(length=10), nullable=True),
        sa.Column("timezone", sa.String(length=64), nullable=False),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("created_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.CheckConstraint("itu_region IN (1, 2, 3)", name=op.f("ck_site_itu_region")),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_site")),
        sa.UniqueConstraint("name", name=op.f("uq_site_name")),
    )
    op.create_table(
        "antenna",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=False),
        sa.Column("name", sa.String(length=200), nullable=False),
        sa.Column("kind", sa.String(length=20), nullable=False),
        sa.Column("bands", sa.JSON(), nullable=False),
        sa.Column("installed_on", sa.Date(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("thresholds", sa.JSON(), nullable=True),
        sa.Column("created_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.CheckConstraint(
            "kind IN ('dipole', 'vertical', 'yagi', 'loop', 'end-fed', 'j-pole', 'collinear', "
            "'other')",
            name=op.f("ck_antenna_kind"),
        ),
        sa.ForeignKeyConstraint(
            ["site_id"], ["site.id"], name=op.f("fk_antenna_site_id_site"), ondelete="RESTRICT"
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_antenna")),
        sa.UniqueConstraint("site_id", "name", name=op.f("uq_antenna_site_id_name")),
    )
    with op.batch_alter_table("antenna", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_antenna_site_id"), ["site_id"], unique=False)

    op.create_table(
        "event",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("site_id", sa.Integer(), nullable=True),
        sa.Column("antenna_id", sa.Integer(), nullable=True),
        sa.Column("kind", sa.String(length=20), nullable=False),
        sa.Column("occurred_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("title", sa.String(length=200), nullable=False),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("created_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.CheckConstraint(
            "kind IN ('storm', 'maintenance', 'repair', 'modification', 'note')",
            name=op.f("ck_event_kind"),
        ),
        sa.CheckConstraint(
            "site_id IS NOT NULL OR antenna_id IS NOT NULL", name=op.f("ck_event_owner")
        ),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_event_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["site_id"], ["site.id"], name=op.f("fk_event_site_id_site"), ondelete="CASCADE"
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_event")),
    )
    with op.batch_alter_table("event", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_event_antenna_id"), ["antenna_id"], unique=False)
        batch_op.create_index(batch_op.f("ix_event_site_id"), ["site_id"], unique=False)

    op.create_table(
        "feedline",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("antenna_id", sa.Integer(), nullable=False),
        sa.Column("cable_type_id", sa.Integer(), nullable=False),
        sa.Column("length_m", sa.Float(), nullable=False),
        sa.Column("connectors", sa.Integer(), nullable=False),
        sa.Column("connector_loss_db", sa.Float(), nullable=True),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("updated_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.CheckConstraint("connectors >= 0", name=op.f("ck_feedline_connectors")),
        sa.CheckConstraint("length_m > 0", name=op.f("ck_feedline_length_m")),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_feedline_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["cable_type_id"],
            ["cable_type.id"],
            name=op.f("fk_feedline_cable_type_id_cable_type"),
            ondelete="RESTRICT",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_feedline")),
        sa.UniqueConstraint("antenna_id", name=op.f("uq_feedline_antenna_id")),
    )
    with op.batch_alter_table("feedline", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_feedline_cable_type_id"), ["cable_type_id"], unique=False
        )

    op.create_table(
        "sweep",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("antenna_id", sa.Integer(), nullable=False),
        sa.Column("measured_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("measured_at_source", sa.String(length=10), nullable=False),
        sa.Column("uploaded_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("reference_plane", sa.String(length=12), nullable=False),
        sa.Column("operator", sa.String(length=100), nullable=False),
        sa.Column("conditions", sa.Text(), nullable=False),
        sa.Column("notes", sa.Text(), nullable=False),
        sa.Column("filename", sa.String(length=255), nullable=False),
        sa.Column("file_format", sa.String(length=20), nullable=True),
        sa.Column("original_size", sa.Integer(), nullable=False),
        sa.Column("sha256", sa.String(length=64), nullable=False),
        sa.Column("original", sa.LargeBinary(), nullable=False),
        sa.Column("freq_hz", sa.LargeBinary(), nullable=False),
        sa.Column("gamma", sa.LargeBinary(), nullable=False),
        sa.Column("gamma_feedpoint", sa.LargeBinary(), nullable=True),
        sa.Column("z0", sa.Float(), nullable=False),
        sa.Column("has_phase", sa.Boolean(), nullable=False),
        sa.Column("points", sa.Integer(), nullable=False),
        sa.Column("f_start_hz", sa.Float(), nullable=False),
        sa.Column("f_stop_hz", sa.Float(), nullable=False),
        sa.Column("min_swr", sa.Float(), nullable=True),
        sa.Column("min_swr_hz", sa.Float(), nullable=True),
        sa.Column("feedline_snapshot", sa.JSON(), nullable=True),
        sa.Column("summary", sa.JSON(), nullable=False),
        sa.Column("status", sa.String(length=10), nullable=True),
        sa.Column("status_reasons", sa.JSON(), nullable=False),
        sa.CheckConstraint(
            "reference_plane IN ('feedpoint', 'line_input')", name=op.f("ck_sweep_reference_plane")
        ),
        sa.CheckConstraint(
            "status IS NULL OR status IN ('ok', 'watch', 'fault', 'unknown')",
            name=op.f("ck_sweep_status"),
        ),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_sweep_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_sweep")),
        sa.UniqueConstraint("antenna_id", "sha256", name=op.f("uq_sweep_antenna_id_sha256")),
    )
    with op.batch_alter_table("sweep", schema=None) as batch_op:
        batch_op.create_index(
            "ix_sweep_antenna_measured", ["antenna_id", "measured_at"], unique=False
        )

    op.create_table(
        "baseline",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("antenna_id", sa.Integer(), nullable=False),
        sa.Column("sweep_id", sa.Integer(), nullable=False),
        sa.Column("bands", sa.JSON(), nullable=True),
        sa.Column("confirmed", sa.Boolean(), nullable=False),
        sa.Column("set_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("ended_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=True),
        sa.Column("reason", sa.Text(), nullable=False),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_baseline_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["sweep_id"],
            ["sweep.id"],
            name=op.f("fk_baseline_sweep_id_sweep"),
            ondelete="NO ACTION",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_baseline")),
    )
    with op.batch_alter_table("baseline", schema=None) as batch_op:
        batch_op.create_index(batch_op.f("ix_baseline_antenna_id"), ["antenna_id"], unique=False)
        batch_op.create_index(batch_op.f("ix_baseline_sweep_id"), ["sweep_id"], unique=False)

    op.create_table(
        "notification",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("antenna_id", sa.Integer(), nullable=True),
        sa.Column("sweep_id", sa.Integer(), nullable=True),
        sa.Column("channel", sa.String(length=20), nullable=False),
        sa.Column("payload", sa.JSON(), nullable=False),
        sa.Column("state", sa.String(length=10), nullable=False),
        sa.Column("attempts", sa.Integer(), nullable=False),
        sa.Column("next_attempt_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("last_error", sa.Text(), nullable=True),
        sa.Column("created_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("sent_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=True),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_notification_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["sweep_id"],
            ["sweep.id"],
            name=op.f("fk_notification_sweep_id_sweep"),
            ondelete="SET NULL",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_notification")),
    )
    with op.batch_alter_table("notification", schema=None) as batch_op:
        batch_op.create_index(
            batch_op.f("ix_notification_antenna_id"), ["antenna_id"], unique=False
        )
        batch_op.create_index("ix_notification_due", ["state", "next_attempt_at"], unique=False)

    op.create_table(
        "sweep_metrics",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("sweep_id", sa.Integer(), nullable=False),
        sa.Column("antenna_id", sa.Integer(), nullable=False),
        sa.Column("measured_at", mastwatch.db.types.UTCDateTime(timezone=True), nullable=False),
        sa.Column("band", sa.String(length=16), nullable=False),
        sa.Column("plane", sa.String(length=10), nullable=False),
        sa.Column("low_hz", sa.Float(), nullable=False),
        sa.Column("high_hz", sa.Float(), nullable=False),
        sa.Column("coverage", sa.Float(), nullable=False),
        sa.Column("min_swr", sa.Float(), nullable=True),
        sa.Column("min_swr_hz", sa.Float(), nullable=True),
        sa.Column("swr_center", sa.Float(), nullable=True),
        sa.Column("r_center_ohm", sa.Float(), nullable=True),
        sa.Column("x_center_ohm", sa.Float(), nullable=True),
        sa.Column("return_loss_center_db", sa.Float(), nullable=True),
        sa.Column("usable_fraction_2", sa.Float(), nullable=True),
        sa.Column("resonance_hz", sa.Float(), nullable=True),
        sa.Column("resonance_kind", sa.String(length=10), nullable=True),
        sa.Column("q", sa.Float(), nullable=True),
        sa.Column("bandwidth_2_hz", sa.Float(), nullable=True),
        sa.CheckConstraint(
            "plane IN ('measured', 'feedpoint')", name=op.f("ck_sweep_metrics_plane")
        ),
        sa.ForeignKeyConstraint(
            ["antenna_id"],
            ["antenna.id"],
            name=op.f("fk_sweep_metrics_antenna_id_antenna"),
            ondelete="CASCADE",
        ),
        sa.ForeignKeyConstraint(
            ["sweep_id"],
            ["sweep.id"],
            name=op.f("fk_sweep_metrics_sweep_id_sweep"),
            ondelete="CASCADE",
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_sweep_metrics")),
        sa.UniqueConstraint(
            "sweep_id", "band", "plane", name=op.f("uq_sweep_metrics_sweep_id_band_plane")
        ),
    )
    with op.batch_alter_table("sweep_metrics", schema=None) as batch_op:
        batch_op.create_index(
            "ix_sweep_metrics_trend", ["antenna_id", "band", "plane", "measured_at"], unique=False
        )


def downgrade() -> None:
    with op.batch_alter_table("sweep_metrics", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_metrics_trend")

    op.drop_table("sweep_metrics")
    with op.batch_alter_table("notification", schema=None) as batch_op:
        batch_op.drop_index("ix_notification_due")
        batch_op.drop_index(batch_op.f("ix_notification_antenna_id"))

    op.drop_table("notification")
    with op.batch_alter_table("baseline", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_baseline_sweep_id"))
        batch_op.drop_index(batch_op.f("ix_baseline_antenna_id"))

    op.drop_table("baseline")
    with op.batch_alter_table("sweep", schema=None) as batch_op:
        batch_op.drop_index("ix_sweep_antenna_measured")

    op.drop_table("sweep")
    with op.batch_alter_table("feedline", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_feedline_cable_type_id"))

    op.drop_table("feedline")
    with op.batch_alter_table("event", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_event_site_id"))
        batch_op.drop_index(batch_op.f("ix_event_antenna_id"))

    op.drop_table("event")
    with op.batch_alter_table("antenna", schema=None) as batch_op:
        batch_op.drop_index(batch_op.f("ix_antenna_site_id"))

    op.drop_table("antenna")
    op.drop_table("site")
    op.drop_table("cable_type")
