"""Notifications when an antenna's verdict changes: a signed webhook and/or an e-mail.

    upload transaction ── judge_sweep ── verdict changed? ── queue_verdict_change()
                                                              (notification rows, same
                                                               transaction as the sweep)
    after commit ── deliver_pending(session, settings) ── webhook: JSON POST, signed
                    (worker thread / any caller)          e-mail: SMTP (smtplib)

Queueing inside the upload's transaction and sending after the commit means a failed
delivery never loses or blocks the upload, and an upload that rolls back sends nothing.
Only channels configured in the settings get a row: with neither a webhook nor SMTP set
up nothing is queued (the verdict itself is stored with the sweep all the same), so no
row waits for a worker that never runs, and switching a channel on later does not send
a backlog of old news. The settings come from the session (``bind_settings``: the app
binds its own); a session without them, as in the CLI, uses :func:`get_settings`.

Each delivery run claims due rows with a conditional UPDATE (a lease on
``next_attempt_at``), so two workers never send the same row; a row is marked ``sent``
once, after its channel accepted it. Failures are logged and retried: within a run up to
``attempts`` times with exponential backoff (``backoff_s`` · 2ⁿ), then again in later
runs (``retry_after_s`` · 2ⁿ) until ``MAX_ROUNDS`` runs failed (state ``failed``).
Rows of a channel switched off after they were queued are marked ``skipped``: by a
delivery run, and by :func:`skip_unconfigured` when the app starts (both channels are
off by default).

Webhook body: the JSON payload, UTF-8, keys sorted; header ``X-Mastwatch-Signature:
sha256=<hex HMAC-SHA256 of the exact body with MASTWATCH_WEBHOOK_SECRET>`` (receivers
recompute it and compare in constant time, e.g. ``hmac.compare_digest``).
"""

from __future__ import annotations

import hashlib
import hmac
import json
import logging
import smtplib
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from datetime import datetime, timedelta
from email.message import EmailMessage
from typing import Any

import httpx
from sqlalchemy import select, update
from sqlalchemy.orm import Session, sessionmaker

from mastwatch.db.models import Antenna, Notification
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.services.health import SAFETY_CAUTIONS
from mastwatch.settings import Settings, get_settings

log = logging.getLogger(__name__)

SIGNATURE_HEADER = "X-Mastwatch-Signature"
CHANNELS = ("webhook", "email")
MAX_ROUNDS = 8
LEASE = timedelta(minutes=5)
SETTINGS_INFO_KEY = "mastwatch.settings"  # in Session.info: whose channels to queue for
SAFETY_NOTE = " ".join(SAFETY_CAUTIONS)


class DeliveryError(Exception):
    """A channel refused or could not take a message (the text says which and why)."""


