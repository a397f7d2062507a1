function d = angle_diff(a, b)
  % a - b reduced to (-pi, pi], elementwise.
  d = mod(a - b + pi, 2 * pi) - pi;
  d(d == -pi) = pi;
end
