"""Trend change detection: a slow drift over many sweeps, flagged before any threshold.

Method: the two-sided tabular CUSUM of E. S. Page, "Continuous inspection schemes",
Biometrika 41 (1954) 100–115, with the usual design of D. C. Montgomery,
*Introduction to Statistical Quality Control* (from memory): reference value k = 0.5
(tuned to a shift of one σ) and decision interval h = 5, both in units of σ.

    C⁺ᵢ = max(0, uᵢ − k + C⁺ᵢ₋₁)      C⁻ᵢ = max(0, −uᵢ − k + C⁻ᵢ₋₁)
    alarm at the first i with C⁺ᵢ > h or C⁻ᵢ > h;
    onset estimate: the point after the last i at which that sum was 0.

The in-control level μ₀ and σ are not known for an antenna: they must come from its
own sweeps, and there are few of them (a sweep every few months). Plugging in the
median and MAD of the first few sweeps, as a first version did, gave a false-alarm
rate of 40–60 % over a 60-point stationary series (the estimation error of μ₀ from
eight points is about 0.4 σ, close to k, and it is shared by every later point).
So uᵢ is the *self-starting* standardisation of D. M. Hawkins, "Self-starting cusum
charts for location and scale", The Statistician 36 (1987) 299–315 (from memory):
each value is compared with the mean and standard deviation of all values before it,

    Tₙ = (xₙ − x̄ₙ₋₁) / sₙ₋₁ · √((n−1)/n)   ~ Student t with n−2 degrees of freedom,
    uₙ = Φ⁻¹(F_t(Tₙ))                        ~ N(0, 1), independent, while in control,

so the chart has its textbook in-control behaviour from the third sweep on.
``sigma_floor`` (the metric's measurement resolution) keeps a run of identical values
from making every later wiggle an alarm. With a known μ₀ and σ (``target``/``sigma``)
the plain Page chart runs instead. A series is one metric of one antenna and band since
its current baseline. Measured rates: docs/health.md and tests/services/test_changepoint.py.

``cusum`` gives the numbers; ``drift_reason`` the plain-words reason for a verdict.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date, datetime
from typing import Any, Literal

import numpy as np
from scipy import special

MIN_POINTS = 6  # fewer sweeps than this: no trend to speak of


@dataclass(frozen=True)
class CusumResult:
    """Outcome of the two-sided tabular CUSUM over one series."""

    alarm_index: int | None  # first point where a sum passed h
    onset_index: int | None  # estimated first point of the change
    direction: Literal["up", "down"] | None
    reference: float  # the level the alarm point was compared with (x̄ or μ₀)
    upper: np.ndarray  # C⁺ in units of σ
    lower: np.ndarray  # C⁻ in units of σ

    @property
    def alarm(self) -> bool:
        return self.alarm_index is not None

    def to_dict(self) -> dict[str, Any]:
        return {
            "alarm_index": self.alarm_index,
            "onset_index": self.onset_index,
            "direction": self.direction,
            "reference": self.reference,
        }


def _standardise_self_starting(x: np.ndarray, sigma_floor: float) -> tuple[np.ndarray, np.ndarray]:
    """Hawkins' uₙ for n ≥ 2 values before (0 for the first two) and the running mean."""
    n = np.arange(x.size, dtype=float)  # values seen before each point
    csum = np.concatenate(([0.0], np.cumsum(x)[:-1]))
    with np.errstate(invalid="ignore", divide="ignore"):
        mean = np.where(n > 0, csum / np.maximum(n, 1), x)
        # Running variance of the values before each point (two-pass per prefix would be
        # O(n²); Welford's update keeps it exact enough for a few hundred points).
        # (The loop runs on Python floats: the same IEEE arithmetic as numpy scalars,
        # several times faster per step.)
        m2_before: list[float] = []
        run_mean = run_m2 = 0.0
        for i, xi in enumerate(x.tolist()):
            m2_before.append(run_m2)
            d = xi - run_mean
            run_mean += d / (i + 1)
            run_m2 += d * (xi - run_mean)
        m2 = np.array(m2_before)
        s = np.maximum(np.sqrt(m2 / np.maximum(n - 1, 1)), sigma_floor)
        t = (x - mean) / s * np.sqrt(n / (n + 1))
    valid = (n >= 2) & (s > 0)
    u = np.zeros(x.size)
    if np.any(valid):
        tv, df = t[valid], n[valid] - 1
        # Student t cdf and the normal quantile as ufuncs (scipy.special), tail-safe:
        # above the median through the upper tail, u = −Φ⁻¹(F_t(−T)).
        lower = special.stdtr(df, -np.abs(tv))
        u[valid] = np.where(tv > 0, -special.ndtri(lower), special.ndtri(lower))
    return u, mean


