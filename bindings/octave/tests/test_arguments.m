% test_arguments.m - the argument rule: what Octave code gives reaches C
% exactly or is refused with kinloop:EINVAL naming the command and the
% argument, and a refused call changes nothing. Integers must be whole and
% within their C type's range (2^32 + 3 is not link 3), integer classes are
% read exactly (int64 beyond 2^53 too), reals must be exactly doubles, and
% strings may hold no NUL (C would end them there).

% geometry chosen for this test: a crank-rocker
f = fourbar(35, 110, 75, 95);
s = kinloop.Solver(f.m);
[t3, t4] = freudenstein(f, 0.4, 1);
s.set_link_angle(f.coupler, t3);
s.set_link_angle(f.rocker, t4);
s.solve_position(0.4);

% ---- integers ----
for bad = {2^32 + 3, -2^32 + 3, 2^31, -2^31 - 1, int64(2)^40, uint64(2)^63, 1.5, NaN, Inf}
  err = expect_error(@() s.link_angle(bad{1}), 'kinloop:EINVAL');
  assert(~isempty(strfind(err.message, 'link_angle')) && ~isempty(strfind(err.message, 'link')), ...
         'message: %s', err.message);
end
err = expect_error(@() s.link_angle(2^32 + 3), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, '4294967299')), 'the value given is named: %s', err.message);
err = expect_error(@() s.link_angle([1 2.5]), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'link(2)')), 'the element is named: %s', err.message);
expect_error(@() s.link_angle('3'), 'kinloop:EINVAL');
expect_error(@() s.link_angle(3i), 'kinloop:EINVAL');
% whole numbers of any class are ids, at the ends of C int's range too
assert(s.link_angle(int8(3)) == s.link_angle(3) && s.link_angle(single(3)) == s.link_angle(3));
assert(s.link_angle(uint64(3)) == s.link_angle(true * 3));
assert(isnan(s.link_angle(2^31 - 1)) && isnan(s.link_angle(-2^31)));

% ---- a refused builder adds nothing ----
m = kinloop.Model();
crank = m.add_link('crank');
expect_error(@() m.add_revolute(2^32, [0 0], 2^32 + 1, [0 0]), 'kinloop:EINVAL');
expect_error(@() m.add_revolute(0, [0 0], 1.5, [0 0]), 'kinloop:EINVAL');
expect_error(@() m.add_loop([0 2^32]), 'kinloop:EINVAL');
assert(m.joint_count() == 0);

% ---- reals: exactly a double ----
err = expect_error(@() m.add_point(crank, [int64(2)^53 + 1, 0]), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'xy')), 'message: %s', err.message);
expect_error(@() m.add_point(crank, [1 2 3]), 'kinloop:EINVAL');
expect_error(@() m.add_point(crank, [1i 0]), 'kinloop:EINVAL');
expect_error(@() m.add_point(crank, 'xy'), 'kinloop:EINVAL');
assert(m.point_count() == 0);
% NaN is a number: the library has a status for it
expect_error(@() m.add_point(crank, [NaN 0]), 'kinloop:ENONFINITE');
assert(m.add_point(crank, [int64(2)^53, single(0.1)]) == 0, 'exact values pass as given');
before = s.input_value(0);
expect_error(@() s.solve_position(int64(2)^53 + 1), 'kinloop:EINVAL');
assert(s.input_value(0) == before);

% ---- strings ----
err = expect_error(@() m.add_link("a\0b"), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'NUL')) && ~isempty(strfind(err.message, 'name')), ...
       'message: %s', err.message);
expect_error(@() m.add_link({'x'}), 'kinloop:EINVAL');
expect_error(@() m.add_link(42), 'kinloop:EINVAL');
expect_error(@() m.add_link(['ab'; 'cd']), 'kinloop:EINVAL');
assert(m.link_count() == 2);
model_file = [tempname() '.kinloop'];
f.m.write_file(model_file);
err = expect_error(@() kinloop.Model.read_file([model_file "\0junk"]), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'path')), 'message: %s', err.message);
expect_error(@() f.m.write_file([model_file "\0other"]), 'kinloop:EINVAL');
delete(model_file);
expect_error(@() kinloop.Model.read("kinloop-model 1\n\0"), 'kinloop:EINVAL');

% ---- struct fields and enum names ----
err = expect_error(@() s.set_options('max_iterations', 2^32 + 5), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'max_iterations')), 'message: %s', err.message);
o = s.options();
defaults = kinloop.options_default();
assert(o.max_iterations == defaults.max_iterations);
expect_error(@() s.set_options('kernel', 'fastest'), 'kinloop:EINVAL');
s.set_options('kernel', 'DENSE');  % names in any case
o = s.options();
assert(strcmp(o.kernel, 'dense'));
expect_error(@() s.output_value(struct('kind', 'link_angle', 'id', 2^32 + 3)), 'kinloop:EINVAL');
expect_error(@() s.input_effort(struct('kind', 'torque', 'id', f.rocker, ...
                                       'torque', int64(2)^60 + 1)), 'kinloop:EINVAL');
expect_error(@() m.set_sweep(struct('input', 0, 'from', 0, 'to', 1, 'steps', 2^32 + 4)), ...
             'kinloop:EINVAL');
expect_error(@() m.set_units('furlong', 'rad'), 'kinloop:EINVAL');
m.set_units('MM', 1);
[len, ang] = m.units();
assert(strcmp(len, 'mm') && strcmp(ang, 'deg'));

% ---- sweeps and studies ----
expect_error(@() s.sweep(0, 0, 1, 2^32 + 4), 'kinloop:EINVAL');
expect_error(@() s.sweep(2^32, 0, 1, 4), 'kinloop:EINVAL');
assert(s.input_value(0) == before);
here = fileparts(mfilename('fullpath'));
st = kinloop.Study.read_file(fullfile(here, '..', '..', '..', 'examples', 'models', ...
                                      'flap-tucker.study'));
for range = {{2^64, 5}, {0, 2^64}, {-2^63 - 2^11, 1}, {0.5, 1}, {uint64(2)^63, 1}}
  err = expect_error(@() st.run(range{1}{:}), 'kinloop:EINVAL');
  assert(~isempty(strfind(err.message, 'study_run')), 'message: %s', err.message);
end
expect_error(@() st.output_name(2^32), 'kinloop:EINVAL');
% ranges a C long holds exactly, so the argument rule passes them: the
% library checks first + count without overflow (it once wrapped, ran
% samples that do not exist and wrote past the arrays)
st.prepare();
n = st.sample_count();
big = intmax('int64');
for range = {{big - 5, 10}, {n, 1}, {n + 1, 0}}
  err = expect_error(@() st.run(range{1}{:}), 'kinloop:EINVAL');
end
% counts the gateway could not make room for never reach C
for range = {{10, big}, {0, big}, {big, big}}
  err = expect_error(@() st.run(range{1}{:}), 'kinloop:ETOOLARGE');
end
[values, status] = st.run(n - 1, 1);
assert(numel(status) == 1);
% one step limit (KL_MAX_STEPS, 10^7) for every sweep, named in the message
err = expect_error(@() s.sweep(0, 0, 1, 10^7 + 1), 'kinloop:ETOOLARGE');
assert(~isempty(strfind(err.message, 'at most 10000000')), 'message: %s', err.message);
expect_error(@() s.sweep(0, 0, 1, 2^31 - 1), 'kinloop:ETOOLARGE');
assert(s.input_value(0) == before);
clear s st
