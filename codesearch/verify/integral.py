"""Independent checker of ``"distance-enumeration"`` certificates.

The certificate claims ``A(n,d) <= value`` (binary; odd ``d`` through ``A(n+1,d+1)``) and
carries a Delsarte LP certificate proving ``A <= V``. The checker re-checks that LP
certificate (through :func:`codesearch.verify.check_certificate`) and then shows, for every
size ``M = value+1 .. V``, that no integer vector ``(a_i)`` (unordered pairs of codewords at
distance ``i``, even ``i >= d``) satisfies

    sum_i a_i = C(M,2),   0 <= 2 a_i <= M A(n,d,i)   (Johnson's constant-weight bound),
    b_k = M C(n,k) + 2 sum_i a_i K_k(i):  b_k >= C(n,k), b_k = C(n,k) mod 8  (M odd)
                                          b_k >= 0,      b_k = 0 mod 4       (M even),

for k = 1..n (see :mod:`codesearch.bounds.integral` for the proofs). The search here is the
plain one: every vector within the boxes, the last count fixed by the sum, all conditions
tested at each leaf. It shares no code with the producer.

References
----------
P. Delsarte, Philips Res. Rep. Suppl. 10 (1973); M. R. Best et al., IEEE Trans. Inform.
Theory 24 (1978) 81-93; MacWilliams and Sloane (1977) ch. 2 and ch. 17.
"""

from __future__ import annotations

import math
from typing import Any, Callable, Mapping

from codesearch.errors import InputError
from codesearch.verify import strict

#: the table's entry point, passed in by :mod:`codesearch.verify.certificates`
Checker = Callable[[Mapping[str, Any]], tuple[bool, "int | None", str]]

__all__ = ["check_distance_enumeration", "check_odd_size", "check_size_mod_4", "MAX_LEAVES",
           "MAX_SIZES"]

#: Leaves the checker is willing to visit, all sizes together (else: refused as past the cap).
MAX_LEAVES = 2_000_000
#: Sizes a distance-enumeration certificate may exclude (each costs an n^2 setup).
MAX_SIZES = 1000


