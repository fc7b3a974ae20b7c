"""Touchstone files: read versions 1.x, 2.0 and 2.1 (one and two ports); write version 1.

The format is the IBIS Open Forum's open standard (see shared REFERENCES.md §1):

    ! comment                     (anywhere; "!" to the end of the line)
    # <Hz|kHz|MHz|GHz> <S|Y|Z> <RI|MA|DB> R <ohms>     option line, first one counts
    <freq> <pair 11> [<pair 21> <pair 12> <pair 22>]   one frequency per line (v1)

Version 2 files start with ``[Version] 2.0`` and add keywords; there a frequency's
values may wrap across lines. A two-port gives S11 (the sweep) and keeps S21.

Reading is vectorised: the data block goes through ``numpy.loadtxt`` in one call; only
when that fails, or a check finds a bad value, is the block scanned line by line to
say exactly which line is wrong (1-based, counting comment and blank lines).

The checks shared with the CSV reader (frequencies, finite values, passivity, point
count) live here too, so every reader words its errors the same way.
"""

from __future__ import annotations

import re
import warnings
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from mastwatch.rf.errors import AnalysisError, SweepFormatError
from mastwatch.rf.limits import MAX_PASSIVE_GAMMA, MAX_POINTS
from mastwatch.rf.sweep import Sweep, SweepSource

FloatArray = NDArray[np.float64]
ComplexArray = NDArray[np.complex128]

FREQ_UNITS: dict[str, float] = {"hz": 1.0, "khz": 1e3, "mhz": 1e6, "ghz": 1e9}
UNIT_LABELS: dict[str, str] = {"hz": "Hz", "khz": "kHz", "mhz": "MHz", "ghz": "GHz"}

# A number as Touchstone (and numpy.loadtxt) writes it; Python's float() would also take
# "1_000" and non-ASCII digits, which no instrument writes.
NUMBER = re.compile(
    r"[+-]?(?:(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|nan|inf|infinity)", re.IGNORECASE | re.ASCII
)

LineOf = Callable[[int], "int | None"]
"""Maps a record (row) index to the 1-based line of the file it starts on."""


# -- checks shared by every reader ---------------------------------------------------------


def check_point_count(n: int, line_of: LineOf) -> None:
    """Refuse an empty sweep and one with more than MAX_POINTS points."""
    if n == 0:
        raise SweepFormatError("the file holds no data: no line with a frequency and its values")
    if n > MAX_POINTS:
        raise SweepFormatError(
            f"too many frequency points: more than {MAX_POINTS} (the limit)", line_of(MAX_POINTS)
        )


def check_finite(values: np.ndarray, line_of: LineOf,
                 columns: list[str] | None = None) -> None:
    """Refuse NaN and infinity anywhere in a (rows × columns) block of numbers."""
    ok = np.isfinite(values)
    if not ok.all():
        row, col = (int(i[0]) for i in np.nonzero(~ok))
        what = f"column '{columns[col]}'" if columns else f"value {col + 1}"
        raise SweepFormatError(
            f"{what} is {float(values[row, col])!r}: not a finite number "
            "(NaN, infinity or beyond the float range)",
            line_of(row),
        )


def check_frequencies(f_raw: FloatArray, unit: str, line_of: LineOf) -> None:
    """Frequencies (as written in the file, in ``unit``) must be ≥ 0 and strictly increasing."""
    label = UNIT_LABELS.get(unit, unit)
    neg = np.flatnonzero(f_raw < 0)
    if neg.size:
        i = int(neg[0])
        raise SweepFormatError(f"negative frequency {float(f_raw[i])!r} {label}", line_of(i))
    bad = np.flatnonzero(~(np.diff(f_raw) > 0))
    if bad.size:
        i = int(bad[0]) + 1
        here, prev = float(f_raw[i]), float(f_raw[i - 1])
        where = f"line {line_of(i - 1)}"
        if here == prev:
            msg = f"duplicate frequency {here!r} {label} (already on {where})"
        else:
            msg = (
                f"frequency {here!r} {label} is below the previous one, {prev!r} {label} on "
                f"{where}: frequencies must increase"
            )
        raise SweepFormatError(msg, line_of(i))


def frequencies_to_hz(f_raw: FloatArray, unit: str, line_of: LineOf) -> FloatArray:
    """Scale to Hz, refusing values that overflow float64 on the way."""
    with np.errstate(over="ignore"):
        f_hz = f_raw * FREQ_UNITS[unit]
    big = np.flatnonzero(~np.isfinite(f_hz))
    if big.size:
        raise SweepFormatError(
            f"frequency {float(f_raw[int(big[0])])!r} {UNIT_LABELS[unit]} is too large",
            line_of(int(big[0])),
        )
    return f_hz


