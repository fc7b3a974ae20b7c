"""CSV sweep files: a header row names the columns, or an explicit column spec does.

    Frequency (MHz),Re,Im          header names, recognised case/space/underscore-blind
    7.000,0.12,-0.31               with units in the name: "Freq [kHz]", "freq_hz", ...

    spec "freq:MHz,re,im"          roles in column order (the CLI's --columns)

Accepted pairs, in order of preference when a file has several: (re, im) of Γ,
(R, X) in ohms, (|Γ| dB, phase), (return loss, phase), (|Γ|, phase), then magnitude
only: SWR, |Γ| dB, return loss or |Γ| (a sweep with ``has_phase=False``).

|Γ| in dB is negative and return loss is positive (RL = −20·log10|Γ|, see Bird 2009 in
REFERENCES.md §2); a column of the wrong sign for its name is refused with a hint.

Delimiter: tab, else semicolon, else comma, as the header (or first row) uses them;
whitespace when none. With tab, semicolon or whitespace a decimal comma is accepted.
A frequency column without a unit is read as Hz when every frequency is at least
100 000 (as MHz that would be beyond 100 GHz); otherwise the unit must be given.
"""

from __future__ import annotations

import csv
import re
import warnings
from dataclasses import dataclass

import numpy as np

from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.sweep import Sweep, SweepSource
from mastwatch.rf.touchstone import (
    FREQ_UNITS,
    NUMBER,
    UNIT_LABELS,
    LineOf,
    check_converted,
    check_finite,
    check_frequencies,
    check_passive,
    check_point_count,
    complex_from,
    frequencies_to_hz,
    polar,
)

ROLES = ("freq", "re", "im", "db", "rl", "mag", "deg", "rad", "r", "x", "swr", "skip")
"""Column roles of an explicit spec (and what header names are recognised as)."""

# Preferred first when a file holds several ways of saying the same thing.
PAIRS: tuple[tuple[str, ...], ...] = (
    ("re", "im"), ("r", "x"),
    ("db", "deg"), ("db", "rad"), ("rl", "deg"), ("rl", "rad"), ("mag", "deg"), ("mag", "rad"),
    ("swr",), ("db",), ("rl",), ("mag",),
)
PARAMETER = {"re": "S", "db": "S", "rl": "S", "mag": "S", "r": "Z", "swr": "SWR"}

UNITLESS_HZ_MIN = 1e5
"""A frequency column with no unit is read as Hz only when every value is at least this."""

DB_PASSIVE_MAX = 20 * np.log10(1.05)  # |Γ| = 1.05 (rf.limits.MAX_PASSIVE_GAMMA) in dB

_WORDS: dict[str, str] = {
    **dict.fromkeys(("f", "freq", "frequency", "fr"), "freq"),
    **dict.fromkeys(("re", "real"), "re"),
    **dict.fromkeys(("im", "imag", "imaginary"), "im"),
    **dict.fromkeys(("r", "rs", "resistance", "rez", "zre", "realz", "zreal"), "r"),
    **dict.fromkeys(("x", "xs", "reactance", "imz", "zim", "imagz", "zimag"), "x"),
    **dict.fromkeys(("swr", "vswr"), "swr"),
    **dict.fromkeys(("rl", "returnloss", "retloss"), "rl"),
    **dict.fromkeys(("db", "logmag", "magdb"), "db"),
    **dict.fromkeys(("mag", "magnitude", "abs", "linmag"), "mag"),
    **dict.fromkeys(("phase", "angle", "ang", "arg", "deg", "phi"), "deg"),
}
_UNIT_WORDS = {
    "hz": "hz", "khz": "khz", "mhz": "mhz", "ghz": "ghz", "db": "db",
    "deg": "deg", "degree": "deg", "degrees": "deg", "rad": "rad", "radians": "rad",
    "ohm": "ohm", "ohms": "ohm",
}
_SUFFIXES = sorted(_UNIT_WORDS, key=len, reverse=True)
_BRACKETS = re.compile(r"[(\[{]([^)\]}]*)[)\]}]")
_PARAM_WORDS = ("s11", "gamma", "rho")


