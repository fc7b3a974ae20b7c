"""Every setting is documented in docs/settings.md, with its environment variable."""

from __future__ import annotations

from pathlib import Path

import pytest

from mastwatch.settings import Settings

DOC = Path(__file__).resolve().parents[2] / "docs" / "settings.md"


@pytest.mark.parametrize("name", sorted(Settings.model_fields))
def test_setting_is_documented(name: str) -> None:
    text = DOC.read_text(encoding="utf-8")
    assert f"| `{name}` | `MASTWATCH_{name.upper()}` |" in text, f"{name} missing from {DOC}"


def test_defaults_and_refusals(tmp_path: Path) -> None:
    s = Settings(data_dir=tmp_path)
    assert s.database_url == f"sqlite:///{(tmp_path / 'mastwatch.sqlite3').resolve()}"
    assert (s.timezone, s.default_region, s.stale_after_days, s.demo) == ("UTC", 1, 180, False)
    with pytest.raises(ValueError, match="unknown IANA time zone 'Mars/Base'"):
        Settings(timezone="Mars/Base")
    with pytest.raises(ValueError, match="WEBHOOK_SECRET"):
        Settings(webhook_url="http://127.0.0.1:9/hook")
    assert Settings(webhook_url="http://127.0.0.1:9/hook", demo=True).webhook_secret is None
    with pytest.raises(ValueError, match="max_upload_bytes"):
        Settings(max_upload_bytes=10**12)


def test_environment_prefix(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("MASTWATCH_DEFAULT_REGION", "2")
    monkeypatch.setenv("MASTWATCH_DATABASE_URL", "sqlite:///elsewhere.sqlite3")
    s = Settings()
    assert s.default_region == 2 and s.database_url == "sqlite:///elsewhere.sqlite3"
