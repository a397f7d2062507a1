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
    assert np.count_nonzero(w.kinds == kl.WorkspaceKind.BOUNDARY) >= len(w.kinds) - 4
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
    # room the binding would make for the vertices: refused before any
    # memory is asked for (a fuzzer's 2**31 - 1 once asked numpy for 32 GiB)
    for cap in (kl.MAX_STEPS + 1, 2**31 - 1):
        with pytest.raises(kl.KinloopError) as e:
            s.workspace(tip, cap=cap)
        assert e.value.status == kl.Status.ETOOLARGE and "KL_MAX_STEPS" in str(e.value)


def test_offset_pen_against_sampled_positions():
    """A pen off the arm's line, where folds run inside the workspace: the
    area against the pen's positions sampled over a fine grid of both
    inputs in both assemblies (the two-circle closed form of the wrist,
    then the pen on the left arm), counted on rasters of 200 and 400 cells
    a side and extrapolated (Richardson: the raster's excess on the boundary
    halves as the cells do)."""
    a1, b1, a2, b2, d, px, py = 1.0, 1.5, 0.8, 1.4, 1.2, 1.9, 0.5
    m = kl.Model()
    c1, c2 = m.add_link("c1"), m.add_link("c2")
    l1, l2 = m.add_link("l1"), m.add_link("l2")
    p1 = m.add_revolute(kl.GROUND, (0, 0), c1, (0, 0))
    p2 = m.add_revolute(kl.GROUND, (d, 0), c2, (0, 0))
    m.add_revolute(c1, (a1, 0), l1, (0, 0))
    m.add_revolute(c2, (a2, 0), l2, (0, 0))
    m.add_revolute(l1, (b1, 0), l2, (b2, 0))
    pen = m.add_point(l1, (px, py), "pen")
    m.add_input(p1)
    m.add_input(p2)
    m.finalize()
    w = kl.Solver(m).workspace(pen)
    assert np.count_nonzero(w.kinds == kl.WorkspaceKind.FOLD) > 0
    u1, u2 = np.meshgrid(np.linspace(0, 2 * np.pi, 2000, endpoint=False),
                         np.linspace(0, 2 * np.pi, 2000, endpoint=False))
    b1x, b1y = a1 * np.cos(u1), a1 * np.sin(u1)
    dx, dy = d + a2 * np.cos(u2) - b1x, a2 * np.sin(u2) - b1y
    span = np.hypot(dx, dy)
    ok = (span <= b1 + b2) & (span >= abs(b1 - b2))
    half = np.arccos(np.clip((b1 * b1 + span ** 2 - b2 * b2) / (2 * b1 * span), -1, 1))
    xs, ys = [], []
    for sign in (1, -1):
        th = np.arctan2(dy, dx) + sign * half
        xs.append((b1x + px * np.cos(th) - py * np.sin(th))[ok])
        ys.append((b1y + px * np.sin(th) + py * np.cos(th))[ok])
    x, y = np.concatenate(xs), np.concatenate(ys)
    box = [[w.result.xmin - 0.05, w.result.xmax + 0.05],
           [w.result.ymin - 0.05, w.result.ymax + 0.05]]
    areas = []
    for cells in (200, 400):
        h, xe, ye = np.histogram2d(x, y, bins=cells, range=box)
        areas.append(np.count_nonzero(h) * (xe[1] - xe[0]) * (ye[1] - ye[0]))
    sampled = 2 * areas[1] - areas[0]
    assert w.result.area == pytest.approx(sampled, rel=0.01)
