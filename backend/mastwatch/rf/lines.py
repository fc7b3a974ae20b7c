"""Feedlines in the computation: cable types, lossy-line transformations, loss with SWR.

    CableType (Z0, VF, loss model)  ──fit_cable / CABLES──▶  Feedline (cable, length, connectors)
        propagation_constant:  γ = α + jβ,  α = A(f)/(100·8.685889638) Np/m,  β = 2πf/(VF·c)
        deembed:  line-input Sweep ──▶ feedpoint Sweep        (radio end → antenna)
        embed:    feedpoint Sweep  ──▶ line-input Sweep       (what a radio would see)
        matched_loss_db, total_loss_db, additional_loss_db, radio_swr

Matched loss model (REFERENCES §5): A(f) = k0 + k1·√f + k2·f in dB per 100 m, f in MHz.

The transformation is done on Γ, not on tanh: with Γ' the reflection coefficient
referred to the line's own Z0, a line of length l multiplies it by e^(−2γl) (Pozar,
*Microwave Engineering* 4th ed., lossy line, [memory] eq. 2.91). This is the same as
Z_in = Z0·(Z_L + Z0·tanh γl)/(Z0 + Z_L·tanh γl) and its inverse
Z_L = Z0·(Z_in − Z0·tanh γl)/(Z0 − Z_in·tanh γl), but it has no singularity where
tanh γl → ∞ or Γ → 1 (opens, shorts, lossless half-wave lines).

The sweep keeps its own reference impedance z0 (e.g. 50 Ω) for Γ while the line has
its own Z0 (e.g. 75 Ω coax or 450 Ω window line): Γ is moved from z0 to Z0 and back
by the bilinear map ``rereference``.

Connectors are modelled as small matched attenuations (a zero-length piece of line
with the line's Z0 and loss only): they add to Re(γl). The default per-connector loss,
0.05 dB, is common practice for a good coax connector at HF/VHF.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, replace
from types import MappingProxyType

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.optimize import nnls

from mastwatch.rf import cables as _catalog
from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.sweep import Sweep

FloatArray = NDArray[np.float64]
ComplexArray = NDArray[np.complex128]

C0 = 299_792_458.0
"""Speed of light in vacuum, m/s (exact, SI)."""

DB_PER_NEPER = 20.0 / math.log(10.0)
"""8.685889638… dB per neper (power ratio e² ↔ 20·log10 e dB)."""

FEET = 0.3048
"""Metres per foot (exact)."""

DEFAULT_CONNECTOR_LOSS_DB = 0.05
"""Matched loss of one coax connector, dB (common practice for good HF/VHF connectors)."""

CABLE_KINDS = ("coax", "twin")


@dataclass(frozen=True)
class CableType:
    """A cable's characteristic impedance, velocity factor and matched loss model.

    Matched loss A(f) = k0 + k1·√f + k2·f in dB per 100 m with f in MHz.
    ``points`` are the (f_hz, dB/100 m) table points the coefficients were fitted to.
    """

    name: str
    z0_ohm: float
    velocity_factor: float
    k1: float
    k2: float
    k0: float = 0.0
    source: str = ""
    kind: str = "coax"
    points: tuple[tuple[float, float], ...] = ()
    rounding_db_per_100m: float | None = None  # half a unit of the table's last digit

    def __post_init__(self) -> None:
        where = f"cable type {self.name!r}"
        if not self.name or not self.name.strip():
            raise ValueError("a cable type needs a name")
        if not (math.isfinite(self.z0_ohm) and self.z0_ohm > 0):
            raise ValueError(f"{where}: characteristic impedance must be > 0 Ω, got {self.z0_ohm}")
        if not (math.isfinite(self.velocity_factor) and 0 < self.velocity_factor <= 1):
            raise ValueError(
                f"{where}: velocity factor must be in (0, 1], got {self.velocity_factor}"
            )
        for label, k in (("k0", self.k0), ("k1", self.k1), ("k2", self.k2)):
            if not (math.isfinite(k) and k >= 0):
                raise ValueError(f"{where}: loss coefficient {label} must be ≥ 0, got {k}")
        if self.kind not in CABLE_KINDS:
            raise ValueError(f"{where}: kind must be one of {CABLE_KINDS}, got {self.kind!r}")

    def matched_loss_db_per_100m(self, f_hz: ArrayLike) -> FloatArray:
        """Matched loss in dB per 100 m at each frequency."""
        f_mhz = np.asarray(f_hz, dtype=np.float64) / 1e6
        return self.k0 + self.k1 * np.sqrt(f_mhz) + self.k2 * f_mhz

    def alpha_np_per_m(self, f_hz: ArrayLike) -> FloatArray:
        """Attenuation constant α in Np/m: dB/100 m ÷ (8.685889638·100)."""
        return self.matched_loss_db_per_100m(f_hz) / (DB_PER_NEPER * 100.0)

    def beta_rad_per_m(self, f_hz: ArrayLike) -> FloatArray:
        """Phase constant β = 2πf/(VF·c) in rad/m."""
        return 2.0 * np.pi * np.asarray(f_hz, dtype=np.float64) / (self.velocity_factor * C0)

    def to_dict(self) -> dict[str, object]:
        return {
            "name": self.name,
            "z0_ohm": self.z0_ohm,
            "velocity_factor": self.velocity_factor,
            "k0": self.k0,
            "k1": self.k1,
            "k2": self.k2,
            "kind": self.kind,
            "source": self.source,
            "points": [{"hz": f, "db_per_100m": a} for f, a in self.points],
        }


def _fit_k(
    f_hz: FloatArray, db_per_100m: FloatArray, with_k0: bool
) -> tuple[float, float, float]:
    """Non-negative least squares for (k0,) k1, k2 in the model's own units."""
    f_mhz = f_hz / 1e6
    cols = [np.sqrt(f_mhz), f_mhz]
    if with_k0:
        cols.insert(0, np.ones_like(f_mhz))
    k, _ = nnls(np.column_stack(cols), db_per_100m)
    if with_k0:
        return float(k[0]), float(k[1]), float(k[2])
    return 0.0, float(k[0]), float(k[1])


