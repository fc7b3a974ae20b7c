"""L-network matching: every two-element L/C match of a load to the system impedance.

Two topologies, named by the element next to the load (Pozar, *Microwave
Engineering* 4th ed., §5.1; formulas re-derived, equation numbers [memory]):

    shunt_at_load   radio ──[ series X ]──┬── load        exists when G_L ≤ 1/Z0
                                       [ shunt B ]
                                          │
    series_at_load  radio ──┬──[ series X ]── load        exists when R_L ≤ Z0
                         [ shunt B ]
                            │

With Y_L = G_L + jB_L (shunt_at_load): B' = ±√(G_L/Z0 − G_L²), B = B' − B_L,
X = B'·Z0/G_L. With Z_L = R_L + jX_L (series_at_load): X' = ±√(R_L(Z0 − R_L)),
X = X' − X_L, B = X'/(R_L·Z0). Each sign is one solution; both topologies exist
when R_L < Z0 and G_L < 1/Z0. A series X > 0 is an inductor (L = X/ω), X < 0 a
capacitor (C = −1/(ωX)); a shunt B > 0 is a capacitor (C = B/ω), B < 0 an
inductor (L = −1/(ωB)). An element of zero value is left out.

``matched_sweep`` puts ideal L and C of those values in front of a whole sweep, so
the SWR curve and bandwidth after the network can be computed with the metrics.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.metrics import compute_metrics, value_at
from mastwatch.rf.sweep import Sweep

Topology = Literal["shunt_at_load", "series_at_load"]

_ZERO = 1e-12  # relative size below which an element is absent


@dataclass(frozen=True)
class Element:
    """One ideal component: series or shunt, inductor or capacitor."""

    position: Literal["series", "shunt"]
    kind: Literal["L", "C"]
    reactance_ohm: float | None  # series elements: X at the design frequency
    susceptance_s: float | None  # shunt elements: B at the design frequency
    value: float  # henries (L) or farads (C)

    @property
    def display(self) -> str:
        v = format_inductance(self.value) if self.kind == "L" else format_capacitance(self.value)
        where = "in series" if self.position == "series" else "across (shunt)"
        name = "inductor" if self.kind == "L" else "capacitor"
        return f"{name} {v} {where}"

    def impedance(self, f_hz: np.ndarray) -> np.ndarray:
        """Z (series) or Y (shunt) of the ideal element at each frequency."""
        w = 2.0 * np.pi * np.asarray(f_hz, dtype=np.float64)
        if self.position == "series":
            return 1j * w * self.value if self.kind == "L" else 1.0 / (1j * w * self.value)
        return 1j * w * self.value if self.kind == "C" else 1.0 / (1j * w * self.value)

    def to_dict(self) -> dict[str, object]:
        return {
            "position": self.position,
            "kind": self.kind,
            "reactance_ohm": self.reactance_ohm,
            "susceptance_s": self.susceptance_s,
            "value": self.value,
            "unit": "H" if self.kind == "L" else "F",
            "display": self.display,
        }


@dataclass(frozen=True)
class LNetwork:
    """One L-network solution; ``elements`` run from the radio side to the load."""

    topology: Topology
    f_hz: float
    z0: float
    z_load: complex
    x_ohm: float  # the series reactance at f
    b_s: float  # the shunt susceptance at f
    elements: tuple[Element, ...]

    @property
    def hint(self) -> str:
        kinds = {e.kind for e in self.elements}
        if not self.elements:
            return "the load is already matched: no network needed"
        if kinds == {"L"}:
            what = "inductance only"
        elif kinds == {"C"}:
            what = "capacitance only"
        else:
            series = next(e for e in self.elements if e.position == "series")
            what = (
                "series inductance with shunt capacitance (low-pass)"
                if series.kind == "L"
                else "series capacitance with shunt inductance (high-pass)"
            )
        parts = " then ".join(e.display for e in self.elements)
        return f"{what}: from the radio, {parts}"

    def input_gamma(self) -> complex:
        """Γ seen by the radio at the design frequency (0 for an exact match)."""
        zin = _gamma_through(self, np.array([self.f_hz]), np.array([self.z_load]))
        return complex(zin[0])

    def to_dict(self) -> dict[str, object]:
        return {
            "topology": self.topology,
            "f_hz": self.f_hz,
            "z0_ohm": self.z0,
            "load_r_ohm": self.z_load.real,
            "load_x_ohm": self.z_load.imag,
            "x_ohm": self.x_ohm,
            "b_s": self.b_s,
            "elements": [e.to_dict() for e in self.elements],
            "hint": self.hint,
        }


def _series(x: float, w: float, scale: float) -> tuple[Element, ...]:
    if abs(x) <= _ZERO * scale:
        return ()
    if x > 0:
        return (Element("series", "L", x, None, x / w),)
    return (Element("series", "C", x, None, -1.0 / (w * x)),)


def _shunt(b: float, w: float, scale: float) -> tuple[Element, ...]:
    if abs(b) <= _ZERO / scale:
        return ()
    if b > 0:
        return (Element("shunt", "C", None, b, b / w),)
    return (Element("shunt", "L", None, b, -1.0 / (w * b)),)


def l_networks(z_load: complex, f_hz: float, z0: float = 50.0) -> list[LNetwork]:
    """All L-network matches of ``z_load`` (ohms) at ``f_hz`` to ``z0`` (see module doc).

    Returns one to four solutions (duplicates removed where a square root is zero).
    Raises AnalysisError for a load that no lossless network can match (R ≤ 0, or
    not finite) and ValueError for a bad frequency or z0.
    """
    if not (math.isfinite(f_hz) and f_hz > 0):
        raise ValueError(f"the design frequency must be > 0 Hz, got {f_hz}")
    if not (math.isfinite(z0) and z0 > 0):
        raise ValueError(f"the system impedance must be > 0 Ω, got {z0}")
    zl = complex(z_load)
    if not (math.isfinite(zl.real) and math.isfinite(zl.imag)):
        raise AnalysisError(f"the load impedance {zl} is not finite: an open cannot be matched")
    rl, xl = zl.real, zl.imag
    if rl <= 0:
        raise AnalysisError(
            f"the load has R = {rl:.4g} Ω: a lossless L-network needs R > 0 to match it"
        )
    w = 2.0 * math.pi * f_hz
    out: list[LNetwork] = []
    yl = 1.0 / zl
    gl, bl = yl.real, yl.imag
    # shunt element at the load: make Re(1/Y) = Z0, then cancel the reactance in series
    disc = gl / z0 - gl * gl
    if disc >= -1e-15 * (1.0 / z0) ** 2:
        root = math.sqrt(max(disc, 0.0))
        for bp in _signs(root):
            b = bp - bl
            x = bp * z0 / gl
            out.append(
                LNetwork("shunt_at_load", f_hz, z0, zl, x, b, _series(x, w, z0) + _shunt(b, w, z0))
            )
    # series element at the load: make Re(1/Z) = 1/Z0, then cancel the susceptance across
    disc = rl * (z0 - rl)
    if disc >= -1e-15 * z0 * z0:
        root = math.sqrt(max(disc, 0.0))
        for xp in _signs(root):
            x = xp - xl
            b = xp / (rl * z0)
            out.append(
                LNetwork("series_at_load", f_hz, z0, zl, x, b, _shunt(b, w, z0) + _series(x, w, z0))
            )
    return _dedupe(out)


def _signs(root: float) -> tuple[float, ...]:
    return (root,) if root == 0.0 else (root, -root)


def _dedupe(nets: list[LNetwork]) -> list[LNetwork]:
    seen: set[tuple[tuple[str, str, float], ...]] = set()
    out = []
    for n in nets:
        key = tuple((e.position, e.kind, round(e.value, 18)) for e in n.elements)
        if key not in seen:
            seen.add(key)
            out.append(n)
    return out


def _gamma_through(network: LNetwork, f_hz: np.ndarray, z_load: np.ndarray) -> np.ndarray:
    """Γ (to network.z0) at the radio side of the network, for loads given as Z."""
    zl = np.asarray(z_load, dtype=np.complex128)
    # ABCD with the load as numerator/denominator, so an open (Z = inf) needs no inf
    with np.errstate(invalid="ignore"):
        is_open = np.isinf(zl)
    num = np.where(is_open, 1.0 + 0j, zl)  # V
    den = np.where(is_open, 0.0 + 0j, 1.0 + 0j)  # I
    for e in reversed(network.elements):  # from the load towards the radio
        v = e.impedance(f_hz)
        if e.position == "series":
            num = num + v * den
        else:
            den = den + v * num
    z0 = network.z0
    return (num - z0 * den) / (num + z0 * den)


def matched_sweep(sweep: Sweep, network: LNetwork) -> Sweep:
    """The sweep seen through ``network`` (ideal, frequency-dependent L and C).

    Γ of the result is referred to the network's z0. Needs the sweep's phase.
    """
    if not sweep.has_phase:
        raise AnalysisError("matching needs the phase of Γ; this sweep has SWR only")
    g = sweep.gamma
    # load as V/I = z0·(1+Γ)/(1−Γ) without dividing
    num = sweep.z0 * (1 + g)
    den = 1 - g
    for e in reversed(network.elements):
        v = e.impedance(sweep.freq_hz)
        if e.position == "series":
            num = num + v * den
        else:
            den = den + v * num
    z0 = network.z0
    return sweep.with_gamma((num - z0 * den) / (num + z0 * den), z0=z0)


_PREFIXES = ((1e-12, "p"), (1e-9, "n"), (1e-6, "µ"), (1e-3, "m"), (1.0, ""))


def _engineering(value: float, unit: str, lo: int, hi: int) -> str:
    if not math.isfinite(value) or value <= 0:
        return f"{value:g} {unit}"
    choices = _PREFIXES[lo : hi + 1]
    scale, prefix = choices[0]
    for s, p in choices:
        if value >= s:
            scale, prefix = s, p
    return f"{value / scale:.4g} {prefix}{unit}"


def format_inductance(henries: float) -> str:
    """An inductance in pH, nH or µH (e.g. '38.99 nH')."""
    return _engineering(henries, "H", 0, 2)


def format_capacitance(farads: float) -> str:
    """A capacitance in pF or nF (e.g. '0.9228 pF', '2.2 nF'); µF above 1000 nF."""
    return _engineering(farads, "F", 0, 2)


def load_hint(z_load: complex, f_hz: float) -> str:
    """Plain words about the load: which way its reactance leans."""
    x = complex(z_load).imag
    at = f"at {f_hz / 1e6:.6g} MHz"
    if abs(x) < 1e-9 * max(1.0, abs(z_load)):
        return f"the load is resistive {at}: the network only transforms resistance"
    if x > 0:
        return (
            f"the load is inductive {at} (X = +{x:.3g} Ω): the antenna is electrically "
            "long here; the match needs capacitance to cancel it (or shorten the antenna)"
        )
    return (
        f"the load is capacitive {at} (X = \u2212{-x:.3g} Ω): the antenna is electrically "
        "short here; the match needs inductance to cancel it (or lengthen the antenna)"
    )


def match_summary(sweep: Sweep, at_hz: float, z0: float = 50.0) -> dict[str, Any]:
    """JSON-safe: the networks for the sweep's impedance at ``at_hz`` (Γ interpolated as
    ``metrics.value_at`` does) and each one's SWR≤2 bandwidth over the whole sweep."""
    if not sweep.has_phase:
        raise AnalysisError("matching needs the phase of Γ; this sweep has SWR only")
    p = value_at(sweep, at_hz)
    if p.r_ohm is None or p.x_ohm is None:
        raise AnalysisError(f"no finite impedance at {at_hz / 1e6:.6g} MHz (an open or short)")
    z = complex(p.r_ohm, p.x_ohm)
    nets = []
    for n in l_networks(z, at_hz, z0):
        bw = compute_metrics(matched_sweep(sweep, n), (), thresholds=(2.0,)).swr_bandwidths[0]
        nets.append({**n.to_dict(), "swr_bandwidth_2": bw.to_dict()})
    return {
        "at_hz": float(at_hz),
        "z0_ohm": float(z0),
        "load_r_ohm": z.real,
        "load_x_ohm": z.imag,
        "load_swr": p.swr if p.swr is not None and math.isfinite(p.swr) else None,
        "hint": load_hint(z, at_hz),
        "networks": nets,
    }
