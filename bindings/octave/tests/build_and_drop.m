function model_id = build_and_drop()
  % Makes a counted model and a solver and lets both go out of scope.
  f = fourbar(35, 110, 75, 95, counted_model());
  s = kinloop.Solver(f.m);
  s.set_link_angle(f.coupler, 0.5);
  s.set_link_angle(f.rocker, 1.5);
  s.solve_position(0.1);
  model_id = f.m.id;
end
