function name = status_name(status)
  % kinloop.status_name(status): the status's name as used in error
  % identifiers, e.g. 'ENOASSEMBLY' for kinloop:ENOASSEMBLY.
  name = __kinloop__('status_name', status);
end
