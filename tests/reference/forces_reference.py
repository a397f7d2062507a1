#!/usr/bin/python3
"""Independent reference for kinloop's force stage.

Runs forces_dump (its path is the first argument), which prints each test
machine and kinloop's joint forces, efforts and ground load at samples of
its motion, and checks them against a solution of its own written here
with NumPy, SciPy and SymPy, sharing nothing with lib/: absolute body
coordinates (each moving link's centre of mass and angle), the joints and
drives as constraint equations Phi(q, u) = 0 differentiated by SymPy,
positions by SciPy's root finder from kinloop's pose (which picks the
branch), velocities and accelerations from Phi_q qdot = -Phi_u udot and
Phi_q qddot = gamma, and the multipliers of the equations of motion
M qddot + Phi_q^T lambda = Q (Lagrange's method of the first kind), whose
parts on each body are the joint reactions and the drive efforts.

Tolerances: positions to 1e-9 of the machine's size; forces to 1e-10 of
the largest joint force of the sample, moments to 1e-10 of that force
times the machine's size (the rounding of 3n x 3n solves with entries up
to 1e3 and forces up to 1e6 is near 1e-13; any modelling error, such as a
gravity 1e-4 off, shows as 1e-5).
"""
import subprocess
import sys

import numpy as np
import scipy.linalg
import scipy.optimize
import sympy as sp

POSITION_TOL = 1e-9
FORCE_TOL = 1e-10


def rot(t):
    return sp.Matrix([[sp.cos(t), -sp.sin(t)], [sp.sin(t), sp.cos(t)]])


def perp(v):
    return sp.Matrix([-v[1], v[0]])


class Machine:
    def __init__(self, name):
        self.name = name
        self.gravity = (0.0, 0.0)
        self.links = {}      # id -> (mass, cx, cy, inertia)
        self.joints = []     # (kind, a, (ax, ay), b, (bx, by), axis)
        self.inputs = []     # joint ids
        self.points = {}     # id -> (link, x, y)
        self.loads = []      # ("force", point, fx, fy) | ("torque", link, t)
        self.samples = []


def parse(text):
    machines = []
    m = sample = None
    for line in text.splitlines():
        w = line.split()
        if not w:
            continue
        key, rest = w[0], w[1:]
        if key == "machine":
            m = Machine(" ".join(rest))
        elif key == "gravity":
            m.gravity = (float(rest[0]), float(rest[1]))
        elif key == "link":
            m.links[int(rest[0])] = tuple(float(x) for x in rest[1:5])
        elif key == "joint":
            m.joints.append((rest[1], int(rest[2]),
                             (float(rest[3]), float(rest[4])), int(rest[5]),
                             (float(rest[6]), float(rest[7])),
                             float(rest[8])))
        elif key == "input":
            m.inputs.append(int(rest[1]))
        elif key == "point":
            m.points[int(rest[0])] = (int(rest[1]), float(rest[2]),
                                      float(rest[3]))
        elif key == "load":
            if rest[0] == "force":
                m.loads.append(("force", int(rest[1]), float(rest[2]),
                                float(rest[3])))
            else:
                m.loads.append(("torque", int(rest[1]), float(rest[2])))
        elif key == "sample":
            sample = {"drive": {}, "pose": {}, "effort": {}, "force": {}}
            m.samples.append(sample)
        elif key == "drive":
            sample["drive"][int(rest[0])] = tuple(float(x) for x in rest[1:4])
        elif key == "pose":
            sample["pose"][int(rest[0])] = tuple(float(x) for x in rest[1:4])
        elif key == "effort":
            sample["effort"][int(rest[0])] = float(rest[1])
        elif key == "force":
            sample["force"][int(rest[0])] = tuple(float(x) for x in rest[1:4])
        elif key == "ground":
            sample["ground"] = tuple(float(x) for x in rest)
        elif key == "end":
            machines.append(m)
        else:
            raise ValueError("unexpected line: " + line)
    return machines


