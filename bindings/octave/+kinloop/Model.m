classdef Model < kinloop.Readable
  % kinloop.Model - a planar linkage described as links, joints, points,
  % inputs and loops, then finalized; a thin layer over the kinloop C library.
  %
  %   m = kinloop.Model()                       a new model holding ground (link 0)
  %   m = kinloop.Model('count_allocations')    every allocation through a
  %   m = kinloop.Model('count_allocations', n) counting allocator (refusing
  %                                             the n-th one); see allocations()
  %   m = kinloop.Model.read(text)              a model from model-file text
  %   m = kinloop.Model.read_file(path)
  %
  % Ids are the library's: link 0 is ground, every kind counts from 0 in
  % order of creation. Points are 1x2 vectors [x y] in a link's frame; angles
  % are in radians. A failed call raises 'kinloop:<status>' (e.g.
  % kinloop:ESELFJOINT) with the library's message and changes nothing.
  % The model is freed when the last reference to it goes (a kinloop.Solver
  % keeps its model alive), or by delete(m).
  %
  % A study's model (kinloop.Study's model()) is borrowed: the object keeps
  % its study alive, refuses every change (kinloop:ESTATE: it is finalized),
  % and delete of it frees nothing; the model goes with the study.

  properties (SetAccess = private)
    id = [];      % the gateway's handle for this model
  end

  % Public but hidden: Octave 7 runs a destructor in the context of the
  % object that released it, where private properties cannot be read.
  properties (Hidden)
    freed = false;  % set once the gateway has freed the handle
    owner = [];     % a borrowed model: the kinloop.Study it belongs to
  end

  methods
    function obj = Model(how, arg, owner)
      if nargin == 0
        obj.id = __kinloop__('model_new');
      elseif ischar(how) && strcmp(how, 'count_allocations')
        if nargin < 2
          obj.id = __kinloop__('model_new_with_alloc');
        else
          obj.id = __kinloop__('model_new_with_alloc', arg);
        end
      elseif ischar(how) && strcmp(how, 'adopt')
        obj.id = arg;   % a model the gateway already holds (read, read_file)
      elseif ischar(how) && strcmp(how, 'borrow') && nargin == 3 && isa(owner, 'kinloop.Study')
        obj.id = arg;   % the model of a study (Study.model)
        obj.owner = owner;
      else
        error('kinloop:bad_argument', ...
              'kinloop.Model: use Model() or Model(''count_allocations'' [, fail_at])');
      end
    end

    function delete(obj)
      % Frees the model (once; later calls do nothing). Raises kinloop:in_use
      % while solvers made from it are alive. A borrowed model is its
      % study's to free: nothing happens.
      if ~obj.freed && ~isempty(obj.id) && isempty(obj.owner)
        __kinloop__('model_free', obj.id);
        obj.freed = true;
      end
    end

    function tf = is_borrowed(obj)
      % Whether the model belongs to a study (kinloop.Study's model()).
      tf = ~isempty(obj.owner);
    end

    function msg = last_error(obj)
      % The library's message for the model's last failed call.
      msg = __kinloop__('model_error', obj.id);
    end

    % ---- building ----

    function link = add_link(obj, name)
      if nargin < 2
        link = __kinloop__('add_link', obj.id);
      else
        link = __kinloop__('add_link', obj.id, name);
      end
    end

    function joint = add_revolute(obj, a, pa, b, pb)
      % add_revolute(a, [ax ay], b, [bx by]): pin joint, pa on a meets pb on b.
      [ax, ay] = kinloop.Model.xy(pa, 'pa');
      [bx, by] = kinloop.Model.xy(pb, 'pb');
      joint = __kinloop__('add_revolute', obj.id, a, ax, ay, b, bx, by);
    end

    function joint = add_prismatic(obj, a, pa, axis_angle, b, pb)
      % add_prismatic(a, [ax ay], axis_angle, b, [bx by]): slider on a's line.
      [ax, ay] = kinloop.Model.xy(pa, 'pa');
      [bx, by] = kinloop.Model.xy(pb, 'pb');
      joint = __kinloop__('add_prismatic', obj.id, a, ax, ay, axis_angle, b, bx, by);
    end

    function joint = add_slot(obj, a, pa, axis_angle, b, pb)
      % add_slot(a, [ax ay], axis_angle, b, [bx by]): pin in a slot of a.
      [ax, ay] = kinloop.Model.xy(pa, 'pa');
      [bx, by] = kinloop.Model.xy(pb, 'pb');
      joint = __kinloop__('add_slot', obj.id, a, ax, ay, axis_angle, b, bx, by);
    end

    function joint = add_prismatic_through(obj, a, pa, pt, b, pb)
      % add_prismatic_through(a, [ax ay], [tx ty], b, [bx by]): slide line of
      % a through two of its points, measured from pa toward pt.
      [ax, ay] = kinloop.Model.xy(pa, 'pa');
      [tx, ty] = kinloop.Model.xy(pt, 'pt');
      [bx, by] = kinloop.Model.xy(pb, 'pb');
      joint = __kinloop__('add_prismatic_through', obj.id, a, ax, ay, tx, ty, b, bx, by);
    end

    function joint = add_slot_through(obj, a, pa, pt, b, pb)
      [ax, ay] = kinloop.Model.xy(pa, 'pa');
      [tx, ty] = kinloop.Model.xy(pt, 'pt');
      [bx, by] = kinloop.Model.xy(pb, 'pb');
      joint = __kinloop__('add_slot_through', obj.id, a, ax, ay, tx, ty, b, bx, by);
    end

    function point = add_point(obj, link, p, name)
      % add_point(link, [x y] [, name]): a point in link's frame.
      [x, y] = kinloop.Model.xy(p, 'p');
      if nargin < 4
        point = __kinloop__('add_point', obj.id, link, x, y);
      else
        point = __kinloop__('add_point', obj.id, link, x, y, name);
      end
    end

    function input = add_input(obj, joint)
      input = __kinloop__('add_input', obj.id, joint);
    end

    function loop = add_loop(obj, joints)
      loop = __kinloop__('add_loop', obj.id, joints);
    end

    function finalize(obj)
      __kinloop__('model_finalize', obj.id);
    end

    function set_joint_name(obj, joint, name)
      __kinloop__('model_set_joint_name', obj.id, joint, name);
    end

    function set_units(obj, length_unit, angle_unit)
      % set_units('mm' | 'm' | 'in' | '', 'rad' | 'deg'), or the codes.
      __kinloop__('model_set_units', obj.id, length_unit, angle_unit);
    end

    function set_sketch_angle(obj, link, angle)
      __kinloop__('model_set_sketch_angle', obj.id, link, angle);
    end

    function set_sketch_slide(obj, joint, slide)
      __kinloop__('model_set_sketch_slide', obj.id, joint, slide);
    end

    function set_sweep(obj, settings)
      % set_sweep(struct('input', i, 'from', a, 'to', b, 'steps', n))
      __kinloop__('model_set_sweep', obj.id, settings);
    end

    % ---- reading back ----

    function tf = is_finalized(obj)
      tf = __kinloop__('model_is_finalized', obj.id);
    end

    function n = dof(obj)
      n = __kinloop__('model_dof', obj.id);
    end

    function n = loop_count(obj)
      n = __kinloop__('model_loop_count', obj.id);
    end

    function joints = loop(obj, index)
      joints = __kinloop__('model_loop', obj.id, index);
    end

    function s = scale(obj)
      s = __kinloop__('model_scale', obj.id);
    end

    function [length_unit, angle_unit] = units(obj)
      % The recorded units as names ('mm', ..., '' when unstated; 'rad' or 'deg').
      [lc, ac] = __kinloop__('model_units', obj.id);
      length_unit = __kinloop__('length_unit_str', lc);
      angle_unit = __kinloop__('angle_unit_str', ac);
    end

    function a = sketch_angle(obj, links)
      a = __kinloop__('model_sketch_angle', obj.id, links);
    end

    function s = sketch_slide(obj, joints)
      s = __kinloop__('model_sketch_slide', obj.id, joints);
    end

    function settings = sweep_settings(obj)
      % The recorded sweep settings as a struct, or [] when there are none.
      settings = __kinloop__('model_sweep', obj.id);
    end

    function n = link_count(obj)
      n = __kinloop__('model_link_count', obj.id);
    end

    function n = joint_count(obj)
      n = __kinloop__('model_joint_count', obj.id);
    end

    function n = point_count(obj)
      n = __kinloop__('model_point_count', obj.id);
    end

    function n = input_count(obj)
      n = __kinloop__('model_input_count', obj.id);
    end

    function name = link_name(obj, link)
      name = __kinloop__('model_link_name', obj.id, link);
    end

    function name = point_name(obj, point)
      name = __kinloop__('model_point_name', obj.id, point);
    end

    function name = joint_name(obj, joint)
      name = __kinloop__('model_joint_name', obj.id, joint);
    end

    function link = link_find(obj, name)
      link = __kinloop__('model_find_link', obj.id, name);
    end

    function joint = joint_find(obj, name)
      joint = __kinloop__('model_find_joint', obj.id, name);
    end

    function point = point_find(obj, name)
      point = __kinloop__('model_find_point', obj.id, name);
    end

    function [link, xy] = point_link(obj, point)
      [link, xy] = __kinloop__('model_point_link', obj.id, point);
    end

    function [name, code] = joint_kind(obj, joint)
      % 'revolute', 'prismatic' or 'slot', and the library's code.
      [name, code] = __kinloop__('model_joint_kind', obj.id, joint);
    end

    function [links, pa, pb] = joint_links(obj, joint)
      % [a b], and the attachment points on a and on b.
      [links, pa, pb] = __kinloop__('model_joint_links', obj.id, joint);
    end

    function angle = joint_axis(obj, joint)
      angle = __kinloop__('model_joint_axis', obj.id, joint);
    end

    function joint = input_joint(obj, input)
      joint = __kinloop__('model_input_joint', obj.id, input);
    end

    function [class_code, class_name] = grashof(obj)
      % Grashof class of a finalized plain four-bar (see kinloop.grashof).
      [class_code, class_name] = __kinloop__('model_grashof', obj.id);
    end

    function fb = loop_fourbar(obj, loop)
      % Loop `loop` read as a four-bar driven at a ground pivot: its links,
      % joints, four lengths and Grashof class (kinloop:EKIND if it is not).
      fb = __kinloop__('model_loop_fourbar', obj.id, loop);
    end

    function sites = transmissions(obj)
      % The transmission-angle sites, as output structs.
      sites = __kinloop__('model_transmissions', obj.id);
    end

    function skips = transmission_skips(obj)
      % The joints the transmission rule passes over (joint, loop, link, reason).
      skips = __kinloop__('model_transmission_skips', obj.id);
    end

    function u = start_inputs(obj)
      % The model's start position: the sweep's start, 0 for other inputs.
      u = __kinloop__('model_start_inputs', obj.id);
    end

    function n = row_size(obj)
      % Values in a row of every quantity (kinloop.Solver.row).
      n = __kinloop__('model_row_size', obj.id);
    end

    function [offset, count] = row_offset(obj, quantity)
      % Where quantity's block starts in a row (0-based) and its length.
      [offset, count] = __kinloop__('model_row_offset', obj.id, quantity);
    end

    function n = solver_bytes(obj)
      n = __kinloop__('solver_bytes', obj.id);
    end

    % ---- model files ----

    function text = write(obj)
      text = __kinloop__('model_write', obj.id);
    end

    function write_file(obj, path)
      __kinloop__('model_write_file', obj.id, path);
    end

    % ---- allocations (models made with 'count_allocations') ----

    function a = allocations(obj)
      % Struct calls, live, live_bytes, fail_at, failed; valid after delete too.
      a = __kinloop__('allocations', obj.id);
    end

    function set_fail_at(obj, n)
      % Refuse the n-th allocation call (counted from the model's first; 0: never).
      __kinloop__('set_fail_at', obj.id, n);
    end
  end

  methods (Static)
    function [m, err] = read(text, how, fail_at)
      % m = kinloop.Model.read(text): a finalized model from model-file text;
      % raises kinloop:ESYNTAX etc. with 'line L, column C: ...'. With two
      % outputs it does not raise: m is [] and err says why (status,
      % status_name, line, column, message).
      % kinloop.Model.read(text, 'count_allocations' [, fail_at]) counts
      % the new model's allocations.
      if nargin == 1
        [m, err] = kinloop.Readable.read_adopting(nargout, @kinloop.Model, 'model_read', text);
      elseif ischar(how) && strcmp(how, 'count_allocations')
        if nargin < 3
          fail_at = 0;
        end
        [m, err] = kinloop.Readable.read_adopting(nargout, @kinloop.Model, 'model_read_with_alloc', text, fail_at);
      else
        error('kinloop:bad_argument', ...
              'kinloop.Model.read: the second argument may only be ''count_allocations''');
      end
    end

    function [m, err] = read_file(path)
      % As read, from the file at path (kinloop:EIO when it cannot be read).
      [m, err] = kinloop.Readable.read_adopting(nargout, @kinloop.Model, 'model_read_file', path);
    end
  end

  methods (Static, Access = private)
    function [x, y] = xy(p, what)
      if ~isnumeric(p) || ~isreal(p) || numel(p) ~= 2
        error('kinloop:bad_argument', ...
              'kinloop.Model: %s must be a point [x y] of two real numbers', what);
      end
      x = p(1);
      y = p(2);
    end
  end
end
