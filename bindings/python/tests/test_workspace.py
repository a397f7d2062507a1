"""The workspace of a point through the bindings: the five-bar's tip against
the intersection of its two annuli (the closed form derived in
tests/test_workspace.c), its area against SciPy's quadrature of the
intersection's width, and bad input."""

import math

import numpy as np
import pytest
from scipy import integrate

import kinloop as kl
from mechanisms import build_fourbar

# geometry chosen for this test: cranks 1.2 and 1.0, arms 1.6 and 1.5, pivots
# 1.0 apart; outer circles 2.8 about (0, 0) and 2.5 about (1, 0) cross, and
# the inner circles 0.4 and 0.5 lie inside the other annulus, apart
A1, B1, A2, B2, D = 1.2, 1.6, 1.0, 1.5, 1.0
CIRCLES = [(0.0, A1 + B1), (0.0, B1 - A1), (D, A2 + B2), (D, B2 - A2)]


def fivebar():
    m = kl.Model()
    c1, c2 = m.add_link("left crank"), m.add_link("right crank")
    l1, l2 = m.add_link("left arm"), m.add_link("right arm")
    p1 = m.add_revolute(kl.GROUND, (0, 0), c1, (0, 0))
    p2 = m.add_revolute(kl.GROUND, (D, 0), c2, (0, 0))
    m.add_revolute(c1, (A1, 0), l1, (0, 0))
    m.add_revolute(c2, (A2, 0), l2, (0, 0))
    m.add_revolute(l1, (B1, 0), l2, (B2, 0))
    tip = m.add_point(l1, (B1, 0), "tip")
    m.add_input(p1)
    m.add_input(p2)
    m.finalize()
    return m, tip


def width(y):
    """The intersection of the annuli at height y, exactly: the overlap of
    each annulus's one or two intervals of x."""
    def intervals(c, ri, ro):
        if abs(y) >= ro:
            return []
        o = math.sqrt(ro * ro - y * y)
        if abs(y) >= ri:
            return [(c - o, c + o)]
        i = math.sqrt(ri * ri - y * y)
        return [(c - o, c - i), (c + i, c + o)]
    return sum(max(0.0, min(p[1], q[1]) - max(p[0], q[0]))
               for p in intervals(0.0, B1 - A1, A1 + B1)
               for q in intervals(D, B2 - A2, A2 + B2))


def test_fivebar_workspace_is_the_annuli_intersection():
    m, tip = fivebar()
    s = kl.Solver(m)
    w = s.workspace(tip, cap=64)  # grows until the curves fit
    assert w.result.vertices == len(w.xy) > 100
    miss = np.min([np.abs(np.hypot(w.xy[:, 0] - c, w.xy[:, 1]) - r)
                   for c, r in CIRCLES], axis=0)
    assert miss.max() < 1e-9
    assert np.count_nonzero(w.kind == kl.WorkspaceKind.BOUNDARY) >= len(w.kind) - 4
    # SciPy's adaptive quadrature of the width (QUADPACK), with the corners
    # and the circles' tops as break points
    reference, _ = integrate.quad(width, -2.8, 2.8, limit=400, epsabs=1e-12,
                                  points=[-0.5, -0.4, 0.4, 0.5, -2.5, 2.5])
    assert w.result.area == pytest.approx(reference, rel=1e-4)
    assert math.isnan(s.input_value(0))  # the solver kept its state


def test_bad_input():
    f = build_fourbar(40, 120, 80, 100)
    with pytest.raises(kl.KinloopError) as e:
        kl.Solver(f.model).workspace(f.point)
    assert e.value.status == kl.Status.EDOF and "two inputs" in str(e.value)
    m, tip = fivebar()
    s = kl.Solver(m)
    with pytest.raises(kl.KinloopError) as e:
        s.workspace(tip, step=math.nan)
    assert e.value.status == kl.Status.ENONFINITE
    with pytest.raises(kl.KinloopError) as e:
        s.workspace(tip, grid=2)
    assert e.value.status == kl.Status.EINVAL
    with pytest.raises(kl.KinloopError) as e:
        s.workspace(17)
    assert e.value.status == kl.Status.EID
