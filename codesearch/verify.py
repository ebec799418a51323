"""Independent checks of codes and bound certificates.

(Foundation work in progress: the fast packed kernel replaces the numpy path below.)
"""

from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from codesearch.errors import VerificationError
from codesearch.model import Code, Params

__all__ = ["assert_code", "min_distance", "check_certificate"]


def min_distance(code: Code) -> int:
    """Minimum Hamming distance over distinct pairs (n + 1 for codes of size < 2)."""
    w = code.words
    best = code.n + 1
    for i in range(code.size - 1):
        dist = (w[i + 1 :] != w[i]).sum(axis=1)
        if dist.size:
            best = min(best, int(dist.min()))
    return best


def assert_code(code: Code, params: Params) -> None:
    """Raise :class:`VerificationError` unless ``code`` is a code of cell ``params``."""
    if code.q != params.q or code.n != params.n:
        raise VerificationError(
            f"code has q={code.q}, n={code.n}; expected q={params.q}, n={params.n}"
        )
    if code.size >= 2 and min_distance(code) < params.d:
        raise VerificationError(f"code has minimum distance below d={params.d}")


def check_certificate(cert: Mapping[str, Any]) -> tuple[bool, int | None, str]:
    """Re-check a bound certificate with exact arithmetic.

    Returns ``(valid, bound, reason)``; dispatches on ``cert["kind"]``.
    """
    raise NotImplementedError
