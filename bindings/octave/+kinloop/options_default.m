function o = options_default()
  % kinloop.options_default(): the default solver options as a struct.
  o = __kinloop__('options_default');
end
