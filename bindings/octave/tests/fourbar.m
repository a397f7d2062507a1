function f = fourbar(a, b, c, d, model)
  % A four-bar as the test support builds it in C (tests/support.c): ground
  % pivots O2 = (0, 0) and O4 = (d, 0), crank a from O2, coupler b, rocker
  % c from O4; each link's local x-axis runs from its first joint to its
  % second, so the link angles are the textbook theta2, theta3, theta4.
  % Input 0 is the crank angle; a coupler point sits at (b/2, b/4).
  % Pass a model to build into it (e.g. one counting its allocations).
  if nargin < 5
    model = kinloop.Model();
  end
  f.m = model;
  f.a = a; f.b = b; f.c = c; f.d = d;
  f.crank = f.m.add_link('crank');
  f.coupler = f.m.add_link('coupler');
  f.rocker = f.m.add_link('rocker');
  f.pivot = f.m.add_revolute(0, [0 0], f.crank, [0 0]);
  f.crank_pin = f.m.add_revolute(f.crank, [a 0], f.coupler, [0 0]);
  f.rocker_pin = f.m.add_revolute(f.coupler, [b 0], f.rocker, [c 0]);
  f.rocker_pivot = f.m.add_revolute(f.rocker, [0 0], 0, [d 0]);
  f.coupler_point = f.m.add_point(f.coupler, [b / 2, b / 4], 'coupler');
  f.m.add_input(f.pivot);
  f.m.finalize();
end
