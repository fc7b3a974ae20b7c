"""Fewer points for plotting without losing what matters: min/max-preserving buckets.

The sweep is cut into equal runs of points; each run keeps the points where |Γ| is
smallest and largest (so the SWR dip and the peaks survive), and the first and last
point of the sweep, the global minimum of every plane given, and the points nearest
each band edge are always kept. The result is sorted, unique indices: the same
indices serve every plane and every derived view (Γ, R, X, SWR, RL).
"""

from __future__ import annotations

import itertools
from collections.abc import Iterable, Sequence

import numpy as np
from numpy.typing import NDArray

IntArray = NDArray[np.intp]


def keep_indices(
    freq_hz: np.ndarray,
    magnitudes: Sequence[np.ndarray],
    max_points: int,
    edges_hz: Iterable[float] = (),
) -> IntArray:
    """Indices of at most about ``max_points`` points (all of them when already fewer)."""
    n = int(freq_hz.size)
    if max_points <= 0:
        raise ValueError("max_points must be positive")
    if n <= max_points:
        return np.arange(n, dtype=np.intp)
    always: list[int] = [0, n - 1]
    for mag in magnitudes:
        always.append(int(np.argmin(mag)))
    for edge in edges_hz:
        if freq_hz[0] <= edge <= freq_hz[-1]:
            always.append(int(np.argmin(np.abs(freq_hz - edge))))
    # Two points (min and max) per bucket per plane; leave room for the fixed ones.
    per_bucket = 2 * max(1, len(magnitudes))
    buckets = max(1, (max_points - len(always)) // per_bucket)
    bounds = np.linspace(0, n, buckets + 1).astype(np.intp)
    keep = [np.asarray(always, dtype=np.intp)]
    for mag in magnitudes:
        for lo, hi in itertools.pairwise(bounds):
            if hi > lo:
                seg = mag[lo:hi]
                keep.append(np.array([lo + np.argmin(seg), lo + np.argmax(seg)], dtype=np.intp))
    return np.unique(np.concatenate(keep))
