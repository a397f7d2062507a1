function problem = run_one_test(path)
  % Runs one test script in this function's workspace, so that its objects
  % are destroyed on return; then checks that no handle outlived them.
  % Returns '' on success, else what went wrong.
  problem = run_isolated(path);
  [ids, kinds] = kinloop.handles();
  if isempty(problem) && ~isempty(ids)
    problem = sprintf('left %d handle(s) alive:%s', numel(ids), ...
                      sprintf(' %s %d', [kinds; num2cell(ids)]{:}));
  end
  % free what a failed test left, solvers before their models and
  % studies (a study's model goes with it, so the list is read again)
  for want = {'solver', 'study', 'model'}
    [ids, kinds] = kinloop.handles();
    for k = find(strcmp(kinds, want{1}))
      __kinloop__([want{1} '_free'], ids(k));
    end
  end
end

function problem = run_isolated(path__)
  problem = '';
  try
    run(path__);
  catch err
    problem = err.message;
    if ~isempty(err.identifier)
      problem = sprintf('[%s] %s', err.identifier, problem);
    end
    for f = err.stack(:)'
      [~, base] = fileparts(f.file);
      if strncmp(base, 'test_', 5)
        problem = sprintf('%s\n    at %s line %d', problem, base, f.line);
        break;
      end
    end
  end
end
