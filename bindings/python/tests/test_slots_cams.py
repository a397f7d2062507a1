"""Curved slots and cams through the bindings: an eccentric disc cam as an
arc slot against the offset slider-crank's closed form, a cam's outline
(Cam.outline) as a closed curve slot driving a follower, and the cam
checks' errors."""

import dataclasses
import math

import numpy as np
import pytest

import kinloop as kl

ECC, RADIUS, OFFSET = 12.0, 48.0, 5.0  # invented test dimensions


def follower_model(add_slot):
    m = kl.Model()
    cam = m.add_link("cam")
    follower = m.add_link("follower")
    drive = m.add_revolute(kl.GROUND, (0, 0), cam, (0, 0))
    m.add_prismatic(kl.GROUND, (OFFSET, 0), math.pi / 2, follower, (0, 0))
    add_slot(m, cam, follower)
    m.add_input(drive)
    m.finalize()
    return m


def test_arc_slot_cam_is_an_offset_slider_crank():
    # the offset slider-crank's closed form (crank ECC, rod RADIUS)
    m = follower_model(lambda m, cam, f: m.add_arc_slot(cam, (ECC, 0), RADIUS, f, (0, 0)))
    s = kl.Solver(m)
    s.set_joint_slide(1, math.sqrt(RADIUS ** 2 - (OFFSET - ECC) ** 2))
    s.set_joint_slide(2, RADIUS * math.atan2(1, 0))
    for t in np.linspace(0, 2 * math.pi, 13):
        s.solve_position([t])
        want = ECC * math.sin(t) + math.sqrt(RADIUS ** 2 - (OFFSET - ECC * math.cos(t)) ** 2)
        assert abs(s.joint_slide(1) - want) < 1e-9
    assert m.joint_kind(2) == kl.JointKind.ARC_SLOT
    assert m.slot_radius(2) == RADIUS


def test_outline_as_a_curve_slot():
    with kl.Cam() as c:
        f = kl.cam_follower_init()
        c.set_follower(dataclasses.replace(f, base_radius=40.0, roller_radius=10.0))
        c.set_program([kl.CamSegment(math.pi, 20.0, kl.MotionLawKind.CYCLOIDAL),
                       kl.CamSegment(math.pi, -20.0, kl.MotionLawKind.CYCLOIDAL)])
        pitch, surface = c.outline(720)
        assert pitch.shape == (720, 2)
        # the surface lies a roller radius inside the pitch curve
        assert np.allclose(np.hypot(*(pitch - surface).T), 10.0)
        with pytest.raises(kl.KinloopError) as e:
            c.outline(kl.MAX_STEPS + 1)  # refused before the arrays are made
        assert e.value.status == kl.Status.ETOOLARGE
        m = kl.Model()
        cam = m.add_link("cam")
        follower = m.add_link("follower")
        drive = m.add_revolute(kl.GROUND, (0, 0), cam, (0, 0))
        m.add_prismatic(kl.GROUND, (0, 0), math.pi / 2, follower, (0, 0))
        m.add_curve_slot(cam, pitch, 1, follower, (0, 0))
        m.add_input(drive)
        m.finalize()
        assert m.curve_count(2) == 720 and m.curve_closed(2) == 1
        s = kl.Solver(m)
        s.set_joint_slide(1, 50.0)
        for k in range(8):
            t = 2 * math.pi * k / 8
            s.set_joint_slide(2, 720 * k / 8)
            s.solve_position([t])
            assert abs(s.joint_slide(1) - (50.0 + c.motion(t)[0])) < 1e-6
        report = c.check(360, math.radians(60))
        assert 0 < report.max_pressure < math.radians(60)
        with pytest.raises(kl.KinloopError) as e:
            c.check(360, math.radians(5))
        assert e.value.status == kl.Status.EPRESSURE


def test_bad_curves_raise():
    m = kl.Model()
    a = m.add_link("a")
    with pytest.raises(kl.KinloopError) as e:
        m.add_curve_slot(kl.GROUND, [(0, 0)], 0, a, (0, 0))
    assert e.value.status == kl.Status.EFEWPOINTS
    with pytest.raises(kl.KinloopError) as e:
        m.add_curve_slot(kl.GROUND, [(0, 0), (1, 1), (1, 1)], 0, a, (0, 0))
    assert e.value.status == kl.Status.EREPEATED
    with pytest.raises(kl.KinloopError) as e:
        m.add_arc_slot(kl.GROUND, (0, 0), -1.0, a, (0, 0))
    assert e.value.status == kl.Status.ERADIUS
    assert m.joint_count == 0
