"""Integer refinement of Delsarte's LP: no integral distance distribution for the sizes above.

Problem
-------
Delsarte's LP bounds ``A(n,d)`` by a real optimum ``V``; the codes themselves have *integral*
distance distributions with congruence properties the LP ignores. For binary codes with even
``d`` this module proves that no code of size ``M`` exists for every ``M`` in ``U+1 .. V``
by listing (exhaustively, with exact pruning) every candidate distribution, so
``A(n,d) <= U``. For a code ``C`` of size ``M``, minimum distance ``d`` even:

* some code of the same size has only even distances (puncture, then add the parity bit;
  MacWilliams-Sloane ch. 2), so ``a_i`` (unordered pairs at distance ``i``) vanishes for
  odd ``i`` and for ``0 < i < d``; ``sum_i a_i = C(M, 2)``;
* ``2 a_i <= M A(n, d, i)``: the codewords at distance ``i`` from one codeword form a
  constant-weight code (Johnson's bound, MacWilliams-Sloane ch. 17);
* with ``S_u = sum_{x in C} (-1)^(u.x)``, ``b_k = sum_{wt(u)=k} S_u^2 = M C(n,k) +
  2 sum_i a_i K_k(i)`` (Delsarte 1973: the MacWilliams transform). ``S_u`` is a sum of ``M``
  signs, so ``S_u = M (mod 2)``: for odd ``M`` every ``S_u^2 = 1 (mod 8)``, hence
  ``b_k >= C(n,k)`` and ``b_k = C(n,k) (mod 8)``; for even ``M`` every ``S_u^2 = 0 (mod 4)``,
  hence ``b_k >= 0`` and ``b_k = 0 (mod 4)``.

A size ``M`` with no integer vector ``(a_i)`` meeting all of these is impossible. The search
fixes the distances in turn (each within its box) and solves the last one exactly on an
interval (every ``b_k`` is then linear in it, the congruences depend on its residue mod 4);
a partial assignment is cut when even the most favourable completion (remaining pairs put
greedily on the largest ``K_k``) misses some ``b_k``. The work is announced (nodes) and capped.

Odd sizes (:func:`odd_size`, any binary cell): the LP dual ``(y, z)`` that proves ``A <= V``
also proves, with ``b_k >= C(n,k)`` in place of ``b_k >= 0``, that an odd-size code has
``M - 1 <= V - 1 - Y / M`` where ``Y = sum_k y_k C(n,k)`` (multiply the dual constraints by
the ``A_i`` and sum, as in weak duality). So ``M = floor(V)`` is impossible when it is odd
and ``M^2 - V M + Y > 0``; the bound is then ``floor(V) - 1`` (A(24,6) <= 24106,
A(17,6) <= 340). Certificate kind ``lp-odd-size``: the cell, the value and the LP certificate.

Sizes 2 mod 4 (:func:`size_mod_4`, binary, ``d`` even or through ``A(n+1, d+1)``): put
``t_u = #{x in C : u.x = 1}``, so ``S_u = M - 2 t_u``, and ``t_u = u.sigma (mod 2)`` with
``sigma = sum_{x in C} x`` (mod 2). For ``M = 2 (mod 4)`` every ``u`` with ``u.sigma = 0``
has ``t_u`` even and ``S_u = 2 (mod 4)``, so ``S_u^2 >= 4``; of the ``C(n,k)`` words of weight
``k``, ``(C(n,k) + K_k(s))/2`` have ``u.sigma = 0`` (``s`` the weight of ``sigma``; their sign
sum is ``K_k(s)``). Hence ``b_k >= 2 (C(n,k) + K_k(s))``, and the same weak-duality step as
above gives ``M - 1 <= V - 1 - 2 Z(s) / M`` with ``Z(s) = sum_k y_k (C(n,k) + K_k(s))``. The
code may be taken with even weights only (as above), so ``s`` is even; ``sigma`` is not
known, so the size is excluded when ``M^2 - V M + 2 min_s Z(s) > 0`` over the even ``s``. With
the odd-size cut this walks down from ``floor(V)``: A(22,6) <= 6941, A(27,6) <= 157285,
A(28,6) <= 291269 (each 6943, 157286, 291270 excluded in turn). Certificate kind
``lp-size-mod-4``: the cell, the value and the LP certificate.

The certificate (kind ``distance-enumeration``) holds the cell, the claimed ``U`` and the
Delsarte LP certificate that bounds every size above ``V``;
:mod:`codesearch.verify.integral` redoes the whole search with its own code.

References
----------
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips
Res. Rep. Suppl. 10 (1973) (the transform ``b_k`` as a sum of squares).
M. R. Best, A. E. Brouwer, F. J. MacWilliams, A. M. Odlyzko and N. J. A. Sloane, "Bounds for
binary codes of length less than 25", IEEE Trans. Inform. Theory 24 (1978) 81-93 (integrality
and parity arguments on top of the LP).
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes* (1977), ch. 2
(even-weight extension), ch. 17 (Johnson's bound for constant-weight codes).
"""

