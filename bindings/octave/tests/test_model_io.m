% test_model_io.m - model files through the binding: text written by
% kl_model_write reads back as the same model (the contract in
% include/kinloop.h), files likewise, and reading errors carry the
% status, line and column the library reports.

% geometry chosen for this test: a crank-rocker with names, units, a
% sketch of one branch and sweep settings
f = fourbar(35, 110, 75, 95);
m = kinloop.Model();
crank = m.add_link('crank');
coupler = m.add_link('coupler');
rocker = m.add_link('rocker');
motor = m.add_revolute(0, [0 0], crank, [0 0]);
m.add_revolute(crank, [35 0], coupler, [0 0]);
m.add_revolute(coupler, [110 0], rocker, [75 0]);
m.add_revolute(rocker, [0 0], 0, [95 0]);
m.set_joint_name(motor, 'motor');
m.add_point(coupler, [55 27.5], 'tip');
m.add_input(motor);
m.set_units('mm', 'deg');
[t3, t4] = freudenstein(f, 0, -1);
m.set_sketch_angle(coupler, t3 + 0.1);
m.set_sketch_angle(rocker, t4 - 0.1);
m.set_sweep(struct('input', 0, 'from', 0, 'to', 2 * pi, 'steps', 36));
m.finalize();

text = m.write();
assert(ischar(text) && ~isempty(text));
back = kinloop.Model.read(text);
assert(back.is_finalized(), 'a model read is finalized');
assert(back.link_count() == 4 && back.joint_count() == 4 && back.point_count() == 1 && ...
       back.input_count() == 1);
assert(strcmp(back.link_name(coupler), 'coupler') && strcmp(back.joint_name(motor), 'motor'));
assert(back.find_point('tip') == 0 && back.find_joint('motor') == motor);
[len, ang] = back.units();
assert(strcmp(len, 'mm') && strcmp(ang, 'deg'), 'units %s %s', len, ang);
[links, pa, pb] = back.joint_links(2);
assert(isequal(links, [coupler rocker]) && isequal(pa, [110 0]) && isequal(pb, [75 0]));
w = back.sweep();
% angles written in degrees convert back within a rounding (kinloop.h)
assert(w.input == 0 && w.steps == 36 && abs(w.to - 2 * pi) <= 1e-12);
assert(abs(back.sketch_angle(rocker) - (t4 - 0.1)) <= 1e-12);
% both models solve alike from their recorded sketch: the crossed branch
% of Freudenstein's closed form (freudenstein.m)
s1 = kinloop.Solver(m);
s2 = kinloop.Solver(back);
for u = 0:0.5:6
  s1.solve_position(u);
  s2.solve_position(u);
  [~, t4u] = freudenstein(f, u, -1);
  assert(abs(angle_diff(s2.link_angle(rocker), t4u)) <= 1e-10);
  assert(abs(angle_diff(s1.link_angle(rocker), s2.link_angle(rocker))) <= 1e-12);
end
clear s1 s2

% ---- files ----
model_file = [tempname() '.kinloop'];
m.write_file(model_file);
assert(strcmp(fileread(model_file), text), 'the file holds the text kl_model_write gives');
from_file = kinloop.Model.read_file(model_file);
assert(from_file.joint_count() == 4 && from_file.find_link('rocker') == rocker);
delete(model_file);
err = expect_error(@() kinloop.Model.read_file(model_file), 'kinloop:EIO');
assert(~isempty(strfind(err.message, model_file)), 'the message names the file: %s', err.message);
[none, why] = kinloop.Model.read_file(model_file);
assert(isempty(none) && strcmp(why.status, 'EIO'));

% ---- text that is not a model ----
err = expect_error(@() kinloop.Model.read(sprintf('%s\nlink crank\nwobble 3\n', ...
                   strtok(text, sprintf('\n')))), 'kinloop:ESYNTAX');
assert(strncmp(err.message, 'line 3, column 1: ', 18), 'message: %s', err.message);
[none, why] = kinloop.Model.read('not a model');
assert(isempty(none) && strcmp(why.status, 'ESYNTAX') && why.line == 1 && why.column >= 1, ...
       'status %s at line %d, column %d', why.status, why.line, why.column);
assert(~isempty(why.message));

% ---- a model read through the counting allocator frees every byte ----
counted = counted_model(text);
id = counted.id;
a = allocations(counted);
assert(a.live > 0);
clear counted
a = allocations(id);
assert(a.live == 0 && a.live_bytes == 0);
