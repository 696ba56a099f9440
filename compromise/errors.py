"""Exceptions and warnings shared by every layer of compromise."""

from __future__ import annotations


class CompromiseError(Exception):
    """Base class of every error compromise raises on purpose."""


class CaseError(CompromiseError, ValueError):
    """Bad input: names the file, the key and what was expected.

    Parameters
    ----------
    message : str
        What was expected and what was found.
    file : str, optional
        Name of the case file (or the command-line option) the value came from.
    key : str, optional
        Dotted key inside the file, e.g. ``prototype.quantities.depth``.
    """

    def __init__(self, message: str, *, file: str | None = None, key: str | None = None) -> None:
        self.message = message
        self.file = file
        self.key = key
        super().__init__(self.line())

    def line(self) -> str:
        """The one-line form shown to the user: ``file: key: message``."""
        parts = [p for p in (self.file, self.key) if p]
        return ": ".join([*parts, self.message])


class CaseErrors(CompromiseError, ValueError):
    """Several :class:`CaseError` found in one pass over a case file."""

    def __init__(self, errors: list[CaseError]) -> None:
        self.errors = list(errors)
        super().__init__("\n".join(e.line() for e in self.errors))


class ExpressionError(CompromiseError, ValueError):
    """An expression that does not parse, uses a forbidden construct or an unknown name."""


class UnknownFluidError(CompromiseError, KeyError):
    """A fluid name that is not in the catalogue."""

    def __str__(self) -> str:  # KeyError quotes its argument; keep the plain message
        return str(self.args[0]) if self.args else ""


class FluidRangeError(CompromiseError, ValueError):
    """A temperature or pressure at which a fluid boils, freezes or leaves its model's range."""


class CorrelationRangeWarning(UserWarning):
    """A correlation used outside the range its source validated."""
