"""A consistent copy of an SQLite database, taken while the app keeps serving it.

Copying the file itself is not safe: with WAL journaling the latest commits may still
sit in the ``-wal`` file, and a copy taken mid-write is torn. SQLite's online backup
API (``sqlite3.Connection.backup``) copies pages under the database's own locking and
restarts when a writer changes a page it already copied, so the copy is one committed
state. It is written next to the target and renamed into place only after
``PRAGMA integrity_check`` says ok: a failed backup (a full disk, say) never leaves a
half file or its journal behind. The source is checked to be a Mastwatch database
before anything is copied, and is opened as the server opens it, so a backup leaves
no files beside it that were not there.

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
    source_path = sqlite_path(database_url).resolve()
    target = Path(target)
    _check_target(source_path, target, overwrite)
    source = _open_source(source_path)
    try:
        _make_folder(target)
        partial = target.with_name(f".{target.name}.partial")
        _remove_partial(partial)  # a stale journal beside a fresh file would be replayed
        try:
            sweeps = _copy(source, partial, target)
            _move_into_place(partial, target)
        finally:
            _remove_partial(partial)
    finally:
        source.close()
    return BackupResult(target, target.stat().st_size, sweeps)


def _check_target(source_path: Path, target: Path, overwrite: bool) -> None:
    if target.resolve() == source_path:
        raise BackupError(f"{target}: that is the database itself; choose another file")
    if target.is_dir():
        raise BackupError(f"{target} is a directory; name the file to write the copy to")
    if target.exists() and not overwrite:
        raise BackupError(f"{target} exists; choose another name or pass --overwrite")
    folder = target.parent
    while not folder.exists() and folder != folder.parent:
        folder = folder.parent
    if not folder.is_dir():
        raise BackupError(f"writing {target}: {folder} is a file, not a directory")


def _make_folder(target: Path) -> None:
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise BackupError(f"writing {target}: {exc.strerror or exc}") from exc


def _open_source(source_path: Path) -> sqlite3.Connection:
    """The source, opened as the server opens it, after checking it is ours.

    Not ``mode=ro``: a read-only connection to a WAL database cannot remove the -wal and
    -shm files it creates, so a backup of a stopped server would leave them behind (owned
    by whoever ran it). The backup API only reads the source. The path goes in as a
    ``file:`` URI so that '#' or '?' in a name are part of the name.
    """
    uri = source_path.as_uri() + "?mode=rw"  # rw: never create a missing file
    try:
        source = sqlite3.connect(uri, uri=True)
    except sqlite3.Error as exc:
        raise BackupError(f"reading {source_path}: {exc}") from exc
    try:
        tables = {
            row[0]
            for row in source.execute(
                "SELECT name FROM sqlite_master WHERE type = 'table'"
                " AND name IN ('alembic_version', 'sweep')"
            )
        }
    except sqlite3.Error as exc:
        source.close()
        if getattr(exc, "sqlite_errorname", None) == "SQLITE_NOTADB":
            raise BackupError(f"{source_path} is not a Mastwatch database ({exc})") from exc
        raise BackupError(f"reading {source_path}: {exc}") from exc
    if tables != {"alembic_version", "sweep"}:
        source.close()
        raise BackupError(
            f"{source_path} is not a Mastwatch database (it has no alembic_version and "
            "sweep tables); check MASTWATCH_DATABASE_URL"
        )
    return source


# Errors of the backup step that come from the source side; all others are the copy's
# (a full disk, a folder without write permission, an I/O error while writing).
_SOURCE_ERRORS = frozenset({"SQLITE_BUSY", "SQLITE_LOCKED"})


def _copy(source: sqlite3.Connection, partial: Path, target: Path) -> int:
    """Back ``source`` up into ``partial``, check it; the number of sweeps in the copy."""
    try:
        copy = sqlite3.connect(partial)
        try:
            source.backup(copy)
            check = copy.execute("PRAGMA integrity_check").fetchone()[0]
            if check != "ok":
                raise BackupError(f"writing {target}: the copy failed its integrity check: {check}")
            copy.execute("PRAGMA journal_mode = DELETE")  # one self-contained file
            return int(copy.execute("SELECT count(*) FROM sweep").fetchone()[0])
        finally:
            copy.close()
    except sqlite3.Error as exc:
        if getattr(exc, "sqlite_errorname", None) in _SOURCE_ERRORS:
            raise BackupError(f"reading the database: {exc}; try again") from exc
        raise BackupError(f"writing {target}: {exc}") from exc


def _move_into_place(partial: Path, target: Path) -> None:
    try:
        os.replace(partial, target)
        if os.name == "posix":  # the rename itself survives a power cut only once synced
            folder = os.open(target.parent, os.O_RDONLY)
            try:
                os.fsync(folder)
            finally:
                os.close(folder)
    except OSError as exc:
        raise BackupError(f"writing {target}: {exc.strerror or exc}") from exc


def _remove_partial(partial: Path) -> None:
    for suffix in ("", "-journal", "-wal", "-shm"):
        partial.with_name(partial.name + suffix).unlink(missing_ok=True)
