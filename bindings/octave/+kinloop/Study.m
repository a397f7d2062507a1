classdef Study < kinloop.StudyMethods
  % kinloop.Study - a design study: a nominal model, the dimensions that
  % vary (tolerances drawn at random, or a grid), the outputs judged and
  % their limits; read from a study file, immutable once read.
  %
  %   st = kinloop.Study.read(text, model)   against a finalized kinloop.Model
  %   st = kinloop.Study.read_file(path)     its 'model' file read relative to
  %                                          the study file
  % (read and read_file come from kinloop.StudyMethods, generated.)
  %
  % Samples are numbered from 0, as in C. [values, status, dims] = st.run()
  % gives one row per sample: values(i, k + 1) is output k (NaN where the
  % sample has none), status(i) its outcome (0 every output computed,
  % 1 no assembly, 2 its motion stopped at a limit inside the sweep), and
  % dims(i, d + 1) the value dimension d took. A sample's numbers depend on
  % the study's seed and its index alone, whatever the threads or the split.
  % st.model() is the nominal model, borrowed: it keeps the study alive and
  % cannot be changed or freed. The study is freed when the last reference
  % goes, or by delete(st); that ends its model's handle too, while solvers
  % made from it keep working (the library keeps the model for them).

  methods
    function obj = Study(how, id)
      if nargin == 2 && ischar(how) && strcmp(how, 'adopt')
        obj.id = id;   % a study the gateway already holds
      else
        error('kinloop:EINVAL', ...
              'kinloop.Study: use kinloop.Study.read(text [, base_dir]) or read_file(path)');
      end
    end

    function names = outputs(obj)
      % The outputs' names, a cell row in column order.
      names = arrayfun(@(k) obj.output_name(k), 0:obj.output_count() - 1, 'UniformOutput', false);
    end

    function names = dimensions(obj)
      % Short texts naming the dimensions that vary ('rocker_pin b x'), a
      % cell row in column order.
      names = arrayfun(@(k) obj.dimension_name(k), 0:obj.dimension_count() - 1, ...
                       'UniformOutput', false);
    end

    function m = model(obj)
      % The nominal model as a borrowed kinloop.Model: solvers can be made
      % from it; it keeps the study alive and cannot change or be freed.
      m = kinloop.Model('adopt', __kinloop__('study_model', obj.id), obj);
    end

    function [values, status, dims] = run(obj, first, count, threads)
      % [values, status, dims] = run([first [, count [, threads]]]): samples
      % first .. first + count - 1 (default: all of them from first, at most
      % KL_MAX_STEPS a call) on threads threads (0, the default: all the
      % cores); status a column, as values and dims have a row per sample.
      if nargin < 2
        first = 0;
      end
      if nargin < 3 || isempty(count)
        count = obj.sample_count() - first;
      end
      if nargin < 4
        threads = 0;
      end
      [values, status, dims] = run@kinloop.StudyMethods(obj, first, count, threads);
      status = status(:);
    end

    function s = summarize(obj, output, values, status)
      % summarize(output, values, status): output by name or by index (from
      % 0) over the rows of values and status as run gives them, read as
      % samples 0 .. n - 1: a struct of the fields of kl_study_summary.
      if ischar(output)
        k = find(strcmp(obj.outputs(), output)) - 1;
        if isempty(k)
          error('kinloop:EID', 'kinloop.Study: no output is named ''%s'' (outputs: %s)', ...
                output, strjoin(obj.outputs(), ', '));
        end
      else
        k = output;
      end
      s = summarize@kinloop.StudyMethods(obj, k, values, status);
    end
  end
end
