"""Which construction gives the most words for a cell: chains of operations on family codes.

Problem
-------
For an alphabet q and all lengths n <= nmax, find for each cell (n, d) large codes obtainable
from the registered families (:data:`codesearch.constructions.registry.FAMILIES`) by chains of
operations, with their *exact* sizes and without building any code. Each result carries a
recipe that builds it and a provenance a table reader wants ("3x shortened extended
Golay(24,12)").

Method
------
A fixed point over the cells. Every family instance is offered to its cell; a cell keeps, for
each (root family, linear or not), the largest candidate (ties: fewer steps). Each accepted
candidate (n, d, M) is pushed through the unary operations with their guarantees:

    puncture  (n-1, d-1, M)           d >= 2, the last coordinate deleted
    extend    (n+1, d+1, M)           binary, d odd, overall parity bit
    pad       (n+1, d, M)             a zero coordinate appended
    shorten   (n-1, d, M/q)           linear codes (any coordinate not identically zero), or
                                      nonlinear codes equidistributed on their first b >= 1
                                      coordinates (coordinate 0, symbol 0)

When no unary step improves anything, the binary constructions run on the best codes of each
cell (largest over all d' >= d): (u|u+v) for (2n, min(2 d1, d2)), direct sums, juxtaposition
of linear codes of equal dimension, Construction X on nested BCH and Reed-Muller pairs (also
shortened on common coordinates) with an auxiliary linear code, and (binary tables) the
concatenation of GF(4) and GF(8) linear codes with binary inner codes. Then the unary fixed
point again, for a few rounds. Sizes are integers computed from the operations' exact counts;
:meth:`Candidate.build` re-checks the built code's size and distance.

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977, ch. 1 section 9, ch. 2 section 9, ch. 18 section 7 (the operations); ch. 17 section 1
(elementary relations between values of A(n, d)).
"""

from __future__ import annotations

import re
from collections import deque
from dataclasses import dataclass, field as dc_field
from functools import lru_cache
from typing import Any, Iterable

from codesearch.errors import ParameterError, VerificationError
from codesearch.model import MAX_LISTED_WORDS, Code, LinearCode, Params

__all__ = ["Candidate", "ConstructionTable", "table", "candidates", "best", "DEFAULT_NMAX"]

#: Longest length tabulated by default.
DEFAULT_NMAX = 32
#: Rounds of binary constructions (each followed by the unary fixed point).
ROUNDS = 3


@dataclass(frozen=True)
class Candidate:
    """A code the construction library can build for a cell, described before building.

    Attributes
    ----------
    q, n, d, size : int
        Alphabet, length, guaranteed minimum distance, exact number of words.
    provenance : str
        How it is made, for a reader of a table.
    linear : bool
        Built as a :class:`~codesearch.model.LinearCode` (generator matrix).
    k : int or None
        Dimension when linear.
    root : str
        The family (or binary construction) the chain starts from.
    steps : int
        Number of operations applied.
    recipe : tuple
        The nested recipe :meth:`build` follows.
    """

    q: int
    n: int
    d: int
    size: int
    provenance: str
    linear: bool
    k: int | None
    root: str
    steps: int
    recipe: tuple = dc_field(repr=False)
    balanced: int = dc_field(default=0, repr=False)
    seeds: tuple = dc_field(default=(), repr=False, compare=False)

    @property
    def params(self) -> Params:
        return Params(self.q, self.n, self.d)

    def build(self, max_words: int | None = None) -> "Built":  # noqa: F821
        """Build the code, re-check it with :mod:`codesearch.verify`, and check its size.

        Parameters
        ----------
        max_words : int, optional
            Refuse (ParameterError, one line) to build a nonlinear code with more words, or a
            linear one whose words would have to be listed on the way.
        """
        from codesearch.constructions.operations import verified

        cap = MAX_LISTED_WORDS if max_words is None else max_words
        if not self.linear and self.size > cap:
            raise ParameterError(f"{self.provenance}: {self.size} words exceed the cap of {cap}")
        code = _make(self.recipe, self.seeds, cap)
        if code.size != self.size or code.n != self.n:
            raise VerificationError(f"{self.provenance}: built (n={code.n}, M={code.size}), "
                                    f"expected (n={self.n}, M={self.size})")
        return verified(code, self.d, self.provenance)