def fit_cable(
    name: str,
    z0_ohm: float,
    velocity_factor: float,
    points: Iterable[tuple[float, float]],
    *,
    source: str = "user measurement",
    kind: str = "coax",
    with_k0: bool = False,
) -> CableType:
    """A cable type fitted to measured matched-loss points [(f_hz, dB per 100 m), ...].

    k1 and k2 (and k0 with ``with_k0``) are fitted by least squares constrained to be
    ≥ 0 (scipy.optimize.nnls). Needs at least 2 points (3 with k0) at distinct
    positive frequencies with finite, non-negative losses.
    """
    pts = [tuple(p) for p in points]
    for i, p in enumerate(pts, 1):
        if len(p) != 2:
            raise ValueError(f"cable {name!r}: point {i} must be (frequency Hz, dB per 100 m)")
    arr = np.array(pts, dtype=np.float64).reshape(-1, 2)
    need = 3 if with_k0 else 2
    if arr.shape[0] < need:
        raise ValueError(
            f"cable {name!r}: the loss fit needs at least {need} points, got {arr.shape[0]}"
        )
    f, a = arr[:, 0], arr[:, 1]
    for i in range(arr.shape[0]):
        if not (math.isfinite(f[i]) and f[i] > 0):
            raise ValueError(f"cable {name!r}: point {i + 1} has frequency {f[i]} (must be > 0 Hz)")
        if not (math.isfinite(a[i]) and a[i] >= 0):
            raise ValueError(f"cable {name!r}: point {i + 1} has loss {a[i]} (must be ≥ 0 dB)")
    if np.unique(f).size < need:
        raise ValueError(f"cable {name!r}: the fit needs {need} distinct frequencies")
    k0, k1, k2 = _fit_k(f, a, with_k0)
    order = np.argsort(f)
    return CableType(
        name=name,
        z0_ohm=float(z0_ohm),
        velocity_factor=float(velocity_factor),
        k0=k0,
        k1=k1,
        k2=k2,
        source=source,
        kind=kind,
        points=tuple((float(f[i]), float(a[i])) for i in order),
    )


def _build_catalog() -> Mapping[str, CableType]:
    out: dict[str, CableType] = {}
    for e in _catalog.CATALOG:
        per_100m = _catalog.FEET_PER_100M / 100.0  # dB/100 ft → dB/100 m factor
        pts = [(f * 1e6, a * per_100m) for f, a in e.points_mhz_db100ft]
        cable = fit_cable(e.name, e.z0_ohm, e.velocity_factor, pts, source=e.source, kind=e.kind)
        rounding = 0.5 * 10.0 ** (-e.decimals) * per_100m
        out[e.name] = replace(cable, rounding_db_per_100m=rounding)
    return MappingProxyType(out)


CABLES: Mapping[str, CableType] = _build_catalog()
"""The seeded catalog (read-only), keyed by trade designation; see ``rf/cables.py``."""


