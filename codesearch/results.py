"""Typed results returned by every search method and every bound.

Every searcher returns a :class:`SearchResult` with the same fields whatever the method;
every bound returns a :class:`BoundResult`. Method-specific parameters go in ``settings``
(a JSON-ready mapping recorded for reproducibility), never in extra top-level keys.

Both serialise themselves: ``to_dict()`` gives a JSON-ready dict holding everything (the code
as one string of symbols per word, rationals as ``"p/q"``) and ``from_dict()`` rebuilds an
equal object, so results travel whole between processes (pickling goes through the same
fields) and can be written as JSON.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, field
from fractions import Fraction
from types import MappingProxyType
from typing import Any, Mapping

import numpy as np

from codesearch.model import Code, Params

__all__ = ["Status", "SearchResult", "BoundResult", "plain"]


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


def plain(obj: Any) -> Any:
    """A JSON-ready deep copy: mappings become dicts with string keys, tuples and arrays
    lists, numpy scalars Python numbers, Fractions ``"p/q"`` strings."""
    if isinstance(obj, Mapping):
        return {str(k): plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [plain(v) for v in obj]
    if isinstance(obj, np.ndarray):
        return plain(obj.tolist())
    if isinstance(obj, np.integer):
        return int(obj)
    if isinstance(obj, np.floating):
        return float(obj)
    if isinstance(obj, np.bool_):
        return bool(obj)
    if isinstance(obj, Fraction):
        return f"{obj.numerator}/{obj.denominator}"
    return obj


def _frozen(mapping: Mapping[str, Any] | None) -> Mapping[str, Any]:
    return MappingProxyType(plain(mapping or {}))


def _code_to_dict(code: Code | None) -> dict[str, Any] | None:
    return None if code is None else {"q": code.q, "words": code.to_strings()}


def _code_from_dict(obj: Mapping[str, Any] | None, n: int) -> Code | None:
    if obj is None:
        return None
    words = list(obj["words"])
    if not words:
        return Code(np.zeros((0, n), dtype=np.uint8), int(obj["q"]))
    return Code.from_strings(words, int(obj["q"]))


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
        versions), enough to reproduce it; held read-only in JSON-ready form.
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

    def to_dict(self) -> dict[str, Any]:
        """Everything, JSON-ready; :meth:`from_dict` rebuilds an equal result."""
        return {
            "q": self.params.q, "n": self.params.n, "d": self.params.d,
            "status": self.status.value, "code": _code_to_dict(self.code),
            "upper": self.upper, "method": self.method, "seconds": self.seconds,
            "nodes": int(self.nodes), "seed": self.seed, "settings": plain(self.settings),
            "target": self.target,
        }

    @classmethod
    def from_dict(cls, obj: Mapping[str, Any]) -> "SearchResult":
        """The result written by :meth:`to_dict`."""
        params = Params(obj["q"], obj["n"], obj["d"])
        return cls(params, Status(obj["status"]), _code_from_dict(obj["code"], params.n),
                   obj["upper"], obj["method"], obj["seconds"], obj["nodes"], obj["seed"],
                   obj["settings"], obj["target"])

    def __reduce__(self) -> tuple:
        # the settings proxy cannot be pickled: rebuild from the fields
        return (SearchResult, (self.params, self.status, self.code, self.upper, self.method,
                               self.seconds, self.nodes, self.seed, dict(self.settings),
                               self.target))


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

    def to_dict(self) -> dict[str, Any]:
        """Everything, JSON-ready; :meth:`from_dict` rebuilds an equal bound."""
        return {
            "q": self.params.q, "n": self.params.n, "d": self.params.d,
            "value": self.value, "method": self.method,
            "certificate": None if self.certificate is None else plain(self.certificate),
            "certified": self.certified, "scope": self.scope, "note": self.note,
        }

    @classmethod
    def from_dict(cls, obj: Mapping[str, Any]) -> "BoundResult":
        """The bound written by :meth:`to_dict`."""
        return cls(Params(obj["q"], obj["n"], obj["d"]), obj["value"], obj["method"],
                   obj["certificate"], obj["certified"], obj["scope"], obj["note"])
