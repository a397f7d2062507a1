% test_forces.m - the force figures over a cycle through the binding
% (Solver.cycle_summarize, Solver.cycle_table, hand-written commands):
% closed forms of a crank with a mass, the force stage solved sample by
% sample through the generated methods, Octave's trapz over the table,
% and errors that leave the solver as it was.

% ---- a crank with its centre of mass at r (chosen for this test: m, kg, s)
r = 0.1; mass = 2; inertia = 0.003; g = 9.81;
for with_gravity = [false true]
  m = kinloop.Model();
  crank = m.add_link('crank');
  pivot = m.add_revolute(0, [0 0], crank, [0 0]);
  m.add_input(pivot);
  m.set_link_mass(crank, mass, [r 0], inertia);
  if with_gravity
    m.set_gravity([0 -g]);
  end
  m.finalize();
  s = kinloop.Solver(m);
  s.solve_position(0);
  w = 5;
  if ~with_gravity
    % closed form (uniform circular motion): the pin pulls the centre of
    % mass inward with m r w^2; the motor does nothing; kinetic energy
    % (m r^2 + I) w^2 / 2
    t = s.cycle_table([], 'speed', w, 'steps', 36);
    u = t.input;
    assert(numel(u) == 37 && abs(u(end) - 2 * pi) < 1e-12);
    f = mass * r * w^2;
    assert(max(abs(t.joint_fx(:, pivot + 1) + f * cos(u))) < 1e-9);
    assert(max(abs(t.joint_fy(:, pivot + 1) + f * sin(u))) < 1e-9);
    assert(max(abs(t.effort)) < 1e-9 && max(abs(t.joint_moment)) < 1e-9);
    assert(max(abs(t.ground_fx - f * cos(u))) < 1e-9);
    assert(max(abs(t.kinetic_energy - (mass * r^2 + inertia) * w^2 / 2)) < 1e-12);
    assert(isequal(size(t.rows), [37, m.cycle_columns()]));
    [~, ~, joints] = s.cycle_summarize([], struct('speed', w, 'steps', 36));
    assert(abs(joints(pivot + 1).peak - f) < 1e-12 * f && abs(joints.rms - f) < 1e-12 * f);
  else
    % closed forms (a crank under its weight): T = m g r cos u, peak m g r
    % at 0, RMS m g r / sqrt(2); dE = 2 m g r, flywheel I = dE / (Cs w^2)
    % (common practice, no source); the pin's largest load at the bottom,
    % m r w^2 + m g
    cs = 0.05;
    [summary, inputs, joints] = s.cycle_summarize([], 'speed', w, 'speed_fluctuation', cs);
    mgr = mass * g * r;
    assert(strcmp(summary.sweep_status, 'OK') && summary.steps_done == 361);
    assert(abs(inputs.peak - mgr) < 1e-12 * mgr && abs(inputs.at) < 1e-12);
    assert(abs(inputs.rms - mgr / sqrt(2)) < 1e-12 * mgr);
    assert(abs(summary.energy_fluctuation - 2 * mgr) < 1e-12 * mgr);
    assert(abs(summary.flywheel_inertia - 2 * mgr / (cs * w^2)) < 1e-10);
    assert(abs(joints.peak - (mass * r * w^2 + mass * g)) < 1e-12 * mass * g);
    assert(abs(joints.at - 3 * pi / 2) < 1e-12);
  end
  clear s m
end

% ---- a crank-rocker with masses, gravity and loads (chosen for this test:
% mm, kg, s, forces in mN)
m = kinloop.Model();
crank = m.add_link('crank'); coupler = m.add_link('coupler'); rocker = m.add_link('rocker');
m.add_revolute(0, [0 0], crank, [0 0]);
m.add_revolute(crank, [40 0], coupler, [0 0]);
m.add_revolute(coupler, [120 0], rocker, [80 0]);
m.add_revolute(rocker, [0 0], 0, [100 0]);
tip = m.add_point(coupler, [60 30], 'tool');
m.add_input(0);
m.set_link_mass(crank, 0.2, [20 0], 30);
m.set_link_mass(coupler, 0.5, [60 10], 700);
m.set_link_mass(rocker, 0.4, [40 0], 250);
m.set_gravity([0 -9810]);
m.finalize();
loads = struct('kind', {'force', 'torque'}, 'id', {tip, rocker}, ...
               'fx', {1500, 0}, 'fy', {-800, 0}, 'torque', {0, 2e4});