def _key(name: str) -> str:
    return re.sub(r"[\s_]+", "-", name.strip()).lower()


def get_cable(name: str, extra: Mapping[str, CableType] | None = None) -> CableType:
    """The catalog cable (or one of ``extra``) by name, case-insensitive."""
    pool = {**CABLES, **(extra or {})}
    wanted = _key(name)
    for key, cable in pool.items():
        if _key(key) == wanted:
            return cable
    raise ValueError(f"unknown cable type {name!r}; known: {', '.join(pool)}")


# -- feedline -------------------------------------------------------------------------


@dataclass(frozen=True)
class Feedline:
    """A cable of a given length between the measuring point and the antenna."""

    cable: CableType
    length_m: float
    connectors: int = 0
    connector_loss_db: float = DEFAULT_CONNECTOR_LOSS_DB

    def __post_init__(self) -> None:
        if not (math.isfinite(self.length_m) and self.length_m >= 0):
            raise ValueError(f"feedline length must be ≥ 0 m, got {self.length_m}")
        if self.connectors < 0:
            raise ValueError(f"connector count must be ≥ 0, got {self.connectors}")
        if not (math.isfinite(self.connector_loss_db) and self.connector_loss_db >= 0):
            raise ValueError(f"connector loss must be ≥ 0 dB, got {self.connector_loss_db}")

    @property
    def connector_loss_np(self) -> float:
        """All connectors together as a matched attenuation, in nepers (one way)."""
        return self.connectors * self.connector_loss_db / DB_PER_NEPER

    def gamma_l(self, f_hz: ArrayLike) -> ComplexArray:
        """γ·l plus the connectors' attenuation: the line's complex electrical length."""
        return propagation_constant(self.cable, f_hz) * self.length_m + self.connector_loss_np

    def describe(self) -> str:
        s = f"{self.cable.name}, {self.length_m:g} m"
        if self.connectors:
            s += f", {self.connectors} connector(s) × {self.connector_loss_db:g} dB"
        return s

    def to_dict(self) -> dict[str, object]:
        return {
            "cable": self.cable.name,
            "z0_ohm": self.cable.z0_ohm,
            "velocity_factor": self.cable.velocity_factor,
            "length_m": self.length_m,
            "connectors": self.connectors,
            "connector_loss_db": self.connector_loss_db,
            "cable_source": self.cable.source,
        }


_LENGTH_RE = re.compile(r"^\s*([0-9]*\.?[0-9]+(?:[eE][-+]?[0-9]+)?)\s*(m|ft|feet|foot|')?\s*$")


def parse_length(text: str) -> float:
    """'30m', '30 m', '98.4ft', "98'" → metres. A bare number is metres."""
    m = _LENGTH_RE.match(text)
    if not m:
        raise ValueError(f"cannot read the length {text!r}: use e.g. 30m or 98.4ft")
    value = float(m.group(1))
    unit = (m.group(2) or "m").lower()
    return value if unit == "m" else value * FEET


def parse_feedline(
    text: str,
    *,
    connector_loss_db: float = DEFAULT_CONNECTOR_LOSS_DB,
    extra: Mapping[str, CableType] | None = None,
) -> Feedline:
    """'RG-213:30m' or 'RG-213:98.4ft:2' (cable : length [: connectors]) → Feedline."""
    parts = text.split(":")
    if len(parts) not in (2, 3):
        raise ValueError(
            f"cannot read the feedline {text!r}: use CABLE:LENGTH[:CONNECTORS], e.g. RG-213:30m"
        )
    cable = get_cable(parts[0], extra)
    length = parse_length(parts[1])
    connectors = 0
    if len(parts) == 3:
        try:
            connectors = int(parts[2])
        except ValueError:
            raise ValueError(
                f"cannot read the connector count {parts[2]!r} in {text!r}: use a whole number"
            ) from None
    return Feedline(cable, length, connectors, connector_loss_db)


# -- transformations --------------------------------------------------------------------


def propagation_constant(cable: CableType, f_hz: ArrayLike) -> ComplexArray:
    """γ = α + jβ (per metre) at each frequency."""
    return cable.alpha_np_per_m(f_hz) + 1j * cable.beta_rad_per_m(f_hz)