def check_converted(values: np.ndarray, line_of: LineOf, what: str) -> None:
    """After a conversion (dB → linear, Z → Γ, ...) every value must still be finite."""
    bad = np.flatnonzero(~np.isfinite(values))
    if bad.size:
        raise SweepFormatError(
            f"the values cannot be converted to a reflection coefficient ({what})",
            line_of(int(bad[0])),
        )


def check_passive(gamma: np.ndarray, line_of: LineOf, name: str = "|S11|") -> None:
    """|Γ| above MAX_PASSIVE_GAMMA cannot come from a passive antenna or cable."""
    mag = np.abs(gamma)
    bad = np.flatnonzero(mag > MAX_PASSIVE_GAMMA)
    if bad.size:
        i = int(bad[0])
        raise SweepFormatError(
            f"{name} = {float(mag[i]):.6g} is above {MAX_PASSIVE_GAMMA}: a passive antenna or "
            "cable cannot reflect more than it receives (check the file's format, parameter "
            "and reference impedance)",
            line_of(i),
        )


def polar(mag: np.ndarray, deg: np.ndarray) -> ComplexArray:
    """mag·e^(j·deg) with the angle in degrees (Touchstone angles are degrees)."""
    return mag * np.exp(1j * np.deg2rad(deg))


def complex_from(re_part: np.ndarray, im_part: np.ndarray) -> ComplexArray:
    """A complex array with exactly these parts (``a + 1j*b`` would lose the sign of −0.0)."""
    out = np.empty(np.shape(re_part), dtype=np.complex128)
    out.real = re_part
    out.imag = im_part
    return out


# -- option line -----------------------------------------------------------------------------


@dataclass
class Options:
    """The option line's settings (TS 2.0, Option Line, p. 7: defaults GHz S MA R 50)."""

    unit: str = "ghz"
    parameter: str = "S"
    fmt: str = "MA"
    r: tuple[float, ...] = (50.0,)
    line: int | None = None


def parse_option_line(content: str, line: int) -> Options:
    """Read ``# <unit> <parameter> <format> R <n>``: any order and case; bare ``#`` = defaults."""
    opts = Options(line=line)
    seen: set[str] = set()
    tokens = content[1:].split()
    i = 0
    while i < len(tokens):
        tok = tokens[i]
        low = tok.lower()
        if low in FREQ_UNITS:
            kind, opts.unit = "unit", low
        elif low in ("s", "y", "z"):
            kind, opts.parameter = "parameter", low.upper()
        elif low in ("h", "g"):
            raise SweepFormatError(
                f"{tok.upper()}-parameters are not supported (Mastwatch reads S, Y and Z)", line
            )
        elif low in ("ri", "ma", "db"):
            kind, opts.fmt = "format", low.upper()
        elif low == "r":
            kind = "reference"
            refs: list[float] = []
            while i + 1 < len(tokens) and NUMBER.fullmatch(tokens[i + 1]):
                i += 1
                refs.append(float(tokens[i]))
            if not refs:
                raise SweepFormatError(
                    "option line: R must be followed by the reference in ohms", line)
            opts.r = tuple(_positive_refs(refs, line))
        else:
            raise SweepFormatError(
                f"option line: unknown '{tok}'; expected a frequency unit (Hz, kHz, MHz, GHz), "
                "a parameter (S, Y, Z), a format (RI, MA, DB) or R <ohms>",
                line,
            )
        if kind in seen:
            raise SweepFormatError(f"option line: the {kind} is given twice", line)
        seen.add(kind)
        i += 1
    return opts


def _positive_refs(refs: Iterable[float], line: int) -> list[float]:
    out = list(refs)
    for r in out:
        if not (np.isfinite(r) and r > 0):
            raise SweepFormatError(f"reference impedance {r!r} Ω is not a positive number", line)
    return out


# -- the data block --------------------------------------------------------------------------


class _Block:
    """Rows of numbers of one kind (network data), and how to find a row's line lazily."""

    def __init__(self, values: np.ndarray, line_numbers: list[int] | None, lines: list[str],
                 start: int) -> None:
        self.values = values
        self._line_numbers = line_numbers
        self._lines = lines
        self._start = start

    def line_of(self, row: int) -> int | None:
        if self._line_numbers is None:
            # Fast path: one row per non-empty line from ``start`` on (what loadtxt read);
            # only worked out when an error needs a line number.
            self._line_numbers = [
                k + 1 for k in range(self._start, len(self._lines))
                if self._lines[k].partition("!")[0].strip()
            ]
        return self._line_numbers[row] if 0 <= row < len(self._line_numbers) else None


