"""One front end for every code search: :func:`search`.

Methods live behind a registry (:data:`METHODS`), one module each, loaded lazily so that
importing :mod:`codesearch` never compiles numba kernels or loads SAT solvers. Each method
module defines

``OPTIONS``
    a frozenset of the keyword options it accepts (unknown options raise), and
``run(params, *, time_limit, seed, progress, **options) -> SearchResult``
    which returns its best code (unverified is fine: the front end verifies).

The front end validates, dispatches, re-checks the witness with :mod:`codesearch.verify`
and enforces the status rules (only exhaustive methods may claim OPTIMAL or INFEASIBLE).
"""

from __future__ import annotations

import dataclasses
import importlib
import time
from dataclasses import dataclass
from typing import Any, Callable

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Params
from codesearch.results import SearchResult, Status

__all__ = ["MethodSpec", "METHODS", "search", "method_names"]


@dataclass(frozen=True)
class MethodSpec:
    """Registry entry for one search method."""

    name: str
    module: str
    exhaustive: bool
    summary: str


def _spec(name: str, module: str, exhaustive: bool, summary: str) -> tuple[str, MethodSpec]:
    return name, MethodSpec(name, module, exhaustive, summary)


#: Canonical method name -> spec. Add a method by adding one line here and one module.
METHODS: dict[str, MethodSpec] = dict(
    [
        _spec("exact", "codesearch.search.exact", True,
              "branch-and-bound maximum clique with symmetry reduction; proves optimality"),
        _spec("sat", "codesearch.search.sat", True,
              "SAT encoding with symmetry breaking (CaDiCaL); proves sizes impossible"),
        _spec("lexicode", "codesearch.search.lexicode", False,
              "greedy code in lexicographic order (lexicode), by ball marking"),
        _spec("greedy", "codesearch.search.greedy", False,
              "greedy packing in random / Gray / lexicographic order, restarted"),
        _spec("local", "codesearch.search.local", False,
              "min-conflicts tabu search at a fixed size, raising the size on success"),
        _spec("orbit", "codesearch.search.orbit", False,
              "largest union of orbits of a prescribed group (--group SPEC); codes are FEASIBLE"),
        _spec("auto", "codesearch.search.auto", True,
              "portfolio under one budget: bounds, heuristics, orbit, exact and SAT searches"),
    ]
)


def method_names() -> list[str]:
    """Canonical names of the registered methods, in registry order."""
    return list(METHODS)


def _load(spec: MethodSpec) -> Any:
    return importlib.import_module(spec.module)


def search(
    params: Params,
    method: str = "exact",
    *,
    time_limit: float | None = None,
    seed: int | None = None,
    progress: Callable[[dict[str, Any]], None] | None = None,
    **options: Any,
) -> SearchResult:
    """Search for a large code in one cell.

    Parameters
    ----------
    params : Params
        The cell ``(q, n, d)``.
    method : str
        A key of :data:`METHODS`.
    time_limit : float, optional
        Wall-clock budget in seconds; None means no limit.
    seed : int, optional
        Seed for randomised methods; recorded in the result.
    progress : callable, optional
        Called now and then with a dict of live figures (nodes, incumbent, elapsed).
    **options
        Method-specific options; unknown names raise :class:`ParameterError`.

    Returns
    -------
    SearchResult
        With its code re-verified to have minimum distance at least ``params.d``.
    """
    from codesearch import verify

    if not isinstance(params, Params):
        raise ParameterError(f"params must be a Params, got {type(params).__name__}")
    spec = METHODS.get(method)
    if spec is None:
        raise ParameterError(f"unknown search method {method!r}; choose from {', '.join(METHODS)}")
    if time_limit is not None and not time_limit > 0:
        raise ParameterError(f"time limit must be positive, got {time_limit}")
    module = _load(spec)
    unknown = set(options) - set(module.OPTIONS)
    if unknown:
        raise ParameterError(
            f"method {method!r} does not take option(s) {', '.join(sorted(unknown))}"
        )
    start = time.perf_counter()
    result: SearchResult = module.run(
        params, time_limit=time_limit, seed=seed, progress=progress, **options
    )
    if result.code is not None:
        verify.assert_code(result.code, params)
    if not spec.exhaustive and result.status in (Status.OPTIMAL, Status.INFEASIBLE):
        raise VerificationError(f"heuristic method {method!r} claimed {result.status.value}")
    if result.status is Status.OPTIMAL and (result.code is None or result.upper != result.size):
        raise VerificationError(f"method {method!r} claimed optimality without a matching code")
    if result.method != method:
        result = dataclasses.replace(result, method=method)
    if result.seconds <= 0:
        result = dataclasses.replace(result, seconds=time.perf_counter() - start)
    return result