from __future__ import annotations

from functools import lru_cache

from math import comb

from codesearch.model import Params
from codesearch.results import BoundResult

__all__ = ["distance_enumeration", "size_is_impossible", "MAX_NODES", "enumeration_bound",
           "odd_size", "odd_size_excluded", "size_mod_4", "parity_walk"]

#: Search nodes allowed per size M (about a second of Python per 100 000 on this machine).
MAX_NODES = 100_000
#: Most distances listed (beyond, the search space is far too large to finish).
MAX_DISTANCES = 5


class _Budget(Exception):
    pass


def _kraw(n: int, k: int, i: int) -> int:
    return sum((-1) ** s * comb(i, s) * comb(n - i, k - s) for s in range(k + 1))


def size_is_impossible(n: int, d: int, M: int, caps: dict[int, int],
                       max_nodes: int = MAX_NODES) -> bool | None:
    """True when no integral distance distribution of an even-distance code of size ``M``
    exists (see the module notes); False when one exists; None when the search would pass
    ``max_nodes``. ``caps[i]`` bounds the codewords at distance ``i`` from a codeword."""
    dist = list(range(d, n + 1, 2))
    total = M * (M - 1) // 2
    odd = M % 2 == 1
    ks = range(1, n + 1)
    K = {k: [_kraw(n, k, i) for i in dist] for k in ks}
    lo = {k: (comb(n, k) if odd else 0) for k in ks}
    mod = 8 if odd else 4
    target = {k: (comb(n, k) % 8 if odd else 0) for k in ks}
    box = [min(total, M * caps[i] // 2) for i in dist]
    if len(dist) == 1:
        box.append(0)
        dist.append(n + 2)  # a dummy distance holding nothing
        for k in ks:
            K[k].append(0)
    m = len(dist)
    nodes = 0

    def best_rest(k: int, idx: int, rem: int) -> int:
        # largest sum_{j >= idx} a_j K_k(j) with sum = rem, 0 <= a_j <= box_j (greedy)
        order = sorted(range(idx, m), key=lambda j: -K[k][j])
        out = 0
        for j in order:
            take = min(box[j], rem)
            out += take * K[k][j]
            rem -= take
            if rem == 0:
                break
        return out if rem == 0 else None

    def rec(idx: int, rem: int, partial: dict[int, int]) -> bool:
        nonlocal nodes
        nodes += 1
        if nodes > max_nodes:
            raise _Budget
        if sum(box[idx:]) < rem:
            return False
        for k in ks:
            br = best_rest(k, idx, rem)
            if br is None or M * comb(n, k) + 2 * (partial[k] + br) < lo[k]:
                return False
        if idx == m - 2:
            # a_{m-2} = rem - x, a_{m-1} = x: b_k = c_k + 2 x (K_last - K_prev)
            xlo, xhi = max(0, rem - box[m - 2]), min(box[m - 1], rem)
            coef = {}
            const = {}
            for k in ks:
                const[k] = M * comb(n, k) + 2 * (partial[k] + rem * K[k][m - 2])
                coef[k] = 2 * (K[k][m - 1] - K[k][m - 2])
                c, a = const[k], coef[k]
                # c + a x >= lo
                if a > 0:
                    xlo = max(xlo, -((c - lo[k]) // a))
                elif a < 0:
                    xhi = min(xhi, (c - lo[k]) // (-a))
                elif c < lo[k]:
                    return False
            if xlo > xhi:
                return False
            for r in range(4):
                if all((const[k] + coef[k] * r - target[k]) % mod == 0 for k in ks):
                    first = xlo + (r - xlo) % 4
                    if first <= xhi:
                        return True
            return False
        for a in range(min(box[idx], rem) + 1):
            nxt = {k: partial[k] + a * K[k][idx] for k in ks}
            if rec(idx + 1, rem - a, nxt):
                return True
        return False

    try:
        return not rec(0, total, {k: 0 for k in ks})
    except _Budget:
        return None


def _caps(n: int, d: int) -> dict[int, int]:
    from codesearch.bounds.terwilliger import constant_weight_cap

    return {i: constant_weight_cap(n, d, i) for i in range(d, n + 1, 2)}


def enumeration_bound(n: int, d: int, top: int, max_nodes: int = MAX_NODES) -> int:
    """Largest size ``M <= top`` not proved impossible (``top`` when none is)."""
    caps = _caps(n, d)
    M = top
    while M > 1 and size_is_impossible(n, d, M, caps, max_nodes) is True:
        M -= 1
    return M


@lru_cache(maxsize=1024)  # deterministic and seconds long: once per process per cell
def distance_enumeration(params: Params) -> BoundResult | None:
    """The integral distance-distribution bound (binary; odd ``d`` through ``A(n+1, d+1)``).

    Starts from the certified Delsarte LP with constant-weight rows (:mod:`.delsarte`);
    None when it does not improve on it, when the cell is not binary, or when the search
    would pass :data:`MAX_NODES` nodes for the first size tried.
    """
    from codesearch.bounds.delsarte import delsarte_lp_plus

    if params.q != 2 or params.d < 3:
        return None
    n, d = (params.n + 1, params.d + 1) if params.d % 2 else (params.n, params.d)
    lp = delsarte_lp_plus(Params(2, n, d))
    if lp is None or not lp.usable or lp.certificate is None:
        return None
    top = lp.value
    if len(range(d, n + 1, 2)) > MAX_DISTANCES or top > 10**4:
        return None  # too many pair counts to list
    caps = _caps(n, d)
    M = top
    while M > 1:
        done = size_is_impossible(n, d, M, caps)
        if done is not True:
            break
        M -= 1
    if M == top:
        return None
    cert = {"kind": "distance-enumeration", "q": 2, "n": params.n, "d": params.d,
            "value": M, "lp": dict(lp.certificate), "max_nodes": MAX_NODES}
    via = "" if (n, d) == (params.n, params.d) else f" via A({n},{d})"
    return BoundResult(params, M, "distance-enumeration", certificate=cert,
                       note=f"no integral distance distribution for sizes {M + 1}..{top}{via}")


def odd_size_excluded(M: int, bound: "Fraction", y_weight: "Fraction") -> bool:
    """True when an odd size ``M`` is ruled out by an LP dual of value ``bound`` whose
    ``sum_k y_k C(n,k)`` is ``y_weight`` (see the module notes)."""
    return M % 2 == 1 and M * M - bound * M + y_weight > 0


def _even_cell_lp(params: Params) -> tuple[int, int, BoundResult] | None:
    """``(n, d, LP result)`` of the even-distance cell bounding ``params`` (odd ``d`` through
    ``A(n+1, d+1)``); None for a non-binary cell, ``d < 3`` or no certified LP."""
    from codesearch.bounds import best_lp_certificate

    if params.q != 2 or params.d < 3:
        return None
    n, d = (params.n + 1, params.d + 1) if params.d % 2 else (params.n, params.d)
    lp = best_lp_certificate(Params(2, n, d))
    return None if lp is None else (n, d, lp)


def odd_size(params: Params) -> BoundResult | None:
    """Delsarte's LP with the odd-size parity cut (binary); None when it gains nothing."""
    from fractions import Fraction

    found = _even_cell_lp(params)
    if found is None:
        return None
    n, d, lp = found
    cert = lp.certificate
    bound = Fraction(cert["bound"])
    y_weight = sum(Fraction(v) * comb(n, k) for k, v in enumerate(cert["y"], start=1))
    top = lp.value
    if not odd_size_excluded(top, bound, y_weight):
        return None
    out = {"kind": "lp-odd-size", "q": 2, "n": params.n, "d": params.d, "value": top - 1,
           "lp": dict(cert)}
    return BoundResult(params, top - 1, "lp-odd-size", certificate=out,
                       note=f"LP gives {top}, odd size {top} excluded by the parity of the "
                       f"transform" + ("" if (n, d) == (params.n, params.d) else f" via A({n},{d})"))


def parity_walk(n: int, top: int, bound: "Fraction", y: list) -> int:
    """Least size reached from ``top`` (the LP's floor) by excluding sizes one at a time:
    odd ones by the odd-size cut, ones that are 2 mod 4 by the cut of the module notes
    (``y``: the LP dual of the Delsarte rows, ``k = 1..n``; ``n`` the even-weight length)."""
    from fractions import Fraction

    ys = [Fraction(v) for v in y]
    y_weight = sum(v * comb(n, k) for k, v in enumerate(ys, start=1))
    z_min = min(sum(v * (comb(n, k) + _kraw(n, k, s)) for k, v in enumerate(ys, start=1))
                for s in range(0, n + 1, 2))
    M = top
    while M > 1:
        if M % 2 == 1:
            excluded = odd_size_excluded(M, bound, y_weight)
        elif M % 4 == 2:
            excluded = M * M - bound * M + 2 * z_min > 0
        else:
            excluded = False
        if not excluded:
            break
        M -= 1
    return M


def size_mod_4(params: Params) -> BoundResult | None:
    """Delsarte's LP with the odd-size and the size-2-mod-4 cuts (binary); None unless a
    size 2 mod 4 is excluded (the odd-size cut alone is :func:`odd_size`)."""
    from fractions import Fraction

    found = _even_cell_lp(params)
    if found is None:
        return None
    n, d, lp = found
    cert = lp.certificate
    top = lp.value
    value = parity_walk(n, top, Fraction(cert["bound"]), cert["y"])
    if not any(M % 4 == 2 for M in range(value + 1, top + 1)):
        return None
    out = {"kind": "lp-size-mod-4", "q": 2, "n": params.n, "d": params.d, "value": value,
           "lp": dict(cert)}
    via = "" if (n, d) == (params.n, params.d) else f" via A({n},{d})"
    return BoundResult(params, value, "lp-size-mod-4", certificate=out,
                       note=f"LP gives {top}; sizes {value + 1}..{top} excluded by the odd-size "
                       f"and size-2-mod-4 cuts{via}")
