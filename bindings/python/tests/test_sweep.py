"""Solver.sweep: the arrays it records against closed forms, the motion
limit of a non-Grashof four-bar (law of cosines), the change point of a
parallelogram, and the callback's powers."""

import math

import numpy as np
import pytest

import kinloop as kl
from mechanisms import (angle_diff, build_fourbar, build_slider_crank,
                        fourbar_rates, freudenstein, sketch_branch,
                        slider_crank_closed_form)


def wrapped(values):
    return (np.asarray(values) + math.pi) % (2 * math.pi) - math.pi


def test_sweep_arrays_match_closed_forms():
    f = build_fourbar(40, 120, 80, 100)  # crank-rocker, chosen for this test
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    steps = 36
    r = s.sweep(0, 0.0, 2 * math.pi, steps)
    assert r.status == kl.Status.OK and r.message == ""
    assert r.steps_done == len(r) == steps + 1
    assert math.isnan(r.limit_input) and r.substeps >= steps
    assert r.input == pytest.approx(np.linspace(0, 2 * math.pi, steps + 1), abs=1e-15)
    n = steps + 1
    assert r.link_angle.shape == r.link_accel.shape == (n, 4)  # ground included
    assert r.joint_slide.shape == (n, 4) and np.isnan(r.joint_slide).all()  # all revolute
    assert r.point_x.shape == r.point_ay.shape == (n, 1)
    assert (r.link_angle[:, kl.GROUND] == 0).all()
    assert (r.link_rate[:, f.crank] == 1).all()  # unit rate of the swept input

    def rocker_rate(t2):
        t3, t4 = freudenstein(f, t2, +1)
        return fourbar_rates(f, t2, t3, t4, 1.0)[1]

    px, py = f.point_local
    for k, t2 in enumerate(r.input):
        t3, t4 = freudenstein(f, t2, +1)
        w3, w4 = fourbar_rates(f, t2, t3, t4, 1.0)
        # Freudenstein's equation (recalled half-angle form)
        assert abs(angle_diff(r.link_angle[k, f.rocker], t4)) <= 1e-10
        assert abs(angle_diff(r.link_angle[k, f.coupler], t3)) <= 1e-10
        # the rates are the first-order coefficients: Cramer's rule at unit rate
        assert r.link_rate[k, f.rocker] == pytest.approx(w4, rel=1e-9, abs=1e-12)
        assert r.link_rate[k, f.coupler] == pytest.approx(w3, rel=1e-9, abs=1e-12)
        # the accelerations are the second-order coefficients: central
        # difference of the closed-form rate, h = 1e-5 (truncation ~h^2 w''' /
        # 6 ~ 1e-10, rounding ~1e-16 / h ~ 1e-11), checked to 1e-7
        h = 1e-5
        dw4 = (rocker_rate(t2 + h) - rocker_rate(t2 - h)) / (2 * h)
        assert r.link_accel[k, f.rocker] == pytest.approx(dw4, abs=1e-7)
        assert r.link_accel[k, f.crank] == 0
        # coupler point from the crank pin and theta3 (loop geometry)
        x = f.a * math.cos(t2) + px * math.cos(t3) - py * math.sin(t3)
        y = f.a * math.sin(t2) + px * math.sin(t3) + py * math.cos(t3)
        assert r.point_x[k, f.point] == pytest.approx(x, abs=1e-9)
        assert r.point_y[k, f.point] == pytest.approx(y, abs=1e-9)
        vy = f.a * math.cos(t2) + w3 * (px * math.cos(t3) - py * math.sin(t3))
        assert r.point_vy[k, f.point] == pytest.approx(vy, abs=1e-8)
    # afterwards the solver holds the last delivered step
    assert s.input_value(0) == r.input[-1]


def test_sweep_of_a_slider_records_its_slide():
    sc = build_slider_crank(30, 100, 12)
    s = kl.Solver(sc.model)
    s.set_link_angle(sc.rod, -0.1)
    s.set_joint_slide(sc.slide, 120.0)
    r = s.sweep(0, 0.0, math.pi, 18)
    joints = sc.model.joint_count
    for j in range(joints):
        sliding = sc.model.joint_kind(j) != kl.JointKind.REVOLUTE
        assert np.isnan(r.joint_slide[:, j]).all() != sliding
    for k, t in enumerate(r.input):
        # offset slider-crank closed form; its slide rate by a central
        # difference (h = 1e-6: truncation ~1e-10, rounding ~1e-8), to 1e-6
        x, _ = slider_crank_closed_form(sc, t)
        assert r.joint_slide[k, sc.slide] == pytest.approx(x, abs=1e-8)
        h = 1e-6
        dx = (slider_crank_closed_form(sc, t + h)[0] -
              slider_crank_closed_form(sc, t - h)[0]) / (2 * h)
        assert r.joint_slide_rate[k, sc.slide] == pytest.approx(dx, abs=1e-6)


