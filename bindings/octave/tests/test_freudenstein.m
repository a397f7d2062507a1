% test_freudenstein.m - a crank-rocker four-bar over a full turn on both
% assembly branches against Freudenstein's closed form, and its rates
% against the textbook velocity relations.

% geometry chosen for this test: Grashof (35 + 110 < 75 + 95), crank shortest
f = fourbar(35, 110, 75, 95);
% Grashof condition (input shortest, s + l < p + q): a crank-rocker
name = f.m.grashof();
assert(strcmp(name, 'crank_rocker'), 'Grashof class: %s', name);

for branch = [1 -1]
  s = kinloop.Solver(f.m);
  [t3, t4] = freudenstein(f, 0, branch);
  % a rough sketch near the branch chooses it (as tests/test_position.c does)
  s.set_link_angle(f.coupler, t3 + 0.15);
  s.set_link_angle(f.rocker, t4 - 0.15);
  for deg = 0:5:360
    u = deg * pi / 180;
    s.solve_position(u);
    s.solve_velocity(1);
    [t3, t4] = freudenstein(f, u, branch);
    % Freudenstein's equation (half-angle form, freudenstein.m): 1e-10 rad
    assert(abs(angle_diff(s.link_angle(f.coupler), t3)) <= 1e-10, ...
           'branch %d at %d deg: coupler %.15g, closed form %.15g', ...
           branch, deg, s.link_angle(f.coupler), t3);
    assert(abs(angle_diff(s.link_angle(f.rocker), t4)) <= 1e-10, ...
           'branch %d at %d deg: rocker %.15g, closed form %.15g', ...
           branch, deg, s.link_angle(f.rocker), t4);
    assert(s.link_angle(f.crank) == u, 'the crank angle is the input, exactly');
    % angular velocities at a unit crank rate (fourbar_rates.m: the
    % textbook relations by Cramer's rule)
    w = fourbar_rates(f, u, branch);
    rates = s.link_rate([f.coupler f.rocker]);
    assert(all(abs(rates - w) <= 1e-9 * max(1, abs(w))), ...
           'branch %d at %d deg: rates [%g %g], textbook [%g %g]', ...
           branch, deg, rates, w);
  end
  % the coupler point from the link frames (common practice, no source:
  % a local point p on a link at angle t with origin o sits at o + R(t) p)
  o = s.link_origin(f.coupler);
  t = s.link_angle(f.coupler);
  p = o + ([cos(t) -sin(t); sin(t) cos(t)] * [f.b / 2; f.b / 4]).';
  assert(norm(s.point_position(f.coupler_point) - p) <= 1e-12 * f.b);
  clear s
end

% the assembly modes at one crank angle are the closed form's two branches
s = kinloop.Solver(f.m);
modes = s.find_assemblies(1.0);
assert(numel(modes) == 2, 'found %d assembly modes, the closed form has 2', numel(modes));
found = cellfun(@(q) q.link_angle(f.rocker), modes);
[~, t4p] = freudenstein(f, 1.0, 1);
[~, t4m] = freudenstein(f, 1.0, -1);
assert(min(abs(angle_diff(found, t4p))) <= 1e-9 && min(abs(angle_diff(found, t4m))) <= 1e-9, ...
       'assembly modes %s are not the closed form''s %g and %g', mat2str(found), t4p, t4m);
