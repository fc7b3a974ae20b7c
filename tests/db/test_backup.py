"""`mastwatch db backup`: a consistent SQLite copy while the database is in use.

What "consistent" means is SQLite's own definition of its online backup API
(sqlite.org/backup.html): the copy is one committed state of the source; a write
transaction still open is not in it. PRAGMA integrity_check is SQLite's own check.
"""

from __future__ import annotations

import hashlib
import os
import resource
import signal
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from mastwatch.cli import app as cli_app
from mastwatch.db import migrate
from mastwatch.db.backup import BackupError, backup
from mastwatch.db.engine import make_engine, make_sessionmaker
from mastwatch.db.models import Antenna, Site
from mastwatch.services.ingest import UploadMeta, ingest_sweep
from tests.dbfixtures import rlc_touchstone


def _club(tmp_path: Path, name: str = "club.sqlite3") -> tuple[str, bytes]:
    url = f"sqlite:///{tmp_path / name}".replace("?", "%3F")  # SQLAlchemy URL quoting
    migrate.upgrade(url)
    engine = make_engine(url)
    data = rlc_touchstone(7.1e6)
    with make_sessionmaker(engine)() as s:
        site = Site(name="Q0QRC clubhouse", itu_region=1)
        s.add(site)
        s.flush()
        antenna = Antenna(site_id=site.id, name="40 m dipole", kind="dipole", bands=["40m"])
        s.add(antenna)
        s.commit()
        ingest_sweep(s, antenna.id, data, "d.s1p", UploadMeta())
    engine.dispose()
    return url, data


def test_the_copy_is_the_committed_state_while_a_writer_is_busy(tmp_path: Path) -> None:
    url, data = _club(tmp_path)
    writer = sqlite3.connect(tmp_path / "club.sqlite3")
    writer.execute("BEGIN IMMEDIATE")
    writer.execute("INSERT INTO site (name, itu_region, timezone, notes, created_at)"
                   " VALUES ('uncommitted', 1, 'UTC', '', '2026-01-01')")
    try:
        result = backup(url, tmp_path / "copy.sqlite3")
    finally:
        writer.rollback()
        writer.close()
    assert result.sweeps == 1
    copy = sqlite3.connect(result.path)
    try:
        assert copy.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        names = [r[0] for r in copy.execute("SELECT name FROM site")]
        assert names == ["Q0QRC clubhouse"]
        (stored,) = copy.execute("SELECT sha256 FROM sweep").fetchone()
        assert stored == hashlib.sha256(data).hexdigest()
        assert copy.execute("PRAGMA journal_mode").fetchone()[0] == "delete"  # one file
    finally:
        copy.close()
    assert not list(tmp_path.glob(".copy.sqlite3.partial"))


def test_refusals_say_what_to_do(tmp_path: Path) -> None:
    url, _ = _club(tmp_path)
    target = tmp_path / "copy.sqlite3"
    target.write_bytes(b"keep me")
    with pytest.raises(BackupError, match="exists"):
        backup(url, target)
    assert target.read_bytes() == b"keep me"  # nothing overwritten without being asked
    with pytest.raises(BackupError, match="the database itself"):
        backup(url, tmp_path / "club.sqlite3", overwrite=True)
    with pytest.raises(BackupError, match="pg_dump"):
        backup("postgresql+psycopg://keeper:secret@db/mastwatch", target)
    with pytest.raises(BackupError) as info:
        backup("postgresql+psycopg://keeper:secret@db/mastwatch", target)
    assert "secret" not in str(info.value)
    with pytest.raises(BackupError, match="no such database file"):
        backup(f"sqlite:///{tmp_path / 'none.sqlite3'}", tmp_path / "x.sqlite3")


def test_the_command(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    url, _ = _club(tmp_path)
    monkeypatch.setenv("MASTWATCH_DATABASE_URL", url)
    from mastwatch.settings import get_settings

    get_settings.cache_clear()
    runner = CliRunner()
    out = tmp_path / "backups" / "2026-12-02.sqlite3"
    r = runner.invoke(cli_app, ["db", "backup", str(out)])
    assert r.exit_code == 0, r.output
    assert "backed up 1 sweeps" in r.output and out.is_file()
    r = runner.invoke(cli_app, ["db", "backup", str(out)])
    assert r.exit_code == 1 and "exists" in r.output
    r = runner.invoke(cli_app, ["db", "backup", str(out), "--overwrite"])
    assert r.exit_code == 0, r.output


def _leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if ".partial" in p.name)


