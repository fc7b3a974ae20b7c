"""FastAPI dependencies: settings and a database session per request.

Routes take ``SessionDep`` / ``SettingsDep`` (``Annotated`` aliases). The session
factory lives on ``app.state`` (built by ``create_app``), so every app has its own
database; services commit, the dependency closes (rolling back anything left open).
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Annotated

from fastapi import Depends, Request
from sqlalchemy.orm import Session

from mastwatch.settings import Settings


def get_settings(request: Request) -> Settings:
    """The settings the app was built with."""
    settings: Settings = request.app.state.settings
    return settings


def get_session(request: Request) -> Iterator[Session]:
    """A session on the app's database, closed after the response."""
    with request.app.state.sessionmaker() as session:
        yield session


SessionDep = Annotated[Session, Depends(get_session)]
SettingsDep = Annotated[Settings, Depends(get_settings)]
