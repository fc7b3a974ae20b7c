"""Health of an antenna: a sweep compared with its baseline, and a plain verdict.

Pure functions over metrics (``mastwatch.rf.metrics`` BandMetrics / SweepMetrics) and,
where a check needs them, the sweep arrays. Nothing here touches the database: the
records service hands in what it has, this module hands back dataclasses with
``to_dict()``.

    judge(current, baseline, thresholds)          → Verdict (status + reasons in words)
     ├── compare_band(...)        per band of interest: resonance shift, min SWR,
     │                            SWR at centre, SWR≤2 bandwidth, usable fraction,
     │                            return loss across the band
     ├── detect_open_short(...)   |Γ| near 1 over the whole sweep; phase says which
     ├── detect_lossy_feedline    line-input |Γ| lower everywhere by one factor
     ├── detect_new_reflections   distance-to-fault peaks the baseline did not have
     └── assess_noise(...)        erratic points / noise floor of the sweep

Statuses: ``ok`` (nothing beyond the thresholds), ``watch`` (worth a look at the next
visit), ``fault`` (someone should go and check, with the usual cautions), ``unknown``
(no baseline, no usable sweep, or a sweep too noisy to judge). A noisy sweep gives
``unknown`` even when other checks fire: its numbers cannot be trusted, sweep again.

Thresholds are rules of thumb (common practice, see thresholds.py).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date, datetime
from typing import Any, Literal, Protocol

import numpy as np

from mastwatch.rf.sweep import Sweep
from mastwatch.services.thresholds import Thresholds, thresholds_for

Status = Literal["ok", "watch", "fault", "unknown"]
Level = Literal["info", "watch", "fault", "unknown"]
_RANK: dict[str, int] = {"info": 0, "ok": 0, "watch": 1, "fault": 2}
_BY_RANK: tuple[Status, ...] = ("ok", "watch", "fault")

# The usual cautions wherever the product sends someone to go and look (DESIGN.md, Safety).
SAFETY_CAUTIONS: tuple[str, ...] = (
    "Never climb alone, and never in a storm, high wind or lightning: wait until the "
    "weather has passed.",
    "Stay well clear of power lines; treat any fallen wire as live and call the utility.",
    "When transmitting to test an antenna, keep everyone outside the RF exposure limits "
    "and follow your licence's rules.",
    "Keep lightning protection and grounding in place; do not disconnect feedlines while "
    "a storm is near.",
    "Follow local codes and licensed practice; when in doubt, ask a qualified person.",
)

# A band is compared only where the sweep covers at least this share of it.
MIN_BAND_COVERAGE = 0.5
# A resonance that left the band is still matched within this share of the band centre.
RESONANCE_SEARCH = 0.15


class BandMetricsLike(Protocol):
    """The fields of ``mastwatch.rf.metrics.BandMetrics`` that the comparison reads."""

    band: str
    low_hz: float
    high_hz: float
    coverage: float
    min_swr: float | None
    swr_center: float | None
    usable_fraction_2: float | None
    resonance_hz: float | None
    bandwidth_2_hz: float | None
    return_loss_center_db: float | None


class SweepMetricsLike(Protocol):
    @property
    def bands(self) -> Sequence[Any]: ...


# -- results ----------------------------------------------------------------------------


@dataclass(frozen=True)
class Finding:
    """One observation in plain words; ``level`` says how much it weighs."""

    level: Level
    code: str
    text: str
    band: str | None = None

    def to_dict(self) -> dict[str, Any]:
        return {"level": self.level, "code": self.code, "text": self.text, "band": self.band}


def _num(x: float | None) -> float | None:
    """JSON-safe number: None for missing or infinite."""
    if x is None or not math.isfinite(x):
        return None
    return float(x)


@dataclass(frozen=True)
class BandComparison:
    """One band of the current sweep against the same band of the baseline."""

    band: str
    center_hz: float
    resonance_hz: float | None
    baseline_resonance_hz: float | None
    resonance_shift_hz: float | None
    resonance_shift_pct: float | None
    min_swr: float | None
    baseline_min_swr: float | None
    swr_center: float | None
    baseline_swr_center: float | None
    bandwidth_2_hz: float | None
    baseline_bandwidth_2_hz: float | None
    usable_fraction_2: float | None
    baseline_usable_fraction_2: float | None
    return_loss_band_db: float | None
    baseline_return_loss_band_db: float | None
    status: Status
    findings: tuple[Finding, ...] = ()

    @property
    def min_swr_change(self) -> float | None:
        return _diff(self.min_swr, self.baseline_min_swr)

    @property
    def swr_center_change(self) -> float | None:
        return _diff(self.swr_center, self.baseline_swr_center)

    @property
    def bandwidth_2_change_hz(self) -> float | None:
        return _diff(self.bandwidth_2_hz, self.baseline_bandwidth_2_hz)

    @property
    def usable_fraction_2_change(self) -> float | None:
        return _diff(self.usable_fraction_2, self.baseline_usable_fraction_2)

    @property
    def return_loss_band_change_db(self) -> float | None:
        return _diff(self.return_loss_band_db, self.baseline_return_loss_band_db)

    def to_dict(self) -> dict[str, Any]:
        out: dict[str, Any] = {"band": self.band, "status": self.status}
        for name in (
            "center_hz",
            "resonance_hz",
            "baseline_resonance_hz",
            "resonance_shift_hz",
            "resonance_shift_pct",
            "min_swr",
            "baseline_min_swr",
            "min_swr_change",
            "swr_center",
            "baseline_swr_center",
            "swr_center_change",
            "bandwidth_2_hz",
            "baseline_bandwidth_2_hz",
            "bandwidth_2_change_hz",
            "usable_fraction_2",
            "baseline_usable_fraction_2",
            "usable_fraction_2_change",
            "return_loss_band_db",
            "baseline_return_loss_band_db",
            "return_loss_band_change_db",
        ):
            out[name] = _num(getattr(self, name))
        out["findings"] = [f.to_dict() for f in self.findings]
        return out


def _diff(a: float | None, b: float | None) -> float | None:
    if a is None or b is None or not (math.isfinite(a) and math.isfinite(b)):
        return None
    return a - b


@dataclass(frozen=True)
class NoiseAssessment:
    """How erratic a sweep is: noise of Γ from robust second differences, spikes."""

    sigma: float
    erratic_points: int
    erratic_fraction: float
    finding: Finding | None

    def to_dict(self) -> dict[str, Any]:
        return {
            "sigma": self.sigma,
            "erratic_points": self.erratic_points,
            "erratic_fraction": self.erratic_fraction,
            "finding": self.finding.to_dict() if self.finding else None,
        }


@dataclass(frozen=True)
class Verdict:
    """The answer for one sweep: status, reasons in words, and the numbers behind them."""

    status: Status
    findings: tuple[Finding, ...]
    bands: tuple[BandComparison, ...] = ()
    baseline_date: str | None = None

    @property
    def reasons(self) -> list[str]:
        """The reasons a person reads, most serious first."""
        order = {"fault": 0, "unknown": 1, "watch": 2, "info": 3}
        return [f.text for f in sorted(self.findings, key=lambda f: order[f.level])]

    def to_dict(self) -> dict[str, Any]:
        return {
            "status": self.status,
            "reasons": self.reasons,
            "findings": [f.to_dict() for f in self.findings],
            "bands": [b.to_dict() for b in self.bands],
            "baseline_date": self.baseline_date,
        }


@dataclass(frozen=True)
class SweepView:
    """What the judge may know about one sweep.

    ``metrics`` are computed at the feedpoint where the antenna has a feedline (as the
    records service stores them). ``measured`` is the sweep as taken, at ``plane``;
    ``feedpoint`` the same moved to the feedpoint (None when unknown). Arrays are optional:
    without them only the metric comparisons run.
    """

    metrics: Any  # SweepMetrics
    taken_at: date | datetime | None = None
    measured: Sweep | None = None
    plane: Literal["feedpoint", "line_input"] = "feedpoint"
    feedpoint: Sweep | None = None
    label: str | None = None  # how reasons name it; default "the baseline of <date>"

    @property
    def phrase(self) -> str:
        return self.label or baseline_phrase(self.taken_at)

    @property
    def feedpoint_view(self) -> Sweep | None:
        if self.feedpoint is not None:
            return self.feedpoint
        return self.measured if self.plane == "feedpoint" else None


# -- wording ----------------------------------------------------------------------------


def format_hz(hz: float) -> str:
    """A frequency or a frequency change in words: 850 Hz, 180 kHz, 7.10 MHz."""
    a = abs(hz)
    if a < 1e3:
        return f"{a:.0f} Hz"
    if a < 1e6:
        return f"{a / 1e3:.3g} kHz"
    return f"{a / 1e6:.3f} MHz" if a < 1e8 else f"{a / 1e6:.1f} MHz"


def format_swr(swr: float | None) -> str:
    if swr is None:
        return "unknown"
    if not math.isfinite(swr):
        return "off the scale (|Γ| ≥ 1)"
    return f"{swr:.1f}" if swr < 99.5 else "over 99"


def baseline_phrase(when: date | datetime | None) -> str:
    if when is None:
        return "the baseline"
    day = when.date() if isinstance(when, datetime) else when
    return f"the baseline of {day.isoformat()}"


# -- per band ---------------------------------------------------------------------------


def band_return_loss_db(sweep: Sweep, low_hz: float, high_hz: float) -> float | None:
    """Return loss across a band, from the mean |Γ| over the band's points (dB).

    Falls back to |Γ| interpolated at the band centre when no point lies in the band;
    None when the band is outside the sweep.
    """
    f = sweep.freq_hz
    if high_hz < f[0] or low_hz > f[-1]:
        return None
    inside = (f >= low_hz) & (f <= high_hz)
    mags = sweep.gamma_mag
    mean = (
        float(np.mean(mags[inside]))
        if np.any(inside)
        else float(np.interp(0.5 * (low_hz + high_hz), f, mags))
    )
    return math.inf if mean <= 0 else -20.0 * math.log10(min(mean, 1.0)) + 0.0


def _swr_value(bm: Any, name: str) -> float | None:
    """A band's SWR field; None from the metrics means infinite where the band is covered."""
    v = getattr(bm, name, None)
    if v is None and (getattr(bm, "coverage", 0.0) or 0.0) >= MIN_BAND_COVERAGE:
        return math.inf
    return None if v is None else float(v)


