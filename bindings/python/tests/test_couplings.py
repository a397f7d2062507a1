"""Couplings and point inputs through the generated bindings: a planetary
train against Willis' formula, its tooth force against the power balance,
the coupling records read back, a point-driven five-bar against two circle
intersections, and a pair that cannot mesh refused with its status."""

import math

import pytest

import kinloop as kl

# a train made up for this test: sun 20, planet 15, ring 50 = 20 + 2 x 15
R_SUN, R_PLANET, R_RING = 20.0, 15.0, 50.0


def sun_held_train():
    """Carrier on ground, a planet on it, the ring about its centre; the
    held sun is part of ground (its mesh a gear pair on the carrier's
    ground pivot)."""
    m = kl.Model()
    carrier = m.add_link("carrier")
    planet = m.add_link("planet")
    ring = m.add_link("ring")
    pivot = m.add_revolute(kl.GROUND, (0, 0), carrier, (0, 0))
    pin = m.add_revolute(carrier, (R_SUN + R_PLANET, 0), planet, (0, 0))
    centre = m.add_revolute(carrier, (0, 0), ring, (0, 0))
    m.add_gear_pair(pivot, pin, R_SUN, R_PLANET)
    m.add_gear_pair(centre, pin, R_RING, R_PLANET)
    m.add_input(pivot)
    m.finalize()
    return m, ring


def test_willis_formula_with_the_sun_held():
    # Willis (Principles of Mechanism, 1841): (w_r - w_c) / (w_s - w_c) =
    # -r_s / r_r, so with w_s = 0, w_r = w_c (1 + r_s / r_r)
    m, ring = sun_held_train()
    s = kl.Solver(m)
    s.solve_position([0.6])
    s.solve_velocity([2.0])
    assert s.link_angle(ring) == pytest.approx(0.6 * (1 + R_SUN / R_RING),
                                               abs=1e-12)
    assert s.link_rate(ring) == pytest.approx(2.0 * (1 + R_SUN / R_RING),
                                              abs=1e-12)
    info = m.coupling(1)
    assert info.kind == kl.CouplingKind.GEAR
    assert info.internal == 1 and m.coupling_count == 2


def test_tooth_force_by_the_power_balance():
    # massless train, torque T on the ring: the ring's mesh carries T / r_r
    m, ring = sun_held_train()
    s = kl.Solver(m)
    s.solve_position([0.3])
    s.solve_velocity([1.0])
    s.solve_acceleration([0.0])
    load = kl.Load.torque_on(ring, 12.0)
    efforts = s.solve_forces([load])
    assert efforts[0] == pytest.approx(-12.0 * (1 + R_SUN / R_RING))
    assert abs(s.coupling_force(1)) == pytest.approx(12.0 / R_RING)


def test_five_bar_driven_by_its_tip():
    # inverse kinematics by two circle intersections: the left crank pin
    # is where the circles (O1, 40) and (T, 90) meet, on the left of O1 -> T
    m = kl.Model()
    c1, c2, l1, l2 = (m.add_link(n) for n in ("c1", "c2", "l1", "l2"))
    m.add_revolute(kl.GROUND, (0, 0), c1, (0, 0))
    m.add_revolute(kl.GROUND, (60, 0), c2, (0, 0))
    m.add_revolute(c1, (40, 0), l1, (0, 0))
    m.add_revolute(c2, (45, 0), l2, (0, 0))
    m.add_revolute(l1, (90, 0), l2, (85, 0))
    tip = m.add_point(l1, (90, 0), "tip")
    assert m.add_point_input(tip, 0) == 0
    assert m.add_point_input(tip, 1) == 1
    for link, angle in ((c1, 2.2), (c2, 0.9), (l1, 0.9), (l2, 2.2)):
        m.set_sketch_angle(link, angle)
    m.finalize()
    assert m.input_point(1) == tip and m.input_axis(1) == 1
    s = kl.Solver(m)
    t = (45.0, 95.0)
    s.solve_position(list(t))
    d = math.hypot(*t)
    a = (40 ** 2 - 90 ** 2 + d * d) / (2 * d)
    h = math.sqrt(40 ** 2 - a * a)
    ux, uy = t[0] / d, t[1] / d
    pin = (a * ux - h * uy, a * uy + h * ux)
    assert s.link_angle(c1) == pytest.approx(math.atan2(pin[1], pin[0]),
                                             abs=1e-10)


def test_a_pair_that_cannot_mesh_is_refused():
    m = kl.Model()
    a = m.add_link("a")
    b = m.add_link("b")
    ja = m.add_revolute(kl.GROUND, (0, 0), a, (0, 0))
    jb = m.add_revolute(kl.GROUND, (30, 0), b, (0, 0))
    with pytest.raises(kl.KinloopError) as err:
        m.add_gear_pair(ja, jb, 12, 12)
    assert err.value.status == kl.Status.ENOMESH
    assert m.coupling_count == 0
