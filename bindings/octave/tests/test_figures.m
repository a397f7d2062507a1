% test_figures.m - design figures through the binding: transmission-angle
% extremes, kinematic coefficients, mechanical advantage, input effort and
% dimensional sensitivity of a crank-rocker four-bar.

% geometry chosen for this test: a crank-rocker (Grashof, crank shortest)
f = fourbar(35, 110, 75, 95);
s = kinloop.Solver(f.m);
[t3, t4] = freudenstein(f, 0, 1);
s.set_link_angle(f.coupler, t3);
s.set_link_angle(f.rocker, t4);

% ---- transmission angle over a turn ----
% at the coupler-rocker pin, between the coupler's line to the crank pin
% and the rocker's line to its ground pivot (include/kinloop.h)
mu = struct('kind', 'transmission', 'id', f.rocker_pin, ...
            'line_a', f.crank_pin, 'line_b', f.rocker_pivot);
range = s.output_range(0, 0, 2 * pi, 72, mu);
% law of cosines with crank and ground in line (docs/figures.md section 4):
% mu = acos((b^2 + c^2 - (d -+ a)^2) / (2 b c)) at t2 = 0 and t2 = pi
mu_min = acos((f.b^2 + f.c^2 - (f.d - f.a)^2) / (2 * f.b * f.c));
mu_max = acos((f.b^2 + f.c^2 - (f.d + f.a)^2) / (2 * f.b * f.c));
assert(abs(range.min - mu_min) <= 1e-9 && abs(range.max - mu_max) <= 1e-9, ...
       'range [%.12g %.12g], law of cosines [%.12g %.12g]', range.min, range.max, mu_min, mu_max);
assert(abs(angle_diff(range.input_at_min, 0)) <= 1e-6 && abs(range.input_at_max - pi) <= 1e-6);
assert(strcmp(range.sweep_status, 'OK'));
% the time ratio of a crank-rocker from the rocker's extremes (quick-return
% definition, docs/figures.md section 6): here only its consistency,
% A / (2 pi - A) with A the crank angle from minimum to maximum
rock = s.output_range(0, 0, 2 * pi, 72, struct('kind', 'link_angle', 'id', f.rocker));
A = mod(rock.input_at_max - rock.input_at_min, 2 * pi);
assert(abs(kinloop.range_time_ratio(rock) - A / (2 * pi - A)) <= 1e-12);
% the rocker's extreme positions are its toggles with the crank, where
% crank and coupler line up: |O2 - rocker pin| = b + a or b - a, and the
% rocker stands acos((c^2 + d^2 - L^2) / (2 c d)) from the line to O2 (law
% of cosines), on the side of the ground line this branch keeps
side = sign(sin(s.link_angle(f.rocker)));
toggles = side * (pi - acos((f.c^2 + f.d^2 - ([f.b + f.a, f.b - f.a]).^2) / (2 * f.c * f.d)));
assert(min(abs(angle_diff(rock.min, toggles))) <= 1e-9 && ...
       min(abs(angle_diff(rock.max, toggles))) <= 1e-9 && rock.max - rock.min > 0.1, ...
       'rocker swings [%.12g %.12g], law of cosines %s', rock.min, rock.max, mat2str(toggles, 12));

% ---- every output's range from one sweep ----
% kl_output_ranges agrees with the law of cosines above and with
% output_range of the rocker alone
s.set_link_angle(f.coupler, t3);
s.set_link_angle(f.rocker, t4);
both = s.output_ranges(0, 0, 2 * pi, 72, [mu, struct('kind', 'link_angle', 'id', f.rocker, ...
                                                      'line_a', 0, 'line_b', 0)]);
assert(numel(both) == 2);
assert(abs(both(1).min - mu_min) <= 1e-9 && abs(both(1).max - mu_max) <= 1e-9);
assert(abs(both(2).min - rock.min) <= 1e-10 && abs(both(2).max - rock.max) <= 1e-10);
assert(abs(both(2).input_at_max - rock.input_at_max) <= 1e-7);

