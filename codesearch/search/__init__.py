"""One front end for every code search: :func:`search`.

Methods live behind a registry (:data:`METHODS`), one module each, loaded lazily so that
importing :mod:`codesearch` never compiles numba kernels or loads SAT solvers. A method module
declares ``OPTIONS`` and ``SEEDING`` and defines ``run(ctx, **options) -> Outcome``
(:mod:`codesearch.search.base` describes the contract).

The front end validates the cell, the time limit, the options (unknown ones raise) and the
target size; loads the method's kernels before its clock starts (:func:`prepare_method`, once
per process); resolves the seed; hands the method a :class:`~codesearch.search.base.Context`
with the clock and the cell's known upper bound (computed at most once, on demand); re-checks
the returned code with :mod:`codesearch.verify`; applies the status rule (only exhaustive
methods may prove bounds, so only they may claim OPTIMAL or INFEASIBLE); and stamps time,
version and settings on the :class:`~codesearch.results.SearchResult`.
"""

from __future__ import annotations

import importlib
import time
from dataclasses import dataclass
from typing import Any, Callable, Mapping

from codesearch._version import __version__
from codesearch.errors import ParameterError
from codesearch.model import Code, Params
from codesearch.results import BoundResult, SearchResult
from codesearch.search.base import (
    SEEDINGS,
    Context,
    Outcome,
    positive_int,
    resolve_seed,
    status_of,
)

__all__ = ["MethodSpec", "METHODS", "search", "run_method", "prepare_method", "Context",
           "Outcome"]


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


def _load(spec: MethodSpec) -> Any:
    module = importlib.import_module(spec.module)
    if getattr(module, "SEEDING", "none") not in SEEDINGS:
        raise ParameterError(f"method {spec.name!r} declares an unknown SEEDING")
    return module


#: Method modules whose kernels this process has loaded (see :func:`prepare_method`).
_PREPARED: set[str] = set()


def prepare_method(spec: MethodSpec | str) -> float:
    """Load (or, on a cold numba cache, compile) the kernels a method uses; once per process.

    The front end calls this before it starts a method's clock, so that no search budget is
    spent loading machine code. A method module may declare ``WARM_UP``, a tuple of
    ``((q, n, d), options)`` tiny runs that go through its kernels' paths (run here without a
    time limit), and ``prepare()``, called after them (the portfolio prepares its steps).
    Returns the seconds spent (0 when already prepared).
    """
    if isinstance(spec, str):
        if spec not in METHODS:
            raise ParameterError(f"unknown search method {spec!r}")
        spec = METHODS[spec]
    if spec.module in _PREPARED:
        return 0.0
    start = time.perf_counter()
    module = _load(spec)
    _PREPARED.add(spec.module)  # before the runs: they call run_method themselves
    try:
        for (q, n, d), options in getattr(module, "WARM_UP", ()):
            run_method(spec, Params(q, n, d), seed=0, options=options, bound=None)
        hook = getattr(module, "prepare", None)
        if hook is not None:
            hook()
    except BaseException:
        _PREPARED.discard(spec.module)
        raise
    return time.perf_counter() - start


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
    spec = METHODS.get(method)
    if spec is None:
        raise ParameterError(f"unknown search method {method!r}; choose from {', '.join(METHODS)}")
    return run_method(spec, params, time_limit=time_limit, seed=seed, progress=progress,
                      options=options)


_UNSET: Any = object()


def _recheck(code: Any, params: Params) -> None:
    """Re-verify a returned code by the checker's cheaper route: :func:`verify.assert_code`
    (pair distances up to 4096 words, then a span check or a ball bitmap, linear in M), or,
    where that would be all pairs of a large binary code (n > 32), the disjoint-balls check
    (M V(n, r) ball words, sorted)."""
    from codesearch import verify

    ok = isinstance(code, Code) and code.q == 2 and (code.q, code.n) == (params.q, params.n)
    if ok and verify.check_cost(code, params.d)[0] == "pairs":
        balls = verify.ball_check_cost(code, params.d)
        if balls is not None and balls < code.size * (code.size - 1) // 2:
            verify.assert_code_by_balls(code, params)
            return
    verify.assert_code(code, params)


def run_method(spec: MethodSpec, params: Params, *, time_limit: float | None = None,
               seed: int | None = None, progress: Callable[[dict[str, Any]], None] | None = None,
               options: Mapping[str, Any] | None = None,
               bound: BoundResult | None = _UNSET, incumbent: Any = None) -> SearchResult:
    """:func:`search` for a registry entry given whole (a table run ships the entries it
    resolved to its workers; the portfolio shares its known bound with its steps).

    ``bound`` is the cell's least usable upper bound when the caller has it already (None:
    no usable bound is known); left out, it is computed when the method first asks.
    ``incumbent`` is a code of the cell to start from; it is checked here and handed only to
    methods that declare ``INCUMBENT = True`` (its size is recorded in the settings).
    """
    from codesearch import verify

    if not isinstance(params, Params):
        raise ParameterError(f"params must be a Params, got {type(params).__name__}")
    if time_limit is not None and not time_limit > 0:
        raise ParameterError(f"time limit must be positive, got {time_limit}")
    module = _load(spec)
    prepare_method(spec)  # kernels loaded before the clock starts
    options = dict(options or {})
    unknown = set(options) - set(module.OPTIONS)
    if unknown:
        raise ParameterError(
            f"method {spec.name!r} does not take option(s) {', '.join(sorted(unknown))}"
        )
    size = options.pop("size", None)
    target = None if size is None else positive_int(size, "size")
    seeding = getattr(module, "SEEDING", "none")
    if incumbent is not None and getattr(module, "INCUMBENT", False):
        verify.assert_code(incumbent, params)
    else:
        incumbent = None
    ctx = Context(params, time_limit=time_limit, seed=resolve_seed(seed, seeding),
                  target=target, progress=progress, incumbent=incumbent,
                  **({} if bound is _UNSET else {"bound": bound}))
    out: Outcome = module.run(ctx, **options)
    seconds = time.perf_counter() - ctx.start  # the search's own time, before the re-check
    if not isinstance(out, Outcome):
        raise TypeError(f"method {spec.name!r} returned {type(out).__name__}, not an Outcome")
    if out.code is not None:
        _recheck(out.code, params)
    upper = None if out.upper is None or not spec.exhaustive else int(out.upper)
    settings = dict(out.settings)
    settings.setdefault("time_limit", time_limit)
    if "size" in module.OPTIONS:
        settings.setdefault("size", target)
    if incumbent is not None:
        settings["incumbent_size"] = incumbent.size
    settings["version"] = __version__
    return SearchResult(params, status_of(out.code, upper, target), out.code, upper, spec.name,
                        seconds, int(out.nodes), ctx.seed, settings, target)