def _opt(bm: Any, name: str) -> float | None:
    v = getattr(bm, name, None)
    return None if v is None else float(v)


def compare_band(
    current: BandMetricsLike,
    baseline: BandMetricsLike,
    thresholds: Thresholds,
    *,
    since: str = "the baseline",
    current_sweep: Sweep | None = None,
    baseline_sweep: Sweep | None = None,
    current_resonances: Sequence[tuple[float, str | None]] = (),
    has_phase: bool = True,
) -> BandComparison:
    """Compare one band of a sweep with the same band of the baseline.

    ``current_sweep``/``baseline_sweep`` (at the plane of the metrics) add the return loss
    across the band; without them it is left out. ``current_resonances`` (hz, kind) are
    all the current sweep's resonances: a detuned antenna's resonance may have left the
    band, and is then looked up there (same kind, within RESONANCE_SEARCH of the centre).
    """
    t = thresholds
    name = current.band
    center = 0.5 * (current.low_hz + current.high_hz)
    findings: list[Finding] = []

    def add(level: Level, code: str, text: str) -> None:
        findings.append(Finding(level, code, f"{name}: {text}", name))

    covered = min(current.coverage or 0.0, baseline.coverage or 0.0) >= MIN_BAND_COVERAGE
    res, res0 = _opt(current, "resonance_hz"), _opt(baseline, "resonance_hz")
    if res is None and res0 is not None:
        kind0 = getattr(baseline, "resonance_kind", None)
        near = [
            hz
            for hz, kind in current_resonances
            if (kind0 is None or kind in (None, kind0))
            and abs(hz - center) <= RESONANCE_SEARCH * center
        ]
        if near:
            res = min(near, key=lambda hz: abs(hz - res0))
    mn, mn0 = _swr_value(current, "min_swr"), _swr_value(baseline, "min_swr")
    sc, sc0 = _swr_value(current, "swr_center"), _swr_value(baseline, "swr_center")
    bw, bw0 = _opt(current, "bandwidth_2_hz"), _opt(baseline, "bandwidth_2_hz")
    uf, uf0 = _opt(current, "usable_fraction_2"), _opt(baseline, "usable_fraction_2")
    rl = rl0 = None
    if current_sweep is not None and baseline_sweep is not None:
        rl = band_return_loss_db(current_sweep, current.low_hz, current.high_hz)
        rl0 = band_return_loss_db(baseline_sweep, baseline.low_hz, baseline.high_hz)

    shift = pct = None
    if not covered:
        add(
            "info",
            "band_not_covered",
            "not compared: the sweep or the baseline covers less than half of the band",
        )
    else:
        # Resonance shift, as a share of the band centre (needs the phase of both sweeps).
        if not has_phase:
            add("info", "resonance_shift", "resonance not compared: a sweep has SWR only")
        elif res is not None and res0 is not None:
            shift = res - res0
            pct = 100.0 * shift / center
            level: Level | None = None
            if abs(pct) > t.resonance_shift_fault_pct:
                level = "fault"
            elif abs(pct) > t.resonance_shift_watch_pct:
                level = "watch"
            if level:
                add(
                    level,
                    "resonance_shift",
                    f"resonance moved {format_hz(shift)} {'up' if shift > 0 else 'down'} "
                    f"since {since} ({abs(pct):.1f} % of band centre)",
                )
        elif res is None and res0 is not None:
            add(
                "watch",
                "resonance_lost",
                f"no resonance found any more, was at {format_hz(res0)} in {since}",
            )

        # SWR at band centre: crossing a level since the baseline, or a rise.
        if sc is not None and sc0 is not None:
            text = f"SWR at band centre {format_swr(sc)}, was {format_swr(sc0)}"
            if sc > t.swr_center_fault >= sc0:
                add("fault", "swr_center", text)
            elif sc > t.swr_center_watch >= sc0 or sc - sc0 > t.swr_center_rise_watch:
                add("watch", "swr_center", text)

        if mn is not None and mn0 is not None and mn - mn0 > t.min_swr_rise_watch:
            add("watch", "min_swr", f"min SWR {format_swr(mn)}, was {format_swr(mn0)}")

        same_coverage = abs((current.coverage or 0.0) - (baseline.coverage or 0.0)) <= 0.05
        if uf is not None and uf0 is not None and not same_coverage:
            add(
                "info",
                "usable_fraction",
                "usable share not compared: the two sweeps cover different parts of the band",
            )
        elif uf is not None and uf0 is not None:
            drop = uf0 - uf
            text = f"usable at SWR ≤ 2 over {100 * uf:.0f} % of the band, was {100 * uf0:.0f} %"
            if drop > t.usable_drop_fault:
                add("fault", "usable_fraction", text)
            elif drop > t.usable_drop_watch:
                add("watch", "usable_fraction", text)

        if bw is not None and bw0 is not None and bw0 > 0:
            if 100.0 * (bw0 - bw) / bw0 > t.bandwidth_drop_watch_pct:
                add(
                    "watch",
                    "bandwidth_2",
                    f"SWR ≤ 2 bandwidth {format_hz(bw)}, was {format_hz(bw0)}",
                )
        elif bw is None and bw0 is not None and bw0 > 0:
            add("watch", "bandwidth_2", f"no SWR ≤ 2 span any more, was {format_hz(bw0)}")

        # Return loss across the band: worse by some dB and now below the SWR-2 level.
        rl_swr2 = -20.0 * math.log10(1.0 / 3.0)  # |Γ| = 1/3 at SWR 2
        if (
            rl is not None
            and rl0 is not None
            and math.isfinite(rl0)
            and rl0 - rl > t.return_loss_drop_watch_db
            and rl < rl_swr2
        ):
            add(
                "watch", "return_loss", f"return loss across the band {rl:.1f} dB, was {rl0:.1f} dB"
            )

    status = _worst(findings)
    return BandComparison(
        band=name,
        center_hz=center,
        resonance_hz=res,
        baseline_resonance_hz=res0,
        resonance_shift_hz=shift,
        resonance_shift_pct=pct,
        min_swr=mn,
        baseline_min_swr=mn0,
        swr_center=sc,
        baseline_swr_center=sc0,
        bandwidth_2_hz=bw,
        baseline_bandwidth_2_hz=bw0,
        usable_fraction_2=uf,
        baseline_usable_fraction_2=uf0,
        return_loss_band_db=rl,
        baseline_return_loss_band_db=rl0,
        status=status,
        findings=tuple(findings),
    )


