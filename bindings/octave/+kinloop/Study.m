classdef Study < kinloop.Readable
  % kinloop.Study - a design study: a nominal model, the dimensions that
  % vary (tolerances drawn at random, or a grid), the outputs judged and
  % their limits; read from a study file, then prepared once.
  %
  %   st = kinloop.Study.read(text, model)   read against a kinloop.Model
  %                                          (finalized); its 'model' line,
  %                                          if any, is only recorded
  %   st = kinloop.Study.read_file(path)     the model its 'model' line names,
  %                                          relative to the study file
  %   st.prepare()                           solves the nominal: run and
  %                                          summarize need it
  %
  % Samples are numbered from 0, as in C. [values, status, dims] = st.run()
  % gives one row per sample: values(i, k + 1) is output k (NaN where the
  % sample has none), status(i) its outcome (0 every output computed,
  % 1 no assembly, 2 its motion stopped at a limit inside the sweep), and
  % dims(i, d + 1) the value dimension d took. A sample's numbers depend on
  % the study's seed and its index alone, whatever the threads or the split.
  % st.model() is the nominal model, borrowed: it keeps the study alive and
  % cannot be changed or freed. The study is freed when the last reference
  % goes, or by delete(st); while solvers of its model live, delete raises
  % kinloop:in_use.

  properties (SetAccess = private)
    id = [];      % the gateway's handle for this study
  end

  % Public but hidden: Octave 7 runs a destructor in the context of the
  % object that released it, where private properties cannot be read.
  properties (Hidden)
    freed = false;  % set once the gateway has freed the handle
  end

  methods
    function obj = Study(how, id)
      if nargin == 2 && ischar(how) && strcmp(how, 'adopt')
        obj.id = id;   % a study the gateway already holds
      else
        error('kinloop:bad_argument', ...
              'kinloop.Study: use kinloop.Study.read(text, model) or read_file(path)');
      end
    end

    function delete(obj)
      % Frees the study and its model's handle (once; later calls do nothing).
      if ~obj.freed && ~isempty(obj.id)
        __kinloop__('study_free', obj.id);
        obj.freed = true;
      end
    end

    function prepare(obj)
      % Solves the nominal design at the start of the sweep, its outputs and
      % their first-order estimates (kl_study_prepare); raises kinloop:ENOASSEMBLY
      % and the like, with the reason, when the nominal cannot be judged.
      __kinloop__('study_prepare', obj.id);
    end

    function msg = last_error(obj)
      % The library's message for the study's last failed call.
      msg = __kinloop__('study_error', obj.id);
    end

    function path = model_path(obj)
      % The path the study's 'model' line gives, as written; [] if none.
      path = __kinloop__('study_model_path', obj.id);
    end

    function n = sample_count(obj)
      % The samples of a tolerance study, or every grid point of a grid study.
      n = __kinloop__('study_sample_count', obj.id);
    end

    function names = outputs(obj)
      % The outputs' names, a cell row in column order.
      n = __kinloop__('study_output_count', obj.id);
      names = arrayfun(@(k) __kinloop__('study_output_name', obj.id, k), 0:n - 1, ...
                       'UniformOutput', false);
    end

    function names = dimensions(obj)
      % Short texts naming the dimensions that vary ('rocker_pin b x'), a
      % cell row in column order.
      n = __kinloop__('study_dimension_count', obj.id);
      names = arrayfun(@(k) __kinloop__('study_dimension_name', obj.id, k), 0:n - 1, ...
                       'UniformOutput', false);
    end

    function m = model(obj)
      % The nominal model as a borrowed kinloop.Model: solvers can be made
      % from it; it keeps the study alive and cannot change or be freed.
      m = kinloop.Model('borrow', __kinloop__('study_model', obj.id), obj);
    end

    function [values, status, dims] = run(obj, first, count, threads)
      % run([first [, count [, threads]]]): samples first .. first + count - 1
      % (default: all of them from first) on threads threads (0, the
      % default: all the cores). dims is computed only when asked for.
      if nargin < 2
        first = 0;
      end
      if nargin < 3 || isempty(count)
        count = obj.sample_count() - first;
      end
      if nargin < 4
        threads = 0;
      end
      if nargout < 3
        [values, status] = __kinloop__('study_run', obj.id, first, count, threads);
      else
        [values, status, dims] = __kinloop__('study_run', obj.id, first, count, threads);
      end
    end

    function s = summarize(obj, output, values, status)
      % summarize(output, values, status): output by name or by index (from
      % 0) over the rows of values and status as run gives them, read as
      % samples 0 .. n - 1. A struct: samples, assembled, within_limits,
      % limited, nominal, mean, std (n - 1), p01, p05, p50, p95, p99 (linear
      % interpolation), min, max, worst, worst_sample (from 0; -1 if none),
      % first_order_std, has_limits, lower, upper.
      if ischar(output)
        k = find(strcmp(obj.outputs(), output)) - 1;
        if isempty(k)
          error('kinloop:EID', 'kinloop.Study: no output is named ''%s'' (outputs: %s)', ...
                output, strjoin(obj.outputs(), ', '));
        end
      else
        k = output;
      end
      s = __kinloop__('study_summarize', obj.id, k, values, status);
    end
  end

  methods (Static)
    function [st, err] = read(text, model)
      % st = kinloop.Study.read(text, model): the study holds the model, which
      % may then be freed here. Raises kinloop:ESYNTAX etc. with 'line L,
      % column C: ...'; with two outputs it does not raise: st is [] and err
      % says why (status, status_name, line, column, message).
      [st, err] = kinloop.Readable.read_adopting(nargout, @kinloop.Study, 'study_read', ...
                                                 text, model.id);
    end

    function [st, err] = read_file(path)
      % As read, from the file at path (kinloop:EIO when it cannot be read).
      [st, err] = kinloop.Readable.read_adopting(nargout, @kinloop.Study, 'study_read_file', path);
    end
  end
end