def classify_header(name: str) -> tuple[str | None, str | None]:
    """(role, unit) of a header name: "Frequency (MHz)" → ("freq", "mhz"); role None if unknown."""
    raw = name.strip().strip("\"'")
    low = raw.lower().replace("γ", "gamma").replace("ρ", "rho").replace("°", "deg")
    low = low.replace("ω", "ohm")
    unit: str | None = None

    def bracket(m: re.Match[str]) -> str:
        nonlocal unit
        inner = re.sub(r"[\s_.]", "", m.group(1))
        if inner in _UNIT_WORDS and unit is None:
            unit = _UNIT_WORDS[inner]
            return " "
        return f" {inner} "

    low = _BRACKETS.sub(bracket, low)
    core = re.sub(r"[\s_\-|/.:,]", "", low)
    for word in _PARAM_WORDS:
        core = core.replace(word, "")
    if unit is None:
        for suf in _SUFFIXES:
            if core.endswith(suf) and len(core) > len(suf) and core[: -len(suf)] in _WORDS:
                core, unit = core[: -len(suf)], _UNIT_WORDS[suf]
                break
    if core == "":
        if unit == "db":
            return "db", None
        return ("mag", None) if "|" in raw and unit is None else (None, unit)
    role = _WORDS.get(core)
    if role is None and core.startswith("return") and "loss" in core:
        role = "rl"
    if role == "freq":
        return ("freq", unit) if unit in (None, *FREQ_UNITS) else (None, unit)
    if role == "mag" and unit == "db":
        return "db", None
    if role == "deg" and unit == "rad":
        return "rad", None
    if role == "rl" or role == "db":
        return role, None
    return role, unit


@dataclass(frozen=True)
class ColumnSpec:
    """An explicit column layout: one role per column, the frequency unit, z0."""

    roles: tuple[str, ...]
    freq_unit: str | None = None
    z0: float | None = None


def parse_column_spec(spec: str) -> ColumnSpec:
    """Read ``freq:MHz,re,im`` / ``freq:Hz,swr`` / ``freq:kHz,r,x,skip,z0=75``."""
    roles: list[str] = []
    unit: str | None = None
    z0: float | None = None
    for item in (i.strip() for i in spec.split(",")):
        low = item.lower().replace(" ", "")
        if low.startswith("z0="):
            text = low[3:]
            if not NUMBER.fullmatch(text) or not (0 < float(text) < float("inf")):
                raise SweepFormatError(
                    f"column spec: z0 must be a positive number of ohms, got '{item}'")
            z0 = float(text)
            continue
        role, _, u = low.partition(":")
        if role not in ROLES:
            raise SweepFormatError(
                f"column spec: unknown role '{item}'; roles are {', '.join(ROLES)} "
                "(e.g. freq:MHz,re,im)")
        if u:
            if role != "freq" or u not in FREQ_UNITS:
                raise SweepFormatError(
                    f"column spec: '{item}': only freq takes a unit, one of Hz, kHz, MHz, GHz")
            unit = u
        if role != "skip" and role in roles:
            raise SweepFormatError(f"column spec: '{role}' is given twice")
        roles.append(role)
    if "freq" not in roles:
        raise SweepFormatError("column spec: one column must be freq (e.g. freq:MHz,re,im)")
    return ColumnSpec(tuple(roles), unit, z0)


def _is_comment(s: str) -> bool:
    return s[0] in "#!" or s.startswith("//")


def _looks_numeric(s: str) -> bool:
    """A data row: more than half of its non-empty fields are numbers (a header has none;
    a preamble line such as "Points: 201" has half)."""
    delim = _delimiter(s)
    fields = [f for f in _split(s, delim) if f]
    if delim != ",":
        fields = [f.replace(",", ".") for f in fields]
    numbers = sum(1 for f in fields if NUMBER.fullmatch(f))
    return 2 * numbers > len(fields)


def _delimiter(line: str) -> str | None:
    """Tab, else semicolon, else comma, else None (whitespace).

    Semicolon before comma: files that use semicolons do so because the comma is
    their decimal mark (common practice in European locales).
    """
    return next((d for d in ("\t", ";", ",") if d in line), None)


def _split(line: str, delim: str | None) -> list[str]:
    fields = line.split(delim) if delim else line.split()
    fields = [f.strip().strip("\"'").strip() for f in fields]
    while fields and not fields[-1]:
        fields.pop()
    return fields


def _header_fields(line: str, delim: str | None) -> list[str]:
    if delim is None:
        return _split(line, None)
    try:
        fields = next(csv.reader([line], delimiter=delim))
    except (csv.Error, StopIteration):
        fields = line.split(delim)
    fields = [f.strip() for f in fields]
    while fields and not fields[-1]:
        fields.pop()
    return fields