def _worst(findings: Sequence[Finding]) -> Status:
    rank = max((_RANK.get(f.level, 0) for f in findings), default=0)
    return _BY_RANK[rank]


# -- whole-sweep signatures ---------------------------------------------------------------


@dataclass(frozen=True)
class OpenShort:
    """|Γ| near 1 over the whole sweep: an open or a short, and how far along the line."""

    kind: Literal["open", "short", "open or short"]
    min_mag: float
    intercept_deg: float | None
    delay_s: float | None

    def distance_m(self, velocity_factor: float) -> float | None:
        if self.delay_s is None:
            return None
        return self.delay_s * velocity_factor * 299_792_458.0 / 2.0


def open_short_signature(
    sweep: Sweep, min_mag: float, phase_sweep: Sweep | None = None
) -> OpenShort | None:
    """An open or short circuit, or None.

    |Γ| ≥ ``min_mag`` at every point of ``sweep`` (best the feedpoint view, where the
    line's loss is taken out). Which of the two, and where, from the phase of
    ``phase_sweep`` (the sweep as measured; default ``sweep``): at the fault Γ is +1
    (open, 0°) or −1 (short, 180°); seen through a line the phase turns by −2βl,
    linearly in frequency. So the unwrapped phase is fitted by a straight line
    φ(f) = φ0 − 2π·f·τ: φ0 (the value extrapolated to 0 Hz) is the phase at the fault,
    τ the round-trip delay to it (distance = τ·VF·c/2). At the fault's own plane τ ≈ 0
    and φ0 is simply the phase; seen from beyond it (a break mid-line viewed from the
    de-embedded feedpoint) τ is negative. Skin-effect loss adds a √f phase term that
    moves φ0 by a few degrees, far less than the 90° that separates the two answers.
    """
    mags = sweep.gamma_mag
    mn = float(np.min(mags))
    if mn < min_mag:
        return None
    ps = phase_sweep if phase_sweep is not None else sweep
    if not ps.has_phase:
        return OpenShort("open or short", mn, None, None)
    f = ps.freq_hz
    phase = np.unwrap(np.angle(ps.gamma))
    if f.size >= 3:
        fc, scale = float(np.mean(f)), float(np.ptp(f)) or 1.0
        slope, at_fc = np.polyfit((f - fc) / scale, phase, 1)
        delay = -float(slope) / scale / (2 * math.pi)
        phi0 = float(at_fc) + 2 * math.pi * delay * fc
    else:
        delay, phi0 = 0.0, float(np.mean(phase))
    phi0_deg = math.degrees(math.atan2(math.sin(phi0), math.cos(phi0)))
    kind: Literal["open", "short"] = "open" if abs(phi0_deg) < 90.0 else "short"
    return OpenShort(kind, mn, phi0_deg, delay)


