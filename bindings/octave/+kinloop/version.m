function [library, header] = version()
  % [library, header] = kinloop.version(): the library's version string, and
  % that of the kinloop.h the binding was built against (they must agree).
  [library, header] = __kinloop__('version');
end
