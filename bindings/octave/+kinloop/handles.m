function [ids, kinds] = handles()
  % [ids, kinds] = kinloop.handles(): the models, solvers and studies the
  % binding holds now, for finding leaks.
  [ids, kinds] = __kinloop__('handles');
end