def detect_open_short(
    sweep: Sweep,
    thresholds: Thresholds,
    *,
    baseline: Sweep | None = None,
    phase_sweep: Sweep | None = None,
    velocity_factor: float | None = None,
) -> Finding | None:
    """Fault finding for an open/short, unless the baseline already looked the same.

    ``phase_sweep`` is the sweep as measured at the line input (it places the fault
    along the line when ``velocity_factor`` is known); see :func:`open_short_signature`.
    """
    sig = open_short_signature(sweep, thresholds.open_short_min_mag, phase_sweep)
    if sig is None:
        return None
    if baseline is not None and float(np.min(baseline.gamma_mag)) >= thresholds.open_short_min_mag:
        return None  # the baseline never showed a match either: nothing new
    where = ""
    if velocity_factor and sig.delay_s and sig.delay_s > 0:
        d = sig.distance_m(velocity_factor)
        if d is not None and d >= 0.5:
            where = f" about {d:.1f} m from the measuring point (velocity factor {velocity_factor})"
    if sig.kind == "open or short":
        what = "open or short circuit (no phase in this file to tell which)"
    else:
        what = f"{'open' if sig.kind == 'open' else 'short'} circuit"
    return Finding(
        "fault",
        sig.kind.replace(" ", "_"),
        f"{what}{where}: |Γ| is at least {sig.min_mag:.2f} across the whole sweep",
    )


