"""Jerk and motion profiles in time through the generated bindings: a
servo rotor driven by a cycloidal rise, its motion against the law's
published values and its torque against Newton's second law; a bad segment
refused with the model unchanged."""

import math

import pytest

import kinloop as kl

# a rotor about (0, 0) indexed a quarter turn in 0.3 s (numbers invented)
J, H, T = 0.02, math.pi / 2, 0.3


def servo_rotor():
    m = kl.Model()
    rotor = m.add_link("rotor")
    pivot = m.add_revolute(kl.GROUND, (0, 0), rotor, (0, 0))
    m.add_input(pivot)
    m.set_link_mass(rotor, 3.0, (0.0, 0.0), J)
    m.add_segment(0, kl.SegmentKind.RISE, kl.MotionLawKind.CYCLOIDAL, T, 0.0, H)
    m.add_segment(0, kl.SegmentKind.DWELL, 0, 0.1, H, H)
    m.finalize()
    return m, rotor


def test_profile_and_jerk_follow_the_cycloidal_law():
    # Source: the cycloidal law's published values: rate 2 h / T at
    # mid-rise, jerk 4 pi^2 h / T^3 at its start (chain rule in x = t / T)
    m, rotor = servo_rotor()
    assert m.profile_duration == pytest.approx(0.4, abs=1e-15)
    s = kl.Solver(m)
    s.solve_at_time(T / 2)
    assert s.link_rate(rotor) == pytest.approx(2 * H / T, rel=1e-12)
    s.solve_at_time(0.0)
    assert s.link_jerk(rotor) == pytest.approx(4 * math.pi ** 2 * H / T ** 3, rel=1e-12)


def test_servo_torque_peak_and_rms():
    # Source: Newton's second law for a rotor, torque = J alpha, with the
    # cycloidal acceleration 2 pi h sin(2 pi x) / T^2
    m, _ = servo_rotor()
    s = kl.Solver(m)
    peaks, times, rms = s.time_efforts(80, [])
    alpha = 2 * math.pi * H / T ** 2
    assert peaks[0] == pytest.approx(J * alpha, rel=1e-9)
    assert times[0] == pytest.approx(T / 4, abs=1e-12)
    assert rms[0] == pytest.approx(J * alpha / math.sqrt(2) * math.sqrt(T / 0.4), rel=1e-9)


def test_a_segment_that_does_not_join_is_refused():
    m = kl.Model()
    rotor = m.add_link("rotor")
    m.add_input(m.add_revolute(kl.GROUND, (0, 0), rotor, (0, 0)))
    m.add_segment(0, kl.SegmentKind.DWELL, 0, 0.1, 0.5, 0.5)
    with pytest.raises(kl.KinloopError) as e:
        m.add_segment(0, kl.SegmentKind.DWELL, 0, 0.1, 0.6, 0.6)
    assert "ended at 0.5" in str(e.value)
    assert m.segment_count == 1
