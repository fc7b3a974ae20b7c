"""Feedline speed: de-embedding and distance to fault of a 10,001-point sweep vs scikit-rf.

Measured side by side in one run (median of repeats, ``time.perf_counter``):

    deembed  ours  mastwatch.rf.lines.deembed(sweep, Feedline(RG-213, 30 m)) — γ from the
                   cable model included
             skrf  DefinedGammaZ0(frequency, z0, gamma) → line(30, 'm') → line.inv ** measured
                   (same γ array given), and the cascade alone with the line prebuilt
    dtf      ours  mastwatch.rf.dtf.distance_to_fault(sweep, 0.66) — Kaiser β=6, pad 4,
                   peak search and refinement included; the window is cached per
                   (length, β), so a cold run (cache cleared each call) is shown too
             skrf  Network.impulse_response(window=('kaiser', 6), pad=…, bandpass=True) to
                   the same FFT length (no peak search)

Target (issue 3): ours faster than scikit-rf for both (ratio ours/skrf < 1).
"""

from __future__ import annotations

import statistics
import time
import warnings
from collections.abc import Callable

import numpy as np

from mastwatch.rf.dtf import _window, distance_to_fault
from mastwatch.rf.lines import CABLES, Feedline, deembed, embed, propagation_constant
from mastwatch.rf.sweep import Sweep

POINTS = 10_001
REPEATS = 15


def _median_seconds(fn: Callable[[], object], repeats: int = REPEATS) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _measured(line: Feedline) -> Sweep:
    """A dipole-like load seen through the feedline, 1–100 MHz."""
    f = np.linspace(1e6, 100e6, POINTS)
    w, w0 = 2 * np.pi * f, 2 * np.pi * 7.1e6
    z = 60 + 1j * 60 * 12 * (w / w0 - w0 / w)
    return embed(Sweep.from_impedance(f, z, 50.0), line)


def main() -> None:
    import skrf  # test-only oracle

    line = Feedline(CABLES["RG-213"], 30.0)
    sweep = _measured(line)
    freq = skrf.Frequency.from_f(sweep.freq_hz, unit="Hz")
    ntwk = skrf.Network(frequency=freq, s=sweep.gamma.reshape(-1, 1, 1), z0=50)
    gamma = propagation_constant(line.cable, sweep.freq_hz)

    def skrf_deembed_full() -> object:
        media = skrf.media.DefinedGammaZ0(freq, z0_port=50.0, z0=line.cable.z0_ohm, gamma=gamma)
        return media.line(30.0, unit="m").inv ** ntwk

    media = skrf.media.DefinedGammaZ0(freq, z0_port=50.0, z0=line.cable.z0_ohm, gamma=gamma)
    inv = media.line(30.0, unit="m").inv

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ours = deembed(sweep, line).gamma
        ref = skrf_deembed_full().s[:, 0, 0]  # type: ignore[attr-defined]
        assert np.allclose(ours, ref, rtol=1e-9, atol=1e-12), "de-embedding disagrees"
        t_ours = _median_seconds(lambda: deembed(sweep, line))
        t_full = _median_seconds(skrf_deembed_full)
        t_cascade = _median_seconds(lambda: inv ** ntwk)

        res = distance_to_fault(sweep, 0.66)
        m = res.distance_m.size
        t_dtf = _median_seconds(lambda: distance_to_fault(sweep, 0.66))

        def cold() -> object:
            _window.cache_clear()
            return distance_to_fault(sweep, 0.66)

        t_cold = _median_seconds(cold)
        t_ir = _median_seconds(
            lambda: ntwk.impulse_response(window=("kaiser", 6.0), pad=m - POINTS, bandpass=True)
        )

    print(f"points {POINTS}, median of {REPEATS}")
    print(f"deembed  ours {t_ours * 1e3:8.3f} ms   skrf (media+line+inv+cascade) "
          f"{t_full * 1e3:8.3f} ms   ratio ours/skrf {t_ours / t_full:.3f}")
    print(f"         skrf cascade only (line.inv prebuilt) {t_cascade * 1e3:8.3f} ms   "
          f"ratio ours/skrf {t_ours / t_cascade:.3f}")
    print(f"dtf      ours {t_dtf * 1e3:8.3f} ms   skrf impulse_response "
          f"{t_ir * 1e3:8.3f} ms   ratio ours/skrf {t_dtf / t_ir:.3f}   (FFT length {m})")
    print(f"         ours with the window recomputed each call {t_cold * 1e3:8.3f} ms   "
          f"ratio ours/skrf {t_cold / t_ir:.3f}")
    ok = t_ours < t_cascade and t_dtf < t_ir
    print(f"target ours faster than skrf for both: {'met' if ok else 'NOT met'}")


if __name__ == "__main__":
    main()