def estimate_extra_line_loss_db(current: Sweep, baseline: Sweep) -> tuple[float, float] | None:
    """Extra one-way feedline loss (dB) seen between two sweeps at the same plane.

    A lossier line multiplies |Γ| at its input by one factor e^{−2·Δα·l} at every
    frequency (more strongly as f rises, but smoothly). Taken where the baseline is
    mismatched (|Γ| above its median: there the line dominates and noise matters least),
    the median of 20·log10(|Γ_now|/|Γ_base|) is the extra two-way loss. Returns
    (extra one-way loss in dB, share of those points where |Γ| fell) or None when the
    sweeps hardly overlap.
    """
    lo = max(current.f_start_hz, baseline.f_start_hz)
    hi = min(current.f_stop_hz, baseline.f_stop_hz)
    f = current.freq_hz
    sel = (f >= lo) & (f <= hi)
    if hi <= lo or int(np.count_nonzero(sel)) < 8:
        return None
    g_now = current.gamma_mag[sel]
    g_base = np.interp(f[sel], baseline.freq_hz, baseline.gamma_mag)
    high = g_base >= np.median(g_base)
    with np.errstate(divide="ignore"):
        ratio_db = 20.0 * np.log10(np.maximum(g_now[high], 1e-9) / np.maximum(g_base[high], 1e-9))
    extra_two_way = -float(np.median(ratio_db))
    fell = float(np.mean(ratio_db < 0))
    return extra_two_way / 2.0, fell


