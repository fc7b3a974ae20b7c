"""``mastwatch outbox add|list|push|retry``: queue sweeps offline, send them when back online."""

from __future__ import annotations

from datetime import datetime
from pathlib import Path
from typing import Annotated

import anyio
import httpx
import typer
from rich.console import Console
from rich.table import Table

from mastwatch.outbox import PLANES, Outbox, OutboxError, default_outbox_dir
from mastwatch.rf.errors import SweepFormatError
from mastwatch.settings import KEEPER_TOKEN_PATTERN, KEEPER_TOKEN_RULE

outbox_app = typer.Typer(help="Queue sweeps on a laptop with no network; send them later.")
console = Console()
err = Console(stderr=True)

DirOption = Annotated[
    Path | None,
    typer.Option(
        "--dir",
        help="Outbox folder (default $MASTWATCH_OUTBOX_DIR or ~/.local/share/mastwatch/outbox).",
    ),
]


def _outbox(directory: Path | None) -> Outbox:
    return Outbox(directory or default_outbox_dir())


@outbox_app.command("add")
def add(
    files: Annotated[
        list[Path],
        typer.Argument(help="Sweep files (.s1p, .s2p, .csv).", exists=True, dir_okay=False),
    ],
    antenna: Annotated[int, typer.Option(help="Antenna id on the server.")],
    plane: Annotated[
        str, typer.Option(help="Reference plane: feedpoint or line_input.")
    ] = "line_input",
    measured_at: Annotated[
        datetime | None,
        typer.Option(
            help="When it was swept (default: from the file, else its modification time)."
        ),
    ] = None,
    conditions: Annotated[
        str | None, typer.Option(help="Weather, ground, anything that matters.")
    ] = None,
    notes: Annotated[str | None, typer.Option(help="Free notes.")] = None,
    operator: Annotated[str | None, typer.Option(help="Who swept (call sign).")] = None,
    columns: Annotated[str | None, typer.Option(help="CSV column spec, e.g. freq:MHz,swr.")] = None,
    directory: DirOption = None,
) -> None:
    """Check each file as a sweep and queue it. A bad file is refused here, at the site."""
    box = _outbox(directory)
    failed = False
    for path in files:
        try:
            entry = box.add(
                path,
                antenna_id=antenna,
                reference_plane=plane,
                measured_at=measured_at,
                conditions=conditions,
                notes=notes,
                operator=operator,
                columns=columns,
            )
        except (SweepFormatError, OutboxError) as exc:
            err.print(f"error: {path}: {exc}", markup=False, highlight=False)
            failed = True
            continue
        console.print(
            f"queued {path.name} for antenna {antenna} ({entry.sha256[:12]})", markup=False
        )
    if failed:
        raise typer.Exit(1)


@outbox_app.command("list")
def list_entries(directory: DirOption = None) -> None:
    """Show what is waiting to be sent."""
    entries = _outbox(directory).entries()
    if not entries:
        console.print("the outbox is empty")
        return
    table = Table("id", "file", "antenna", "measured at", "plane", "state", "tries")
    for e in entries:
        state = e.state if not e.rejected else f"rejected: {e.rejected}"
        table.add_row(
            e.sha256[:12],
            e.filename,
            str(e.antenna_id),
            e.measured_at,
            e.reference_plane,
            state,
            str(e.attempts),
        )
    console.print(table)


@outbox_app.command("push")
def push(
    server: Annotated[str, typer.Option(help="The club server, e.g. http://clubhouse:8000.")],
    timeout: Annotated[float, typer.Option(help="Seconds to wait for each upload.")] = 60.0,
    token: Annotated[
        str | None,
        typer.Option(
            envvar="MASTWATCH_KEEPER_TOKEN",
            help="The server's keeper token, when it has one.",
            show_default=False,
        ),
    ] = None,
    directory: DirOption = None,
) -> None:
    """Send every waiting sweep. Safe to repeat: the server stores each file once."""
    box = _outbox(directory)
    token = token.strip() if token is not None else None
    if token is not None and not KEEPER_TOKEN_PATTERN.fullmatch(token):
        raise typer.BadParameter(
            f"a keeper token may use {KEEPER_TOKEN_RULE}; check for a stray space or a "
            "typographic quote",
            param_hint="--token",
        )
    headers = {"Authorization": f"Bearer {token}"} if token else {}

    async def run() -> list:
        async with httpx.AsyncClient(base_url=server, timeout=timeout, headers=headers) as client:
            return await box.push(client)

    results = anyio.run(run)
    if not results:
        console.print("nothing to send")
        return
    for r in results:
        where = f" as sweep {r.sweep_id}" if r.sweep_id is not None else ""
        detail = f": {r.detail}" if r.detail else ""
        console.print(f"{r.outcome} {r.entry.filename}{where}{detail}", markup=False)
    left = len(box.entries())
    console.print(f"{left} left in the outbox")
    if any(r.outcome == "refused" for r in results):
        console.print(
            "the server wants the keeper token: pass --token or set MASTWATCH_KEEPER_TOKEN; "
            "nothing was lost, every sweep is still waiting"
        )
    if any(r.outcome in ("rejected", "unreachable", "refused") for r in results):
        raise typer.Exit(1)


@outbox_app.command("retry")
def retry(
    entry_id: Annotated[
        str | None, typer.Argument(help="Id prefix from `outbox list` (default: all).")
    ] = None,
    directory: DirOption = None,
) -> None:
    """Mark rejected entries to be sent again (after fixing the antenna id on the server)."""
    count = _outbox(directory).retry(entry_id)
    console.print(f"{count} entr{'y' if count == 1 else 'ies'} will be sent on the next push")


def register(app: typer.Typer) -> None:
    app.add_typer(outbox_app, name="outbox")


__all__ = ["PLANES", "register"]
