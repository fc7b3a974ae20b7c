"""Deterministic synthetic sweeps: an antenna model seen through a (possibly damaged) feedline.

    model.impedance(f) ──Γ──▶ feedpoint Sweep ──embed through each line section──▶
        line-input Sweep ──+ measurement noise, erratic points (seeded)──▶ Sweep

The antenna models live in ``mastwatch.demo.models`` (with ``Detuned`` for antenna
damage); this module adds the feedline damage and the measurement:

    WaterInLine         a wet length at the antenna end: its matched loss multiplied,
                        its Z0 and velocity factor a little lower (a small impedance step)
    MidLineReflection   a short piece of different Z0 at a known distance from the radio
                        (a crushed cable, a bad connector or barrel)
    LineBreak           an open or a short, at the feedpoint or at a distance along the line
    noise               complex Gaussian on Γ with RMS magnitude ``noise``
    erratic             a share of the points replaced by random Γ (a failed sweep:
                        a loose test lead, a strong nearby transmitter)

All line maths is ``mastwatch.rf.lines.embed`` (the lossy-line transformation of the RF
core); this module only cuts the feedline into sections. The same arguments and seed
give the same Sweep, bit for bit, on a given numpy version (``default_rng(seed)`` is
PCG64; numpy keeps its streams stable across platforms, but may change them between
releases when a bug is fixed).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import Literal

import numpy as np

from mastwatch.demo.models import AntennaModel, ComplexArray, FloatArray
from mastwatch.rf.lines import CableType, Feedline, embed
from mastwatch.rf.sweep import Sweep, SweepSource

MAX_SYNTH_GAMMA = 1.0
"""Noise is clipped to the unit circle (a passive load never reads as active)."""


# --------------------------------------------------------------------------------------
# Feedline damage
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class WaterInLine:
    """Water in the coax, wicked in from the antenna end over ``wet_length_m``.

    Water in the braid and dielectric raises the capacitance per metre: Z0 and the
    velocity factor fall a little and the matched loss rises several-fold (the size of
    each effect is a demo choice, not a measured figure). ``wet_length_m=None`` wets
    the whole line. Where the wet part starts, the line has a small impedance step.
    """

    loss_factor: float = 4.0
    wet_length_m: float | None = None
    z0_step_ohm: float = -4.0
    velocity_factor_ratio: float = 0.96

    def __post_init__(self) -> None:
        if not (math.isfinite(self.loss_factor) and self.loss_factor >= 1):
            raise ValueError(f"water multiplies the loss by >= 1, got {self.loss_factor!r}")
        if self.wet_length_m is not None and not (
            math.isfinite(self.wet_length_m) and self.wet_length_m > 0
        ):
            raise ValueError(f"wet_length_m must be > 0 m, got {self.wet_length_m!r}")
        if not (0 < self.velocity_factor_ratio <= 1):
            raise ValueError("velocity_factor_ratio must be in (0, 1]")

    def wet_cable(self, cable: CableType) -> CableType:
        z0 = cable.z0_ohm + self.z0_step_ohm
        if z0 <= 0:
            raise ValueError(f"a {self.z0_step_ohm} Ω step leaves no line impedance")
        return replace(
            cable,
            name=f"{cable.name} (wet)",
            z0_ohm=z0,
            velocity_factor=cable.velocity_factor * self.velocity_factor_ratio,
            k0=cable.k0 * self.loss_factor,
            k1=cable.k1 * self.loss_factor,
            k2=cable.k2 * self.loss_factor,
            points=(),
        )


@dataclass(frozen=True)
class MidLineReflection:
    """A short section of another impedance, ``distance_m`` from the radio end.

    A crushed cable brings the conductors closer (lower Z0, ~30 Ω here); a bad
    connector or a wrong barrel is a short piece of higher or lower Z0 too.
    """

    distance_m: float
    length_m: float = 0.05
    z0_ohm: float = 30.0

    def __post_init__(self) -> None:
        if not (math.isfinite(self.distance_m) and self.distance_m >= 0):
            raise ValueError(f"distance_m must be >= 0 m, got {self.distance_m!r}")
        if not (math.isfinite(self.length_m) and self.length_m > 0):
            raise ValueError(f"length_m must be > 0 m, got {self.length_m!r}")
        if not (math.isfinite(self.z0_ohm) and self.z0_ohm > 0):
            raise ValueError(f"z0_ohm must be > 0 Ω, got {self.z0_ohm!r}")


@dataclass(frozen=True)
class LineBreak:
    """An open or a short: at the feedpoint (``distance_m=None``) or along the line."""

    kind: Literal["open", "short"]
    distance_m: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in ("open", "short"):
            raise ValueError(f"a line break is 'open' or 'short', got {self.kind!r}")
        if self.distance_m is not None and not (
            math.isfinite(self.distance_m) and self.distance_m >= 0
        ):
            raise ValueError(f"distance_m must be >= 0 m, got {self.distance_m!r}")

    @property
    def gamma(self) -> float:
        return 1.0 if self.kind == "open" else -1.0


LineDamage = WaterInLine | MidLineReflection | LineBreak


def line_sections(feedline: Feedline, damage: Sequence[LineDamage] = ()) -> list[Feedline]:
    """The feedline cut into sections, listed from the antenna end to the radio end.

    Connectors stay with the radio-end section (matched attenuations: where they sit
    does not change the loss). A ``LineBreak`` is not a section: see ``synthesize``.
    """
    length = feedline.length_m
    # (start, end, cable) measured from the radio end.
    cuts: list[tuple[float, float, CableType]] = [(0.0, length, feedline.cable)]

    def overlay(start: float, end: float, cable: CableType) -> None:
        start, end = max(0.0, start), min(length, end)
        if end <= start:
            return
        out: list[tuple[float, float, CableType]] = []
        for a, b, c in cuts:
            if b <= start or a >= end:
                out.append((a, b, c))
                continue
            if a < start:
                out.append((a, start, c))
            out.append((max(a, start), min(b, end), cable))
            if b > end:
                out.append((end, b, c))
        cuts[:] = out

    for d in damage:
        if isinstance(d, WaterInLine):
            wet = length if d.wet_length_m is None else min(d.wet_length_m, length)
            overlay(length - wet, length, d.wet_cable(feedline.cable))
        elif isinstance(d, MidLineReflection):
            if d.distance_m >= length:
                raise ValueError(
                    f"a reflection at {d.distance_m:g} m is beyond the {length:g} m feedline"
                )
            odd = replace(
                feedline.cable, name=f"{feedline.cable.name} (damaged)", z0_ohm=d.z0_ohm, points=()
            )
            overlay(d.distance_m, d.distance_m + d.length_m, odd)
        elif isinstance(d, LineBreak):
            if d.distance_m is not None and d.distance_m > length:
                raise ValueError(
                    f"a break at {d.distance_m:g} m is beyond the {length:g} m feedline"
                )
        else:  # pragma: no cover - the type says what is allowed
            raise TypeError(f"unknown feedline damage {d!r}")

    sections = [
        Feedline(c, b - a, feedline.connectors if a == 0.0 else 0, feedline.connector_loss_db)
        for a, b, c in reversed(cuts)
    ]
    return sections


def _radio_side(sections: list[Feedline], distance_m: float) -> list[Feedline]:
    """The sections (antenna → radio order) between the radio end and ``distance_m``."""
    kept: list[Feedline] = []
    walked = 0.0
    for s in reversed(sections):
        if walked >= distance_m:
            break
        take = min(s.length_m, distance_m - walked)
        kept.append(replace(s, length_m=take))
        walked += s.length_m
    return kept[::-1]


def _break_of(damage: Sequence[LineDamage]) -> LineBreak | None:
    breaks = [d for d in damage if isinstance(d, LineBreak)]
    if len(breaks) > 1:
        raise ValueError("give at most one LineBreak: the first one hides the others")
    return breaks[0] if breaks else None


# --------------------------------------------------------------------------------------
# Measurement
# --------------------------------------------------------------------------------------


def frequency_grid(f_start_hz: float, f_stop_hz: float, points: int) -> FloatArray:
    """Linear grid, as an analyzer sweeps: ``points`` frequencies from start to stop."""
    if not (math.isfinite(f_start_hz) and math.isfinite(f_stop_hz) and 0 < f_start_hz < f_stop_hz):
        raise ValueError(f"need 0 < f_start < f_stop, got {f_start_hz!r} .. {f_stop_hz!r} Hz")
    if points < 2:
        raise ValueError(f"a sweep needs at least 2 points, got {points}")
    return np.linspace(f_start_hz, f_stop_hz, int(points))


def _measure(gamma: ComplexArray, noise: float, erratic: float, seed: int) -> ComplexArray:
    """Add the analyzer's trace noise and any erratic points; clip to the unit circle."""
    if not (math.isfinite(noise) and noise >= 0):
        raise ValueError(f"noise is an RMS |ΔΓ| >= 0, got {noise!r}")
    if not (0 <= erratic <= 1):
        raise ValueError(f"erratic is a share of points in [0, 1], got {erratic!r}")
    rng = np.random.default_rng(seed)
    n = gamma.size
    g = gamma.copy()
    if noise > 0:
        # Complex Gaussian with E|n|² = noise²: each part has σ = noise/√2.
        g += (noise / math.sqrt(2)) * (rng.standard_normal(n) + 1j * rng.standard_normal(n))
    if erratic > 0:
        bad = rng.random(n) < erratic
        k = int(bad.sum())
        g[bad] = np.sqrt(rng.random(k)) * 0.95 * np.exp(2j * np.pi * rng.random(k))
    mag = np.abs(g)
    over = mag > MAX_SYNTH_GAMMA
    # One ulp inside, so rounding of the product cannot land above the limit.
    g[over] *= np.nextafter(MAX_SYNTH_GAMMA, 0.0) / mag[over]
    return g


