"""Clock wrappers (PLL primitive or clock enable) and their SDC/XDC constraints, from a clock plan."""
