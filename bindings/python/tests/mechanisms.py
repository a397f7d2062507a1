"""What the binding tests share: the standard mechanisms (geometry chosen for
these tests), the closed forms they are checked against, a counting
allocator, and angle helpers."""

import ctypes
import ctypes.util
import dataclasses
import math

import kinloop as kl


def angle_diff(x, y):
    """x - y reduced to [-pi, pi)."""
    return (x - y + math.pi) % (2 * math.pi) - math.pi


@dataclasses.dataclass
class FourBar:
    """Ground pivots O2 = (0, 0) and O4 = (d, 0); crank a, coupler b, rocker
    c, each link's x-axis from its first joint to its second, so the link
    angles are the textbook theta2, theta3, theta4. Input 0 is the crank
    angle; point 0 is on the coupler at (b/2, b/4)."""
    model: kl.Model
    a: float
    b: float
    c: float
    d: float
    crank: int = 0
    coupler: int = 0
    rocker: int = 0
    pivot: int = 0
    crank_pin: int = 0
    rocker_pin: int = 0
    rocker_pivot: int = 0
    point: int = 0
    point_local: tuple = (0.0, 0.0)


def build_fourbar(a, b, c, d, model=None, finalize=True):
    m = model if model is not None else kl.Model()
    f = FourBar(m, a, b, c, d)
    f.crank = m.add_link("crank")
    f.coupler = m.add_link("coupler")
    f.rocker = m.add_link("rocker")
    f.pivot = m.add_revolute(kl.GROUND, (0, 0), f.crank, (0, 0))
    f.crank_pin = m.add_revolute(f.crank, (a, 0), f.coupler, (0, 0))
    f.rocker_pin = m.add_revolute(f.coupler, (b, 0), f.rocker, (c, 0))
    f.rocker_pivot = m.add_revolute(f.rocker, (0, 0), kl.GROUND, (d, 0))
    f.point_local = (b / 2, b / 4)
    f.point = m.add_point(f.coupler, f.point_local, "coupler point")
    m.add_input(f.pivot)
    if finalize:
        m.finalize()
    return f


def freudenstein(f, t2, branch):
    """(theta3, theta4) of the four-bar at crank angle t2 on `branch` (+1 or
    -1), or None where it cannot close.

    Freudenstein's equation in its half-angle tangent form, as given in
    standard machine-design texts (recalled from memory, the form
    tests/test_position.c uses): K1 = d/a, K2 = d/c,
    K3 = (a^2 - b^2 + c^2 + d^2) / (2 a c), A = cos t2 - K1 - K2 cos t2 + K3,
    B = -2 sin t2, C = K1 - (K2 + 1) cos t2 + K3,
    t4 = 2 atan((-B + branch sqrt(B^2 - 4 A C)) / (2 A)); the coupler angle
    follows from the loop. Because the form is recalled, the loop closure of
    the result is asserted too."""
    a, b, c, d = f.a, f.b, f.c, f.d
    k1, k2 = d / a, d / c
    k3 = (a * a - b * b + c * c + d * d) / (2 * a * c)
    A = math.cos(t2) - k1 - k2 * math.cos(t2) + k3
    B = -2 * math.sin(t2)
    C = k1 - (k2 + 1) * math.cos(t2) + k3
    disc = B * B - 4 * A * C
    if disc < 0:
        return None
    t4 = 2 * math.atan2(-B + branch * math.sqrt(disc), 2 * A)
    t3 = math.atan2(c * math.sin(t4) - a * math.sin(t2),
                    d + c * math.cos(t4) - a * math.cos(t2))
    ex = a * math.cos(t2) + b * math.cos(t3) - c * math.cos(t4) - d
    ey = a * math.sin(t2) + b * math.sin(t3) - c * math.sin(t4)
    assert math.hypot(ex, ey) < 1e-10 * d, "the recalled closed form does not close"
    return t3, t4


def fourbar_rates(f, t2, t3, t4, w2):
    """(omega3, omega4) by Cramer's rule on the differentiated loop
    equations, the textbook four-bar velocity result (docs/theory.md, 7)."""
    w3 = f.a * w2 * math.sin(t4 - t2) / (f.b * math.sin(t3 - t4))
    w4 = f.a * w2 * math.sin(t3 - t2) / (f.c * math.sin(t3 - t4))
    return w3, w4


def sketch_branch(solver, f, t2, branch):
    """Sets a rough sketch (0.15 rad off) near the closed form's branch."""
    t3, t4 = freudenstein(f, t2, branch)
    solver.set_link_angle(f.coupler, t3 + 0.15)
    solver.set_link_angle(f.rocker, t4 - 0.15)


@dataclasses.dataclass
class SliderCrank:
    """Offset slider-crank: crank r about (0, 0), rod l, block sliding on
    ground along y = e in +x (joint `slide`). Input 0 is the crank angle."""
    model: kl.Model
    r: float
    l: float
    e: float
    crank: int = 0
    rod: int = 0
    block: int = 0
    slide: int = 0


def build_slider_crank(r, l, e, through=False):
    """With through=True the slide line is given by two points
    (add_prismatic_through) instead of an axis angle."""
    m = kl.Model()
    s = SliderCrank(m, r, l, e)
    s.crank, s.rod, s.block = m.add_link("crank"), m.add_link("rod"), m.add_link("block")
    pivot = m.add_revolute(kl.GROUND, (0, 0), s.crank, (0, 0))
    m.add_revolute(s.crank, (r, 0), s.rod, (0, 0))
    m.add_revolute(s.rod, (l, 0), s.block, (0, 0))
    if through:
        s.slide = m.add_prismatic_through(kl.GROUND, (0, e), (l, e), s.block, (0, 0))
    else:
        s.slide = m.add_prismatic(kl.GROUND, (0, e), 0.0, s.block, (0, 0))
    m.add_input(pivot)
    m.finalize()
    return s


def slider_crank_closed_form(s, t, branch=1):
    """(slide x, rod angle) of the offset slider-crank (standard kinematics):
    x = r cos t + branch sqrt(l^2 - (e - r sin t)^2),
    rod angle atan2(e - r sin t, x - r cos t)."""
    h = s.e - s.r * math.sin(t)
    x = s.r * math.cos(t) + branch * math.sqrt(s.l * s.l - h * h)
    return x, math.atan2(h, x - s.r * math.cos(t))


class CountingAllocator:
    """An allocator hook over the C library's realloc and free that counts
    live blocks, can refuse its Nth allocation, and notices a free or a
    resize of a block it does not hold (which it then leaves alone)."""

    _libc = ctypes.CDLL(ctypes.util.find_library("c"))
    _libc.realloc.restype = ctypes.c_void_p
    _libc.realloc.argtypes = [ctypes.c_void_p, ctypes.c_size_t]
    _libc.free.restype = None
    _libc.free.argtypes = [ctypes.c_void_p]

    def __init__(self, fail_at=0):
        self.live = {}
        self.calls = 0
        self.fail_at = fail_at
        self.foreign = 0

    def __call__(self, ptr, old_size, new_size):
        if ptr and ptr not in self.live:
            self.foreign += 1
            return 0
        if new_size == 0:
            if ptr:
                del self.live[ptr]
                self._libc.free(ptr)
            return 0
        self.calls += 1
        if self.calls == self.fail_at:
            return 0
        block = self._libc.realloc(ptr or None, new_size)
        if block:
            self.live.pop(ptr, None)
            self.live[block] = new_size
        return block or 0
