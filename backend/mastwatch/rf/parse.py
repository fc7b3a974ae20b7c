"""Bytes of an uploaded or named file → :class:`Sweep`: the one entry point for every reader.

    bytes ─ size limit ─ text check (NUL, UTF-8) ─ BOM, CR/CRLF → "\\n"
          ─ by extension: .s1p .s2p .ts → Touchstone   .csv → CSV
            otherwise (.txt, unknown, no name) sniff the content
          ─ SweepSource gets the file name and, when a comment holds an ISO date-time,
            measured_at

Every failure is a :class:`SweepFormatError` with a 1-based line of the file as given
(or ``None`` when the whole file is at fault).
"""

from __future__ import annotations

import re
from dataclasses import replace
from datetime import datetime
from pathlib import PurePath

from mastwatch.rf.csvfile import read_csv
from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.limits import MAX_FILE_BYTES
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import NUMBER, read_touchstone

TOUCHSTONE_EXTENSIONS = {".s1p": 1, ".s2p": 2, ".ts": None}
CSV_EXTENSIONS = {".csv"}

_OPTION_WORDS = {"hz", "khz", "mhz", "ghz", "s", "y", "z", "h", "g", "ri", "ma", "db", "r"}
_SNP = re.compile(r"\.s(\d+)p", re.IGNORECASE)
# An ISO 8601 date and time (seconds and zone optional), e.g. 2025-03-14T09:30:00Z.
_ISO_DATETIME = re.compile(
    r"(?<!\d)(\d{4}-\d{2}-\d{2})[T ](\d{2}:\d{2}(?::\d{2}(?:\.\d{1,6})?)?)"
    r" ?(Z|[+-]\d{2}:?\d{2})?(?!\d)",
    re.ASCII,
)


def decode_text(data: bytes) -> str:
    """UTF-8 text with ``\\n`` line ends, or SweepFormatError if these bytes are not text."""
    if len(data) > MAX_FILE_BYTES:
        raise SweepFormatError(
            f"the file is {len(data) / 2**20:.1f} MB; the limit is {MAX_FILE_BYTES / 2**20:g} MB "
            f"({MAX_FILE_BYTES} bytes)"
        )
    nul = data.find(b"\x00")
    if nul >= 0:
        line = data.count(b"\n", 0, nul) + 1
        raise SweepFormatError(
            f"not a text file: byte 0x00 at offset {nul} (a NUL byte; is it a binary file?)",
            line,
        )
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as e:
        line = data.count(b"\n", 0, e.start) + 1
        raise SweepFormatError(
            f"not a text file: byte 0x{data[e.start]:02X} at offset {e.start} is not valid "
            "UTF-8 (save the file as UTF-8 text)",
            line,
        ) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    return text


def measured_at_from(comments: tuple[str, ...]) -> datetime | None:
    """The first ISO date-time in the comments (naive if the file names no time zone)."""
    for c in comments:
        m = _ISO_DATETIME.search(c)
        if m:
            zone = m.group(3) or ""
            try:
                return datetime.fromisoformat(f"{m.group(1)}T{m.group(2)}{zone}")
            except ValueError:
                continue  # e.g. month 13: not a date after all
    return None


def sniff_kind(text: str) -> str:
    """'touchstone' or 'csv' from the content of a file whose name does not say.

    Touchstone: the first line that is not blank or a comment is a ``!`` comment, an
    option line (``# MHz S RI R 50``), a keyword (``[Version]``) or whitespace-separated
    numbers. ``#`` lines that are not option lines are skipped as CSV comments. Anything
    else (a header row, commas, semicolons) is read as CSV.
    """
    for raw in text.split("\n", 200)[:200]:
        s = raw.strip()
        if not s:
            continue
        if s.startswith("!"):
            return "touchstone"
        if s[0] == "[":
            return "touchstone"
        if s[0] == "#":
            words = s[1:].partition("!")[0].lower().split()
            if all(w in _OPTION_WORDS or NUMBER.fullmatch(w) for w in words):
                return "touchstone"
            continue  # a CSV comment line such as "# exported 2025-03-14"
        tokens = s.split()
        if all(NUMBER.fullmatch(t) for t in tokens):
            return "touchstone"
        return "csv"
    return "touchstone"


def read_sweep(data: bytes, filename: str | None = None, *, columns: str | None = None) -> Sweep:
    """Read a sweep file (Touchstone v1/v2, one or two ports, or CSV) into a :class:`Sweep`.

    ``columns`` is the explicit CSV column spec (``freq:MHz,re,im``, see
    docs/file-formats.md); it applies to files read as CSV and is ignored for
    Touchstone files, whose layout the standard fixes.
    """
    text = decode_text(data)
    ext = PurePath(filename).suffix.lower() if filename else ""
    if ext in TOUCHSTONE_EXTENSIONS:
        sweep = read_touchstone(text, ports=TOUCHSTONE_EXTENSIONS[ext], filename=filename)
    elif _SNP.fullmatch(ext):
        raise SweepFormatError(
            f"{ext} is a {int(ext[2:-1])}-port Touchstone file; Mastwatch reads one- and "
            "two-port files (.s1p, .s2p)"
        )
    elif ext in CSV_EXTENSIONS or columns is not None or sniff_kind(text) == "csv":
        sweep = read_csv(text, columns=columns, filename=filename)
    else:
        sweep = read_touchstone(text, filename=filename)
    when = measured_at_from(sweep.source.comments)
    if when is not None:
        sweep = replace(sweep, source=replace(sweep.source, measured_at=when))
    return sweep
