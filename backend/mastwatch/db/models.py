"""SQLAlchemy 2 typed models: the club's records.

    site ─┬─< antenna ─┬── feedline >── cable_type
          │            ├─< sweep ─┬─< sweep_metrics   (one row per sweep × band × plane)
          │            │          └─< baseline        (history; also per antenna)
          │            ├─< baseline
          │            └─< notification (delivery queue)
          └─< event (site- or antenna-level: storm, repair, ...)

Storage follows DESIGN.md: a sweep keeps its original bytes (zlib) and its parsed
arrays as raw little-endian binary (float64 Hz, complex128 Γ); metrics are real,
indexed columns. Array and file columns are ``deferred`` so listing sweeps or reading
trends never loads them unless asked for. All timestamps are aware UTC.

``sweep_metrics`` repeats the sweep's ``antenna_id`` and ``measured_at``: the trend
query "antenna A, band B, plane P, ordered by time" is then a single range scan of
``ix_sweep_metrics_trend`` with no join to ``sweep`` (whose rows carry the arrays).
Both copies are written together by the ingest service and never change apart
(``measured_at`` edits go through the service, which updates both).
"""

from __future__ import annotations

from datetime import date, datetime
from typing import Any, ClassVar

from sqlalchemy import (
    JSON,
    Boolean,
    CheckConstraint,
    Date,
    Float,
    ForeignKey,
    Index,
    Integer,
    LargeBinary,
    MetaData,
    String,
    Text,
    UniqueConstraint,
)
from sqlalchemy.orm import DeclarativeBase, Mapped, mapped_column, relationship

from mastwatch.db.types import UTCDateTime, utcnow

NAMING_CONVENTION = {
    "ix": "ix_%(column_0_label)s",
    "uq": "uq_%(table_name)s_%(column_0_N_name)s",
    "ck": "ck_%(table_name)s_%(constraint_name)s",
    "fk": "fk_%(table_name)s_%(column_0_name)s_%(referred_table_name)s",
    "pk": "pk_%(table_name)s",
}

ANTENNA_KINDS = ("dipole", "vertical", "yagi", "loop", "end-fed", "j-pole", "collinear", "other")
REFERENCE_PLANES = ("feedpoint", "line_input")
METRIC_PLANES = ("measured", "feedpoint")
STATUSES = ("ok", "watch", "fault", "unknown")
EVENT_KINDS = ("storm", "maintenance", "repair", "modification", "note")

# The BandMetrics fields of mastwatch.rf.metrics stored as real columns of sweep_metrics.
BAND_METRIC_FIELDS = (
    "low_hz",
    "high_hz",
    "coverage",
    "min_swr",
    "min_swr_hz",
    "swr_center",
    "r_center_ohm",
    "x_center_ohm",
    "return_loss_center_db",
    "usable_fraction_2",
    "resonance_hz",
    "resonance_kind",
    "q",
    "bandwidth_2_hz",
)


def _in(values: tuple[str, ...]) -> str:
    return ", ".join(f"'{v}'" for v in values)


class Base(DeclarativeBase):
    metadata = MetaData(naming_convention=NAMING_CONVENTION)
    type_annotation_map: ClassVar[dict[Any, Any]] = {
        datetime: UTCDateTime(),
        dict[str, Any]: JSON(),
        list[Any]: JSON(),
    }


class Site(Base):
    __tablename__ = "site"

    id: Mapped[int] = mapped_column(primary_key=True)
    name: Mapped[str] = mapped_column(String(200), unique=True)
    itu_region: Mapped[int] = mapped_column(Integer)
    locator: Mapped[str | None] = mapped_column(String(10))
    timezone: Mapped[str] = mapped_column(String(64), default="UTC")
    notes: Mapped[str] = mapped_column(Text, default="")
    created_at: Mapped[datetime] = mapped_column(default=utcnow)

    antennas: Mapped[list[Antenna]] = relationship(
        back_populates="site", order_by="Antenna.name", passive_deletes=True
    )

    __table_args__ = (CheckConstraint("itu_region IN (1, 2, 3)", name="itu_region"),)


