"""Exceptions that carry a message meant for the observer.

Every error the command line shows as one line derives from
:class:`PlannerError`.  The message must name the bad value and say what is
allowed (or what to do next); the CLI prints it without a traceback.

Exit codes follow the usual command-line convention: 1 for a failure while
doing the job (missing file, network down, corrupt cache), 2 for a usage or
configuration error (a value out of range, an unknown name).
"""

from __future__ import annotations


class PlannerError(Exception):
    """A problem the user can act on.  ``exit_code`` is 1 unless stated."""

    exit_code = 1


class InputError(PlannerError, ValueError):
    """A value given by the user is outside what is allowed (exit code 2)."""

    exit_code = 2


class CatalogError(PlannerError):
    """A catalogue file or service could not be read as expected."""


class UnknownPairError(InputError):
    """A pair designation matched nothing; ``suggestions`` lists close names."""

    def __init__(self, query: str, suggestions: list[str] | None = None, message: str | None = None):
        self.query = query
        self.suggestions = list(suggestions or [])
        #: set when the name is a known star that has no pair in the loaded catalogue
        self.known = message
        msg = f"no pair matches {query!r}"
        if message:
            msg = message
        elif self.suggestions:
            msg += "; closest: " + ", ".join(self.suggestions[:5])
        else:
            msg += ("; give a star name such as Albireo or 'eps Lyr', a WDS id such as 18055+0230 "
                    "or a designation such as STF2272AB")
        super().__init__(msg)


class NetworkError(PlannerError):
    """The network or a remote service was not reachable."""


class CorruptFileError(PlannerError):
    """A saved file (cache, profile, plan) failed its integrity check."""
