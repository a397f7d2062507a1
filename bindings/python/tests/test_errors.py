"""Negative statuses raise KinloopError with the status, its kl_status_str
text and the handle's message; positive ones are returned; a failed call
changes nothing. The statuses expected are those include/kinloop.h
documents for each call."""

import math

import pytest

import kinloop as kl
from mechanisms import build_fourbar, sketch_branch


def raises_status(status, fn, *args, **kwargs):
    with pytest.raises(kl.KinloopError) as info:
        fn(*args, **kwargs)
    e = info.value
    assert e.status == status
    assert e.status_name == kl.status_str(status)
    assert e.message and e.message in str(e) and e.status_name in str(e)
    return e


def test_self_joint():
    m = kl.Model()
    crank = m.add_link("crank")
    e = raises_status(kl.Status.ESELFJOINT, m.add_revolute, crank, (0, 0), crank, (1, 0))
    assert e.message == m.error  # the model's own message...
    assert "crank" in e.message  # ...naming the link
    assert e.status_name == "joint joins a link to itself"


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
def test_nonfinite_coordinates(bad):
    m = kl.Model()
    crank = m.add_link("crank")
    raises_status(kl.Status.ENONFINITE, m.add_revolute, kl.GROUND, (bad, 0), crank, (0, 0))
    raises_status(kl.Status.ENONFINITE, m.add_prismatic, kl.GROUND, (0, 0), bad, crank, (0, 0))
    raises_status(kl.Status.ENONFINITE, m.add_point, crank, (0, bad), "tip")
    # nothing was added by the refused calls
    assert (m.joint_count, m.point_count) == (0, 0)


def test_builder_statuses():
    m = kl.Model()
    crank = m.add_link("crank")
    e = raises_status(kl.Status.EID, m.add_revolute, kl.GROUND, (0, 0), 9, (0, 0))
    assert "9" in e.message
    raises_status(kl.Status.EDUPLICATE, m.add_link, "crank")
    raises_status(kl.Status.EINVAL, m.add_link, "bad\nname")
    pivot = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    raises_status(kl.Status.EDUPLICATE, m.add_revolute, kl.GROUND, (1, 0), crank, (1, 0))
    m.add_input(pivot)
    raises_status(kl.Status.EDUPLICATE, m.add_input, pivot)
    raises_status(kl.Status.EINVAL, m.add_loop, [pivot])
    m.finalize()
    raises_status(kl.Status.ESTATE, m.add_link, "late")


def test_wrong_number_of_inputs():
    # a four-bar without its input: one degree of freedom, no input
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = kl.Model()
    crank = m.add_link("crank")
    m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    e = raises_status(kl.Status.EDOF, m.finalize)
    assert "0 inputs" in e.message
    assert not m.is_finalized
    # the C functions take no count: the bindings check it, as KL_EINVAL
    f.model.finalize()
    s = kl.Solver(f.model)
    raises_status(kl.Status.EINVAL, s.solve_position, [0.1, 0.2])
    raises_status(kl.Status.EINVAL, s.solve_position, None)
    raises_status(kl.Status.EINVAL, s.solve_position, [])
    raises_status(kl.Status.EINVAL, s.find_assemblies, [1.0, 2.0])


def test_disconnected_link():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    f.model.add_link("loose")
    e = raises_status(kl.Status.EDISCONNECTED, f.model.finalize)
    assert "loose" in e.message


def test_no_assembly_leaves_the_state_as_it_was():
    # non-Grashof four-bar: the crank cannot reach 2 rad, beyond its limit
    # acos((a^2 + d^2 - (b + c)^2) / (2 a d)) = acos(0.2) = 1.369 rad (law
    # of cosines; geometry chosen for this test)
    f = build_fourbar(70, 50, 60, 100)
    s = kl.Solver(f.model)
    s.set_link_angle(f.coupler, -0.6)
    s.set_link_angle(f.rocker, 1.5)
    s.solve_position(1.0)
    s.solve_velocity(1.0)
    before = [s.link_angle(l) for l in range(4)] + [s.link_rate(f.rocker)]
    e = raises_status(kl.Status.ENOASSEMBLY, s.solve_position, 2.0)
    assert "loop 1 furthest" in e.message and "input 1 (@0) = 2 rad" in e.message
    assert e.message == s.error
    assert s.stats.status == kl.Status.ENOASSEMBLY
    assert [s.link_angle(l) for l in range(4)] + [s.link_rate(f.rocker)] == before
    assert s.input_value(0) == 1.0


def test_solver_statuses():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    raises_status(kl.Status.ESTAGE, s.solve_velocity, 1.0)
    raises_status(kl.Status.ENONFINITE, s.solve_position, math.nan)
    raises_status(kl.Status.ENONFINITE, s.set_link_angle, f.rocker, math.inf)
    raises_status(kl.Status.EKIND, s.set_link_angle, kl.GROUND, 1.0)
    raises_status(kl.Status.EKIND, s.set_joint_slide, f.pivot, 1.0)
    raises_status(kl.Status.EID, s.set_link_angle, 42, 1.0)
    raises_status(kl.Status.EINVAL, s.set_options, tolerance=1.0)
    raises_status(kl.Status.EINVAL, s.sweep, 0, 0.0, 1.0, 0)
    raises_status(kl.Status.EID, s.sweep, 3, 0.0, 1.0, 4)
    with pytest.raises(TypeError):
        s.set_options(no_such_option=1)


def test_calls_without_a_message_get_one_from_the_bindings():
    # getters on const handles cannot write a message; the bindings name the call
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    e = raises_status(kl.Status.EID, s.point_position, 7)
    assert "point_position(7)" in e.message
    raises_status(kl.Status.EID, f.model.find_link, "no such link")
    raises_status(kl.Status.EID, f.model.joint_links, 99)
    raises_status(kl.Status.EINVAL, kl.grashof, 100, 40, 120, -80)
    raises_status(kl.Status.ENONFINITE, kl.grashof, 100, math.nan, 120, 80)
    unfinished = build_fourbar(40, 120, 80, 100, finalize=False).model
    raises_status(kl.Status.ESTATE, lambda: unfinished.dof)
    raises_status(kl.Status.ESTATE, kl.Solver, unfinished)


def test_positive_statuses_are_returned():
    # the sweep stops on the callback's word: KL_STOPPED, not an exception
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    result = s.sweep(0, 0.0, 1.0, 10, callback=lambda solver, step, u: step == 3)
    assert result.status == kl.Status.STOPPED
    assert result.status_name == kl.status_str(kl.Status.STOPPED)


def test_closed_handles_refuse_calls():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    f.model.close()
    assert not s.closed  # the library keeps the model for its solver
    with pytest.raises(ValueError, match="the model is closed"):
        f.model.add_link("x")
    s.close()
    with pytest.raises(ValueError, match="the solver is closed"):
        s.link_angle(1)
