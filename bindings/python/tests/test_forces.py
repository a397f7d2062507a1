"""The force stage through the bindings: the force figures over a cycle
(Solver.cycle_summarize, Solver.cycle_table, hand-written) against closed
forms of a crank with a mass and of a slider-crank, against the force stage
solved sample by sample through the generated methods (solve_forces,
joint_force, joint_moment, ground_force), and against the figures numpy
computes from the table; errors and the solver left unchanged."""

import math

import numpy as np
import pytest

import kinloop as kl
from mechanisms import SliderCrank, build_fourbar, slider_crank_closed_form

# geometry, masses and speeds chosen for these tests (lengths in m, kg, s)
R, MASS, INERTIA, G = 0.1, 2.0, 0.003, 9.81


def crank_with_a_mass(gravity=True):
    """One crank about (0, 0), its centre of mass at (R, 0) of its frame."""
    m = kl.Model()
    crank = m.add_link("crank")
    pivot = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    m.add_input(pivot)
    m.set_link_mass(crank, MASS, (R, 0.0), INERTIA)
    if gravity:
        m.set_gravity((0.0, -G))
    m.finalize()
    solver = kl.Solver(m)
    solver.solve_position([0.0])
    return m, solver, pivot


def test_a_crank_with_a_mass_at_constant_speed_carries_m_r_w2():
    # closed form (uniform circular motion): the pin pulls the centre of
    # mass inward with m r w^2, the motor does nothing, the kinetic energy
    # is (m r^2 + I) w^2 / 2; the frame feels the opposite pull
    m, s, pivot = crank_with_a_mass(gravity=False)
    w = 12.0
    t = s.cycle_table(speed=w, steps=36)
    assert len(t) == 37
    u = t["input"]
    np.testing.assert_allclose(u, np.linspace(0, 2 * math.pi, 37), atol=1e-12)
    force = MASS * R * w * w
    np.testing.assert_allclose(t["joint"]["fx"][:, pivot], -force * np.cos(u), atol=1e-9)
    np.testing.assert_allclose(t["joint"]["fy"][:, pivot], -force * np.sin(u), atol=1e-9)
    # the driving torque is the pin's moment (kl_joint_moment of an input)
    np.testing.assert_allclose(t["effort"][:, 0], 0.0, atol=1e-9)
    np.testing.assert_allclose(t["joint"]["moment"][:, pivot], 0.0, atol=1e-9)
    np.testing.assert_allclose(t["ground"]["fx"], force * np.cos(u), atol=1e-9)
    np.testing.assert_allclose(t["ground"]["fy"], force * np.sin(u), atol=1e-9)
    np.testing.assert_allclose(t["ground"]["moment"], 0.0, atol=1e-9)
    np.testing.assert_allclose(t["kinetic_energy"], (MASS * R * R + INERTIA) * w * w / 2,
                               rtol=1e-12)
    np.testing.assert_allclose(t["work"], 0.0, atol=1e-9)

    figures = s.cycle_summarize(speed=w, steps=36)
    assert figures.sum.sweep_status == kl.Status.OK
    assert figures.sum.steps_done == 37
    (joint,) = figures.joint_peaks
    assert isinstance(joint, kl.CyclePeak)
    assert joint.peak == pytest.approx(force, rel=1e-12)
    assert joint.mean == pytest.approx(force, rel=1e-12)
    assert joint.rms == pytest.approx(force, rel=1e-12)
    assert figures.sum.shaking_force.rms == pytest.approx(force, rel=1e-12)
    assert figures.input_peaks[0].rms == pytest.approx(0.0, abs=1e-9)


