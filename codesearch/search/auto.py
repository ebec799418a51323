"""Portfolio search under one time budget (method ``"auto"``).

Problem
-------
For one cell ``(q, n, d)``, get the largest code and the smallest proven upper bound on
``A_q(n,d)`` that the tool can reach within a time budget, without the user choosing a method.
The portfolio runs, in order, while time remains and the best code is below the best bound:

1. the upper bound front end :func:`codesearch.bounds.upper_bound` (only a *usable* bound:
   certified and valid for all codes);
2. the fast heuristics (``lexicode``, ``greedy``);
3. orbit searches over a few natural groups for the cell (:func:`natural_groups`), then the
   local search (``local``);
4. the exact search when the space is small enough to finish;
5. SAT for the one step above the best code found (a "no" proves ``A_q(n,d) <= best``).

Every step goes through :func:`codesearch.search.search`, so every code is re-verified, and a
step whose method is not registered, not installed, or rejects the cell is skipped and logged.
The result is OPTIMAL only when the best code's size equals a proven upper bound: a usable
bound from :mod:`codesearch.bounds`, or the ``upper`` of an exhaustive method. The methods that
produced the code and the bound are recorded as ``settings["lower_method"]`` and
``settings["upper_method"]``.

References
----------
.. [1] C. P. Gomes and B. Selman, "Algorithm portfolios", Artificial Intelligence 126 (2001)
   43-62 (running several searches under one budget).
"""

from __future__ import annotations

import time
from typing import Any, Callable, Sequence

from codesearch._version import __version__
from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Code, Params
from codesearch.results import SearchResult, Status

__all__ = ["OPTIONS", "run", "natural_groups", "DEFAULT_BUDGET"]

#: Options accepted by :func:`run`.
OPTIONS = frozenset({"group", "exact_max_words"})

#: Budget in seconds when no time limit is given (the portfolio needs one to share out).
DEFAULT_BUDGET = 60.0
#: Largest q**n for which the exact search is tried.
DEFAULT_EXACT_MAX_WORDS = 1 << 12
#: Largest q**n for which orbit searches are tried (their orbit enumeration is linear in it).
_ORBIT_MAX_WORDS = 1 << 22


def natural_groups(q: int, n: int) -> list[str]:
    """A few groups under which good codes of the cell are often invariant (common practice).

    Reed-Muller cosets for binary lengths ``2^m`` and ``2^m - 1``; the cyclic group on all
    coordinates or on all but one (extended cyclic codes); with complementation (binary) or
    scalar multiples (q prime); two-block quasi-cyclic shifts for even n; the dihedral group.
    """
    out: list[str] = []
    if q == 2 and n >= 7 and ((n & (n - 1)) == 0 or (n & (n + 1)) == 0):
        out.append("rm1")
    out.append("cyclic")
    if n >= 4:
        out.append(f"cyclic:0-{n - 2}")
    if q == 2:
        out.append("cyclic*rep")
        if n >= 4:
            out.append(f"cyclic:0-{n - 2}*rep")
    elif q in (3, 5, 7, 11, 13):
        out.append("cyclic*scale")
    if n >= 6 and n % 2 == 0:
        h = n // 2
        out.append(f"cyclic:0-{h - 1},{h}-{n - 1}")
    out.append("cyclic*rev")
    return out


def _bound(params: Params) -> tuple[int | None, str | None, str]:
    """Best usable upper bound from the bounds front end, if it exists yet."""
    try:
        from codesearch import bounds
        result = bounds.upper_bound(params)
    except (ImportError, AttributeError, NotImplementedError) as exc:
        return None, None, f"bounds: unavailable ({type(exc).__name__})"
    if result is None or not getattr(result, "usable", False):
        return None, None, "bounds: no usable bound"
    return int(result.value), f"bound:{result.method}", f"bounds: {result.value} ({result.method})"


