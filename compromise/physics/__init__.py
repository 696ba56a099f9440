"""Physics: fluid properties, friction laws, dimensionless groups, scale laws, thresholds.

Layer 1 (above the expression language). Pure functions and data, each correlation with its
published source; no case, no optimizer. May import ``compromise.expressions``,
``compromise.units`` and ``compromise.errors`` only.
"""