def test_a_crank_against_gravity_gives_the_textbook_motor_and_flywheel_figures():
    # closed forms (statics of a crank under its weight): the motor holds
    # T = m g r cos u, peak m g r at u = 0, RMS m g r / sqrt(2) (the
    # trapezoid rule is exact for cos^2 over a whole period); the work above
    # the mean swings from -m g r to m g r, so dE = 2 m g r and the flywheel
    # I = dE / (Cs w^2) (common practice, no source); the pin carries
    # |m (a - g)|, largest at the bottom (u = 3 pi / 2): m r w^2 + m g
    m, s, pivot = crank_with_a_mass()
    w, cs = 5.0, 0.05
    figures = s.cycle_summarize(speed=w, steps=360, speed_fluctuation=cs)
    summary, (motor,), (pin,) = figures
    assert isinstance(summary, kl.CycleSummary)
    mgr = MASS * G * R
    assert motor.peak == pytest.approx(mgr, rel=1e-12) and motor.at == pytest.approx(0.0)
    assert motor.rms == pytest.approx(mgr / math.sqrt(2), rel=1e-12)
    assert motor.mean == pytest.approx(0.0, abs=1e-12)
    assert summary.energy_fluctuation == pytest.approx(2 * mgr, rel=1e-12)
    assert summary.energy_max_at == pytest.approx(math.pi / 2)
    assert summary.energy_min_at == pytest.approx(3 * math.pi / 2)
    assert summary.flywheel_inertia == pytest.approx(2 * mgr / (cs * w * w), rel=1e-12)
    assert pin.peak == pytest.approx(MASS * R * w * w + MASS * G, rel=1e-12)
    assert pin.at == pytest.approx(3 * math.pi / 2)
    assert math.isnan(summary.limit_input)
    # without a coefficient of speed fluctuation the flywheel is left out
    assert math.isnan(s.cycle_summarize(speed=w).sum.flywheel_inertia)


def test_a_slider_crank_against_the_energy_balance_closed_form():
    # a block of mass M on a massless in-line slider-crank at constant crank
    # speed w: the crank torque is T = M x'' dx/du = M w^2 x_uu x_u (power
    # balance T w = d/dt (M x'^2 / 2), derived here), with x(u) the
    # slider-crank closed form (standard kinematics) differentiated by hand:
    # h = e - r sin u, S = sqrt(l^2 - h^2), h' = -r cos u, h'' = r sin u,
    # x_u = -r sin u - h h' / S,
    # x_uu = -r cos u - (h'^2 + h h'') / S - h^2 h'^2 / S^3
    block_mass, w = 1.5, 30.0
    sc = build_slider_crank_with_mass(block_mass)
    s = kl.Solver(sc.model)
    s.set_joint_slide(sc.slide, 0.25)
    s.solve_position([0.0])
    t = s.cycle_table(speed=w, steps=72)
    u = t["input"]
    h = sc.e - sc.r * np.sin(u)
    S = np.sqrt(sc.l ** 2 - h ** 2)
    hd, hdd = -sc.r * np.cos(u), sc.r * np.sin(u)
    xu = -sc.r * np.sin(u) - h * hd / S
    xuu = -sc.r * np.cos(u) - (hd ** 2 + h * hdd) / S - h ** 2 * hd ** 2 / S ** 3
    torque = block_mass * w * w * xuu * xu
    scale = block_mass * w * w * sc.r * sc.r
    np.testing.assert_allclose(t["effort"][:, 0], torque, atol=1e-9 * scale)
    # and the block where the closed form puts it, on the branch sketched
    s.solve_position([1.0])
    assert s.joint_slide(sc.slide) == pytest.approx(slider_crank_closed_form(sc, 1.0)[0],
                                                    rel=1e-12)


def build_slider_crank_with_mass(block_mass):
    """An in-line slider-crank (r 0.05, l 0.2, as mechanisms.SliderCrank
    describes it; geometry chosen for this test) with a mass on the block,
    set before finalize."""
    m = kl.Model()
    sc = SliderCrank(m, 0.05, 0.2, 0.0)
    sc.crank, sc.rod, sc.block = m.add_link("crank"), m.add_link("rod"), m.add_link("block")
    pivot = m.add_revolute(kl.GROUND, (0, 0), sc.crank, (0, 0))
    m.add_revolute(sc.crank, (sc.r, 0), sc.rod, (0, 0))
    m.add_revolute(sc.rod, (sc.l, 0), sc.block, (0, 0))
    sc.slide = m.add_prismatic(kl.GROUND, (0, 0), 0.0, sc.block, (0, 0))
    m.add_input(pivot)
    m.set_link_mass(sc.block, block_mass, (0.0, 0.0), 0.0)
    m.finalize()
    return sc


