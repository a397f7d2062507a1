function m = counted_model(text, fail_at)
  % A kinloop.Model whose every allocation goes through the counting
  % allocator of tests/support.c (the test gateway's model_new_with_alloc,
  % or model_read_with_alloc when model-file text is given), refusing the
  % fail_at-th one (0: none). allocations(m) reports the counts.
  if nargin < 2
    fail_at = 0;
  end
  if nargin < 1 || isempty(text)
    m = kinloop.Model('adopt', __kinloop__('model_new_with_alloc', fail_at));
  else
    m = kinloop.Model('adopt', __kinloop__('model_read_with_alloc', text, fail_at));
  end
end
