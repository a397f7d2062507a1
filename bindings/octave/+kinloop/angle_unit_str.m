function name = angle_unit_str(code)
  % kinloop.angle_unit_str(code): 'rad' or 'deg'.
  name = __kinloop__('angle_unit_str', code);
end
