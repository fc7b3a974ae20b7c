"""Metrics of one sweep, as DESIGN.md defines them: SWR, resonances, bandwidth, Q, per band.

    Sweep ──compute_metrics(sweep, bands)──▶ SweepMetrics
                                               ├─ min SWR and where
                                               ├─ resonances (series / parallel, R, Q)
                                               ├─ SWR≤s bandwidths (s = 1.5, 2, 3)
                                               └─ BandMetrics per band
    Sweep ──value_at(sweep, hz)──▶ PointValue (R, X, SWR, RL, ML between the points)

One model between the measured points, used by every metric so they never disagree:
**Γ is linear in frequency between adjacent points** (real and imaginary parts; for
SWR-only sweeps |Γ| is linear). On a segment Γ(t) = Γk + t·(Γk+1 − Γk), t ∈ [0, 1],
so |Γ(t)|² = A·t² + B·t + C is a convex quadratic. That gives, in closed form and
vectorised over all segments:

- the minimum SWR: the minimum of |Γ(t)| on each segment (it may lie between points,
  e.g. when Γ passes close to the centre of the chart between two samples; a parabola
  through |Γ| samples is not used because |Γ| is V-shaped, not parabolic, at a deep
  match);
- SWR = s crossings (band edges of the SWR≤s span, usable fraction): roots of
  A·t² + B·t + C = |Γs|², |Γs| = (s−1)/(s+1). Interpolating Γ rather than SWR keeps a
  deep, narrow dip's shape; away from a dip the two agree to second order.
- value_at: Γ interpolated, then Z, SWR, RL, ML from it.

**On the rim** the straight line is not the model: where both ends of a segment have
|Γ| ≥ 1 (within RIM_TOL), Γ follows the rim instead, |Γ| linear in frequency and the
phase turning along the shorter arc. A lossless reactance keeps |Γ| = 1 at every
frequency (Foster's reactance theorem), so the chord's dip inside the chart would be an
artefact: an open or a short would get a finite "minimum SWR" of a few hundred from a
sweep whose every point says infinite (DESIGN.md: SWR is infinite where |Γ| ≥ 1, and
the API returns null). |Γ(t)|² = (a + b·t)² is still a convex quadratic, so every
query below treats those segments with the same closed forms. Between two rim points
|Γ| (and so SWR) does not depend on which way the phase turns; the impedance does: the
shorter arc is taken, so a phase step of π or more between two samples (a sweep too
coarse for the line's length) leaves the impedance between them undetermined.

Resonances: where X = Im Z changes sign between adjacent points, located by linear
interpolation of X; series if X rises through zero (dX/df > 0), parallel if it
falls. r_ohm is R interpolated linearly at the crossing. **Pole rule**: X also flips
sign through infinity at an open-circuit pole (a lossless or nearly lossless
anti-resonance the sweep does not resolve). By Foster's reactance theorem a lossless
reactance rises with frequency between poles, so a pole shows only as a *falling*
sign change (+ to −). A falling sign change where both neighbouring points have
|X| > POLE_RATIO (10) × the larger of their two R values is taken as such a pole (or
a parallel resonance far narrower than the point spacing) and is not reported: no
interpolated location, R or Q from those two points would mean anything. A resolved
resonance of loaded Q has |X|/R = 2Q·|δ| at fractional detuning δ, so the rule only
drops crossings whose neighbours both lie beyond ±5 half-bandwidths. A *rising*
crossing is a zero of a smooth X and is always reported, however small R is (a
near-short, a low-loss shorted stub).

Trace noise: a flat X (a broadband match) crosses zero several times in a row in
noisy data. Crossings inside a deadband of ±3σ of Im Γ (σ estimated from the sweep's
own second differences) merge: one crossing where the signs on the two sides of
the deadband differ, none where they agree (see ``_crossings``). A merged crossing
takes its Z′ from a least-squares slope over a window three times the cluster wide.
Noise-free sweeps are unaffected (their deadband is the tiny curvature term).

Q (Yaghjian & Best, IEEE Trans. Antennas Propag. 53(4), 2005): Q ≈ ω0·|Z′(ω0)|/(2·R(ω0))
with Z′ = dZ/dω. ω·dZ/dω = f·dZ/df, so no 2π appears. Z′ at the crossing is the
derivative of the quadratic through the three points around it (second-order
accurate on uneven spacing), complex Z — not just X — so R′ counts too.

Per band (relative to the full band width; ``coverage`` says how much of it was swept):
coverage, min SWR over the swept part (band edges included, interpolated), SWR, R, X
and RL at the arithmetic centre (None when the centre is not swept), usable fraction
(width where SWR ≤ 2 inside the swept part ÷ full band width), the resonance inside
the band closest to the centre with its kind and Q, and the width of the SWR≤2 span
around the in-band minimum (that span may extend beyond the band edges: it is the
antenna's bandwidth there).

SWR-only sweeps (``has_phase`` False) get what SWR allows; impedance, resonances and
Q are None and their names are listed in ``unavailable``. Infinite SWR is kept as
``inf`` in the dataclasses and becomes ``None`` in ``to_dict()``.
"""

