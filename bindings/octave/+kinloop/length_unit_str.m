function name = length_unit_str(code)
  % kinloop.length_unit_str(code): 'mm', 'm', 'in', or '' for unstated.
  name = __kinloop__('length_unit_str', code);
end