def detect_lossy_feedline(
    current: Sweep,
    baseline: Sweep,
    thresholds: Thresholds,
    *,
    since: str = "the baseline",
) -> Finding | None:
    """Finding for a feedline that got lossier (water in the coax), or None.

    Both sweeps must see through the line (line-input sweeps, or both moved to the
    feedpoint with the same nominal line model: the extra-loss factor is the same at
    either plane). The sign: return loss at the line input *improved* nearly everywhere
    (≥ 90 % of the mismatched points), which a detuned antenna never does (it gets
    worse on one side of its old resonance), while the feedpoint view flattens.
    """
    est = estimate_extra_line_loss_db(current, baseline)
    if est is None:
        return None
    extra, fell = est
    if fell < 0.9 or extra < thresholds.lossy_line_watch_db:
        return None
    level: Level = "fault" if extra >= thresholds.lossy_line_fault_db else "watch"
    return Finding(
        level,
        "lossy_feedline",
        f"feedline looks lossier: return loss at the line input improved across the sweep "
        f"since {since} while the antenna's own match looks flatter; "
        f"about {extra:.1f} dB extra loss each way — the usual sign of water in the coax",
    )


@dataclass(frozen=True)
class DtfTrace:
    """A distance-to-fault view reduced to what the comparison needs."""

    distance_m: np.ndarray
    level_db: np.ndarray  # 20·log10 of the time-domain reflection magnitude
    resolution_m: float

    @classmethod
    def from_result(cls, result: Any) -> DtfTrace:
        """From ``mastwatch.rf.dtf.DtfResult`` (``distance_m``, linear ``reflection``)."""
        d = np.asarray(result.distance_m, dtype=float)
        with np.errstate(divide="ignore"):
            level = 20 * np.log10(np.maximum(np.asarray(result.reflection, float), 1e-12))
        return cls(d, level, float(result.resolution_m))


def _clip(trace: DtfTrace, max_m: float) -> DtfTrace:
    keep = trace.distance_m <= max_m
    return DtfTrace(trace.distance_m[keep], trace.level_db[keep], trace.resolution_m)