def run(params: Params, *, time_limit: float | None = None, seed: int | None = None,
        progress: Callable[[dict[str, Any]], None] | None = None,
        group: Sequence[str] | str | None = None,
        exact_max_words: int = DEFAULT_EXACT_MAX_WORDS) -> SearchResult:
    """Run the portfolio on one cell.

    Parameters
    ----------
    params : Params
        The cell.
    time_limit : float, optional
        Total budget in seconds (default :data:`DEFAULT_BUDGET`).
    seed : int, optional
        Seed passed to every randomised step (default 0; recorded).
    progress : callable, optional
        Called after every step with ``{"step", "best", "upper", "elapsed"}``.
    group : sequence of str or str, optional
        Group specs for the orbit step (a string is split on ``;``, so the same
        ``--group`` option serves ``orbit`` and ``auto``); default :func:`natural_groups`.
    exact_max_words : int
        Try the exact search only when ``q**n`` is at most this.

    Returns
    -------
    SearchResult
        OPTIMAL when the best code meets a proven upper bound, else FEASIBLE (UNKNOWN when no
        step produced a code). ``upper`` is the best proven bound or None.

    Raises
    ------
    VerificationError
        If a proven upper bound is below the size of a verified code (a bug somewhere).
    """
    from codesearch.search import METHODS, search

    start = time.perf_counter()
    budget = DEFAULT_BUDGET if time_limit is None else float(time_limit)
    deadline = start + budget
    seed = 0 if seed is None else int(seed)
    if group is None:
        group_list = natural_groups(params.q, params.n)
    elif isinstance(group, str):
        group_list = [g.strip() for g in group.split(";") if g.strip()]
    else:
        group_list = [str(g) for g in group]

    log: list[str] = []
    best: Code | None = None
    lower_method: str | None = None
    upper, upper_method, note = _bound(params)
    log.append(note)
    nodes = 0

    def done() -> bool:
        return (best is not None and upper is not None and best.size >= upper) or \
            time.perf_counter() >= deadline

    def step(name: str, method: str, share: float, **options: Any) -> None:
        nonlocal best, lower_method, upper, upper_method, nodes
        if done():
            return
        spec = METHODS.get(method)
        if spec is None:
            log.append(f"{name}: skipped (method not registered)")
            return
        remaining = deadline - time.perf_counter()
        limit = max(0.05, min(remaining, share * budget))
        try:
            module = __import__(spec.module, fromlist=["OPTIONS"])
            accepted = set(getattr(module, "OPTIONS", ()))
            res = search(params, method, time_limit=limit, seed=seed,
                         **{k: v for k, v in options.items() if k in accepted})
        except ImportError as exc:
            log.append(f"{name}: skipped ({type(exc).__name__})")
            return
        except (ParameterError, NotImplementedError) as exc:
            log.append(f"{name}: skipped ({str(exc).splitlines()[0] if str(exc) else exc!r})")
            return
        nodes += int(res.nodes)
        if res.code is not None and (best is None or res.size > best.size):
            best, lower_method = res.code, name
        if spec.exhaustive and res.upper is not None and (upper is None or res.upper < upper):
            upper, upper_method = int(res.upper), name
        log.append(f"{name}: size {res.size}, {res.status.value}, upper {res.upper}, "
                   f"{res.seconds:.2f}s")
        if best is not None and upper is not None and upper < best.size:
            raise VerificationError(
                f"upper bound {upper} ({upper_method}) is below a verified code of size "
                f"{best.size} ({lower_method})")
        if progress is not None:
            progress({"step": name, "best": 0 if best is None else best.size, "upper": upper,
                      "elapsed": time.perf_counter() - start})

    step("lexicode", "lexicode", 0.05)
    step("greedy", "greedy", 0.05)
    # Orbit searches before the local search: on structured cells they are the cheap winners.
    if params.space_size <= _ORBIT_MAX_WORDS:
        share = 0.4 / max(1, len(group_list))
        for spec_text in group_list:
            # An orbit search stops early once it meets the best proven bound.
            step(f"orbit[{spec_text}]", "orbit", share, group=spec_text, size=upper)
    step("local", "local", 0.10)
    if params.space_size <= exact_max_words:
        step("exact", "exact", 0.25)
    if best is not None and not done():
        step("sat", "sat", 1.0, size=best.size + 1)

    optimal = best is not None and upper is not None and best.size == upper
    settings = {
        "lower_method": lower_method,
        "upper_method": upper_method,
        "budget": budget,
        "groups": ";".join(group_list),
        "exact_max_words": exact_max_words,
        "steps": tuple(log),
        "version": __version__,
    }
    return SearchResult(
        params=params,
        status=Status.OPTIMAL if optimal else (Status.FEASIBLE if best is not None
                                               else Status.UNKNOWN),
        code=best,
        upper=upper,
        method="auto",
        seconds=time.perf_counter() - start,
        nodes=nodes,
        seed=seed,
        settings=settings,
    )
