"""A six-bar with a slider against SciPy's scipy.optimize.root (MINPACK's
hybrid method) on a different formulation: absolute body coordinates
(x, y, phi) per moving link instead of kinloop's vector loops.

The mechanism (geometry chosen for this test): a crank-rocker four-bar
(crank 40, coupler 120, rocker 80, ground 100; Grashof 40 + 120 < 80 + 100)
whose rocker carries a second pin at (60, 30), driving through a rod of 150
a block that slides on ground along y = 130. Links 5 and joints 7:
Gruebler 3 * 5 - 2 * 7 = 1, two loops."""

import math

import numpy as np
import pytest
from scipy import optimize

import kinloop as kl
from mechanisms import angle_diff

A, B, C, D = 40.0, 120.0, 80.0, 100.0
ROD_PIN, ROD, RAIL_Y = (60.0, 30.0), 150.0, 130.0
CRANK, COUPLER, ROCKER, LINK_ROD, BLOCK = 1, 2, 3, 4, 5

# (kind, link a, point on a, [axis angle,] link b, point on b)
JOINTS = [
    ("revolute", kl.GROUND, (0.0, 0.0), CRANK, (0.0, 0.0)),
    ("revolute", CRANK, (A, 0.0), COUPLER, (0.0, 0.0)),
    ("revolute", COUPLER, (B, 0.0), ROCKER, (C, 0.0)),
    ("revolute", ROCKER, (0.0, 0.0), kl.GROUND, (D, 0.0)),
    ("revolute", ROCKER, ROD_PIN, LINK_ROD, (0.0, 0.0)),
    ("revolute", LINK_ROD, (ROD, 0.0), BLOCK, (0.0, 0.0)),
    ("prismatic", kl.GROUND, (0.0, RAIL_Y), 0.0, BLOCK, (0.0, 0.0)),
]
SLIDE_JOINT = 6
POINTS = [(COUPLER, (60.0, 25.0)), (LINK_ROD, (75.0, -10.0))]
# a rough sketch of the wanted assembly, read off a drawing at crank angle 0
SKETCH = {COUPLER: 0.7, ROCKER: 1.0, LINK_ROD: -0.3, BLOCK: 0.0}


def build_sixbar():
    m = kl.Model()
    for name in ("crank", "coupler", "rocker", "rod", "block"):
        m.add_link(name)
    for joint in JOINTS:
        if joint[0] == "revolute":
            m.add_revolute(*joint[1:])
        else:
            m.add_prismatic(*joint[1:])
    for link, p in POINTS:
        m.add_point(link, p)
    m.add_input(0)
    m.finalize()
    return m


def rot(phi):
    c, s = math.cos(phi), math.sin(phi)
    return np.array([[c, -s], [s, c]])


def body(z, link):
    """(origin, angle) of a link in the body-coordinate vector z."""
    if link == kl.GROUND:
        return np.zeros(2), 0.0
    k = 3 * (link - 1)
    return z[k:k + 2], z[k + 2]


def residuals(z, crank_angle):
    """Revolute: r_a + R(phi_a) p_a = r_b + R(phi_b) p_b. Prismatic: b's
    point on a's line (cross product of the line direction with the offset
    from a's point is zero) and phi_b - phi_a = 0. Driver: phi_crank = u."""
    out = []
    for joint in JOINTS:
        if joint[0] == "revolute":
            _, a, pa, b, pb = joint
            (ra, fa), (rb, fb) = body(z, a), body(z, b)
            out.extend(ra + rot(fa) @ pa - rb - rot(fb) @ pb)
        else:
            _, a, pa, axis, b, pb = joint
            (ra, fa), (rb, fb) = body(z, a), body(z, b)
            direction = rot(fa) @ (math.cos(axis), math.sin(axis))
            offset = rb + rot(fb) @ pb - ra - rot(fa) @ pa
            out.append(direction[0] * offset[1] - direction[1] * offset[0])
            out.append(fb - fa)
    out.append(body(z, CRANK)[1] - crank_angle)
    return np.array(out)


def sketch_guess():
    """Body coordinates from the sketch angles, walking the joints."""
    z = np.zeros(15)
    z[3:5], z[5] = (A, 0.0), SKETCH[COUPLER]
    z[6:8], z[8] = (D, 0.0), SKETCH[ROCKER]
    rod_pin = np.array([D, 0.0]) + rot(SKETCH[ROCKER]) @ ROD_PIN
    z[9:11], z[11] = rod_pin, SKETCH[LINK_ROD]
    z[12:14], z[14] = (rod_pin[0] + 140.0, RAIL_Y), SKETCH[BLOCK]
    return z


def test_sixbar_positions_agree_with_scipy_body_coordinates():
    m = build_sixbar()
    assert (m.dof, m.loop_count) == (1, 2)
    s = kl.Solver(m)
    for link, angle in SKETCH.items():
        s.set_link_angle(link, angle)
    z = sketch_guess()
    for k in range(37):
        u = math.radians(10 * k)
        s.solve_position(u)
        # each SciPy solve starts from its own previous solution
        sol = optimize.root(residuals, z, args=(u,), method="hybr",
                            options={"xtol": 1e-14})
        z = sol.x
        assert np.abs(residuals(z, u)).max() < 1e-11  # SciPy did converge
        for link in range(1, 6):
            origin, phi = body(z, link)
            # 1e-9: kinloop stops at |F| <= 1e-12 * scale and keeps the last
            # iterate; its unapplied correction moves points by < 1e-9 here
            assert abs(angle_diff(s.link_angle(link), phi)) <= 1e-9
            assert s.link_origin(link) == pytest.approx(tuple(origin), abs=1e-9)
        block_origin = body(z, BLOCK)[0]
        assert s.joint_slide(SLIDE_JOINT) == pytest.approx(block_origin[0], abs=1e-9)
        for point, (link, p) in enumerate(POINTS):
            origin, phi = body(z, link)
            expected = origin + rot(phi) @ p
            assert s.point_position(point) == pytest.approx(tuple(expected), abs=1e-9)


def test_sixbar_sweep_agrees_with_scipy_body_coordinates():
    m = build_sixbar()
    s = kl.Solver(m)
    for link, angle in SKETCH.items():
        s.set_link_angle(link, angle)
    r = s.sweep(0, 0.0, 2 * math.pi, 72)
    assert r.status == kl.Status.OK
    z = sketch_guess()
    for k, u in enumerate(r.input):
        z = optimize.root(residuals, z, args=(u,), method="hybr",
                          options={"xtol": 1e-14}).x
        assert np.abs(residuals(z, u)).max() < 1e-11
        for link in range(1, 6):
            assert abs(angle_diff(r.link_angle[k, link], body(z, link)[1])) <= 1e-9
        assert r.joint_slide[k, SLIDE_JOINT] == pytest.approx(body(z, BLOCK)[0][0], abs=1e-9)
        for point, (link, p) in enumerate(POINTS):
            origin, phi = body(z, link)
            expected = origin + rot(phi) @ p
            assert (r.point_x[k, point], r.point_y[k, point]) == pytest.approx(
                tuple(expected), abs=1e-9)
