function stop = note_step(solver, step, input)
  % Sweep callback of test_sweep_callback: notes step, input and the
  % rocker angle (link 3 of fourbar.m) read from the solver; never stops.
  global seen
  seen(end + 1, :) = [step, input, solver.link_angle(3)];
  stop = false;
end
