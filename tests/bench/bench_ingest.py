"""Ingest speed: read a 10,001-point .s1p and compute all metrics, against two references.

Measured side by side in one run (median of repeats, ``time.perf_counter``):

    ours   read_sweep(file bytes) + compute_metrics(sweep, band_plan(1)) (all metrics)
    skrf   scikit-rf reading the same file into a Network (the general-purpose library)
    floor  numpy parsing the same numbers from a clean whitespace-separated buffer
           (the faster of np.loadtxt and np.fromstring; no comments, no checks)

Targets (issue 2): ours/skrf ≤ 0.5 and ours/floor ≤ 3. Two files are timed: one in the
style of an instrument export (MHz, 9 significant digits) and one as our own writer
produces it (Hz, repr precision, 17 significant digits: float parsing dominates).
"""

from __future__ import annotations

import io
import statistics
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

from mastwatch.rf.parse import read_sweep
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone

POINTS = 10_001
REPEATS = 21


def _medians(candidates: dict[str, Callable[[], object]], repeats: int = REPEATS
             ) -> dict[str, float]:
    """Median seconds of each candidate, run round-robin so that load from other processes
    on a shared machine falls on all of them alike."""
    for fn in candidates.values():
        fn()  # warm-up (imports, caches)
    times: dict[str, list[float]] = {name: [] for name in candidates}
    for _ in range(repeats):
        for name, fn in candidates.items():
            t0 = time.perf_counter()
            fn()
            times[name].append(time.perf_counter() - t0)
    return {name: statistics.median(t) for name, t in times.items()}


def _sweep() -> Sweep:
    """A dipole-like series RLC near 7.1 MHz, 1–30 MHz (deterministic, no noise)."""
    f = np.linspace(1e6, 30e6, POINTS)
    w, w0, r, q = 2 * np.pi * f, 2 * np.pi * 7.1e6, 60.0, 12.0
    z = r + 1j * r * q * (w / w0 - w0 / w)
    return Sweep.from_impedance(f, z, 50.0)


def _instrument_style(sweep: Sweep) -> str:
    out = ["! Q0HRS club test sweep (synthetic)", "! 2025-03-14T09:30:00Z", "# MHz S RI R 50"]
    for f, g in zip(sweep.freq_hz.tolist(), sweep.gamma.tolist(), strict=True):
        out.append(f"{f / 1e6:.6f}\t{g.real:.9e}\t{g.imag:.9e}")
    return "\n".join(out) + "\n"


def _floor_buffer(text: str) -> str:
    """The same numbers, whitespace-separated, with no comments or option line."""
    return "\n".join(ln for ln in text.split("\n") if ln and ln[0] not in "!#") + "\n"


def _run(label: str, text: str) -> None:
    import skrf  # test-only oracle

    from mastwatch.rf.bands import band_plan
    from mastwatch.rf.metrics import compute_metrics

    data = text.encode()
    plan = band_plan(1)
    clean = _floor_buffer(text)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.s1p"
        path.write_bytes(data)

        def ours() -> object:
            # from the file, as scikit-rf reads it, so both pay for the read
            return compute_metrics(read_sweep(path.read_bytes(), path.name), plan)

        t = _medians({
            "parse": lambda: read_sweep(data, "bench.s1p"),
            "ours": ours,
            "skrf": lambda: skrf.Network(str(path)),
            "loadtxt": lambda: np.loadtxt(io.StringIO(clean)),
            "fromstring": lambda: np.fromstring(clean, sep=" "),
        })
    parse_only, t_ours, t_skrf = t["parse"], t["ours"], t["skrf"]
    t_loadtxt, t_fromstring = t["loadtxt"], t["fromstring"]
    floor = min(t_loadtxt, t_fromstring)
    print(f"{label}: {POINTS} points, {len(data) / 1e3:.0f} kB")
    print(f"  ours parse only        {parse_only * 1e3:8.2f} ms")
    print(f"  ours parse + metrics   {t_ours * 1e3:8.2f} ms")
    print(f"  scikit-rf Network      {t_skrf * 1e3:8.2f} ms")
    print(f"  floor np.loadtxt       {t_loadtxt * 1e3:8.2f} ms")
    print(f"  floor np.fromstring    {t_fromstring * 1e3:8.2f} ms")
    print(f"  ratio ours/skrf  = {t_ours / t_skrf:5.2f}  (target ≤ 0.5)")
    print(f"  ratio ours/floor = {t_ours / floor:5.2f}  (target ≤ 3)")


def main() -> None:
    sweep = _sweep()
    _run("instrument-style .s1p (MHz, 9 digits)", _instrument_style(sweep))
    _run("writer .s1p (Hz, repr precision)", write_touchstone(sweep, ["bench"]))


if __name__ == "__main__":
    main()