def massive_fourbar():
    """A crank-rocker (geometry chosen for this test, mm, kg, s: forces in
    mN) with a mass on every link, gravity and a force on the coupler."""
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    m.set_link_mass(f.crank, 0.2, (20, 0), 30.0)
    m.set_link_mass(f.coupler, 0.5, (60, 10), 700.0)
    m.set_link_mass(f.rocker, 0.4, (40, 0), 250.0)
    m.set_gravity((0, -9810.0))
    m.finalize()
    loads = [kl.Load.force_at(f.point, (1500.0, -800.0)), kl.Load.torque_on(f.rocker, 2.0e4)]
    s = kl.Solver(m)
    s.set_link_angle(f.coupler, 0.9)
    s.set_link_angle(f.rocker, 1.9)
    s.solve_position([0.0])
    return f, s, loads


def test_the_table_is_the_force_stage_solved_sample_by_sample():
    # the hand-written cycle_table against the generated methods, state by
    # state: u' = w, u'' = 0 at each sample of the same range
    f, s, loads = massive_fourbar()
    w, steps = 8.0, 24
    t = s.cycle_table(loads, speed=w, steps=steps)
    assert len(t) == steps + 1
    direct = kl.Solver(f.model)  # from the same sketch as the table's
    direct.set_link_angle(f.coupler, 0.9)
    direct.set_link_angle(f.rocker, 1.9)
    for k, row in enumerate(t):
        direct.solve_position([row["input"]])
        direct.solve_velocity([w])
        direct.solve_acceleration([0.0])
        efforts = direct.solve_forces(loads)
        scale = 1e-9 * max(1.0, np.max(np.abs(row["effort"])))
        np.testing.assert_allclose(row["effort"], efforts, atol=scale, err_msg="sample %d" % k)
        for j in range(f.model.joint_count):
            fx, fy = direct.joint_force(j)
            fscale = 1e-9 * max(1.0, math.hypot(fx, fy))
            assert row["joint"]["fx"][j] == pytest.approx(fx, abs=fscale)
            assert row["joint"]["fy"][j] == pytest.approx(fy, abs=fscale)
            assert row["joint"]["moment"][j] == pytest.approx(direct.joint_moment(j),
                                                              abs=1e-9 * max(1.0, abs(efforts[0])))
        gx, gy, gm = direct.ground_force
        assert row["ground"]["fx"] == pytest.approx(gx, abs=1e-9 * max(1.0, abs(gx)))
        assert row["ground"]["fy"] == pytest.approx(gy, abs=1e-9 * max(1.0, abs(gy)))
        assert row["ground"]["moment"] == pytest.approx(gm, rel=1e-9, abs=1e-6)


def trapezoid_figures(u, values):
    """Peak (signed, largest magnitude), where, mean and RMS over equally
    spaced samples by the trapezoid rule (numpy, not the library)."""
    k = int(np.argmax(np.abs(values)))
    span = u[-1] - u[0]
    mean = np.trapz(values, u) / span
    rms = math.sqrt(np.trapz(values * values, u) / span)
    return values[k], u[k], mean, rms


