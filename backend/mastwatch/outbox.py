"""The outbox: the laptop's local queue of sweeps waiting for a connection to the club's server.

At a hilltop site there is often no network. The keeper queues each sweep file as it is
taken; the file is checked on the spot (so a bad file is re-measured while the antenna is
still in reach), copied into the outbox with its context, and sent later:

    mastwatch outbox add FILE --antenna 3 --plane line_input      (offline, at the site)
    mastwatch outbox push --server http://clubhouse:8000          (back on the network)

Sending is safe to retry: the server identifies a sweep by the SHA-256 of its bytes per
antenna, so a file sent twice (a lost reply, a second push) is stored once. An entry
leaves the outbox only when the server has it (201 created or 200 already there); an entry
the server rejects (4xx) stays, marked with the server's reason, and is not sent again
until the keeper retries it; a network failure stops the push and keeps everything.

Layout on disk, one pair of files per queued sweep, named by the bytes' SHA-256:

    <outbox>/<sha256>.bin    the original bytes, untouched
    <outbox>/<sha256>.json   the manifest: antenna, measured_at, plane, notes, state
"""

from __future__ import annotations

import hashlib
import json
import os
from collections.abc import Iterator
from dataclasses import asdict, dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Literal

import httpx

from mastwatch.rf.parse import read_sweep

Plane = Literal["feedpoint", "line_input"]
PLANES: tuple[str, ...] = ("feedpoint", "line_input")


class OutboxError(Exception):
    """A queue operation that cannot be done; the message says what to fix."""


@dataclass
class OutboxEntry:
    """One queued sweep and its upload context."""

    sha256: str
    filename: str
    antenna_id: int
    measured_at: str  # ISO 8601 with offset
    reference_plane: str = "line_input"
    conditions: str | None = None
    notes: str | None = None
    operator: str | None = None
    queued_at: str = field(default_factory=lambda: datetime.now(UTC).isoformat())
    attempts: int = 0
    rejected: str | None = None  # the server's reason when it refused the file

    @property
    def state(self) -> str:
        return "rejected" if self.rejected else "waiting"


@dataclass(frozen=True)
class PushResult:
    """What happened to one entry during a push."""

    entry: OutboxEntry
    outcome: Literal["created", "duplicate", "rejected", "unreachable", "refused"]
    detail: str = ""
    sweep_id: int | None = None


def default_outbox_dir() -> Path:
    """``$MASTWATCH_OUTBOX_DIR``, else ``~/.local/share/mastwatch/outbox``."""
    env = os.environ.get("MASTWATCH_OUTBOX_DIR")
    return Path(env) if env else Path.home() / ".local" / "share" / "mastwatch" / "outbox"