def non_grashof_fourbar():
    # 50 + 100 > 70 + 60: a triple-rocker (geometry chosen for this test)
    return build_fourbar(70, 50, 60, 100)


def test_non_grashof_sweep_stops_at_the_law_of_cosines_limit():
    f = non_grashof_fourbar()
    assert f.model.grashof == kl.GrashofClass.TRIPLE_ROCKER
    # the crank reaches at most acos((a^2 + d^2 - (b + c)^2) / (2 a d)), where
    # coupler and rocker lie in line (law of cosines)
    limit = math.acos((f.a ** 2 + f.d ** 2 - (f.b + f.c) ** 2) / (2 * f.a * f.d))
    s = kl.Solver(f.model)
    s.set_link_angle(f.coupler, -0.6)
    s.set_link_angle(f.rocker, 1.5)
    r = s.sweep(0, 0.0, 2.0, 40)
    assert r.status == kl.Status.LIMIT
    assert r.status_name == kl.status_str(kl.Status.LIMIT)
    assert abs(r.limit_input - limit) <= 1e-10  # located to 1e-10 (kinloop.h)
    assert "motion limit" in r.message
    # every step below the limit was delivered, and no other
    delivered = [k for k in range(41) if 0.05 * k < limit]
    assert r.steps_done == len(delivered) == len(r.input)
    assert r.input == pytest.approx([0.05 * k for k in delivered], abs=1e-15)
    assert r.link_angle.shape == (len(delivered), 4)
    # one branch throughout (Freudenstein's equation, recalled form)
    branch = min((+1, -1), key=lambda b: abs(angle_diff(
        r.link_angle[0, f.rocker], freudenstein(f, 0.0, b)[1])))
    for k, t2 in enumerate(r.input):
        t3, t4 = freudenstein(f, t2, branch)
        assert abs(angle_diff(r.link_angle[k, f.rocker], t4)) <= 1e-9
    assert s.input_value(0) == r.input[-1]


def test_change_point_raises_with_the_steps_delivered():
    # a parallelogram four-bar (a = c, b = d) folds into a line at crank
    # angle pi: Grashof's change point (s + l = p + q)
    f = build_fourbar(40, 100, 40, 100)
    assert f.model.grashof == kl.GrashofClass.CHANGE_POINT
    s = kl.Solver(f.model)
    s.set_link_angle(f.coupler, 0.05)
    s.set_link_angle(f.rocker, 0.6)
    with pytest.raises(kl.KinloopError) as info:
        s.sweep(0, 0.5, 4.0, 35)
    e = info.value
    assert e.status == kl.Status.ESINGULAR
    assert e.result is not None and e.result.status == kl.Status.ESINGULAR
    assert abs(e.result.limit_input - math.pi) <= 1e-9
    assert e.result.steps_done == len(e.result.input) > 0
    assert (e.result.input < math.pi).all()
    # on the parallelogram branch the coupler stays parallel to ground and
    # the rocker to the crank (common practice, no source)
    assert np.abs(wrapped(e.result.link_angle[:, f.coupler])).max() <= 1e-9
    assert np.abs(wrapped(e.result.link_angle[:, f.rocker] - e.result.input)).max() <= 1e-9


def test_callback_reads_the_solver_and_stops_the_sweep():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    seen = []

    def watch(solver, step, u):
        assert solver is s
        seen.append((step, u, solver.link_angle(f.rocker), solver.link_rate(f.rocker)))
        return step == 5

    r = s.sweep(0, 0.0, 1.0, 10, callback=watch)
    assert r.status == kl.Status.STOPPED and r.message == ""
    assert r.steps_done == 6 == len(seen)  # the stopping step counts as delivered
    for step, u, angle, rate in seen:
        assert r.input[step] == u
        assert r.link_angle[step, f.rocker] == angle
        assert r.link_rate[step, f.rocker] == rate


