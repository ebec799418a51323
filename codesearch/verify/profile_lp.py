"""Checker of ``"profile-lp"`` certificates: Delsarte's LP for distance-4 codes with the
moments of the neighbourhood profiles of all words of the space.

The theorem (proved here because this module is the referee; the producer is
:mod:`codesearch.bounds.profiles`)
--------------------------------------------------------------------------------------
Let ``C`` be a binary code of length ``N``, minimum distance 4 and size ``M``. Puncturing one
coordinate and appending the parity bit gives a code of the same size and distance whose words
all have even weight (MacWilliams-Sloane ch. 2), so assume that. Write ``A_h`` for its average
distance distribution (``A_0 = 1``; ``A_h = 0`` for odd ``h`` and for ``h = 2``). For a word
``x`` of ``F_2^N`` let ``N_s(x) = #{c in C : d(x, c) = s}``; its *profile* is a few of these
numbers:

* ``odd`` family, for the ``2^(N-1)`` words of odd weight: ``(N_1, N_3)``;
* ``even`` family, for the ``2^(N-1)`` words of even weight: ``(N_0, N_2, N_4)``.

**Admissible profiles** (every word's profile lies in the finite set enumerated by
:func:`profiles`). For a word ``x`` put ``S(c) = supp(x + c)``; two codewords differ in
``|S(c) xor S(c')| >= 4`` places.

* Odd words: the sets ``S`` of size 1 and 3 pairwise meet so that ``|S xor S'| >= 4``. Two
  singletons are 2 apart, so ``N_1 <= 1``. Two triples meet in at most one point, so the
  triples form a partial Steiner triple system: each point lies in at most
  ``floor((N-1)/2)`` of them (their other two points are disjoint pairs), hence
  ``N_3 <= J(N) = floor(N floor((N-1)/2) / 3)``. When ``N_1 = 1`` with singleton ``{p}``, a
  triple through ``p`` would be 2 away from it, so the triples live on ``N - 1`` points:
  ``N_3 <= J(N-1)``.
* Even words: ``N_0 <= 1``, and ``N_0 = 1`` forces ``N_2 = 0`` (distance 2 < 4). The pairs
  ``S`` of size 2 are pairwise disjoint, so ``N_2 <= floor(N/2)``. The 4-sets pairwise meet in
  at most 2 points, i.e. each 3-subset lies in at most one of them, and they form a
  constant-weight code: ``N_4 <= A(N, 4, 4)`` (Johnson's bound). A 4-set contains no pair
  ``S`` of size 2 (else ``|Q xor S| = 2``), so the ``N_2 (N - 2)`` triples containing one of
  the (disjoint) pairs lie in no 4-set: ``4 N_4 <= C(N,3) - N_2 (N - 2)``.

**Moments.** Summed over the words of one family,
``sum_x N_s(x) = M C(N, s)`` and ``sum_x N_s(x) N_t(x) = sum_{c, c'} #{x : d(x,c) = s,
d(x,c') = t} = M sum_h A_h p^h_{st}``, where ``p^h_{st} = C(h, a) C(N - h, s - a)``,
``a = (h + s - t) / 2``, is the number of words at distance ``s`` from one word and ``t``
from another at distance ``h`` (the intersection numbers of the Hamming scheme; all such
``x`` lie in the family because the codewords have even weight).

**The bound.** Take multipliers ``y_k >= 0`` (``k = 1..N``), ``z_j >= 0`` on valid inequalities
``sum_h a_jh A_h <= b_j`` (the families of :mod:`codesearch.verify.lp`), ``lambda >= 0`` and any
rational ``mu_m`` on the monomials ``m`` (``N_s`` or ``N_s N_t``) of each family; let
``q_f(P) = sum_m mu_m m(P)`` and ``tau_f = max(0, -min_P q_f(P))`` over the admissible
profiles ``P`` of family ``f``, and for each even ``h >= 4``

    L_h = -sum_k y_k K_k(h) + sum_j z_j a_jh - sum_m mu_m p^h_m.

Delsarte's ``B_k = sum_h A_h K_k(h) >= 0``, the inequalities, the moment identities divided by
``M`` and ``sum_x q_f(profile(x)) >= -tau_f 2^(N-1)`` give

    sum_h A_h L_h <= R = sum_k y_k K_k(0) + sum_j z_j b_j + sum_m mu_m c_m
                         + (2^(N-1) / M) sum_f tau_f,

where ``c_m`` is the moment's constant term (``C(N,s)`` for ``N_s``, ``p^0_{st}`` for
``N_s N_t``). Let ``V`` be a proven upper bound on the size (a nested certificate) and
``U < V``. For ``U + 1 <= M <= V`` the convex ``g(M) = 2^(N-1)/M`` lies below its chord, so
``2^(N-1)/M <= g(U+1) + s (M - 1 - U)`` with ``s = (g(V) - g(U+1)) / (V - U - 1) <= 0``
(``s = 0`` when ``V = U + 1``). With ``tau = sum_f tau_f`` and ``sum_h A_h = M - 1``:

    sum_h A_h (L_h - s tau) <= R0 + tau (g(U+1) - s U),    R0 = the first three sums of R.

With ``u_h`` a proven cap on ``A_h`` (Johnson's constant-weight bound) and ``lambda >= 0``,
``sum_h A_h L'_h >= lambda U - sum_h max(0, lambda - L'_h) u_h`` (``L'_h = L_h - s tau``,
``sum_h A_h >= U``). So a certificate giving ``y, z, mu, lambda`` with

    lambda U - sum_h max(0, lambda - L'_h) u_h  >  R0 + tau (g(U+1) - s U)

excludes every size ``U + 1 .. V``, and the nested certificate every larger one:
``A(N, 4) = A(N-1, 3) <= U``. (``lambda = 0`` is a Farkas certificate: the profile counts
alone do not fit in the space; the caps ``u_h`` absorb whatever the rounding of a
floating-point dual left.)

References
----------
P. Delsarte, "An algebraic approach to the association schemes of coding theory", Philips Res.
Rep. Suppl. 10 (1973) (the inequalities ``B_k >= 0``; intersection numbers of the Hamming scheme).
S. M. Johnson, "A new upper bound for error-correcting codes", IRE Trans. Inform. Theory 8 (1962)
203-207 (counting the words at distance ``e + 1`` from a code, the idea behind the profiles).
B. Mounits, T. Etzion and S. Litsyn, "Improved upper bounds on sizes of codes", IEEE Trans.
Inform. Theory 48 (2002) 880-886 (linear programming with constraints drawn from the words
around the code, for distances 3 and 4).
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes* (1977), ch. 2
(even-weight extension), ch. 17 (Johnson's bound for constant-weight codes).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from typing import Any, Callable, Mapping

from codesearch.errors import InputError
from codesearch.verify.exact import rational_field
from codesearch.verify.lp import _extra_row, _kraw_columns

__all__ = ["FAMILIES", "MAX_LENGTH", "ProfileProgram", "profile_program", "profiles",
           "intersection_number", "monomial_key", "check_profile_lp"]

#: the table's entry point, passed in by :mod:`codesearch.verify.certificates`
Checker = Callable[[Mapping[str, Any]], tuple[bool, "int | None", str]]

#: Family name -> the distances ``s`` whose counts ``N_s`` form the profile.
FAMILIES: dict[str, tuple[int, ...]] = {"odd": (1, 3), "even": (0, 2, 4)}
#: Longest length accepted (the even family has about ``N/2 * A(N,4,4)`` profiles).
MAX_LENGTH = 48


def _johnson3(m: int) -> int:
    """Most triples on ``m`` points pairwise meeting in at most one point (each point in at
    most ``floor((m-1)/2)`` of them)."""
    return m * ((m - 1) // 2) // 3 if m >= 3 else 0


def _cap(N: int, h: int) -> int:
    """Proven cap on ``A_h`` (and on ``N_h`` around any word): Johnson's constant-weight bound
    for distance 4, never above ``C(N, h)`` (rebuilt by :mod:`codesearch.verify.lp`)."""
    return _extra_row("constant-weight", h, N, 4)[1]


@lru_cache(maxsize=16)
def profiles(N: int, family: str) -> tuple[tuple[int, ...], ...]:
    """Every admissible profile of the family (see the module notes)."""
    if family == "odd":
        return tuple([(1, t) for t in range(_johnson3(N - 1) + 1)]
                     + [(0, t) for t in range(_johnson3(N) + 1)])
    if family == "even":
        cw4 = _cap(N, 4)
        out = [(1, 0, t) for t in range(cw4 + 1)]
        for f in range(N // 2 + 1):
            top = min(cw4, (math.comb(N, 3) - f * (N - 2)) // 4)
            out.extend((0, f, t) for t in range(top + 1))
        return tuple(out)
    raise InputError(f"certificate: unknown profile family {family!r}")


def intersection_number(N: int, h: int, s: int, t: int) -> int:
    """``p^h_{st}``: words at distance ``s`` from ``0`` and ``t`` from a fixed word of weight ``h``."""
    if (h + s - t) % 2:
        return 0
    a = (h + s - t) // 2  # positions of x inside the support of the weight-h word
    if not (0 <= a <= h and 0 <= s - a <= N - h):
        return 0
    return math.comb(h, a) * math.comb(N - h, s - a)


def monomial_key(mono: tuple[int, ...]) -> str:
    """``"s"`` for ``N_s``, ``"s,t"`` for ``N_s N_t`` (the certificate's keys)."""
    return ",".join(str(s) for s in mono)


@dataclass(frozen=True)
class ProfileProgram:
    """Exact data of the program for length ``N`` (distances ``4, 6, .., N``).

    ``monomials[f]``: the monomials of family ``f`` as index tuples into ``FAMILIES[f]``;
    ``constant[f][j]`` and ``coeff[f][j][h]``: the moment identity
    ``sum_x m(profile(x)) / M = constant + sum_h coeff[h] A_h``.
    """

    N: int
    distances: tuple[int, ...]
    families: tuple[str, ...]
    monomials: dict
    constant: dict
    coeff: dict


@lru_cache(maxsize=16)
def profile_program(N: int, families: tuple[str, ...] = ("odd", "even")) -> ProfileProgram:
    """The moment identities of each family for even codes of length ``N``, distance 4."""
    dists = tuple(range(4, N + 1, 2))
    monos, const, coeff = {}, {}, {}
    for f in families:
        coords = FAMILIES[f]
        ms = [(a,) for a in range(len(coords))]
        ms += [(a, b) for a in range(len(coords)) for b in range(a, len(coords))]
        monos[f] = tuple(ms)
        const[f], coeff[f] = [], []
        for m in ms:
            if len(m) == 1:
                const[f].append(math.comb(N, coords[m[0]]))
                coeff[f].append({h: 0 for h in dists})
            else:
                s, t = coords[m[0]], coords[m[1]]
                const[f].append(intersection_number(N, 0, s, t))
                coeff[f].append({h: intersection_number(N, h, s, t) for h in dists})
    return ProfileProgram(N, dists, tuple(families), monos, const, coeff)


def check_profile_lp(cert: Mapping[str, Any], check_certificate: Checker
                     ) -> tuple[bool, int | None, str]:
    """Re-check a ``profile-lp`` certificate (see the module notes for the theorem); the
    nested certificate ``top`` goes through the table's entry point ``check_certificate``."""
    q, n, d, U = (cert[k] for k in ("q", "n", "d", "value"))
    for name, v in (("q", q), ("n", n), ("d", d), ("value", U)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise InputError(f"certificate: {name} must be an integer")
    if q != 2 or d not in (3, 4) or U < 1:
        raise InputError(f"certificate: profile-lp is for binary d = 3, 4, got q={q}, d={d}")
    N = n + 1 if d == 3 else n
    if not 8 <= N <= MAX_LENGTH:
        raise InputError(f"certificate: profile-lp length {N} outside 8..{MAX_LENGTH}")
    ys = cert["y"]
    if not isinstance(ys, list) or len(ys) != N:
        raise InputError(f"certificate: y must be a list of {N} rationals")
    y = [rational_field(v, f"y[{k + 1}]") for k, v in enumerate(ys)]
    if any(v < 0 for v in y):
        return False, None, "a Delsarte multiplier is negative"
    rows = []
    for j, e in enumerate(cert.get("extra", [])):
        if not isinstance(e, Mapping) or not {"family", "index", "z"} <= set(e):
            raise InputError(f"certificate: extra[{j}] needs family, index, z")
        if isinstance(e["index"], bool) or not isinstance(e["index"], int):
            raise InputError(f"certificate: extra[{j}].index must be an integer")
        coeffs, rhs = _extra_row(str(e["family"]), e["index"], N, 4)
        z = rational_field(e["z"], f"extra[{j}].z")
        if z < 0:
            return False, None, f"extra[{j}]: negative multiplier"
        rows.append((coeffs, rhs, z))
    fams_in = cert["profiles"]
    if not isinstance(fams_in, list):
        raise InputError("certificate: profiles must be a list")
    names = tuple(str(f.get("family")) if isinstance(f, Mapping) else "" for f in fams_in)
    if len(set(names)) != len(names) or not set(names) <= set(FAMILIES):
        raise InputError(f"certificate: profile families must be distinct among {list(FAMILIES)}")
    prog = profile_program(N, names)
    mus: dict[str, list[Fraction]] = {}
    for f, entry in zip(names, fams_in):
        given = entry.get("mu")
        if not isinstance(given, Mapping):
            raise InputError(f"certificate: profiles[{f}].mu must be an object")
        keys = [monomial_key(tuple(FAMILIES[f][a] for a in m)) for m in prog.monomials[f]]
        unknown = set(given) - set(keys)
        if unknown:
            raise InputError(f"certificate: profiles[{f}]: unknown monomials {sorted(unknown)}")
        mus[f] = [rational_field(given[k], f"profiles[{f}].mu[{k}]") if k in given
                  else Fraction(0) for k in keys]

    lam = rational_field(cert["lambda"], "lambda")
    if lam < 0:
        return False, None, "lambda is negative"
    top = cert["top"]
    if not isinstance(top, Mapping) or (top.get("q"), top.get("n"), top.get("d")) not in (
            (2, N, 4), (2, N - 1, 3)):
        raise InputError(f"certificate: top must be a certificate for A({N},4) or A({N - 1},3)")
    ok, V, why = check_certificate(top)
    if not ok or V is None:
        return False, None, f"nested certificate: {why}"
    if V <= U:
        return True, U, f"A({n},{d}) <= {V} <= {U} by the nested certificate"

    def g(m: int) -> Fraction:
        return Fraction(2 ** (N - 1), m)

    slope = (g(V) - g(U + 1)) / (V - U - 1) if V > U + 1 else Fraction(0)
    kraw = _kraw_columns(2, N)  # kraw[x][k] = K_k(x)
    right = sum(y[k - 1] * kraw[0][k] for k in range(1, N + 1))
    right += sum(z * rhs for (_, rhs, z) in rows)
    tau = Fraction(0)
    for f in names:
        right += sum(mu * c for mu, c in zip(mus[f], prog.constant[f]))
        # tau_f = max(0, -min_P q_f(P)), in integers over a common denominator
        den = math.lcm(*(mu.denominator for mu in mus[f]))
        ints = [mu.numerator * (den // mu.denominator) for mu in mus[f]]
        low = min(sum(c * math.prod(P[a] for a in m) for c, m in zip(ints, prog.monomials[f]))
                  for P in profiles(N, f))
        if low < 0:
            tau += Fraction(-low, den)
    right += tau * (g(U + 1) - slope * U)
    left = lam * U
    for h in prog.distances:
        L = -sum(y[k - 1] * kraw[h][k] for k in range(1, N + 1) if y[k - 1])
        L += sum(z * coeffs.get(h, 0) for (coeffs, _, z) in rows)
        for f in names:
            L -= sum(mu * cf[h] for mu, cf in zip(mus[f], prog.coeff[f]) if mu)
        L -= slope * tau
        if L < lam:
            left -= (lam - L) * _cap(N, h)
    if not left > right:
        return False, None, (f"the multipliers give {float(left):.6g} <= {float(right):.6g}: "
                             f"sizes {U + 1}..{V} are not excluded")
    return True, U, (f"A({n},{d}) <= {U}: profile moments at length {N} exclude sizes "
                     f"{U + 1}..{V}, the nested certificate the rest")