def synthesize(
    model: AntennaModel,
    f_start_hz: float,
    f_stop_hz: float,
    points: int,
    *,
    feedline: Feedline | None = None,
    damage: Sequence[LineDamage] = (),
    noise: float = 0.0,
    erratic: float = 0.0,
    seed: int = 0,
    z0: float = 50.0,
    comments: Sequence[str] = (),
) -> Sweep:
    """A sweep of ``model`` over a linear grid, at the line input when ``feedline`` is given.

    ``damage`` applies to the feedline (antenna damage is a wrapped model, e.g.
    ``models.detune``). A ``LineBreak`` at the feedpoint replaces the antenna; one at a
    distance replaces everything beyond it. Without a feedline the sweep is at the
    feedpoint and only a feedpoint ``LineBreak`` is allowed.
    """
    f = frequency_grid(f_start_hz, f_stop_hz, points)
    brk = _break_of(damage)
    if feedline is None and any(
        not isinstance(d, LineBreak) or d.distance_m is not None for d in damage
    ):
        raise ValueError("feedline damage needs a feedline: pass feedline=...")

    if brk is not None and brk.distance_m is None:
        gamma = np.full(f.shape, brk.gamma, dtype=np.complex128)
    else:
        z = model.impedance(f)
        gamma = (z - z0) / (z + z0)
    sweep = Sweep(f, gamma, z0)

    if feedline is not None:
        sections = line_sections(feedline, [d for d in damage if not isinstance(d, LineBreak)])
        if brk is not None and brk.distance_m is not None:
            # Only the line between the radio and the break is seen.
            sweep = Sweep(f, np.full(f.shape, brk.gamma, dtype=np.complex128), z0)
            sections = _radio_side(sections, brk.distance_m)
        for section in sections:
            if section.length_m > 0 or section.connectors:
                sweep = embed(sweep, section)

    measured = _measure(np.asarray(sweep.gamma), noise, erratic, seed)
    source = SweepSource(
        filename=None,
        format="synthetic",
        parameter="S",
        data_format="RI",
        comments=tuple(comments),
    )
    return Sweep(f, measured, z0, source=source)


__all__ = [
    "MAX_SYNTH_GAMMA",
    "LineBreak",
    "LineDamage",
    "MidLineReflection",
    "WaterInLine",
    "frequency_grid",
    "line_sections",
    "synthesize",
]
