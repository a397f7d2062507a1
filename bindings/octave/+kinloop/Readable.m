% kinloop.Readable: what the classes read from text share (Model, Study).
classdef Readable < handle
  methods (Static, Access = protected)
    % [obj, err] = read_adopting(nout, class_ctor, command, ...): runs a
    % reading command of the gateway and wraps the handle it returns with
    % class_ctor('adopt', id). The gateway raises a reading error unless the
    % caller asked for it as a second output (nout >= 2); then a failed read
    % gives obj = [] and the error structure in err.
    function [obj, err] = read_adopting(nout, class_ctor, command, varargin)
      err = [];
      if nout < 2
        id = __kinloop__(command, varargin{:});
      else
        [id, err] = __kinloop__(command, varargin{:});
      end
      if isempty(id)
        obj = [];
      else
        obj = class_ctor('adopt', id);
      end
    end
  end
end
