"""Sweep files for the browser tests, written by the tests themselves.

A resonant antenna near its resonance is modelled as a series RLC circuit,
Z(f) = R·(1 + jQ·(f/f0 − f0/f)) (any circuits textbook, e.g. Hayt & Kemmerly,
"Engineering Circuit Analysis", series resonance), written as Touchstone v1 S11 in
real/imaginary form with Γ = (Z − z0)/(Z + z0) (Touchstone 1.1 specification, IBIS).
"""

from __future__ import annotations

import numpy as np


def series_rlc_gamma(
    f_hz: np.ndarray, f0_hz: float, r_ohm: float, q: float, z0: float = 50.0
) -> np.ndarray:
    z = r_ohm * (1 + 1j * q * (f_hz / f0_hz - f0_hz / f_hz))
    return (z - z0) / (z + z0)


def touchstone(
    f0_hz: float,
    *,
    r_ohm: float = 50.0,
    q: float = 12.0,
    start_hz: float | None = None,
    stop_hz: float | None = None,
    points: int = 201,
    comment: str = "browser test sweep",
) -> bytes:
    """A one-port Touchstone v1 file (``# Hz S RI R 50``) of a series RLC resonance."""
    start = start_hz if start_hz is not None else 0.85 * f0_hz
    stop = stop_hz if stop_hz is not None else 1.15 * f0_hz
    f = np.linspace(start, stop, points)
    g = series_rlc_gamma(f, f0_hz, r_ohm, q)
    lines = [f"! {comment}", "# Hz S RI R 50"]
    lines += [f"{fi:.1f} {gi.real:.12g} {gi.imag:.12g}" for fi, gi in zip(f, g, strict=True)]
    return ("\n".join(lines) + "\n").encode()


def bad_touchstone() -> tuple[bytes, int]:
    """A Touchstone file whose 5th line has a non-number; returns (bytes, bad line)."""
    text = "! broken\n# Hz S RI R 50\n7000000 0.1 0.2\n7100000 0.1 0.2\n7200000 0.1 abc\n"
    return text.encode(), 5
