"""Design figures, assembly modes, state copies and options through the
bindings, each against a closed form of the trade or the documented rule."""

import dataclasses
import math

import pytest

import kinloop as kl
from mechanisms import (angle_diff, build_fourbar, fourbar_rates,
                        freudenstein, sketch_branch)

# crank-rocker: 40 + 120 < 80 + 100 (geometry chosen for these tests)
A, B, C, D = 40.0, 120.0, 80.0, 100.0


@pytest.fixture
def fourbar():
    f = build_fourbar(A, B, C, D)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    s.solve_position(0.0)
    return f, s


@pytest.mark.parametrize("lengths, expected", [
    # (ground, input, coupler, output); Grashof's condition s + l vs p + q,
    # and which link is shortest (standard machine-design texts)
    ((100, 40, 120, 80), kl.GrashofClass.CRANK_ROCKER),
    ((100, 80, 120, 40), kl.GrashofClass.ROCKER_CRANK),
    ((40, 100, 120, 80), kl.GrashofClass.DOUBLE_CRANK),
    ((100, 80, 40, 120), kl.GrashofClass.DOUBLE_ROCKER),
    ((100, 40, 100, 40), kl.GrashofClass.CHANGE_POINT),
    ((100, 70, 50, 60), kl.GrashofClass.TRIPLE_ROCKER),
])
def test_grashof_classes(lengths, expected):
    assert kl.grashof(*lengths) == expected
    ground, crank, coupler, rocker = lengths
    f = build_fourbar(crank, coupler, rocker, ground)
    assert f.model.grashof == expected
    assert str(expected) == kl.grashof_str(expected) != kl.grashof_str(0)


def test_rocker_range_and_time_ratio_match_the_limit_positions():
    f = build_fourbar(A, B, C, D)
    s = kl.Solver(f.model)
    # the assembly with the rocker pin C above the ground line (the sign -1
    # of Freudenstein's root for this geometry)
    sketch_branch(s, f, 0.0, -1)
    s.solve_position(0.0)
    assert math.sin(s.link_angle(f.rocker)) > 0
    r = s.output_range(0, 0.0, 2 * math.pi, 72, kl.Output.link_angle(f.rocker))
    assert r.sweep_status == kl.Status.OK and math.isnan(r.limit_input)
    # the rocker's limits: crank and coupler in line, extended (a + b) and
    # folded (b - a), by the law of cosines in triangle O2 O4 C (angles
    # compared modulo 2 pi: the sketch chose the turn)
    extended, folded = A + B, B - A
    rocker_min = math.pi - math.acos((C * C + D * D - extended ** 2) / (2 * C * D))
    rocker_max = math.pi - math.acos((C * C + D * D - folded ** 2) / (2 * C * D))
    crank_at_min = math.acos((extended ** 2 + D * D - C * C) / (2 * extended * D))
    crank_at_max = math.pi + math.acos((folded ** 2 + D * D - C * C) / (2 * folded * D))
    assert abs(angle_diff(r.min, rocker_min)) <= 1e-10
    assert abs(angle_diff(r.max, rocker_max)) <= 1e-10
    assert r.max - r.min == pytest.approx(rocker_max - rocker_min, abs=1e-10)
    assert r.input_at_min == pytest.approx(crank_at_min, abs=1e-8)
    assert r.input_at_max == pytest.approx(crank_at_max, abs=1e-8)
    # time ratio: crank angle from min to max over the angle back
    forward = crank_at_max - crank_at_min
    assert r.time_ratio() == pytest.approx(forward / (2 * math.pi - forward), rel=1e-8)


def test_time_ratio_refuses_equal_angles():
    same = kl.Range(0.0, 1.0, 0.5, 0.5 + 2 * math.pi, kl.Status.OK, math.nan)
    with pytest.raises(kl.KinloopError) as info:
        same.time_ratio()
    assert info.value.status == kl.Status.EINVAL


def transmission_closed_form(t2):
    """Law of cosines: the diagonal from the crank pin to O4, then the angle
    between coupler and rocker opposite it."""
    diagonal2 = A * A + D * D - 2 * A * D * math.cos(t2)
    return math.acos((B * B + C * C - diagonal2) / (2 * B * C))