def test_callback_exception_is_raised_again():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)

    def fail_at_two(solver, step, u):
        if step == 2:
            raise ZeroDivisionError("from the callback")

    with pytest.raises(ZeroDivisionError):
        s.sweep(0, 0.0, 1.0, 10, callback=fail_at_two)
    # the sweep stopped there and the solver goes on working
    assert s.input_value(0) == pytest.approx(0.2, abs=1e-15)
    assert s.solve_position(0.3) == kl.Status.OK


def test_a_callback_that_cannot_be_called_is_refused_before_the_sweep():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    before = s.row()
    with pytest.raises(kl.KinloopError) as e:
        s.sweep(0, 0.0, 1.0, 10, callback="\0")
    assert e.value.status == kl.Status.EINVAL and "callback" in e.value.message
    np.testing.assert_array_equal(s.row(), before)  # no step taken


def test_callback_may_not_change_the_solver():
    # kl_sweep_fn receives a const solver: changing it mid-sweep is refused
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    with pytest.raises(RuntimeError):
        s.sweep(0, 0.0, 1.0, 4, callback=lambda solver, step, u: solver.solve_position(u))
    with pytest.raises(RuntimeError):
        s.sweep(0, 0.0, 1.0, 4,
                callback=lambda solver, step, u: solver.sweep(0, 0.0, 1.0, 2))
    with pytest.raises(RuntimeError):
        s.sweep(0, 0.0, 1.0, 4, callback=lambda solver, step, u: s.close())
    assert s.sweep(0, 0.0, 1.0, 4).status == kl.Status.OK
    # closing the model mid-sweep is allowed: the library keeps it for the solver
    result = s.sweep(0, 0.0, 1.0, 4, callback=lambda solver, step, u: f.model.close())
    assert f.model.closed and result.status == kl.Status.OK and result.steps_done == 5


def test_rows_are_the_same_with_and_without_a_callback():
    """Without a callback the library records the rows (kl_solver_sweep_rows);
    with one, the bindings read kl_solver_row at each step: the same numbers,
    bit for bit, every quantity of the row included."""
    f = build_fourbar(40, 120, 80, 100)  # crank-rocker, chosen for this test
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    start = s.copy()
    fast = s.sweep(0, 0.0, 2 * math.pi, 24)
    s.copy_state(start)
    seen = []
    slow = s.sweep(0, 0.0, 2 * math.pi, 24, callback=lambda sv, k, u: seen.append(sv.row()))
    assert np.array_equal(fast.rows, slow.rows, equal_nan=True)
    assert np.array_equal(np.array(seen), slow.rows, equal_nan=True)
    layout = f.model.row_layout
    assert list(layout) == [kl.quantity_str(q) for q in range(len(layout))]
    assert layout["link_angle"][1] == 4 and layout["rcond"][1] == 1
    sites = f.model.transmissions
    assert fast.transmission.shape == (25, len(sites)) and len(sites) == 1
    assert (fast.rcond[:, 0] > 1e-3).all()
    assert (fast.input_rate[:, 0] == 1).all() and fast.input == pytest.approx(fast.input_value[:, 0])


def test_a_parallelogram_passes_its_change_points_on_request():
    """With pass_change_points the sweep goes through the parallelogram's
    change points on the parallel branch: the rocker follows the crank (the
    parallelogram's closed form, common practice, no source); each passage
    counted and located (at pi and 2 pi here)."""
    f = build_fourbar(40, 100, 40, 100)  # parallelogram, chosen for this test
    s = kl.Solver(f.model, pass_change_points=1)
    s.set_link_angle(f.coupler, 0.02)
    s.set_link_angle(f.rocker, 0.48)
    passages = []
    r = s.sweep(0, 0.5, 0.5 + 2 * math.pi, 40,
                callback=lambda sv, k, u: passages.append(sv.passages))
    assert r.status == kl.Status.OK and r.passages == 2
    assert r.passage_input == pytest.approx(2 * math.pi, abs=1e-9)
    assert passages[-1][0] == 2 and passages[0][0] == 0
    assert np.abs(wrapped(r.link_angle[:, f.rocker] - r.input)).max() < 1e-9
    s.set_options(pass_change_points=0)
    s.set_link_angle(f.coupler, 0.02)
    s.set_link_angle(f.rocker, 0.48)
    with pytest.raises(kl.KinloopError) as stop:
        s.sweep(0, 0.5, 0.5 + 2 * math.pi, 40)
    assert stop.value.status == kl.Status.ESINGULAR
    assert stop.value.result.limit_input == pytest.approx(math.pi, abs=1e-9)