def detect_new_reflections(
    current: DtfTrace,
    baseline: DtfTrace,
    thresholds: Thresholds,
    *,
    max_distance_m: float | None = None,
    since: str = "the baseline",
) -> list[Finding]:
    """Reflections in the current DTF view where the baseline had none.

    Peaks of the current trace (≥ ``new_reflection_min_db``, standing out by 3 dB) are
    matched to the baseline's peaks within one resolution cell; an unmatched peak that
    rises ``new_reflection_rise_db`` above the baseline's level at that distance is new.
    The first cell (the measuring connector) and anything past ``max_distance_m`` (the
    antenna's own ringing beyond the line's end) are ignored.
    """
    from scipy.signal import find_peaks

    cell = max(current.resolution_m, baseline.resolution_m)
    if max_distance_m is not None:  # look no further than the line (and keep it cheap)
        current = _clip(current, max_distance_m + 2 * cell)
        baseline = _clip(baseline, max_distance_m + 2 * cell)
    peaks, _ = find_peaks(current.level_db, height=thresholds.new_reflection_min_db, prominence=3.0)
    base_peaks, _ = find_peaks(
        baseline.level_db, height=thresholds.new_reflection_min_db - 10, prominence=3.0
    )
    base_at = baseline.distance_m[base_peaks]
    found: list[Finding] = []
    for i in peaks:
        d = float(current.distance_m[i])
        if d < cell or (max_distance_m is not None and d > max_distance_m):
            continue
        if base_at.size and float(np.min(np.abs(base_at - d))) <= cell:
            continue
        near = np.abs(baseline.distance_m - d) <= cell / 2
        base_level = (
            float(np.max(baseline.level_db[near]))
            if np.any(near)
            else float(np.interp(d, baseline.distance_m, baseline.level_db))
        )
        level_db = float(current.level_db[i])
        if level_db - base_level < thresholds.new_reflection_rise_db:
            continue
        found.append(
            Finding(
                "watch",
                "new_reflection",
                f"new reflection about {d:.1f} m along the line ({level_db:.0f} dB), none there "
                f"in {since}: a connector or a damaged cable?",
            )
        )
    return found


def assess_noise(sweep: Sweep, thresholds: Thresholds) -> NoiseAssessment:
    """Noise floor and erratic points of a sweep, from robust second differences of Γ.

    A smooth response has small second differences d2 = Γ[i+1] − 2Γ[i] + Γ[i−1]; white
    noise of σ per component gives |d2| Rayleigh with median 1.1774·√6·σ, so
    σ ≈ median|d2| / 2.884. A point is erratic where |d2| is a local maximum above
    max(8 × median|d2|, 4 × noise_sigma_max) (a spike of size e gives |d2| = 2e there).
    A sweep whose σ or share of erratic points passes the thresholds cannot be judged.
    Known limit: a very high-Q resonance crossed in two or three points looks erratic.
    """
    g = sweep.gamma if sweep.has_phase else sweep.gamma_mag.astype(complex)
    n = g.size
    if n < 5:
        return NoiseAssessment(0.0, 0, 0.0, None)
    d2 = np.abs(g[2:] - 2 * g[1:-1] + g[:-2])
    med = float(np.median(d2))
    sigma = med / (1.1774 * math.sqrt(6.0)) if sweep.has_phase else med / (0.6745 * math.sqrt(6))
    limit = max(8.0 * med, 4.0 * thresholds.noise_sigma_max)
    padded = np.concatenate(([0.0], d2, [0.0]))
    local_max = (padded[1:-1] >= padded[:-2]) & (padded[1:-1] >= padded[2:])
    erratic = int(np.count_nonzero((d2 > limit) & local_max))
    frac = erratic / n
    finding = None
    if sigma > thresholds.noise_sigma_max or frac > thresholds.erratic_fraction_max:
        finding = Finding(
            "unknown",
            "noisy_sweep",
            f"sweep looks noisy or failed ({erratic} of {n} points erratic, noise of Γ about "
            f"{sigma:.3f}): measure again — check the connectors and nearby transmitters",
        )
    return NoiseAssessment(sigma, erratic, frac, finding)


# -- the verdict --------------------------------------------------------------------------


def _band_map(metrics: Any) -> dict[str, Any]:
    return {b.band: b for b in getattr(metrics, "bands", ())}


def resonance_list(metrics: Any) -> list[tuple[float, str | None]]:
    """(hz, kind) of every resonance in SweepMetrics (objects) or its to_dict() form."""
    out: list[tuple[float, str | None]] = []
    for r in getattr(metrics, "resonances", None) or ():
        hz = r.get("hz") if isinstance(r, dict) else getattr(r, "hz", None)
        kind = r.get("kind") if isinstance(r, dict) else getattr(r, "kind", None)
        if hz is not None:
            out.append((float(hz), kind))
    return out