def test_a_name_with_hash_or_question_mark_is_the_file_it_names(tmp_path: Path) -> None:
    # RFC 3986 §3.4/3.5: in a file: URI, '?' starts the query and '#' the fragment, so a
    # path pasted into one unquoted names another file ("club " here).
    url, _ = _club(tmp_path, "club #2?.sqlite3")
    result = backup(url, tmp_path / "copy.sqlite3")
    assert result.sweeps == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["club #2?.sqlite3", "copy.sqlite3"]


def test_a_backup_leaves_nothing_beside_a_stopped_servers_database(tmp_path: Path) -> None:
    # SQLite WAL (sqlite.org/wal.html §"Persistence of WAL mode"): the last connection to
    # close removes -wal and -shm, unless it could not write them (read-only).
    url, _ = _club(tmp_path)
    before = sorted(p.name for p in tmp_path.iterdir())
    assert before == ["club.sqlite3"]
    backup(url, tmp_path / "copy.sqlite3")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["club.sqlite3", "copy.sqlite3"]


def test_another_sqlite_file_is_refused_before_anything_is_copied(tmp_path: Path) -> None:
    other = tmp_path / "notes.sqlite3"
    with sqlite3.connect(other) as db:
        db.execute("CREATE TABLE note (text)")
    db.close()
    target = tmp_path / "out" / "copy.sqlite3"
    with pytest.raises(BackupError, match="is not a Mastwatch database"):
        backup(f"sqlite:///{other}", target)
    assert not (tmp_path / "out").exists()  # refused before the copy's folder is made
    text = tmp_path / "readme.sqlite3"
    text.write_text("not a database at all, but long enough to hold a header " * 4)
    with pytest.raises(BackupError, match="is not a Mastwatch database"):
        backup(f"sqlite:///{text}", target)


def test_a_directory_or_a_file_in_the_way_is_refused(tmp_path: Path) -> None:
    url, _ = _club(tmp_path)
    folder = tmp_path / "backups"
    folder.mkdir()
    with pytest.raises(BackupError, match="is a directory; name the file"):
        backup(url, folder, overwrite=True)
    blocker = tmp_path / "blocker"
    blocker.write_text("a file where a folder should be")
    with pytest.raises(BackupError, match=r"writing .*: .*blocker is a file, not a directory"):
        backup(url, blocker / "2026" / "copy.sqlite3")
    assert blocker.read_text() == "a file where a folder should be"


def _small_files() -> None:  # runs in the child before exec
    # RLIMIT_FSIZE (POSIX setrlimit): a write past the limit fails with EFBIG, as a full
    # disk fails with ENOSPC; ignoring SIGXFSZ turns the signal into that error.
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (_LIMIT, resource.RLIM_INFINITY))


_LIMIT = 64 * 1024  # above the 32 KiB -shm of the source, below the database


def test_a_full_disk_names_the_target_and_leaves_nothing(tmp_path: Path) -> None:
    url, _ = _club(tmp_path)
    assert (tmp_path / "club.sqlite3").stat().st_size > 2 * _LIMIT
    target = tmp_path / "backups" / "copy.sqlite3"
    env = {**os.environ, "MASTWATCH_DATABASE_URL": url}
    run = subprocess.run(
        [sys.executable, "-c", "from mastwatch.cli import main; main()", "db", "backup",
         str(target)],
        env=env, capture_output=True, text=True, preexec_fn=_small_files, check=False,
    )
    assert run.returncode == 1, run.stdout + run.stderr
    assert f"error: writing {target}: " in run.stderr, run.stderr
    assert "Traceback" not in run.stderr
    assert not target.exists() and _leftovers(target.parent) == []
    assert sorted(p.name for p in tmp_path.iterdir()) == ["backups", "club.sqlite3"]
