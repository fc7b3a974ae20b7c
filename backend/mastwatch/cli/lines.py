"""``mastwatch dtf FILE`` and ``mastwatch match FILE``: distance to fault and L-network matching.

    FILE ──load_sweep──▶ Sweep ──distance_to_fault──▶ peaks table (+ --plot .html/.png)
                              └─(--feedline: deembed)──l_networks──▶ networks + matched SWR≤2

File reading and the frequency parser are shared with ``mastwatch analyze``
(``cli/analyze.py``). Errors are one line ``error: FILE: message`` on stderr, exit 1.
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Annotated

import numpy as np
import typer
from rich.console import Console
from rich.table import Table

from mastwatch.cli.analyze import (
    Analysis,
    analysis_to_json,
    analyze_sweep,
    error_line,
    load_sweep,
    option_value,
    parse_frequency,
)
from mastwatch.rf.dtf import (
    DEFAULT_THRESHOLD_DB,
    SAFETY_NOTE,
    WINDOWS,
    DtfResult,
    distance_to_fault,
)
from mastwatch.rf.errors import RFError
from mastwatch.rf.limits import MAX_PASSIVE_GAMMA
from mastwatch.rf.lines import (
    FEET,
    Feedline,
    deembed,
    get_cable,
    matched_loss_db,
    parse_feedline,
    parse_length,
    passivity_margin,
)
from mastwatch.rf.matching import match_summary

MINUS = "\u2212"  # U+2212 MINUS SIGN: every negative number of match prints with it


def _signed(value: float, spec: str) -> str:
    """``format(value, spec)`` with a negative value's sign printed as U+2212."""
    text = format(value, spec)
    return MINUS + text[1:] if text.startswith("-") else text


def _fail(file: str, exc: BaseException) -> typer.Exit:
    typer.echo(error_line(file, exc), err=True)
    return typer.Exit(1)


def _console() -> Console:
    console = Console(highlight=False)
    if not console.is_terminal:
        console.width = 140
    return console


# -- dtf -------------------------------------------------------------------------------


def write_dtf_plot(result: DtfResult, path: Path, title: str) -> None:
    """Reflection (dB) vs distance with the peaks marked: .html (self-contained) or .png."""
    suffix = path.suffix.lower()
    if suffix not in (".html", ".htm", ".png"):
        raise ValueError(f"--plot wants a .html or .png file name, got {path.name!r}")
    import plotly.graph_objects as go  # only when plotting

    with_floor = [max(r, 1e-6) for r in result.reflection]
    db = [20.0 * math.log10(r) for r in with_floor]
    fig = go.Figure()
    fig.add_trace(go.Scatter(x=result.distance_m, y=db, mode="lines", name="reflection"))
    fig.add_trace(
        go.Scatter(
            x=[p.distance_m for p in result.peaks],
            y=[-p.return_loss_db for p in result.peaks],
            mode="markers+text",
            text=[f"{p.distance_m:.2f} m" for p in result.peaks],
            textposition="top center",
            name="peaks",
        )
    )
    fig.add_hline(y=-result.threshold_db, line_dash="dot", annotation_text="threshold")
    fig.update_layout(
        title=title,
        xaxis_title="distance along the line (m)",
        yaxis_title="reflection |ρ| (dB)",
        template="plotly_white",
    )
    if suffix == ".png":
        try:
            fig.write_image(str(path))
        except Exception as e:  # kaleido missing or no browser for it: say what to do
            why = " ".join(str(e).split())[:160]
            raise ValueError(
                "cannot write a PNG here: plotly's PNG export needs the kaleido package "
                "(pip install 'kaleido>=1') and a Chromium browser; use --plot with a .html "
                f"file instead ({type(e).__name__}: {why})"
            ) from None
    else:
        fig.write_html(str(path), include_plotlyjs=True, full_html=True)


