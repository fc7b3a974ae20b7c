"""Errors raised by services; each carries the HTTP status the API answers with.

    ServiceError (400)
     ├── NotFound   (404)  an id that does not exist
     ├── Conflict   (409)  the request clashes with stored records (duplicate name, in use)
     ├── Invalid    (422)  a field that is well-formed but not acceptable here
     └── TooLarge   (413)  an upload over the configured limit

Errors of ``mastwatch.rf`` (SweepFormatError with a line, AnalysisError) are not
wrapped: the API handler maps them to 422 directly.
"""

from __future__ import annotations


class ServiceError(Exception):
    """Base of service errors: ``message`` says what is wrong and, where it helps, how to fix."""

    status_code = 400

    def __init__(self, message: str, *, line: int | None = None) -> None:
        super().__init__(message)
        self.message = message
        self.line = line


class NotFound(ServiceError):
    status_code = 404


class Conflict(ServiceError):
    status_code = 409


class Invalid(ServiceError):
    status_code = 422


class TooLarge(ServiceError):
    status_code = 413


def not_found(kind: str, ident: object) -> NotFound:
    return NotFound(f"{kind} {ident} does not exist")