def _fast_rows(lines: list[str], start: int, stop: int, width: int) -> np.ndarray | None:
    """All rows at once with numpy, or None when anything is unusual (then scan line by line)."""
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # "input contained no data" and the like
            values = np.loadtxt(lines[start:stop], comments="!", ndmin=2, dtype=np.float64)
    except (ValueError, TypeError, OverflowError):
        return None
    if values.shape[1] != width or values.shape[0] == 0:
        return None
    return values


def _tokens(content: str, line: int) -> list[float]:
    toks = content.split()
    if not all(map(NUMBER.fullmatch, toks)):
        bad = next(t for t in toks if not NUMBER.fullmatch(t))
        raise SweepFormatError(f"'{bad}' is not a number", line)
    return list(map(float, toks))


def _trailing_noise_start(lines: list[str], start: int) -> int | None:
    """Index of the first line of a trailing run of 5-number lines (v1 two-port noise data)."""
    found = None
    for k in range(len(lines) - 1, start - 1, -1):
        tokens = lines[k].partition("!")[0].split()
        if not tokens:
            continue
        if len(tokens) != 5:
            break
        found = k
    return found


def _describe(ports: int, width: int) -> str:
    pairs = (width - 1) // 2
    if ports == 1:
        return "a frequency and one pair of values"
    return f"a frequency and {pairs} pairs of values"


@dataclass
class _Scan:
    rows: list[list[float]] = field(default_factory=list)
    line_numbers: list[int] = field(default_factory=list)
    stop_keyword: str | None = None
    stop_line: int | None = None


def _scan_rows(lines: list[str], start: int, width: int, *, ports: int, version: int,
               max_rows: int, had_options: bool = True) -> _Scan:
    """Line-by-line reading with exact error lines (the slow, careful path).

    Version 1: one frequency per line; in a two-port, a line of 5 numbers whose frequency
    is not above the last network frequency starts the noise data (TS 1.1), which is
    skipped. Version 2: a frequency's values may wrap across lines, each frequency starts a
    new line (from memory of TS 2.0, Network Data), and the data end at a keyword.
    """
    scan = _Scan()
    current: list[float] = []
    current_line = 0
    for k in range(start, len(lines)):
        n = k + 1
        content = lines[k].partition("!")[0].strip()
        if not content:
            continue
        if content.startswith("#"):
            if not had_options:
                # Defaults (GHz, MA) would silently apply to the rows above it.
                raise SweepFormatError("the option line (#) must come before the data", n)
            continue  # only the first option line counts (TS 2.0, Option Line)
        if content.startswith("["):
            name = content[1:].partition("]")[0].strip().lower()
            if version == 1:
                raise SweepFormatError(
                    f"keyword [{name}] in a version 1 file (version 2 files start with "
                    "[Version] 2.0)", n)
            if name in ("end", "noise data"):
                scan.stop_keyword, scan.stop_line = name, n
                break
            raise SweepFormatError(f"unexpected keyword [{name}] inside [Network Data]", n)
        values = _tokens(content, n)
        if version == 1:
            if ports == 2 and len(values) == 5 and scan.rows and values[0] <= scan.rows[-1][0]:
                scan.stop_keyword, scan.stop_line = "noise data", n
                break
            if len(values) != width:
                raise SweepFormatError(
                    f"expected {width} numbers ({_describe(ports, width)}), found {len(values)}", n)
            scan.rows.append(values)
            scan.line_numbers.append(n)
        else:
            if not current:
                current_line = n
            current.extend(values)
            if len(current) > width:
                found = len(values) if current_line == n else len(current)
                raise SweepFormatError(
                    f"expected {width} numbers for one frequency ({_describe(ports, width)}; "
                    f"they may wrap onto the next lines), found {found}", n)
            if len(current) == width:
                scan.rows.append(current)
                scan.line_numbers.append(current_line)
                current = []
        if len(scan.rows) > max_rows:
            break
    if current:
        raise SweepFormatError(
            f"the values of the last frequency are incomplete: {len(current)} of {width} numbers",
            current_line)
    return scan


# -- reading ---------------------------------------------------------------------------------


