"""Typed results returned by every search method and every bound.

Every searcher returns a :class:`SearchResult` with the same fields whatever the method;
every bound returns a :class:`BoundResult`. Method-specific parameters go in ``settings``
(a flat mapping recorded for reproducibility), never in extra top-level keys.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Mapping

from codesearch.model import Code, Params

__all__ = ["Status", "SearchResult", "BoundResult"]


class Status(enum.Enum):
    """What a search established about its cell.

    OPTIMAL
        The code returned has the largest possible size (exhaustively proved).
    FEASIBLE
        A code was found; nothing is claimed about larger codes beyond ``upper``.
    INFEASIBLE
        The requested size is impossible (exhaustively proved); ``upper`` says the bound.
    UNKNOWN
        Nothing was established within the limits.

    Only exhaustive methods may return OPTIMAL or INFEASIBLE.
    """

    OPTIMAL = "optimal"
    FEASIBLE = "feasible"
    INFEASIBLE = "infeasible"
    UNKNOWN = "unknown"


def _frozen(mapping: Mapping[str, Any] | None) -> Mapping[str, Any]:
    return MappingProxyType(dict(mapping or {}))


@dataclass(frozen=True)
class SearchResult:
    """Outcome of one search on one cell.

    Attributes
    ----------
    params : Params
        The cell searched.
    status : Status
        See :class:`Status`.
    code : Code or None
        The best code found, already re-checked by :mod:`codesearch.verify`.
    upper : int or None
        The best upper bound on ``A_q(n,d)`` that this search itself proved (for OPTIMAL it
        equals the code size), or None.
    method : str
        Canonical name of the method in the search registry.
    seconds : float
        Wall time spent.
    nodes : int
        Search nodes (branch-and-bound nodes, SAT decisions, heuristic moves), method defined.
    seed : int or None
        Random seed used, when the method is randomised.
    settings : Mapping
        Every parameter that influenced the run (time limit, options, reductions used,
        versions), enough to reproduce it.
    target : int or None
        When the search asked "does a code of size ``target`` exist?": that size.
    """

    params: Params
    status: Status
    code: Code | None
    upper: int | None
    method: str
    seconds: float
    nodes: int = 0
    seed: int | None = None
    settings: Mapping[str, Any] = field(default_factory=dict)
    target: int | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "settings", _frozen(self.settings))

    @property
    def size(self) -> int:
        """Size of the code found (0 when none)."""
        return 0 if self.code is None else self.code.size

    @property
    def optimal(self) -> bool:
        """True only when the code is proved to be of the largest possible size."""
        return self.status is Status.OPTIMAL

    @property
    def exists(self) -> bool | None:
        """For a fixed-size question: True (found), False (proved impossible), None."""
        if self.target is None:
            return None
        if self.code is not None and self.code.size >= self.target:
            return True
        if self.upper is not None and self.upper < self.target:
            return False
        return None

    def to_json(self, file: str | None = None) -> dict[str, Any]:
        """The machine-readable summary printed by ``codesearch find --json``."""
        out: dict[str, Any] = {
            "q": self.params.q,
            "n": self.params.n,
            "d": self.params.d,
            "size": self.size,
            "optimal": self.optimal,
            "upper": self.upper,
            "status": self.status.value,
            "method": self.method,
            "seconds": round(self.seconds, 3),
            "nodes": int(self.nodes),
            "seed": self.seed,
            "file": file,
        }
        if self.target is not None:
            out["exists"] = self.exists
        return out


@dataclass(frozen=True)
class BoundResult:
    """An upper bound on ``A_q(n,d)`` with what backs it.

    Attributes
    ----------
    params : Params
        The cell bounded.
    value : int
        The bound, an exact integer.
    method : str
        Canonical name of the bound (``"singleton"``, ``"delsarte-lp"``, ...).
    certificate : Mapping or None
        For computed bounds (LP, SDP): a JSON-ready certificate that
        :func:`codesearch.verify.check_certificate` re-checks with exact arithmetic.
        None for closed-form theorems, whose name is the justification.
    certified : bool
        False when a solver's answer failed its exact check; such a value must never be
        used as an upper bound.
    scope : str
        ``"all"`` for bounds on every code, ``"linear"`` for bounds valid only for linear
        codes (Griesmer), ``"existential"`` for lower bounds that promise a code exists (GV).
    note : str
        A short human explanation (which form of the theorem applied, mappings used).
    """

    params: Params
    value: int
    method: str
    certificate: Mapping[str, Any] | None = None
    certified: bool = True
    scope: str = "all"
    note: str = ""

    def __post_init__(self) -> None:
        if self.scope not in ("all", "linear", "existential"):
            raise ValueError(f"unknown bound scope {self.scope!r}")
        object.__setattr__(self, "value", int(self.value))

    @property
    def usable(self) -> bool:
        """True when the value may enter a table as an upper bound for all codes."""
        return self.certified and self.scope == "all"