def cusum(
    values: Sequence[float] | np.ndarray,
    *,
    k: float = 0.5,
    h: float = 5.0,
    sigma_floor: float = 0.0,
    target: float | None = None,
    sigma: float | None = None,
) -> CusumResult:
    """Two-sided tabular CUSUM (Page 1954) of ``values``; k and h in units of σ.

    Self-starting (Hawkins 1987) unless both ``target`` and ``sigma`` are given.
    """
    x = np.asarray(values, dtype=float)
    if x.ndim != 1 or x.size == 0:
        raise ValueError("cusum needs a non-empty 1-D series of values")
    if not np.all(np.isfinite(x)):
        raise ValueError("cusum: the series holds NaN or infinite values; drop them first")
    if k < 0 or h <= 0:
        raise ValueError(f"cusum: need k ≥ 0 and h > 0, got k={k}, h={h}")
    if target is not None and sigma is not None:
        s = max(float(sigma), sigma_floor)
        if s <= 0:
            raise ValueError("cusum: sigma must be positive")
        u = (x - float(target)) / s
        ref = np.full(x.size, float(target))
    else:
        u, ref = _standardise_self_starting(x, sigma_floor)
    upper: list[float] = []
    lower: list[float] = []
    cp = cm = 0.0
    last_zero_p = last_zero_m = -1
    for i, ui in enumerate(u.tolist()):  # Python floats: see _standardise_self_starting
        cp = max(0.0, ui - k + cp)
        cm = max(0.0, -ui - k + cm)
        upper.append(cp)
        lower.append(cm)
        if cp == 0.0:
            last_zero_p = i
        if cm == 0.0:
            last_zero_m = i
        if cp > h or cm > h:
            direction: Literal["up", "down"] = "up" if cp > h else "down"
            onset = (last_zero_p if direction == "up" else last_zero_m) + 1
            return CusumResult(
                i, onset, direction, float(ref[onset]), np.array(upper), np.array(lower)
            )
    return CusumResult(None, None, None, float(ref[-1]), np.array(upper), np.array(lower))


def _day(when: date | datetime) -> str:
    return (when.date() if isinstance(when, datetime) else when).isoformat()


def drift_reason(
    dates: Sequence[date | datetime],
    values: Sequence[float | None],
    *,
    label: str,
    band: str | None = None,
    unit_format: Any = None,
    k: float = 0.5,
    h: float = 5.0,
    sigma_floor: float = 0.0,
) -> str | None:
    """A reason such as "40m: min SWR drifting up since 2025-06-01 (CUSUM ...)" or None.

    ``dates``/``values`` are one metric's series since the baseline, oldest first;
    missing values (None, infinite) are skipped. ``unit_format`` turns a change of the
    metric into words (default: 3 significant digits).
    """
    pairs = [
        (d, float(v))
        for d, v in zip(dates, values, strict=True)
        if v is not None and math.isfinite(v)
    ]
    if len(pairs) < max(MIN_POINTS, 2):
        return None
    x = np.array([v for _, v in pairs])
    res = cusum(x, k=k, h=h, sigma_floor=sigma_floor)
    if not res.alarm or res.onset_index is None:
        return None
    onset = min(res.onset_index, len(pairs) - 1)
    change = float(np.median(x[-3:]) - res.reference)
    fmt = unit_format or (lambda v: f"{abs(v):.3g}")
    prefix = f"{band}: " if band else ""
    return (
        f"{prefix}{label} drifting {res.direction} since {_day(pairs[onset][0])} "
        f"(by {fmt(change)} over {len(pairs) - onset} sweeps; CUSUM change-point test)"
    )