s = kinloop.Solver(m);
s.set_link_angle(coupler, 0.9); s.set_link_angle(rocker, 1.9);
s.solve_position(0);
w = 8;
cycle = struct('speed', w, 'steps', 24, 'speed_fluctuation', 0.04);
t = s.cycle_table(loads, cycle);
nj = m.joint_count();

% the table against the generated force stage, state by state
d = kinloop.Solver(m);
d.set_link_angle(coupler, 0.9); d.set_link_angle(rocker, 1.9);
for k = 1:numel(t.input)
  d.solve_position(t.input(k));
  d.solve_velocity(w);
  d.solve_acceleration(0);
  effort = d.solve_forces(loads);
  assert(abs(t.effort(k) - effort) <= 1e-9 * max(1, abs(effort)), 'effort at sample %d', k);
  for j = 0:nj - 1
    fxy = d.joint_force(j);
    assert(norm([t.joint_fx(k, j + 1), t.joint_fy(k, j + 1)] - fxy) <= 1e-9 * max(1, norm(fxy)));
    assert(abs(t.joint_moment(k, j + 1) - d.joint_moment(j)) <= 1e-9 * max(1, abs(effort)));
  end
  ground = d.ground_force();
  assert(norm([t.ground_fx(k), t.ground_fy(k)] - ground(1:2)) <= 1e-9 * max(1, norm(ground(1:2))));
  assert(abs(t.ground_moment(k) - ground(3)) <= 1e-9 * max(1, abs(ground(3))));
end

% the summary against Octave's trapz over the same table
s.set_link_angle(coupler, 0.9); s.set_link_angle(rocker, 1.9);
s.solve_position(0);
[summary, inputs, joints] = s.cycle_summarize(loads, cycle);
u = t.input;
span = u(end) - u(1);
function check_figures(p, u, v, span, what)
  [~, k] = max(abs(v));
  want = [v(k), u(k), trapz(u, v) / span, sqrt(trapz(u, v.^2) / span)];
  got = [p.peak, p.at, p.mean, p.rms];
  assert(all(abs(got - want) <= 1e-9 * max(1, abs(v(k)))), '%s: %s against %s', what, ...
         mat2str(got, 10), mat2str(want, 10));
end
check_figures(inputs, u, t.effort, span, 'motor torque');
for j = 1:nj
  check_figures(joints(j), u, hypot(t.joint_fx(:, j), t.joint_fy(:, j)), span, ...
                sprintf('joint %d', j - 1));
end
check_figures(summary.shaking_force, u, hypot(t.ground_fx, t.ground_fy), span, 'shaking force');
check_figures(summary.shaking_moment, u, t.ground_moment, span, 'shaking moment');
excess = t.work - t.work(end) * (u - u(1)) / span;
de = max(excess) - min(excess);
assert(abs(summary.energy_fluctuation - de) <= 1e-9 * de);
assert(abs(summary.flywheel_inertia - de / (0.04 * w^2)) <= 1e-9 * summary.flywheel_inertia);

% ---- errors: each its status, the solver as it was
s.solve_position(0.4);
before = s.row();
expect_error(@() s.cycle_summarize([], 'steps', 0), 'kinloop:EINVAL');
expect_error(@() s.cycle_table([], 'spead', 3), 'kinloop:EINVAL');
expect_error(@() s.cycle_table([], 'steps', 2.5), 'kinloop:EINVAL');
expect_error(@() s.cycle_summarize([], 'speed', Inf), 'kinloop:ENONFINITE');
expect_error(@() s.cycle_summarize(struct('kind', 'torque', 'id', 9, 'torque', 1)), 'kinloop:EID');
assert(isequaln(s.row(), before));
clear s d m