class Antenna(Base):
    __tablename__ = "antenna"

    id: Mapped[int] = mapped_column(primary_key=True)
    # RESTRICT: a site with antennas is not deleted by accident (the service says 409).
    site_id: Mapped[int] = mapped_column(ForeignKey("site.id", ondelete="RESTRICT"), index=True)
    name: Mapped[str] = mapped_column(String(200))
    kind: Mapped[str] = mapped_column(String(20))
    bands: Mapped[list[Any]] = mapped_column(default=list)
    installed_on: Mapped[date | None] = mapped_column(Date)
    notes: Mapped[str] = mapped_column(Text, default="")
    thresholds: Mapped[dict[str, Any] | None] = mapped_column()
    created_at: Mapped[datetime] = mapped_column(default=utcnow)

    site: Mapped[Site] = relationship(back_populates="antennas")
    feedline: Mapped[Feedline | None] = relationship(
        back_populates="antenna", uselist=False, passive_deletes=True, lazy="selectin"
    )

    __table_args__ = (
        UniqueConstraint("site_id", "name"),
        CheckConstraint(f"kind IN ({_in(ANTENNA_KINDS)})", name="kind"),
    )


class CableType(Base):
    """A transmission line model; ``builtin`` rows mirror mastwatch.rf's catalog."""

    __tablename__ = "cable_type"

    id: Mapped[int] = mapped_column(primary_key=True)
    name: Mapped[str] = mapped_column(String(100), unique=True)
    z0_ohm: Mapped[float] = mapped_column(Float)
    velocity_factor: Mapped[float] = mapped_column(Float)
    k0: Mapped[float] = mapped_column(Float, default=0.0)
    k1: Mapped[float] = mapped_column(Float)
    k2: Mapped[float] = mapped_column(Float)
    kind: Mapped[str] = mapped_column(String(20), default="coax")
    source: Mapped[str] = mapped_column(Text, default="")
    builtin: Mapped[bool] = mapped_column(Boolean, default=False)
    # User types: the measured loss points the k's were fitted to, [[f_hz, dB/100 m], ...].
    measured_points: Mapped[list[Any] | None] = mapped_column()
    created_at: Mapped[datetime] = mapped_column(default=utcnow)

    __table_args__ = (
        CheckConstraint("velocity_factor > 0 AND velocity_factor <= 1", name="velocity_factor"),
        CheckConstraint("z0_ohm > 0", name="z0_ohm"),
    )


class Feedline(Base):
    """The antenna's current feedline (sweeps keep a snapshot of the one they used)."""

    __tablename__ = "feedline"

    id: Mapped[int] = mapped_column(primary_key=True)
    antenna_id: Mapped[int] = mapped_column(
        ForeignKey("antenna.id", ondelete="CASCADE"), unique=True
    )
    cable_type_id: Mapped[int] = mapped_column(
        ForeignKey("cable_type.id", ondelete="RESTRICT"), index=True
    )
    length_m: Mapped[float] = mapped_column(Float)
    connectors: Mapped[int] = mapped_column(Integer, default=0)
    connector_loss_db: Mapped[float | None] = mapped_column(Float)
    notes: Mapped[str] = mapped_column(Text, default="")
    updated_at: Mapped[datetime] = mapped_column(default=utcnow, onupdate=utcnow)

    antenna: Mapped[Antenna] = relationship(back_populates="feedline")
    cable_type: Mapped[CableType] = relationship(lazy="joined")

    __table_args__ = (
        CheckConstraint("length_m > 0", name="length_m"),
        CheckConstraint("connectors >= 0", name="connectors"),
    )


