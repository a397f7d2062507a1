function err = expect_error(fn, identifier)
  % Calls fn(), which must raise an error with this identifier; returns it.
  try
    fn();
  catch err
    assert(strcmp(err.identifier, identifier), ...
           'expected error %s, got %s: %s', identifier, err.identifier, err.message);
    return;
  end
  error('test:no_error', 'expected error %s, but the call succeeded', identifier);
end