# ------------------------------------------------------------------------- building recipes
def _make(recipe: tuple, seeds: tuple, cap: int) -> Code | LinearCode:
    from codesearch.constructions import operations as op
    from codesearch.constructions.registry import FAMILIES

    kind = recipe[0]
    if kind == "family":
        return FAMILIES[recipe[1]].build(**dict(recipe[2]))
    if kind == "seed":
        return seeds[recipe[1]].code
    sub = [_make(r, seeds, cap) for r in recipe[1:] if isinstance(r, tuple)]
    if kind == "shorten":
        c = sub[0]
        return op.raw_shorten(c, None if isinstance(c, LinearCode) else 0, 0)
    if kind == "shorten-first":
        c = sub[0]
        for _ in range(recipe[2]):
            c = op.raw_shorten(c, 0, 0)
        return c
    if kind == "puncture":
        return op.raw_puncture(sub[0], -1)
    if kind == "extend":
        return op.raw_parity_extend(sub[0])
    if kind == "pad":
        return op.raw_pad(sub[0], 0)
    if kind == "subcode":
        c = sub[0]
        return LinearCode(c.generator[: recipe[2]], c.q)
    for c in sub:
        if isinstance(c, Code) and c.size > cap:
            raise ParameterError(f"an intermediate code has {c.size} words, over the cap {cap}")
    if kind in ("uuv", "sum") and any(isinstance(c, LinearCode) for c in sub) and \
            not all(isinstance(c, LinearCode) for c in sub):
        sub = [c.words(cap) if isinstance(c, LinearCode) else c for c in sub]
    if kind == "uuv":
        return op.raw_u_u_plus_v(sub[0], sub[1])
    if kind == "sum":
        return op.raw_direct_sum(sub[0], sub[1])
    if kind == "juxt":
        return op.raw_juxtapose(sub[0], sub[1])
    if kind == "X":
        return op.raw_construction_x(sub[0], sub[1], sub[2])
    if kind == "concat":
        return op.raw_concatenate(sub[0], sub[1])
    raise ValueError(f"unknown recipe {kind!r}")


_COMBINERS = frozenset({"(u|u+v)", "direct sum", "juxtaposition", "Construction X",
                        "concatenation"})
_WORDS = {"shorten": "shortened", "puncture": "punctured", "extend": "extended",
          "pad": "padded"}


def _prefix(word: str, text: str) -> str:
    """``word`` put before ``text``, repeats counted: "shortened 2x shortened X" -> "3x ..."."""
    m = re.match(rf"(?:(\d+)x )?{word} (.*)$", text)
    if m:
        return f"{int(m.group(1) or 1) + 1}x {word} {m.group(2)}"
    return f"{word} {text}"