class Model:
    """The machine in body coordinates: q = (x, y, theta) of each moving
    link's centre of mass, in link order; ground fixed at the origin."""

    def __init__(self, m):
        self.m = m
        self.ids = sorted(m.links)
        self.col = {l: 3 * k for k, l in enumerate(self.ids)}
        n = 3 * len(self.ids)
        self.q = sp.symbols("q0:%d" % n)
        self.qd = sp.symbols("qd0:%d" % n)
        self.u = sp.symbols("u0:%d" % max(1, len(m.inputs)))
        self.rows = []       # (joint, what) for each constraint row
        phi = []
        for j, (kind, a, pa, b, pb, axis) in enumerate(m.joints):
            Pa, Pb = self.point(a, pa), self.point(b, pb)
            if kind == "revolute":
                phi += list(Pa - Pb)
                self.rows += [(j, "fx"), (j, "fy")]
            else:
                d = rot(self.angle(a)) * sp.Matrix([sp.cos(axis),
                                                    sp.sin(axis)])
                phi.append(perp(d).dot(Pb - Pa))
                self.rows.append((j, "normal"))
                if kind == "prismatic":
                    phi.append(self.angle(b) - self.angle(a))
                    self.rows.append((j, "lock"))
        for i, j in enumerate(m.inputs):
            kind, a, pa, b, pb, axis = m.joints[j]
            if kind == "revolute":
                phi.append(self.angle(b) - self.angle(a) - self.u[i])
            else:
                d = rot(self.angle(a)) * sp.Matrix([sp.cos(axis),
                                                    sp.sin(axis)])
                phi.append(d.dot(self.point(b, pb) - self.point(a, pa)) -
                           self.u[i])
            self.rows.append((j, "drive"))
        phi = sp.Matrix(phi)
        assert phi.shape[0] == n, "%s: %d constraints for %d coordinates" % (
            m.name, phi.shape[0], n)
        q, qd, u = sp.Matrix(self.q), sp.Matrix(self.qd), sp.Matrix(self.u)
        phi_q = phi.jacobian(q)
        phi_u = phi.jacobian(u)
        gamma = -(phi_q * qd).jacobian(q) * qd
        args = (self.q, self.u)
        self.phi = sp.lambdify(args, phi, "numpy")
        self.phi_q = sp.lambdify(args, phi_q, "numpy")
        self.phi_u = sp.lambdify(args, phi_u, "numpy")
        self.gamma = sp.lambdify((self.q, self.qd, self.u), gamma, "numpy")

    def angle(self, link):
        return 0 if link == 0 else self.q[self.col[link] + 2]

    def centre(self, link):
        if link == 0:
            return sp.Matrix([0, 0])
        c = self.col[link]
        return sp.Matrix([self.q[c], self.q[c + 1]])

    def offset(self, link):
        if link == 0:
            return (0.0, 0.0)
        mass, cx, cy, inertia = self.m.links[link]
        return (cx, cy)

    def point(self, link, p):
        """A point given in the link's frame, as a function of q."""
        c = self.offset(link)
        return self.centre(link) + rot(self.angle(link)) * sp.Matrix(
            [p[0] - c[0], p[1] - c[1]])


def arm(model, q, link, p):
    """Global vector from the link's centre of mass to its local point p."""
    if link == 0:
        return np.array(p, dtype=float)
    c = model.offset(link)
    t = q[model.col[link] + 2]
    v = np.array([p[0] - c[0], p[1] - c[1]])
    return np.array([[np.cos(t), -np.sin(t)], [np.sin(t), np.cos(t)]]) @ v


def global_point(model, q, link, p):
    if link == 0:
        return np.array(p, dtype=float)
    return q[model.col[link]:model.col[link] + 2] + arm(model, q, link, p)


def cross(a, b):
    return a[0] * b[1] - a[1] * b[0]


