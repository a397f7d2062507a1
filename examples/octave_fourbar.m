% octave_fourbar.m - a louvre drive studied from Octave through kinloop's
% bindings (a scenario invented for kinloop's examples): a motor crank turns
% a crank-rocker four-bar whose rocker tilts the louvre blades. Prints the
% Grashof class, the blade's swing, the transmission angle over a turn and
% the path of the coupler's tip.
%
%   octave-cli examples/octave_fourbar.m        (from the repository root,
%                                                after building into build/)

here = fileparts(mfilename('fullpath'));
repo = fileparts(here);
addpath(fullfile(repo, 'build', 'bindings', 'octave'));  % __kinloop__.oct and +kinloop
if exist('__kinloop__') ~= 3
  error('octave_fourbar: no __kinloop__.oct in build/bindings/octave; build first: cmake -S . -B build && cmake --build build');
end

% ---- the linkage (mm): ground pivots 80 apart, crank 25, coupler 90, rocker 60
m = kinloop.Model();
m.set_units('mm', 'deg');
crank = m.add_link('crank');
coupler = m.add_link('coupler');
rocker = m.add_link('blade rocker');
motor = m.add_revolute(0, [0 0], crank, [0 0]);
crank_pin = m.add_revolute(crank, [25 0], coupler, [0 0]);
rocker_pin = m.add_revolute(coupler, [90 0], rocker, [60 0]);
rocker_pivot = m.add_revolute(rocker, [0 0], 0, [80 0]);
tip = m.add_point(coupler, [45 18], 'coupler tip');
m.add_input(motor);
m.set_sketch_angle(coupler, 1.0);   % the open assembly, rocker leaning back
m.set_sketch_angle(rocker, 2.0);
m.finalize();
class_name = m.grashof();
printf('kinloop %s: %d links, %d joints, %d loop, %s\n', kinloop.version(), ...
       m.link_count(), m.joint_count(), m.loop_count(), class_name);

% ---- one motor turn in 5 degree steps
s = kinloop.Solver(m);
r = s.sweep(0, 0, 2 * pi, 72);
blade = r.link_angle(:, rocker + 1) * 180 / pi;
printf('sweep: %s, %d steps\n', r.status, r.steps_done);
printf('blade swing: %.2f to %.2f deg (%.2f deg)\n', min(blade), max(blade), ...
       max(blade) - min(blade));
% rates at a unit crank rate: the blade's velocity ratio
[ratio, at] = max(abs(r.link_rate(:, rocker + 1)));
printf('largest blade speed: %.3f x crank speed, at crank %.0f deg\n', ratio, ...
       r.input(at) * 180 / pi);

% ---- transmission angle at the coupler-blade pin, refined between steps
mu = struct('kind', 'transmission', 'id', rocker_pin, ...
            'line_a', crank_pin, 'line_b', rocker_pivot);
range = s.output_range(0, 0, 2 * pi, 72, mu);
printf('transmission angle: %.2f deg (crank %.1f deg) to %.2f deg (crank %.1f deg)\n', ...
       range.min * 180 / pi, range.input_at_min * 180 / pi, ...
       range.max * 180 / pi, range.input_at_max * 180 / pi);
rocker_range = s.output_range(0, 0, 2 * pi, 72, struct('kind', 'link_angle', 'id', rocker));
printf('time ratio of the blade''s swing: %.3f\n', kinloop.range_time_ratio(rocker_range));

% ---- the coupler tip's path
x = r.point_x(:, tip + 1);
y = r.point_y(:, tip + 1);
printf('coupler tip path: x %.1f to %.1f mm, y %.1f to %.1f mm\n', ...
       min(x), max(x), min(y), max(y));
