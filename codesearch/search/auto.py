"""Portfolio search under one time budget (method ``"auto"``), its steps ordered by the cell.

Problem
-------
For one cell ``(q, n, d)``, get the largest code and the smallest proven upper bound on
``A_q(n,d)`` that the tool can reach within a time budget, without the user choosing a method.
Which method wins depends on the cell: where the space of ``q^n`` words is small the exact
search settles the cell in a fraction of a second, while on a large space it cannot even
start and the best codes come from algebraic constructions and from searches restricted to
codes invariant under a group.

Plan (:func:`plan`)
-------------------
*Small space* (``q^n <= exact_max_words``): the lexicode (a scan of milliseconds there), then
the exact search (30% of the budget), the random greedy, orbit searches over a few natural groups
(:func:`natural_groups`), the local search, the construction library, and SAT for the one
size above the best code found (a "no" proves ``A_q(n,d) <= best``).

*Large space*: the construction library first (:func:`codesearch.constructions.candidates`:
the largest construction whose building and checking fit the time left), then the orbit
searches where the space allows them, the lexicode and greedy scans, and the local search
with the time left (it beats the constructions on some cells: A(25,9), A(26,10)).

Every step has a conservative estimate of the seconds it needs before it can return anything
(:func:`step_need`: the scans are anytime and need their set-up, a bitmap of ``q^n`` bits
and the masks of a Hamming ball; the orbit graph is about ``(q^n)^2 / |G|`` distance
evaluations; a code of M words costs its re-check). A step
never starts when the time left, less the re-check of the best code so far, cannot hold its
estimate; it is logged as skipped. Each step runs under ``min(time left, its share of the
budget)``, except the construction library's, which builds one code and may use the time
left (a linear code's re-check is priced by the checker's span route, ``M n`` operations,
so the library's 2^21-word code of A(27,4) fits a budget of 8 s); the front end owns the
deadline (:class:`codesearch.search.base.Context`).

Every step goes through the search front end, so every code is re-verified, and a step whose
method is not registered, not installed, or rejects the cell (or an option) is skipped and
logged. The portfolio stops as soon as its best code meets a proven bound. The result is
OPTIMAL only when the best code's size equals a proven upper bound: a usable bound from
:mod:`codesearch.bounds`, or the ``upper`` of an exhaustive method. The methods that
produced the code and the bound are recorded as ``settings["lower_method"]`` and
``settings["upper_method"]``, the steps and their times in ``settings["steps"]``.

References
----------
.. [1] C. P. Gomes and B. Selman, "Algorithm portfolios", Artificial Intelligence 126 (2001)
   43-62 (running several searches under one budget).
.. [2] J. R. Rice, "The algorithm selection problem", Advances in Computers 15 (1976) 65-118
   (choosing the method from features of the instance).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Mapping, Sequence

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import Code, Params
from codesearch.search.base import Context, Outcome

__all__ = ["OPTIONS", "SEEDING", "run", "natural_groups", "plan", "step_need", "Step",
           "DEFAULT_BUDGET", "DEFAULT_EXACT_MAX_WORDS"]

#: Options accepted by :func:`run`.
OPTIONS = frozenset({"group", "exact_max_words"})
SEEDING = "fixed"

#: Budget in seconds when no time limit is given (the portfolio needs one to share out).
DEFAULT_BUDGET = 60.0
#: Largest q**n for which the exact search is tried (and goes first).
DEFAULT_EXACT_MAX_WORDS = 1 << 12
#: Largest q**n for which orbit searches are tried (their orbit enumeration is linear in it).
_ORBIT_MAX_WORDS = 1 << 22
#: Admissible orbits an orbit search accepts (:data:`codesearch.search.orbit.DEFAULT_MAX_ORBITS`):
#: a group expected to leave several times more is not tried.
_ORBIT_MAX_ORBITS = 12000
#: Largest q**n for the lexicode / greedy scans and the local search
#: (:data:`codesearch.search.greedy.MAX_MARK_SPACE`).
_SCAN_MAX_WORDS = 1 << 28
#: Beyond this q**n the random greedy samples words instead of marking balls
#: (:data:`codesearch.search.greedy.MAX_PERM_SPACE`).
_SAMPLED_SPACE = 1 << 22
#: Largest ball the scans mark (:data:`codesearch.search.greedy.MAX_BALL`).
_MAX_BALL = 1 << 23
#: The same for q > 2 (:data:`codesearch.search.greedy.MAX_QARY_SCAN_BALL`); codes with balls
#: this large have a few dozen words at most, which the construction library and the orbit
#: steps give
_MAX_QARY_BALL = 1 << 20

# Rates for the cost estimates, measured on a loaded 2-core machine (benchmarks/
# bench_portfolio.py) and divided by about two, so that estimates err on the long side.
#: Pair distances per second of the re-check of a code (measured 1.5e8 .. 2.5e8).
_PAIRS_PER_S = 1.0e8
#: Ball words per second of the disjoint-balls re-check of a binary code (list and sort).
_BALL_WORDS_PER_S = 2.0e7
#: Word visits per second of the greedy scans (ball marking), measured about 1e8.
_SCAN_PER_S = 5.0e7
#: Seconds per XOR mask of a ball built for the scans (measured 4e-8).
_MASK_S = 1.0e-7
#: Seconds per ball word marked by a q-ary scan (patterns applied digit by digit): measured
#: 1.2e-7 .. 2.8e-7 on a loaded machine (A_4(11,8), A_4(12,9)); a binary mark is one XOR.
_MARK_QARY_S = 3.0e-7
#: Words per second of the scans' bitmap set-up.
_BITMAP_PER_S = 1.0e9
#: Orbit-graph distance evaluations per second, counting every orbit as admissible
#: (measured 1.7e8 .. 3e9: at larger d most orbits are not admissible).
_ORBIT_PER_S = 2.0e8
#: Seconds to tabulate the construction library of one alphabet (measured 0.3 .. 0.8 s).
_TABLE_SECONDS = 1.5
#: Fixed cost of any step (front end, result, logging).
_STEP_OVERHEAD = 0.02


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
    return [spec for spec, _ in _natural_groups(q, n)]


def _natural_groups(q: int, n: int) -> list[tuple[str, int]]:
    """:func:`natural_groups` with the order of each group (for the cost estimates)."""
    out: list[tuple[str, int]] = []
    if q == 2 and n >= 7 and ((n & (n - 1)) == 0 or (n & (n + 1)) == 0):
        # translations by RM(1, m) (2^(m+1) words), or its punctured code
        out.append(("rm1", 2 * (n + 1 if n & (n + 1) == 0 else n)))
    scale, units = ("*scale", q - 1) if q in (3, 5, 7, 11, 13) else ("", 1)
    # Quadratic-residue symmetry: i -> i + 1 and i -> s*i with s generating the squares mod a
    # prime p, on all n = p coordinates or on n - 1 = p of them (extended codes).
    for p, blocks in ((n, ""), (n - 1, f":0-{n - 2}")):
        if p >= 5 and all(p % f for f in range(2, int(p**0.5) + 1)):
            k = pow(_primitive_root(p), 2, p)
            out.append((f"cyclic{blocks}*mul:{k}{blocks}{scale}", p * (p - 1) // 2 * units))
    out.append(("cyclic", n))
    if n >= 6:
        h = n // 2
        out.append((f"cyclic:0-{h - 1},{h}-{2 * h - 1}", h))
    if n >= 9:
        out.append(("cyclic:" + ",".join(f"{3 * b}-{3 * b + 2}" for b in range(n // 3)), 3))
    if n >= 4:
        out.append((f"cyclic:0-{n - 2}", n - 1))
    if q == 2:
        out.append(("cyclic*rep", 2 * n))
        if n >= 4:
            out.append((f"cyclic:0-{n - 2}*rep", 2 * (n - 1)))
    elif scale:
        out.append(("cyclic" + scale, n * units))
    out.append(("cyclic*rev", 2 * n))
    return out


def _primitive_root(p: int) -> int:
    """Least primitive root modulo the prime p."""
    factors = [f for f in range(2, p) if (p - 1) % f == 0 and all(f % e for e in range(2, f))]
    return next(a for a in range(2, p) if all(pow(a, (p - 1) // f, p) != 1 for f in factors))


# ---------------------------------------------------------------------------- cost estimates
def _ball(q: int, n: int, r: int) -> int:
    return sum(math.comb(n, i) * (q - 1) ** i for i in range(max(r, 0) + 1))


def _packing_cap(params: Params) -> int:
    """Sphere-packing cap on the code size (a theorem), used to size the estimates."""
    q, n, d = params.q, params.n, params.d
    return max(1, params.space_size // _ball(q, n, (d - 1) // 2))


def recheck_seconds(params: Params, words: int, *, linear: bool = False) -> float:
    """Estimated seconds for the front end's re-check of a code of ``words`` words (the
    cheaper of all pair distances and, binary, the disjoint-balls check).

    ``linear`` says the code is a binary linear space: past 4096 words the checker then
    reduces each word on a basis (:func:`codesearch.verify.check_cost`, route ``linear``),
    about ``M n`` word operations.
    """
    pairs = words * (words - 1) / 2 / _PAIRS_PER_S
    if linear and params.q == 2 and params.n <= 64:
        return min(pairs, words * params.n / _SCAN_PER_S)
    if params.q == 2:
        # past 4096 words a ball bitmap: the radius-r ball of every word and, for even d, its
        # radius-(r+1) sphere (A(27,4): 379 words each, not 28)
        r = (params.d - 1) // 2
        per = _ball(2, params.n, r) + (math.comb(params.n, r + 1) if params.d % 2 == 0 else 0)
        pairs = min(pairs, words * per / _BALL_WORDS_PER_S)
    return pairs


def _orbit_seconds(params: Params, order: int) -> float:
    """Orbit graph of a group of the given order: about q^n / |G| orbits, each compared with
    every word."""
    space = params.space_size
    return space * (space / max(order, 1)) / _ORBIT_PER_S + space / _SCAN_PER_S


@dataclass(frozen=True)
class Step:
    """One step of the portfolio's plan.

    Attributes
    ----------
    name : str
        Label in the log (``orbit[cyclic]``).
    method : str
        Registry name of the method, or ``"constructions"`` for the construction library.
    share : float
        Largest fraction of the whole budget the step may take (the last one takes what is
        left).
    need : float
        Conservative seconds before the step can return anything; it is skipped when the
        time left cannot hold this (see :func:`step_need`).
    options : Mapping
        Options passed to the method.
    """

    name: str
    method: str
    share: float
    need: float
    options: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        object.__setattr__(self, "options", MappingProxyType(dict(self.options)))


def step_need(method: str, params: Params, *, order: int | None = None,
              tabulated: bool = False) -> float:
    """Conservative seconds a step needs before it can return a code (estimates, not limits).

    ``order`` is the group order of an orbit step; ``tabulated`` says the construction library
    of this alphabet is already built in this process. ``inf`` means the step does not apply.
    """
    space = params.space_size
    if method == "exact":
        return 0.1 + 4 * recheck_seconds(params, _packing_cap(params))
    if method in ("lexicode", "greedy", "local"):
        # anytime scans: a prefix of the scan is already a code, so what they need is the
        # set-up (the marked-words bitmap and the XOR masks of the ball of radius d - 1)
        if space > _SCAN_MAX_WORDS:
            return math.inf
        ball = _ball(params.q, params.n, params.d - 1)
        sampled = method != "lexicode" and space > _SAMPLED_SPACE  # random order: no masks
        if ball > (_MAX_BALL if params.q == 2 else _MAX_QARY_BALL) and not sampled:
            return math.inf
        setup = _STEP_OVERHEAD + space / _BITMAP_PER_S + (0 if sampled else ball * _MASK_S)
        if params.q > 2 and not sampled:
            # the first codeword's ball is marked before any code can be returned (5.9e6
            # words at A_4(12,9): 1-4 s, one kernel call)
            setup += ball * _MARK_QARY_S
        return setup if method != "local" else 0.1 + 2 * setup
    if method == "orbit":
        if space > _ORBIT_MAX_WORDS:
            return math.inf
        if order is None:  # a group given by the user: its order is not known here
            return _STEP_OVERHEAD + _orbit_seconds(params, params.n)
        if space / order > 4 * _ORBIT_MAX_ORBITS:
            return math.inf  # far too many orbits: the search would refuse after the work
        return _STEP_OVERHEAD + _orbit_seconds(params, order)
    if method == "sat":
        return 0.3 if space <= 1 << 10 else math.inf
    if method == "constructions":
        return (0.0 if tabulated else _TABLE_SECONDS) + 0.05
    return 0.1


def plan(params: Params, *, groups: Sequence[tuple[str, int | None]] | None = None,
         exact_max_words: int = DEFAULT_EXACT_MAX_WORDS) -> list[Step]:
    """The portfolio's steps for a cell, in order (see the module docstring).

    Parameters
    ----------
    params : Params
        The cell.
    groups : sequence of (spec, order or None), optional
        Groups for the orbit steps (default :func:`natural_groups` with their orders). A
        group of unknown order (given by the user) is always planned, its cost estimated
        with order n (the cyclic group's, so the estimate errs on the long side); a natural
        group expected to leave far more orbits than the orbit search accepts is left out.
    exact_max_words : int
        The exact search goes first when ``q**n`` is at most this.
    """
    from codesearch.constructions import lookup

    q, n = params.q, params.n
    groups = _natural_groups(q, n) if groups is None else list(groups)
    tabulated = q in _TABULATED
    orbit_steps = [Step(f"orbit[{spec}]", "orbit", 0.0, step_need("orbit", params, order=order),
                        {"group": spec}) for spec, order in groups]
    orbit_steps = [s for s in orbit_steps if s.need < math.inf]
    constructions = Step("constructions", "constructions", 0.2,
                         step_need("constructions", params, tabulated=tabulated))
    if n > lookup.DEFAULT_NMAX:  # beyond the cached table: a new table per length
        constructions = None

    def orbit_share(total: float) -> list[Step]:
        share = total / max(1, len(orbit_steps))
        return [Step(s.name, s.method, share, s.need, s.options) for s in orbit_steps]

    def step(method: str, share: float) -> Step:
        return Step(method, method, share, step_need(method, params))

    if params.space_size <= exact_max_words:
        # the exact search settles easy cells at once; on the others it rarely finishes in
        # any share of a short budget, and the heuristics find larger codes than its
        # incumbent (measured: A(10,3), A(11,4) at 3 s)
        # The lexicode goes before it: on a small space its scan takes milliseconds and
        # often meets the bound already (A_4(5,3) = 64, an MDS code).
        steps = [step("lexicode", 0.02), step("exact", 0.3), step("greedy", 0.05),
                 *orbit_share(0.3), step("local", 0.2), constructions, step("sat", 1.0)]
    else:
        # scans last: they are anytime, and the local search (which starts from the
        # random greedy code and keeps the lexicode) takes whatever time is left
        steps = [constructions, *orbit_share(0.4), step("lexicode", 0.2),
                 step("greedy", 0.05), step("local", 1.0)]
    return [s for s in steps if s is not None and s.need < math.inf]


#: Alphabets whose construction table this process has built (the first lookup costs
#: :data:`_TABLE_SECONDS`, later ones microseconds).
_TABULATED: set[int] = set()


def prepare() -> None:
    """Load the kernels of every step before the portfolio's clock starts (called by the
    front end, :func:`codesearch.search.prepare_method`)."""
    from codesearch.search import METHODS, prepare_method

    for name in ("exact", "lexicode", "greedy", "orbit", "local", "sat"):
        spec = METHODS.get(name)
        if spec is not None:
            try:
                prepare_method(spec)
            except ImportError:  # logged as skipped when the step comes
                pass


class _Portfolio:
    """The best code and the best proven bound so far, and the log of the steps."""

    def __init__(self, ctx: Context, budget: float) -> None:
        self.ctx = ctx
        self.budget = budget
        self.deadline = ctx.deadline if ctx.deadline is not None else ctx.start + budget
        self.best: Code | None = None
        self.best_linear = False
        self.lower_method: str | None = None
        self.upper: int | None = ctx.known_upper
        bound = ctx.bound
        self.upper_method = None if bound is None else f"bound:{bound.method}"
        self.log = [f"bounds: {bound.value} ({bound.method})" if bound is not None
                    else "bounds: no usable bound"]
        self.nodes = 0
        self.step_name = ""

    @property
    def size(self) -> int:
        return 0 if self.best is None else self.best.size

    def settled(self) -> bool:
        return self.upper is not None and self.best is not None and self.size >= self.upper

    def left(self) -> float:
        """Seconds to the deadline, less the re-check of the best code so far."""
        reserve = recheck_seconds(self.ctx.params, self.size, linear=self.best_linear)
        return self.deadline - time.perf_counter() - reserve

    def forward(self, info: dict[str, Any]) -> None:
        """A step's own progress, labelled with the step and the portfolio's best."""
        if self.ctx.progress is not None:
            self.ctx.report(**{**info, "step": self.step_name, "best": max(
                self.size, int(info.get("incumbent") or 0)), "upper": self.upper})

    def offer(self, code: Code | None, name: str, *, linear: bool = False) -> None:
        """Keep ``code`` if it is the largest so far (``linear``: its words are a linear
        space, which the re-check estimates use)."""
        if code is not None and code.size > self.size:
            self.best, self.lower_method, self.best_linear = code, name, linear

    def run_step(self, step: Step, last: bool) -> None:
        """Run one step if the time left holds its estimate; keep what it found or proved."""
        if self.settled():
            return
        left = self.left()
        if left < step.need:
            self.log.append(f"{step.name}: skipped (needs ~{step.need:.2f} s, "
                            f"{max(left, 0.0):.2f} s left)")
            self.ctx.report(step=step.name, skipped="time", best=self.size, upper=self.upper,
                            nodes=self.nodes)
            return
        limit = left if last else min(left, max(step.need, step.share * self.budget))
        if step.method == "constructions":
            # it builds one code, the largest whose building and re-check fit: on large
            # cells that is the library's record (2^21 words at A(27,4), about 2 s), which
            # no search step comes near within any share of the budget
            limit = left
        self.step_name = step.name
        t0 = time.perf_counter()
        if step.method == "constructions":
            found = self._constructions(limit)
            size, status, upper = found, "feasible" if found else "none", None
        else:
            res = self._method(step, limit)
            if res is None:
                return
            size, status, upper = res.size, res.status.value, res.upper
        seconds = time.perf_counter() - t0
        self.log.append(f"{step.name}: size {size}, {status}, upper {upper}, {seconds:.2f}s")
        if self.upper is not None and self.upper < self.size:
            raise VerificationError(
                f"upper bound {self.upper} ({self.upper_method}) is below a verified code of "
                f"size {self.size} ({self.lower_method})")
        self.ctx.report(step=step.name, size=size, seconds=seconds, best=self.size,
                        incumbent=self.size, upper=self.upper, nodes=self.nodes)

    def _method(self, step: Step, limit: float) -> Any:
        from codesearch.search import METHODS, run_method

        spec = METHODS.get(step.method)
        if spec is None:
            self.log.append(f"{step.name}: skipped (method not registered)")
            return None
        options = dict(step.options)
        if step.method == "sat":
            if self.best is None:
                self.log.append(f"{step.name}: skipped (no code to improve on)")
                return None
            options["size"] = self.size + 1
        elif step.method in ("orbit", "greedy", "local") and self.upper is not None:
            options["size"] = self.upper  # stop once a proven bound is met
        try:
            res = run_method(spec, self.ctx.params, time_limit=max(limit, 0.01),
                             seed=self.ctx.seed, progress=self.forward, options=options,
                             bound=self.ctx.bound)
        except ImportError as exc:
            self.log.append(f"{step.name}: skipped ({type(exc).__name__})")
            return None
        except (ParameterError, NotImplementedError, MemoryError) as exc:
            self.log.append(f"{step.name}: skipped ({str(exc).splitlines()[0] if str(exc) else exc!r})")
            return None
        self.nodes += int(res.nodes)
        self.offer(res.code, step.name)
        # the front end keeps an upper bound only from exhaustive methods
        if res.upper is not None and (self.upper is None or res.upper < self.upper):
            self.upper, self.upper_method = int(res.upper), step.name
        return res

    def _constructions(self, limit: float) -> int:
        """The largest construction whose building and re-check fit in ``limit`` seconds;
        returns its size (0 when none fits or beats the best code)."""
        from codesearch import constructions

        params = self.ctx.params
        t0 = time.perf_counter()
        try:
            found = constructions.candidates(params)
        except ParameterError:
            return 0
        _TABULATED.add(params.q)
        for c in found:
            if c.size <= self.size:
                break
            left = limit - (time.perf_counter() - t0)
            # built, checked by the library (generator or pairs) and re-checked twice more:
            # here and by the front end after the portfolio; listing costs M words
            cost = (3 * recheck_seconds(params, c.size, linear=c.linear)
                    + c.size * params.n / _SCAN_PER_S)
            if cost > left:
                continue
            try:
                built = c.build()
            except ParameterError:
                continue
            code = built.code if isinstance(built.code, Code) else built.code.words()
            self.offer(code, f"constructions[{built.provenance}]", linear=c.linear)
            return code.size
        return 0


def run(ctx: Context, *, group: Sequence[str] | str | None = None,
        exact_max_words: int = DEFAULT_EXACT_MAX_WORDS) -> Outcome:
    """Run the portfolio on one cell.

    Parameters
    ----------
    ctx : Context
        The cell; its time limit is the total budget (default :data:`DEFAULT_BUDGET`), its
        seed goes to every randomised step. Its progress callback receives every step's own
        figures with ``step`` (the step's name), ``best`` and ``upper`` (the portfolio's)
        added, and after every step ``{"step", "size", "seconds", "best", "incumbent",
        "upper", "nodes", "elapsed"}`` (``size``: what the step found; the rest portfolio
        totals), or ``{"step", "skipped", "best", "upper", "nodes", "elapsed"}`` for a step
        the time left could not hold.
    group : sequence of str or str, optional
        Group specs for the orbit steps (a string is split on ``;``, so the same
        ``--group`` option serves ``orbit`` and ``auto``); default :func:`natural_groups`.
    exact_max_words : int
        Try the exact search (first) only when ``q**n`` is at most this.

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
        groups: list[tuple[str, int | None]] = _natural_groups(params.q, params.n)
    elif isinstance(group, str):
        groups = [(g.strip(), None) for g in group.split(";") if g.strip()]
    else:
        groups = [(str(g), None) for g in group]
    steps = plan(params, groups=groups, exact_max_words=exact_max_words)
    pf = _Portfolio(ctx, budget)
    for i, step in enumerate(steps):
        pf.run_step(step, last=i == len(steps) - 1)
        if pf.settled():
            break
    return Outcome(pf.best, pf.upper, pf.nodes, {
        "lower_method": pf.lower_method,
        "upper_method": pf.upper_method,
        "budget": budget,
        "groups": ";".join(spec for spec, _ in groups),
        "exact_max_words": exact_max_words,
        "plan": tuple(s.name for s in steps),
        "steps": tuple(pf.log),
    })
