% test_fsolve.m - kinloop against Octave's general-purpose fsolve on the
% same four-bar: the loop equations written out in Octave, solved with
% and without their Jacobian, at a set of crank angles.

% geometry chosen for this test: a crank-rocker (Grashof, crank shortest)
f = fourbar(30, 95, 70, 85);
with_jacobian = optimset('Jacobian', 'on', 'TolFun', 1e-14, 'TolX', 1e-14, ...
                         'MaxIter', 200);
without_jacobian = optimset('Jacobian', 'off', 'TolFun', 1e-14, 'TolX', 1e-14, ...
                            'MaxIter', 200);

s = kinloop.Solver(f.m);
% both start from the same sketch near one branch (the closed form moved
% by 0.1 rad) and continue from their last answer
[t3, t4] = freudenstein(f, 0, 1);
sketch = [t3 + 0.1; t4 - 0.1];
s.set_link_angle(f.coupler, sketch(1));
s.set_link_angle(f.rocker, sketch(2));
q_jac = sketch;
q_fd = sketch;
for deg = 0:20:340
  t2 = deg * pi / 180;
  % the loop equations and their Jacobian: fourbar_loop.m
  [q_jac, ~, info] = fsolve(@(q) fourbar_loop(q, t2, f), q_jac, with_jacobian);
  assert(info > 0, 'fsolve (Jacobian) did not converge at %d deg (info %d)', deg, info);
  [q_fd, ~, info] = fsolve(@(q) fourbar_loop(q, t2, f), q_fd, without_jacobian);
  assert(info > 0, 'fsolve (no Jacobian) did not converge at %d deg (info %d)', deg, info);
  s.solve_position(t2);
  got = s.link_angle([f.coupler; f.rocker]);
  % agreement with Octave's fsolve to 1e-9 rad, either way it was run
  assert(all(abs(angle_diff(got, q_jac)) <= 1e-9), ...
         'at %d deg kinloop %s, fsolve with Jacobian %s', deg, mat2str(got, 15), mat2str(q_jac, 15));
  assert(all(abs(angle_diff(got, q_fd)) <= 1e-9), ...
         'at %d deg kinloop %s, fsolve without Jacobian %s', deg, mat2str(got, 15), mat2str(q_fd, 15));
  % rates: the differentiated loop J qdot = -dF/dt2 solved by Octave's own
  % linear algebra (mldivide) at fsolve's position, against kinloop's
  s.solve_velocity(1);
  [~, J] = fourbar_loop(q_jac, t2, f);
  qdot = J \ -(f.a * [-sin(t2); cos(t2)]);
  assert(all(abs(s.link_rate([f.coupler; f.rocker]) - qdot) <= 1e-8 * max(1, abs(qdot))), ...
         'at %d deg kinloop rates %s, Octave %s', deg, ...
         mat2str(s.link_rate([f.coupler; f.rocker]), 12), mat2str(qdot, 12));
end
