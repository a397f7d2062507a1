function [F, J] = fourbar_loop(q, t2, f)
  % The four-bar's vector-loop equations written out for Octave's fsolve
  % (standard kinematics; docs/theory.md section 7):
  % a e(t2) + b e(t3) - c e(t4) - d e(0) = 0 in the unknowns q = [t3; t4],
  % and their Jacobian dF/dq.
  a = f.a; b = f.b; c = f.c; d = f.d;
  F = [a * cos(t2) + b * cos(q(1)) - c * cos(q(2)) - d;
       a * sin(t2) + b * sin(q(1)) - c * sin(q(2))];
  if nargout > 1
    J = [-b * sin(q(1)),  c * sin(q(2));
          b * cos(q(1)), -c * cos(q(2))];
  end
end
