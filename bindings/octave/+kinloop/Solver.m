classdef Solver < kinloop.SolverMethods
  % kinloop.Solver - solves a finalized kinloop.Model: position, velocity,
  % acceleration, kinematic coefficients, sweeps and design figures.
  %
  %   s = kinloop.Solver(model)               memory from the model's allocator
  %   s = kinloop.Solver(model, 'in_block')   placed in one block the binding
  %                                           holds (kl_solver_new_in)
  %   s = kinloop.Solver(other)               another solver of other's model
  %
  % Inputs, rates and accelerations are vectors in input order. Getters
  % take one id or a vector of ids; point getters give [x y]. Rates and
  % accelerations not solved at the current position read as NaN. A failed
  % call raises 'kinloop:<status>' with the library's message and leaves the
  % solver as it was. The methods of the plain library functions come from
  % kinloop.SolverMethods (generated from kinloop.h). The library keeps the
  % model for the solver: delete(model) leaves the solver working. The
  % solver is freed when the last reference goes, or by delete(s).

  properties (SetAccess = private)
    model = [];    % the kinloop.Model it solves
  end

  methods
    function obj = Solver(model, where, its_model)
      % Solver('adopt', id, its_model) wraps a solver the gateway made.
      if ischar(model) && strcmp(model, 'adopt')
        [obj.id, obj.model] = deal(where, its_model);
        return
      end
      if ~isa(model, 'kinloop.Model') && ~isa(model, 'kinloop.Solver')
        error('kinloop:EINVAL', 'kinloop.Solver: the argument must be a kinloop.Model or Solver');
      end
      if nargin < 2
        obj.id = __kinloop__('solver_new', model.id);
      elseif ischar(where) && strcmp(where, 'in_block')
        obj.id = __kinloop__('solver_new_in', model.id);
      else
        error('kinloop:EINVAL', 'kinloop.Solver: the second argument may only be ''in_block''');
      end
      if isa(model, 'kinloop.Solver')
        model = model.model;
      end
      obj.model = model;
    end

    function id = model_id(obj)
      % The gateway id of the model, as the library records it (kl_solver_model).
      id = __kinloop__('solver_model', obj.id);
    end

    function set_options(obj, varargin)
      % set_options(struct) or set_options('name', value, ...), or both:
      % changes the fields given (tolerance, step_tolerance, max_iterations,
      % max_backtracks, max_step, singular_rcond, and kernel: 'auto',
      % 'small', 'dense' or 'banded') and keeps the others.
      o = obj.options();
      given = kinloop.Solver.fields_of(varargin);
      for name = fieldnames(given).'   % the gateway refuses unknown fields
        o.(name{1}) = given.(name{1});
      end
      set_options@kinloop.SolverMethods(obj, o);
    end

    % ---- assembly modes and sweeps ----

    function modes = find_assemblies(obj, inputs)
      % The assembly modes at inputs: a cell array of new solvers, each at a
      % solved position (with this solver's options); this one keeps its state.
      modes = arrayfun(@(id) kinloop.Solver('adopt', id, obj.model), ...
                       __kinloop__('solver_find_assemblies', obj.id, inputs), 'UniformOutput', false);
    end

    function r = sweep(obj, input, from, to, steps, fn)
      % r = sweep(input, from, to, steps [, fn]): input over steps + 1 values,
      % by continuation. r holds one row per delivered step: input (the
      % swept input's value), and a field per quantity of the library's row
      % (kl_solver_row; names by kinloop.quantity_str), a column per item
      % (id + 1): input_value, input_rate, input_accel, link_angle,
      % link_rate, link_accel, joint_angle, joint_slide, joint_slide_rate,
      % joint_slide_accel (slides NaN for revolute joints), point_x,
      % point_y, point_vx, point_vy, point_ax, point_ay, transmission (one
      % column per site of model.transmissions()), rcond. Rates and
      % accelerations are those of a unit input rate (kinematic
      % coefficients). Also the fields of kl_sweep_result: status ('OK',
      % 'LIMIT', 'STOPPED', 'ESINGULAR'), steps_done, limit_input,
      % substeps, passages, passage_input; and message. A sweep that fails
      % before its first step raises the error instead. Without fn the
      % library records the rows itself (kl_solver_sweep_rows).
      % fn(solver, step, input) is called after each step; returning true
      % stops the sweep; it may read from the solver but not change it.
      if nargin < 6
        r = __kinloop__('solver_sweep', obj.id, input, from, to, steps);
      elseif ~is_function_handle(fn)
        error('kinloop:EINVAL', 'solver_sweep: fn must be a function handle fn(solver, step, input)');
      else
        r = __kinloop__('solver_sweep', obj.id, input, from, to, steps, ...
                        @(id, step, u) fn(obj, step, u));
      end
    end

    % ---- force figures over a cycle ----

    function [summary, inputs, joints] = cycle_summarize(obj, loads, varargin)
      % [summary, inputs, joints] = cycle_summarize(loads, cycle), or
      % cycle_summarize(loads, 'speed', w, 'steps', n, ...), or both
      % (cycle_summarize(loads, cycle, 'steps', n)): the force
      % figures of a cycle (kl_cycle_summarize): input cycle.input driven at
      % the constant cycle.speed over its range against the constant loads
      % (a struct array of kind, id, fx, fy, torque, or []), the other
      % inputs at rest. The cycle's fields not given (input, from, to,
      % steps, speed, speed_fluctuation) keep kinloop.cycle_default()'s
      % values. summary: the shaking force and moment, the energy
      % fluctuation and flywheel inertia, sweep_status 'LIMIT' when the
      % motion stopped inside the range; inputs: a peak struct (peak, at,
      % mean, rms) per input, its effort; joints: one per joint, the
      % magnitude of its force.
      [summary, inputs, joints] = __kinloop__('cycle_summarize', obj.id, ...
                                              kinloop.Solver.fields_of(varargin), loads);
    end

    function w = workspace(obj, point, varargin)
      % w = workspace(point), workspace(point, options) or
      % workspace(point, 'grid', n, 'step', h): the workspace of a point
      % (kl_solver_workspace) for a model with two turning inputs, its
      % boundary and the singular curves inside traced by continuation.
      % w has the result's fields (area, xmin, ymin, xmax, ymax, vertices,
      % curves, closed, seeds), xy (a row per vertex, global frame), curve
      % (each vertex's curve number, from 0) and kind (a cell of 'boundary'
      % or 'fold', the stretch from each vertex). The solver keeps its
      % state.
      [xy, curve, kind, w] = workspace@kinloop.SolverMethods(obj, point, ...
                                                             kinloop.Solver.fields_of(varargin));
      w.xy = xy;
      w.curve = curve;
      w.kind = kind;
    end

    function t = cycle_table(obj, loads, varargin)
      % t = cycle_table(loads, cycle) or cycle_table(loads, 'name', value,
      % ...): the forces over a cycle sample by sample (kl_cycle_table),
      % cycle and loads as for cycle_summarize. t has a row per sample in
      % each named column: input, effort (a column per input), joint_fx,
      % joint_fy, joint_moment (a column per joint: kl_joint_force and
      % kl_joint_moment), ground_fx, ground_fy, ground_moment
      % (kl_ground_force), kinetic_energy, work (the driven input's work
      % since the first sample); and rows, the C rows whole. A cycle
      % stopped by a motion limit has the samples it reached.
      t = __kinloop__('cycle_table', obj.id, kinloop.Solver.fields_of(varargin), loads);
    end
  end

  methods (Static, Access = private)
    function c = fields_of(given)
      % A struct (a cycle, options) from a struct, name-value pairs
      % replacing its fields (or making one), or nothing ([]: the defaults).
      c = [];
      if ~isempty(given) && isstruct(given{1})
        c = given{1};
        given = given(2:end);
      end
      if mod(numel(given), 2) ~= 0 || ~all(cellfun(@ischar, given(1:2:end)))
        error('kinloop:EINVAL', 'give a struct of the fields, name-value pairs, or both');
      end
      for k = 1:2:numel(given)
        c.(given{k}) = given{k + 1};
      end
    end
  end
end
