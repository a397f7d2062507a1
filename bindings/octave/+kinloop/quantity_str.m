function name = quantity_str(quantity)
  % The name of a quantity of a row ('link_angle', ...), or [] for none.
  name = __kinloop__('quantity_str', quantity);
end