def rereference(gamma: ArrayLike, z_from: float, z_to: float) -> ComplexArray:
    """Γ referred to z_from → the same load's Γ referred to z_to (real impedances).

    Γ' = ((z_from − z_to) + (z_from + z_to)·Γ) / ((z_from + z_to) + (z_from − z_to)·Γ);
    the denominator cannot vanish for |Γ| ≤ 1, so opens and shorts pass through.
    """
    g = np.asarray(gamma, dtype=np.complex128)
    if z_from == z_to:
        return g
    d, s = z_from - z_to, z_from + z_to
    return (d + s * g) / (s + d * g)


def input_impedance(
    z_load: ArrayLike, cable: CableType, length_m: float, f_hz: ArrayLike
) -> ComplexArray:
    """Input impedance of a lossy line of ``length_m`` ending in ``z_load`` (ohms).

    Z_in = Z0·(Z_L + Z0·tanh γl)/(Z0 + Z_L·tanh γl) (Pozar 4th ed., lossy line),
    evaluated as Γ_in = Γ_L·e^(−2γl) in Z0. ``z_load`` may be ``inf`` (an open).
    """
    zl = np.asarray(z_load, dtype=np.complex128)
    z0 = cable.z0_ohm
    with np.errstate(invalid="ignore", divide="ignore"):
        gl = np.where(np.isinf(zl), 1.0 + 0j, (zl - z0) / (zl + z0))
    gin = gl * np.exp(-2.0 * propagation_constant(cable, f_hz) * length_m)
    return _z_from_gamma(gin, z0)


def _z_from_gamma(g: ComplexArray, z0: float) -> ComplexArray:
    with np.errstate(invalid="ignore", divide="ignore"):
        z = z0 * (1 + g) / (1 - g)
    return np.where(g == 1, complex(np.inf, 0), z)


def _move(sweep: Sweep, feedline: Feedline, sign: float) -> Sweep:
    """Γ moved along the feedline: sign −1 towards the radio (embed), +1 to the load."""
    z0_line = feedline.cable.z0_ohm
    two_gl = 2.0 * feedline.gamma_l(sweep.freq_hz)
    if not sweep.has_phase:
        # |Γ| alone moves along the line only when the line's Z0 is the sweep's z0.
        if not math.isclose(z0_line, sweep.z0, rel_tol=1e-9):
            raise AnalysisError(
                f"this sweep has SWR only: moving it along a {z0_line:g} Ω line needs the "
                f"phase of Γ (it can be done without phase only for a {sweep.z0:g} Ω line)"
            )
        return sweep.with_gamma(np.abs(sweep.gamma) * np.exp(sign * two_gl.real))
    g_line = rereference(sweep.gamma, sweep.z0, z0_line)
    g_line = g_line * np.exp(sign * two_gl)
    return sweep.with_gamma(rereference(g_line, z0_line, sweep.z0))


def deembed(sweep: Sweep, feedline: Feedline) -> Sweep:
    """Line-input sweep (at the radio end) → feedpoint sweep (at the antenna).

    Z_L = Z0·(Z_in − Z0·tanh γl)/(Z0 − Z_in·tanh γl) (DESIGN.md), done as
    Γ_L = Γ_in·e^(+2γl) in the line's Z0; Γ stays referred to the sweep's z0.
    A sweep with SWR only is handled for a line of Z0 = z0 (|Γ_L| = |Γ_in|·e^(2αl)).
    The result can show |Γ| > 1 where the assumed loss exceeds what the sweep allows
    (wrong cable or length): ``passivity_margin`` reports that.
    """
    return _move(sweep, feedline, +1.0)


def embed(sweep: Sweep, feedline: Feedline) -> Sweep:
    """Feedpoint sweep → line-input sweep: what a radio at the far end would see."""
    return _move(sweep, feedline, -1.0)


def radio_swr(feedpoint: Sweep, feedline: Feedline) -> FloatArray:
    """The SWR a radio would see through ``feedline`` (referred to the sweep's z0)."""
    return embed(feedpoint, feedline).swr


def matched_loss_db(feedline: Feedline, f_hz: ArrayLike) -> FloatArray:
    """Matched loss of the whole feedline (cable + connectors) in dB at each frequency."""
    cable_db = feedline.cable.matched_loss_db_per_100m(f_hz) * feedline.length_m / 100.0
    return cable_db + feedline.connectors * feedline.connector_loss_db


