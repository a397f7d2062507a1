function n = version_number()
  % kinloop.version_number(): MAJOR * 10000 + MINOR * 100 + PATCH of the library.
  n = __kinloop__('version_number');
end
