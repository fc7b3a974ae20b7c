"""Distance to fault: reflection along the feedline from a one-port sweep.

Bandpass-mode time-domain transform (REFERENCES §7; Oppenheim & Schafer,
*Discrete-Time Signal Processing* 3rd ed.; Harris 1978 on windows [memory]):

    Γ(f_k), k = 0…N−1 on a uniform grid (resampled by linear interpolation otherwise)
      × window w_k (Kaiser β, default 6; or rectangular)
      → zero-padded to pad·N points → inverse FFT → h(t_n), t_n = n/(M·Δf)
      ÷ Σw/M (coherent gain: a lone reflection ρ at a grid delay reads |h| = |ρ|)
      × e^(+2α·d) when a cable is given (loss compensation, α at the sweep centre)
    d_n = t_n·VF·c/2,  resolution = VF·c/(2·span),  range = VF·c·(N−1)/(2·span)

Loss compensation is bounded, because e^(+2α·d) over a whole HF sweep's range (5.6 km
for 1,601 points over 1.8–30 MHz) turns noise into reflections of 10^20:

- the view ends at ``max_distance_m``: by default, with compensation, where the line's
  two-way loss reaches the peak threshold (beyond it even an open would come back
  weaker than the threshold, so all compensation could add there is noise), and never
  past half the range (the far half of the circular transform holds negative delays:
  the leakage of the reflections near the analyzer); without compensation, the whole
  unambiguous range;
- the compensation gain is held, not grown, past the threshold distance;
- a compensated peak must also stand 12 dB above the transform's noise floor (median
  |h| before compensation), so amplified noise is never listed;
- a passive line cannot reflect more than it receives: compensated |ρ| above 1 is
  shown as 1, and above 1.05 a note says the assumed loss is too high.

Peaks (scipy.signal.find_peaks above a return-loss threshold) are refined by a
parabola through the three samples around each maximum. The window widens the main
lobe (about 1.5–2.5 resolution cells) in exchange for low side lobes; zero padding
only interpolates. The bandpass transform is complex and shows magnitude only: it
cannot tell an open from a short (a lowpass step response could; not done here).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

import numpy as np
from numpy.typing import NDArray
from scipy import fft as sfft
from scipy.signal import find_peaks
from scipy.signal.windows import kaiser

from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.lines import C0, CableType
from mastwatch.rf.sweep import Sweep

FloatArray = NDArray[np.float64]

MIN_POINTS = 32
"""Fewer frequency points than this cannot place anything along a line."""

DEFAULT_MAX_RESOLUTION_M = 10.0
"""Refuse a sweep whose resolution cell is longer than this: it could not place a
fault on a club feedline any better than "somewhere on it" (a single-band sweep)."""

DEFAULT_THRESHOLD_DB = 30.0
"""Report peaks with return loss below this (|ρ| above 0.032); Kaiser β=6 side lobes
of an open sit near −44 dB, so they stay below it."""

WINDOWS = ("kaiser", "rect")

NOISE_MARGIN = 4.0
"""A compensated peak must stand this far (×4, 12 dB) above the median |h| before
compensation: white noise of the transform rarely exceeds 3× its median."""

OVER_UNITY_MARGIN = 1.05
"""Compensated |ρ| between 1 and this is model rounding; above it the cable is wrong."""

SAFETY_NOTE = (
    "Safety: inspecting a feedline means roofs and towers. Never climb alone or in a "
    "storm, stay well clear of power lines, keep the lightning protection in place, and "
    "follow local codes and licensed practice."
)
"""Shown with every distance-to-fault result (CLI and API): it sends someone up a mast."""


@dataclass(frozen=True)
class DtfPeak:
    """One reflection along the line."""

    distance_m: float
    reflection: float  # |ρ|, loss-compensated when the result says so
    return_loss_db: float

    def to_dict(self) -> dict[str, float | None]:
        rl = self.return_loss_db
        return {
            "distance_m": self.distance_m,
            "reflection": self.reflection,
            "return_loss_db": rl if math.isfinite(rl) else None,
        }


@dataclass(frozen=True)
class DtfResult:
    """Reflection magnitude vs distance, its peaks, and what the sweep allows."""

    distance_m: FloatArray
    reflection: FloatArray
    peaks: tuple[DtfPeak, ...]
    resolution_m: float
    range_m: float
    velocity_factor: float
    window: str
    beta: float | None
    pad: int
    points: int
    f_start_hz: float
    f_stop_hz: float
    threshold_db: float
    max_distance_m: float
    line_length_m: float | None = None
    resampled: bool = False
    loss_compensated: bool = False
    alpha_np_per_m: float | None = None
    cable: str | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)

    @property
    def span_hz(self) -> float:
        return self.f_stop_hz - self.f_start_hz

    @property
    def return_loss_db(self) -> FloatArray:
        with np.errstate(divide="ignore"):
            return -20.0 * np.log10(self.reflection)

    def decimated(self, max_points: int) -> tuple[FloatArray, FloatArray]:
        """At most ``max_points`` (distance, reflection) pairs for a plot: the largest
        reflection of each block of samples, so no peak is lost."""
        n = self.reflection.size
        if max_points < 2:
            raise ValueError(f"max_points must be at least 2, got {max_points}")
        if n <= max_points:
            return self.distance_m, self.reflection
        block = -(-n // max_points)  # ceil
        blocks = -(-n // block)
        pad = blocks * block - n
        mag = np.concatenate([self.reflection, np.full(pad, -np.inf)]).reshape(blocks, block)
        pick = np.argmax(mag, axis=1) + np.arange(blocks) * block
        return self.distance_m[pick], self.reflection[pick]

    def to_dict(self, arrays: bool = False, max_points: int | None = None) -> dict[str, Any]:
        """JSON-safe summary; with ``arrays`` also the distance and reflection lists
        (block maxima down to ``max_points`` when given)."""
        d: dict[str, Any] = {
            "resolution_m": self.resolution_m,
            "range_m": self.range_m,
            "velocity_factor": self.velocity_factor,
            "window": self.window,
            "beta": self.beta,
            "pad": self.pad,
            "points": self.points,
            "f_start_hz": self.f_start_hz,
            "f_stop_hz": self.f_stop_hz,
            "span_hz": self.span_hz,
            "threshold_db": self.threshold_db,
            "max_distance_m": self.max_distance_m,
            "line_length_m": self.line_length_m,
            "resampled": self.resampled,
            "loss_compensated": self.loss_compensated,
            "alpha_np_per_m": self.alpha_np_per_m,
            "cable": self.cable,
            "notes": list(self.notes),
            "peaks": [p.to_dict() for p in self.peaks],
        }
        if arrays:
            dist, refl = (
                self.decimated(max_points) if max_points else (self.distance_m, self.reflection)
            )
            d["distance_m"] = dist.tolist()
            d["reflection"] = refl.tolist()
        return d


@lru_cache(maxsize=32)
def _window(n: int, kind: str, beta: float) -> FloatArray:
    """The window, cached (read-only): a sweep's length repeats across a club's records."""
    w = kaiser(n, beta, sym=True) if kind == "kaiser" else np.ones(n)
    w.flags.writeable = False
    return w


def _uniform(sweep: Sweep) -> tuple[FloatArray, NDArray[np.complex128], bool]:
    f, g = sweep.freq_hz, sweep.gamma
    step = np.diff(f)
    mean = (f[-1] - f[0]) / (f.size - 1)
    if np.max(np.abs(step - mean)) <= 1e-6 * mean:
        return f, g, False
    fu = np.linspace(f[0], f[-1], f.size)
    gu = np.interp(fu, f, g.real) + 1j * np.interp(fu, f, g.imag)
    return fu, gu, True


def _refine(mag: FloatArray, i: int) -> tuple[float, float]:
    """Parabolic interpolation of a maximum at sample i (circular neighbours)."""
    a, b, c = mag[i - 1], mag[i], mag[(i + 1) % mag.size]
    den = a - 2.0 * b + c
    if den >= 0:  # flat top or not a maximum: keep the sample
        return float(i), float(b)
    delta = 0.5 * (a - c) / den
    return i + delta, float(b - 0.25 * (a - c) * delta)


def _compensate(
    mag: FloatArray,
    distance: FloatArray,
    alpha: float,
    cable_name: str,
    *,
    threshold_db: float,
    range_m: float,
    max_distance_m: float | None,
    line_length_m: float | None,
    notes: list[str],
) -> tuple[FloatArray, float]:
    """``mag`` × e^(2α·d) with the gain bounded as the module docstring says, and the
    view's end; the notes that say so are appended to ``notes``."""
    # Where the two-way loss reaches the threshold: even an open comes back weaker.
    # (threshold in nepers directly: no log of a tiny height can underflow.)
    natural_m = threshold_db * math.log(10.0) / 20.0 / (2.0 * alpha) if alpha > 0 else math.inf
    view_m = min(natural_m if max_distance_m is None else max_distance_m, 0.5 * range_m)
    if max_distance_m is not None and max_distance_m > 0.5 * range_m:
        notes.append(
            "with loss compensation the view stops at half the unambiguous range: the far "
            "half holds the leakage of reflections near the analyzer (negative delays)"
        )
    gain_to = min(view_m, natural_m, line_length_m or math.inf)
    # Negative delays (the far half) get their mirror's gain: no line is there, and the
    # main lobe of a reflection at d = 0 stays symmetric, so it is still found.
    mirrored = np.minimum(distance, range_m - distance)
    out = mag * np.exp(2.0 * alpha * np.minimum(mirrored, gain_to))
    if alpha > 0:
        held = ""
        if gain_to < view_m:
            held = (
                " and held beyond (the line's far end)"
                if gain_to == line_length_m
                else f" and held beyond (there the line's two-way loss exceeds {threshold_db:g} dB)"
            )
        notes.append(
            f"loss compensated with {cable_name}'s α = {alpha:.4g} Np/m at the sweep centre, "
            f"out to {gain_to:.4g} m{held}"
        )
    if line_length_m is None and gain_to > 0:
        notes.append(
            "beyond the line's end the antenna's own response rings on, and compensation "
            "lifts it too: give the line length to stop the gain there"
        )
    return out, view_m