class Outbox:
    """A folder of queued sweeps. Writes are atomic (temp file + rename) so a laptop that
    loses power mid-write never leaves a half entry behind."""

    def __init__(self, directory: Path) -> None:
        self.directory = Path(directory)

    # -- queueing -------------------------------------------------------------------

    def add(
        self,
        path: Path,
        *,
        antenna_id: int,
        reference_plane: str = "line_input",
        measured_at: datetime | None = None,
        conditions: str | None = None,
        notes: str | None = None,
        operator: str | None = None,
        columns: str | None = None,
    ) -> OutboxEntry:
        """Check the file as a sweep and queue it. Raises SweepFormatError for a bad file
        (nothing is queued) and OutboxError for a bad context."""
        if reference_plane not in PLANES:
            raise OutboxError(f"reference plane must be one of {', '.join(PLANES)}")
        data = Path(path).read_bytes()
        sweep = read_sweep(data, Path(path).name, columns=columns)
        when = measured_at or sweep.source.measured_at
        if when is None:
            # The file does not say when it was taken: its modification time is the best
            # witness a laptop has (the analyzer wrote it at the site).
            when = datetime.fromtimestamp(Path(path).stat().st_mtime, tz=UTC)
        elif when.tzinfo is None:
            raise OutboxError("measured_at needs a time zone offset, e.g. 2026-03-01T10:00+00:00")
        digest = hashlib.sha256(data).hexdigest()
        existing = self._manifest_path(digest)
        if existing.exists():
            entry = self._load(existing)
            if entry.antenna_id == antenna_id:
                return entry
            raise OutboxError(f"{Path(path).name} is already queued for antenna {entry.antenna_id}")
        entry = OutboxEntry(
            sha256=digest,
            filename=Path(path).name,
            antenna_id=antenna_id,
            measured_at=when.isoformat(),
            reference_plane=reference_plane,
            conditions=conditions,
            notes=notes,
            operator=operator,
        )
        self.directory.mkdir(parents=True, exist_ok=True)
        _atomic_write(self._data_path(digest), data)
        self._save(entry)
        return entry

    def entries(self) -> list[OutboxEntry]:
        """Queued entries, oldest first."""
        if not self.directory.is_dir():
            return []
        found = [self._load(p) for p in self.directory.glob("*.json")]
        return sorted(found, key=lambda e: (e.queued_at, e.sha256))

    def retry(self, sha_prefix: str | None = None) -> int:
        """Clear the rejected mark of matching entries so the next push sends them again."""
        count = 0
        for entry in self.entries():
            if entry.rejected and (sha_prefix is None or entry.sha256.startswith(sha_prefix)):
                entry.rejected = None
                self._save(entry)
                count += 1
        return count

    def remove(self, entry: OutboxEntry) -> None:
        self._manifest_path(entry.sha256).unlink(missing_ok=True)
        self._data_path(entry.sha256).unlink(missing_ok=True)

    # -- sending --------------------------------------------------------------------

    async def push(self, client: httpx.AsyncClient) -> list[PushResult]:
        """Send every waiting entry with ``client`` (its base_url is the server). Stops at
        the first network failure; entries already sent are removed as they succeed."""
        results: list[PushResult] = []
        for entry in self._waiting():
            entry.attempts += 1
            try:
                response = await client.post(
                    f"/api/v1/antennas/{entry.antenna_id}/sweeps",
                    files={"file": (entry.filename, self._data_path(entry.sha256).read_bytes())},
                    data=_form_fields(entry),
                )
            except httpx.TransportError as exc:
                self._save(entry)
                results.append(PushResult(entry, "unreachable", str(exc) or type(exc).__name__))
                break
            body = _json_or_empty(response)
            if response.status_code in (200, 201):
                self.remove(entry)
                outcome: Literal["created", "duplicate"] = (
                    "created" if response.status_code == 201 else "duplicate"
                )
                sweep_id = body.get("id")
                results.append(
                    PushResult(
                        entry, outcome, sweep_id=sweep_id if isinstance(sweep_id, int) else None
                    )
                )
            elif response.status_code in (401, 403):
                # The keeper token is missing or wrong: not the file's fault. Keep every
                # entry waiting and stop; the next push with the token sends them.
                self._save(entry)
                detail = str(body.get("detail") or f"HTTP {response.status_code}")
                results.append(PushResult(entry, "refused", detail))
                break
            elif 400 <= response.status_code < 500:
                detail = str(body.get("detail") or response.text[:200])
                if body.get("line") is not None:
                    detail = f"line {body['line']}: {detail}"
                entry.rejected = f"{response.status_code}: {detail}"
                self._save(entry)
                results.append(PushResult(entry, "rejected", entry.rejected))
            else:  # a 5xx is the server's fault: keep the entry and stop, like a lost network
                self._save(entry)
                results.append(
                    PushResult(entry, "unreachable", f"server error {response.status_code}")
                )
                break
        return results

    # -- storage --------------------------------------------------------------------

    def _waiting(self) -> Iterator[OutboxEntry]:
        return (e for e in self.entries() if not e.rejected)

    def _manifest_path(self, digest: str) -> Path:
        return self.directory / f"{digest}.json"

    def _data_path(self, digest: str) -> Path:
        return self.directory / f"{digest}.bin"

    def _save(self, entry: OutboxEntry) -> None:
        text = json.dumps(asdict(entry), indent=2, sort_keys=True)
        _atomic_write(self._manifest_path(entry.sha256), text.encode())

    def _load(self, path: Path) -> OutboxEntry:
        try:
            return OutboxEntry(**json.loads(path.read_text()))
        except (ValueError, TypeError) as exc:
            raise OutboxError(f"{path}: not an outbox manifest ({exc})") from exc


def _form_fields(entry: OutboxEntry) -> dict[str, str]:
    fields = {"measured_at": entry.measured_at, "reference_plane": entry.reference_plane}
    for name in ("conditions", "notes", "operator"):
        value = getattr(entry, name)
        if value:
            fields[name] = value
    return fields


def _json_or_empty(response: httpx.Response) -> dict[str, object]:
    try:
        body = response.json()
    except ValueError:
        return {}
    return body if isinstance(body, dict) else {}


def _atomic_write(path: Path, data: bytes) -> None:
    tmp = path.with_suffix(path.suffix + ".tmp")
    tmp.write_bytes(data)
    os.replace(tmp, path)