def test_the_summary_is_its_table_s_figures():
    f, s, loads = massive_fourbar()
    w, cs = 8.0, 0.04
    t = s.cycle_table(loads, speed=w, steps=90)
    s.solve_position([0.0])
    s.set_link_angle(f.coupler, 0.9)
    s.set_link_angle(f.rocker, 1.9)
    s.solve_position([0.0])
    figures = s.cycle_summarize(loads, speed=w, steps=90, speed_fluctuation=cs)
    u = t["input"]

    def same(peak, values, what):
        want = trapezoid_figures(u, values)
        got = (peak.peak, peak.at, peak.mean, peak.rms)
        scale = max(1.0, abs(want[0]))
        np.testing.assert_allclose(got, want, atol=1e-9 * scale, err_msg=what)

    same(figures.input_peaks[0], t["effort"][:, 0], "motor torque")
    for j, peak in enumerate(figures.joint_peaks):
        same(peak, np.hypot(t["joint"]["fx"][:, j], t["joint"]["fy"][:, j]), "joint %d" % j)
    same(figures.sum.shaking_force, np.hypot(t["ground"]["fx"], t["ground"]["fy"]),
         "shaking force")
    same(figures.sum.shaking_moment, t["ground"]["moment"], "shaking moment")
    # the energy the motor puts in above its mean rate of work
    excess = t["work"] - t["work"][-1] * (u - u[0]) / (u[-1] - u[0])
    de = excess.max() - excess.min()
    assert figures.sum.energy_fluctuation == pytest.approx(de, rel=1e-9)
    assert figures.sum.energy_max_at == pytest.approx(u[np.argmax(excess)])
    assert figures.sum.flywheel_inertia == pytest.approx(de / (cs * w * w), rel=1e-9)


def test_a_cycle_stopped_by_a_motion_limit():
    f = build_fourbar(70, 50, 60, 100, finalize=False)  # a triple-rocker, chosen for this test
    f.model.set_link_mass(f.coupler, 0.3, (25, 0), 60.0)
    f.model.finalize()
    s = kl.Solver(f.model)
    s.set_link_angle(f.coupler, 0.5)
    s.set_link_angle(f.rocker, 1.6)
    s.solve_position([0.6])
    figures = s.cycle_summarize(cycle=kl.Cycle(from_=0.6, to=3.0, steps=120, speed=2.0))
    assert figures.sum.sweep_status == kl.Status.LIMIT
    assert 0.6 < figures.sum.limit_input < 3.0
    s.solve_position([0.6])
    t = s.cycle_table(cycle=kl.Cycle(from_=0.6, to=3.0, steps=120, speed=2.0))
    assert 1 < len(t) < 121 and len(t) == figures.sum.steps_done
    assert t["input"][-1] <= figures.sum.limit_input + 1e-12


def test_bad_cycles_raise_and_change_nothing():
    m, s, pivot = crank_with_a_mass()
    s.solve_position([0.4])
    row = s.row()
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_summarize(steps=0)
    assert e.value.status == kl.Status.EINVAL and "step" in e.value.message
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_table(speed_fluctuation=-1.0)
    assert e.value.status == kl.Status.EINVAL
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_summarize(speed=math.inf)
    assert e.value.status == kl.Status.ENONFINITE
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_table([kl.Load.torque_on(7, 1.0)])
    assert e.value.status == kl.Status.EID
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_summarize(input=3)
    assert e.value.status == kl.Status.EID
    with pytest.raises(kl.KinloopError) as e:
        s.cycle_table(steps=2.5)
    assert e.value.status == kl.Status.EINVAL
    for cycle in (3, b"", 1e308):  # no cycle at all: refused, like any struct argument
        with pytest.raises(kl.KinloopError) as e:
            s.cycle_table(cycle=cycle)
        assert e.value.status == kl.Status.EINVAL and "cycle" in e.value.message
    with pytest.raises(TypeError):
        s.cycle_summarize(spead=3.0)
    np.testing.assert_array_equal(s.row(), row)