def _spec_text(roles: tuple[str, ...], unit: str) -> str:
    return ",".join(f"freq:{UNIT_LABELS[unit]}" if r == "freq" else r for r in roles)


class _Rows:
    """Data rows as numbers (used columns only) and the lines they came from."""

    def __init__(self, values: np.ndarray, line_numbers: list[int]) -> None:
        self.values = values
        self.line_numbers = line_numbers

    def line_of(self, row: int) -> int | None:
        return self.line_numbers[row] if 0 <= row < len(self.line_numbers) else None


def _read_rows(lines: list[str], first: int, delim: str | None, ncols: int,
               used: list[int], names: list[str], header_line: int | None) -> _Rows:
    """Fast path with numpy.loadtxt; on any trouble, line by line with exact errors."""
    decimal_comma = delim != ","
    nums = [k + 1 for k in range(first, len(lines)) if lines[k].strip()]
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            block = np.loadtxt(lines[first:], delimiter=delim, comments=None, ndmin=2,
                               dtype=np.float64)
        if block.shape == (len(nums), ncols):
            return _Rows(block[:, used], nums)
    except (ValueError, TypeError, OverflowError):
        pass
    like = f" (as in the header on line {header_line})" if header_line else ""
    rows: list[list[float]] = []
    line_numbers: list[int] = []
    for k in range(first, len(lines)):
        s = lines[k].strip()
        if not s or _is_comment(s):
            continue
        fields = _split(s, delim)
        if len(fields) != ncols:
            raise SweepFormatError(f"expected {ncols} columns{like}, found {len(fields)}", k + 1)
        row: list[float] = []
        for c in used:
            text = fields[c]
            if decimal_comma and "," in text:
                text = text.replace(",", ".")
            if not NUMBER.fullmatch(text):
                what = f"'{fields[c]}' in column '{names[c]}' is" if text else \
                    f"column '{names[c]}' is empty:"
                raise SweepFormatError(f"{what} not a number", k + 1)
            row.append(float(text))
        rows.append(row)
        line_numbers.append(k + 1)
    return _Rows(np.array(rows, dtype=np.float64).reshape(-1, len(used)), line_numbers)


def read_csv(text: str, *, columns: str | None = None, filename: str | None = None) -> Sweep:
    """Read CSV text (newlines already ``\\n``) into a :class:`Sweep`; see the module doc."""
    spec = parse_column_spec(columns) if columns is not None else None
    lines = text.split("\n")
    comments: list[str] = []
    header: int | None = None
    first: int | None = None
    for k, raw in enumerate(lines):
        s = raw.strip()
        if not s:
            continue
        if _is_comment(s):
            comments.append(s.lstrip("#!/").strip())
        elif _looks_numeric(s):
            first = k
            break
        else:
            if header is not None:  # an earlier text line was a preamble, not the header
                comments.append(lines[header].strip())
            header = k
    if first is None:
        where = f" after the header on line {header + 1}" if header is not None else ""
        raise SweepFormatError(f"the file holds no data rows{where}")
    if header is None and spec is None:
        raise SweepFormatError(
            "no header row: the first line holds numbers; add a header such as "
            "'Frequency (MHz),Re,Im' or give the columns (e.g. --columns freq:MHz,re,im)",
            first + 1)
    header_line = header + 1 if header is not None else None
    delim = _delimiter(lines[header] if header is not None else lines[first])
    names = _header_fields(lines[header], delim) if header is not None else []

    units: dict[int, str | None] = {}
    if spec is not None:
        roles = list(spec.roles)
        if names and len(names) != len(roles):
            raise SweepFormatError(
                f"the column spec names {len(roles)} columns but the header has {len(names)} "
                f"({', '.join(names)}); use skip for columns to ignore", header_line)
        if not names:
            names = [f"{r} (column {i + 1})" for i, r in enumerate(roles)]
        fi = roles.index("freq")
        units[fi] = spec.freq_unit or (
            classify_header(names[fi])[1] if header is not None else None)
    else:
        roles = []
        for i, name in enumerate(names):
            role, unit = classify_header(name)
            if role is None or role in roles:
                role = "skip"  # unknown, or a second column of a kind already found
            roles.append(role)
            units[i] = unit
    if "freq" not in roles:
        raise SweepFormatError(
            f"no frequency column in the header ({', '.join(names)}); name it e.g. "
            "'Frequency (MHz)' or give --columns", header_line)
    pair = next((p for p in PAIRS if all(r in roles for r in p)), None)
    if pair is None:
        found = [f"{n} → {r}" for n, r in zip(names, roles, strict=True) if r != "skip"]
        raise SweepFormatError(
            "no usable columns: need the frequency and one of (Re, Im), (R, X), "
            "(S11 dB, phase), (return loss, phase), or SWR alone; recognised: "
            f"{', '.join(found) or 'nothing'} (or give --columns, e.g. freq:MHz,re,im)",
            header_line)
    fcol = roles.index("freq")
    used = [fcol, *(roles.index(r) for r in pair)]
    rows = _read_rows(lines, first, delim, len(roles), used, names, header_line)
    line_of: LineOf = rows.line_of
    values = rows.values
    check_point_count(values.shape[0], line_of)
    check_finite(values, line_of, [names[c] for c in used])

    f_raw = values[:, 0]
    unit = units.get(fcol)
    if unit is None:
        if np.all(f_raw >= UNITLESS_HZ_MIN):
            unit = "hz"
            comments.append(
                f"frequency unit not given: read as Hz (every value is at least "
                f"{UNITLESS_HZ_MIN:.0f})")
        else:
            raise SweepFormatError(
                f"the frequency column '{names[fcol]}' gives no unit and the values "
                f"(from {float(f_raw.min())!r}) do not show it; write it in the header, e.g. "
                "'Frequency (MHz)', or give --columns freq:MHz,...", header_line)
    check_frequencies(f_raw, unit, line_of)
    f_hz = frequencies_to_hz(f_raw, unit, line_of)

    z0 = spec.z0 if spec is not None and spec.z0 is not None else 50.0
    a = values[:, 1]
    b = values[:, 2] if len(pair) == 2 else None
    gamma, has_phase = _gamma(pair, a, b, z0, line_of)
    check_converted(gamma, line_of, "/".join(pair))
    check_passive(gamma, line_of, "|Γ|")
    source = SweepSource(
        filename=filename,
        format="csv",
        parameter=PARAMETER.get(pair[0], "S"),
        data_format=_spec_text(tuple(roles), unit),
        ports=1,
        comments=tuple(comments),
    )
    return Sweep(f_hz, gamma, z0=z0, has_phase=has_phase, source=source)


