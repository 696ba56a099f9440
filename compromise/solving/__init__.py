"""Solving: problem rows, the exact batched QP, the fluid x temperature grid, the optimum,
the nonlinear fallback, infeasibility diagnosis and the evaluation of any design.

Layer 3. (Named ``solving`` rather than ``solve`` so that the public function
``compromise.solve`` is never shadowed by a sub-package.) May import the case-file layer and
below; knows no scale effect, no trade-off and no presentation.
"""
