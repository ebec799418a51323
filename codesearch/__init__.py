"""codesearch: find codes, prove upper bounds and fill tables of A_q(n,d).

Importing this package is cheap: numba kernels compile on first use and solvers load lazily.
"""

from __future__ import annotations

from codesearch._version import __version__
from codesearch.errors import (
    CodesearchError,
    InputError,
    MissingDependency,
    ParameterError,
    VerificationError,
)
from codesearch.model import Code, Params
from codesearch.results import BoundResult, SearchResult, Status

__all__ = [
    "__version__",
    "BoundResult",
    "Code",
    "CodesearchError",
    "InputError",
    "MissingDependency",
    "ParameterError",
    "Params",
    "SearchResult",
    "Status",
    "VerificationError",
]
