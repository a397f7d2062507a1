% test_slider_crank.m - sliding joints through the binding: an offset
% slider-crank against its closed form, built once with the slide line
% given by an axis angle and once by two points on it.

% geometry chosen for this test: crank r, rod l, slider line y = e
r = 25; l = 90; e = 10;
for through = [false true]
  m = kinloop.Model();
  crank = m.add_link('crank');
  rod = m.add_link('rod');
  block = m.add_link('block');
  pivot = m.add_revolute(0, [0 0], crank, [0 0]);
  m.add_revolute(crank, [r 0], rod, [0 0]);
  m.add_revolute(rod, [l 0], block, [0 0]);
  if through
    slide = m.add_prismatic_through(0, [0 e], [1 e], block, [0 0]);
  else
    slide = m.add_prismatic(0, [0 e], 0, block, [0 0]);
  end
  m.add_input(pivot);
  m.finalize();
  assert(strcmp(m.joint_kind(slide), 'prismatic') && m.joint_axis(slide) == 0);
  s = kinloop.Solver(m);
  s.set_link_angle(rod, -0.1);
  s.set_joint_slide(slide, 100);
  for deg = 0:10:360
    t = deg * pi / 180;
    s.solve_position(t);
    s.solve_velocity(1);
    % offset slider-crank closed form (standard kinematics, as in
    % tests/test_position.c): h = e - r sin t, x = r cos t + sqrt(l^2 - h^2),
    % and its derivative dx/dt = -r sin t + h r cos t / sqrt(l^2 - h^2)
    h = e - r * sin(t);
    x = r * cos(t) + sqrt(l^2 - h^2);
    xdot = -r * sin(t) + h * r * cos(t) / sqrt(l^2 - h^2);
    assert(abs(s.joint_slide(slide) - x) <= 1e-10 * l, 'slide at %d deg', deg);
    assert(abs(s.joint_slide_rate(slide) - xdot) <= 1e-9 * l, 'slide rate at %d deg', deg);
    assert(abs(angle_diff(s.link_angle(rod), atan2(h, x - r * cos(t)))) <= 1e-10);
    % the prismatic lock keeps the block at ground's angle
    assert(s.link_angle(block) == 0);
    assert(norm(s.link_origin(block) - [x e]) <= 1e-10 * l);
    % frame origins' motion: the block's origin runs with the slide; the
    % rod's is the crank pin, on a circle of radius r (at unit crank rate
    % and no crank acceleration, velocity r (-sin t, cos t) and the
    % centripetal acceleration -r (cos t, sin t))
    s.solve_acceleration(0);
    assert(norm(s.link_origin_velocity(block) - [xdot 0]) <= 1e-9 * l);
    assert(norm(s.link_origin_velocity(rod) - r * [-sin(t) cos(t)]) <= 1e-9 * l);
    assert(norm(s.link_origin_accel(rod) + r * [cos(t) sin(t)]) <= 1e-9 * l);
    assert(isnan(s.joint_slide(pivot)), 'a revolute joint has no slide');
  end
  clear s m
end
