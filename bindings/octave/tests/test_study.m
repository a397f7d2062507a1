% test_study.m - design studies through the binding (kinloop.Study): the
% demo study examples/models/flap-tucker.study read and run, runs that do
% not depend on threads or splitting (include/kinloop.h, kl_study_run),
% summaries against Octave's own statistics, study-file errors with line and
% column, the first-order estimate against Monte Carlo, and the handles of a
% study and of its borrowed model.

here = fileparts(mfilename('fullpath'));
models = fullfile(here, '..', '..', '..', 'examples', 'models');
demo = fullfile(models, 'flap-tucker.study');

% ---- the demo study, as its file says ----
st = kinloop.Study.read_file(demo);
assert(strcmp(st.model_path(), 'flap-tucker.kinloop'));
st.prepare();
assert(st.sample_count() == 2000);
assert(isequal(st.outputs(), {'stroke', 'mu_min', 'tip_low', 'torque'}));
names = st.dimensions();
assert(numel(names) == 9 && strcmp(names{1}, 'crank_pin a x') && ...
       strcmp(names{8}, 'rail a y') && strcmp(names{9}, 'tucker tip x'));
% its model is flap-tucker.kinloop, read relative to the study file
plain = kinloop.Model.read_file(fullfile(models, 'flap-tucker.kinloop'));
m = st.model();
assert(m.is_borrowed() && ~plain.is_borrowed());
assert(strcmp(m.write(), plain.write()), 'the study holds the model its file names');
clear plain

[values, status, dims] = st.run(0, 100);
assert(isequal(size(values), [100 4]) && isequal(size(status), [100 1]) && ...
       isequal(size(dims), [100 9]));
% every sample of these tolerances assembles (a fact of this demo, seen in
% its summaries), so every value is there
assert(all(status == 0) && all(isfinite(values(:))));
% 'rail a y' is drawn evenly within 260 +- 0.2 (the study file)
rail = dims(:, 8);
assert(all(rail >= 259.8 & rail <= 260.2) && std(rail) > 0.2 / sqrt(3) / 2);
% the crank pin's hole: normal about 60 (flap-tucker.kinloop) with three
% standard deviations of 0.05, so a mean of 100 within 4 standard errors
sigma = 0.05 / 3;
assert(abs(mean(dims(:, 1)) - 60) <= 4 * sigma / 10, 'mean %g', mean(dims(:, 1)));
assert(std(dims(:, 1)) >= 0.7 * sigma && std(dims(:, 1)) <= 1.3 * sigma);

% the nominal stroke ('swing slide rail' over the model's sweep, motor 0 to
% 360 degrees in 72 steps) is the swing a Solver of the borrowed model finds
w = m.sweep();
s = kinloop.Solver(m);
s.solve_position(w.from);
r = s.output_range(w.input, w.from, w.to, w.steps, ...
                   struct('kind', 'slide', 'id', m.find_joint('rail')));
stroke = st.summarize('stroke', values, status);
assert(abs((r.max - r.min) - stroke.nominal) <= 1e-9, '%.17g vs %.17g', ...
       r.max - r.min, stroke.nominal);
assert(abs(stroke.nominal - 213) <= 1.5, 'the file: "still 213 +- 1.5 mm"');
clear s

% ---- runs depend on the seed and the sample alone (kl_study_run) ----
bits = @(x) typecast(x(:), 'uint64');
[v1, s1, d1] = st.run(0, 100, 1);
[v2, s2, d2] = st.run(0, 100, 2);
assert(isequal(bits(v1), bits(v2), bits(values)), 'threads change no bit of the values');
assert(isequal(s1, s2, status) && isequal(bits(d1), bits(d2), bits(dims)));
[va, sa, da] = st.run(0, 50, 2);
[vb, sb, db] = st.run(50, 50, 1);
assert(isequal(bits([va; vb]), bits(values)) && isequal([sa; sb], status) && ...
       isequal(bits([da; db]), bits(dims)), 'a split run gives the same samples');
[vt, st_tail] = st.run(1990);
assert(isequal(size(vt), [10 4]) && numel(st_tail) == 10);
err = expect_error(@() st.run(0, 2001), 'kinloop:EINVAL');
assert(~isempty(strfind(err.message, 'study_run')), 'message: %s', err.message);
expect_error(@() st.run(0, 1e7 + 1), 'kinloop:ETOOLARGE');  % above KL_MAX_STEPS a call
expect_error(@() st.run(-1, 5), 'kinloop:EINVAL');
expect_error(@() st.run(0, 1.5), 'kinloop:EINVAL');
[none, no_status] = st.run(2000);
assert(isequal(size(none), [0 4]) && isempty(no_status));

