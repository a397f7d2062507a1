function p = linear_percentile(v, q)
  % Percentile q (a fraction) of the values v by linear interpolation between
  % the closest ranks, as include/kinloop.h documents kl_study_summary's
  % percentiles: with the n values sorted, position (n - 1) q from the first.
  v = sort(v(:));
  at = q * (numel(v) - 1);
  lo = floor(at);
  if lo + 1 >= numel(v)
    p = v(end);
  else
    p = v(lo + 1) + (at - lo) * (v(lo + 2) - v(lo + 1));
  end
end