def test_an_indeterminate_structure_has_no_cycle_figures():
    # a parallelogram with a third parallel crank, declared redundant
    # (geometry chosen for this test)
    m = kl.Model()
    c1, c2, c3, bar = (m.add_link(n) for n in ("crank", "rocker", "third", "bar"))
    pivot = m.add_revolute(kl.GROUND, (0, 0), c1, (0, 0))
    m.add_revolute(kl.GROUND, (50, 0), c2, (0, 0))
    m.add_revolute(kl.GROUND, (100, 0), c3, (0, 0))
    m.add_revolute(c1, (30, 0), bar, (0, 0))
    m.add_revolute(c2, (30, 0), bar, (50, 0))
    m.add_revolute(c3, (30, 0), bar, (100, 0))
    m.add_input(pivot)
    m.set_redundancy(1)
    m.set_link_mass(bar, 1.0, (50, 0), 100.0)
    m.finalize()
    s = kl.Solver(m)
    for link in (c1, c2, c3):
        s.set_link_angle(link, 0.3)
    s.set_link_angle(bar, 0.0)
    s.solve_position([0.3])
    for call in (s.cycle_summarize, s.cycle_table):
        with pytest.raises(kl.KinloopError) as e:
            call(speed=3.0, steps=12)
        assert e.value.status == kl.Status.EINDETERMINATE
        assert "redundan" in e.value.message
    assert s.link_angle(c1) == pytest.approx(0.3)


def test_the_table_dtype_is_the_c_row():
    f, s, loads = massive_fourbar()
    dtype = kl.values.cycle_table_dtype(1, f.model.joint_count)
    assert dtype.itemsize == 8 * f.model.cycle_columns
    assert dtype.names == ("input", "effort", "joint", "ground", "kinetic_energy", "work")
    assert dtype["joint"].base.names == ("fx", "fy", "moment")


def test_loads_and_the_working_speed_recorded_in_the_model():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    m.set_link_mass(f.coupler, 0.5, (60, 10), 700.0)
    assert m.add_load(kl.Load.force_at(f.point, (1500.0, -800.0))) == 0
    assert m.add_load(kl.Load.torque_on(f.rocker, 2.0e4)) == 1
    with pytest.raises(kl.KinloopError) as e:
        m.add_load(kl.Load.torque_on(9, 1.0))
    assert e.value.status == kl.Status.EID and m.load_count == 2
    with pytest.raises(kl.KinloopError) as e:
        m.set_speed(0, 3.0, -0.5)
    assert e.value.status == kl.Status.EINVAL
    m.set_speed(0, 8.0, 0.04)
    m.set_sweep(kl.SweepSettings(0, 0.0, math.pi, 30))
    m.finalize()
    assert m.loads == [kl.Load.force_at(f.point, (1500.0, -800.0)),
                       kl.Load.torque_on(f.rocker, 2.0e4)]
    assert m.speed == (0, 8.0, 0.04)
    assert m.cycle == kl.Cycle(input=0, from_=0.0, to=math.pi, steps=30, speed=8.0,
                               speed_fluctuation=0.04)
    s = kl.Solver(m)
    s.set_link_angle(f.coupler, 0.9)
    s.set_link_angle(f.rocker, 1.9)
    s.solve_position([0.0])
    recorded = s.cycle_summarize(m.loads, m.cycle)
    s.solve_position([0.0])
    given = s.cycle_summarize([kl.Load.force_at(f.point, (1500.0, -800.0)),
                               kl.Load.torque_on(f.rocker, 2.0e4)],
                              speed=8.0, to=math.pi, steps=30, speed_fluctuation=0.04)
    # the same figures (the second cycle starts from where the first left
    # the solver, so they agree to rounding, not bit for bit)
    assert recorded.sum.steps_done == given.sum.steps_done == 31
    for a, b in zip([recorded.sum.shaking_force] + recorded.joint_peaks + recorded.input_peaks,
                    [given.sum.shaking_force] + given.joint_peaks + given.input_peaks):
        assert (a.peak, a.at, a.mean, a.rms) == pytest.approx((b.peak, b.at, b.mean, b.rms),
                                                              rel=1e-9)
    assert recorded.sum.flywheel_inertia == pytest.approx(
        given.sum.flywheel_inertia, rel=1e-9)


def test_a_model_s_start_inputs_are_one_per_input():
    # a generated method of the model with an array per input (the start
    # the sweep settings give, 0 for the others)
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    f.model.set_sweep(kl.SweepSettings(0, 0.25, 1.0, 10))
    f.model.finalize()
    np.testing.assert_array_equal(f.model.start_inputs, [0.25])
