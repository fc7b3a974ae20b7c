"""Golden examples of the Touchstone 2.0 specification (IBIS Open Forum, 2009), with the
values the spec states for them (shared REFERENCES.md §1, tagged [found]).

Cited by heading and page as the spec's sections are unnumbered.
"""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.parse import read_sweep

# TS 2.0, Example 8 (one-port, S-parameters, MA, 50 Ω reference).
EXAMPLE_8 = """! 1-port S-parameter file, single frequency point
# MHz S MA R 50
! freq magS11 angS11
2.000 0.894 -12.136
"""

# TS 2.0, Example 9: version 1 one-port Z-parameters, normalised to R = 75 Ω.
EXAMPLE_9 = """!1-port Z-parameter file, multiple frequency points
# MHz Z MA R 75
!freq magZ11 angZ11
100 0.99 -4
200 0.80 -22
300 0.707 -45
400 0.40 -62
500 0.01 -89
"""

# TS 2.0, Example 10: the same network as a version 2 file; Z in ohms, not normalised.
EXAMPLE_10 = """! 1-port Z-parameter file, multiple frequency points
[Version] 2.0
# MHz Z MA
[Number of Ports] 1
[Number of Frequencies] 5
[Reference] 20.0
[Network Data]
!freq magZ11 angZ11
100 74.25 -4
200 60 -22
300 53.025 -45
400 30 -62
500 0.75 -89
[End]
"""

# The ohm values Example 10 states; Example 9's normalised values × 75 Ω give the same.
Z_MAG = np.array([74.25, 60.0, 53.025, 30.0, 0.75])
Z_DEG = np.array([-4.0, -22.0, -45.0, -62.0, -89.0])
F_HZ = np.array([100e6, 200e6, 300e6, 400e6, 500e6])


def test_example_8_one_port_s_ma() -> None:
    # TS 2.0, Example 8: 2 MHz, |S11| = 0.894 at −12.136°, R 50.
    s = read_sweep(EXAMPLE_8.encode(), "example8.s1p")
    assert s.freq_hz.tolist() == [2e6]
    assert s.z0 == 50.0
    assert s.gamma_mag[0] == pytest.approx(0.894, rel=1e-12)
    assert s.phase_deg[0] == pytest.approx(-12.136, rel=1e-12)
    assert s.source.format == "touchstone-1" and s.source.parameter == "S"


def test_example_9_v1_z_is_normalised_to_r() -> None:
    # TS 2.0, Option Line, p. 7: v1 Z-parameters are normalised to R. The spec states
    # |Z| = 74.25 Ω at 100 MHz for Example 9 (0.99 × 75 Ω).
    s = read_sweep(EXAMPLE_9.encode(), "example9.s1p")
    assert s.z0 == 75.0
    np.testing.assert_array_equal(s.freq_hz, F_HZ)
    assert abs(s.z[0]) == pytest.approx(74.25, rel=1e-12)
    np.testing.assert_allclose(np.abs(s.z), Z_MAG, rtol=1e-12)
    np.testing.assert_allclose(np.angle(s.z, deg=True), Z_DEG, rtol=1e-12)


def test_example_10_v2_z_is_in_ohms() -> None:
    # TS 2.0, Option Line, p. 7: in version 2 files Z is not normalised; [Reference] 20 Ω.
    s = read_sweep(EXAMPLE_10.encode(), "example10.s1p")
    assert s.source.format == "touchstone-2"
    assert s.z0 == 20.0
    np.testing.assert_array_equal(s.freq_hz, F_HZ)
    np.testing.assert_allclose(np.abs(s.z), Z_MAG, rtol=1e-12)
    np.testing.assert_allclose(np.angle(s.z, deg=True), Z_DEG, rtol=1e-12)
    # Γ is relative to the 20 Ω reference: Γ = (Z − 20)/(Z + 20).
    z = Z_MAG * np.exp(1j * np.deg2rad(Z_DEG))
    np.testing.assert_allclose(s.gamma, (z - 20) / (z + 20), rtol=1e-12)


def test_examples_9_and_10_are_the_same_network() -> None:
    # TS 2.0 presents Examples 9 and 10 as one network in the two versions.
    v1 = read_sweep(EXAMPLE_9.encode(), "example9.s1p")
    v2 = read_sweep(EXAMPLE_10.encode(), "example10.s1p")
    np.testing.assert_allclose(v1.z, v2.z, rtol=1e-12)


def test_example_10_count_is_checked() -> None:
    # TS 2.0, [Number of Frequencies]: the count must match the data.
    from mastwatch.rf.errors import SweepFormatError

    bad = EXAMPLE_10.replace("[Number of Frequencies] 5", "[Number of Frequencies] 6")
    with pytest.raises(SweepFormatError) as e:
        read_sweep(bad.encode(), "example10.s1p")
    assert e.value.line == 5
    assert "6" in e.value.message and "5 frequencies" in e.value.message