def dtf(
    file: Annotated[Path, typer.Argument(help="Sweep file taken at the radio end of the line.")],
    cable: Annotated[
        str | None,
        typer.Option("--cable", help="Cable type (velocity factor and loss), e.g. RG-58."),
    ] = None,
    vf: Annotated[
        float | None, typer.Option("--vf", help="Velocity factor (overrides the cable's).")
    ] = None,
    window: Annotated[str, typer.Option("--window", help="kaiser or rect.")] = "kaiser",
    beta: Annotated[float, typer.Option("--beta", help="Kaiser window β.")] = 6.0,
    pad: Annotated[int, typer.Option("--pad", help="Zero-padding factor.")] = 4,
    threshold_db: Annotated[
        float,
        typer.Option("--threshold-db", help="List peaks with return loss below this (dB)."),
    ] = DEFAULT_THRESHOLD_DB,
    no_loss_comp: Annotated[
        bool, typer.Option("--no-loss-comp", help="Do not compensate the cable's loss.")
    ] = False,
    max_distance: Annotated[
        float | None,
        typer.Option(
            "--max-distance",
            help="Look this far along the line, in metres (default: the whole range, or "
            "with loss compensation as far as a total reflection stays above the threshold).",
        ),
    ] = None,
    length: Annotated[
        str | None,
        typer.Option(
            "--length",
            help="Length of the line (e.g. 30m, 98ft): loss compensation stops growing there.",
        ),
    ] = None,
    plot: Annotated[
        Path | None, typer.Option("--plot", help="Draw reflection vs distance (.html or .png).")
    ] = None,
    columns: Annotated[
        str | None, typer.Option("--columns", help="CSV column assignment.")
    ] = None,
    as_json: Annotated[bool, typer.Option("--json", help="Print the result as JSON.")] = False,
) -> None:
    """Distance to fault: where along the feedline the reflections are."""
    if window not in WINDOWS:
        raise typer.BadParameter(f"choose one of {', '.join(WINDOWS)}", param_hint="--window")
    cable_type = None
    if cable is not None:
        cable_type = option_value(get_cable, cable, "--cable")
    if cable_type is None and vf is None:
        raise typer.BadParameter("give --cable or --vf", param_hint="--cable/--vf")
    line_length = option_value(parse_length, length, "--length") if length is not None else None
    name = str(file)
    try:
        sweep = load_sweep(file, columns)
        result = distance_to_fault(
            sweep, vf, window=window, beta=beta, pad=pad, cable=cable_type,
            compensate_loss=not no_loss_comp, threshold_db=threshold_db,
            max_distance_m=max_distance, line_length_m=line_length,
        )
    except (OSError, RFError) as e:
        raise _fail(name, e) from None
    if plot is not None:
        try:
            write_dtf_plot(result, plot, f"Distance to fault: {file.name}")
        except (ValueError, OSError) as e:
            raise _fail(str(plot), e) from None
    if as_json:
        typer.echo(json.dumps({"file": name, **result.to_dict()}, indent=2, allow_nan=False))
        return
    console = _console()
    console.print(f"[bold]{name}[/bold]")
    console.print(
        f"  {result.points} points, {result.f_start_hz / 1e6:.4f}–{result.f_stop_hz / 1e6:.4f} "
        f"MHz, VF {result.velocity_factor:g}"
        + (f" ({result.cable})" if result.cable else "")
        + f", window {result.window}" + (f" β={result.beta:g}" if result.beta is not None else "")
    )
    console.print(
        f"  resolution {result.resolution_m:.3f} m, unambiguous range {result.range_m:.2f} m"
        + (f", shown to {result.max_distance_m:.2f} m"
           if result.max_distance_m < 0.999 * result.range_m else "")
    )
    for note in result.notes:
        console.print(f"  note: {note}")
    if result.peaks:
        t = Table(title=f"Reflections (return loss < {result.threshold_db:g} dB)",
                  title_justify="left")
        for col in ("#", "distance (m)", "distance (ft)", "|ρ|", "RL (dB)"):
            t.add_column(col, justify="right")
        for i, p in enumerate(result.peaks, 1):
            rl = "∞" if not math.isfinite(p.return_loss_db) else f"{p.return_loss_db:.1f}"
            t.add_row(str(i), f"{p.distance_m:.2f}", f"{p.distance_m / FEET:.1f}",
                      f"{p.reflection:.3f}", rl)
        console.print(t)
    else:
        console.print(f"  no reflection above the threshold (return loss < {threshold_db:g} dB)")
    if plot is not None:
        console.print(f"  plot written to {plot}")
    console.print(f"  {SAFETY_NOTE}")


# -- match -----------------------------------------------------------------------------


