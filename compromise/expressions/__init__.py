"""The safe expression language of case files: parsing, evaluation and analysis.

Layer: the lowest but one. It may import ``compromise.units`` and ``compromise.errors`` only;
the physics layer (the built-in groups are expressions) and everything above build on it.

:mod:`.syntax` turns text into a tree of frozen dataclasses and evaluates it (never with
``eval``); :mod:`.analysis` recognises products of powers and computes dimensions. Both are
re-exported here, so ``from compromise import expressions as ex`` gives the whole language.
"""

from compromise.expressions.analysis import dimension, power_product
from compromise.expressions.syntax import (
    CONSTANTS,
    FUNCTIONS,
    MAX_DEPTH,
    MAX_LENGTH,
    PROPERTY_DIMENSIONS,
    PROPERTY_NAMES,
    Binary,
    Call,
    Expr,
    Name,
    Num,
    Unary,
    evaluate,
    names,
    parse,
    substitute,
    to_text,
)

__all__ = [
    "CONSTANTS",
    "FUNCTIONS",
    "MAX_DEPTH",
    "MAX_LENGTH",
    "PROPERTY_DIMENSIONS",
    "PROPERTY_NAMES",
    "Binary",
    "Call",
    "Expr",
    "Name",
    "Num",
    "Unary",
    "dimension",
    "evaluate",
    "names",
    "parse",
    "power_product",
    "substitute",
    "to_text",
]