def _gamma(pair: tuple[str, ...], a: np.ndarray, b: np.ndarray | None, z0: float,
           line_of: LineOf) -> tuple[np.ndarray, bool]:
    """Γ from the chosen columns, and whether it has a phase."""
    kind = pair[0]
    if kind == "db":
        bad = np.flatnonzero(a > DB_PASSIVE_MAX)
        if bad.size:
            raise SweepFormatError(
                f"|Γ| of {float(a[bad[0]])!r} dB is above 0 dB: |Γ| in dB is negative for an "
                "antenna. If this column is return loss (a positive number), name it "
                "'Return loss' or use rl in --columns", line_of(int(bad[0])))
        with np.errstate(over="ignore"):
            mag = 10.0 ** (a / 20.0)
    elif kind == "rl":
        bad = np.flatnonzero(a < -DB_PASSIVE_MAX)
        if bad.size:
            raise SweepFormatError(
                f"return loss of {float(a[bad[0]])!r} dB is negative: return loss is positive "
                "for an antenna. If this column is |Γ| (S11) in dB, name it 'S11 dB' or use db "
                "in --columns", line_of(int(bad[0])))
        with np.errstate(over="ignore"):
            mag = 10.0 ** (-a / 20.0)
    elif kind == "swr":
        bad = np.flatnonzero(a < 1)
        if bad.size:
            raise SweepFormatError(
                f"SWR {float(a[bad[0]])!r} is below 1 (an SWR is at least 1)",
                line_of(int(bad[0])))
        return (a - 1) / (a + 1), False
    elif kind == "mag":
        bad = np.flatnonzero(a < 0)
        if bad.size:
            raise SweepFormatError(f"|Γ| {float(a[bad[0]])!r} is negative", line_of(int(bad[0])))
        mag = a
    elif kind == "re":
        assert b is not None
        return complex_from(a, b), True
    else:  # (r, x): Γ = (Z − z0)/(Z + z0)
        assert b is not None
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            z = complex_from(a, b)
            return (z - z0) / (z + z0), True
    if b is None:
        return mag, False
    with np.errstate(invalid="ignore", over="ignore"):
        if pair[1] == "rad":
            return mag * np.exp(1j * b), True
        return polar(mag, b), True
