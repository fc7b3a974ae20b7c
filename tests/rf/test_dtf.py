"""Distance to fault: synthetic lines built with scikit-rf, REFERENCES §7 check values."""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
import skrf
from hypothesis import example, given, settings
from hypothesis import strategies as st

from mastwatch.rf.dtf import distance_to_fault
from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.lines import C0, CABLES, CableType
from mastwatch.rf.sweep import Sweep

F401 = np.linspace(1e6, 401e6, 401)


def _open_at(d: float, f: np.ndarray = F401, vf: float = 0.66) -> Sweep:
    return Sweep(f, np.exp(-2j * 2 * np.pi * f / (vf * C0) * d))


def test_reference_check_values_open_at_12_m() -> None:
    # REFERENCES §7 [computed]: 401 points over 1–401 MHz, VF 0.66 → resolution 0.2473 m,
    # range 98.93 m; an open at 12.000 m is found within about one resolution cell.
    r = distance_to_fault(_open_at(12.0), 0.66)
    assert r.resolution_m == pytest.approx(0.2473, abs=5e-5)
    assert r.resolution_m == pytest.approx(0.66 * C0 / (2 * 400e6), rel=1e-12)  # VF·c/(2·span)
    assert r.range_m == pytest.approx(98.93, abs=5e-3)
    assert len(r.peaks) == 1
    assert abs(r.peaks[0].distance_m - 12.0) < r.resolution_m
    # coherent-gain scaling: an open at the end of a lossless line reads |ρ| ≈ 1
    assert r.peaks[0].reflection == pytest.approx(1.0, abs=5e-3)
    assert r.peaks[0].return_loss_db == pytest.approx(0.0, abs=0.05)


@pytest.mark.parametrize("window", ["kaiser", "rect"])
@pytest.mark.parametrize("d0", [0.0, 3.3, 12.07, 61.9])
def test_open_scaling_and_position_for_both_windows(window: str, d0: float) -> None:
    r = distance_to_fault(_open_at(d0), 0.66, window=window, threshold_db=6)
    assert len(r.peaks) == 1
    assert abs(r.peaks[0].distance_m - d0) < 0.1 * r.resolution_m
    assert r.peaks[0].reflection == pytest.approx(1.0, abs=5e-3)


def _skrf_faulty_line(f: np.ndarray, cable_z0: float, alpha: float) -> np.ndarray:
    """23.4 m of VF 0.66 line: a 1.5 m section of 65 Ω from 8.0 m to 9.5 m, 150 Ω load.

    Built with scikit-rf media (independent of mastwatch.rf.lines).
    """
    freq = skrf.Frequency.from_f(f, unit="Hz")
    gamma = alpha + 1j * 2 * np.pi * f / (0.66 * C0)
    main = skrf.media.DefinedGammaZ0(freq, z0_port=50.0, z0=cable_z0, gamma=gamma)
    bump = skrf.media.DefinedGammaZ0(freq, z0_port=50.0, z0=65.0, gamma=gamma)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        net = (main.line(8.0, unit="m") ** bump.line(1.5, unit="m")
               ** main.line(23.4 - 9.5, unit="m") ** main.resistor(150.0) ** main.short())
    return net.s[:, 0, 0]


def test_synthetic_fault_found_within_one_cell() -> None:
    g = _skrf_faulty_line(F401, 50.0, 0.0)
    r = distance_to_fault(Sweep(F401, g), 0.66)
    found = [p.distance_m for p in r.peaks]
    assert len(found) == 3, found
    for want, got in zip((8.0, 9.5, 23.4), found, strict=True):
        assert abs(got - want) < r.resolution_m, (want, got)
    rho_step = 15 / 115  # 50 → 65 Ω: Pozar 4th ed. Γ = (Z − Z0)/(Z + Z0)
    assert r.peaks[0].reflection == pytest.approx(rho_step, rel=0.05)
    # the load 150 Ω on 50 Ω reflects 0.5, seen through two steps (1 − ρ²)² ≈ 0.966
    assert r.peaks[2].reflection == pytest.approx(0.5 * (1 - rho_step**2) ** 2, rel=0.03)


