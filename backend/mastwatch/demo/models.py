"""Feedpoint impedance models of the demo club's antennas, vectorised over frequency.

These are *models*, fitted to a handful of parameters (resonant frequency, resistance at
resonance, loaded Q), not field solutions. They are good enough to make sweeps that
look like an antenna analyzer's view of a real antenna, and every one of them has a
known resonance and Q so tests can check the metrics against the model.

    model            picture                                           resonance at f0
    ---------------  ------------------------------------------------  ---------------
    SeriesRLC        R + j(ωL − 1/ωC)                                  series
    Dipole           thin wire as an open-ended lossy line, βl = π/2   series (~50–75 Ω)
    Vertical         quarter-wave monopole over radials (image dipole) series (~36 Ω + ground)
    FanDipole        several dipoles in parallel on one feedpoint       one per branch
    Yagi             driven element shortened, hairpin (shunt L) match series, 50 Ω matched
    JPole/Collinear  parallel resonance, stub-matched to ~50 Ω          parallel
    EndFed           half-wave end-fed (βl = π), 49:1 transformer       parallel, harmonics too
    SmallLoop        series RLC, very high Q, coupling loop to 50 Ω     series

The wire antennas use the transmission-line picture of a thin dipole: each arm is an
open-ended line of characteristic impedance Za whose attenuation stands for the
radiated (and lost) power, so Z = Za·coth(α + jθ) with θ = (π/2)·f/f0 for a half-wave
dipole (Schelkunoff's treatment of the dipole as a tapered line is the textbook form of
this idea; from memory). Near f0 it is a series RLC; it also gives the parallel
resonance near 2·f0 and the next series resonance near 3·f0, which a pure RLC cannot.

The two parameters Za and α are fitted so that at f0 the resistance equals
``r_rad_ohm + r_loss_ohm`` and the Yaghjian–Best Q, ω0·|Z′(ω0)|/(2R), equals ``q``
exactly (A. D. Yaghjian and S. R. Best, IEEE Trans. Antennas Propag. 53(4), 2005).
For Za·coth(α + jπf/(2f0)):  R(f0) = Za·tanh α  and  Q = π/(2·sinh 2α).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property
from typing import Protocol, runtime_checkable

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import brentq

FloatArray = NDArray[np.float64]
ComplexArray = NDArray[np.complex128]

Z0_OHM = 50.0


@runtime_checkable
class AntennaModel(Protocol):
    """Anything with a design resonance that gives a feedpoint impedance at each frequency."""

    @property
    def f0_hz(self) -> float: ...

    def impedance(self, freq_hz: FloatArray) -> ComplexArray: ...

    def describe(self) -> str: ...


def _check_positive(**values: float) -> None:
    for name, v in values.items():
        if not (math.isfinite(v) and v > 0):
            raise ValueError(f"{name} must be a positive finite number, got {v!r}")


def _c(z: object) -> ComplexArray:
    """As a complex128 array (the models' one return type)."""
    return np.asarray(z, dtype=np.complex128)


def _coth(x: ComplexArray) -> ComplexArray:
    return _c(1.0 / np.tanh(x))


def _freqs(freq_hz: FloatArray) -> FloatArray:
    f = np.asarray(freq_hz, dtype=np.float64)
    if np.any(f <= 0):
        raise ValueError("antenna models need frequencies above 0 Hz")
    return f


# --------------------------------------------------------------------------------------
# The plain circuit, used as the textbook check
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class SeriesRLC:
    """A series RLC: Z = R + j(ωL − 1/(ωC)). Q = ω0·L/R (textbook circuit theory)."""

    r_ohm: float
    l_h: float
    c_f: float

    def __post_init__(self) -> None:
        _check_positive(r_ohm=self.r_ohm, l_h=self.l_h, c_f=self.c_f)

    @classmethod
    def from_resonance(cls, f0_hz: float, r_ohm: float, q: float) -> SeriesRLC:
        _check_positive(f0_hz=f0_hz, r_ohm=r_ohm, q=q)
        w0 = 2 * math.pi * f0_hz
        l_h = q * r_ohm / w0
        return cls(r_ohm, l_h, 1.0 / (w0 * w0 * l_h))

    @property
    def f0_hz(self) -> float:
        return 1.0 / (2 * math.pi * math.sqrt(self.l_h * self.c_f))

    @property
    def q(self) -> float:
        return 2 * math.pi * self.f0_hz * self.l_h / self.r_ohm

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        w = 2 * np.pi * _freqs(freq_hz)
        return _c(self.r_ohm + 1j * (w * self.l_h - 1.0 / (w * self.c_f)))

    def describe(self) -> str:
        return f"series RLC R={self.r_ohm:g} ohm, L={self.l_h:.6g} H, C={self.c_f:.6g} F"


# --------------------------------------------------------------------------------------
# Wire antennas: the lossy open-line picture
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _LineResonator:
    """Za·coth(α + jθ(f)) with θ = (π/2)·f/f0 (series resonance at f0).

    ``alpha_exponent`` lets α grow with frequency (a longer wire in wavelengths radiates
    more per unit length): α(f) = α0·(f/f0)^p. p = 0 keeps the model's Q exactly ``q``.
    """

    f0_hz: float
    r_rad_ohm: float
    r_loss_ohm: float
    q: float
    alpha_exponent: float = 0.0

    def __post_init__(self) -> None:
        _check_positive(f0_hz=self.f0_hz, r_rad_ohm=self.r_rad_ohm, q=self.q)
        if not (math.isfinite(self.r_loss_ohm) and self.r_loss_ohm >= 0):
            raise ValueError(f"r_loss_ohm must be >= 0, got {self.r_loss_ohm!r}")
        if self.q <= 1.0:
            raise ValueError(f"a resonant antenna model needs q > 1, got {self.q!r}")

    @property
    def r_ohm(self) -> float:
        """Feedpoint resistance at resonance: radiation plus loss."""
        return self.r_rad_ohm + self.r_loss_ohm

    @property
    def efficiency(self) -> float:
        return self.r_rad_ohm / self.r_ohm

    @cached_property
    def _alpha0(self) -> float:
        return 0.5 * math.asinh(math.pi / (2 * self.q))

    @cached_property
    def line_z_ohm(self) -> float:
        """The fitted characteristic impedance Za of the equivalent line (ohms)."""
        return self.r_ohm / math.tanh(self._alpha0)

    @property
    def series_l_h(self) -> float:
        """Inductance of the series RLC that matches this model at f0 (Q = ω0·L/R)."""
        return self.q * self.r_ohm / (2 * math.pi * self.f0_hz)

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        ratio = _freqs(freq_hz) / self.f0_hz
        alpha = self._alpha0 * ratio**self.alpha_exponent
        return self.line_z_ohm * _coth(alpha + 1j * (np.pi / 2) * ratio)


@dataclass(frozen=True)
class Dipole(_LineResonator):
    """A half-wave wire dipole near its resonance.

    Radiation resistance ~73 Ω in free space (textbook value, e.g. Balanis, *Antenna
    Theory*, from memory), lower at typical HF heights (~50–70 Ω); loss resistance of
    wire and insulators a few ohms; a thin wire dipole at HF has a Q of roughly 10–15
    (common practice: SWR ≤ 2 over about 5 % of f0).
    """

    r_rad_ohm: float = 65.0
    r_loss_ohm: float = 2.0
    q: float = 12.0

    def describe(self) -> str:
        return (
            f"half-wave dipole f0={self.f0_hz:.0f} Hz, R_rad={self.r_rad_ohm:g} ohm, "
            f"R_loss={self.r_loss_ohm:g} ohm, Q={self.q:g}"
        )


@dataclass(frozen=True)
class Vertical(_LineResonator):
    """A quarter-wave vertical over radials: half an image dipole.

    Radiation resistance ~36 Ω over a perfect ground (half the dipole's 73 Ω, textbook,
    from memory) plus the ground loss of a finite radial field (a few to ~15 Ω, common
    practice). Tubing verticals are fatter than wire: Q of about 8–12.
    """

    r_rad_ohm: float = 36.0
    r_loss_ohm: float = 8.0
    q: float = 10.0

    def describe(self) -> str:
        return (
            f"quarter-wave vertical f0={self.f0_hz:.0f} Hz, R_rad={self.r_rad_ohm:g} ohm, "
            f"R_ground={self.r_loss_ohm:g} ohm, Q={self.q:g}"
        )


@dataclass(frozen=True)
class FanDipole:
    """Several dipoles on one feedpoint: their admittances add (branches in parallel)."""

    branches: tuple[Dipole, ...]

    def __post_init__(self) -> None:
        if len(self.branches) < 2:
            raise ValueError("a fan dipole needs at least two branches")

    @property
    def f0_hz(self) -> float:
        return min(b.f0_hz for b in self.branches)

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        y = np.zeros(np.shape(freq_hz), dtype=np.complex128)
        for b in self.branches:
            y += 1.0 / b.impedance(freq_hz)
        return 1.0 / y

    def describe(self) -> str:
        return "fan dipole: " + "; ".join(b.describe() for b in self.branches)


# --------------------------------------------------------------------------------------
# Matched antennas
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Yagi:
    """A 3-element yagi's driven element, shortened and matched with a hairpin.

    The driven element alone has a low resistance (~20–25 Ω, common practice for a
    3-element beam) and a higher Q than a lone dipole because of the parasitic
    elements. It is made a little short, so it is capacitive at the design frequency,
    and a hairpin (a shunt inductance across the feedpoint) turns that into 50 Ω: an
    L-network made of the antenna itself. This model solves for the element's own
    resonance and the hairpin inductance so the matched result is exactly ``z0`` at
    ``f0_hz``; the yagi's resonance at the feedpoint is then ``f0_hz``.
    """

    f0_hz: float
    r_rad_ohm: float = 21.0
    r_loss_ohm: float = 1.0
    q: float = 18.0
    z0_ohm: float = Z0_OHM

    def __post_init__(self) -> None:
        _check_positive(f0_hz=self.f0_hz, r_rad_ohm=self.r_rad_ohm, q=self.q, z0_ohm=self.z0_ohm)
        if self.r_rad_ohm + self.r_loss_ohm >= self.z0_ohm:
            raise ValueError("a hairpin match needs the element resistance below z0")

    def _element(self, f_element_hz: float) -> Dipole:
        return Dipole(f_element_hz, self.r_rad_ohm, self.r_loss_ohm, self.q)

    @cached_property
    def element(self) -> Dipole:
        """The driven element with its resonance chosen so Re(1/Z) = 1/z0 at f0."""
        f = np.array([self.f0_hz])

        def conductance_error(f_el: float) -> float:
            return float((1.0 / self._element(f_el).impedance(f)).real[0]) - 1.0 / self.z0_ohm

        # The element resonates above f0 (it is short); G rises from 1/R at f_el = f0 down
        # through 1/z0 as the element gets shorter.
        f_el = brentq(conductance_error, self.f0_hz, self.f0_hz * 1.5, xtol=1e-6, rtol=1e-15)
        return self._element(float(f_el))

    @cached_property
    def hairpin_l_h(self) -> float:
        """The hairpin's inductance (H): cancels the susceptance left at f0."""
        b = float((1.0 / self.element.impedance(np.array([self.f0_hz]))).imag[0])
        return 1.0 / (2 * math.pi * self.f0_hz * b)

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        w = 2 * np.pi * _freqs(freq_hz)
        y = 1.0 / self.element.impedance(freq_hz) + 1.0 / (1j * w * self.hairpin_l_h)
        return _c(1.0 / y)

    def describe(self) -> str:
        return (
            f"3-element yagi matched by hairpin at {self.f0_hz:.0f} Hz: driven element "
            f"R={self.r_rad_ohm + self.r_loss_ohm:g} ohm, Q={self.q:g}, "
            f"hairpin L={self.hairpin_l_h:.4g} H"
        )


@dataclass(frozen=True)
class _ParallelMatched:
    """A parallel resonance brought to about 50 Ω by its matching section.

    Z = R/(1 + jQ(f/f0 − f0/f)): the radiator's high end impedance in parallel with the
    tuned stub, seen at the tap (an ideal transformer). Q is that of the parallel RLC.
    """

    f0_hz: float
    r_ohm: float = 52.0
    q: float = 15.0
    r_loss_ohm: float = 0.0  # part of r_ohm lost in the stub and radiator (for the record)

    def __post_init__(self) -> None:
        _check_positive(f0_hz=self.f0_hz, r_ohm=self.r_ohm, q=self.q)

    @property
    def r_rad_ohm(self) -> float:
        return self.r_ohm - self.r_loss_ohm

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        ratio = _freqs(freq_hz) / self.f0_hz
        return _c(self.r_ohm / (1 + 1j * self.q * (ratio - 1 / ratio)))


@dataclass(frozen=True)
class JPole(_ParallelMatched):
    """A j-pole: half-wave radiator end-fed through a quarter-wave shorted matching stub."""

    q: float = 14.0

    def describe(self) -> str:
        return f"j-pole f0={self.f0_hz:.0f} Hz, R={self.r_ohm:g} ohm at the tap, Q={self.q:g}"


@dataclass(frozen=True)
class Collinear(_ParallelMatched):
    """A vertical collinear (stacked half-waves with phasing), matched at its base."""

    q: float = 20.0

    def describe(self) -> str:
        return f"collinear f0={self.f0_hz:.0f} Hz, R={self.r_ohm:g} ohm matched, Q={self.q:g}"


@dataclass(frozen=True)
class EndFed:
    """An end-fed half-wave wire with a 49:1 transformer.

    The wire's end is a parallel resonance (βl = π) of a few kilo-ohms, repeated near
    each harmonic (which is why one wire serves 80/40/20/15/10 m). The model is the same
    open-line picture as the dipole, Z_end = Za·coth(α + jπf/f0), with α growing as
    (f/f0)^0.3 so the harmonics' end impedance falls gently (fitted, not derived). The
    transformer is an ideal 1:7 turns ratio (49:1 in impedance) with a shunt
    magnetising inductance and a series leakage inductance on the 50 Ω side.
    """

    f0_hz: float
    r_end_ohm: float = 2700.0
    q: float = 12.0
    ratio: float = 49.0
    l_mag_h: float = 12e-6
    l_leak_h: float = 0.04e-6
    alpha_exponent: float = 0.3
    r_loss_ohm: float = 0.0  # transformer loss folded into r_end (for the record)

    def __post_init__(self) -> None:
        _check_positive(
            f0_hz=self.f0_hz,
            r_end_ohm=self.r_end_ohm,
            q=self.q,
            ratio=self.ratio,
            l_mag_h=self.l_mag_h,
        )
        if self.l_leak_h < 0:
            raise ValueError(f"l_leak_h must be >= 0, got {self.l_leak_h!r}")

    @property
    def r_rad_ohm(self) -> float:
        return self.r_end_ohm / self.ratio

    @cached_property
    def _alpha0(self) -> float:
        # For Za·coth(α + jπf/f0) at f0: R = Za/tanh α and Q = π/sinh 2α.
        return 0.5 * math.asinh(math.pi / self.q)

    @cached_property
    def line_z_ohm(self) -> float:
        return self.r_end_ohm * math.tanh(self._alpha0)

    def end_impedance(self, freq_hz: FloatArray) -> ComplexArray:
        """The wire's own impedance at its end (before the transformer)."""
        ratio = _freqs(freq_hz) / self.f0_hz
        alpha = self._alpha0 * ratio**self.alpha_exponent
        return self.line_z_ohm * _coth(alpha + 1j * np.pi * ratio)

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        w = 2 * np.pi * _freqs(freq_hz)
        z_low = self.end_impedance(freq_hz) / self.ratio
        z_shunt = 1.0 / (1.0 / z_low + 1.0 / (1j * w * self.l_mag_h))
        return z_shunt + 1j * w * self.l_leak_h

    def describe(self) -> str:
        return (
            f"end-fed half-wave f0={self.f0_hz:.0f} Hz, R_end={self.r_end_ohm:g} ohm, "
            f"Q={self.q:g}, {self.ratio:g}:1 transformer"
        )


@dataclass(frozen=True)
class SmallLoop:
    """A small transmitting loop tuned by a capacitor, matched by a coupling loop.

    The loop itself is a series RLC of tiny resistance (radiation ~0.05 Ω plus copper and
    capacitor loss ~0.1 Ω at 40 m, common practice) and very high Q (several hundred).
    The coupling loop is modelled as an ideal transformer that brings the loop's
    resistance to ``r_match_ohm`` at resonance; an ideal transformer scales R and X
    alike, so the Q seen at the feedpoint is the loop's own.
    """

    f0_hz: float
    r_rad_ohm: float = 0.05
    r_loss_ohm: float = 0.10
    q: float = 400.0
    r_match_ohm: float = 48.0

    def __post_init__(self) -> None:
        _check_positive(
            f0_hz=self.f0_hz, r_rad_ohm=self.r_rad_ohm, q=self.q, r_match_ohm=self.r_match_ohm
        )

    @property
    def efficiency(self) -> float:
        return self.r_rad_ohm / (self.r_rad_ohm + self.r_loss_ohm)

    @property
    def loop(self) -> SeriesRLC:
        return SeriesRLC.from_resonance(self.f0_hz, self.r_rad_ohm + self.r_loss_ohm, self.q)

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        n2 = self.r_match_ohm / (self.r_rad_ohm + self.r_loss_ohm)
        return n2 * self.loop.impedance(freq_hz)

    def describe(self) -> str:
        return (
            f"small loop f0={self.f0_hz:.0f} Hz, R_rad={self.r_rad_ohm:g} ohm, "
            f"R_loss={self.r_loss_ohm:g} ohm, Q={self.q:g}, matched to {self.r_match_ohm:g} ohm"
        )


# --------------------------------------------------------------------------------------
# Antenna damage: a model wrapped
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Detuned:
    """A model whose resonances all moved by the factor (f0 + shift)/f0.

    A bent element, a stretched or shortened wire, or ice and water on the elements
    (a higher effective permittivity around the wire lowers the resonance) all scale the
    electrical length; evaluating the original at f·f0/(f0 + shift) moves every
    resonance of the model by that factor and keeps its Q. ``extra_loss_ohm`` adds a
    series resistance (wet insulators, a corroded joint).
    """

    model: AntennaModel
    shift_hz: float
    extra_loss_ohm: float = 0.0
    note: str = field(default="detuned", compare=False)

    def __post_init__(self) -> None:
        if not math.isfinite(self.shift_hz) or self.model.f0_hz + self.shift_hz <= 0:
            raise ValueError(f"a detune of {self.shift_hz!r} Hz leaves no resonance")
        if not (math.isfinite(self.extra_loss_ohm) and self.extra_loss_ohm >= 0):
            raise ValueError(f"extra_loss_ohm must be >= 0, got {self.extra_loss_ohm!r}")

    @property
    def f0_hz(self) -> float:
        return self.model.f0_hz + self.shift_hz

    @property
    def ratio(self) -> float:
        return self.f0_hz / self.model.f0_hz

    def impedance(self, freq_hz: FloatArray) -> ComplexArray:
        return self.model.impedance(_freqs(freq_hz) / self.ratio) + self.extra_loss_ohm

    def describe(self) -> str:
        return f"{self.model.describe()}; {self.note} by {self.shift_hz:+.0f} Hz"


def detune(model: AntennaModel, shift_hz: float, extra_loss_ohm: float = 0.0) -> Detuned:
    """``model`` with its resonance moved by ``shift_hz`` (negative = lower)."""
    return Detuned(model, shift_hz, extra_loss_ohm)
