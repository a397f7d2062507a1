"""Model builders and getters: what goes in comes back (the reference is the
values given to the builders), the counts follow Gruebler's criterion and
the cycle rank L = J - N + 1, and the model's sketch starts new solvers."""

import math

import pytest

import kinloop as kl
from mechanisms import (angle_diff, build_fourbar, build_slider_crank,
                        freudenstein)


def test_what_is_built_reads_back():
    sc = build_slider_crank(30, 100, 12)
    m = sc.model
    assert (m.link_count, m.joint_count, m.point_count, m.input_count) == (4, 4, 0, 1)
    assert [m.link_name(l) for l in range(4)] == ["ground", "crank", "rod", "block"]
    assert m.find_link("rod") == sc.rod and m.link_name(99) is None
    assert [m.joint_kind(j) for j in range(4)] == [kl.JointKind.REVOLUTE] * 3 + [
        kl.JointKind.PRISMATIC]
    assert m.joint_links(1) == ((sc.crank, sc.rod), (30.0, 0.0), (0.0, 0.0))
    assert m.joint_links(sc.slide) == ((kl.GROUND, sc.block), (0.0, 12.0), (0.0, 0.0))
    assert m.joint_axis(sc.slide) == 0.0 and math.isnan(m.joint_axis(0))
    assert m.input_joint(0) == 0
    # Gruebler's count: 3 (N - 1) - 2 (R + P) - S = 3 * 3 - 2 * 4 = 1
    assert m.dof == 1
    # one independent loop: L = J - N + 1 = 4 - 4 + 1
    assert m.loop_count == 1 and sorted(m.loop(0)) == [0, 1, 2, 3]
    assert m.loops == [m.loop(0)]
    assert m.scale == 100.0  # the largest distance between two joints of one link
    assert m.is_finalized and "finalized" in repr(m)


def test_points_joint_names_and_finding():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    tip = m.add_point(f.rocker, (80.0, 15.0), "rocker tip")
    unnamed = m.add_point(kl.GROUND, (1.0, 2.0))
    assert m.point_link(tip) == (f.rocker, (80.0, 15.0))
    assert m.point_name(tip) == "rocker tip" and m.point_name(unnamed) is None
    assert m.find_point("coupler point") == f.point
    m.set_joint_name(f.pivot, "motor")
    assert m.joint_name(f.pivot) == "motor" and m.joint_name(f.crank_pin) is None
    assert m.find_joint("motor") == f.pivot
    with pytest.raises(kl.KinloopError) as info:
        m.set_joint_name(f.crank_pin, "motor")
    assert info.value.status == kl.Status.EDUPLICATE
    assert m.link_name(f.coupler) == "coupler"
    assert m.add_link("\u00e9tage") == 4  # UTF-8 names pass through
    assert m.link_name(4) == "\u00e9tage"


def test_units_sketch_and_sweep_settings_are_recorded():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    assert m.units == (kl.LengthUnit.UNSTATED, kl.AngleUnit.RAD)
    with pytest.raises(kl.KinloopError) as info:  # none recorded yet
        m.sweep
    assert info.value.status == kl.Status.EID
    m.set_units(kl.LengthUnit.MM, kl.AngleUnit.DEG)
    assert m.units == (kl.LengthUnit.MM, kl.AngleUnit.DEG)
    assert kl.length_unit_str(kl.LengthUnit.MM) == "mm"
    assert kl.length_unit_str(kl.LengthUnit.UNSTATED) == ""
    assert kl.angle_unit_str(kl.AngleUnit.DEG) == "deg"
    with pytest.raises(kl.KinloopError) as info:
        m.set_units(7, kl.AngleUnit.RAD)
    assert info.value.status == kl.Status.EINVAL
    m.set_sweep(kl.SweepSettings(0, 0.0, 2 * math.pi, 36))
    assert m.sweep == kl.SweepSettings(0, 0.0, 2 * math.pi, 36)
    with pytest.raises(kl.KinloopError) as info:
        m.set_sweep(kl.SweepSettings(1, 0.0, 1.0, 10))
    assert info.value.status == kl.Status.EID
    # a sketch recorded in the model starts every new solver on its branch
    for branch in (+1, -1):
        t3, t4 = freudenstein(f, 0.0, branch)
        m.set_sketch_angle(f.coupler, t3 + 0.1)
        m.set_sketch_angle(f.rocker, t4 - 0.1)
        assert m.sketch_angle(f.rocker) == t4 - 0.1
        if branch == -1:
            m.finalize()
            s = kl.Solver(m)
            s.solve_position(0.0)
            assert abs(angle_diff(s.link_angle(f.rocker), t4)) <= 1e-10
    assert math.isnan(m.sketch_angle(f.crank))
    assert math.isnan(m.sketch_slide(f.pivot))
    with pytest.raises(kl.KinloopError) as info:
        m.set_sketch_angle(f.rocker, 0.0)
    assert info.value.status == kl.Status.ESTATE


def test_slider_sketch_slide_is_recorded():
    m = kl.Model()
    block = m.add_link("block")
    slide = m.add_prismatic(kl.GROUND, (0, 0), 0.5, block, (0, 0))
    m.add_input(slide)
    m.set_sketch_slide(slide, 3.5)
    assert m.sketch_slide(slide) == 3.5
    m.finalize()
    assert m.dof == 1  # 3 * 1 - 2 * 1
    s = kl.Solver(m)
    s.solve_position(2.0)  # the slide is the input: the block moves along the axis
    assert s.link_origin(block) == pytest.approx((2 * math.cos(0.5), 2 * math.sin(0.5)),
                                                 abs=1e-15)


def test_registered_loops():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    order = [f.pivot, f.crank_pin, f.rocker_pin, f.rocker_pivot]
    assert f.model.add_loop(order) == 0
    f.model.finalize()
    assert f.model.loop_count == 1 and f.model.loop(0) == order
    g = build_fourbar(40, 120, 80, 100, finalize=False)
    with pytest.raises(kl.KinloopError) as info:
        # the ground pivot and the rocker pin share no link
        g.model.add_loop([g.pivot, g.rocker_pin, g.crank_pin, g.rocker_pivot])
    assert info.value.status == kl.Status.ELOOP
    with pytest.raises(kl.KinloopError) as info:
        f.model.loop(3)
    assert info.value.status == kl.Status.EID