from __future__ import annotations

import cmath
import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, fields
from typing import Any, Literal

import numpy as np

from mastwatch.rf.bands import Band
from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.sweep import Sweep

DEFAULT_THRESHOLDS: tuple[float, ...] = (1.5, 2.0, 3.0)
USABLE_SWR = 2.0
"""SWR limit of ``usable_fraction_2`` and ``bandwidth_2_hz``."""
NOISE_DEADBAND = 3.0
"""Zero crossings of X inside ±NOISE_DEADBAND·σ(noise) of Im Γ are merged (see _crossings)."""
POLE_RATIO = 10.0
"""A falling sign change of X with |X| > POLE_RATIO·R on both sides is a pole, not a resonance."""

PHASE_METRICS: tuple[str, ...] = (
    "resonances",
    "r_center_ohm",
    "x_center_ohm",
    "resonance_hz",
    "resonance_kind",
    "q",
)
"""Metric names that need the phase of Γ (listed in ``unavailable`` for SWR-only sweeps)."""

ResonanceKind = Literal["series", "parallel"]


# -- result types ---------------------------------------------------------------------


def _json_value(value: Any) -> Any:
    """A JSON-safe copy: non-finite floats → None, numpy scalars → Python, tuples → lists."""
    if isinstance(value, _Result):
        return value.to_dict()
    if isinstance(value, bool | str) or value is None:
        return value
    if isinstance(value, np.bool_):
        return bool(value)
    if isinstance(value, float | np.floating):
        v = float(value)
        return v if math.isfinite(v) else None
    if isinstance(value, int | np.integer):
        return int(value)
    if isinstance(value, list | tuple):
        return [_json_value(v) for v in value]
    raise TypeError(f"no JSON form for {type(value).__name__}")


class _Result:
    """Mixin: ``to_dict()`` of a frozen dataclass, JSON-safe, SI units, field order kept."""

    def to_dict(self) -> dict[str, Any]:
        return {f.name: _json_value(getattr(self, f.name)) for f in fields(self)}  # type: ignore[arg-type]


@dataclass(frozen=True)
class Resonance(_Result):
    """A zero crossing of X: where, which kind, R there (ohms) and the Q estimate."""

    hz: float
    kind: ResonanceKind
    r_ohm: float
    q: float | None


@dataclass(frozen=True)
class SwrBandwidth(_Result):
    """The contiguous span around the minimum where SWR ≤ threshold.

    All of low/high/width are None when the minimum SWR is above the threshold.
    ``open_low``/``open_high``: the span runs off the sweep, so width is a lower bound.
    """

    threshold: float
    low_hz: float | None
    high_hz: float | None
    width_hz: float | None
    open_low: bool
    open_high: bool


@dataclass(frozen=True)
class PointValue(_Result):
    """Values at one frequency, from Γ interpolated linearly between the sweep's points."""

    hz: float
    r_ohm: float | None
    x_ohm: float | None
    swr: float
    return_loss_db: float
    mismatch_loss_db: float


