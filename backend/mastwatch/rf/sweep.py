"""The one-port sweep: frequencies in Hz and the reflection coefficient Γ = S11.

Everything else in ``mastwatch.rf`` takes a :class:`Sweep`. Arrays are read-only so a
sweep can be shared between computations without copies. Derived views (Z, SWR,
return loss, ...) are computed on access from Γ, exactly as DESIGN.md defines them:

    Z  = z0·(1+Γ)/(1−Γ)
    SWR = (1+|Γ|)/(1−|Γ|), +inf where |Γ| ≥ 1
    RL = −20·log10|Γ| dB   (+inf for a perfect match)
    ML = −10·log10(1−|Γ|²) dB (+inf where |Γ| ≥ 1)

A sweep read from an SWR-only file has ``has_phase = False``: Γ then holds |Γ| as a
real number and the views that need the phase (Z, R, X, phase) raise AnalysisError.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from datetime import datetime

import numpy as np
from numpy.typing import NDArray

from mastwatch.rf.errors import AnalysisError, SweepFormatError

FloatArray = NDArray[np.float64]
ComplexArray = NDArray[np.complex128]


@dataclass(frozen=True)
class SweepSource:
    """Where a sweep came from: kept for the record, never needed for the maths."""

    filename: str | None = None
    format: str | None = None  # "touchstone-1", "touchstone-2", "csv"
    parameter: str | None = None  # parameter in the file: "S", "Z", "Y", "SWR", "RX", ...
    data_format: str | None = None  # "RI", "MA", "DB", or CSV column kinds
    ports: int = 1
    comments: tuple[str, ...] = ()
    measured_at: datetime | None = None  # when the file itself says so


def _frozen(a: np.ndarray) -> np.ndarray:
    """A read-only contiguous array; copies unless it already is one (never the caller's)."""
    if a.flags.writeable or not a.flags.c_contiguous:
        a = np.array(a, copy=True, order="C")
        a.flags.writeable = False
    return a


@dataclass(frozen=True)
class Sweep:
    """One dated measurement's data: frequencies (Hz, strictly increasing) and Γ."""

    freq_hz: FloatArray
    gamma: ComplexArray
    z0: float = 50.0
    has_phase: bool = True
    s21: ComplexArray | None = None
    source: SweepSource = field(default_factory=SweepSource)

    def __post_init__(self) -> None:
        f = np.asarray(self.freq_hz, dtype=np.float64)
        g = np.asarray(self.gamma, dtype=np.complex128)
        if f.ndim != 1 or g.shape != f.shape:
            raise SweepFormatError(
                f"frequency and Γ must be 1-D arrays of one length, got {f.shape} and {g.shape}"
            )
        if f.size == 0:
            raise SweepFormatError("the sweep has no data points")
        if not (np.all(np.isfinite(f)) and np.all(np.isfinite(g))):
            raise SweepFormatError("the sweep holds NaN or infinite values")
        if f.size > 1 and not np.all(np.diff(f) > 0):
            raise SweepFormatError("frequencies must be strictly increasing")
        if f[0] < 0:
            raise SweepFormatError("frequencies must not be negative")
        if not (np.isfinite(self.z0) and self.z0 > 0):
            raise SweepFormatError(f"reference impedance must be a positive number, got {self.z0}")
        object.__setattr__(self, "freq_hz", _frozen(f))
        object.__setattr__(self, "gamma", _frozen(g))
        object.__setattr__(self, "z0", float(self.z0))
        if self.s21 is not None:
            s21 = np.asarray(self.s21, dtype=np.complex128)
            if s21.shape != f.shape:
                raise SweepFormatError("S21 must have one value per frequency")
            object.__setattr__(self, "s21", _frozen(s21))

    # -- construction helpers -------------------------------------------------------

    @classmethod
    def from_impedance(
        cls, freq_hz: np.ndarray, z_ohm: np.ndarray, z0: float = 50.0, **kw: object
    ) -> Sweep:
        """A sweep from impedances Z (ohms): Γ = (Z − z0)/(Z + z0)."""
        z = np.asarray(z_ohm, dtype=np.complex128)
        return cls(freq_hz, (z - z0) / (z + z0), z0, **kw)  # type: ignore[arg-type]

    def with_gamma(self, gamma: np.ndarray, **changes: object) -> Sweep:
        """The same sweep with another Γ (e.g. moved to another reference plane)."""
        return replace(self, gamma=gamma, **changes)  # type: ignore[arg-type]

    # -- derived views --------------------------------------------------------------

    def __len__(self) -> int:
        return int(self.freq_hz.size)

    @property
    def points(self) -> int:
        return int(self.freq_hz.size)

    @property
    def f_start_hz(self) -> float:
        return float(self.freq_hz[0])

    @property
    def f_stop_hz(self) -> float:
        return float(self.freq_hz[-1])

    def _need_phase(self, what: str) -> None:
        if not self.has_phase:
            raise AnalysisError(f"{what} needs the phase of Γ; this sweep has SWR only")

    @property
    def gamma_mag(self) -> FloatArray:
        return np.abs(self.gamma)

    @property
    def phase_deg(self) -> FloatArray:
        self._need_phase("the phase")
        return np.angle(self.gamma, deg=True)

    @property
    def z(self) -> ComplexArray:
        """Impedance Z = z0·(1+Γ)/(1−Γ) in ohms; inf where Γ = 1 exactly."""
        self._need_phase("the impedance")
        with np.errstate(divide="ignore", invalid="ignore"):
            z = self.z0 * (1 + self.gamma) / (1 - self.gamma)
        return np.where(self.gamma == 1, complex(np.inf, 0), z)

    @property
    def r(self) -> FloatArray:
        return self.z.real

    @property
    def x(self) -> FloatArray:
        return self.z.imag

    @property
    def swr(self) -> FloatArray:
        return swr_from_mag(self.gamma_mag)

    @property
    def return_loss_db(self) -> FloatArray:
        return return_loss_from_mag(self.gamma_mag)

    @property
    def mismatch_loss_db(self) -> FloatArray:
        return mismatch_loss_from_mag(self.gamma_mag)


def swr_from_mag(mag: np.ndarray) -> FloatArray:
    """SWR = (1+|Γ|)/(1−|Γ|); +inf where |Γ| ≥ 1 (never a made-up cap)."""
    mag = np.asarray(mag, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        s = (1 + mag) / (1 - mag)
    return np.where(mag >= 1, np.inf, s)


def mag_from_swr(swr: np.ndarray) -> FloatArray:
    """|Γ| = (SWR − 1)/(SWR + 1); 1 for an infinite SWR."""
    s = np.asarray(swr, dtype=np.float64)
    with np.errstate(invalid="ignore"):
        m = (s - 1) / (s + 1)
    return np.where(np.isinf(s), 1.0, m)


def return_loss_from_mag(mag: np.ndarray) -> FloatArray:
    """RL = −20·log10|Γ| dB, a positive number for a passive load; +inf at |Γ| = 0."""
    mag = np.asarray(mag, dtype=np.float64)
    with np.errstate(divide="ignore"):
        return -20.0 * np.log10(mag)


def mismatch_loss_from_mag(mag: np.ndarray) -> FloatArray:
    """ML = −10·log10(1−|Γ|²) dB; +inf where |Γ| ≥ 1."""
    mag = np.asarray(mag, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        ml = -10.0 * np.log10(1 - mag**2)
    return np.where(mag >= 1, np.inf, ml)
