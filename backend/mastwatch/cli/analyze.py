"""``mastwatch analyze FILE...``: the metrics of sweep files, as tables or as JSON.

    FILE ──load_sweep──▶ Sweep ──(plane step, e.g. feedline)──▶ analyze_sweep ──▶ Analysis
                                                                     ├─ render_analysis
                                                                     └─ analysis_to_json

A step that moves the reference plane (a feedline option) transforms the Sweep
between load_sweep and analyze_sweep and records itself in ``Analysis.extra``/``notes``.

The ``--json`` output is a stable contract documented in docs/analyze-json.md.
A bad file is reported as one line ``error: FILE: line N: message`` on stderr; the
other files are still analysed and the exit code is 1 if any file failed.
Frequencies are SI (Hz) inside; MHz appears only in the printed tables and the
``--at`` option accepts Hz, kHz, MHz or GHz.
"""

from __future__ import annotations

import json
import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, TypeVar

import typer
from rich.console import Console
from rich.table import Table

from mastwatch.rf.bands import Band, bands_in, get_band
from mastwatch.rf.errors import RFError
from mastwatch.rf.metric_table import METRICS
from mastwatch.rf.metrics import PointValue, SweepMetrics, compute_metrics, value_at
from mastwatch.rf.sweep import Sweep

_UNITS = {"": 1.0, "hz": 1.0, "k": 1e3, "khz": 1e3, "m": 1e6, "mhz": 1e6, "g": 1e9, "ghz": 1e9}
_FREQ = re.compile(r"\s*((?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)\s*([a-z]*)\s*", re.IGNORECASE)


def parse_frequency(text: str) -> float:
    """ "7.1MHz", "7100kHz", "7100000", "7.1M", "1.2 GHz" → Hz. ValueError if not a frequency.

    Units are case-insensitive; a bare number is Hz; "m"/"M" means mega (a frequency
    in millihertz makes no sense here).
    """
    m = _FREQ.fullmatch(text)
    unit = m.group(2).lower() if m else None
    if m is None or unit not in _UNITS:
        raise ValueError(f"not a frequency: {text!r} (use e.g. 7.1MHz, 7100kHz, 7100000 or 7.1M)")
    hz = float(m.group(1)) * _UNITS[unit]
    if not math.isfinite(hz):
        raise ValueError(f"not a finite frequency: {text!r}")
    return hz


def load_sweep(path: Path, columns: str | None = None) -> Sweep:
    """Read one sweep file (any format ``read_sweep`` knows); OSError or SweepFormatError."""
    # imported here so `mastwatch --help` and the other commands do not load the parsers
    from mastwatch.rf.parse import read_sweep

    return read_sweep(path.read_bytes(), path.name, columns=columns)


def select_bands(sweep: Sweep, region: int, names: Sequence[str] = ()) -> tuple[Band, ...]:
    """The named bands of ``region`` (ValueError naming the valid ones), or by default the
    bands the sweep overlaps."""
    if names:
        return tuple(get_band(n, region) for n in names)
    return bands_in(sweep.f_start_hz, sweep.f_stop_hz, region)


@dataclass
class Analysis:
    """Everything printed for one file. ``extra`` keys are added to its JSON object and
    ``notes`` printed under its summary (for steps such as a feedline de-embedding)."""

    file: str
    sweep: Sweep
    region: int
    metrics: SweepMetrics
    at: tuple[PointValue, ...]
    extra: dict[str, Any] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)


def analyze_sweep(
    file: str,
    sweep: Sweep,
    *,
    region: int = 1,
    band_names: Sequence[str] = (),
    at_hz: Sequence[float] = (),
) -> Analysis:
    """Metrics of one sweep; AnalysisError if an ``at`` frequency lies outside the sweep."""
    bands = select_bands(sweep, region, band_names)
    metrics = compute_metrics(sweep, bands)
    at = tuple(value_at(sweep, hz) for hz in at_hz)
    return Analysis(file, sweep, region, metrics, at)