@dataclass
class _Header:
    opts: Options | None = None
    version: int = 1
    version_text: str = "1"
    ports: int | None = None
    ports_line: int | None = None
    order: str | None = None  # "12_21" or "21_12"
    matrix: str = "full"
    nfreq: int | None = None
    nfreq_line: int | None = None
    reference: list[float] | None = None
    comments: list[str] = field(default_factory=list)
    data_start: int = 0


def _int_arg(arg: str, name: str, line: int) -> int:
    tok = arg.split()
    if len(tok) != 1 or not (tok[0].isascii() and tok[0].isdigit()) or int(tok[0]) < 1:
        raise SweepFormatError(f"[{name}] needs a whole number of at least 1, got '{arg}'", line)
    return int(tok[0])


def _read_header(lines: list[str], ports_hint: int | None) -> _Header:
    h = _Header()
    keywords_seen = 0
    in_info = False
    ref_pending = False
    k = 0
    while k < len(lines):
        n = k + 1
        content, bang, comment = lines[k].partition("!")
        if bang:
            h.comments.append(comment.strip())
        s = content.strip()
        k += 1
        if not s:
            continue
        if in_info:
            if s.lower().replace(" ", "").startswith("[endinformation]"):
                in_info = False
            continue
        if ref_pending:
            if s[0] not in "[#":
                assert h.reference is not None and h.ports is not None
                h.reference.extend(_positive_refs(_tokens(s, n), n))
                if len(h.reference) > h.ports:
                    raise SweepFormatError(
                        f"[Reference] gives {len(h.reference)} values for {h.ports} ports", n)
                ref_pending = len(h.reference) < h.ports
                continue
            raise SweepFormatError(
                f"[Reference] gives {len(h.reference or [])} values for {h.ports} ports", n)
        if s[0] == "#":
            if h.opts is None:
                h.opts = parse_option_line(s, n)
            continue
        if s[0] != "[":
            if h.version == 1:
                h.data_start = k - 1
                return h
            raise SweepFormatError("data before [Network Data] in a version 2 file", n)
        name, close, arg = s[1:].partition("]")
        if not close:
            raise SweepFormatError(f"keyword '{s}' has no closing ']'", n)
        name = " ".join(name.lower().split())
        arg = arg.strip()
        if name == "version":
            if keywords_seen:
                raise SweepFormatError("[Version] must come before every other keyword", n)
            if arg.split()[:1] not in (["2.0"], ["2.1"]):
                raise SweepFormatError(
                    f"Touchstone version '{arg}' is not supported (read: 1.x, 2.0, 2.1)", n)
            h.version, h.version_text = 2, arg.split()[0]
        elif h.version == 1:
            raise SweepFormatError(
                f"keyword [{name}] in a version 1 file (version 2 files start with "
                "[Version] 2.0)", n)
        elif name == "number of ports":
            h.ports, h.ports_line = _int_arg(arg, "Number of Ports", n), n
            if h.ports not in (1, 2):
                raise SweepFormatError(
                    f"{h.ports}-port files are not supported (Mastwatch reads 1 and 2 ports)", n)
            if ports_hint is not None and h.ports != ports_hint:
                raise SweepFormatError(
                    f"[Number of Ports] is {h.ports} but the file name says .s{ports_hint}p", n)
        elif name == "two-port data order":
            order = arg.replace(" ", "")
            if order not in ("12_21", "21_12"):
                raise SweepFormatError(
                    f"[Two-Port Data Order] must be 12_21 or 21_12, got '{arg}'", n)
            h.order = order
        elif name == "number of frequencies":
            h.nfreq, h.nfreq_line = _int_arg(arg, "Number of Frequencies", n), n
        elif name == "reference":
            if h.ports is None:
                raise SweepFormatError("[Reference] must come after [Number of Ports]", n)
            h.reference = _positive_refs(_tokens(arg, n), n)
            if len(h.reference) > h.ports:
                raise SweepFormatError(
                    f"[Reference] gives {len(h.reference)} values for {h.ports} ports", n)
            ref_pending = len(h.reference) < h.ports
        elif name == "matrix format":
            fmt = arg.lower()
            if fmt not in ("full", "lower", "upper"):
                raise SweepFormatError(
                    f"[Matrix Format] must be Full, Lower or Upper, got '{arg}'", n)
            h.matrix = fmt
        elif name == "mixed-mode order":
            raise SweepFormatError("mixed-mode files are not supported", n)
        elif name == "begin information":
            in_info = True
        elif name == "network data":
            if h.ports is None:
                raise SweepFormatError("a version 2 file needs [Number of Ports]", n)
            if h.ports == 2 and h.order is None and h.matrix == "full":
                raise SweepFormatError(
                    "a version 2 two-port file needs [Two-Port Data Order] (12_21 or 21_12)", n)
            if h.nfreq is None:
                raise SweepFormatError("a version 2 file needs [Number of Frequencies]", n)
            h.data_start = k
            return h
        elif name in ("end", "noise data"):
            raise SweepFormatError(f"[{name}] before [Network Data]", n)
        # Other keywords (e.g. [Number of Noise Frequencies]) say nothing we need.
        keywords_seen += 1
    if h.version == 2:
        raise SweepFormatError("a version 2 file needs [Network Data]")
    h.data_start = len(lines)
    return h


