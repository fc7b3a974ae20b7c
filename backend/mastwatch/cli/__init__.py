"""The ``mastwatch`` command line (typer). Each module registers its own commands.

    analyze.py   mastwatch analyze FILE...        (rf core: metrics of sweep files)
    lines.py     mastwatch dtf / match            (feedline, distance to fault, matching)
    records.py   mastwatch db / serve / demo / recompute   (the records service)
    outbox.py    mastwatch outbox add / list / push / retry (field uploads, offline first)
"""

from __future__ import annotations

import typer

from mastwatch.cli import analyze, lines, outbox, records

app = typer.Typer(
    name="mastwatch",
    help="Test records for a radio club's antennas.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)

for module in (analyze, lines, records, outbox):
    module.register(app)


def main() -> None:
    app()
