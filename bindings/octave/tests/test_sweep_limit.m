% test_sweep_limit.m - a sweep of a non-Grashof four-bar's input into its
% motion limit: KL_LIMIT at the toggle the law of cosines predicts, and a
% result struct whose rows are the delivered steps.

% geometry chosen for this test: 50 + 100 > 60 + 70, so no link turns fully
f = fourbar(70, 60, 50, 100);
% Grashof condition (s + l > p + q): a triple-rocker
name = f.m.grashof();
assert(strcmp(name, 'triple_rocker'), 'Grashof class: %s', name);
assert(strcmp(kinloop.grashof_str(6), 'triple-rocker'));
assert(strcmp(kinloop.grashof(f.d, f.a, f.b, f.c), name), ...
       'kinloop.grashof disagrees with the model''s class');

% The crank pin lies at distance L from the rocker pivot, with
% L^2 = a^2 + d^2 - 2 a d cos(t2) (law of cosines); coupler and rocker
% reach it only while L <= b + c, so the crank stops where L = b + c
% (they stretch into one line). |b - c| = 10 < L for every t2 here.
limit = acos((f.a^2 + f.d^2 - (f.b + f.c)^2) / (2 * f.a * f.d));

for direction = [1 -1]
  s = kinloop.Solver(f.m);
  [t3, t4] = freudenstein(f, 0, 1);
  s.set_link_angle(f.coupler, t3 + 0.1);
  s.set_link_angle(f.rocker, t4 - 0.1);
  steps = 36;
  r = s.sweep(0, 0, direction * pi, steps);
  assert(strcmp(r.status, 'LIMIT'), 'sweep ended with %s, not LIMIT: %s', r.status, r.message);
  % the library promises the limit to 1e-10; the closed form agrees to 1e-9
  assert(abs(r.limit_input - direction * limit) <= 1e-9, ...
         'limit at %.15g, law of cosines %.15g', r.limit_input, direction * limit);
  assert(~isempty(strfind(r.message, 'motion limit')), 'message: %s', r.message);
  % every step short of the limit is delivered, none beyond it
  inside = floor(limit / (pi / steps)) + 1;
  assert(r.steps_done == inside, 'steps_done %d, expected %d', r.steps_done, inside);
  assert(isequal(size(r.input), [inside 1]) && isequal(size(r.link_angle), [inside 4]));
  assert(max(abs(r.input - direction * (0:inside - 1).' * pi / steps)) <= 1e-15);
  % each row matches the closed form (Freudenstein, freudenstein.m) ...
  [t3, t4] = freudenstein(f, r.input, 1);
  assert(max(abs(angle_diff(r.link_angle(:, f.rocker + 1), t4))) <= 1e-10);
  assert(max(abs(angle_diff(r.link_angle(:, f.coupler + 1), t3))) <= 1e-10);
  % ... with the rates of a unit input rate (fourbar_rates.m: the textbook
  % relations), which grow without bound toward the limit
  w = fourbar_rates(f, r.input, 1);
  assert(max(abs(r.link_rate(:, f.rocker + 1) - w(:, 2)) ./ max(1, abs(w(:, 2)))) <= 1e-9);
  assert(max(abs(r.link_rate(:, f.coupler + 1) - w(:, 1)) ./ max(1, abs(w(:, 1)))) <= 1e-9);
  assert(all(r.link_rate(:, f.crank + 1) == 1) && all(r.link_accel(:, f.crank + 1) == 0));
  % accelerations at zero input acceleration are d(rate)/d(input): central
  % differences of the closed-form rate, step 1e-6 rad (truncation ~1e-12
  % times the third derivative, rounding ~1e-10: far below the 1e-6 allowed)
  h = 1e-6;
  k = (2:inside - 1).';
  fd = (fourbar_rates(f, r.input(k) + h, 1) - fourbar_rates(f, r.input(k) - h, 1)) / (2 * h);
  assert(max(abs(r.link_accel(k, f.rocker + 1) - fd(:, 2)) ./ max(1, abs(fd(:, 2)))) <= 1e-6);
  % revolute joints have no slide: NaN columns; points are recorded
  assert(all(isnan(r.joint_slide(:))));
  assert(isequal(size(r.point_x), [inside 1]) && all(isfinite(r.point_vx)));
  % the solver holds the last delivered step
  assert(s.input_value(0) == r.input(end));
  clear s
end
