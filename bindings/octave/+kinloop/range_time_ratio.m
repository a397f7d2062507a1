function ratio = range_time_ratio(range)
  % kinloop.range_time_ratio(range): forward over return time of a
  % quick-return mechanism, from the extremes Solver.output_range found over
  % one turn (kl_range_time_ratio).
  ratio = __kinloop__('range_time_ratio', range);
end