def test_loss_compensation_restores_the_end_reflection() -> None:
    flat = CableType("flat 3 dB/100 m", 50.0, 0.66, k1=0.0, k2=0.0, k0=3.0)
    alpha = float(flat.alpha_np_per_m(np.array([100e6]))[0])
    g = np.exp(-2 * (alpha + 2j * np.pi * F401 / (0.66 * C0)) * 30.0)  # open at 30 m
    sweep = Sweep(F401, g)
    raw = distance_to_fault(sweep, cable=flat, compensate_loss=False)
    comp = distance_to_fault(sweep, cable=flat)
    assert raw.peaks[0].reflection == pytest.approx(np.exp(-2 * alpha * 30.0), rel=5e-3)
    assert comp.peaks[0].reflection == pytest.approx(1.0, abs=5e-3)
    assert comp.loss_compensated and comp.alpha_np_per_m == pytest.approx(alpha)
    assert comp.velocity_factor == 0.66  # from the cable


def test_rg58_lossy_fault_compensated_is_closer_to_the_truth() -> None:
    cable = CABLES["RG-58"]
    alpha_c = float(cable.alpha_np_per_m(np.array([201e6]))[0])
    g = _skrf_faulty_line(F401, 50.0, alpha_c)
    raw = distance_to_fault(Sweep(F401, g), cable=cable, compensate_loss=False)
    comp = distance_to_fault(Sweep(F401, g), cable=cable)
    true_end = 0.5 * (1 - (15 / 115) ** 2) ** 2
    assert abs(comp.peaks[-1].reflection - true_end) < abs(raw.peaks[-1].reflection - true_end)
    assert comp.peaks[-1].reflection == pytest.approx(true_end, rel=0.03)