% ---- summaries against Octave's mean, std (n - 1), min, max, and
% percentiles by the header's linear interpolation (cross-checked with
% Octave's quantile method 7, p(k) = (k - 1) / (n - 1)) ----
outputs = st.outputs();
for k = 0:3
  sm = st.summarize(k, values, status);
  by_name = st.summarize(outputs{k + 1}, values, status);
  assert(isequaln(sm, by_name), 'by index or by name');
  column = values(:, k + 1);
  % include/kinloop.h: over the samples that assembled and have a value
  usable = status ~= 1 & ~isnan(column);
  v = column(usable);
  assert(sm.samples == 100 && sm.assembled == nnz(status ~= 1) && sm.limited == nnz(status == 2));
  assert(abs(sm.mean - mean(v)) <= 1e-13 * abs(mean(v)), '%s mean', outputs{k + 1});
  assert(abs(sm.std - std(v)) <= 1e-10 * std(v), '%s std', outputs{k + 1});
  assert(sm.min == min(v) && sm.max == max(v));
  qs = [0.01 0.05 0.50 0.95 0.99];
  got = [sm.p01 sm.p05 sm.p50 sm.p95 sm.p99];
  for j = 1:5
    own = linear_percentile(v, qs(j));
    assert(abs(got(j) - own) <= 1e-13 * abs(own), '%s p%g: %.17g vs %.17g', ...
           outputs{k + 1}, 100 * qs(j), got(j), own);
    assert(abs(own - quantile(v, qs(j), 1, 7)) <= 1e-12 * abs(own));
  end
  if sm.has_limits
    within = status == 0 & column >= sm.lower & column <= sm.upper;
    badness = max(sm.lower - column, column - sm.upper);
  else
    within = status == 0;
    badness = abs(column - sm.nominal);
  end
  assert(sm.within_limits == nnz(within));
  [~, worst] = max(badness);
  assert(sm.worst_sample == worst - 1 && sm.worst == column(worst), 'samples count from 0');
end
% the limits of the study file; torque has none, nor (an effort) a
% first-order estimate (include/kinloop.h)
sm = st.summarize('tip_low', values, status);
assert(sm.has_limits && sm.lower == 44.5 && sm.upper == 45.7);
sm = st.summarize('torque', values, status);
assert(~sm.has_limits && isnan(sm.lower) && isnan(sm.upper) && isnan(sm.first_order_std));
% statuses are the caller's to give: rows marked as not assembled are left out
dropped = mod(0:99, 3)' == 0;
marked = status;
marked(dropped) = 1;
blanked = values;
blanked(dropped, :) = NaN;
sm = st.summarize('mu_min', blanked, marked);
assert(sm.assembled == 66 && abs(sm.mean - mean(values(~dropped, 2))) <= 1e-13 * sm.mean);
sm = st.summarize('mu_min', blanked(1, :), marked(1));
assert(sm.assembled == 0 && sm.worst_sample == -1 && isnan(sm.mean));
expect_error(@() st.summarize('strok', values, status), 'kinloop:EID');
expect_error(@() st.summarize(4, values, status), 'kinloop:EID');
expect_error(@() st.summarize(0, values(:, 1:3), status), 'kinloop:EINVAL');
expect_error(@() st.summarize(0, values, status(1:99)), 'kinloop:EINVAL');

% samples stopped at a limit (geometry chosen for this test: the demo's
% crank lengthened until the linkage no longer turns through the sweep);
% include/kinloop.h: they assembled, have outputs over the reachable part
% (NaN beyond it) and are never within limits
demo_model = kinloop.Model.read_file(fullfile(models, 'flap-tucker.kinloop'));
longer = kinloop.Study.read(sprintf(['kinloop-study 1\nmodel flap-tucker.kinloop\n' ...
  'grid joint crank_pin a x from 60 to 140 steps 4\noutput stroke swing slide rail\n' ...
  'output tip_low at 270 y "tucker tip"\nlimit stroke 0 1000\n']), demo_model);
longer.prepare();
[lv, ls] = longer.run();
assert(any(ls == 2) && all(ls ~= 1) && any(isnan(lv(ls == 2, 2))));
for k = 0:1
  sm = longer.summarize(k, lv, ls);
  v = lv(~isnan(lv(:, k + 1)), k + 1);
  assert(sm.assembled == 5 && sm.limited == nnz(ls == 2));
  assert(sm.within_limits == nnz(ls == 0 & (~sm.has_limits | (lv(:, k + 1) >= sm.lower & ...
                                                               lv(:, k + 1) <= sm.upper))));
  assert(abs(sm.mean - mean(v)) <= 1e-13 * abs(mean(v)) && ...
         abs(sm.p95 - linear_percentile(v, 0.95)) <= 1e-13 * abs(sm.p95));
end
clear longer

% ---- first order against Monte Carlo ----
% first-order propagation (root-sum-square of sensitivity times standard
% deviation, the GUM's law of propagation of uncertainty, JCGM 100, from
% memory) against the spread of all 2000 samples: the sample std's own
% relative standard error is 1/sqrt(2 (n - 1)), 1.6%; the 15% leaves the
% rest to the linearization of these small tolerances
[all_values, all_status] = st.run();
for name = {'stroke', 'mu_min', 'tip_low'}
  sm = st.summarize(name{1}, all_values, all_status);
  assert(sm.assembled == 2000);
  assert(abs(sm.first_order_std - sm.std) <= 0.15 * sm.std, '%s: first order %g, Monte Carlo %g', ...
         name{1}, sm.first_order_std, sm.std);
