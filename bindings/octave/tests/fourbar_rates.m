function w = fourbar_rates(f, t2, branch)
  % [w3 w4] (one row per crank angle) of a four-bar built by fourbar.m at a
  % unit crank rate: the textbook relations by Cramer's rule on the
  % differentiated loop (docs/theory.md section 7),
  % w3 = a sin(t4 - t2) / (b sin(t3 - t4)), w4 = a sin(t3 - t2) / (c sin(t3 - t4)),
  % with t3, t4 from Freudenstein's closed form on the given branch.
  t2 = t2(:);
  [t3, t4] = freudenstein(f, t2, branch);
  w = [f.a * sin(t4 - t2) ./ (f.b * sin(t3 - t4)), ...
       f.a * sin(t3 - t2) ./ (f.c * sin(t3 - t4))];
end
