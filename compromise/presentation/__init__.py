"""Presentation: text tables, CSV files and figures of the results' ``to_dict()``.

Layer 6. Computes nothing new; the only layer that imports matplotlib. May import every layer
below; only ``compromise.cli`` sits above it.
"""