def analysis_to_json(a: Analysis) -> dict[str, Any]:
    """The JSON object of one file (docs/analyze-json.md): SI units, null for inf/unavailable."""
    m = a.metrics.to_dict()
    doc: dict[str, Any] = {
        "file": a.file,
        "points": m["points"],
        "z0_ohm": m["z0_ohm"],
        "f_start_hz": m["f_start_hz"],
        "f_stop_hz": m["f_stop_hz"],
        "has_phase": a.sweep.has_phase,
        "region": a.region,
        "min_swr": m["min_swr"],
        "min_swr_hz": m["min_swr_hz"],
        "resonances": m["resonances"],
        "swr_bandwidths": m["swr_bandwidths"],
        "bands": m["bands"],
        "at": [p.to_dict() for p in a.at],
        "unavailable": m["unavailable"],
    }
    doc.update(a.extra)
    return doc


# -- text rendering -------------------------------------------------------------------


T = TypeVar("T")


def option_value(parse: Callable[[str], T], text: str, hint: str) -> T:
    """``parse(text)``, a ValueError turned into a usage error naming the option ``hint``."""
    try:
        return parse(text)
    except ValueError as e:
        raise typer.BadParameter(str(e), param_hint=hint) from None


def _num(value: float | None, fmt: str = ".2f", scale: float = 1.0) -> str:
    if value is None:
        return "—"
    if math.isinf(value):
        return "∞"
    return format(value / scale, fmt).replace("-", "−")  # a true minus, as `match` prints


def _mhz(hz: float | None) -> str:
    return _num(hz, ".4f", 1e6)


def render_analysis(console: Console, a: Analysis) -> None:
    """Print one file's summary, resonances, SWR bandwidths, band table and --at values."""
    m, s = a.metrics, a.sweep
    console.print(f"[bold]{a.file}[/bold]")
    console.print(
        f"  {m.points} points, {_mhz(m.f_start_hz)}–{_mhz(m.f_stop_hz)} MHz, "
        f"z0 {m.z0_ohm:g} Ω, ITU Region {a.region}"
        + ("" if s.has_phase else ", SWR only (no phase)")
    )
    console.print(f"  min SWR {_num(m.min_swr)} at {_mhz(m.min_swr_hz)} MHz")
    for note in a.notes:
        console.print(f"  {note}")
    if m.unavailable:
        console.print(f"  unavailable without phase: {', '.join(m.unavailable)}")

    if s.has_phase:
        if m.resonances:
            t = Table(title="Resonances", title_justify="left")
            for col in ("f (MHz)", "kind", "R (Ω)", "Q"):
                t.add_column(col, justify="left" if col == "kind" else "right")
            for r in m.resonances:
                t.add_row(_mhz(r.hz), r.kind, _num(r.r_ohm, ".1f"), _num(r.q, ".1f"))
            console.print(t)
        else:
            console.print("  no resonance (X does not cross zero in the sweep)")

    t = Table(title="SWR bandwidths", title_justify="left")
    for col in ("SWR ≤", "low (MHz)", "high (MHz)", "width (kHz)", "note"):
        t.add_column(col, justify="left" if col == "note" else "right")
    for bw in m.swr_bandwidths:
        if bw.width_hz is None:
            note = "minimum is above this SWR"
        elif bw.open_low or bw.open_high:
            side = " and ".join(x for x, on in (("low", bw.open_low), ("high", bw.open_high)) if on)
            note = f"runs off the sweep ({side}): a lower bound"
        else:
            note = ""
        t.add_row(
            f"{bw.threshold:g}",
            _mhz(bw.low_hz),
            _mhz(bw.high_hz),
            _num(bw.width_hz, ".1f", 1e3),
            note,
        )
    console.print(t)

    if m.bands:
        # one column per band, one row per metric (labels from the metric table): stays
        # readable in a narrow terminal with a handful of bands
        rows = (
            ("coverage", ".0%"), ("min_swr", ".2f"), ("min_swr_hz", ".4f"),
            ("swr_center", ".2f"), ("r_center", ".1f"), ("x_center", ".1f"),
            ("return_loss_center", ".1f"), ("usable_fraction_2", ".0%"),
            ("bandwidth_2", ".1f"), ("resonance", ".4f"), ("q", ".1f"),
        )  # fmt: skip
        t = Table(title=f"Bands (ITU Region {a.region})", title_justify="left")
        t.add_column("metric")
        for b in m.bands:
            t.add_column(b.band, justify="right")
        for name, fmt in rows:
            spec = METRICS[name]
            scale = 1.0 if fmt.endswith("%") else spec.display_scale
            t.add_row(spec.axis_label, *(_num(getattr(b, spec.field), fmt, scale) for b in m.bands))
        t.add_row("Resonance kind", *(b.resonance_kind or "—" for b in m.bands))
        console.print(t)

    if a.at:
        t = Table(title="At frequencies", title_justify="left")
        for col in ("f (MHz)", "R (Ω)", "X (Ω)", "SWR", "RL (dB)", "ML (dB)"):
            t.add_column(col, justify="right")
        for p in a.at:
            t.add_row(
                _mhz(p.hz),
                _num(p.r_ohm, ".2f"),
                _num(p.x_ohm, ".2f"),
                _num(p.swr, ".3f"),
                _num(p.return_loss_db, ".2f"),
                _num(p.mismatch_loss_db, ".3f"),
            )
        console.print(t)
    console.print()


