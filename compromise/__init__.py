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
    "load_case": "compromise.casefile.load",
    "case_from_dict": "compromise.casefile.load",
    "get_fluid": "compromise.physics.fluids",
    "derive_groups": "compromise.physics.groups",
    "scale_table": "compromise.solving.scales",
    "evaluate_design": "compromise.solving.design",
    "solve": "compromise.review.answer",
    "trace_front": "compromise.explore.tradeoffs",
    "assess": "compromise.review.effects",
    "design_map": "compromise.explore.designmap",
    "weight_sensitivity": "compromise.explore.sensitivity",
}

if TYPE_CHECKING:  # pragma: no cover
    from compromise.casefile.load import case_from_dict, load_case
    from compromise.explore.designmap import design_map
    from compromise.explore.sensitivity import weight_sensitivity
    from compromise.explore.tradeoffs import trace_front
    from compromise.physics.fluids import get_fluid
    from compromise.physics.groups import derive_groups
    from compromise.review.answer import solve
    from compromise.review.effects import assess
    from compromise.solving.design import evaluate_design
    from compromise.solving.scales import scale_table


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        return getattr(importlib.import_module(_LAZY[name]), name)
    raise AttributeError(f"module 'compromise' has no attribute {name!r}")