# ------------------------------------------------------------------------- the table
class ConstructionTable:
    """Best construction candidates of every cell (n <= nmax) for one alphabet."""

    def __init__(self, q: int, nmax: int = DEFAULT_NMAX, seeds: tuple = ()) -> None:
        from codesearch.constructions.registry import family_instances

        self.q, self.nmax, self.seeds = q, nmax, tuple(seeds)
        self.cells: dict[tuple[int, int], dict[tuple[str, bool], Candidate]] = {}
        self._queue: deque[Candidate] = deque()
        for inst in family_instances(q, nmax):
            self._offer(Candidate(q, inst.n, inst.d, inst.size, inst.label, inst.linear,
                                  inst.k, inst.family, 0, ("family", inst.family, inst.args),
                                  inst.balanced))
        for i, s in enumerate(self.seeds):
            lin = isinstance(s.code, LinearCode)
            self._offer(Candidate(q, s.code.n, s.d, s.code.size, s.provenance, lin,
                                  s.code.k if lin else None, "seed", 0, ("seed", i),
                                  0, self.seeds))
        self._unary_fixed_point()
        for _ in range(ROUNDS):
            if not self._binary_round():
                break
            self._unary_fixed_point()

    # -------------------------------------------------------------------- bookkeeping
    def _offer(self, c: Candidate) -> bool:
        if not (1 <= c.n <= self.nmax and 1 <= c.d <= c.n and c.size >= 2):
            return False
        if self.seeds and not c.seeds:
            c = _with_seeds(c, self.seeds)
        slot = self.cells.setdefault((c.n, c.d), {})
        key = (c.root, c.linear)
        old = slot.get(key)
        if old is not None and (old.size, -old.steps) >= (c.size, -c.steps):
            return False
        slot[key] = c
        self._queue.append(c)
        return True

    def _current(self, c: Candidate) -> bool:
        return self.cells.get((c.n, c.d), {}).get((c.root, c.linear)) is c

    def _derive(self, c: Candidate, kind: str, n: int, d: int, size: int, k: int | None,
                balanced: int, extra: tuple = ()) -> Candidate:
        text = _prefix(_WORDS[kind], c.provenance)
        return Candidate(self.q, n, d, size, text, c.linear, k, c.root, c.steps + 1,
                         (kind, c.recipe) + extra, balanced, c.seeds)

    def _unary_fixed_point(self) -> None:
        q = self.q
        while self._queue:
            c = self._queue.popleft()
            if not self._current(c):
                continue
            if c.d >= 2 and c.n >= 2:
                self._offer(self._derive(c, "puncture", c.n - 1, c.d - 1, c.size, c.k,
                                         min(c.balanced, c.n - 1)))
            if q == 2 and c.d % 2 == 1:
                self._offer(self._derive(c, "extend", c.n + 1, c.d + 1, c.size, c.k, c.balanced))
            self._offer(self._derive(c, "pad", c.n + 1, c.d, c.size, c.k, c.balanced))
            if c.n >= 2 and c.size % q == 0 and (
                    (c.linear and c.k and c.k >= 1) or (not c.linear and c.balanced >= 1)):
                self._offer(self._derive(c, "shorten", c.n - 1, c.d, c.size // q,
                                         None if c.k is None else c.k - 1,
                                         c.k - 1 if c.linear else c.balanced - 1))

    # -------------------------------------------------------------------- queries
    def best_at(self, n: int, d: int, linear_only: bool = False) -> Candidate | None:
        """The largest candidate of length n with guaranteed distance >= d."""
        found = None
        for dd in range(d, n + 1):
            for c in self.cells.get((n, dd), {}).values():
                if linear_only and not c.linear:
                    continue
                if found is None or (c.size, -c.steps) > (found.size, -found.steps):
                    found = c
        return found

    def linear_by_dimension(self) -> dict[tuple[int, int], Candidate]:
        """(n, k) -> the linear candidate of length n, dimension >= k, with the largest d."""
        out: dict[tuple[int, int], Candidate] = {}
        for (n, d), slot in self.cells.items():
            for c in slot.values():
                if not c.linear or not c.k:
                    continue
                for k in range(1, c.k + 1):
                    old = out.get((n, k))
                    if old is None or (c.d, -c.k, -c.steps) > (old.d, -old.k, -old.steps):
                        out[(n, k)] = c
        return out

    def candidates(self, n: int, d: int) -> list[Candidate]:
        """One candidate per route (root family, linear or not), largest first."""
        best: dict[tuple[str, bool], Candidate] = {}
        for dd in range(d, n + 1):
            for key, c in self.cells.get((n, dd), {}).items():
                old = best.get(key)
                if old is None or (c.size, -c.steps) > (old.size, -old.steps):
                    best[key] = c
        return sorted(best.values(),
                      key=lambda c: (-c.size, not c.linear, c.root in _COMBINERS, c.steps,
                                     c.provenance))

    # -------------------------------------------------------------------- binary steps
    def _binary_round(self) -> bool:
        q, nmax = self.q, self.nmax
        improved = False
        best = {(n, d): self.best_at(n, d) for n in range(1, nmax + 1) for d in range(1, n + 1)}

        def offer(c: Candidate) -> None:
            nonlocal improved
            improved |= self._offer(c)

        for n in range(1, nmax // 2 + 1):  # (u|u+v)
            for d in range(2, 2 * n + 1):
                a, b = best.get((n, (d + 1) // 2)), best.get((n, d)) if d <= n else None
                if a is None or b is None:
                    continue
                lin = a.linear and b.linear
                offer(Candidate(q, 2 * n, d, a.size * b.size,
                                f"(u|u+v) of {a.provenance} and {b.provenance}", lin,
                                (a.k + b.k) if lin else None, "(u|u+v)", a.steps + b.steps + 1,
                                ("uuv", a.recipe, b.recipe), _lead_balanced(a), self.seeds))
        for n1 in range(1, nmax // 2 + 1):  # direct sums
            for n2 in range(n1, nmax - n1 + 1):
                for d in range(1, n1 + 1):
                    a, b = best.get((n1, d)), best.get((n2, d))
                    if a is None or b is None:
                        continue
                    lin = a.linear and b.linear
                    offer(Candidate(q, n1 + n2, d, a.size * b.size,
                                    f"direct sum of {a.provenance} and {b.provenance}", lin,
                                    (a.k + b.k) if lin else None, "direct sum",
                                    a.steps + b.steps + 1, ("sum", a.recipe, b.recipe),
                                    _lead_balanced(a), self.seeds))
        lin = self.linear_by_dimension()
        for n1 in range(1, nmax // 2 + 1):  # juxtaposition
            for n2 in range(n1, nmax - n1 + 1):
                for k in range(1, n1 + 1):
                    a, b = lin.get((n1, k)), lin.get((n2, k))
                    if a is None or b is None:
                        continue
                    offer(Candidate(q, n1 + n2, a.d + b.d, q**k,
                                    f"juxtaposition of {_sub(a, k)} and {_sub(b, k)}", True, k,
                                    "juxtaposition", a.steps + b.steps + 1,
                                    ("juxt", _subrecipe(a, k), _subrecipe(b, k)), k,
                                    self.seeds))
        for big, small in _nested_pairs(q, nmax):  # Construction X
            r = big.k - small.k
            for s in range(0, small.k):
                n0 = big.n - s
                for a in range(1, nmax - n0 + 1):
                    aux = lin.get((a, r))
                    if aux is None:
                        continue
                    d = min(small.d, big.d + aux.d)
                    pre = f"{s}x shortened " if s > 1 else ("shortened " if s else "")
                    br = ("shorten-first", ("family", big.family, big.args), s)
                    sr = ("shorten-first", ("family", small.family, small.args), s)
                    offer(Candidate(q, n0 + a, d, q ** (big.k - s),
                                    f"Construction X on {pre}{big.label} > {small.label} "
                                    f"with {_sub(aux, r)}", True, big.k - s,
                                    "Construction X", aux.steps + s + 1,
                                    ("X", br, sr, _subrecipe(aux, r)), big.k - s, self.seeds))
        if q == 2:  # concatenation with GF(4) and GF(8) outer codes
            for m in (2, 3):
                outer_table = table(2**m, nmax // 2)
                outer = outer_table.linear_by_dimension()
                for (no, ko), oc in outer.items():
                    for ni in range(m, nmax // no + 1):
                        inner = lin.get((ni, m))
                        if inner is None or inner.k is None:
                            continue
                        offer(Candidate(q, no * ni, oc.d * inner.d, 2 ** (ko * m),
                                        f"{_sub(oc, ko)} concatenated with {_sub(inner, m)}",
                                        True, ko * m, "concatenation", oc.steps + inner.steps + 1,
                                        ("concat", _subrecipe(oc, ko), _subrecipe(inner, m)),
                                        ko * m, self.seeds))
        return improved


#: Linear families whose generator matrix starts with an identity block: their words are
#: equidistributed on the first k coordinates.
_SYSTEMATIC = frozenset({"parity-check", "full-space", "repetition"})


def _lead_balanced(c: Candidate) -> int:
    """Leading coordinates on which the words of ``c`` are known to be equidistributed.

    A combination of ``c`` with another code as its first part ((u|u+v), direct sum) keeps
    this property. For linear candidates ``balanced`` is only trusted for unmodified
    systematic families (the linear shortening route ignores it)."""
    if not c.linear:
        return c.balanced
    return (c.k or 0) if c.root in _SYSTEMATIC and c.steps == 0 else 0


def _with_seeds(c: Candidate, seeds: tuple) -> Candidate:
    return Candidate(c.q, c.n, c.d, c.size, c.provenance, c.linear, c.k, c.root, c.steps,
                     c.recipe, c.balanced, seeds)


def _sub(c: Candidate, k: int) -> str:
    return c.provenance if c.k == k else f"a {k}-dimensional subcode of {c.provenance}"


def _subrecipe(c: Candidate, k: int) -> tuple:
    return c.recipe if c.k == k else ("subcode", c.recipe, k)


@lru_cache(maxsize=None)
def _nested_pairs(q: int, nmax: int) -> tuple:
    """Pairs (C1, C2) of family instances with C2 inside C1 and a larger distance."""
    from codesearch.constructions.registry import family_instances

    groups: dict[tuple, list] = {}
    for inst in family_instances(q, nmax):
        a = inst.kwargs
        if inst.family == "bch":
            groups.setdefault(("bch", a["q"], a["m"], a["extended"]), []).append(inst)
        elif inst.family == "reed-muller":
            groups.setdefault(("rm", a["m"]), []).append(inst)
    pairs = []
    for members in groups.values():
        members.sort(key=lambda i: -i.k)
        for i, big in enumerate(members):
            for small in members[i + 1:]:
                if small.d > big.d and small.k < big.k:
                    pairs.append((big, small))
    return tuple(pairs)


def table(q: int, nmax: int = DEFAULT_NMAX, seeds: tuple = ()) -> ConstructionTable:
    """The (cached) construction table of alphabet q for lengths <= nmax.

    ``seeds`` : tuple of :class:`~codesearch.constructions.operations.Built` codes from
    elsewhere (a store, a search) that the chains may start from as well.
    """
    # one cache key whatever the call's form (table(2) and table(2, 32, ()) are one table)
    return _table(q, nmax, tuple(seeds))


@lru_cache(maxsize=16)
def _table(q: int, nmax: int, seeds: tuple) -> ConstructionTable:
    return ConstructionTable(q, nmax, seeds)


def candidates(params: Params, *, nmax: int | None = None, seeds: tuple = ()) -> list[Candidate]:
    """The ways the construction library gives codes for ``params``, largest first.

    One candidate per route (root family or binary construction; linear and nonlinear apart).
    Cheap: nothing is built (the first call for an alphabet tabulates all lengths <= nmax).
    """
    nmax = max(DEFAULT_NMAX, params.n) if nmax is None else nmax
    if params.n > nmax:
        raise ParameterError(f"the construction table reaches n={nmax}, got n={params.n}")
    return table(params.q, nmax, tuple(seeds)).candidates(params.n, params.d)


def best(params: Params, *, max_words: int = MAX_LISTED_WORDS, nmax: int | None = None,
         seeds: tuple = ()) -> tuple[Code | LinearCode, str]:
    """Build the largest construction for ``params`` that fits, verified.

    Linear candidates are built as generator matrices whatever their size; nonlinear ones
    only up to ``max_words`` words (the next route is tried otherwise).

    Returns
    -------
    (code, provenance)

    Raises
    ------
    ParameterError
        When no construction fits.
    """
    for c in candidates(params, nmax=nmax, seeds=seeds):
        if not c.linear and c.size > max_words:
            continue
        try:
            built = c.build(max_words)
        except ParameterError:
            continue
        return built.code, built.provenance
    raise ParameterError(f"no construction gives a code for {params} within {max_words} words")