def _infer_ports(lines: list[str], start: int) -> int:
    """Ports of a version 1 file whose name does not say: 3 numbers a line → 1, 9 → 2."""
    for k in range(start, len(lines)):
        content = lines[k].partition("!")[0].split()
        if content:
            if len(content) == 3:
                return 1
            if len(content) == 9:
                return 2
            raise SweepFormatError(
                f"cannot tell the number of ports from {len(content)} numbers on a line "
                "(3 for a one-port, 9 for a two-port); name the file .s1p or .s2p", k + 1)
    return 1


def _to_complex(a: np.ndarray, b: np.ndarray, fmt: str) -> ComplexArray:
    if fmt == "RI":
        return complex_from(a, b)
    with np.errstate(over="ignore", invalid="ignore"):
        mag = a if fmt == "MA" else 10.0 ** (a / 20.0)
        return polar(mag, b)


def _matrices(values: np.ndarray, h: _Header, fmt: str) -> ComplexArray:
    """(n, 2, 2) complex matrices of a two-port's rows."""
    pairs = [_to_complex(values[:, 1 + 2 * p], values[:, 2 + 2 * p], fmt)
             for p in range((values.shape[1] - 1) // 2)]
    m = np.empty((values.shape[0], 2, 2), dtype=np.complex128)
    if h.matrix == "full":
        n11, na, nb, n22 = pairs
        # Version 1 two-ports are always N11 N21 N12 N22 (TS 1.1); v2 says which.
        n21, n12 = (nb, na) if h.order == "12_21" else (na, nb)
    elif h.matrix == "lower":
        n11, n21, n22 = pairs
        n12 = n21
    else:
        n11, n12, n22 = pairs
        n21 = n12
    m[:, 0, 0], m[:, 0, 1], m[:, 1, 0], m[:, 1, 1] = n11, n12, n21, n22
    return m


def _to_s_one_port(p: ComplexArray, parameter: str, r: float, version: int) -> ComplexArray:
    """Γ from S, Z or Y: v1 Z/Y are normalised to R, v2 are in ohms/siemens (TS 2.0 p. 7)."""
    if parameter == "S":
        return p
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        if parameter == "Z":
            z = p if version == 1 else p / r
            return (z - 1) / (z + 1)
        y = p if version == 1 else p * r
        return (1 - y) / (1 + y)


def _to_s_two_port(m: ComplexArray, parameter: str, refs: tuple[float, float],
                   version: int) -> ComplexArray:
    """S from Z or Y matrices: normalise by √(Ri·Rj), then S = (z + I)⁻¹(z − I).

    For Y, S = (I + y)⁻¹(I − y). The 2×2 inverse is written out so that a singular
    matrix gives NaN in its own row (and an error naming its line), not for the file.
    """
    if parameter == "S":
        return m
    eye = np.eye(2)
    root = np.sqrt(np.outer(refs, refs))
    norm = m if version == 1 else (m / root if parameter == "Z" else m * root)
    a, b = (norm + eye, norm - eye) if parameter == "Z" else (eye + norm, eye - norm)
    with np.errstate(all="ignore"):
        det = a[:, 0, 0] * a[:, 1, 1] - a[:, 0, 1] * a[:, 1, 0]
        inv = np.empty_like(a)
        inv[:, 0, 0], inv[:, 1, 1] = a[:, 1, 1] / det, a[:, 0, 0] / det
        inv[:, 0, 1], inv[:, 1, 0] = -a[:, 0, 1] / det, -a[:, 1, 0] / det
        return inv @ b


def read_touchstone(text: str, *, ports: int | None = None, filename: str | None = None) -> Sweep:
    """Read a Touchstone file's text (newlines already ``\\n``) into a :class:`Sweep`.

    ``ports`` comes from the file name (.s1p → 1, .s2p → 2) when known; otherwise the
    version 2 keyword or the number of values on the first data line decides.
    """
    lines = text.split("\n")
    h = _read_header(lines, ports)
    opts = h.opts or Options()
    nports = h.ports or ports or _infer_ports(lines, h.data_start)
    pairs = 1 if nports == 1 else (4 if h.matrix == "full" else 3)
    width = 1 + 2 * pairs

    start = h.data_start
    stop = len(lines)
    if h.version == 2:
        for k in range(start, len(lines)):
            if "[" in lines[k] and lines[k].partition("!")[0].lstrip().startswith("["):
                stop = k
                break
    elif nports == 2:
        # v1 noise data: numpy reads the network block up to it when the first noise
        # line's frequency is not above the last network frequency (TS 1.1).
        noise = _trailing_noise_start(lines, start)
        first_noise = lines[noise].partition("!")[0].split()[0] if noise is not None else ""
        if noise is not None and NUMBER.fullmatch(first_noise):
            stop = noise
    values = _fast_rows(lines, start, stop, width)
    if (values is not None and stop < len(lines) and h.version == 1
            and not float(lines[stop].partition("!")[0].split()[0]) <= values[-1, 0]):
        values = None  # not noise after all: let the careful scan say what is wrong
    if values is not None:
        block = _Block(values, None, lines, start)
    else:
        scan = _scan_rows(lines, start, width, ports=nports, version=h.version,
                          max_rows=MAX_POINTS, had_options=h.opts is not None)
        arr = np.array(scan.rows, dtype=np.float64).reshape(-1, width)
        block = _Block(arr, scan.line_numbers, lines, start)
        values = arr
    line_of = block.line_of

    check_point_count(values.shape[0], line_of)
    if h.nfreq is not None and h.nfreq != values.shape[0]:
        raise SweepFormatError(
            f"[Number of Frequencies] is {h.nfreq} but [Network Data] holds "
            f"{values.shape[0]} frequencies", h.nfreq_line)
    check_finite(values, line_of)
    f_raw = values[:, 0]
    check_frequencies(f_raw, opts.unit, line_of)
    f_hz = frequencies_to_hz(f_raw, opts.unit, line_of)

    if h.reference is not None:
        refs = tuple(h.reference)
    elif len(opts.r) in (1, nports):
        refs = opts.r * nports if len(opts.r) == 1 else opts.r
    else:
        raise SweepFormatError(
            f"option line: {len(opts.r)} reference impedances for {nports} ports", opts.line)

    s21: ComplexArray | None = None
    if nports == 1:
        s11 = _to_s_one_port(_to_complex(values[:, 1], values[:, 2], opts.fmt),
                             opts.parameter, refs[0], h.version)
    else:
        s = _to_s_two_port(_matrices(values, h, opts.fmt), opts.parameter,
                           (refs[0], refs[1]), h.version)
        s11, s21 = s[:, 0, 0], s[:, 1, 0]
        check_converted(s21, line_of, f"{opts.parameter} {opts.fmt}")
    check_converted(s11, line_of, f"{opts.parameter} {opts.fmt}")
    check_passive(s11, line_of)

    source = SweepSource(
        filename=filename,
        format=f"touchstone-{h.version}",
        parameter=opts.parameter,
        data_format=opts.fmt,
        ports=nports,
        comments=tuple(h.comments),
    )
    return Sweep(f_hz, s11, z0=refs[0], s21=s21, source=source)


# -- writing ---------------------------------------------------------------------------------


def write_touchstone(sweep: Sweep, comments: Iterable[str] = ()) -> str:
    """A version 1 one-port file ``# Hz S RI R <z0>`` that reads back bit for bit.

    Floats are written with ``repr`` (the shortest text that reads back as the same
    float64). S21 of a two-port sweep is not written: a one-port file holds S11 only.
    """
    if not sweep.has_phase:
        raise AnalysisError(
            "this sweep has SWR only (no phase), so it cannot be written as Touchstone S11")
    out = [f"! {part}".rstrip() for c in comments for part in (str(c).splitlines() or [""])]
    out.append(f"# Hz S RI R {float(sweep.z0)!r}")
    f = sweep.freq_hz.tolist()
    re_part = sweep.gamma.real.tolist()
    im_part = sweep.gamma.imag.tolist()
    out.extend([f"{a!r} {b!r} {c!r}" for a, b, c in zip(f, re_part, im_part, strict=True)])
    return "\n".join(out) + "\n"
