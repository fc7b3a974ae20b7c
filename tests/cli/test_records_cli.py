"""mastwatch db upgrade/downgrade/current, serve's refusal, recompute and demo (CLI)."""

from __future__ import annotations

from pathlib import Path

import pytest
from sqlalchemy import create_engine, func, select
from typer.testing import CliRunner

from mastwatch.cli import app
from mastwatch.db.migrate import head_revision
from mastwatch.db.models import Antenna, Site, Sweep

runner = CliRunner()


@pytest.fixture
def env(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> str:
    url = f"sqlite:///{tmp_path / 'records.sqlite3'}"
    monkeypatch.setenv("MASTWATCH_DATABASE_URL", url)
    monkeypatch.setenv("MASTWATCH_DATA_DIR", str(tmp_path / "data"))
    return url


def test_db_commands(env: str) -> None:
    r = runner.invoke(app, ["db", "current"])
    assert r.exit_code == 1 and "behind: run `mastwatch db upgrade`" in r.output
    r = runner.invoke(app, ["serve", "--port", "8765"])
    assert r.exit_code == 1
    assert "not starting" in r.output and "mastwatch db upgrade" in r.output
    r = runner.invoke(app, ["db", "upgrade"])
    assert r.exit_code == 0 and "built-in cable type(s) synced" in r.output
    r = runner.invoke(app, ["db", "current"])
    assert r.exit_code == 0 and f"current: {head_revision()}" in r.output
    r = runner.invoke(app, ["recompute"])
    assert r.exit_code == 0 and "recomputed 0 sweep(s)" in r.output
    r = runner.invoke(app, ["db", "downgrade", "base"])
    assert r.exit_code == 0
    assert runner.invoke(app, ["db", "current"]).exit_code == 1


def test_invalid_setting_is_named(env: str, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("MASTWATCH_TIMEZONE", "Mars/Base")
    r = runner.invoke(app, ["db", "current"])
    assert r.exit_code == 1 and "Mars/Base" in r.output


def test_demo_builds_its_own_database(env: str, tmp_path: Path) -> None:
    r = runner.invoke(app, ["demo", "--no-serve"])
    assert r.exit_code == 0, r.output
    demo = tmp_path / "data" / "demo.sqlite3"
    assert demo.exists() and "demo club loaded" in r.output
    engine = create_engine(f"sqlite:///{demo}")
    with engine.connect() as conn:
        sites = conn.scalar(select(func.count()).select_from(Site))
        antennas = conn.scalar(select(func.count()).select_from(Antenna))
        sweeps = conn.scalar(select(func.count()).select_from(Sweep))
    engine.dispose()
    # Issue 4: three sites, about ten antennas, two years of sweeps every few months.
    assert sites == 3 and 8 <= (antennas or 0) <= 12 and (sweeps or 0) >= 5 * (antennas or 0)
    # The configured database was not touched.
    assert not Path(env.removeprefix("sqlite:///")).exists()