% a parallelogram with a third parallel crank, declared redundant (chosen
% for this test): the forces are not determined
m = kinloop.Model();
c1 = m.add_link('crank'); c2 = m.add_link('rocker'); c3 = m.add_link('third');
bar = m.add_link('bar');
m.add_revolute(0, [0 0], c1, [0 0]);
m.add_revolute(0, [50 0], c2, [0 0]);
m.add_revolute(0, [100 0], c3, [0 0]);
m.add_revolute(c1, [30 0], bar, [0 0]);
m.add_revolute(c2, [30 0], bar, [50 0]);
m.add_revolute(c3, [30 0], bar, [100 0]);
m.add_input(0);
m.set_redundancy(1);
m.set_link_mass(bar, 1, [50 0], 100);
m.finalize();
s = kinloop.Solver(m);
for link = [c1 c2 c3]
  s.set_link_angle(link, 0.3);
end
s.set_link_angle(bar, 0);
s.solve_position(0.3);
err = expect_error(@() s.cycle_summarize([], 'speed', 3, 'steps', 12), 'kinloop:EINDETERMINATE');
assert(~isempty(strfind(err.message, 'redundan')));
expect_error(@() s.cycle_table([], 'speed', 3, 'steps', 12), 'kinloop:EINDETERMINATE');
assert(abs(s.link_angle(c1) - 0.3) < 1e-12);
clear s m

% ---- loads and the working speed recorded in the model
m = kinloop.Model();
crank = m.add_link('crank'); coupler = m.add_link('coupler'); rocker = m.add_link('rocker');
m.add_revolute(0, [0 0], crank, [0 0]);
m.add_revolute(crank, [40 0], coupler, [0 0]);
m.add_revolute(coupler, [120 0], rocker, [80 0]);
m.add_revolute(rocker, [0 0], 0, [100 0]);
tip = m.add_point(coupler, [60 30], 'tool');
m.add_input(0);
m.set_link_mass(coupler, 0.5, [60 10], 700);
assert(m.add_load(struct('kind', 'force', 'id', tip, 'fx', 1500, 'fy', -800)) == 0);
assert(m.add_load(struct('kind', 'torque', 'id', rocker, 'torque', 2e4)) == 1);
expect_error(@() m.add_load(struct('kind', 'torque', 'id', 9, 'torque', 1)), 'kinloop:EID');
expect_error(@() m.set_speed(0, 3, -0.5), 'kinloop:EINVAL');
m.set_speed(0, 8, 0.04);
m.finalize();
loads = m.loads();
assert(numel(loads) == 2 && strcmp(loads(1).kind, 'force') && loads(1).fy == -800);
assert(strcmp(loads(2).kind, 'torque') && loads(2).torque == 2e4);
[input, speed, cs] = m.speed();
assert(input == 0 && speed == 8 && cs == 0.04);
cycle = m.cycle();
assert(cycle.speed == 8 && cycle.steps == 360 && abs(cycle.to - 2 * pi) < 1e-15);
s = kinloop.Solver(m);
s.set_link_angle(coupler, 0.9); s.set_link_angle(rocker, 1.9);
s.solve_position(0);
[recorded, ~, joints_recorded] = s.cycle_summarize(m.loads(), m.cycle());
s.solve_position(0);
[given, ~, joints_given] = s.cycle_summarize(loads, 'speed', 8, 'speed_fluctuation', 0.04);
% the same figures (the second cycle starts where the first left the
% solver: equal to rounding)
assert(recorded.steps_done == 361 && given.steps_done == 361);
assert(abs(recorded.flywheel_inertia - given.flywheel_inertia) <= 1e-9 * given.flywheel_inertia);
assert(max(abs([joints_recorded.rms] - [joints_given.rms])) <= 1e-9 * max([joints_given.rms]));
clear s m

% a cycle struct with name-value pairs replacing its fields; a bad mix
m = kinloop.Model();
crank = m.add_link('crank');
m.add_revolute(0, [0 0], crank, [0 0]);
m.add_input(0);
m.set_link_mass(crank, 2, [0.1 0], 0.003);
m.finalize();
s = kinloop.Solver(m);
s.solve_position(0);
t = s.cycle_table([], struct('speed', 5, 'steps', 36), 'steps', 8);
assert(numel(t.input) == 9 && abs(max(hypot(t.joint_fx, t.joint_fy)) - 2 * 0.1 * 25) < 1e-12);
expect_error(@() s.cycle_table([], 'steps'), 'kinloop:EINVAL');
expect_error(@() s.cycle_table([], struct('speed', 5), 3, 4), 'kinloop:EINVAL');
clear s m