def match(
    file: Annotated[Path, typer.Argument(help="Sweep file.")],
    at: Annotated[str, typer.Option("--at", help="Design frequency, e.g. 7.1MHz.")],
    z0: Annotated[float, typer.Option("--z0", help="System impedance to match to (Ω).")] = 50.0,
    feedline: Annotated[
        str | None,
        typer.Option(
            "--feedline",
            help="De-embed this feedline first (CABLE:LENGTH, e.g. RG-213:30m) to match "
            "at the feedpoint.",
        ),
    ] = None,
    columns: Annotated[
        str | None, typer.Option("--columns", help="CSV column assignment.")
    ] = None,
    as_json: Annotated[bool, typer.Option("--json", help="Print the result as JSON.")] = False,
) -> None:
    """L-networks that match the sweep's impedance at one frequency to z0."""
    at_hz = option_value(parse_frequency, at, "--at")
    if not (math.isfinite(z0) and z0 > 0):
        raise typer.BadParameter("must be > 0", param_hint="--z0")
    line: Feedline | None = None
    if feedline is not None:
        line = option_value(parse_feedline, feedline, "--feedline")
    name = str(file)
    try:
        sweep = load_sweep(file, columns)
        if line is not None:
            sweep = deembed(sweep, line)
        report = match_summary(sweep, at_hz, z0)
    except (OSError, RFError) as e:
        raise _fail(name, e) from None
    if line is not None:
        report["feedline"] = line.to_dict()
    if as_json:
        typer.echo(json.dumps({"file": name, **report}, indent=2, allow_nan=False,
                              ensure_ascii=False))
        return
    console = _console()
    console.print(f"[bold]{name}[/bold]")
    plane = f" at the feedpoint (through {line.describe()})" if line else ""
    console.print(
        f"  Z = {report['load_r_ohm']:.2f} {'+' if report['load_x_ohm'] >= 0 else MINUS} "
        f"j{abs(report['load_x_ohm']):.2f} Ω at {at_hz / 1e6:.6g} MHz{plane}, "
        f"matching to {z0:g} Ω"
    )
    console.print(f"  {report['hint']}")
    t = Table(title="L-networks (from the radio towards the load)", title_justify="left")
    for col in ("#", "topology", "elements", "X (Ω)", "B (mS)", "SWR≤2 bandwidth"):
        t.add_column(col, justify="right" if col in ("#", "X (Ω)", "B (mS)") else "left")
    for i, n in enumerate(report["networks"], 1):
        elements = "; ".join(e["display"] for e in n["elements"]) or "none needed"
        bw = n["swr_bandwidth_2"]
        if bw["width_hz"] is None:
            width = "—"
        else:
            width = f"{bw['width_hz'] / 1e3:.1f} kHz ({bw['low_hz'] / 1e6:.4f}–" \
                    f"{bw['high_hz'] / 1e6:.4f} MHz)"
            if bw["open_low"] or bw["open_high"]:
                width += ", runs off the sweep: a lower bound"
        t.add_row(str(i), n["topology"].replace("_", " "), elements, _signed(n["x_ohm"], ".2f"),
                  _signed(n["b_s"] * 1e3, ".3f"), width)
    console.print(t)
    console.print("  Ideal components; real ones add loss and stray reactance.")


# -- the --feedline option of ``mastwatch analyze`` ------------------------------------------


def resolve_feedline(
    feedline: str | None, cable: str | None, length: str | None, connectors: int = 0
) -> Feedline | None:
    """``--feedline RG-213:30m`` or ``--cable RG-213 --length 30m`` → Feedline (or None)."""
    if feedline is not None:
        if cable is not None or length is not None:
            raise typer.BadParameter("give --feedline or --cable/--length, not both",
                                     param_hint="--feedline")
        line = option_value(parse_feedline, feedline, "--feedline")
        return Feedline(line.cable, line.length_m, line.connectors or connectors)
    if cable is None and length is None:
        return None
    if cable is None or length is None:
        raise typer.BadParameter("--cable and --length go together", param_hint="--cable")
    return Feedline(
        option_value(get_cable, cable, "--cable"),
        option_value(parse_length, length, "--length"),
        connectors,
    )


def add_feedpoint(
    measured: Analysis,
    line: Feedline,
    *,
    region: int,
    band_names: list[str],
    at_hz: list[float],
) -> Analysis:
    """De-embed ``line`` from a line-input analysis: the feedpoint's own Analysis.

    The measured analysis gains ``feedpoint`` (the same keys as a file's JSON object,
    without ``file``) and ``feedline`` (cable, length, loss) in its JSON, and a note.
    """
    sweep = deembed(measured.sweep, line)
    feed = analyze_sweep(measured.file, sweep, region=region, band_names=band_names, at_hz=at_hz)
    feed.file = f"{measured.file} at the feedpoint (through {line.describe()})"
    f = np.array([sweep.f_start_hz, sweep.f_stop_hz])
    loss = matched_loss_db(line, f)
    doc = analysis_to_json(feed)
    doc.pop("file", None)
    measured.extra["feedline"] = {
        **line.to_dict(),
        "matched_loss_db_start": float(loss[0]),
        "matched_loss_db_stop": float(loss[1]),
    }
    measured.extra["feedpoint"] = doc
    measured.notes.append(
        f"feedline {line.describe()}: matched loss {loss[0]:.2f}–{loss[1]:.2f} dB over the "
        "sweep; feedpoint metrics follow"
    )
    if passivity_margin(sweep) < 1.0 - MAX_PASSIVE_GAMMA:
        note = (
            "warning: at the feedpoint |Γ| exceeds 1: the assumed feedline loses more than "
            "this sweep allows (check the cable type and length)"
        )
        measured.notes.append(note)
        feed.notes.append(note)
    return feed


def register(app: typer.Typer) -> None:
    """Add ``mastwatch dtf`` and ``mastwatch match`` to the app."""
    app.command("dtf")(dtf)
    app.command("match")(match)
