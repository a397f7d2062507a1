% test_sweep_callback.m - a sweep's Octave callback: it sees each delivered
% step, may read the solver, stops the sweep by returning true (KL_STOPPED,
% include/kinloop.h), and its errors come back out of the sweep.

% geometry chosen for this test: a crank-rocker, full turns possible
f = fourbar(35, 110, 75, 95);
s = kinloop.Solver(f.m);
[t3, t4] = freudenstein(f, 0, 1);
s.set_link_angle(f.coupler, t3);
s.set_link_angle(f.rocker, t4);

% ---- every step, read from the solver inside the callback ----
global seen
seen = zeros(0, 3);
r = s.sweep(0, 0, 2 * pi, 24, @note_step);
assert(strcmp(r.status, 'OK') && isempty(r.message));
assert(r.steps_done == 25 && size(seen, 1) == 25, 'steps %d, calls %d', r.steps_done, size(seen, 1));
assert(isequal(seen(:, 1), (0:24).'), 'steps are numbered from 0');
assert(isequal(seen(:, 2), r.input), 'the callback sees each step''s input');
assert(isequal(seen(:, 3), r.link_angle(:, f.rocker + 1)), 'and the solver at that step');
% a full turn comes back to the start on the same branch (Grashof
% crank-rocker: the crank turns fully; Freudenstein's closed form)
assert(abs(angle_diff(r.link_angle(end, f.rocker + 1), t4)) <= 1e-10);

% ---- stopping ----
r = s.sweep(0, 0, pi, 12, @(solver, step, u) step == 3);
assert(strcmp(r.status, 'STOPPED'), 'status %s', r.status);
assert(r.steps_done == 4 && numel(r.input) == 4, 'steps_done %d', r.steps_done);
assert(s.input_value(0) == r.input(end), 'the solver holds the last delivered step');

% ---- the callback may not change the sweeping solver ----
err = expect_error(@() s.sweep(0, 0, 1, 4, @(solver, step, u) solver.solve_position(0)), ...
                   'kinloop:ESTATE');
s.solve_position(0.5);  % and afterwards the solver is free again

% ---- an error in the callback stops the sweep and is raised ----
err = expect_error(@() s.sweep(0, 0, 1, 4, @(solver, step, u) error('mine:oops', 'at %d', step)), ...
                   'mine:oops');
assert(strcmp(err.message, 'at 0'), 'message: %s', err.message);
s.solve_position(0.25);
clear -global seen
