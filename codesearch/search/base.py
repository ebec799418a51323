"""The skeleton every search method shares: what the front end hands a method, what the method
hands back, and the rule that turns that into a :class:`~codesearch.results.SearchResult`.

The front end (:func:`codesearch.search.search`) owns everything that is the same for every
method: the checks of the cell, the time limit and the target size, the seed, the clock, the
known upper bound of the cell (computed at most once, or passed in by a caller that already
has it), timing, version stamping, the re-check of the code and the status. A method module
only searches:

``OPTIONS``
    frozenset of the keyword options it accepts (``"size"`` among them when it can stop at a
    target size; the front end validates the size and hands it over as ``ctx.target``);
``SEEDING``
    ``"random"`` (no seed given: a fresh one, recorded), ``"fixed"`` (no seed given: 0) or
    ``"none"`` (deterministic: the seed is ignored and recorded as None);
``run(ctx, **options) -> Outcome``
    the search itself, within ``ctx.deadline``.

The status follows from the outcome alone (:func:`status_of`): OPTIMAL when the code meets a
proved upper bound, INFEASIBLE when a proved bound refutes the target size, FEASIBLE with a
code, UNKNOWN without one. Only exhaustive methods (``exhaustive=True`` in the registry) may
prove bounds: the ``upper`` of any other method is not a proof and is dropped.
"""

from __future__ import annotations

import secrets
import time
from dataclasses import dataclass, field
from functools import cached_property
from types import MappingProxyType
from typing import Any, Callable, Mapping

import numpy as np

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Code, Params
from codesearch.results import BoundResult, Status

__all__ = ["Context", "Outcome", "Progress", "SEEDINGS", "status_of", "positive_int",
           "usable_bound"]

#: A progress callback: receives a dict of live figures now and then.
Progress = Callable[[dict[str, Any]], None]

#: The seeding policies a method module may declare.
SEEDINGS = ("random", "fixed", "none")

_UNSET: Any = object()


def positive_int(value: Any, name: str) -> int:
    """``value`` as an int, or a one-line :class:`ParameterError` unless it is a positive
    integer (bool refused)."""
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < 1:
        raise ParameterError(f"{name} must be a positive integer, got {value!r}")
    return int(value)


def usable_bound(params: Params) -> BoundResult | None:
    """The least usable upper bound of the cell from :mod:`codesearch.bounds` (closed forms
    and the Delsarte LP), or None when it is not usable (uncertified, or not for all codes)."""
    from codesearch import bounds

    result = bounds.upper_bound(params)
    return result if result is not None and result.usable else None


def resolve_seed(seed: Any, seeding: str) -> int | None:
    """The seed a method runs with under its ``SEEDING`` policy."""
    if seeding == "none":
        return None
    if seed is None:
        return secrets.randbits(63) if seeding == "random" else 0
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise ParameterError(f"seed must be a non-negative integer, got {seed!r}")
    return int(seed)


class Context:
    """What the front end hands a method: the cell and everything common to all methods.

    Attributes
    ----------
    params : Params
        The cell.
    time_limit : float or None
        The budget in seconds (None: no limit).
    start, deadline : float
        ``time.perf_counter()`` values: when the search started, when it must stop (None).
    seed : int or None
        The seed under the method's seeding policy (recorded in the result).
    target : int or None
        With option ``size``: stop at a code of this size (or prove there is none).
    progress : callable or None
        The caller's progress callback (see :meth:`report`).
    incumbent : Code or None
        A verified code of the cell to start from (a record hunt's best stored code); only
        methods declaring ``INCUMBENT = True`` receive one, others see None.
    """

    def __init__(self, params: Params, *, time_limit: float | None = None,
                 seed: int | None = None, target: int | None = None,
                 progress: Progress | None = None, bound: Any = _UNSET,
                 start: float | None = None, deadline: Any = _UNSET,
                 incumbent: Any = None) -> None:
        self.params = params
        self.incumbent = incumbent
        self.time_limit = time_limit
        self.start = time.perf_counter() if start is None else start
        if deadline is _UNSET:
            deadline = None if time_limit is None else self.start + float(time_limit)
        self.deadline: float | None = deadline
        self.seed = seed
        self.target = target
        self.progress = progress
        if bound is not _UNSET:
            self.__dict__["bound"] = bound

    @cached_property
    def bound(self) -> BoundResult | None:
        """The cell's least usable upper bound, computed on first use only (None if none)."""
        return usable_bound(self.params)

    @property
    def known_upper(self) -> int | None:
        """The value of :attr:`bound`, or None."""
        return None if self.bound is None else int(self.bound.value)

    def elapsed(self) -> float:
        return time.perf_counter() - self.start

    def time_left(self) -> float | None:
        """Seconds to the deadline (negative once past), or None without a limit."""
        return None if self.deadline is None else self.deadline - time.perf_counter()

    def expired(self) -> bool:
        return self.deadline is not None and time.perf_counter() >= self.deadline

    def report(self, **figures: Any) -> None:
        """Pass live figures (``incumbent``, ``nodes``, ...) to the progress callback, with
        ``elapsed`` added."""
        if self.progress is not None:
            self.progress({**figures, "elapsed": self.elapsed()})

    def for_cell(self, params: Params) -> "Context":
        """A context for a sub-search of another cell under the same deadline (no target, no
        progress; its bound computed on demand)."""
        return Context(params, time_limit=self.time_limit, start=self.start,
                       deadline=self.deadline)


@dataclass(frozen=True)
class Outcome:
    """What a method's ``run`` returns.

    Attributes
    ----------
    code : Code or None
        The best code found (the front end re-verifies it).
    upper : int or None
        An upper bound on ``A_q(n,d)`` the method proved (exhaustive methods only).
    nodes : int
        Search nodes (branch-and-bound nodes, SAT decisions, heuristic moves), method defined.
    settings : Mapping
        Everything method-specific that influenced the run or explains it.
    """

    code: Code | None
    upper: int | None = None
    nodes: int = 0
    settings: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        object.__setattr__(self, "settings", MappingProxyType(dict(self.settings)))


def status_of(code: Code | None, upper: int | None, target: int | None) -> Status:
    """The one status rule (see the module docstring).

    Raises
    ------
    VerificationError
        If the proved bound is below the size of the (verified) code: a bug somewhere.
    """
    size = 0 if code is None else code.size
    if upper is not None and upper < size:
        raise VerificationError(f"proved upper bound {upper} is below a verified code of "
                                f"size {size}")
    if code is not None and upper == size:
        return Status.OPTIMAL
    if target is not None and upper is not None and upper < target:
        return Status.INFEASIBLE
    return Status.FEASIBLE if code is not None else Status.UNKNOWN
