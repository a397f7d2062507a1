"""Kinematic coefficients against SymPy: the loop equations written
symbolically, differentiated implicitly (the linear systems of the once- and
twice-differentiated equations solved for the derivatives), evaluated at
kinloop's solution, compared with the Solver's coefficient getters."""

import math

import pytest
import sympy as sp

import kinloop as kl
from mechanisms import build_fourbar, build_slider_crank, sketch_branch


class ImplicitDerivatives:
    """First and second derivatives of the unknowns (functions of u) that
    keep loop(u) = 0, as expressions in u and symbols for the unknowns'
    values (`values`).

    Differentiating F(u, q(u)) = 0 once gives J q' = -F_u, twice
    J q'' = -(the rest); both are linear, solved by LU in SymPy."""

    def __init__(self, loop, unknowns, u):
        self.unknowns = unknowns
        self.u = u
        self.values = sp.symbols("q0:%d" % len(unknowns))
        self.firsts = sp.symbols("dq0:%d" % len(unknowns))
        self.seconds = sp.symbols("ddq0:%d" % len(unknowns))
        matrix, rhs = sp.linear_eq_to_matrix([self.plain(e) for e in loop.diff(u)],
                                             self.firsts)
        self.first = dict(zip(self.firsts, matrix.LUsolve(rhs)))
        matrix, rhs = sp.linear_eq_to_matrix(
            [self.plain(e).subs(self.first) for e in loop.diff(u, 2)], self.seconds)
        self.second = dict(zip(self.seconds, matrix.LUsolve(rhs)))

    def plain(self, expr):
        """expr with the derivatives and the unknowns as plain symbols."""
        expr = expr.subs({sp.Derivative(q, (self.u, 2)): s
                          for q, s in zip(self.unknowns, self.seconds)})
        expr = expr.subs({sp.Derivative(q, self.u): s
                          for q, s in zip(self.unknowns, self.firsts)})
        return expr.subs(dict(zip(self.unknowns, self.values)))

    def function(self, expr):
        """A numeric function of (u, unknowns' values) for a derivative
        expression of u and the unknowns."""
        expr = self.plain(expr).subs(self.second).subs(self.first)
        return sp.lambdify((self.u,) + tuple(self.values), expr)

    def derivative(self, k, order):
        return self.function(sp.Derivative(self.unknowns[k], (self.u, order)))


def test_fourbar_coefficients_match_sympy():
    a, b, c, d = 40.0, 120.0, 80.0, 100.0  # crank-rocker, chosen for this test
    t2 = sp.Symbol("t2")
    t3, t4 = sp.Function("t3")(t2), sp.Function("t4")(t2)
    # the four-bar loop (docs/theory.md, 7; the textbook vector loop)
    loop = sp.Matrix([a * sp.cos(t2) + b * sp.cos(t3) - c * sp.cos(t4) - d,
                      a * sp.sin(t2) + b * sp.sin(t3) - c * sp.sin(t4)])
    implicit = ImplicitDerivatives(loop, [t3, t4], t2)
    d1 = [implicit.derivative(k, 1) for k in range(2)]
    d2 = [implicit.derivative(k, 2) for k in range(2)]
    # the coupler point (px, py) on link 3: crank pin plus R(theta3) p
    px, py = b / 2, b / 4
    point = sp.Matrix([a * sp.cos(t2) + px * sp.cos(t3) - py * sp.sin(t3),
                       a * sp.sin(t2) + px * sp.sin(t3) + py * sp.cos(t3)])
    p1 = [implicit.function(e) for e in point.diff(t2)]
    p2 = [implicit.function(e) for e in point.diff(t2, 2)]

    f = build_fourbar(a, b, c, d)
    assert f.point_local == (px, py)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 0.0, +1)
    w2, alpha2 = 3.0, -2.0  # crank rate and acceleration, chosen for this test
    for k in range(0, 360, 10):
        u = math.radians(k)
        s.solve_position(u)
        assert s.solve_coefficients() == kl.Status.OK
        at = (u, s.link_angle(f.coupler), s.link_angle(f.rocker))
        for link, first_fn, second_fn in ((f.coupler, d1[0], d2[0]),
                                          (f.rocker, d1[1], d2[1])):
            assert s.link_angle_deriv(link, 0) == pytest.approx(first_fn(*at), abs=1e-10)
            assert s.link_angle_deriv2(link, 0, 0) == pytest.approx(second_fn(*at), abs=1e-10)
        assert s.point_deriv(f.point, 0) == pytest.approx((p1[0](*at), p1[1](*at)), abs=1e-10)
        assert s.point_deriv2(f.point, 0, 0) == pytest.approx((p2[0](*at), p2[1](*at)), abs=1e-10)
        assert s.output_deriv(kl.Output.link_angle(f.rocker), 0) == pytest.approx(
            d1[1](*at), abs=1e-10)
        # the stages by the chain rule: omega = q' w2, alpha = q'' w2^2 + q' alpha2
        s.solve_velocity(w2)
        s.solve_acceleration(alpha2)
        assert s.link_rate(f.rocker) == pytest.approx(d1[1](*at) * w2, abs=1e-9)
        assert s.link_accel(f.rocker) == pytest.approx(
            d2[1](*at) * w2 ** 2 + d1[1](*at) * alpha2, abs=1e-9)
        ax, ay = s.point_acceleration(f.point)
        assert ax == pytest.approx(p2[0](*at) * w2 ** 2 + p1[0](*at) * alpha2, abs=1e-8)
        assert ay == pytest.approx(p2[1](*at) * w2 ** 2 + p1[1](*at) * alpha2, abs=1e-8)


def test_slider_crank_slide_coefficients_match_sympy():
    r, l, e = 30.0, 100.0, 12.0  # chosen for this test
    t = sp.Symbol("t")
    phi, x = sp.Function("phi")(t), sp.Function("x")(t)
    # crank, rod, then back along the slide line y = e
    loop = sp.Matrix([r * sp.cos(t) + l * sp.cos(phi) - x,
                      r * sp.sin(t) + l * sp.sin(phi) - e])
    implicit = ImplicitDerivatives(loop, [phi, x], t)
    dx1, dx2 = implicit.derivative(1, 1), implicit.derivative(1, 2)
    sc = build_slider_crank(r, l, e)
    s = kl.Solver(sc.model)
    s.set_link_angle(sc.rod, -0.1)
    s.set_joint_slide(sc.slide, 120.0)
    for k in range(0, 360, 15):
        u = math.radians(k)
        s.solve_position(u)
        s.solve_coefficients()
        at = (u, s.link_angle(sc.rod), s.joint_slide(sc.slide))
        assert s.joint_slide_deriv(sc.slide, 0) == pytest.approx(dx1(*at), abs=1e-10)
        assert s.joint_slide_deriv2(sc.slide, 0, 0) == pytest.approx(dx2(*at), abs=1e-10)