% ---- kinematic coefficients at one crank angle ----
u = 0.7;
s.solve_position(u);
s.solve_coefficients();
w = fourbar_rates(f, u, 1);
% first order: the textbook velocity ratios (fourbar_rates.m)
assert(abs(s.link_angle_deriv(f.rocker, 0) - w(2)) <= 1e-10 * max(1, abs(w(2))));
assert(abs(s.link_angle_deriv(f.coupler, 0) - w(1)) <= 1e-10 * max(1, abs(w(1))));
% second order: central difference of the closed-form ratio, step 1e-5
% (truncation ~1e-10, rounding ~1e-11)
hh = 1e-5;
dw = (fourbar_rates(f, u + hh, 1) - fourbar_rates(f, u - hh, 1)) / (2 * hh);
assert(abs(s.link_angle_deriv2(f.rocker, 0, 0) - dw(2)) <= 1e-7 * max(1, abs(dw(2))));
% a point's coefficient against central differences of its position
% (kinloop's own positions, step 1e-6: truncation ~1e-12 of the point's size)
p0 = s.point_deriv(f.coupler_point, 0);
probe = kinloop.Solver(f.m);
probe.set_link_angle(f.coupler, s.link_angle(f.coupler));
probe.set_link_angle(f.rocker, s.link_angle(f.rocker));
probe.solve_position(u + 1e-6);
ahead = probe.point_position(f.coupler_point);
probe.solve_position(u - 1e-6);
behind = probe.point_position(f.coupler_point);
assert(norm(p0 - (ahead - behind) / 2e-6) <= 1e-6 * f.b);
% the rocker's mechanical advantage is the inverse velocity ratio
% (virtual work, docs/figures.md section 7)
rocker_angle = struct('kind', 'link_angle', 'id', f.rocker);
assert(abs(s.output_mechanical_advantage(rocker_angle, 0) - 1 / w(2)) <= 1e-10 * abs(1 / w(2)));
assert(abs(s.output_deriv(rocker_angle, 0) - w(2)) <= 1e-10 * max(1, abs(w(2))));
% a torque T on the rocker is held by a crank torque -T w4/w2 (virtual
% work: Q = -T d t4 / d t2, docs/figures.md section 7)
load = struct('kind', 'torque', 'id', f.rocker, 'torque', 2.5);
assert(abs(s.input_effort(load) + 2.5 * w(2)) <= 1e-10 * max(1, abs(2.5 * w(2))));

% ---- dimensional sensitivity against rebuilt models ----
% d t4 / d c (the rocker pin's x on the rocker), by central differences of
% the closed form over the rocker length, step 1e-5 (truncation ~1e-10)
dim = struct('kind', 'joint_b', 'id', f.rocker_pin, 'axis', 'x');
sens = s.output_sensitivity(rocker_angle, dim);
g = f;
g.c = f.c + 1e-5;
[~, up] = freudenstein(g, u, 1);
g.c = f.c - 1e-5;
[~, down] = freudenstein(g, u, 1);
fd = angle_diff(up, down) / 2e-5;
assert(abs(sens - fd) <= 1e-7 * max(1, abs(fd)), 'sensitivity %.12g, difference %.12g', sens, fd);
% the stack-up of two dimensions by its definition (include/kinloop.h):
% worst case sum |d_k| t_k, root-sum-square sqrt(sum (d_k t_k)^2)
dims = [dim, struct('kind', 'joint_a', 'id', f.crank_pin, 'axis', 'x')];
d2 = s.output_sensitivity(rocker_angle, dims(2));
[worst, rss] = s.output_tolerance_stack(rocker_angle, dims, [0.05 0.02]);
assert(abs(worst - (abs(sens) * 0.05 + abs(d2) * 0.02)) <= 1e-14);
assert(abs(rss - hypot(sens * 0.05, d2 * 0.02)) <= 1e-14);
