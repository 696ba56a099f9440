"""compromise: choose the scales, fluid and temperature of a physical flow model.

The public surface is small; the modules behind it each hold one idea (see DEVELOPERS.md).
Heavy libraries are imported lazily, so importing the package is cheap.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

__version__ = "0.1.0"

__all__ = [
    "__version__",
    "assess",
    "case_from_dict",
    "derive_groups",
    "design_map",
    "evaluate_design",
    "get_fluid",
    "load_case",
    "scale_table",
    "solve",
    "trace_front",
    "weight_sensitivity",
]

_LAZY = {
    "load_case": "compromise.case",
    "case_from_dict": "compromise.case",
    "get_fluid": "compromise.fluids",
    "derive_groups": "compromise.groups",
    "scale_table": "compromise.design",
    "evaluate_design": "compromise.design",
    "solve": "compromise.solver",
    "trace_front": "compromise.tradeoffs",
    "assess": "compromise.effects",
    "design_map": "compromise.designmap",
    "weight_sensitivity": "compromise.sensitivity",
}

if TYPE_CHECKING:  # pragma: no cover
    from compromise.case import case_from_dict, load_case
    from compromise.design import evaluate_design, scale_table
    from compromise.designmap import design_map
    from compromise.effects import assess
    from compromise.fluids import get_fluid
    from compromise.groups import derive_groups
    from compromise.sensitivity import weight_sensitivity
    from compromise.solver import solve
    from compromise.tradeoffs import trace_front


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(_LAZY[name]), name)
    raise AttributeError(f"module 'compromise' has no attribute {name!r}")
