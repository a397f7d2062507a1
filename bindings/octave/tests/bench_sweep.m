% bench_sweep.m - the sweep benchmark of the Octave binding (issue 19,
% target 4): a sweep of 3600 steps through kinloop.Solver's sweep against the
% same sweep from C (kl_solver_sweep_rows, by kinloop-sweep-bench), both
% measured in this run. Prints the ratio; never fails on time.
%   octave-cli --no-gui --norc --quiet bindings/octave/tests/bench_sweep.m [BUILD_DIR]
% BUILD_DIR (default: build) holds bindings/octave (the shipped gateway and
% the package) and bindings/kinloop-sweep-bench. The model is the
% servo-index demo's slider-crank, its crank swept over one turn (a full
% turn ends where it began, so every repeat starts alike).
args = argv();
build = 'build';
if numel(args) >= 1
  build = args{1};
end
addpath(fullfile(build, 'bindings', 'octave'));
here = fileparts(mfilename('fullpath'));
model_file = fullfile(here, '..', '..', '..', 'examples', 'models', 'servo-index.kinloop');
steps = 3600; repeats = 41; input = 0; from = 0; to = 2 * pi;

% the C sweep, before and after the Octave one: a change of machine load
% between them shows as a spread
c_command = sprintf('%s %s %d %.17g %.17g %d %d', ...
                    fullfile(build, 'bindings', 'kinloop-sweep-bench'), model_file, ...
                    input, from, to, steps, repeats);
c_times = @() sscanf(nthargout(2, @system, c_command), 'best %f median %f');
c1 = c_times();

m = kinloop.Model.read_file(model_file);
s = kinloop.Solver(m);
s.solve_position(from);
times = zeros(repeats, 1);
for k = 1:repeats
  started = tic;
  r = s.sweep(input, from, to, steps);
  times(k) = toc(started);
  assert(strcmp(r.status, 'OK') && r.steps_done == steps + 1);
end
c2 = c_times();

c_best = min(c1(1), c2(1));
c_median = median([c1(2), c2(2)]);
printf('sweep of %d steps, best of %d: C %.3f ms, Octave %.3f ms, ratio %.3f\n', ...
       steps, repeats, 1e3 * c_best, 1e3 * min(times), min(times) / c_best);
printf('medians: C %.3f ms, Octave %.3f ms, ratio %.3f\n', ...
       1e3 * c_median, 1e3 * median(times), median(times) / c_median);
