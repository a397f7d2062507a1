"""Position and velocity through the bindings against closed forms:
Freudenstein's equation, the four-bar rate formulas, the offset
slider-crank, and a pin running in a slot (law of cosines)."""

import math

import pytest

import kinloop as kl
from mechanisms import (angle_diff, build_fourbar, build_slider_crank,
                        fourbar_rates, freudenstein, sketch_branch,
                        slider_crank_closed_form)


@pytest.mark.parametrize("branch", [+1, -1])
def test_fourbar_matches_freudenstein_over_a_turn(branch):
    # crank-rocker, Grashof: 40 + 120 < 80 + 100 (geometry chosen for this test)
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, branch)
    for k in range(361):
        t2 = math.radians(k)
        assert s.solve_position(t2) == kl.Status.OK
        t3, t4 = freudenstein(f, t2, branch)
        # Freudenstein's equation (half-angle form, recalled): 1e-10 rad
        assert abs(angle_diff(s.link_angle(f.coupler), t3)) <= 1e-10
        assert abs(angle_diff(s.link_angle(f.rocker), t4)) <= 1e-10
        assert s.link_angle(f.crank) == t2  # the driven angle is set exactly
        assert s.input_value(0) == t2
        # a revolute joint's coordinate is angle(b) - angle(a) (kinloop.h)
        assert s.joint_angle(f.crank_pin) == pytest.approx(
            s.link_angle(f.coupler) - s.link_angle(f.crank), abs=1e-15)


def test_fourbar_rates_and_coupler_point_match_closed_forms():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    w2 = 2.5  # rad per time unit, chosen for this test
    for k in range(0, 360, 15):
        t2 = math.radians(k)
        s.solve_position(t2)
        assert s.solve_velocity(w2) == kl.Status.OK
        t3, t4 = freudenstein(f, t2, +1)
        w3, w4 = fourbar_rates(f, t2, t3, t4, w2)
        # Cramer's rule on the differentiated loop (textbook four-bar rates)
        assert s.link_rate(f.coupler) == pytest.approx(w3, rel=1e-9, abs=1e-12)
        assert s.link_rate(f.rocker) == pytest.approx(w4, rel=1e-9, abs=1e-12)
        assert s.link_rate(f.crank) == w2
        # coupler point: crank pin plus the point's vector turned by theta3
        # (the loop geometry of docs/theory.md, 7, common practice)
        px, py = f.point_local
        x = f.a * math.cos(t2) + px * math.cos(t3) - py * math.sin(t3)
        y = f.a * math.sin(t2) + px * math.sin(t3) + py * math.cos(t3)
        got = s.point_position(f.point)
        assert got[0] == pytest.approx(x, abs=1e-9)
        assert got[1] == pytest.approx(y, abs=1e-9)
        vx = -f.a * w2 * math.sin(t2) - w3 * (px * math.sin(t3) + py * math.cos(t3))
        vy = f.a * w2 * math.cos(t2) + w3 * (px * math.cos(t3) - py * math.sin(t3))
        vel = s.point_velocity(f.point)
        assert vel[0] == pytest.approx(vx, abs=1e-8)
        assert vel[1] == pytest.approx(vy, abs=1e-8)
        # the crank pin is the coupler's frame origin
        origin = s.link_origin(f.coupler)
        assert origin[0] == pytest.approx(f.a * math.cos(t2), abs=1e-12)
        assert origin[1] == pytest.approx(f.a * math.sin(t2), abs=1e-12)


@pytest.mark.parametrize("through", [False, True])
@pytest.mark.parametrize("branch", [+1, -1])
def test_slider_crank_matches_closed_form(through, branch):
    # r = 30, l = 100, offset e = 12 (geometry chosen for this test)
    sc = build_slider_crank(30, 100, 12, through=through)
    s = kl.Solver(sc.model)
    s.set_link_angle(sc.rod, -0.1 if branch > 0 else math.pi + 0.1)
    s.set_joint_slide(sc.slide, branch * 120.0)
    for k in range(0, 361, 5):
        t = math.radians(k)
        s.solve_position(t)
        x, phi = slider_crank_closed_form(sc, t, branch)
        # offset slider-crank closed form (standard kinematics)
        assert s.joint_slide(sc.slide) == pytest.approx(x, abs=1e-10 * sc.l)
        assert abs(angle_diff(s.link_angle(sc.rod), phi)) <= 1e-10
        assert s.link_angle(sc.block) == pytest.approx(0.0, abs=1e-15)
    if through:
        # the line from (0, e) toward (l, e) runs along +x
        assert sc.model.joint_axis(sc.slide) == pytest.approx(0.0, abs=1e-15)


@pytest.mark.parametrize("through", [False, True])
def test_pin_in_slot_matches_law_of_cosines(through):
    # crank r about O2 = (0, 0); its pin runs in a slot along the x-axis of
    # a guide pivoted at O4 = (d, 0) (geometry chosen for this test)
    r, d = 30.0, 80.0
    m = kl.Model()
    crank, guide = m.add_link("crank"), m.add_link("guide")
    pivot = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    m.add_revolute(kl.GROUND, (d, 0), guide, (0, 0))
    if through:
        slot = m.add_slot_through(guide, (0, 0), (1, 0), crank, (r, 0))
    else:
        slot = m.add_slot(guide, (0, 0), 0.0, crank, (r, 0))
    m.add_input(pivot)
    m.finalize()
    assert m.joint_kind(slot) == kl.JointKind.SLOT
    assert m.dof == 1  # Gruebler: 3 * 2 - 2 * 2 - 1
    s = kl.Solver(m)
    s.set_link_angle(guide, math.pi - 0.3)
    s.set_joint_slide(slot, 50.0)
    for k in range(0, 360, 10):
        t = math.radians(k)
        s.solve_position(t)
        # the pin's distance from O4 by the law of cosines; the guide points
        # from O4 at the pin
        assert s.joint_slide(slot) == pytest.approx(
            math.sqrt(r * r + d * d - 2 * r * d * math.cos(t)), abs=1e-10 * d)
        assert abs(angle_diff(s.link_angle(guide),
                              math.atan2(r * math.sin(t), r * math.cos(t) - d))) <= 1e-10
