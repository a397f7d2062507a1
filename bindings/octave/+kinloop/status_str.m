function text = status_str(status)
  % kinloop.status_str(status): the library's short text for a status value.
  text = __kinloop__('status_str', status);
end
