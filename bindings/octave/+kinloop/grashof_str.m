function name = grashof_str(class_code)
  % kinloop.grashof_str(code): the name of a Grashof class code.
  name = __kinloop__('grashof_str', class_code);
end