@dataclass(frozen=True)
class BandMetrics(_Result):
    """Metrics of one band (see the module docstring for each definition)."""

    band: str
    low_hz: float
    high_hz: float
    coverage: float
    min_swr: float | None
    min_swr_hz: float | None
    swr_center: float | None
    r_center_ohm: float | None
    x_center_ohm: float | None
    return_loss_center_db: float | None
    usable_fraction_2: float | None
    resonance_hz: float | None
    resonance_kind: ResonanceKind | None
    q: float | None
    bandwidth_2_hz: float | None


@dataclass(frozen=True)
class SweepMetrics(_Result):
    """Metrics of a whole sweep and of each requested band."""

    points: int
    z0_ohm: float
    f_start_hz: float
    f_stop_hz: float
    min_swr: float
    min_swr_hz: float
    resonances: tuple[Resonance, ...]
    swr_bandwidths: tuple[SwrBandwidth, ...]
    bands: tuple[BandMetrics, ...]
    unavailable: tuple[str, ...]

    def band(self, name: str) -> BandMetrics:
        """The metrics of the band called ``name``; KeyError naming those computed."""
        for b in self.bands:
            if b.band == name:
                return b
        raise KeyError(f"no metrics for band {name!r}; computed: {[b.band for b in self.bands]}")

    def bandwidth(self, threshold: float) -> SwrBandwidth:
        """The SWR≤threshold bandwidth entry; KeyError if it was not computed."""
        for bw in self.swr_bandwidths:
            if bw.threshold == threshold:
                return bw
        raise KeyError(
            f"no SWR≤{threshold} bandwidth; computed: "
            f"{[bw.threshold for bw in self.swr_bandwidths]}"
        )


# -- the piecewise-linear Γ model -----------------------------------------------------


RIM_TOL = 1e-4
"""|Γ| within this of 1 is on the rim, and its SWR infinite. SWR above 2·10⁴ is not a
reading: files store Γ to 6–9 digits, and an analyzer's directivity (40–50 dB for a
good bridge, common practice, from memory) leaves |Γ| uncertain by 0.003–0.01 there."""


