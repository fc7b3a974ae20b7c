"""Typed errors of the RF core.

    RFError
     ├── SweepFormatError   a file that cannot be read as a sweep (carries the 1-based line)
     └── AnalysisError      a valid sweep on which a computation cannot say anything
                            (too coarse for distance to fault, no phase for impedance, ...)

The API maps SweepFormatError to 422 ``{"detail": message, "line": line}``.
"""

from __future__ import annotations


class RFError(Exception):
    """Base of every error raised by ``mastwatch.rf``."""

    def __init__(self, message: str) -> None:
        super().__init__(message)
        self.message = message


class SweepFormatError(RFError, ValueError):
    """The input is not a readable sweep. ``line`` is 1-based in the file as given, or None."""

    def __init__(self, message: str, line: int | None = None) -> None:
        super().__init__(message)
        self.line = line

    def __str__(self) -> str:
        return f"line {self.line}: {self.message}" if self.line is not None else self.message


class AnalysisError(RFError, ValueError):
    """A computation that cannot give a meaningful answer for this sweep; says why."""