def test_transmission_angle_matches_law_of_cosines(fourbar):
    f, s = fourbar
    mu = kl.Output.transmission(f.rocker_pin, f.crank_pin, f.rocker_pivot)
    for k in range(0, 360, 20):
        t2 = math.radians(k)
        s.solve_position(t2)
        assert s.output_value(mu) == pytest.approx(transmission_closed_form(t2), abs=1e-10)
    r = s.output_range(0, 0.0, 2 * math.pi, 36, mu)
    # extremes with crank and ground in line, t2 = 0 and pi (docs/figures.md, 4)
    assert r.min == pytest.approx(transmission_closed_form(0.0), abs=1e-10)
    assert r.max == pytest.approx(transmission_closed_form(math.pi), abs=1e-10)
    bad = kl.Output.transmission(f.rocker_pin, f.rocker_pivot, f.crank_pin)
    with pytest.raises(kl.KinloopError) as info:
        s.output_value(bad)
    assert info.value.status == kl.Status.EKIND


def test_mechanical_advantage_and_input_effort_by_virtual_work(fourbar):
    f, s = fourbar
    torque, force = 5.0, (2.0, -3.0)  # loads chosen for this test
    px, py = f.point_local
    for k in range(0, 360, 30):
        t2 = math.radians(k)
        s.solve_position(t2)
        t3, t4 = freudenstein(f, t2, +1)
        w3, w4 = fourbar_rates(f, t2, t3, t4, 1.0)
        # virtual work: MA = 1 / (d theta4 / d theta2)
        assert s.output_mechanical_advantage(kl.Output.link_angle(f.rocker), 0) == pytest.approx(
            1 / w4, rel=1e-9)
        # Q = -(T dtheta4/du + F . dp/du), dp/du of the coupler point
        dpx = -A * math.sin(t2) - w3 * (px * math.sin(t3) + py * math.cos(t3))
        dpy = A * math.cos(t2) + w3 * (px * math.cos(t3) - py * math.sin(t3))
        effort = s.input_effort([kl.Load.torque_on(f.rocker, torque),
                                 kl.Load.force_at(f.point, force)])
        assert effort.shape == (1,)
        assert effort[0] == pytest.approx(
            -(torque * w4 + force[0] * dpx + force[1] * dpy), rel=1e-9, abs=1e-9)


def test_sensitivities_and_tolerance_stack_match_finite_differences(fourbar):
    f, s = fourbar
    t2 = 1.0
    s.solve_position(t2)
    rocker = kl.Output.link_angle(f.rocker)
    # rocker length c: the rocker pin's x on the rocker; ground length d: the
    # x of the rocker pivot's point on ground (joint 3's side b)
    dims = [kl.Dimension.joint_b(f.rocker_pin, "x"), kl.Dimension.joint_b(f.rocker_pivot, 0)]
    # central differences of Freudenstein's closed form in c and d, h = 1e-6
    # (truncation ~1e-12, rounding ~1e-10), checked to 1e-7
    h = 1e-6

    def slope(name):
        up = dataclasses.replace(f, **{name: getattr(f, name) + h})
        down = dataclasses.replace(f, **{name: getattr(f, name) - h})
        return angle_diff(freudenstein(up, t2, +1)[1], freudenstein(down, t2, +1)[1]) / (2 * h)

    expected = [slope("c"), slope("d")]
    got = [s.output_sensitivity(rocker, dim) for dim in dims]
    assert got == pytest.approx(expected, abs=1e-7)
    # a point's own x moves it by R(theta3) e_x: d x / d px = cos theta3
    t3 = s.link_angle(f.coupler)
    assert s.output_sensitivity(kl.Output.point_x(f.point), kl.Dimension.point(f.point, "x")) == \
        pytest.approx(math.cos(t3), abs=1e-12)
    # first-order stack-up: worst case sum |d_k| t_k, RSS sqrt(sum (d_k t_k)^2)
    tolerances = [0.05, 0.1]
    worst, rss = s.output_tolerance_stack(rocker, dims, tolerances)
    assert worst == pytest.approx(sum(abs(g) * t for g, t in zip(expected, tolerances)),
                                  abs=1e-8)
    assert rss == pytest.approx(math.hypot(*(g * t for g, t in zip(expected, tolerances))),
                                abs=1e-8)
    with pytest.raises(kl.KinloopError) as info:
        s.output_tolerance_stack(rocker, dims, [0.05, -0.1])
    assert info.value.status == kl.Status.EINVAL


def test_find_assemblies_gives_both_freudenstein_branches(fourbar):
    f, s = fourbar
    before = s.link_angle(f.rocker)
    modes = s.find_assemblies(1.0)
    # a crank-rocker closes two ways at each crank angle: open and crossed
    # (the two signs of Freudenstein's square root)
    assert len(modes) == 2
    found = [m.link_angle(f.rocker) for m in modes]
    for branch in (+1, -1):
        t4 = freudenstein(f, 1.0, branch)[1]
        assert min(abs(angle_diff(g, t4)) for g in found) <= 1e-10
    for m in modes:
        assert m.model is f.model and m.input_value(0) == 1.0
        assert m.solve_velocity(1.0) == kl.Status.OK  # each is a solved position
    assert s.link_angle(f.rocker) == before  # the workspace kept its state


