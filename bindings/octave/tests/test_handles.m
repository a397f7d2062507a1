% test_handles.m - models and solvers are freed exactly once, whichever way
% they go; a solver keeps working after its model's handle is freed (the
% library keeps the model for it, kl_model_free); a freed or foreign handle
% raises an error instead of crashing.
% Allocation counts come from the counting allocator of tests/support.c,
% through which the library makes every allocation of such a model.

% ---- every byte comes back, once ----
f = fourbar(35, 110, 75, 95, counted_model());
model_id = f.m.id;
built = allocations(f.m);
assert(built.live > 0 && built.live_bytes > 0, 'the model holds memory');
s = kinloop.Solver(f.m);
with_solver = allocations(f.m);
% kl_solver_new takes one block from the model's allocator (include/kinloop.h)
assert(with_solver.live == built.live + 1, 'a solver is one block');
assert(with_solver.live_bytes - built.live_bytes >= f.m.solver_bytes());
solver_id = s.id;
% the model's handle may go first: the library keeps the model for its solver
[t3, t4] = freudenstein(f, 0.4, 1);
s.set_link_angle(f.coupler, t3 + 0.15);  % a rough sketch near the branch
s.set_link_angle(f.rocker, t4 - 0.15);
m = f.m;
delete(m);
delete(m);  % a destructor runs again when the variable goes: a no-op
err = expect_error(@() m.add_link('late'), 'kinloop:bad_handle');
assert(~isempty(strfind(err.message, sprintf('model %d has been freed', model_id))), ...
       'message: %s', err.message);
expect_error(@() __kinloop__('model_free', model_id), 'kinloop:bad_handle');
assert(allocations(model_id).live == with_solver.live, 'the solver still holds the model');
% Freudenstein's equation (freudenstein.m) after the model's handle is gone
for u = [0.4 1.3 2.9]
  s.solve_position(u);
  [t3, t4] = freudenstein(f, u, 1);
  assert(abs(angle_diff(s.link_angle(f.rocker), t4)) <= 1e-10 && ...
         abs(angle_diff(s.link_angle(f.coupler), t3)) <= 1e-10, 'solves at %g', u);
end
twin = kinloop.Solver(s);  % another solver of the same model
twin.copy_state(s);
assert(isequal(twin.link_angle(0:3), s.link_angle(0:3)));
assert(numel(s.find_assemblies(1.0)) == 2, 'a crank-rocker assembles two ways');
clear twin
delete(s);
gone = allocations(model_id);
assert(gone.live == 0 && gone.live_bytes == 0, 'all %d bytes freed', gone.live_bytes);
calls = gone.calls;
delete(s);
err = expect_error(@() s.link_angle(0), 'kinloop:bad_handle');
assert(~isempty(strfind(err.message, sprintf('solver %d has been freed', solver_id))), ...
       'message: %s', err.message);
err = expect_error(@() __kinloop__('solver_free', solver_id), 'kinloop:bad_handle');
gone = allocations(model_id);
assert(gone.calls == calls && gone.live == 0, 'nothing is freed twice');
clear f m s

% ---- going out of scope frees both, solver first ----
function_made = build_and_drop();
dropped = allocations(function_made);
assert(dropped.live == 0 && dropped.live_bytes == 0);
assert(isempty(kinloop.handles()), 'objects out of scope leave no handle');

% ---- an id of the wrong kind, or no id at all ----
f = fourbar(35, 110, 75, 95);
err = expect_error(@() __kinloop__('solve_position', f.m.id, 0), 'kinloop:bad_handle');
assert(~isempty(strfind(err.message, 'is a model, not a solver')), 'message: %s', err.message);
expect_error(@() __kinloop__('add_link', 123456), 'kinloop:bad_handle');
expect_error(@() __kinloop__('add_link', 0), 'kinloop:bad_handle');
expect_error(@() __kinloop__('add_link', -1), 'kinloop:bad_handle');
expect_error(@() kinloop.Solver(42), 'kinloop:EINVAL');

% ---- the gateway stays loaded (and its handles valid) through clear ----
clear functions
assert(f.m.joint_count() == 4);

% ---- allocation failures: KL_ENOMEM, and nothing changes or leaks ----
m = counted_model();
m.add_link('first');
a = allocations(m);
__kinloop__('set_fail_at', m.id, a.calls + 1);
err = expect_error(@() m.add_link('second'), 'kinloop:ENOMEM');
assert(strcmp(err.message, m.error()), 'message: %s', err.message);
assert(m.link_count() == 2, 'the refused link was not added');
__kinloop__('set_fail_at', m.id, 0);
m.add_link('second');
m.add_link('third');
% a four-bar (geometry chosen for this test: 10, 30, 25, 28)
m.add_revolute(0, [0 0], 1, [0 0]);
m.add_revolute(1, [10 0], 2, [0 0]);
m.add_revolute(2, [30 0], 3, [25 0]);
m.add_revolute(3, [0 0], 0, [28 0]);
m.add_input(0);
a = allocations(m);
__kinloop__('set_fail_at', m.id, a.calls + 1);
expect_error(@() m.finalize(), 'kinloop:ENOMEM');
assert(~m.is_finalized());
__kinloop__('set_fail_at', m.id, 0);
m.finalize();
a = allocations(m);
__kinloop__('set_fail_at', m.id, a.calls + 1);
expect_error(@() kinloop.Solver(m), 'kinloop:ENOMEM');
[~, kinds] = kinloop.handles();
assert(~any(strcmp(kinds, 'solver')), 'no solver handle was made');
__kinloop__('set_fail_at', m.id, 0);
% a solver placed in the binding's own block takes nothing from the model
before = allocations(m);
s = kinloop.Solver(m, 'in_block');
placed = allocations(m);
assert(placed.live == before.live && placed.calls == before.calls);
t = kinloop.Solver(m);
for solver = {s, t}
  solver{1}.set_link_angle(2, 0.5);
  solver{1}.set_link_angle(3, 1.5);
  solver{1}.solve_position(0.3);
end
assert(isequal(s.link_angle(0:3), t.link_angle(0:3)), 'both placements solve alike');
clear solver
model_id = m.id;
clear s t m
gone = allocations(model_id);
assert(gone.live == 0 && gone.live_bytes == 0);
