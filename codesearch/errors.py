"""Exception types shared by the whole package.

The command line maps :class:`InputError` (and its subclasses) to exit status 2 with a
one-line message; :class:`VerificationError` signals a bug (a searcher produced a code or a
bound that the independent checker rejects) and is never caught silently.
"""

from __future__ import annotations

__all__ = ["CodesearchError", "InputError", "ParameterError", "MissingDependency",
           "VerificationError"]


class CodesearchError(Exception):
    """Base class of every error raised on purpose by codesearch."""


class InputError(CodesearchError):
    """Bad user input: a malformed file, impossible parameters, a size that will not fit.

    The message is one line and names the problem; for files it starts with ``FILE:LINE:``.
    """


class ParameterError(InputError, ValueError):
    """Parameters (q, n, d, sizes, options) outside what the tool can handle."""


class MissingDependency(InputError, ImportError):
    """An optional package a command needs is not installed (the message names the extra
    that installs it)."""


class VerificationError(CodesearchError, AssertionError):
    """A code or certificate failed its independent re-check (a bug in the producer)."""
