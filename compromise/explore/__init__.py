"""Exploring: exact Pareto fronts, their axes and envelopes, Pareto measures, the
design-space map and weight sensitivity.

Layer 4. May import the solving layer and below.
"""
