function o = options_default()
  % kinloop.options_default(): the default solver options as a struct,
  % filled as far as the gateway's options struct reaches (kl_options_init);
  % __kinloop__('options_default') is kl_options_default itself.
  o = __kinloop__('options_init');
end
