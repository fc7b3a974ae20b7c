"""The one settings object of the app (pydantic-settings, environment ``MASTWATCH_*``).

Settings are passed in, never imported as a module-level global: ``create_app(settings)``
takes one, and the cached :func:`get_settings` builds the default one from the
environment for the CLI and for ``uvicorn --factory``. docs/settings.md lists every
field; a test keeps that page complete.
"""

from __future__ import annotations

import re
import zoneinfo
from functools import lru_cache
from pathlib import Path

from pydantic import Field, SecretStr, field_validator, model_validator
from pydantic_settings import BaseSettings, SettingsConfigDict

from mastwatch.rf.limits import MAX_FILE_BYTES

KEEPER_TOKEN_PATTERN = re.compile(r"[A-Za-z0-9._~+/-]+=*")
"""RFC 6750 §2.1 b64token: what a Bearer credential may be made of."""
KEEPER_TOKEN_RULE = (
    "only the letters A-Z a-z, the digits 0-9 and - . _ ~ + / with = signs only at the end "
    "(RFC 6750 b64token)"
)
"""The pattern in words, for every message that refuses a token."""


class Settings(BaseSettings):
    """Everything an admin can configure. Environment variable = ``MASTWATCH_`` + name."""

    model_config = SettingsConfigDict(env_prefix="MASTWATCH_", extra="ignore")

    data_dir: Path = Field(
        default=Path("data"),
        description="Directory for the SQLite database and other local files.",
    )
    database_url: str = Field(
        default="",
        description=(
            "SQLAlchemy URL of the database. Default: SQLite file "
            "<data_dir>/mastwatch.sqlite3. PostgreSQL: postgresql+psycopg://user@host/db."
        ),
    )
    max_upload_bytes: int = Field(
        default=MAX_FILE_BYTES,
        gt=0,
        le=MAX_FILE_BYTES,
        description="Largest sweep file accepted by an upload (bytes); 413 above it.",
    )
    timezone: str = Field(
        default="UTC",
        description="IANA time zone used where a site has none of its own.",
    )
    # An int with bounds rather than Literal[1, 2, 3]: environment values arrive as text.
    default_region: int = Field(
        default=1, ge=1, le=3, description="ITU region preselected for new sites (band plan)."
    )
    demo: bool = Field(
        default=False,
        description="Demo mode: relaxes the checks that protect a real installation.",
    )
    keeper_token: SecretStr | None = Field(
        default=None,
        description=(
            "Shared secret the keepers send (Authorization: Bearer ...) to change records; "
            "reading needs none. Unset: anyone who reaches the server may change them."
        ),
    )
    stale_after_days: int = Field(
        default=180,
        gt=0,
        description="A sweep older than this many days is shown as stale on the board.",
    )
    # -- notifications (issue 5 reads these; all off by default) ------------------------
    webhook_url: str | None = Field(
        default=None, description="URL to POST a JSON message to when a verdict changes."
    )
    webhook_secret: str | None = Field(
        default=None, description="HMAC-SHA256 secret that signs webhook bodies."
    )
    smtp_host: str | None = Field(default=None, description="SMTP server for e-mail alerts.")
    smtp_port: int = Field(default=25, description="SMTP server port.")
    smtp_user: str | None = Field(default=None, description="SMTP login user (STARTTLS).")
    smtp_password: str | None = Field(default=None, description="SMTP login password.")
    smtp_from: str | None = Field(default=None, description="Sender address of e-mail alerts.")
    smtp_to: list[str] = Field(
        default_factory=list, description="Recipients of e-mail alerts (JSON list in env)."
    )

    @field_validator("keeper_token", mode="before")
    @classmethod
    def _blank_is_unset(cls, value: object) -> object:
        # An empty MASTWATCH_KEEPER_TOKEN= (e.g. from docker-compose's default) means "no
        # token", never "the empty string is the token". Spaces around it (a stray one in
        # an .env file) are dropped: a header value cannot end in one.
        if isinstance(value, SecretStr):
            value = value.get_secret_value()
        if isinstance(value, str):
            value = value.strip()
            return value or None
        return value

    @field_validator("keeper_token")
    @classmethod
    def _sendable_token(cls, value: SecretStr | None) -> SecretStr | None:
        # A token that a client cannot put into an Authorization header (a space inside,
        # a non-ASCII letter) would give 401 forever: refused at start instead.
        if value is not None and not KEEPER_TOKEN_PATTERN.fullmatch(value.get_secret_value()):
            raise ValueError(
                f"the keeper token may use {KEEPER_TOKEN_RULE}; no spaces or other characters"
            )
        return value

    @field_validator("timezone")
    @classmethod
    def _known_zone(cls, value: str) -> str:
        try:
            zoneinfo.ZoneInfo(value)
        except (zoneinfo.ZoneInfoNotFoundError, ValueError) as exc:
            raise ValueError(f"unknown IANA time zone {value!r} (e.g. 'Europe/Berlin')") from exc
        return value

    @model_validator(mode="after")
    def _defaults_and_safety(self) -> Settings:
        if not self.database_url:
            self.database_url = f"sqlite:///{(self.data_dir / 'mastwatch.sqlite3').resolve()}"
        # A webhook without a signature lets anyone forge alerts: refused for real use.
        if self.webhook_url and not self.webhook_secret and not self.demo:
            raise ValueError(
                "MASTWATCH_WEBHOOK_URL is set without MASTWATCH_WEBHOOK_SECRET; "
                "set a secret so receivers can check the signature"
            )
        return self


@lru_cache
def get_settings() -> Settings:
    """The settings from the environment, built once per process."""
    return Settings()
