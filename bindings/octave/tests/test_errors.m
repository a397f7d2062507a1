% test_errors.m - library failures reach Octave as errors whose identifier
% comes from the status and whose message is the library's own; wrong
% arguments are refused by the binding before they reach the library.
% The expected statuses are those include/kinloop.h documents per call.

% ---- a joint of a link to itself: KL_ESELFJOINT (kl_add_revolute) ----
m = kinloop.Model();
crank = m.add_link('crank');
err = expect_error(@() m.add_revolute(crank, [0 0], crank, [10 0]), 'kinloop:ESELFJOINT');
assert(strcmp(err.message, m.error()), ...
       'message "%s" is not the library''s "%s"', err.message, m.error());
assert(~isempty(strfind(err.message, 'itself')) && ~isempty(strfind(err.message, 'crank')), ...
       'the library names the link: %s', err.message);
assert(strcmp(kinloop.status_name(-7), 'ESELFJOINT'));

% ---- NaN: KL_ENONFINITE (kl_add_point, kl_solve_position) ----
err = expect_error(@() m.add_point(crank, [NaN 0], 'tip'), 'kinloop:ENONFINITE');
assert(strcmp(err.message, m.error()), 'message: %s', err.message);
assert(m.point_count() == 0, 'a failed builder adds nothing');
err = expect_error(@() m.add_revolute(0, [Inf 0], crank, [0 0]), 'kinloop:ENONFINITE');
assert(strcmp(err.message, m.error()));

% ---- wrong number of inputs: KL_EDOF at finalize ----
m.add_revolute(0, [0 0], crank, [0 0]);
err = expect_error(@() m.finalize(), 'kinloop:EDOF');
assert(strcmp(err.message, m.error()), 'message: %s', err.message);
assert(~m.is_finalized(), 'a failed finalize leaves the model open');
m.add_input(0);
m.finalize();
assert(m.dof() == 1);
% a solver before finalize is refused, with the state named
open_model = kinloop.Model();
expect_error(@() kinloop.Solver(open_model), 'kinloop:ESTATE');
expect_error(@() open_model.dof(), 'kinloop:ESTATE');

% ---- the binding counts inputs (a C array carries no length) ----
s = kinloop.Solver(m);
err = expect_error(@() s.solve_position([0 1]), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'must have 1 element')), 'message: %s', err.message);
expect_error(@() s.solve_position([]), 'kinloop:EINVAL');
expect_error(@() s.solve_position(ones(2, 2)), 'kinloop:EINVAL');
err = expect_error(@() s.solve_position(NaN), 'kinloop:ENONFINITE');
assert(strcmp(err.message, s.error()) && ~isempty(strfind(err.message, 'NaN')));
% a stage before the stage it needs: KL_ESTAGE
err = expect_error(@() s.solve_velocity(1), 'kinloop:ESTAGE');
assert(strcmp(err.message, s.error()));
clear s

% ---- no assembly: KL_ENOASSEMBLY (kl_solve_position) ----
% a triple-rocker (geometry chosen for this test) driven past its limit:
% the crank pin is then further from the rocker pivot than b + c (law of
% cosines: at t2 = pi the distance is a + d = 170 > 110)
f = fourbar(70, 60, 50, 100);
s = kinloop.Solver(f.m);
[t3, t4] = freudenstein(f, 0.2, 1);
s.set_link_angle(f.coupler, t3);
s.set_link_angle(f.rocker, t4);
s.solve_position(0.2);
before = s.link_angle(0:3);
err = expect_error(@() s.solve_position(pi), 'kinloop:ENOASSEMBLY');
assert(strcmp(err.message, s.error()), 'message: %s', err.message);
assert(~isempty(strfind(err.message, 'cannot close')), 'message: %s', err.message);
% a failed solve changes nothing (the header's transactional rule)
assert(isequal(s.link_angle(0:3), before) && s.input_value(0) == 0.2);
st = s.stats();
assert(strcmp(st.status, 'ENOASSEMBLY'));
assert(~isempty(strfind(kinloop.status_str(st.status), 'no assembly')));
assert(strcmp(kinloop.status_str(-17), kinloop.status_str('ENOASSEMBLY')));
% a sweep that fails before its first step raises the error
expect_error(@() s.sweep(0, pi, pi + 0.1, 2), 'kinloop:ENOASSEMBLY');
% a sweep of an input that does not exist: KL_EID
err = expect_error(@() s.sweep(3, 0, 1, 2), 'kinloop:EID');
assert(strcmp(err.message, s.error()));

% ---- options outside their ranges: KL_EINVAL (kl_solver_set_options) ----
err = expect_error(@() s.set_options('tolerance', 1), 'kinloop:EINVAL');
assert(strcmp(err.message, s.error()));
err = expect_error(@() s.set_options('tolerence', 1e-9), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'tolerence')), 'a mistyped field is named: %s', err.message);
s.set_options('max_iterations', 80);
o = s.options();
defaults = kinloop.options_default();
assert(o.max_iterations == 80 && o.tolerance == defaults.tolerance);

% ---- getters that fail without a message of the library's own ----
err = expect_error(@() s.point_velocity(7), 'kinloop:EID');
assert(~isempty(strfind(err.message, 'point_velocity')), 'message: %s', err.message);
expect_error(@() f.m.find_link('no such link'), 'kinloop:EID');
expect_error(@() s.output_value(struct('kind', 'slide', 'id', 0)), 'kinloop:EKIND');
expect_error(@() s.output_value(struct('kind', 'speed', 'id', 0)), 'kinloop:EINVAL');
expect_error(@() kinloop.grashof(1, -1, 1, 1), 'kinloop:EINVAL');

% ---- wrong argument types never reach the library ----
expect_error(@() __kinloop__('add_link', m.id, 42), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_link', m.id, {'x'}), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_revolute', m.id, 'a', 0, 0, 1, 0, 0), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_revolute', m.id, 1.5, 0, 0, 1, 0, 0), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_revolute', m.id, 1, 1i, 0, 1, 0, 0), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_revolute', m.id, 1e12, 0, 0, 1, 0, 0), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_revolute', m.id, 1, 0, 0), 'kinloop:EINVAL');
expect_error(@() __kinloop__('add_link', m.id, "a\0b"), 'kinloop:EINVAL');
expect_error(@() __kinloop__('no_such_command'), 'kinloop:EINVAL');
expect_error(@() __kinloop__(), 'kinloop:EINVAL');
expect_error(@() __kinloop__(3), 'kinloop:EINVAL');
expect_error(@() m.add_revolute(0, [1 2 3], crank, [0 0]), 'kinloop:EINVAL');
expect_error(@() s.sweep(0, 0, 1, 2, 'not a function'), 'kinloop:EINVAL');
