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

Every step goes through the search front end, so every code is re-verified, and a step whose
method is not registered, not installed, or rejects the cell (or an option) is skipped and
logged. The cell's known bound is computed once and shared with the steps. The result is
OPTIMAL only when the best code's size equals a proven upper bound: a usable bound from
:mod:`codesearch.bounds`, or the ``upper`` of an exhaustive method. The methods that
produced the code and the bound are recorded as ``settings["lower_method"]`` and
``settings["upper_method"]``.

References
----------
.. [1] C. P. Gomes and B. Selman, "Algorithm portfolios", Artificial Intelligence 126 (2001)
   43-62 (running several searches under one budget).
"""

from __future__ import annotations

import time
from typing import Any, Sequence

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Code
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "SEEDING", "run", "natural_groups", "DEFAULT_BUDGET"]

#: Options accepted by :func:`run`.
OPTIONS = frozenset({"group", "exact_max_words"})
SEEDING = "fixed"

#: Budget in seconds when no time limit is given (the portfolio needs one to share out).
DEFAULT_BUDGET = 60.0
#: Largest q**n for which the exact search is tried.
DEFAULT_EXACT_MAX_WORDS = 1 << 12
#: Largest q**n for which orbit searches are tried (their orbit enumeration is linear in it).
_ORBIT_MAX_WORDS = 1 << 22


def natural_groups(q: int, n: int) -> list[str]:
    """A few groups under which good codes of the cell are often invariant (common practice).

    Reed-Muller cosets for binary lengths ``2^m`` and ``2^m - 1``; quadratic-residue
    symmetry (shift and multiplication by squares) for prime n or prime n - 1, with scalar
    multiples for q prime (QR and extended QR codes); the cyclic group on all
    coordinates; quasi-cyclic shifts of two blocks (index 2; for odd n the last coordinate
    fixed) and of blocks of three (the remaining coordinates fixed); the cyclic group on all
    but one coordinate (extended cyclic codes), with complementation (binary) or scalar
    multiples (q prime); the dihedral group.
    """
    out: list[str] = []
    if q == 2 and n >= 7 and ((n & (n - 1)) == 0 or (n & (n + 1)) == 0):
        out.append("rm1")
    scale = "*scale" if q in (3, 5, 7, 11, 13) else ""
    # Quadratic-residue symmetry: i -> i + 1 and i -> s*i with s generating the squares mod a
    # prime p, on all n = p coordinates or on n - 1 = p of them (extended codes).
    for p, blocks in ((n, ""), (n - 1, f":0-{n - 2}")):
        if p >= 5 and all(p % f for f in range(2, int(p**0.5) + 1)):
            k = pow(_primitive_root(p), 2, p)
            out.append(f"cyclic{blocks}*mul:{k}{blocks}{scale}")
    out.append("cyclic")
    if n >= 6:
        h = n // 2
        out.append(f"cyclic:0-{h - 1},{h}-{2 * h - 1}")
    if n >= 9:
        out.append("cyclic:" + ",".join(f"{3 * b}-{3 * b + 2}" for b in range(n // 3)))
    if n >= 4:
        out.append(f"cyclic:0-{n - 2}")
    if q == 2:
        out.append("cyclic*rep")
        if n >= 4:
            out.append(f"cyclic:0-{n - 2}*rep")
    elif scale:
        out.append("cyclic" + scale)
    out.append("cyclic*rev")
    return out


def _primitive_root(p: int) -> int:
    """Least primitive root modulo the prime p."""
    factors = [f for f in range(2, p) if (p - 1) % f == 0 and all(f % e for e in range(2, f))]
    return next(a for a in range(2, p) if all(pow(a, (p - 1) // f, p) != 1 for f in factors))


class _Portfolio:
    """The best code and the best proven bound so far, and the log of the steps."""

    def __init__(self, ctx: Context, budget: float) -> None:
        self.ctx = ctx
        self.budget = budget
        self.deadline = ctx.start + budget
        self.best: Code | None = None
        self.lower_method: str | None = None
        self.upper: int | None = ctx.known_upper
        bound = ctx.bound
        self.upper_method = None if bound is None else f"bound:{bound.method}"
        self.log = [f"bounds: {bound.value} ({bound.method})" if bound is not None
                    else "bounds: no usable bound"]
        self.nodes = 0

    @property
    def size(self) -> int:
        return 0 if self.best is None else self.best.size

    def done(self) -> bool:
        return (self.upper is not None and self.best is not None and self.size >= self.upper) \
            or time.perf_counter() >= self.deadline

    def step(self, name: str, method: str, share: float, **options: Any) -> None:
        """Run one method for at most ``share`` of the budget and keep what it proved."""
        from codesearch.search import METHODS, run_method

        if self.done():
            return
        spec = METHODS.get(method)
        if spec is None:
            self.log.append(f"{name}: skipped (method not registered)")
            return
        limit = max(0.05, min(self.deadline - time.perf_counter(), share * self.budget))
        try:
            res = run_method(spec, self.ctx.params, time_limit=limit, seed=self.ctx.seed,
                             progress=self.ctx.progress, options=options, bound=self.ctx.bound)
        except ImportError as exc:
            self.log.append(f"{name}: skipped ({type(exc).__name__})")
            return
        except (ParameterError, NotImplementedError, MemoryError) as exc:
            self.log.append(f"{name}: skipped ({str(exc).splitlines()[0] if str(exc) else exc!r})")
            return
        self.nodes += int(res.nodes)
        if res.code is not None and res.size > self.size:
            self.best, self.lower_method = res.code, name
        # the front end keeps an upper bound only from exhaustive methods
        if res.upper is not None and (self.upper is None or res.upper < self.upper):
            self.upper, self.upper_method = int(res.upper), name
        self.log.append(f"{name}: size {res.size}, {res.status.value}, upper {res.upper}, "
                        f"{res.seconds:.2f}s")
        if self.upper is not None and self.upper < self.size:
            raise VerificationError(
                f"upper bound {self.upper} ({self.upper_method}) is below a verified code of "
                f"size {self.size} ({self.lower_method})")
        self.ctx.report(step=name, best=self.size, incumbent=self.size, upper=self.upper,
                        nodes=self.nodes)


def run(ctx: Context, *, group: Sequence[str] | str | None = None,
        exact_max_words: int = DEFAULT_EXACT_MAX_WORDS) -> Outcome:
    """Run the portfolio on one cell.

    Parameters
    ----------
    ctx : Context
        The cell; its time limit is the total budget (default :data:`DEFAULT_BUDGET`), its
        seed goes to every randomised step, its progress callback to every step's search and
        after every step ``{"step", "best", "incumbent", "upper", "nodes", "elapsed"}``
        (portfolio totals).
    group : sequence of str or str, optional
        Group specs for the orbit step (a string is split on ``;``, so the same
        ``--group`` option serves ``orbit`` and ``auto``); default :func:`natural_groups`.
    exact_max_words : int
        Try the exact search only when ``q**n`` is at most this.

    Returns
    -------
    Outcome
        The best code and the best proven upper bound (None when none is known).

    Raises
    ------
    VerificationError
        If a proven upper bound is below the size of a verified code (a bug somewhere).
    """
    params = ctx.params
    budget = DEFAULT_BUDGET if ctx.time_limit is None else float(ctx.time_limit)
    if group is None:
        group_list = natural_groups(params.q, params.n)
    elif isinstance(group, str):
        group_list = [g.strip() for g in group.split(";") if g.strip()]
    else:
        group_list = [str(g) for g in group]
    pf = _Portfolio(ctx, budget)
    pf.step("lexicode", "lexicode", 0.05)
    pf.step("greedy", "greedy", 0.05)
    # Orbit searches before the local search: on structured cells they are the cheap winners.
    if params.space_size <= _ORBIT_MAX_WORDS:
        share = 0.4 / max(1, len(group_list))
        for spec_text in group_list:
            # An orbit search stops early once it meets the best proven bound.
            pf.step(f"orbit[{spec_text}]", "orbit", share, group=spec_text, size=pf.upper)
    pf.step("local", "local", 0.10)
    if params.space_size <= exact_max_words:
        pf.step("exact", "exact", 0.25)
    if pf.best is not None and not pf.done():
        pf.step("sat", "sat", 1.0, size=pf.size + 1)
    return Outcome(pf.best, pf.upper, pf.nodes, {
        "lower_method": pf.lower_method,
        "upper_method": pf.upper_method,
        "budget": budget,
        "groups": ";".join(group_list),
        "exact_max_words": exact_max_words,
        "steps": tuple(pf.log),
    })