class _Model:
    """Γ linear between points: per segment k, |Γ(t)|² = A·t² + B·t + C on t ∈ [0, 1].

    Whole-sweep arrays are built once (per-segment minimum, per-limit inside intervals
    and their running width); a band or a span then costs a few lookups and the exact
    treatment of the one or two segments cut by its edges.
    """

    def __init__(self, sweep: Sweep) -> None:
        self.f = sweep.freq_hz
        g = sweep.gamma if sweep.has_phase else sweep.gamma.real.astype(np.complex128)
        self.g = g
        self.mag2 = g.real**2 + g.imag**2
        self.n = self.f.size
        self._outside: dict[float, np.ndarray] = {}  # points with |Γ|² above a limit
        self._usable: dict[float, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
        if self.n >= 2:
            self.df = np.diff(self.f)
            d = np.diff(g)
            g0 = g[:-1]
            self.A = d.real**2 + d.imag**2
            self.B = 2.0 * (g0.real * d.real + g0.imag * d.imag)
            self.C = self.mag2[:-1]
            on_rim = self.mag2 >= (1.0 - RIM_TOL) ** 2
            self.rim = on_rim[:-1] & on_rim[1:]
            rim = np.flatnonzero(self.rim)
            if rim.size:  # |Γ| = a + b·t there: |Γ|² = b²t² + 2ab·t + a² (module docstring)
                mag = np.sqrt(self.mag2)
                a, b = mag[rim], mag[rim + 1] - mag[rim]
                self.A[rim], self.B[rim], self.C[rim] = b * b, 2.0 * a * b, a * a
            # A = 0 means Γk+1 = Γk (then B = 0 too): constant segment, minimum at t = 0
            tv = np.divide(-self.B, 2.0 * self.A, out=np.zeros_like(self.B), where=self.A > 0)
            self.tv = np.clip(tv, 0.0, 1.0)
            # |Γ|² at the vertex from Γ itself: the expanded quadratic cancels near a zero
            gv = g0 + self.tv * d
            self.vmin = gv.real**2 + gv.imag**2
            if rim.size:  # the vertex of a rim segment is one of its ends: exact there
                self.vmin[rim] = np.minimum(self.mag2[rim], self.mag2[rim + 1])

    # scalar work on one segment (plain floats: cheaper than numpy on one element)

    def _seg_min(self, k: int, ta: float, tb: float) -> tuple[float, float]:
        """(|Γ|², t) of the minimum on [ta, tb] of segment k."""
        a, b = float(self.A[k]), float(self.B[k])
        t = -b / (2.0 * a) if a > 0 else ta
        t = min(max(t, ta), tb)
        g = self._at(k, t)  # from Γ itself: no cancellation near 0
        return (g.real**2 + g.imag**2, t)

    def _at(self, k: int, t: float) -> complex:
        """Γ at fraction t of segment k: on the chord, or along the rim (docstring)."""
        g0, g1 = complex(self.g[k]), complex(self.g[k + 1])
        if not self.rim[k]:
            return g0 + t * (g1 - g0)
        m0, m1 = abs(g0), abs(g1)
        turn = cmath.phase(g1 / g0)  # the shorter arc, in (−π, π]
        return (m0 + t * (m1 - m0)) * cmath.exp(1j * (cmath.phase(g0) + t * turn))

    def _seg_inside(self, k: int, m2: float) -> tuple[float, float] | None:
        """(t_lo, t_hi) of the part of segment k where |Γ(t)|² ≤ m2, or None."""
        a, b, c = float(self.A[k]), float(self.B[k]), float(self.C[k]) - m2
        if a <= 0:
            return (0.0, 1.0) if c <= 0 else None
        disc = b * b - 4.0 * a * c
        if disc < 0:
            return None
        q = -0.5 * (b + math.copysign(math.sqrt(disc), b))  # cancellation-free roots
        r1, r2 = (q / a, c / q) if q != 0 else (0.0, 0.0)
        lo, hi = min(r1, r2), max(r1, r2)
        if hi < 0.0 or lo > 1.0:
            return None
        return (max(lo, 0.0), min(hi, 1.0))

    def _range(self, lo: float, hi: float) -> tuple[int, int, float, float]:
        """First and last segment overlapping [lo, hi] and the t of lo (on k0) and hi (on k1)."""
        f, n = self.f, self.n
        k0 = min(max(int(np.searchsorted(f, lo, "right")) - 1, 0), n - 2)
        k1 = min(max(int(np.searchsorted(f, hi, "left")) - 1, k0), n - 2)
        ta = min(max((lo - float(f[k0])) / float(self.df[k0]), 0.0), 1.0)
        tb = min(max((hi - float(f[k1])) / float(self.df[k1]), 0.0), 1.0)
        return k0, k1, ta, tb

    # queries

    def minimum(self, lo_hz: float, hi_hz: float) -> tuple[float, float, int, float] | None:
        """(|Γ|², hz, segment, t) of the minimum over [lo_hz, hi_hz] ∩ sweep, or None."""
        f = self.f
        lo, hi = max(lo_hz, float(f[0])), min(hi_hz, float(f[-1]))
        if lo > hi:
            return None
        if self.n == 1:
            return (float(self.mag2[0]), float(f[0]), 0, 0.0)
        k0, k1, ta, tb = self._range(lo, hi)
        if k0 == k1:
            v, t = self._seg_min(k0, ta, tb)
            best = (v, k0, t)
        else:
            v, t = self._seg_min(k0, ta, 1.0)
            best = (v, k0, t)
            if k1 > k0 + 1:
                i = k0 + 1 + int(np.argmin(self.vmin[k0 + 1 : k1]))
                if self.vmin[i] < best[0]:
                    best = (float(self.vmin[i]), i, float(self.tv[i]))
            v, t = self._seg_min(k1, 0.0, tb)
            if v < best[0]:
                best = (v, k1, t)
        _, k, t = best
        g = self._at(k, t)  # |Γ|² again, free of cancellation
        hz = min(max(float(f[k] + t * self.df[k]), lo), hi)  # no round-off past the edges
        return (abs(g) ** 2, hz, k, t)

    def span(self, k: int, t: float, m2: float) -> tuple[float, float, bool, bool]:
        """The contiguous span where |Γ|² ≤ m2 around the point (k, t), which lies inside it.

        Convexity gives one inside interval per segment, so the span continues through
        every point that is inside and ends in the first segment whose far end is
        outside, at the root of the quadratic there. Returns (low, high, open_low,
        open_high).
        """
        f = self.f
        if self.n == 1:
            return (float(f[0]), float(f[0]), True, True)
        outside = self._outside.get(m2)
        if outside is None:
            outside = self._outside[m2] = self.mag2 > m2
        after = outside[k + 1 :]
        if after.any():
            p = k + 1 + int(np.argmax(after))  # first outside point above the location
            part = self._seg_inside(p - 1, m2)
            t_hi = part[1] if part else t  # no root only through round-off at the location
            high, open_high = float(f[p - 1] + t_hi * self.df[p - 1]), False
        else:
            high, open_high = float(f[-1]), True
        before = outside[: k + 1]
        if before.any():
            p = int(np.flatnonzero(before)[-1])  # last outside point at or below it
            part = self._seg_inside(p, m2)
            t_lo = part[0] if part else t
            low, open_low = float(f[p] + t_lo * self.df[p]), False
        else:
            low, open_low = float(f[0]), True
        return (low, high, open_low, open_high)

    def _usable_arrays(self, m2: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Per segment (t_lo, t_hi) of the part with |Γ|² ≤ m2 (t_lo = t_hi if none) and the
        running inside width, cum[k] = inside width of segments 0..k−1 (Hz)."""
        cached = self._usable.get(m2)
        if cached is not None:
            return cached
        inside = self.mag2 <= m2
        start_in, end_in = inside[:-1], inside[1:]
        # convexity: a segment with both ends inside is inside throughout; it is cut only
        # where one end is inside, or where both are outside but its dip reaches below m2
        hi = (start_in & end_in).astype(np.float64)
        lo = np.zeros_like(hi)
        cut = np.flatnonzero((start_in ^ end_in) | ~(start_in | end_in) & (self.vmin <= m2))
        if cut.size:
            a, b, c = self.A[cut], self.B[cut], self.C[cut] - m2
            disc = np.maximum(b * b - 4.0 * a * c, 0.0)
            q = -0.5 * (b + np.copysign(np.sqrt(disc), b))  # cancellation-free roots
            r1 = np.divide(q, a, out=np.zeros_like(a), where=a > 0)
            r2 = np.divide(c, q, out=np.zeros_like(a), where=q != 0)
            lo[cut] = np.clip(np.minimum(r1, r2), 0.0, 1.0)
            hi[cut] = np.clip(np.maximum(r1, r2), 0.0, 1.0)
        cum = np.concatenate(([0.0], np.cumsum((hi - lo) * self.df)))
        self._usable[m2] = (lo, hi, cum)
        return self._usable[m2]

    def usable_width(self, lo_hz: float, hi_hz: float, m2: float) -> float:
        """Width (Hz) within [lo_hz, hi_hz] ∩ sweep where |Γ|² ≤ m2."""
        f = self.f
        lo, hi = max(lo_hz, float(f[0])), min(hi_hz, float(f[-1]))
        if lo >= hi or self.n == 1:
            return 0.0
        t_lo, t_hi, cum = self._usable_arrays(m2)
        k0, k1, ta, tb = self._range(lo, hi)

        def part(k: int, a: float, b: float) -> float:
            return max(0.0, min(float(t_hi[k]), b) - max(float(t_lo[k]), a)) * float(self.df[k])

        if k0 == k1:
            return part(k0, ta, tb)
        return part(k0, ta, 1.0) + float(cum[k1] - cum[k0 + 1]) + part(k1, 0.0, tb)

    def gamma_at(self, hz: float) -> complex:
        """Γ interpolated linearly at a frequency already checked to lie in the sweep."""
        if self.n == 1:
            return complex(self.g[0])
        k = min(max(int(np.searchsorted(self.f, hz, "right")) - 1, 0), self.n - 2)
        t = (hz - float(self.f[k])) / float(self.df[k])
        return self._at(k, t)


# -- resonances and Q -----------------------------------------------------------------


def _quadratic_derivative(x: np.ndarray, y: np.ndarray, at: np.ndarray) -> np.ndarray:
    """d/dx of the quadratic through (x[:,0..2], y[:,0..2]) at ``at`` (rows vectorised)."""
    x0, x1, x2 = x[:, 0], x[:, 1], x[:, 2]
    y0, y1, y2 = y[:, 0], y[:, 1], y[:, 2]
    return (
        y0 * (2 * at - x1 - x2) / ((x0 - x1) * (x0 - x2))
        + y1 * (2 * at - x0 - x2) / ((x1 - x0) * (x1 - x2))
        + y2 * (2 * at - x0 - x1) / ((x2 - x0) * (x2 - x1))
    )


def _impedance(sweep: Sweep, idx: np.ndarray) -> np.ndarray:
    """Z = z0·(1+Γ)/(1−Γ) at the given point indices only (inf/nan where Γ = 1)."""
    g = sweep.gamma[idx]
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return sweep.z0 * (1 + g) / (1 - g)


def _crossings(y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Point pairs (a, b) bracketing each zero crossing of y = Im Γ, noise clusters merged.

    Raw crossings are sign changes between adjacent points. Trace noise makes a flat
    X (a broadband match) cross zero several times in a row, so a deadband |y| ≤ ε is
    set from the noise, estimated robustly from the second differences
    (σ = 1.4826·median|Δ²y|/√6, ε = NOISE_DEADBAND·σ; on smooth noise-free data this is
    only the tiny curvature term). Between two consecutive points outside the
    deadband ("decided" points), the raw crossings are one crossing if the decided signs
    differ, and none if they agree. A lone raw crossing keeps its adjacent points
    (the exact result); a merged cluster is bracketed by the two decided points.
    """
    neg = y < 0
    k = np.flatnonzero(neg[:-1] != neg[1:])
    if k.size <= 1 or y.size < 5:
        return k, k + 1
    d2 = y[2:] - 2.0 * y[1:-1] + y[:-2]
    eps = NOISE_DEADBAND * 1.4826 * float(np.median(np.abs(d2))) / math.sqrt(6.0)
    decided = np.flatnonzero(np.abs(y) > eps)
    nd = decided.size
    region = np.searchsorted(decided, k, "right")  # between decided[region−1] and decided[region]
    counts = np.bincount(region, minlength=nd + 1)
    lone = counts[region] == 1
    interior = (region > 0) & (region < nd)
    lo = decided[np.clip(region - 1, 0, max(nd - 1, 0))] if nd else k
    hi = decided[np.clip(region, 0, max(nd - 1, 0))] if nd else k
    flips = interior & (neg[lo] != neg[hi])
    merged = np.unique(region[~lone & flips])
    a = np.concatenate((k[lone], decided[merged - 1]))
    b = np.concatenate((k[lone] + 1, decided[merged]))
    order = np.argsort(a, kind="stable")
    return a[order], b[order]


def _derivatives(
    sweep: Sweep, ka: np.ndarray, kb: np.ndarray, t: np.ndarray, hz: np.ndarray
) -> np.ndarray:
    """dZ/df at each crossing (hz), from the points around it (needs n ≥ 3)."""
    f, n = sweep.freq_hz, sweep.points
    # adjacent pair (k, k+1): the quadratic through three points around the crossing,
    # (k−1, k, k+1) if it lies in the lower half of its segment, else (k, k+1, k+2)
    j = np.clip(np.where(t < 0.5, ka - 1, ka), 0, n - 3)
    idx = j[:, None] + np.arange(3)[None, :]
    dz = _quadratic_derivative(f[idx], _impedance(sweep, idx), hz)
    # merged noise cluster (a, b): a least-squares slope over the cluster and as much
    # again on each side, so the noise averages out (a few clusters per sweep at most)
    for i in np.flatnonzero(kb > ka + 1):
        width = int(kb[i] - ka[i])
        w = np.arange(max(0, ka[i] - width), min(n, kb[i] + width + 1))
        zw = _impedance(sweep, w)
        ok = np.isfinite(zw)
        fw, zw = f[w][ok], zw[ok]
        if fw.size < 2:
            dz[i] = np.nan
            continue
        fw = fw - fw.mean()
        dz[i] = np.sum(fw * (zw - zw.mean())) / np.sum(fw * fw)
    return dz


def _resonances(sweep: Sweep) -> tuple[Resonance, ...]:
    f, g = sweep.freq_hz, sweep.gamma
    n = f.size
    if n < 2:
        return ()
    # X = z0·2·Im Γ/|1−Γ|², so X and Im Γ share their sign: find crossings without Z
    ka, kb = _crossings(g.imag)
    if ka.size == 0:
        return ()
    za, zb = _impedance(sweep, ka), _impedance(sweep, kb)
    xa, xb, ra, rb = za.imag, zb.imag, za.real, zb.real
    finite = np.isfinite(za) & np.isfinite(zb)
    falling = xb < xa
    big_x = np.minimum(np.abs(xa), np.abs(xb)) > POLE_RATIO * np.maximum(np.abs(ra), np.abs(rb))
    keep = finite & ~(falling & big_x)
    ka, kb, xa, xb, ra, rb = ka[keep], kb[keep], xa[keep], xb[keep], ra[keep], rb[keep]
    if ka.size == 0:
        return ()
    t = xa / (xa - xb)
    hz = f[ka] + t * (f[kb] - f[ka])
    r_res = ra + t * (rb - ra)
    # Z may be infinite next to Γ = 1: such a derivative is not finite and Q stays None
    with np.errstate(all="ignore"):
        dz = _derivatives(sweep, ka, kb, t, hz) if n >= 3 else (zb[keep] - za[keep]) / (f[1] - f[0])
    with np.errstate(divide="ignore", invalid="ignore"):
        q = hz * np.abs(dz) / (2.0 * r_res)
    q_ok = np.isfinite(q) & (r_res > 0)
    series = xb > xa
    return tuple(
        Resonance(
            float(hz[i]),
            "series" if series[i] else "parallel",
            float(r_res[i]),
            float(q[i]) if q_ok[i] else None,
        )
        for i in range(ka.size)  # one entry per resonance found (a handful), not per point
    )


# -- public API -----------------------------------------------------------------------

# Scalar forms of the definitions in rf/sweep.py (plain floats: no numpy overhead per call)


def _swr(mag: float) -> float:
    return math.inf if mag >= 1.0 - RIM_TOL else (1.0 + mag) / (1.0 - mag)


def _return_loss(mag: float) -> float:
    return math.inf if mag == 0.0 else -20.0 * math.log10(mag)


def _mismatch_loss(mag: float) -> float:
    return math.inf if mag >= 1.0 - RIM_TOL else -10.0 * math.log10(1.0 - mag * mag)


def _mag2_of_swr(s: float) -> float:
    return ((s - 1.0) / (s + 1.0)) ** 2


def _swr_of(m2: float) -> float:
    return _swr(math.sqrt(max(m2, 0.0)))


def _point_value(sweep: Sweep, hz: float, g: complex) -> PointValue:
    mag = abs(g)
    r_ohm: float | None = None
    x_ohm: float | None = None
    if sweep.has_phase:
        if g == 1:
            r_ohm, x_ohm = math.inf, 0.0
        else:
            zc = sweep.z0 * (1 + g) / (1 - g)
            r_ohm, x_ohm = zc.real, zc.imag
    return PointValue(
        hz=float(hz),
        r_ohm=r_ohm,
        x_ohm=x_ohm,
        swr=_swr(mag),
        return_loss_db=_return_loss(mag),
        mismatch_loss_db=_mismatch_loss(mag),
    )


def _check_in_sweep(sweep: Sweep, hz: float) -> None:
    if not (math.isfinite(hz) and sweep.f_start_hz <= hz <= sweep.f_stop_hz):
        raise AnalysisError(
            f"{hz / 1e6:.6g} MHz is outside the sweep "
            f"({sweep.f_start_hz / 1e6:.6g}–{sweep.f_stop_hz / 1e6:.6g} MHz)"
        )


def value_at(sweep: Sweep, hz: float) -> PointValue:
    """R, X, SWR, RL, ML at ``hz`` with Γ interpolated linearly; AnalysisError outside the sweep."""
    hz = float(hz)
    _check_in_sweep(sweep, hz)
    return _point_value(sweep, hz, _Model(sweep).gamma_at(hz))


def _band_metrics(
    sweep: Sweep, model: _Model, band: Band, resonances: tuple[Resonance, ...]
) -> BandMetrics:
    f0, f1 = sweep.f_start_hz, sweep.f_stop_hz
    width = band.high_hz - band.low_hz
    swept = max(0.0, min(band.high_hz, f1) - max(band.low_hz, f0))
    coverage = swept / width
    found = model.minimum(band.low_hz, band.high_hz)
    if found is None:
        return BandMetrics(
            band.name,
            band.low_hz,
            band.high_hz,
            0.0,
            None,
            None,
            None,
            None,
            None,
            None,
            None,
            None,
            None,
            None,
            None,
        )
    m2, min_hz, k, t = found
    min_swr = _swr_of(m2)

    center = band.center_hz
    pv = _point_value(sweep, center, model.gamma_at(center)) if f0 <= center <= f1 else None

    m2_usable = _mag2_of_swr(USABLE_SWR)
    usable = model.usable_width(band.low_hz, band.high_hz, m2_usable) / width
    bw2: float | None = None
    if m2 <= m2_usable:
        low, high, _, _ = model.span(k, t, m2_usable)
        bw2 = high - low

    res_hz: float | None = None
    res_kind: ResonanceKind | None = None
    q: float | None = None
    inside = [r for r in resonances if band.low_hz <= r.hz <= band.high_hz]
    if inside:
        best = min(inside, key=lambda r: abs(r.hz - center))
        res_hz, res_kind, q = best.hz, best.kind, best.q

    return BandMetrics(
        band=band.name,
        low_hz=band.low_hz,
        high_hz=band.high_hz,
        coverage=coverage,
        min_swr=min_swr,
        min_swr_hz=min_hz,
        swr_center=pv.swr if pv else None,
        r_center_ohm=pv.r_ohm if pv else None,
        x_center_ohm=pv.x_ohm if pv else None,
        return_loss_center_db=pv.return_loss_db if pv else None,
        usable_fraction_2=usable,
        resonance_hz=res_hz,
        resonance_kind=res_kind,
        q=q,
        bandwidth_2_hz=bw2,
    )


def compute_metrics(
    sweep: Sweep,
    bands: Iterable[Band] = (),
    thresholds: Sequence[float] = DEFAULT_THRESHOLDS,
) -> SweepMetrics:
    """All metrics of ``sweep`` and of each band in ``bands`` (see the module docstring)."""
    ths = tuple(float(s) for s in thresholds)
    for s in ths:
        if not (math.isfinite(s) and s > 1.0):
            raise ValueError(f"an SWR threshold must be a finite number above 1, got {s}")
    model = _Model(sweep)

    whole = model.minimum(sweep.f_start_hz, sweep.f_stop_hz)
    assert whole is not None  # a sweep always has at least one point
    m2, min_hz, k, t = whole
    min_swr = _swr_of(m2)

    bandwidths = []
    for s in ths:
        ms2 = _mag2_of_swr(s)
        if m2 <= ms2:
            low, high, open_low, open_high = model.span(k, t, ms2)
            bandwidths.append(SwrBandwidth(s, low, high, high - low, open_low, open_high))
        else:
            bandwidths.append(SwrBandwidth(s, None, None, None, False, False))

    resonances = _resonances(sweep) if sweep.has_phase else ()
    band_metrics = tuple(_band_metrics(sweep, model, b, resonances) for b in bands)
    return SweepMetrics(
        points=sweep.points,
        z0_ohm=sweep.z0,
        f_start_hz=sweep.f_start_hz,
        f_stop_hz=sweep.f_stop_hz,
        min_swr=min_swr,
        min_swr_hz=min_hz,
        resonances=resonances,
        swr_bandwidths=tuple(bandwidths),
        bands=band_metrics,
        unavailable=() if sweep.has_phase else PHASE_METRICS,
    )
