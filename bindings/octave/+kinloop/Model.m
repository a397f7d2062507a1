classdef Model < kinloop.ModelMethods
  % kinloop.Model - a planar linkage described as links, joints, points,
  % inputs and loops, then finalized; a thin layer over the kinloop C library.
  %
  %   m = kinloop.Model()                  a new model holding ground (link 0)
  %   m = kinloop.Model.read(text)         a model from model-file text
  %   m = kinloop.Model.read_file(path)
  %
  % Ids are the library's: link 0 is ground, every kind counts from 0 in
  % order of creation. Points are 1x2 vectors [x y] in a link's frame; angles
  % are in radians. A failed call raises 'kinloop:<status>' (e.g.
  % kinloop:ESELFJOINT) with the library's message and changes nothing.
  % The methods of the plain library functions come from kinloop.ModelMethods
  % (generated from kinloop.h); methods(m) lists them all. The model is
  % let go of when the last reference to it goes, or by delete(m); its
  % solvers and studies keep working after delete(m) (the library keeps
  % the model for them), while m's own methods raise kinloop:bad_handle.
  %
  % A study's model (kinloop.Study's model()) is borrowed: the object keeps
  % its study alive, refuses every change (kinloop:ESTATE: it is finalized),
  % and delete of it frees nothing; the handle ends with the study, its
  % solvers keep working.

  methods
    function obj = Model(how, id, owner)
      % Model(), or Model('adopt', id [, study]) for a handle the gateway
      % already holds (what read, read_file and Study.model use; read and
      % read_file come from kinloop.ModelMethods, generated).
      if nargin == 0
        obj.id = __kinloop__('model_new');
      elseif nargin >= 2 && ischar(how) && strcmp(how, 'adopt')
        obj.id = id;
        if nargin == 3
          obj.owner = owner;
        end
      else
        error('kinloop:EINVAL', 'kinloop.Model: use Model(), Model.read or Model.read_file');
      end
    end

    function finalize(obj)
      % Checks the topology and prepares the equations (kl_model_finalize).
      % A study's model is finalized already: for it, as for any finalized
      % model, this does nothing.
      if isempty(obj.owner)
        finalize@kinloop.ModelMethods(obj);
      end
    end

    function tf = is_borrowed(obj)
      % Whether the model belongs to a study (kinloop.Study's model()).
      tf = ~isempty(obj.owner);
    end

    function loads = loads(obj)
      % The loads the model records (kl_model_load) as a struct array, in
      % order: what Solver.cycle_summarize(m.loads(), m.cycle()) takes.
      each = arrayfun(@(k) obj.load(k), 0:obj.load_count() - 1, 'UniformOutput', false);
      loads = [each{:}];
    end
  end
end
