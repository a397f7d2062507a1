classdef Solver < handle
  % kinloop.Solver - solves a finalized kinloop.Model: position, velocity,
  % acceleration, kinematic coefficients, sweeps and design figures.
  %
  %   s = kinloop.Solver(model)               memory from the model's allocator
  %   s = kinloop.Solver(model, 'in_block')   placed in one block the binding
  %                                           holds (kl_solver_new_in)
  %
  % Inputs, rates and accelerations are vectors in input order. Getters
  % take one id or a vector of ids; point getters give one [x y] row per id.
  % Rates and accelerations not solved at the current position read as NaN.
  % A failed call raises 'kinloop:<status>' with the library's message and
  % leaves the solver as it was. The solver keeps its model alive; it is
  % freed when the last reference goes, or by delete(s).

  properties (SetAccess = private)
    id = [];       % the gateway's handle for this solver
    model = [];    % the kinloop.Model it solves
  end

  % Public but hidden: Octave 7 runs a destructor in the context of the
  % object that released it, where private properties cannot be read.
  properties (Hidden)
    freed = false;  % set once the gateway has freed the handle
  end

  methods
    function obj = Solver(model, where)
      if ~isa(model, 'kinloop.Model')
        error('kinloop:bad_argument', 'kinloop.Solver: the argument must be a kinloop.Model');
      end
      if nargin < 2
        obj.id = __kinloop__('solver_new', model.id);
      elseif ischar(where) && strcmp(where, 'in_block')
        obj.id = __kinloop__('solver_new_in', model.id);
      else
        error('kinloop:bad_argument', 'kinloop.Solver: the second argument may only be ''in_block''');
      end
      obj.model = model;
    end

    function delete(obj)
      % Frees the solver (once; later calls do nothing).
      if ~obj.freed && ~isempty(obj.id)
        __kinloop__('solver_free', obj.id);
        obj.freed = true;
      end
    end

    function msg = last_error(obj)
      msg = __kinloop__('solver_error', obj.id);
    end

    function id = model_id(obj)
      % The gateway id of the model, as the library records it.
      id = __kinloop__('solver_model', obj.id);
    end

    % ---- options and sketch ----

    function set_options(obj, varargin)
      % set_options(struct) or set_options('name', value, ...): changes the
      % fields given (tolerance, step_tolerance, max_iterations,
      % max_backtracks, max_step, singular_rcond, and kernel: 'auto',
      % 'small', 'dense' or 'banded').
      if numel(varargin) == 1
        __kinloop__('solver_set_options', obj.id, varargin{1});
      else
        __kinloop__('solver_set_options', obj.id, struct(varargin{:}));
      end
    end

    function o = options(obj)
      o = __kinloop__('solver_options', obj.id);
    end

    function set_link_angle(obj, link, angle)
      __kinloop__('set_link_angle', obj.id, link, angle);
    end

    function set_joint_slide(obj, joint, slide)
      __kinloop__('set_joint_slide', obj.id, joint, slide);
    end

    % ---- stages ----

    function solve_position(obj, inputs)
      __kinloop__('solve_position', obj.id, inputs);
    end

    function solve_velocity(obj, input_rates)
      __kinloop__('solve_velocity', obj.id, input_rates);
    end

    function solve_acceleration(obj, input_accels)
      __kinloop__('solve_acceleration', obj.id, input_accels);
    end

    function solve_coefficients(obj)
      __kinloop__('solve_coefficients', obj.id);
    end

    function st = stats(obj)
      st = __kinloop__('solver_stats', obj.id);
    end

    % ---- results ----

    function v = link_angle(obj, links)
      v = __kinloop__('link_angle', obj.id, links);
    end

    function v = link_rate(obj, links)
      v = __kinloop__('link_rate', obj.id, links);
    end

    function v = link_accel(obj, links)
      v = __kinloop__('link_accel', obj.id, links);
    end

    function v = joint_slide(obj, joints)
      v = __kinloop__('joint_slide', obj.id, joints);
    end

    function v = joint_slide_rate(obj, joints)
      v = __kinloop__('joint_slide_rate', obj.id, joints);
    end

    function v = joint_slide_accel(obj, joints)
      v = __kinloop__('joint_slide_accel', obj.id, joints);
    end

    function v = joint_angle(obj, joints)
      v = __kinloop__('joint_angle', obj.id, joints);
    end

    function v = input_value(obj, inputs)
      v = __kinloop__('input_value', obj.id, inputs);
    end

    function xy = link_origin(obj, links)
      xy = __kinloop__('link_origin', obj.id, links);
    end

    function xy = point_position(obj, points)
      xy = __kinloop__('point_position', obj.id, points);
    end

    function xy = point_velocity(obj, points)
      xy = __kinloop__('point_velocity', obj.id, points);
    end

    function xy = point_acceleration(obj, points)
      xy = __kinloop__('point_acceleration', obj.id, points);
    end

    % ---- kinematic coefficients (after solve_coefficients) ----

    function v = link_angle_deriv(obj, links, input)
      v = __kinloop__('link_angle_deriv', obj.id, links, input);
    end

    function v = link_angle_deriv2(obj, links, input_i, input_j)
      v = __kinloop__('link_angle_deriv2', obj.id, links, input_i, input_j);
    end

    function v = joint_slide_deriv(obj, joints, input)
      v = __kinloop__('joint_slide_deriv', obj.id, joints, input);
    end

    function v = joint_slide_deriv2(obj, joints, input_i, input_j)
      v = __kinloop__('joint_slide_deriv2', obj.id, joints, input_i, input_j);
    end

    function xy = point_deriv(obj, points, input)
      xy = __kinloop__('point_deriv', obj.id, points, input);
    end

    function xy = point_deriv2(obj, points, input_i, input_j)
      xy = __kinloop__('point_deriv2', obj.id, points, input_i, input_j);
    end

    % ---- states and assembly modes ----

    function copy_state_from(obj, other)
      % Takes over the whole state of another solver of the same model.
      __kinloop__('solver_copy_state', obj.id, other.id);
    end

    function n = find_assemblies(obj, inputs, modes)
      % n = find_assemblies(inputs [, modes]): the number of distinct
      % assembly modes at inputs; the first numel(modes) are written into
      % the solvers of the cell array modes.
      if nargin < 3 || isempty(modes)
        n = __kinloop__('solver_find_assemblies', obj.id, inputs);
      else
        ids = cellfun(@(m) m.id, modes);
        n = __kinloop__('solver_find_assemblies', obj.id, inputs, ids);
      end
    end

    function modes = assemblies(obj, inputs)
      % A cell array of new solvers, one per assembly mode at inputs.
      n = obj.find_assemblies(inputs);
      modes = cell(1, n);
      for k = 1:n
        modes{k} = kinloop.Solver(obj.model);
      end
      obj.find_assemblies(inputs, modes);
    end

    % ---- sweeps ----

    function r = sweep(obj, input, from, to, steps, fn)
      % r = sweep(input, from, to, steps [, fn]): input over steps + 1 values,
      % by continuation. r holds one row per delivered step: input, and
      % link_angle/link_rate/link_accel (column link + 1),
      % joint_slide/_rate/_accel and joint_angle (column joint + 1),
      % point_x/_y/_vx/_vy/_ax/_ay (column point + 1); rates and
      % accelerations are those of a unit input rate (kinematic
      % coefficients). Also status, status_name (OK, LIMIT, STOPPED,
      % ESINGULAR), message, limit_input, steps_done, substeps. A sweep that
      % fails before its first step raises the error instead.
      % fn(solver, step, input) is called after each step; returning true
      % stops the sweep; it may read from the solver but not change it.
      if nargin < 6
        r = __kinloop__('solver_sweep', obj.id, input, from, to, steps);
      elseif ~is_function_handle(fn)
        error('kinloop:bad_argument', 'sweep: fn must be a function handle fn(solver, step, input)');
      else
        r = __kinloop__('solver_sweep', obj.id, input, from, to, steps, ...
                        @(id, step, u) fn(obj, step, u));
      end
    end

    % ---- design figures ----
    % An output is struct('kind', K, 'id', id [, 'line_a', j, 'line_b', k])
    % with K one of 'link_angle', 'slide', 'joint_angle', 'point_x',
    % 'point_y', 'transmission'.

    function reset(obj)
      % Back to the state of a new solver: the model's sketch, nothing solved.
      __kinloop__('solver_reset', obj.id);
    end

    function substeps = reach(obj, inputs)
      % Goes to the inputs by continuation from the position last solved
      % (or the model's start); raises with where the motion stopped.
      substeps = __kinloop__('solver_reach', obj.id, inputs);
    end

    function xy = link_to_global(obj, link, local)
      xy = __kinloop__('link_to_global', obj.id, link, local);
    end

    function xy = joint_position(obj, joints)
      xy = __kinloop__('joint_position', obj.id, joints);
    end

    function xy = link_origin_velocity(obj, links)
      xy = __kinloop__('link_origin_velocity', obj.id, links);
    end

    function xy = link_origin_accel(obj, links)
      xy = __kinloop__('link_origin_accel', obj.id, links);
    end

    function v = row(obj)
      % Every quantity of the state in one row (kinloop.Model.row_offset).
      v = __kinloop__('solver_row', obj.id);
    end

    function [rows, result] = sweep_rows(obj, input, from, to, steps)
      % A sweep without a callback: one row per step.
      [rows, result] = __kinloop__('solver_sweep_rows', obj.id, input, from, to, steps);
    end

    function v = output_value(obj, output)
      v = __kinloop__('output_value', obj.id, output);
    end

    function d = output_deriv(obj, output, input)
      d = __kinloop__('output_deriv', obj.id, output, input);
    end

    function r = output_range(obj, input, from, to, steps, output)
      % Extremes of an output over a sweep: min, max, input_at_min,
      % input_at_max, sweep_status, sweep_status_name, limit_input.
      r = __kinloop__('output_range', obj.id, input, from, to, steps, output);
    end

    function ma = mechanical_advantage(obj, output, input)
      ma = __kinloop__('output_mechanical_advantage', obj.id, output, input);
    end

    function efforts = input_effort(obj, loads)
      % loads: struct array, kind 'force' (id = point, fx, fy) or 'torque'
      % (id = link, torque); one effort per input.
      efforts = __kinloop__('input_effort', obj.id, loads);
    end

    function r = input_effort_range(obj, input, from, to, steps, loads, effort_input)
      % Extremes of input effort_input's static effort while input sweeps.
      r = __kinloop__('input_effort_range', obj.id, input, from, to, steps, loads, effort_input);
    end

    function d = output_sensitivity(obj, output, dimension)
      % dimension: struct('kind', 'joint_a' | 'joint_b' | 'point', 'id', id,
      % 'axis', 'x' | 'y').
      d = __kinloop__('output_sensitivity', obj.id, output, dimension);
    end

    function [worst, rss] = tolerance_stack(obj, output, dimensions, tolerances)
      [worst, rss] = __kinloop__('output_tolerance_stack', obj.id, output, dimensions, tolerances);
    end
  end
end
