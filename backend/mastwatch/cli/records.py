"""CLI commands of the records service.

    mastwatch db upgrade [REVISION]     apply migrations (default: head); syncs cable types
    mastwatch db downgrade [REVISION]   step back (default: one revision; "base" = empty)
    mastwatch db current                the database's revision and whether it is current
    mastwatch serve [--host] [--port]   serve the app (refuses a database that is behind)
    mastwatch recompute [--batch-size]  re-derive every metrics row from the stored arrays
    mastwatch demo [--host] [--port] [--no-serve]
                                        fresh SQLite demo database with the invented club,
                                        then serve it

All take the database from the settings (MASTWATCH_DATABASE_URL, MASTWATCH_DATA_DIR);
``demo`` always uses its own file ``<data_dir>/demo.sqlite3`` and never touches the
configured database.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

DEFAULT_HOST = "127.0.0.1"
DEFAULT_PORT = 8000
DEMO_DB_NAME = "demo.sqlite3"

db_app = typer.Typer(help="Database: migrations and backups.", no_args_is_help=True)


def _fail(message: str) -> None:
    typer.secho(f"error: {message}", fg=typer.colors.RED, err=True)
    raise typer.Exit(1)


def _settings():  # -> Settings
    from pydantic import ValidationError

    from mastwatch.settings import Settings

    try:
        return Settings()
    except ValidationError as exc:
        _fail(f"invalid settings: {exc}")


def _sync_cables(database_url: str) -> int:
    from mastwatch.db.engine import make_engine, make_sessionmaker
    from mastwatch.services.cables import sync_builtin_cable_types

    engine = make_engine(database_url)
    try:
        with make_sessionmaker(engine)() as session:
            changed = sync_builtin_cable_types(session)
            session.commit()
            return changed
    finally:
        engine.dispose()


@db_app.command("upgrade")
def db_upgrade(
    revision: Annotated[str, typer.Argument(help="target revision")] = "head",
) -> None:
    """Apply the migrations up to REVISION (head by default)."""
    from mastwatch.db import migrate

    settings = _settings()
    migrate.upgrade(settings.database_url, revision)
    changed = _sync_cables(settings.database_url) if revision == "head" else 0
    typer.echo(
        f"database at {migrate.head_revision() if revision == 'head' else revision}"
        + (f"; {changed} built-in cable type(s) synced" if changed else "")
    )


@db_app.command("downgrade")
def db_downgrade(
    revision: Annotated[str, typer.Argument(help="target revision, or 'base'")] = "-1",
) -> None:
    """Undo migrations down to REVISION (one step by default; 'base' removes all)."""
    from mastwatch.db import migrate

    settings = _settings()
    migrate.downgrade(settings.database_url, revision)
    typer.echo(f"database downgraded to {revision}")


@db_app.command("backup")
def db_backup(
    target: Annotated[Path, typer.Argument(help="file to write the copy to")],
    overwrite: Annotated[
        bool, typer.Option("--overwrite", help="replace TARGET if it exists")
    ] = False,
) -> None:
    """Copy the SQLite database consistently, even while it is being served."""
    from mastwatch.db.backup import BackupError, backup

    settings = _settings()
    try:
        result = backup(settings.database_url, target, overwrite=overwrite)
    except BackupError as exc:
        _fail(str(exc))
    typer.echo(
        f"backed up {result.sweeps} sweeps to {result.path} ({result.bytes / 1e6:.1f} MB); "
        "to restore, stop the server and put this file in the database's place"
    )


@db_app.command("current")
def db_current() -> None:
    """Show the database's revision and the code's head."""
    from mastwatch.db import migrate
    from mastwatch.db.engine import make_engine

    settings = _settings()
    engine = make_engine(settings.database_url)
    try:
        current = migrate.current_revision(engine)
    finally:
        engine.dispose()
    head = migrate.head_revision()
    state = "up to date" if current == head else "behind: run `mastwatch db upgrade`"
    typer.echo(f"current: {current or '(empty)'}  head: {head}  ({state})")
    if current != head:
        raise typer.Exit(1)


def _serve(settings, host: str, port: int) -> None:  # settings: Settings
    import uvicorn

    from mastwatch.api.app import create_app
    from mastwatch.db.migrate import DatabaseNotCurrent, check_url_current

    try:
        check_url_current(settings.database_url)
    except DatabaseNotCurrent as exc:
        _fail(f"not starting: {exc}")
    typer.echo(f"serving Mastwatch on http://{host}:{port}  (API docs: /api/docs)")
    if settings.keeper_token is None:
        typer.echo(
            "note: MASTWATCH_KEEPER_TOKEN is not set, so anyone who reaches this server can "
            "change the records; set it before serving beyond a trusted network"
        )
    uvicorn.run(create_app(settings), host=host, port=port, log_level="info")


HostOpt = Annotated[str, typer.Option(help="address to listen on")]
PortOpt = Annotated[int, typer.Option(help="TCP port", min=1, max=65535)]


def serve(host: HostOpt = DEFAULT_HOST, port: PortOpt = DEFAULT_PORT) -> None:
    """Serve the app on the configured database (which must be migrated)."""
    _serve(_settings(), host, port)


def recompute(
    batch_size: Annotated[int, typer.Option(help="sweeps per transaction", min=1)] = 100,
) -> None:
    """Re-derive every metrics row from the stored arrays (after a method improved)."""
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TimeRemainingColumn

    from mastwatch.db.engine import make_engine, make_sessionmaker
    from mastwatch.db.migrate import DatabaseNotCurrent, check_current
    from mastwatch.services.recompute import count_sweeps, recompute_all, rejudge_all

    settings = _settings()
    engine = make_engine(settings.database_url)
    try:
        try:
            check_current(engine)
        except DatabaseNotCurrent as exc:
            _fail(str(exc))
        with make_sessionmaker(engine)() as session:
            total = count_sweeps(session)
            columns = (
                "{task.description}",
                BarColumn(),
                MofNCompleteColumn(),
                TimeRemainingColumn(),
            )
            with Progress(*columns) as progress:
                task = progress.add_task("recomputing metrics", total=total)
                done = recompute_all(
                    session, batch_size=batch_size, progress=lambda n: progress.advance(task, n)
                )
            judged = rejudge_all(session)
    finally:
        engine.dispose()
    typer.echo(f"recomputed {done} sweep(s); verdicts judged again for {judged} antenna(s)")


def create_demo_database(data_dir: Path) -> str:
    """A fresh, migrated SQLite file ``<data_dir>/demo.sqlite3``; returns its URL."""
    from mastwatch.db import migrate

    data_dir.mkdir(parents=True, exist_ok=True)
    path = (data_dir / DEMO_DB_NAME).resolve()
    for suffix in ("", "-wal", "-shm"):
        Path(f"{path}{suffix}").unlink(missing_ok=True)
    url = f"sqlite:///{path}"
    migrate.upgrade(url)
    _sync_cables(url)
    return url


def load_demo(database_url: str, settings) -> object:  # settings: Settings
    """Fill the demo database with the invented club (mastwatch.demo.club)."""
    from mastwatch.db.engine import make_engine, make_sessionmaker
    from mastwatch.demo.club import load_demo_club

    engine = make_engine(database_url)
    try:
        with make_sessionmaker(engine)() as session:
            return load_demo_club(session, settings)
    finally:
        engine.dispose()


def demo(
    host: HostOpt = DEFAULT_HOST,
    port: PortOpt = DEFAULT_PORT,
    no_serve: Annotated[bool, typer.Option("--no-serve", help="create it, do not serve")] = False,
) -> None:
    """Create a fresh demo database with an invented club, then serve it."""
    base = _settings()
    url = create_demo_database(base.data_dir)
    settings = base.model_copy(update={"database_url": url, "demo": True})
    summary = load_demo(url, settings)
    to_dict = getattr(summary, "to_dict", None)
    typer.echo(f"demo club loaded into {url}: {to_dict() if to_dict else summary}")
    if not no_serve:
        _serve(settings, host, port)


def register(app: typer.Typer) -> None:
    """Add this module's commands to the app."""
    app.add_typer(db_app, name="db")
    app.command("serve")(serve)
    app.command("recompute")(recompute)
    app.command("demo")(demo)