def test_copy_state_and_copy(fourbar):
    if "kl_solver_copy_state" in kl.raw.missing:
        pytest.skip("libkinloop does not export kl_solver_copy_state, which "
                    "include/kinloop.h declares")
    f, s = fourbar
    s.solve_position(1.0)
    s.solve_velocity(2.0)
    twin = s.copy()
    for link in range(4):
        assert twin.link_angle(link) == s.link_angle(link)
        assert twin.link_rate(link) == s.link_rate(link)
    other = build_fourbar(A, B, C, D)
    with pytest.raises(kl.KinloopError) as info:
        kl.Solver(other.model).copy_state(s)
    assert info.value.status == kl.Status.EINVAL


def test_options_and_stats(fourbar):
    f, s = fourbar
    # the defaults of docs/theory.md, 5.8
    assert kl.Options() == kl.Options(tolerance=1e-12, step_tolerance=1e-10,
                                      max_iterations=50, max_backtracks=40,
                                      max_step=1.0, singular_rcond=1e-8)
    assert s.options == kl.Options()
    assert kl.Options().kernel == kl.Kernel.AUTO
    s.solve_position(1.0)
    st = s.stats
    assert st.status == kl.Status.OK and st.iterations >= 1
    # the stopping rule: |F|inf <= tolerance * scale
    assert st.residual <= s.options.tolerance * f.model.scale
    assert f.model.scale == max(A, B, C, D)  # the largest link
    tight = kl.Solver(f.model, kl.Options(tolerance=1e-10), max_iterations=7)
    assert tight.options == kl.Options(tolerance=1e-10, max_iterations=7)
    tight.set_options(max_step=0.5)
    assert tight.options.max_step == 0.5 and tight.options.max_iterations == 7
    # one iteration from a sketch far off cannot converge
    hurried = kl.Solver(f.model, max_iterations=1)
    hurried.set_link_angle(f.coupler, 2.0)
    with pytest.raises(kl.KinloopError) as info:
        hurried.solve_position(1.0)
    assert info.value.status == kl.Status.EMAXITER
    assert hurried.stats.status == kl.Status.EMAXITER


@pytest.mark.parametrize("kernel", [kl.Kernel.SMALL, kl.Kernel.DENSE, kl.Kernel.BANDED])
def test_every_kernel_gives_the_same_answers(kernel):
    # include/kinloop.h: the kernels "all give the same answers to rounding";
    # checked against Freudenstein's equation (recalled half-angle form)
    f = build_fourbar(A, B, C, D)
    s = kl.Solver(f.model, kernel=kernel)
    sketch_branch(s, f, 0.0, +1)
    for k in range(0, 360, 30):
        t2 = math.radians(k)
        s.solve_position(t2)
        assert s.stats.kernel == kernel
        assert abs(angle_diff(s.link_angle(f.rocker), freudenstein(f, t2, +1)[1])) <= 1e-10
    with pytest.raises(kl.KinloopError) as info:
        s.set_options(kernel=99)
    assert info.value.status == kl.Status.EINVAL


def test_quick_return_is_slower_over_faster_and_names_the_stroke():
    """The trade's time ratio (slower stroke over faster, >= 1; common
    practice, no source) from the crank angles of the extremes: rising 4
    rad of the turn, falling 2 pi - 4."""
    r = kl.Range(0.0, 1.0, 0.5, 4.5, kl.Status.OK, math.nan)
    ratio, slower, angle = r.quick_return()
    assert ratio == pytest.approx(4.0 / (2 * math.pi - 4.0), rel=1e-12)
    assert slower == kl.Stroke.RISING and str(kl.Stroke(slower)) == "rising"
    assert angle == pytest.approx(4.0, abs=1e-12)
    back = kl.Range(0.0, 1.0, 4.5, 0.5 + 2 * math.pi, kl.Status.OK, math.nan)
    ratio, slower, angle = back.quick_return()
    assert ratio == pytest.approx(4.0 / (2 * math.pi - 4.0), rel=1e-12)
    assert slower == kl.Stroke.FALLING and ratio >= 1
    assert back.time_ratio() < 1


