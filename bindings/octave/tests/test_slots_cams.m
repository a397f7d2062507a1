% test_slots_cams.m - curved slots and cams through the binding: an
% eccentric disc cam as an arc slot against the offset slider-crank's
% closed form, and a cam's outline (kinloop.Cam) as a closed curve slot
% driving a follower.

% dimensions invented for this test
ecc = 12; radius = 48; offset = 5;
for curved = [false true]
  if curved
    c = kinloop.Cam();
    f = kinloop.cam_follower_init();
    f.base_radius = 40; f.roller_radius = 10;
    c.set_follower(f);
    c.set_program(struct('span', {pi, pi}, 'lift', {20, -20}, ...
                         'law', {'cycloidal', 'cycloidal'}));
    [pitch, surface] = c.outline(720);
    assert(all(abs(hypot(pitch(:, 1) - surface(:, 1), pitch(:, 2) - surface(:, 2)) - 10) < 1e-9));
    expect_error(@() c.outline(1e7 + 1), 'kinloop:ETOOLARGE');  % above KL_MAX_STEPS
  end
  m = kinloop.Model();
  cam = m.add_link('cam');
  follower = m.add_link('follower');
  drive = m.add_revolute(0, [0 0], cam, [0 0]);
  if curved
    m.add_prismatic(0, [0 0], pi / 2, follower, [0 0]);
    slot = m.add_curve_slot(cam, pitch', 1, follower, [0 0]);
    assert(m.curve_count(slot) == 720);
  else
    m.add_prismatic(0, [offset 0], pi / 2, follower, [0 0]);
    slot = m.add_arc_slot(cam, [ecc 0], radius, follower, [0 0]);
    assert(strcmp(m.joint_kind(slot), 'arc_slot') && m.slot_radius(slot) == radius);
  end
  m.add_input(drive);
  m.finalize();
  s = kinloop.Solver(m);
  if curved
    s.set_joint_slide(1, 50);
  else
    s.set_joint_slide(1, sqrt(radius^2 - (offset - ecc)^2));
    s.set_joint_slide(slot, radius * pi / 2);
  end
  for k = 0:7
    t = 2 * pi * k / 8;
    if curved
      s.set_joint_slide(slot, 720 * k / 8);
    end
    s.solve_position(t);
    if curved
      motion = c.motion(t);
      assert(abs(s.joint_slide(1) - (50 + motion(1))) < 1e-6, 'cam at %d', k);
    else
      % the offset slider-crank's closed form (crank ecc, rod radius)
      y = ecc * sin(t) + sqrt(radius^2 - (offset - ecc * cos(t))^2);
      assert(abs(s.joint_slide(1) - y) < 1e-9, 'disc at %d', k);
    end
  end
end
r = c.check(360, 60 * pi / 180);
assert(r.max_pressure > 0 && r.max_pressure < 60 * pi / 180);
try
  c.check(360, 5 * pi / 180);
  error('no error');
catch err
  assert(strcmp(err.identifier, 'kinloop:EPRESSURE'), err.identifier);
end
