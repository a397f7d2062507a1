% run_tests.m - runs every test_*.m script beside this file, each in a
% workspace of its own, and exits nonzero if any check fails or a test
% leaves models or solvers behind.
%   octave-cli --no-gui --norc --quiet run_tests.m OCT_DIR M_DIR
% OCT_DIR holds the test gateway __kinloop__.oct, M_DIR the +kinloop package.
args = argv();
if numel(args) >= 2
  addpath(args{2});
  addpath(args{1});   % the test gateway first, before the shipped one
end
addpath(fileparts(mfilename('fullpath')));
scripts = dir(fullfile(fileparts(mfilename('fullpath')), 'test_*.m'));
failed = {};
for k = 1:numel(scripts)
  [~, name] = fileparts(scripts(k).name);
  started = tic;
  problem = run_one_test(fullfile(scripts(k).folder, scripts(k).name));
  if isempty(problem)
    printf('PASS %s (%.1f s)\n', name, toc(started));
  else
    printf('FAIL %s: %s\n', name, problem);
    failed{end + 1} = name;
  end
end
printf('%d tests, %d failed%s\n', numel(scripts), numel(failed), ...
       sprintf(' %s', failed{:}));
exit(numel(failed) > 0);