def judge(
    current: SweepView | None,
    baseline: SweepView | None,
    thresholds: dict[str, Any] | None = None,
    *,
    bands: Sequence[str] | None = None,
    velocity_factor: float | None = None,
    line_length_m: float | None = None,
    dtf: tuple[DtfTrace, DtfTrace] | None = None,
    drift_reasons: Sequence[str] = (),
) -> Verdict:
    """The verdict for ``current`` against ``baseline``.

    ``thresholds`` is the antenna's thresholds document (see thresholds.py); ``bands``
    restricts the comparison to the antenna's bands of interest (default: every band in
    both metrics). ``velocity_factor``/``line_length_m`` describe the feedline where it
    is known; ``dtf`` is (current, baseline) distance-to-fault traces when available.
    ``drift_reasons`` come from the trend change detection and weigh as ``watch``.
    """
    if current is None:
        return Verdict("unknown", (Finding("unknown", "no_sweep", "no sweep yet"),))
    t_all = thresholds_for(thresholds)
    findings: list[Finding] = []

    noise = assess_noise(current.measured, t_all) if current.measured is not None else None
    if noise is not None and noise.finding is not None:
        findings.append(noise.finding)

    fp, fp0 = current.feedpoint_view, baseline.feedpoint_view if baseline else None
    view = fp if fp is not None else current.measured
    base_view = fp0 if fp0 is not None else (baseline.measured if baseline else None)
    if view is not None:
        line_view = current.measured if current.plane == "line_input" else None
        os_finding = detect_open_short(
            view,
            t_all,
            baseline=base_view,
            phase_sweep=line_view,
            velocity_factor=velocity_factor if line_view is not None else None,
        )
        if os_finding is not None:
            findings.append(os_finding)

    if baseline is None:
        findings.append(
            Finding(
                "unknown",
                "no_baseline",
                "no baseline set yet: confirm a good sweep as the baseline",
            )
        )
        worst = max((_RANK.get(f.level, 0) for f in findings), default=0)
        status: Status = "fault" if worst == 2 else "unknown"
        return Verdict(status, tuple(findings))

    when0 = baseline.taken_at
    since = baseline.phrase
    # Feedline got lossier: the current sweep must look through the line.
    if current.plane == "line_input":
        pair: tuple[Sweep | None, Sweep | None] = (None, None)
        if fp is not None and fp0 is not None:
            pair = (fp, fp0)
        elif baseline.plane == "line_input":
            pair = (current.measured, baseline.measured)
        if pair[0] is not None and pair[1] is not None:
            lossy = detect_lossy_feedline(pair[0], pair[1], t_all, since=since)
            if lossy is not None:
                findings.append(lossy)

    if dtf is not None:
        max_d = line_length_m - dtf[0].resolution_m if line_length_m else None
        findings.extend(
            detect_new_reflections(dtf[0], dtf[1], t_all, max_distance_m=max_d, since=since)
        )

    cur_bands, base_bands = _band_map(current.metrics), _band_map(baseline.metrics)
    names = [
        b for b in (bands if bands is not None else cur_bands) if b in cur_bands and b in base_bands
    ]
    comparisons = []
    for name in names:
        comp = compare_band(
            cur_bands[name],
            base_bands[name],
            thresholds_for(thresholds, name),
            since=since,
            current_sweep=fp,
            baseline_sweep=fp0,
            current_resonances=resonance_list(current.metrics),
            has_phase=all(v.measured is None or v.measured.has_phase for v in (current, baseline)),
        )
        comparisons.append(comp)
        findings.extend(f for f in comp.findings if f.level != "info")

    findings.extend(Finding("watch", "drift", text) for text in drift_reasons)

    status = "unknown" if noise is not None and noise.finding is not None else _worst(findings)
    if status == "ok":
        findings.append(
            Finding(
                "info",
                "no_change",
                f"no change beyond the thresholds since {since}",
            )
        )
    return Verdict(
        status,
        tuple(findings),
        tuple(comparisons),
        when0.date().isoformat()
        if isinstance(when0, datetime)
        else (when0.isoformat() if when0 else None),
    )


def judge_sweep(session: Any, row: Any, band_rows: list[dict[str, Any]] | None = None) -> None:
    """The records service's post-ingest hook (services/ingest.py looks for this name).

    Kept here so the hook is found where the verdict lives; the database work is in
    services/health_records.py (imported lazily: this module stays pure). ``band_rows``:
    the sweep's metrics rows as the upload just inserted them (None: read them back).
    """
    from mastwatch.services.health_records import judge_sweep as judge_on_records

    judge_on_records(session, row, band_rows)
