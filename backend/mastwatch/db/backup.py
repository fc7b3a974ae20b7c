"""A consistent copy of an SQLite database, taken while the app keeps serving it.

Copying the file itself is not safe: with WAL journaling the latest commits may still
sit in the ``-wal`` file, and a copy taken mid-write is torn. SQLite's online backup
API (``sqlite3.Connection.backup``) copies pages under the database's own locking and
restarts when a writer changes a page it already copied, so the copy is one committed
state. It is written next to the target and renamed into place only after
``PRAGMA integrity_check`` says ok: a failed backup never leaves a half file behind.

PostgreSQL has its own tool for this, ``pg_dump``: :func:`backup` refuses with the
command to use rather than imitating it.
"""

from __future__ import annotations

import os
import sqlite3
from dataclasses import dataclass
from pathlib import Path

from sqlalchemy.engine import make_url


class BackupError(Exception):
    """The backup could not be made; the message says why and what to do."""


@dataclass(frozen=True)
class BackupResult:
    path: Path
    bytes: int
    sweeps: int


def sqlite_path(database_url: str) -> Path:
    """The database file of an SQLite URL; BackupError for any other database."""
    url = make_url(database_url)
    if url.get_backend_name() != "sqlite":
        plain = url.set(drivername=url.get_backend_name()).render_as_string(hide_password=True)
        raise BackupError(
            f"{url.get_backend_name()} databases are backed up with their own tool: "
            f"pg_dump --format=custom --file=mastwatch.dump '{plain}' "
            "(restore with pg_restore)"
        )
    if not url.database or url.database == ":memory:":
        raise BackupError("an in-memory database has nothing to back up")
    path = Path(url.database)
    if not path.is_file():
        raise BackupError(f"{path}: no such database file")
    return path


def backup(database_url: str, target: Path, *, overwrite: bool = False) -> BackupResult:
    """Copy the SQLite database of ``database_url`` to ``target`` (see the module doc)."""
    source_path = sqlite_path(database_url)
    target = Path(target)
    if target.resolve() == source_path.resolve():
        raise BackupError(f"{target}: that is the database itself; choose another file")
    if target.exists() and not overwrite:
        raise BackupError(f"{target} exists; choose another name or pass --overwrite")
    target.parent.mkdir(parents=True, exist_ok=True)
    partial = target.with_name(f".{target.name}.partial")
    partial.unlink(missing_ok=True)
    try:
        source = sqlite3.connect(f"file:{source_path}?mode=ro", uri=True)
        try:
            copy = sqlite3.connect(partial)
            try:
                source.backup(copy)
                check = copy.execute("PRAGMA integrity_check").fetchone()[0]
                if check != "ok":
                    raise BackupError(f"the copy failed its integrity check: {check}")
                copy.execute("PRAGMA journal_mode = DELETE")  # one self-contained file
                sweeps = int(copy.execute("SELECT count(*) FROM sweep").fetchone()[0])
            finally:
                copy.close()
        finally:
            source.close()
        os.replace(partial, target)
    except sqlite3.Error as exc:
        raise BackupError(f"{source_path}: {exc}") from exc
    finally:
        partial.unlink(missing_ok=True)
    return BackupResult(target, target.stat().st_size, sweeps)