def test_output_range_keeps_the_range_up_to_a_change_point():
    """At a change point output_range raises, and the error's result is
    the range swept before it, with the change point's location; the
    parallel branch's rocker follows the crank (the parallelogram's closed
    form, common practice, no source), so the range is the crank's."""
    f = build_fourbar(40, 100, 40, 100)  # parallelogram, chosen for this test
    s = kl.Solver(f.model)
    s.set_link_angle(f.coupler, 0.02)
    s.set_link_angle(f.rocker, 0.48)
    with pytest.raises(kl.KinloopError) as stop:
        s.output_range(0, 0.5, 0.5 + 2 * math.pi, 40, kl.Output.link_angle(f.rocker))
    e = stop.value
    assert e.status == kl.Status.ESINGULAR and "change point" in e.message
    assert e.result is not None and e.result.sweep_status == kl.Status.ESINGULAR
    assert e.result.limit_input == pytest.approx(math.pi, abs=1e-9)
    assert e.result.min == pytest.approx(0.5, abs=1e-9)
    assert e.result.input_at_min == pytest.approx(0.5, abs=1e-12)
    assert abs(e.result.max - e.result.input_at_max) <= 1e-9
    assert math.pi - 0.2 < e.result.input_at_max < math.pi


def test_output_ranges_from_one_sweep_match_one_range_each():
    """kl_output_ranges agrees with output_range of each output alone."""
    f = build_fourbar(A, B, C, D)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, -1)
    s.solve_position(0.0)
    start = s.copy()
    outs = [kl.Output.link_angle(f.rocker), kl.Output.link_angle(f.coupler)] + \
        list(f.model.transmissions)
    together = s.output_ranges(0, 0.0, 2 * math.pi, 72, outs)
    assert len(together) == len(outs)
    for o, r in zip(outs, together):
        alone = start.copy().output_range(0, 0.0, 2 * math.pi, 72, o)
        assert r.min == pytest.approx(alone.min, abs=1e-10)
        assert r.max == pytest.approx(alone.max, abs=1e-10)
        assert r.input_at_min == pytest.approx(alone.input_at_min, abs=1e-7)
        assert r.input_at_max == pytest.approx(alone.input_at_max, abs=1e-7)


def test_link_origin_velocity_and_acceleration_reach_python():
    """The coupler's frame origin is the crank pin, which moves on a circle
    of radius a about the crank pivot: velocity a w (-sin t, cos t),
    acceleration a (-w^2 cos t - al sin t, -w^2 sin t + al cos t)
    (circular motion, standard kinematics)."""
    f = build_fourbar(A, B, C, D)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, -1)
    w, al = 3.0, 2.0
    for t in (0.0, 0.7, 2.5, 4.0):
        s.solve_position(t)
        s.solve_velocity(w)
        s.solve_acceleration(al)
        v = s.link_origin_velocity(f.coupler)
        acc = s.link_origin_accel(f.coupler)
        assert v == pytest.approx((-A * w * math.sin(t), A * w * math.cos(t)), abs=1e-9)
        assert acc == pytest.approx((A * (-w * w * math.cos(t) - al * math.sin(t)),
                                     A * (-w * w * math.sin(t) + al * math.cos(t))),
                                    abs=1e-9)


def test_slider_pressure_angle_matches_the_closed_form():
    """The offset slider-crank's pressure angle (crank r, rod l, offset e;
    standard kinematics): the rod stands at phi with sin phi =
    (e - r sin t) / l against the slide, the signed angle, from
    asin((e - r) / l) to asin((e + r) / l); the pin is on the slide point."""
    r, l, e = 25.0, 90.0, 10.0  # chosen for this test
    m = kl.Model()
    crank, rod, block = m.add_link("crank"), m.add_link("rod"), m.add_link("block")
    pivot = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    crank_pin = m.add_revolute(crank, (r, 0), rod, (0, 0))
    pin = m.add_revolute(rod, (l, 0), block, (0, 0))
    slide = m.add_prismatic(kl.GROUND, (0, e), 0.0, block, (0, 0))
    m.add_input(pivot)
    m.finalize()
    assert m.pressure_sites == [kl.Output.pressure(slide, pin, crank_pin)]
    assert [k.reason for k in m.transmission_skips if k.joint == pin] == \
        [kl.TransmissionSkipReason.SLIDER]
    s = kl.Solver(m)
    s.set_link_angle(rod, -0.1)
    s.set_joint_slide(slide, 100.0)
    for t in [0.1 + 0.5 * k for k in range(13)]:
        s.solve_position(t)
        assert s.output_value(m.pressure_sites[0]) == pytest.approx(
            math.asin((e - r * math.sin(t)) / l), abs=1e-10)
    top = s.output_range(0, 0.0, 2 * math.pi, 72, m.pressure_sites[0])
    assert top.max == pytest.approx(math.asin((e + r) / l), abs=1e-9)
    assert top.min == pytest.approx(math.asin((e - r) / l), abs=1e-9)
