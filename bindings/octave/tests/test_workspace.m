% test_workspace.m - the workspace of a point through the binding: the
% five-bar's tip against the intersection of its two annuli (the closed form
% derived in tests/test_workspace.c), its area against Octave's own
% quadrature (integral) of the intersection's width, and bad input.

% geometry chosen for this test: cranks 0.9 and 1.1, arms 1.5 and 1.6,
% pivots 0.8 apart; the outer circles cross, the inner ones (0.6 and 0.5)
% lie inside the other annulus, apart from each other
a1 = 0.9; b1 = 1.5; a2 = 1.1; b2 = 1.6; d = 0.8;
m = kinloop.Model();
c1 = m.add_link('left crank');
c2 = m.add_link('right crank');
l1 = m.add_link('left arm');
l2 = m.add_link('right arm');
p1 = m.add_revolute(0, [0 0], c1, [0 0]);
p2 = m.add_revolute(0, [d 0], c2, [0 0]);
m.add_revolute(c1, [a1 0], l1, [0 0]);
m.add_revolute(c2, [a2 0], l2, [0 0]);
m.add_revolute(l1, [b1 0], l2, [b2 0]);
tip = m.add_point(l1, [b1 0], 'tip');
m.add_input(p1);
m.add_input(p2);
m.finalize();
s = kinloop.Solver(m);
w = s.workspace(tip);
centres = [0 0 d d];
radii = [a1 + b1, b1 - a1, a2 + b2, b2 - a2];
miss = inf(size(w.xy, 1), 1);
for k = 1:4
  miss = min(miss, abs(hypot(w.xy(:, 1) - centres(k), w.xy(:, 2)) - radii(k)));
end
assert(w.vertices > 100 && max(miss) < 1e-9);
assert(sum(strcmp(w.kind, 'boundary')) >= w.vertices - 4);

% the intersection's width at height y: the overlap of each annulus's one
% or two intervals of x
function v = annulus_rows(c, ri, ro, y)
  v = zeros(0, 2);
  if abs(y) >= ro
    return;
  end
  o = sqrt(ro^2 - y^2);
  if abs(y) >= ri
    v = [c - o, c + o];
  else
    i = sqrt(ri^2 - y^2);
    v = [c - o, c - i; c + i, c + o];
  end
end
function w = width_at(y, a1, b1, a2, b2, d)
  w = zeros(size(y));
  for n = 1:numel(y)
    p = annulus_rows(0, b1 - a1, a1 + b1, y(n));
    q = annulus_rows(d, b2 - a2, a2 + b2, y(n));
    for i = 1:rows(p)
      for j = 1:rows(q)
        w(n) += max(0, min(p(i, 2), q(j, 2)) - max(p(i, 1), q(j, 1)));
      end
    end
  end
end
reference = integral(@(y) width_at(y, a1, b1, a2, b2, d), -(a1 + b1), a1 + b1, ...
                     'AbsTol', 1e-12, 'RelTol', 1e-10, ...
                     'Waypoints', [-0.6 -0.5 0.5 0.6]);
assert(abs(w.area - reference) < 1e-4 * reference, 'area %g, integral %g', w.area, reference);

% bad input: each its own status
expect_error(@() s.workspace(tip, 'step', NaN), 'kinloop:ENONFINITE');
expect_error(@() s.workspace(tip, 'grid', 2), 'kinloop:EINVAL');
expect_error(@() s.workspace(42), 'kinloop:EID');
% room the gateway would make for the vertices (the capacity the class
% leaves at its start): refused before any memory is asked for
expect_error(@() __kinloop__('solver_workspace', s.id, tip, [], 2^31 - 1), ...
             'kinloop:ETOOLARGE');
f = fourbar(40, 120, 80, 100);
expect_error(@() kinloop.Solver(f.m).workspace(f.coupler_point), 'kinloop:EDOF');