def test_matches_skrf_impulse_response_rectangular() -> None:
    # scikit-rf 2.2 Network.impulse_response(window=None, pad=…, bandpass=True): same
    # transform; ours is scaled by M/Σw (coherent gain) and not fftshifted.
    g = _skrf_faulty_line(F401, 50.0, 0.0)
    ours = distance_to_fault(Sweep(F401, g), 0.66, window="rect", pad=4)
    m = ours.distance_m.size
    net = skrf.Network(frequency=skrf.Frequency.from_f(F401, unit="Hz"),
                       s=g.reshape(-1, 1, 1), z0=50)
    t, ir = net.impulse_response(window=None, pad=m - F401.size, bandpass=True)
    ir = np.fft.ifftshift(ir) * m / F401.size
    t = np.fft.ifftshift(t)
    np.testing.assert_allclose(ours.reflection, np.abs(ir), rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(ours.distance_m[: m // 2], t[: m // 2] * 0.66 * C0 / 2,
                               rtol=1e-9, atol=1e-12)


def test_kaiser_peaks_agree_with_skrf_kaiser() -> None:
    g = _skrf_faulty_line(F401, 50.0, 0.0)
    ours = distance_to_fault(Sweep(F401, g), 0.66, window="kaiser", beta=6.0, pad=8)
    net = skrf.Network(frequency=skrf.Frequency.from_f(F401, unit="Hz"),
                       s=g.reshape(-1, 1, 1), z0=50)
    t, ir = net.impulse_response(window=("kaiser", 6.0), pad=7 * F401.size, bandpass=True)
    d = t * 0.66 * C0 / 2
    for p in ours.peaks:
        near = np.abs(d - p.distance_m) < ours.resolution_m
        assert abs(d[near][np.argmax(np.abs(ir[near]))] - p.distance_m) < 0.2 * ours.resolution_m


def test_nonuniform_grid_is_resampled_and_said() -> None:
    f = np.sort(np.concatenate([np.linspace(1e6, 401e6, 300), [5.5e6, 77.7e6, 300.3e6]]))
    r = distance_to_fault(_open_at(12.0, f), 0.66)
    assert r.resampled and "resampled" in r.notes[0]
    assert abs(r.peaks[0].distance_m - 12.0) < r.resolution_m


def test_refusals_say_why() -> None:
    with pytest.raises(AnalysisError, match="SWR only"):
        distance_to_fault(Sweep(F401, np.full(401, 0.5 + 0j), has_phase=False), 0.66)
    with pytest.raises(AnalysisError, match="at least 32 frequency points, this sweep has 20"):
        distance_to_fault(_open_at(12.0, np.linspace(1e6, 401e6, 20)), 0.66)
    with pytest.raises(AnalysisError, match=r"spans 0\.35 MHz.*sweep at least 9\.89 MHz wide"):
        distance_to_fault(_open_at(12.0, np.linspace(14.0e6, 14.35e6, 201)), 0.66)
    with pytest.raises(AnalysisError, match="velocity factor"):
        distance_to_fault(_open_at(12.0), 1.3)
    with pytest.raises(AnalysisError, match="needs a velocity factor or a cable"):
        distance_to_fault(_open_at(12.0))
    with pytest.raises(AnalysisError, match="unknown window 'hann'"):
        distance_to_fault(_open_at(12.0), 0.66, window="hann")
    with pytest.raises(AnalysisError, match="pad factor"):
        distance_to_fault(_open_at(12.0), 0.66, pad=0)


def test_to_dict_is_json_safe() -> None:
    cable = CABLES["RG-58"]
    g = _skrf_faulty_line(F401, 50.0, float(cable.alpha_np_per_m(np.array([201e6]))[0]))
    d = distance_to_fault(Sweep(F401, g), cable=cable).to_dict(arrays=True)
    text = json.dumps(d, allow_nan=False)
    back = json.loads(text)
    assert back["resolution_m"] == pytest.approx(0.2473, abs=5e-5)
    assert len(back["peaks"]) == 3 and len(back["distance_m"]) == len(back["reflection"])
    assert back["cable"] == "RG-58" and back["loss_compensated"] is True


def test_decimation_keeps_every_peak() -> None:
    g = _skrf_faulty_line(F401, 50.0, 0.0)
    r = distance_to_fault(Sweep(F401, g), 0.66)
    d, refl = r.decimated(300)
    assert d.size <= 300 and np.all(np.diff(d) > 0)
    for p in r.peaks:
        near = np.abs(d - p.distance_m) < r.resolution_m
        assert np.max(refl[near]) >= 0.99 * p.reflection
    assert len(r.to_dict(arrays=True, max_points=300)["distance_m"]) == d.size
    with pytest.raises(ValueError, match="at least 2"):
        r.decimated(1)


@settings(max_examples=60, deadline=None)
@given(frac=st.floats(0.0, 0.98), rho=st.floats(0.05, 1.0), vf=st.floats(0.6, 0.95))
@example(frac=0.0, rho=0.7641239657521659, vf=0.75)  # a reflection at the reference plane
def test_any_single_reflection_is_placed_and_scaled(frac: float, rho: float, vf: float) -> None:
    f = F401
    d0 = frac * vf * C0 * 400 / (2 * 400e6)  # a fraction of the unambiguous range
    sweep = Sweep(f, rho * np.exp(-2j * 2 * np.pi * f / (vf * C0) * d0))
    r = distance_to_fault(sweep, vf)
    assert len(r.peaks) == 1
    assert abs(r.peaks[0].distance_m - d0) < 0.1 * r.resolution_m
    assert r.peaks[0].reflection == pytest.approx(rho, rel=5e-3)


# -- loss compensation stays physical -------------------------------------------------
# A passive line cannot return more than it was sent: a compensated |ρ| above 1 is a
# sign of a wrong cable model, and compensating noise far beyond the line's end only
# amplifies it (e^(2αd) reaches 10^20 over a 1,601-point HF sweep's 5.6 km range).

F1601 = np.linspace(1.8e6, 30e6, 1601)  # an HF sweep as clubs take them


def _noisy_open_on(cable: CableType, length_m: float, sigma: float, seed: int) -> Sweep:
    """An open at ``length_m`` on ``cable`` (its own α(f) and VF), plus complex noise."""
    f = F1601
    gamma = cable.alpha_np_per_m(f) + 2j * np.pi * f / (cable.velocity_factor * C0)
    rng = np.random.default_rng(seed)
    noise = sigma * (rng.standard_normal(f.size) + 1j * rng.standard_normal(f.size))
    return Sweep(f, np.exp(-2 * gamma * length_m) + noise)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_compensated_open_on_lossy_cable_with_noise_stays_physical(seed: int) -> None:
    cable = CABLES["RG-213"]
    r = distance_to_fault(_noisy_open_on(cable, 12.0, 1e-3, seed), cable=cable)
    assert r.loss_compensated
    assert all(p.reflection <= 1.0 for p in r.peaks), [p.reflection for p in r.peaks]
    assert float(np.max(r.reflection)) <= 1.0
    assert len(r.peaks) == 1, [(p.distance_m, p.reflection) for p in r.peaks]
    assert abs(r.peaks[0].distance_m - 12.0) < r.resolution_m
    # 12 m of RG-213 loses little at HF: the open reads |ρ| ≈ 1 after compensation
    assert r.peaks[0].reflection == pytest.approx(1.0, abs=0.03)
    # the view stops where compensation stops, far short of the 5.6 km range
    assert r.max_distance_m < r.range_m / 4
    # ... and half a resolution cell more, where a reflection at the edge refines to
    assert r.distance_m[-1] <= r.max_distance_m + 0.5 * r.resolution_m


def test_explicit_max_distance_bounds_the_view_and_the_peaks() -> None:
    cable = CABLES["RG-58"]
    sweep = _noisy_open_on(cable, 40.0, 1e-3, 7)
    near = distance_to_fault(sweep, cable=cable, max_distance_m=30.0)
    assert near.max_distance_m == 30.0
    assert all(p.distance_m <= 30.0 + 0.5 * near.resolution_m for p in near.peaks)
    assert not any(abs(p.distance_m - 40.0) < 5 * near.resolution_m for p in near.peaks)
    far = distance_to_fault(sweep, cable=cable, max_distance_m=60.0)
    assert [round(p.distance_m) for p in far.peaks] == [40]
    assert far.to_dict()["max_distance_m"] == 60.0
    with pytest.raises(AnalysisError, match="maximum distance"):
        distance_to_fault(sweep, cable=cable, max_distance_m=-1.0)


def test_overestimated_loss_is_capped_at_one_and_said() -> None:
    # Measured on low-loss hardline, analysed as if it were thin RG-174 (far lossier):
    # compensation would lift the 60 m open well above 1. It is reported as 1, with a note.
    hardline, thin = CABLES["hardline-1/2in"], CABLES["RG-174"]
    sweep = _noisy_open_on(hardline, 60.0, 1e-4, 3)
    r = distance_to_fault(sweep, hardline.velocity_factor, cable=thin)
    assert max(p.reflection for p in r.peaks) == 1.0
    assert any("cannot give" in n and "RG-174" in n for n in r.notes), r.notes


def test_without_compensation_the_whole_range_is_shown() -> None:
    cable = CABLES["RG-213"]
    r = distance_to_fault(_noisy_open_on(cable, 12.0, 1e-3, 1), cable=cable, compensate_loss=False)
    assert r.max_distance_m == pytest.approx(r.range_m, rel=1e-3)
    assert all(p.reflection <= 1.0 for p in r.peaks)


def test_asking_for_the_whole_range_with_compensation_stays_bounded() -> None:
    # A strong reflection at the analyzer leaks into the far end of the circular
    # transform (negative delays); compensating it there must not invent faults.
    cable = CABLES["RG-213"]
    f = F1601
    g = 0.6 + 0.3 * _noisy_open_on(cable, 17.0, 1e-3, 5).gamma  # mismatch at d = 0 too
    r = distance_to_fault(Sweep(f, g), cable=cable, max_distance_m=1e6)
    assert r.max_distance_m == pytest.approx(r.range_m / 2)
    assert [round(p.distance_m) for p in r.peaks] == [0, 17]
    assert any("half the unambiguous range" in n for n in r.notes)
    assert any("held beyond" in n for n in r.notes)


@pytest.mark.parametrize("threshold_db", [0.0, -5.0, float("nan"), float("inf")])
def test_a_threshold_that_is_not_a_return_loss_is_refused(threshold_db: float) -> None:
    with pytest.raises(AnalysisError, match="peak threshold"):
        distance_to_fault(_open_at(12.0), 0.66, cable=CABLES["RG-58"], threshold_db=threshold_db)


def test_an_open_at_the_edge_of_the_view_is_still_listed() -> None:
    cable = CABLES["RG-213"]
    r = distance_to_fault(_noisy_open_on(cable, 12.0, 1e-4, 2), cable=cable, max_distance_m=12.0)
    assert [round(p.distance_m) for p in r.peaks] == [12]


def test_over_unity_without_compensation_is_kept_and_blamed_on_calibration() -> None:
    # |Γ| = 1.2 at the line input: a calibration fault, not the cable's (no compensation).
    cable = CABLES["RG-213"]
    sweep = Sweep(F1601, 1.2 * _noisy_open_on(cable, 12.0, 0.0, 1).gamma)
    for r in (distance_to_fault(sweep, cable=cable, compensate_loss=False),
              distance_to_fault(sweep, 0.66)):
        [peak] = r.peaks
        assert peak.reflection == pytest.approx(1.2 * np.exp(-2 * 12.0 * float(
            cable.alpha_np_per_m(np.array([16e6]))[0])), rel=0.03)
        assert peak.reflection > 1.0
        assert any("calibration" in n for n in r.notes), r.notes
        assert not any("compensation" in n for n in r.notes)


def _antenna_on_line(cable: CableType, length_m: float) -> Sweep:
    """A series-RLC antenna (R 50 Ω, Q 15 at 7.1 MHz) at the end of ``length_m`` of cable:
    its impulse response rings on for tens of metres beyond the line's end."""
    f = F1601
    w0, w = 2 * np.pi * 7.1e6, 2 * np.pi * f
    big_l = 15 * 50.0 / w0
    z = 50.0 + 1j * (w * big_l - w0**2 * big_l / w)  # 1/(ωC) with C = 1/(ω0²L)
    gamma = cable.alpha_np_per_m(f) + 2j * np.pi * f / (cable.velocity_factor * C0)
    return Sweep(f, (z - 50) / (z + 50) * np.exp(-2 * gamma * length_m))


def test_with_the_line_length_the_antennas_ringing_is_not_lifted_into_faults() -> None:
    cable = CABLES["RG-174"]  # lossy: compensation grows fast with distance
    sweep = _antenna_on_line(cable, 12.0)
    raw = distance_to_fault(sweep, cable=cable, compensate_loss=False)
    known = distance_to_fault(sweep, cable=cable, line_length_m=12.0)
    unknown = distance_to_fault(sweep, cable=cable)
    # With the length, compensation stops at the line's end: the same reflections as the
    # raw view, each lifted by the line's whole two-way loss and no more.
    assert [round(p.distance_m) for p in known.peaks] == [round(p.distance_m) for p in raw.peaks]
    gain = float(np.exp(2 * 12.0 * known.alpha_np_per_m))
    for k, r in zip(known.peaks[1:], raw.peaks[1:], strict=True):
        assert k.reflection == pytest.approx(r.reflection * gain, rel=0.02)
    assert known.line_length_m == 12.0 and any("far end" in n for n in known.notes)
    # Without it the growing gain lifts the ringing above the threshold, and a note says so.
    assert len(unknown.peaks) > len(known.peaks)
    assert any("give the line length" in n for n in unknown.notes)
    with pytest.raises(AnalysisError, match="line length"):
        distance_to_fault(sweep, cable=cable, line_length_m=0.0)