def _johnson(n: int, half: int, w: int, memo: dict) -> int:
    # A(n, 2 half, w) <= floor(n/w A(n-1,2half,w-1)), floor(n/(n-w) A(n-1,2half,w)),
    # C(n,w); one word when min(w, n-w) < half
    key = (n, w)
    if key not in memo:
        if min(w, n - w) < half:
            memo[key] = 1
        else:
            v = math.comb(n, w)
            if w > 0:
                v = min(v, n * _johnson(n - 1, half, w - 1, memo) // w)
            if n - w > 0:
                v = min(v, n * _johnson(n - 1, half, w, memo) // (n - w))
            memo[key] = v
    return memo[key]


def _exists(n: int, d: int, M: int, budget: list[int]) -> bool | None:
    """True if some vector passes every test, False if none, None when the leaves left in
    ``budget[0]`` (shared by all sizes, decremented here) run out."""
    dist = list(range(d, n + 1, 2))
    memo: dict = {}
    box = [M * _johnson(n, d // 2, i, memo) // 2 for i in dist]
    total = M * (M - 1) // 2
    kraw = [[sum((-1) ** s * math.comb(i, s) * math.comb(n - i, k - s) for s in range(k + 1))
             for i in dist] for k in range(n + 1)]
    vec = [0] * len(dist)

    def ok() -> bool:
        for k in range(1, n + 1):
            b = M * math.comb(n, k) + 2 * sum(a * kv for a, kv in zip(vec, kraw[k]))
            if M % 2:
                if b < math.comb(n, k) or (b - math.comb(n, k)) % 8:
                    return False
            elif b < 0 or b % 4:
                return False
        return True

    def walk(j: int, rem: int) -> bool:
        if j == len(dist) - 1:
            budget[0] -= 1
            if budget[0] < 0:
                raise OverflowError
            if rem > box[j]:
                return False
            vec[j] = rem
            return ok()
        for a in range(min(rem, box[j]) + 1):
            vec[j] = a
            if walk(j + 1, rem - a):
                return True
        return False

    try:
        return walk(0, total)
    except OverflowError:
        return None


def _cell_and_lp(cert: Mapping[str, Any]) -> tuple[int, int, int, int, Mapping[str, Any]]:
    what = "certificate"
    q = strict.get_int(cert, "q", what, 2, 2)
    n0 = strict.get_int(cert, "n", what, 3, 4096)
    d0 = strict.get_int(cert, "d", what, 3, n0)
    strict.get_int(cert, "value", what, 0, None)
    n, d = (n0 + 1, d0 + 1) if d0 % 2 else (n0, d0)
    lp = strict.mapping(strict.field(cert, "lp", what), "certificate: lp")
    if (lp.get("q"), lp.get("n"), lp.get("d")) != (2, n, d) or lp.get("kind") != "delsarte-lp":
        raise InputError(f"certificate: lp must be a delsarte-lp certificate for A({n},{d})")
    return n0, d0, n, d, lp


def check_odd_size(cert: Mapping[str, Any], check_certificate: Checker
                   ) -> tuple[bool, int | None, str]:
    """Re-check an ``lp-odd-size`` certificate: the nested Delsarte LP certificate (exact
    value ``V``, dual ``y``) and, for ``M = floor(V)`` odd, ``M^2 - V M + sum_k y_k C(n,k) > 0``
    (an odd-size code has ``b_k >= C(n,k)``: ``M - 1 <= V - 1 - sum_k y_k C(n,k) / M``)."""
    from fractions import Fraction

    n0, d0, n, d, lp = _cell_and_lp(cert)
    claimed = cert["value"]
    ok, top, why = check_certificate(lp)
    if not ok or top is None:
        return False, None, f"LP certificate: {why}"
    value = Fraction(lp["bound"])  # equal to the LP's exact value: checked just above
    weight = sum(Fraction(v) * math.comb(n, k) for k, v in enumerate(lp["y"], start=1))
    M = top
    if claimed == M:
        return True, claimed, f"A({n0},{d0}) <= {claimed} (LP alone gives {M})"
    if claimed > M:
        return False, None, f"claimed {claimed} but the LP alone proves {M}"
    if claimed != M - 1 or M % 2 == 0 or not M * M - value * M + weight > 0:
        return False, None, f"size {M} is not excluded by the odd-size cut"
    return True, claimed, f"A({n0},{d0}) <= {claimed}: LP gives {M}, odd size {M} excluded"


def check_size_mod_4(cert: Mapping[str, Any], check_certificate: Checker
                     ) -> tuple[bool, int | None, str]:
    """Re-check an ``lp-size-mod-4`` certificate: the nested Delsarte LP certificate (exact
    value ``V``, dual ``y``) proves ``A <= M0 = floor(V)``; then every size ``M`` from
    ``value + 1`` to ``M0`` must be excluded, an odd one by ``M^2 - V M + sum_k y_k C(n,k) > 0``
    and one that is 2 mod 4 by ``M^2 - V M + 2 min_s sum_k y_k (C(n,k) + K_k(s)) > 0`` over the
    even ``s`` (a code of size 2 mod 4 has ``b_k >= 2 (C(n,k) + K_k(s))``, ``s`` the even weight
    of the sum of its words; :mod:`codesearch.bounds.integral`); a size 0 mod 4 cannot be."""
    from fractions import Fraction

    from codesearch.verify.lp import _kraw_columns

    n0, d0, n, d, lp = _cell_and_lp(cert)
    claimed = cert["value"]
    ok, top, why = check_certificate(lp)
    if not ok or top is None:
        return False, None, f"LP certificate: {why}"
    if claimed > top:
        return False, None, f"claimed {claimed} but the LP alone proves {top}"
    value = Fraction(lp["bound"])
    ys = [Fraction(v) for v in lp["y"]]
    if len(ys) > n:
        return False, None, f"LP certificate has {len(ys)} multipliers for length {n}"
    weight = sum(v * math.comb(n, k) for k, v in enumerate(ys, start=1))
    table = _kraw_columns(2, n)  # row x: K_k(x) for k = 0..n
    z_min = None
    for s, row in enumerate(table):
        if s % 2:
            continue
        z = sum(v * (math.comb(n, k) + row[k]) for k, v in enumerate(ys, start=1))
        z_min = z if z_min is None else min(z_min, z)
    for M in range(claimed + 1, top + 1):
        if M % 2 == 1:
            gone = M * M - value * M + weight > 0
        elif M % 4 == 2:
            gone = M * M - value * M + 2 * z_min > 0
        else:
            gone = False
        if not gone:
            return False, None, f"size {M} is not excluded by the odd-size or 2-mod-4 cut"
    return True, claimed, (f"A({n0},{d0}) <= {claimed}: LP gives {top}, sizes "
                           f"{claimed + 1}..{top} excluded by the parity cuts")


def check_distance_enumeration(cert: Mapping[str, Any], check_certificate: Checker
                               ) -> tuple[bool, int | None, str]:
    """Re-check a ``distance-enumeration`` certificate; returns ``(valid, bound, reason)``."""
    n0, d0, n, d, lp = _cell_and_lp(cert)
    claimed = cert["value"]
    if n > 64:
        return False, None, f"distance enumeration is for n <= 64, got {n}"
    ok, top, why = check_certificate(lp)
    if not ok or top is None:
        return False, None, f"LP certificate: {why}"
    if claimed > top:
        return False, None, f"claimed {claimed} but the LP alone proves {top}"
    if top - claimed > MAX_SIZES:
        raise InputError(f"certificate: {top - claimed} sizes to exclude, past the cap "
                         f"{MAX_SIZES}; refused before starting")
    budget = [MAX_LEAVES]
    for M in range(max(claimed, 1) + 1, top + 1):
        found = _exists(n, d, M, budget)
        if found is None:
            raise InputError(f"certificate: size {M}: more than {MAX_LEAVES} distance "
                             f"vectors to visit, past the cap; not re-checked")
        if found:
            return False, None, f"size {M} has an integral distance distribution"
    return True, claimed, (f"A({n0},{d0}) <= {claimed}: LP gives {top}, no integral distance "
                           f"distribution for sizes {claimed + 1}..{top}")