def distance_to_fault(
    sweep: Sweep,
    velocity_factor: float | None = None,
    *,
    window: str = "kaiser",
    beta: float = 6.0,
    pad: int = 4,
    cable: CableType | None = None,
    compensate_loss: bool = True,
    threshold_db: float = DEFAULT_THRESHOLD_DB,
    max_resolution_m: float = DEFAULT_MAX_RESOLUTION_M,
    max_distance_m: float | None = None,
    line_length_m: float | None = None,
) -> DtfResult:
    """Reflection along the line of a line-input sweep (see the module docstring).

    ``velocity_factor`` defaults to the cable's; with a ``cable`` its loss is
    compensated (×e^(+2αd), α at the sweep's centre frequency) unless
    ``compensate_loss`` is False. The result covers 0 to ``max_distance_m`` (default:
    see the module docstring; at most the unambiguous range). ``line_length_m``, when
    known, is where the compensation gain stops growing: what comes back from beyond
    the line's end (the antenna's own ringing) crossed the whole line and no more.
    Raises AnalysisError when the sweep cannot say anything (no phase, fewer than 32
    points, a span too narrow for a resolution cell of ``max_resolution_m`` or less)
    or a parameter is out of its range.
    """
    vf = velocity_factor if velocity_factor is not None else (
        cable.velocity_factor if cable is not None else None
    )
    if vf is None:
        raise AnalysisError("distance to fault needs a velocity factor or a cable type")
    if not (math.isfinite(vf) and 0 < vf <= 1):
        raise AnalysisError(f"velocity factor must be in (0, 1], got {vf}")
    if window not in WINDOWS:
        raise AnalysisError(f"unknown window {window!r}; choose one of {', '.join(WINDOWS)}")
    if window == "kaiser" and not (math.isfinite(beta) and beta >= 0):
        raise AnalysisError(f"Kaiser β must be ≥ 0, got {beta}")
    if not (isinstance(pad, int) and 1 <= pad <= 64):
        raise AnalysisError(f"pad factor must be a whole number from 1 to 64, got {pad}")
    if max_distance_m is not None and not (math.isfinite(max_distance_m) and max_distance_m > 0):
        raise AnalysisError(f"the maximum distance must be a positive length, got {max_distance_m}")
    if line_length_m is not None and not (math.isfinite(line_length_m) and line_length_m > 0):
        raise AnalysisError(f"the line length must be a positive length, got {line_length_m}")
    if not (math.isfinite(threshold_db) and threshold_db > 0):
        raise AnalysisError(
            f"the peak threshold must be a return loss above 0 dB, got {threshold_db}"
        )
    if not sweep.has_phase:
        raise AnalysisError(
            "distance to fault needs the phase of Γ; this sweep has SWR only "
            "(sweep with a vector analyzer, or export S11 with phase)"
        )
    n = sweep.points
    if n < MIN_POINTS:
        raise AnalysisError(
            f"distance to fault needs at least {MIN_POINTS} frequency points, this sweep has {n}"
        )
    span = sweep.f_stop_hz - sweep.f_start_hz
    resolution = vf * C0 / (2.0 * span)
    if resolution > max_resolution_m:
        need_mhz = vf * C0 / (2.0 * max_resolution_m) / 1e6
        raise AnalysisError(
            f"the sweep spans {span / 1e6:.4g} MHz: a resolution cell of {resolution:.3g} m "
            f"cannot place a fault along the line; sweep at least {need_mhz:.3g} MHz wide"
        )
    notes: list[str] = []
    f, g, resampled = _uniform(sweep)
    if resampled:
        notes.append(
            "frequencies were not uniformly spaced: Γ was resampled by linear interpolation "
            f"onto {n} uniform points"
        )

    w = _window(n, window, float(beta))
    m = sfft.next_fast_len(pad * n)
    buf = np.zeros(m, dtype=np.complex128)  # zero padding, windowed in place
    np.multiply(w, g, out=buf[:n])
    mag = np.abs(sfft.ifft(buf, overwrite_x=True))
    mag *= m / float(np.sum(w))  # ifft's 1/M and the window's coherent gain
    df = span / (n - 1)
    dd = vf * C0 / (2.0 * m * df)  # distance per output sample
    distance = np.arange(m) * dd

    range_m = vf * C0 / (2.0 * df)
    height = 10.0 ** (-threshold_db / 20.0)
    alpha = None
    compensated = cable is not None and compensate_loss
    floor = 0.0
    view_m = range_m if max_distance_m is None else min(max_distance_m, range_m)
    if max_distance_m is not None and max_distance_m > range_m:
        notes.append(
            f"the sweep's unambiguous range is {range_m:.4g} m: nothing beyond it can be "
            "placed (sweep with finer frequency steps to see further)"
        )
    raw = mag
    if compensated:
        assert cable is not None
        alpha = float(cable.alpha_np_per_m(np.array([0.5 * (f[0] + f[-1])]))[0])
        floor = float(np.median(mag))
        mag, view_m = _compensate(
            mag, distance, alpha, cable.name, threshold_db=threshold_db, range_m=range_m,
            max_distance_m=max_distance_m, line_length_m=line_length_m, notes=notes,
        )
    if window == "rect":
        notes.append("rectangular window: side lobes at about −13 dB can show as false peaks")

    # A reflection at the view's edge refines to a little past it: keep half a cell more.
    edge_m = view_m + 0.5 * resolution
    ext = np.concatenate([mag[-1:], mag, mag[:1]])  # circular: a peak at d = 0 counts
    idx, _ = find_peaks(ext, height=height)
    peaks = []
    over_unity: list[tuple[float, float]] = []
    for i in idx - 1:
        pos, value = _refine(mag, int(i))
        # A reflection at the reference plane refines to a hair below sample 0: it is at
        # d = 0, not at the far end of the range (which `pos % m` would make of it).
        d = max(pos, 0.0) * dd
        if d > edge_m or (compensated and raw[i] < NOISE_MARGIN * floor):
            continue
        if value > OVER_UNITY_MARGIN:
            over_unity.append((float(d), value))
        if compensated and value > 1.0:
            value = 1.0  # a passive line cannot give more (module docstring)
        with np.errstate(divide="ignore"):
            rl = float(-20.0 * np.log10(value)) if value > 0 else math.inf
        peaks.append(DtfPeak(float(d), value, rl))
    peaks.sort(key=lambda p: p.distance_m)
    if over_unity:
        d, value = max(over_unity, key=lambda dv: dv[1])
        if compensated and cable is not None:
            notes.append(
                f"after compensation the reflection at {d:.1f} m reads |ρ| = {value:.2f}, which "
                f"a passive line cannot give: the line loses less than {cable.name} would "
                "(check the cable type and length); shown as 1"
            )
        else:
            notes.append(
                f"the reflection at {d:.1f} m reads |ρ| = {value:.2f}, more than a passive line "
                "returns: check the analyzer's calibration (open, short, load) at this plane"
            )
    keep = distance <= edge_m
    distance, mag = distance[keep], np.minimum(mag[keep], 1.0) if compensated else mag[keep]

    return DtfResult(
        distance_m=distance,
        reflection=mag,
        peaks=tuple(peaks),
        resolution_m=resolution,
        range_m=range_m,
        velocity_factor=float(vf),
        window=window,
        beta=float(beta) if window == "kaiser" else None,
        pad=pad,
        points=n,
        f_start_hz=float(f[0]),
        f_stop_hz=float(f[-1]),
        threshold_db=float(threshold_db),
        max_distance_m=float(view_m),
        line_length_m=float(line_length_m) if line_length_m is not None else None,
        resampled=resampled,
        loss_compensated=compensated,
        alpha_np_per_m=alpha,
        cable=cable.name if cable is not None else None,
        notes=tuple(notes),
    )
