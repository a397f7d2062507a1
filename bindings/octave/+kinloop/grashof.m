function [class_code, class_name] = grashof(ground, input, coupler, output)
  % [code, name] = kinloop.grashof(ground, input, coupler, output): the
  % four-bar's class by the Grashof condition, relative to the input link
  % (name: 'crank-rocker', 'rocker-crank', 'double-crank', 'double-rocker',
  % 'change point' or 'triple-rocker').
  [class_code, class_name] = __kinloop__('grashof', ground, input, coupler, output);
end
