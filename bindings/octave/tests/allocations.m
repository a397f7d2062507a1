function a = allocations(m)
  % The counts of a counted model (counted_model.m): calls, live,
  % live_bytes, fail_at, failed; m may be the model or its id, also after
  % the model is freed.
  if isobject(m)
    m = m.id;
  end
  a = __kinloop__('allocations', m);
end
