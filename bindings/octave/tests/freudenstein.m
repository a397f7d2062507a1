function [t3, t4] = freudenstein(f, t2, branch)
  % Freudenstein's equation in its half-angle tangent form, as given in
  % standard machine-design texts (recalled from memory; the same form as
  % tests/test_position.c): with K1 = d/a, K2 = d/c,
  % K3 = (a^2 - b^2 + c^2 + d^2) / (2 a c), A = cos t2 - K1 - K2 cos t2 + K3,
  % B = -2 sin t2, C = K1 - (K2 + 1) cos t2 + K3, the rocker angle is
  % t4 = 2 atan((-B + branch sqrt(B^2 - 4 A C)) / (2 A)); the coupler angle
  % follows from the loop. Because the form is recalled, the angles are
  % checked to close the loop. NaN where the linkage cannot assemble.
  a = f.a; b = f.b; c = f.c; d = f.d;
  k1 = d / a; k2 = d / c; k3 = (a^2 - b^2 + c^2 + d^2) / (2 * a * c);
  A = cos(t2) - k1 - k2 * cos(t2) + k3;
  B = -2 * sin(t2);
  C = k1 - (k2 + 1) * cos(t2) + k3;
  disc = B.^2 - 4 * A .* C;
  disc(disc < 0) = NaN;
  t4 = 2 * atan2(-B + branch * sqrt(disc), 2 * A);
  t3 = atan2(c * sin(t4) - a * sin(t2), d + c * cos(t4) - a * cos(t2));
  ex = a * cos(t2) + b * cos(t3) - c * cos(t4) - d;
  ey = a * sin(t2) + b * sin(t3) - c * sin(t4);
  ok = ~isnan(disc);
  assert(all(hypot(ex(ok), ey(ok)) < 1e-10 * d), 'closed form does not close');
end
