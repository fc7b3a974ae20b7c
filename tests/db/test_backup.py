"""`mastwatch db backup`: a consistent SQLite copy while the database is in use.

What "consistent" means is SQLite's own definition of its online backup API
(sqlite.org/backup.html): the copy is one committed state of the source; a write
transaction still open is not in it. PRAGMA integrity_check is SQLite's own check.
"""

from __future__ import annotations

import hashlib
import sqlite3
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


def _club(tmp_path: Path) -> tuple[str, bytes]:
    url = f"sqlite:///{tmp_path / 'club.sqlite3'}"
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