end

% ---- errors in study files ----
bad = sprintf(['kinloop-study 1\nmodel flap-tucker.kinloop\nsamples 10\n' ...
               'vary joint crank_pin a z tolerance 0.05 normal\n']);
err = expect_error(@() kinloop.Study.read(bad, demo_model), 'kinloop:ESYNTAX');
column = numel('vary joint crank_pin a ') + 1;
where = sprintf('line 4, column %d: ', column);
assert(strncmp(err.message, where, numel(where)), 'message: %s', err.message);
assert(~isempty(strfind(err.message, '''z''')));
[none, why] = kinloop.Study.read(bad, demo_model);
assert(isempty(none) && strcmp(why.status, 'ESYNTAX') && why.line == 4 && why.column == column);
% a study file's model is looked for beside it; the error names the
% study's line and column of the path
lone = [tempname(), '.study'];
f = fopen(lone, 'w');
fprintf(f, 'kinloop-study 1\nmodel flap-tucker.kinloop\n');
fclose(f);
unwind_protect
  [none, why] = kinloop.Study.read_file(lone);
unwind_protect_cleanup
  delete(lone);
end_unwind_protect
assert(isempty(none) && strcmp(why.status, 'EIO') && why.line == 2 && why.column == 7);
% found once every statement is read: no line
[none, why] = kinloop.Study.read(sprintf('kinloop-study 1\nmodel flap-tucker.kinloop\nsamples 3\n'), demo_model);
assert(isempty(none) && why.line == 0 && ~isempty(strfind(why.message, 'output')));
err = expect_error(@() kinloop.Study.read_file(fullfile(tempdir(), 'no-such.study')), 'kinloop:EIO');
assert(~isempty(strfind(err.message, 'no-such.study')));
expect_error(@() kinloop.Study(), 'kinloop:EINVAL');

% ---- reading solves nothing; prepare says why a nominal cannot be judged ----
% the demo's crank made so long (geometry chosen for this test) that crank +
% ground exceed coupler + rocker, 140 + 220 > 200 + 150: the loop cannot
% close with the crank at 180 degrees, inside the sweep
long_crank = kinloop.Model.read(strrep(demo_model.write(), 'crank 60 0', 'crank 140 0'));
stuck = kinloop.Study.read(sprintf(['kinloop-study 1\nsamples 5\n' ...
                                    'output stroke swing slide rail\n']), long_crank);
assert(isempty(stuck.model_path()) && isempty(stuck.error()));
expect_error(@() stuck.run(0, 1), 'kinloop:ESTAGE');
err = expect_error(@() stuck.prepare(), 'kinloop:ENOASSEMBLY');
assert(~isempty(strfind(err.message, 'the nominal model')) && ...
       strcmp(err.message, stuck.error()), 'message: %s', err.message);
clear stuck
% the study holds the model it is read against: the model's handle may go
kept = kinloop.Study.read(sprintf(['kinloop-study 1\nsamples 3\n' ...
  'vary joint crank_pin a x tolerance 0.05 normal\noutput stroke swing slide rail\n']), long_crank);
delete(long_crank);
clear long_crank
expect_error(@() kept.prepare(), 'kinloop:ENOASSEMBLY');  % its model, still there
clear kept

% ---- handles: the borrowed model cannot change; its solvers outlive the study ----
model_id = m.id;
assert(__kinloop__('study_model', st.id) == model_id, 'one model handle per study');
err = expect_error(@() m.add_link('more'), 'kinloop:ESTATE');
assert(~isempty(strfind(err.message, 'belongs to study')), 'message: %s', err.message);
expect_error(@() m.set_sketch_angle(1, 0.5), 'kinloop:ESTATE');
m.finalize();  % finalized already: nothing to do, as in C
delete(m);     % the study's to free: nothing happens
again = st.model();
assert(again.id == model_id && again.joint_count() == 7, 'the model is still there');
s = kinloop.Solver(again);
s.solve_position(0);
before = s.row();
study_id = st.id;
delete(st);    % allowed: the library keeps the model for the solver
[ids, kinds] = kinloop.handles();
assert(~any(ids == study_id) && ~any(ids == model_id), 'the study and its model handle go');
s.solve_position(0.2);
s.solve_position(0);
assert(max(abs(s.row() - before)) <= 1e-9, 'the solver keeps solving the same model');
clear st m again s
% ids are never reused: both say they were freed
err = expect_error(@() __kinloop__('study_sample_count', study_id), 'kinloop:bad_handle');
assert(~isempty(strfind(err.message, sprintf('study %d has been freed', study_id))), err.message);
err = expect_error(@() __kinloop__('model_joint_count', model_id), 'kinloop:bad_handle');
assert(~isempty(strfind(err.message, sprintf('model %d has been freed', model_id))), err.message);
expect_error(@() __kinloop__('study_run', model_id, 0, 1, 0), 'kinloop:bad_handle');