def arrl_total_loss_db(matched_db: ArrayLike, swr_load: ArrayLike) -> FloatArray:
    """Total loss of a line with matched loss ML (dB) and SWR at the load (real Z0).

    ARRL Antenna Book, "Additional Loss Due to SWR" [memory, formula confident]:
    a = 10^(ML/10), ρ = (S−1)/(S+1), TL = 10·log10[(a² − ρ²)/(a·(1 − ρ²))].
    +inf for an infinite SWR on a lossy line (all power is lost in the line).
    """
    a = 10.0 ** (np.asarray(matched_db, dtype=np.float64) / 10.0)
    s = np.asarray(swr_load, dtype=np.float64)
    with np.errstate(invalid="ignore"):
        rho = np.where(np.isinf(s), 1.0, (s - 1.0) / (s + 1.0))
    return _total_from_rho(a, rho)


def _total_from_rho(a: FloatArray, rho: FloatArray) -> FloatArray:
    num = a**2 - rho**2
    den = a * (1.0 - rho**2)
    with np.errstate(divide="ignore", invalid="ignore"):
        tl = 10.0 * np.log10(num / den)
    # |ρ| = 1: all power lost in a lossy line; in a lossless one (a = 1) nothing flows.
    tl = np.where(den <= 0, np.where(a > 1, np.inf, 0.0), tl)
    return np.asarray(tl, dtype=np.float64)


def total_loss_db(feedline: Feedline, feedpoint: Sweep) -> FloatArray:
    """Total loss (dB) of ``feedline`` feeding the load of a feedpoint sweep.

    Power into the line over power into the load, for a real Z0:
    P_L/P_in = (1 − |Γ_L|²)·e^(−2αl) / (1 − |Γ_L|²·e^(−4αl)), which is the ARRL
    formula above with ρ = |Γ_L| referred to the line's own Z0.
    """
    if feedpoint.has_phase:
        rho = np.abs(rereference(feedpoint.gamma, feedpoint.z0, feedline.cable.z0_ohm))
    elif math.isclose(feedline.cable.z0_ohm, feedpoint.z0, rel_tol=1e-9):
        rho = np.abs(feedpoint.gamma)
    else:
        raise AnalysisError(
            "this sweep has SWR only: the loss on a line whose Z0 differs from the "
            "sweep's z0 needs the phase of Γ"
        )
    a = np.exp(2.0 * feedline.gamma_l(feedpoint.freq_hz).real)
    return _total_from_rho(a, np.minimum(rho, 1.0))


def additional_loss_db(feedline: Feedline, feedpoint: Sweep) -> FloatArray:
    """The loss added by the SWR on the line: total loss minus matched loss (dB)."""
    return total_loss_db(feedline, feedpoint) - matched_loss_db(feedline, feedpoint.freq_hz)


def total_loss_db_general(
    z_load: ArrayLike, cable: CableType, length_m: float, f_hz: ArrayLike
) -> FloatArray:
    """Total loss (dB) from the load impedance, valid for any Z0 and load.

    TL = (R_in/R_L)·|cosh γl + (Z_L/Z0)·sinh γl|² (S. Stearns, "A Transmission Line
    Power Paradox and Its Resolution", Pacificon 2014 [found as quoted]).
    +inf where R_L = 0 (a lossless reactance takes no power).
    """
    zl = np.asarray(z_load, dtype=np.complex128)
    gl = propagation_constant(cable, f_hz) * length_m
    rin = input_impedance(zl, cable, length_m, f_hz).real
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = rin / zl.real * np.abs(np.cosh(gl) + zl / cable.z0_ohm * np.sinh(gl)) ** 2
        tl = 10.0 * np.log10(ratio)
    return np.where(zl.real <= 0, np.inf, tl)


def passivity_margin(sweep: Sweep) -> float:
    """1 − max|Γ|: negative when a de-embedded sweep looks active (too much loss assumed)."""
    return float(1.0 - np.max(np.abs(sweep.gamma)))


def catalog_rows(cables: Sequence[CableType] | None = None) -> list[dict[str, object]]:
    """The catalog as JSON-safe rows (name, Z0, VF, k's, source) for docs and the API."""
    return [c.to_dict() for c in (cables if cables is not None else CABLES.values())]


__all__ = [
    "C0",
    "CABLES",
    "DB_PER_NEPER",
    "DEFAULT_CONNECTOR_LOSS_DB",
    "FEET",
    "CableType",
    "Feedline",
    "additional_loss_db",
    "arrl_total_loss_db",
    "catalog_rows",
    "deembed",
    "embed",
    "fit_cable",
    "get_cable",
    "input_impedance",
    "matched_loss_db",
    "parse_feedline",
    "parse_length",
    "passivity_margin",
    "propagation_constant",
    "radio_swr",
    "rereference",
    "total_loss_db",
    "total_loss_db_general",
]

