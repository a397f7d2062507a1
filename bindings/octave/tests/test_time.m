% test_time.m - jerk and a motion profile in time through the generated
% commands: a servo rotor indexed by a cycloidal rise, its rate and jerk
% against the law's published values, its torque against Newton's second
% law, and a segment that does not join refused with the model unchanged.

% a rotor about (0, 0) turned a quarter turn in 0.3 s (numbers invented)
J = 0.02; h = pi / 2; T = 0.3;
DWELL = 0; RISE = 1; CYCLOIDAL = 1;   % enum kl_segment_kind, kl_motion_law_kind
m = kinloop.Model();
rotor = m.add_link('rotor');
m.add_input(m.add_revolute(0, [0 0], rotor, [0 0]));
m.set_link_mass(rotor, 3, [0 0], J);
m.add_segment(0, RISE, CYCLOIDAL, T, 0, h);
m.add_segment(0, DWELL, 0, 0.1, h, h);
% a dwell away from where the rise ended does not join: refused, unchanged
expect_error(@() m.add_segment(0, DWELL, 0, 0.1, 1, 1), 'kinloop:EJOIN');
assert(m.segment_count() == 2 && abs(m.profile_duration() - 0.4) < 1e-15);
m.finalize();

% Source: the cycloidal law's published values, rate 2 h / T at mid-rise
% and jerk 4 pi^2 h / T^3 at its start (chain rule in x = t / T)
s = kinloop.Solver(m);
s.solve_at_time(T / 2);
assert(abs(s.link_rate(rotor) - 2 * h / T) < 1e-12 * 2 * h / T);
s.solve_at_time(0);
assert(abs(s.link_jerk(rotor) - 4 * pi^2 * h / T^3) < 1e-12 * 4 * pi^2 * h / T^3);

% Source: Newton's second law for a rotor, torque = J alpha, with the
% cycloidal acceleration 2 pi h sin(2 pi x) / T^2
[peaks, times, rms] = s.time_efforts(80, []);
alpha = 2 * pi * h / T^2;
assert(abs(peaks(1) - J * alpha) < 1e-9 * J * alpha);
assert(abs(times(1) - T / 4) < 1e-12);
assert(abs(rms(1) - J * alpha / sqrt(2) * sqrt(T / 0.4)) < 1e-9 * J * alpha);
