% test_copy_state.m - kl_solver_copy_state through the binding: the copy
% holds the same position and rates and goes on from them on the same
% branch; solvers of another model are refused (include/kinloop.h).

% geometry chosen for this test: a crank-rocker, crossed branch
f = fourbar(35, 110, 75, 95);
from = kinloop.Solver(f.m);
[t3, t4] = freudenstein(f, 0.4, -1);
from.set_link_angle(f.coupler, t3 - 0.1);
from.set_link_angle(f.rocker, t4 + 0.1);
from.solve_position(0.4);
from.solve_velocity(2);
to = kinloop.Solver(f.m);
to.copy_state(from);
assert(isequal(to.link_angle(0:3), from.link_angle(0:3)));
assert(isequal(to.link_rate(0:3), from.link_rate(0:3)));
assert(to.input_value(0) == 0.4);
to.solve_position(1.0);
% the copy goes on along the crossed branch (Freudenstein, freudenstein.m)
[~, t4] = freudenstein(f, 1.0, -1);
assert(abs(angle_diff(to.link_angle(f.rocker), t4)) <= 1e-10);
other = fourbar(35, 110, 75, 95);
stranger = kinloop.Solver(other.m);
err = expect_error(@() stranger.copy_state(from), 'kinloop:EINVAL');
assert(strcmp(err.message, stranger.error()), 'message: %s', err.message);