class Sweep(Base):
    __tablename__ = "sweep"

    id: Mapped[int] = mapped_column(primary_key=True)
    antenna_id: Mapped[int] = mapped_column(ForeignKey("antenna.id", ondelete="CASCADE"))
    measured_at: Mapped[datetime] = mapped_column()
    measured_at_source: Mapped[str] = mapped_column(String(10), default="form")
    uploaded_at: Mapped[datetime] = mapped_column(default=utcnow)
    reference_plane: Mapped[str] = mapped_column(String(12))
    operator: Mapped[str] = mapped_column(String(100), default="")
    conditions: Mapped[str] = mapped_column(Text, default="")
    notes: Mapped[str] = mapped_column(Text, default="")
    filename: Mapped[str] = mapped_column(String(255))
    file_format: Mapped[str | None] = mapped_column(String(20))
    original_size: Mapped[int] = mapped_column(Integer)
    sha256: Mapped[str] = mapped_column(String(64))
    original: Mapped[bytes] = mapped_column(LargeBinary, deferred=True)  # zlib
    freq_hz: Mapped[bytes] = mapped_column(LargeBinary, deferred=True)  # '<f8'
    gamma: Mapped[bytes] = mapped_column(LargeBinary, deferred=True)  # '<c16', measured plane
    gamma_feedpoint: Mapped[bytes | None] = mapped_column(LargeBinary, deferred=True)
    z0: Mapped[float] = mapped_column(Float)
    has_phase: Mapped[bool] = mapped_column(Boolean)
    points: Mapped[int] = mapped_column(Integer)
    f_start_hz: Mapped[float] = mapped_column(Float)
    f_stop_hz: Mapped[float] = mapped_column(Float)
    min_swr: Mapped[float | None] = mapped_column(Float)  # measured plane; None = infinite
    min_swr_hz: Mapped[float | None] = mapped_column(Float)
    # The feedline as used for de-embedding (cable name, z0, VF, k's, length, connectors).
    feedline_snapshot: Mapped[dict[str, Any] | None] = mapped_column()
    # SweepMetrics.to_dict() without the bands (resonances, bandwidths...) per plane.
    summary: Mapped[dict[str, Any]] = mapped_column(default=dict)
    status: Mapped[str | None] = mapped_column(String(10))
    status_reasons: Mapped[list[Any]] = mapped_column(default=list)

    antenna: Mapped[Antenna] = relationship()
    metrics: Mapped[list[SweepMetrics]] = relationship(
        back_populates="sweep",
        passive_deletes=True,
        order_by="(SweepMetrics.plane, SweepMetrics.low_hz)",
    )

    @property
    def has_feedpoint(self) -> bool:
        """Whether a feedpoint view exists (measured there, or de-embedded)."""
        return self.summary.get("feedpoint") is not None

    __table_args__ = (
        UniqueConstraint("antenna_id", "sha256"),
        # Covers the health hook's reads of an antenna's timeline (previous sweep, the
        # drift window: id and status by time): on SQLite, status sits after the array
        # blobs in the row, and reading it from the table walks their overflow pages.
        Index("ix_sweep_antenna_measured", "antenna_id", "measured_at", "id", "status"),
        CheckConstraint(f"reference_plane IN ({_in(REFERENCE_PLANES)})", name="reference_plane"),
        CheckConstraint(f"status IS NULL OR status IN ({_in(STATUSES)})", name="status"),
    )


class SweepMetrics(Base):
    """One band's metrics of one sweep at one plane (``measured`` or ``feedpoint``)."""

    __tablename__ = "sweep_metrics"

    id: Mapped[int] = mapped_column(primary_key=True)
    sweep_id: Mapped[int] = mapped_column(ForeignKey("sweep.id", ondelete="CASCADE"))
    antenna_id: Mapped[int] = mapped_column(ForeignKey("antenna.id", ondelete="CASCADE"))
    measured_at: Mapped[datetime] = mapped_column()
    band: Mapped[str] = mapped_column(String(16))
    plane: Mapped[str] = mapped_column(String(10))
    low_hz: Mapped[float] = mapped_column(Float)
    high_hz: Mapped[float] = mapped_column(Float)
    coverage: Mapped[float] = mapped_column(Float)
    min_swr: Mapped[float | None] = mapped_column(Float)
    min_swr_hz: Mapped[float | None] = mapped_column(Float)
    swr_center: Mapped[float | None] = mapped_column(Float)
    r_center_ohm: Mapped[float | None] = mapped_column(Float)
    x_center_ohm: Mapped[float | None] = mapped_column(Float)
    return_loss_center_db: Mapped[float | None] = mapped_column(Float)
    usable_fraction_2: Mapped[float | None] = mapped_column(Float)
    resonance_hz: Mapped[float | None] = mapped_column(Float)
    resonance_kind: Mapped[str | None] = mapped_column(String(10))
    q: Mapped[float | None] = mapped_column(Float)
    bandwidth_2_hz: Mapped[float | None] = mapped_column(Float)

    sweep: Mapped[Sweep] = relationship(back_populates="metrics")

    __table_args__ = (
        # Also serves "all rows of one sweep" (sweep_id is its first column).
        UniqueConstraint("sweep_id", "band", "plane"),
        # sweep_id last: the trend's ORDER BY measured_at, sweep_id is read off the index
        # with no sort step.
        Index("ix_sweep_metrics_trend", "antenna_id", "band", "plane", "measured_at", "sweep_id"),
        CheckConstraint(f"plane IN ({_in(METRIC_PLANES)})", name="plane"),
    )