def solve_sample(model, s):
    m = model.m
    ni = len(m.inputs)
    u = np.array([s["drive"][i][0] for i in range(ni)])
    ud = np.array([s["drive"][i][1] for i in range(ni)])
    udd = np.array([s["drive"][i][2] for i in range(ni)])
    # the start: kinloop's pose (it picks the assembly mode)
    q0 = np.zeros(3 * len(model.ids))
    for l in model.ids:
        t, ox, oy = s["pose"][l]
        c = model.offset(l)
        q0[model.col[l]:model.col[l] + 3] = [
            ox + np.cos(t) * c[0] - np.sin(t) * c[1],
            oy + np.sin(t) * c[0] + np.cos(t) * c[1], t]
    sol = scipy.optimize.root(
        lambda q: np.asarray(model.phi(q, u), dtype=float).ravel(), q0,
        jac=lambda q: np.asarray(model.phi_q(q, u), dtype=float),
        method="hybr", options={"xtol": 1e-15})
    q = sol.x
    residual = np.max(np.abs(np.asarray(model.phi(q, u), float)))
    jq = np.asarray(model.phi_q(q, u), dtype=float)
    ju = np.asarray(model.phi_u(q, u), dtype=float)
    qd = np.linalg.solve(jq, -ju @ ud)
    gamma = np.asarray(model.gamma(q, qd, u), dtype=float).ravel()
    qdd = np.linalg.solve(jq, gamma - ju @ udd)
    # the equations of motion: M qdd + Phi_q^T lambda = Q
    n = len(q)
    mass_matrix = np.zeros((n, n))
    applied = np.zeros(n)
    g = np.array(m.gravity)
    for l in model.ids:
        mass, cx, cy, inertia = m.links[l]
        c = model.col[l]
        mass_matrix[c, c] = mass_matrix[c + 1, c + 1] = mass
        mass_matrix[c + 2, c + 2] = inertia
        applied[c:c + 2] += mass * g
    for load in m.loads:
        if load[0] == "force":
            link, px, py = m.points[load[1]]
            if link == 0:
                continue
            f = np.array([load[2], load[3]])
            c = model.col[link]
            applied[c:c + 2] += f
            applied[c + 2] += cross(arm(model, q, link, (px, py)), f)
        elif load[1] != 0:
            applied[model.col[load[1]] + 2] += load[2]
    lam = scipy.linalg.solve(jq.T, applied - mass_matrix @ qdd)
    # the multipliers' parts on each joint's link b (force a on b)
    joints = {j: [np.zeros(2), 0.0] for j in range(len(m.joints))}
    efforts = {}
    for row, (j, what) in enumerate(model.rows):
        kind, a, pa, b, pb, axis = m.joints[j]
        ta = 0.0 if a == 0 else q[model.col[a] + 2]
        d = np.array([np.cos(ta + axis), np.sin(ta + axis)])
        if what == "fx":
            joints[j][0][0] += lam[row]
        elif what == "fy":
            joints[j][0][1] += lam[row]
        elif what == "normal":
            joints[j][0] += -lam[row] * np.array([-d[1], d[0]])
        elif what == "lock":
            joints[j][1] += -lam[row]
        else:  # the drive: a torque on b, or a force on b along the slide
            i = m.inputs.index(j)
            efforts[i] = -lam[row]
            if kind == "revolute":
                joints[j][1] += -lam[row]
            else:
                joints[j][0] += -lam[row] * d
    ground = np.zeros(3)
    for j, (kind, a, pa, b, pb, axis) in enumerate(m.joints):
        if 0 not in (a, b):
            continue
        f, mom = joints[j]
        p = global_point(model, q, b, pb)
        sign = 1.0 if b == 0 else -1.0
        ground[:2] += sign * f
        ground[2] += sign * (cross(p, f) + mom)
    return q, q0, residual, efforts, joints, ground


def main():
    out = subprocess.run([sys.argv[1]], check=True, capture_output=True,
                         text=True).stdout
    machines = parse(out)
    failures = 0
    checked = 0
    for m in machines:
        model = Model(m)
        size = max(np.hypot(*p) for j in m.joints for p in (j[2], j[4]))
        size = max(size, 1.0)
        worst = 0.0
        for k, s in enumerate(m.samples):
            q, q0, residual, efforts, joints, ground = solve_sample(model, s)
            scale = max(np.hypot(*joints[j][0]) for j in joints)
            errors = [np.max(np.abs(q - q0)[0::3]) / size,
                      np.max(np.abs(q - q0)[1::3]) / size,
                      np.max(np.abs(q - q0)[2::3])]
            if residual > 1e-10 * size or max(errors) > POSITION_TOL:
                print("%s sample %d: positions differ by %s (residual %g)" %
                      (m.name, k, errors, residual))
                failures += 1
            for i, e in efforts.items():
                kind = m.joints[m.inputs[i]][0]
                unit = scale * size if kind == "revolute" else scale
                err = abs(s["effort"][i] - e) / unit
                worst = max(worst, err)
                if err > FORCE_TOL:
                    print("%s sample %d input %d: kinloop %.12g, reference "
                          "%.12g" % (m.name, k, i, s["effort"][i], e))
                    failures += 1
            for j, (f, mom) in joints.items():
                kf = np.array(s["force"][j][:2])
                err = max(np.hypot(*(kf - f)) / scale,
                          abs(s["force"][j][2] - mom) / (scale * size))
                worst = max(worst, err)
                if err > FORCE_TOL:
                    print("%s sample %d joint %d: kinloop %s, reference %s %g"
                          % (m.name, k, j, s["force"][j], f, mom))
                    failures += 1
            gerr = max(np.hypot(s["ground"][0] - ground[0],
                                s["ground"][1] - ground[1]) / scale,
                       abs(s["ground"][2] - ground[2]) / (scale * size * 10))
            worst = max(worst, gerr)
            if gerr > FORCE_TOL:
                print("%s sample %d ground: kinloop %s, reference %s" %
                      (m.name, k, s["ground"], ground))
                failures += 1
            checked += 1
        print("%-22s %d samples, largest relative difference %.2e" %
              (m.name, len(m.samples), worst))
    print("forces reference: %d samples of %d machines, %d differences "
          "beyond %g" % (checked, len(machines), failures, FORCE_TOL))
    return 1 if failures or checked == 0 else 0


if __name__ == "__main__":
    sys.exit(main())