def error_line(file: str, exc: BaseException) -> str:
    """``error: FILE: line N: message`` (or without the line when the whole file is at fault)."""
    if isinstance(exc, OSError):
        return f"error: {file}: cannot read the file: {exc.strerror or exc}"
    return f"error: {file}: {exc}"


# -- the command ----------------------------------------------------------------------


def _frequencies(values: list[str] | None) -> list[float]:
    out = []
    for v in values or ():
        out.append(option_value(parse_frequency, v, "--at"))
    return out


def analyze(
    files: Annotated[
        list[Path], typer.Argument(metavar="FILE...", help="Sweep files (.s1p, .s2p, .ts, .csv).")
    ],
    band: Annotated[
        list[str] | None,
        typer.Option(
            "--band",
            help="Band to report, e.g. 40m (repeatable; default: every band the sweep overlaps).",
        ),
    ] = None,
    region: Annotated[
        int, typer.Option("--region", min=1, max=3, help="ITU region of the band plan.")
    ] = 1,
    at: Annotated[
        list[str] | None,
        typer.Option(
            "--at",
            help="Also report R, X, SWR, RL at this frequency, e.g. 7.1MHz "
            "or 7100kHz (repeatable).",
        ),
    ] = None,
    columns: Annotated[
        str | None,
        typer.Option("--columns", help="CSV column assignment, passed to the CSV reader."),
    ] = None,
    as_json: Annotated[
        bool, typer.Option("--json", help="Print a JSON array (docs/analyze-json.md).")
    ] = False,
    feedline: Annotated[
        str | None,
        typer.Option(
            "--feedline",
            help="The sweep was taken through this line, CABLE:LENGTH[:CONNECTORS], e.g. "
            "RG-213:30m: also report the feedpoint metrics (docs/feedlines.md).",
        ),
    ] = None,
    cable: Annotated[
        str | None, typer.Option("--cable", help="Feedline cable type (with --length).")
    ] = None,
    length: Annotated[
        str | None, typer.Option("--length", help="Feedline length, e.g. 30m or 98ft.")
    ] = None,
) -> None:
    """Print the metrics of each sweep file: summary, resonances, SWR bandwidths, bands."""
    at_hz = _frequencies(at)
    band_names = list(band or ())
    for name in band_names:  # a wrong band name is a usage error, not a bad file
        option_value(lambda n: get_band(n, region), name, "--band")

    from mastwatch.cli.lines import add_feedpoint, resolve_feedline  # feedline step (C)

    line = resolve_feedline(feedline, cable, length)
    console = Console(highlight=False)
    if not console.is_terminal:
        console.width = 160  # files and pipes: do not squeeze the band table into 80 columns
    results: list[dict[str, Any]] = []
    failed = 0
    for path in files:
        name = str(path)
        try:
            sweep = load_sweep(path, columns)
            analysis = analyze_sweep(name, sweep, region=region, band_names=band_names, at_hz=at_hz)
            feed = (
                None
                if line is None
                else add_feedpoint(
                    analysis, line, region=region, band_names=band_names, at_hz=at_hz
                )
            )
        except (OSError, RFError) as e:
            typer.echo(error_line(name, e), err=True)
            failed += 1
            continue
        if as_json:
            results.append(analysis_to_json(analysis))
        else:
            render_analysis(console, analysis)
            if feed is not None:
                render_analysis(console, feed)
    if as_json:
        typer.echo(json.dumps(results, indent=2, ensure_ascii=False, allow_nan=False))
    if failed:
        raise typer.Exit(1)


def register(app: typer.Typer) -> None:
    """Add ``mastwatch analyze`` to the app."""
    app.command("analyze")(analyze)