class Baseline(Base):
    """Which sweep an antenna was judged against, and when (history: ended_at set on change)."""

    __tablename__ = "baseline"

    id: Mapped[int] = mapped_column(primary_key=True)
    antenna_id: Mapped[int] = mapped_column(
        ForeignKey("antenna.id", ondelete="CASCADE"), index=True
    )
    # NO ACTION: deleting a baseline sweep is refused by the service (409), yet deleting
    # the whole antenna (which cascades to both tables in one statement) still works.
    sweep_id: Mapped[int] = mapped_column(ForeignKey("sweep.id", ondelete="NO ACTION"), index=True)
    bands: Mapped[list[Any] | None] = mapped_column()  # None: all the antenna's bands
    confirmed: Mapped[bool] = mapped_column(Boolean, default=True)
    set_at: Mapped[datetime] = mapped_column(default=utcnow)
    ended_at: Mapped[datetime | None] = mapped_column()
    reason: Mapped[str] = mapped_column(Text, default="")


class Event(Base):
    """A dated entry in a site's or an antenna's history (storm, repair, ...)."""

    __tablename__ = "event"

    id: Mapped[int] = mapped_column(primary_key=True)
    site_id: Mapped[int | None] = mapped_column(
        ForeignKey("site.id", ondelete="CASCADE"), index=True
    )
    antenna_id: Mapped[int | None] = mapped_column(
        ForeignKey("antenna.id", ondelete="CASCADE"), index=True
    )
    kind: Mapped[str] = mapped_column(String(20))
    occurred_at: Mapped[datetime] = mapped_column()
    title: Mapped[str] = mapped_column(String(200))
    notes: Mapped[str] = mapped_column(Text, default="")
    created_at: Mapped[datetime] = mapped_column(default=utcnow)

    __table_args__ = (
        CheckConstraint(f"kind IN ({_in(EVENT_KINDS)})", name="kind"),
        CheckConstraint("site_id IS NOT NULL OR antenna_id IS NOT NULL", name="owner"),
    )


class Notification(Base):
    """An outgoing message (webhook or e-mail) waiting for delivery, with its attempts."""

    __tablename__ = "notification"

    id: Mapped[int] = mapped_column(primary_key=True)
    antenna_id: Mapped[int | None] = mapped_column(
        ForeignKey("antenna.id", ondelete="CASCADE"), index=True
    )
    sweep_id: Mapped[int | None] = mapped_column(ForeignKey("sweep.id", ondelete="SET NULL"))
    channel: Mapped[str] = mapped_column(String(20))  # "webhook" | "email"
    payload: Mapped[dict[str, Any]] = mapped_column()
    state: Mapped[str] = mapped_column(String(10), default="pending")  # pending|sent|failed
    attempts: Mapped[int] = mapped_column(Integer, default=0)
    next_attempt_at: Mapped[datetime] = mapped_column(default=utcnow)
    last_error: Mapped[str | None] = mapped_column(Text)
    created_at: Mapped[datetime] = mapped_column(default=utcnow)
    sent_at: Mapped[datetime | None] = mapped_column()

    __table_args__ = (Index("ix_notification_due", "state", "next_attempt_at"),)