def body_bytes(payload: dict[str, Any]) -> bytes:
    """The exact bytes that are sent and signed."""
    return json.dumps(payload, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode()


def sign(body: bytes, secret: str) -> str:
    """``sha256=<hex>``: HMAC-SHA256 of ``body`` keyed with ``secret``."""
    return "sha256=" + hmac.new(secret.encode(), body, hashlib.sha256).hexdigest()


def verify(body: bytes, secret: str, header: str) -> bool:
    """Receiver side: does ``header`` sign ``body``? (constant-time comparison)"""
    return hmac.compare_digest(sign(body, secret), header)


# -- which channels are on ---------------------------------------------------------------


def channel_enabled(settings: Settings, channel: str) -> bool:
    if channel == "webhook":
        return bool(settings.webhook_url)
    if channel == "email":
        return bool(settings.smtp_host and settings.smtp_to)
    return False


def enabled_channels(settings: Settings) -> tuple[str, ...]:
    """The channels these settings can deliver on, in CHANNELS order (may be empty)."""
    return tuple(c for c in CHANNELS if channel_enabled(settings, c))


def bind_settings(maker: sessionmaker[Session], settings: Settings) -> None:
    """Sessions from ``maker`` queue notifications for the channels of ``settings``."""
    maker.configure(info={SETTINGS_INFO_KEY: settings})


def settings_of(session: Session) -> Settings:
    """The settings bound to ``session``, else those of the environment (the CLI's)."""
    bound = session.info.get(SETTINGS_INFO_KEY)
    return bound if isinstance(bound, Settings) else get_settings()


# -- queueing (inside the upload transaction) -------------------------------------------


def verdict_payload(
    antenna: Antenna,
    sweep: SweepRow,
    old_status: str | None,
    new_status: str,
    reasons: list[str],
) -> dict[str, Any]:
    return {
        "event": "verdict_changed",
        "antenna": {
            "id": antenna.id,
            "name": antenna.name,
            "site_id": antenna.site_id,
            "site": antenna.site.name,
        },
        "sweep": {"id": sweep.id, "measured_at": sweep.measured_at.isoformat()},
        "old_status": old_status,
        "new_status": new_status,
        "reasons": list(reasons),
        "safety": SAFETY_NOTE if new_status == "fault" else None,
    }


def queue_verdict_change(
    session: Session,
    antenna: Antenna,
    sweep: SweepRow,
    old_status: str | None,
    new_status: str,
    reasons: list[str],
) -> list[Notification]:
    """Add one notification row per configured channel (not committed: the caller's
    transaction). No channel configured: nothing is added and ``[]`` returned."""
    channels = enabled_channels(settings_of(session))
    if not channels:
        return []
    payload = verdict_payload(antenna, sweep, old_status, new_status, reasons)
    rows = [
        Notification(
            antenna_id=antenna.id,
            sweep_id=sweep.id,
            channel=channel,
            payload=payload,
            state="pending",
            attempts=0,
            next_attempt_at=utcnow(),
        )
        for channel in channels
    ]
    session.add_all(rows)
    return rows


def skip_unconfigured(session: Session, settings: Settings) -> int:
    """Mark ``skipped`` every pending row of a channel that ``settings`` has off (rows
    queued before it was switched off, or before queueing checked the settings); commits.
    Returns how many rows were marked."""
    marked = 0
    for channel in CHANNELS:
        if channel_enabled(settings, channel):
            continue
        result = session.execute(
            update(Notification)
            .where(Notification.state == "pending", Notification.channel == channel)
            .values(state="skipped", last_error=f"{channel} is not configured")
            .execution_options(synchronize_session=False)
        )
        marked += getattr(result, "rowcount", 0) or 0
    session.commit()
    return marked


# -- channels -----------------------------------------------------------------------------


def post_webhook(
    url: str,
    payload: dict[str, Any],
    secret: str | None,
    *,
    attempts: int = 3,
    backoff_s: float = 1.0,
    timeout_s: float = 10.0,
    sleep: Callable[[float], None] = time.sleep,
) -> int:
    """POST the signed payload; retry with exponential backoff. Returns the attempts used.

    Any 2xx is success; anything else (or a network error) is retried, and after the
    last attempt raised as DeliveryError.
    """
    body = body_bytes(payload)
    headers = {"Content-Type": "application/json", "User-Agent": "mastwatch-notify"}
    if secret:
        headers[SIGNATURE_HEADER] = sign(body, secret)
    last = ""
    for attempt in range(1, attempts + 1):
        try:
            resp = httpx.post(url, content=body, headers=headers, timeout=timeout_s)
            if 200 <= resp.status_code < 300:
                return attempt
            last = f"HTTP {resp.status_code}"
        except httpx.HTTPError as exc:
            last = f"{type(exc).__name__}: {exc}"
        log.warning("webhook %s attempt %d/%d failed: %s", url, attempt, attempts, last)
        if attempt < attempts:
            sleep(backoff_s * 2 ** (attempt - 1))
    raise DeliveryError(f"webhook {url}: {last} after {attempts} attempts")


def email_message(settings: Settings, payload: dict[str, Any]) -> EmailMessage:
    ant = payload["antenna"]
    msg = EmailMessage()
    msg["Subject"] = (
        f"[Mastwatch] {ant['site']} / {ant['name']}: "
        f"{payload['old_status'] or 'none'} → {payload['new_status']}"
    )
    msg["From"] = settings.smtp_from or "mastwatch@localhost"
    msg["To"] = ", ".join(settings.smtp_to)
    lines = [
        f"Antenna {ant['name']} at {ant['site']} is now {payload['new_status']} "
        f"(was {payload['old_status'] or 'not judged'}), "
        f"sweep of {payload['sweep']['measured_at']}.",
        "",
    ]
    lines += [f"- {r}" for r in payload["reasons"]]
    if payload.get("safety"):
        lines += ["", payload["safety"]]
    msg.set_content("\n".join(lines))
    return msg


def send_email(settings: Settings, payload: dict[str, Any], timeout_s: float = 10.0) -> None:
    """Send through ``settings.smtp_host``; STARTTLS and login when a user is set."""
    if not settings.smtp_host or not settings.smtp_to:
        raise DeliveryError("e-mail is not configured (MASTWATCH_SMTP_HOST and _TO)")
    try:
        with smtplib.SMTP(settings.smtp_host, settings.smtp_port, timeout=timeout_s) as smtp:
            if settings.smtp_user:
                smtp.starttls()
                smtp.login(settings.smtp_user, settings.smtp_password or "")
            smtp.send_message(email_message(settings, payload))
    except (OSError, smtplib.SMTPException) as exc:
        raise DeliveryError(f"e-mail via {settings.smtp_host}: {exc}") from exc


# -- delivery (after the commit) ----------------------------------------------------------


@dataclass
class DeliveryReport:
    sent: list[int] = field(default_factory=list)
    retry: list[int] = field(default_factory=list)
    failed: list[int] = field(default_factory=list)
    skipped: list[int] = field(default_factory=list)


def _claim(session: Session, row_id: int, now: datetime) -> bool:
    """Take a lease on one due row; False when another worker has it (or it is done)."""
    result = session.execute(
        update(Notification)
        .where(
            Notification.id == row_id,
            Notification.state == "pending",
            Notification.next_attempt_at <= now,
        )
        .values(next_attempt_at=now + LEASE)
        .execution_options(synchronize_session=False)
    )
    session.commit()
    return getattr(result, "rowcount", 0) == 1


def deliver_pending(
    session: Session,
    settings: Settings,
    *,
    now: datetime | None = None,
    attempts: int = 3,
    backoff_s: float = 1.0,
    retry_after_s: float = 60.0,
    limit: int = 100,
    sleep: Callable[[float], None] = time.sleep,
) -> DeliveryReport:
    """Send every due notification once; log and reschedule failures (never raises them)."""
    now = now or utcnow()
    report = DeliveryReport()
    due = list(
        session.scalars(
            select(Notification.id)
            .where(Notification.state == "pending", Notification.next_attempt_at <= now)
            .order_by(Notification.id)
            .limit(limit)
        )
    )
    session.commit()
    for row_id in due:
        if not _claim(session, row_id, now):
            continue
        row = session.get(Notification, row_id, populate_existing=True)
        assert row is not None
        if not channel_enabled(settings, row.channel):
            row.state, row.last_error = "skipped", f"{row.channel} is not configured"
            session.commit()
            report.skipped.append(row_id)
            continue
        try:
            if row.channel == "webhook":
                assert settings.webhook_url is not None
                post_webhook(
                    settings.webhook_url,
                    row.payload,
                    settings.webhook_secret,
                    attempts=attempts,
                    backoff_s=backoff_s,
                    sleep=sleep,
                )
            else:
                send_email(settings, row.payload)
        except DeliveryError as exc:
            row.attempts += 1
            row.last_error = str(exc)
            if row.attempts >= MAX_ROUNDS:
                row.state = "failed"
                report.failed.append(row_id)
                log.error("notification %d given up: %s", row_id, exc)
            else:
                row.next_attempt_at = now + timedelta(
                    seconds=retry_after_s * 2 ** (row.attempts - 1)
                )
                report.retry.append(row_id)
                log.warning("notification %d will be retried: %s", row_id, exc)
        else:
            row.attempts += 1
            row.state, row.sent_at, row.last_error = "sent", utcnow(), None
            report.sent.append(row_id)
        session.commit()
    return report
