"""The registry of code families: what each serves, at what size, and how to build it.

Each :class:`Family` lists its instances for an alphabet and a largest length *without
building anything* (:attr:`Family.instances`), checks a user's parameters with a one-line
message naming the valid range (:attr:`Family.describe`), and builds an instance from its
definition (:attr:`Family.build`). :func:`build_family` builds, re-checks the code with
:mod:`codesearch.verify` at the distance the instance promises, and checks the size.

An :class:`Instance` records ``(q, n, d, size)`` with ``d`` a proven lower bound on the minimum
distance (designed distance, theorem, or a value the tests re-check by building) and ``size``
exact; ``balanced`` counts leading coordinates on which the words are equidistributed (all q^b
patterns equally often), so that shortening on them divides the size by q exactly.
"""

from __future__ import annotations

from dataclasses import dataclass, field as dc_field
from math import comb, isqrt
from typing import Any, Callable, Iterator

from codesearch.errors import ParameterError
from codesearch.gf import prime_power
from codesearch.model import Code, LinearCode

__all__ = ["Instance", "Family", "FAMILIES", "build_family", "family_instances"]


@dataclass(frozen=True)
class Instance:
    """One code of a family, described without building it."""

    family: str
    args: tuple[tuple[str, Any], ...]
    q: int
    n: int
    d: int
    size: int
    label: str
    linear: bool
    k: int | None = None
    balanced: int = 0

    @property
    def kwargs(self) -> dict[str, Any]:
        return dict(self.args)


@dataclass(frozen=True)
class Family:
    """A family of codes.

    Attributes
    ----------
    name : str
        Canonical name (the CLI's ``build FAMILY``).
    summary : str
        One line for listings.
    parameters : tuple of str
        Names of the build parameters (integers unless said otherwise in ``summary``).
    describe : callable
        ``describe(**params) -> Instance``; raises ParameterError naming the valid range.
    build : callable
        ``build(**params) -> Code | LinearCode``, from the definition (unverified).
    instances : callable
        ``instances(q, nmax) -> iterator of Instance`` (cheap).
    """

    name: str
    summary: str
    parameters: tuple[str, ...]
    describe: Callable[..., Instance]
    build: Callable[..., Code | LinearCode]
    instances: Callable[[int, int], Iterator[Instance]] = dc_field(default=lambda q, n: iter(()))


def _inst(family: str, args: dict, q: int, n: int, d: int, size: int, label: str,
          linear: bool, k: int | None = None, balanced: int | None = None) -> Instance:
    if balanced is None:
        balanced = k if linear and k is not None else 0
    return Instance(family, tuple(sorted(args.items())), q, n, d, size, label, linear, k,
                    balanced)


def _lin(family: str, args: dict, q: int, n: int, k: int, d: int, label: str) -> Instance:
    return _inst(family, args, q, n, d, q**k, label, True, k)


def _need(cond: bool, message: str) -> None:
    if not cond:
        raise ParameterError(message)


def _fq(q: int) -> str:
    return "" if q == 2 else f" over GF({q})"


# ------------------------------------------------------------------------------ trivial
def _rep_describe(q: int, n: int) -> Instance:
    _need(prime_power(q) is not None and 1 <= n, "repetition codes need a prime power q, n >= 1")
    return _lin("repetition", {"q": q, "n": n}, q, n, 1, n, f"repetition({n}){_fq(q)}")


def _rep_build(q: int, n: int) -> LinearCode:
    import numpy as np

    return LinearCode(np.ones((1, n), dtype=np.uint8), q)


def _par_describe(q: int, n: int) -> Instance:
    _need(prime_power(q) is not None and n >= 2, "parity-check codes need a prime power q, n >= 2")
    return _lin("parity-check", {"q": q, "n": n}, q, n, n - 1, 2, f"parity-check({n}){_fq(q)}")


def _par_build(q: int, n: int) -> LinearCode:
    import numpy as np

    from codesearch.gf import field

    g = np.zeros((n - 1, n), dtype=np.uint8)
    g[:, : n - 1] = np.eye(n - 1, dtype=np.uint8)
    g[:, n - 1] = field(q).neg[1]
    return LinearCode(g, q)


def _full_describe(q: int, n: int) -> Instance:
    _need(prime_power(q) is not None and n >= 1, "the full space needs a prime power q, n >= 1")
    return _lin("full-space", {"q": q, "n": n}, q, n, n, 1, f"full space({n}){_fq(q)}")


def _full_build(q: int, n: int) -> LinearCode:
    import numpy as np

    return LinearCode(np.eye(n, dtype=np.uint8), q)


def _each_n(describe: Callable[..., Instance], lo: int) -> Callable[[int, int], Iterator[Instance]]:
    def gen(q: int, nmax: int) -> Iterator[Instance]:
        if prime_power(q) is None:
            return
        for n in range(lo, nmax + 1):
            yield describe(q=q, n=n)
    return gen


# ------------------------------------------------------------------------------ Hamming
def _ham_describe(q: int, m: int) -> Instance:
    _need(prime_power(q) is not None and q <= 64 and m >= 2 and (q**m - 1) // (q - 1) <= 4096,
          "Hamming codes need a prime power q <= 64, m >= 2, length (q^m-1)/(q-1) <= 4096")
    n = (q**m - 1) // (q - 1)
    return _lin("hamming", {"q": q, "m": m}, q, n, n - m, 3, f"Hamming({n},{n - m}){_fq(q)}")


def _ham_instances(q: int, nmax: int) -> Iterator[Instance]:
    if prime_power(q) is None or q > 64:
        return
    m = 2
    while (q**m - 1) // (q - 1) <= nmax:
        yield _ham_describe(q, m)
        m += 1


# ------------------------------------------------------------------------------ Golay
def _golay_describe(q: int, extended: int = 0) -> Instance:
    _need(q in (2, 3) and extended in (0, 1), "Golay codes: q = 2 or 3, extended = 0 or 1")
    n, k, d = ((23, 12, 7) if q == 2 else (11, 6, 5))
    name = "Golay" if q == 2 else "ternary Golay"
    if extended:
        return _lin("golay", {"q": q, "extended": 1}, q, n + 1, k, d + 1,
                    f"extended {name}({n + 1},{k})")
    return _lin("golay", {"q": q, "extended": 0}, q, n, k, d, f"{name}({n},{k})")


def _golay_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q in (2, 3):
        for e in (0, 1):
            inst = _golay_describe(q, e)
            if inst.n <= nmax:
                yield inst


# ------------------------------------------------------------------------------ RM
def _rm_describe(r: int, m: int) -> Instance:
    _need(1 <= m <= 10 and 0 <= r <= m, "RM(r, m) needs 1 <= m <= 10 and 0 <= r <= m")
    k = sum(comb(m, i) for i in range(r + 1))
    return _lin("reed-muller", {"r": r, "m": m}, 2, 2**m, k, 2 ** (m - r), f"RM({r},{m})")


def _rm_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q != 2:
        return
    m = 1
    while 2**m <= nmax:
        for r in range(m + 1):
            yield _rm_describe(r, m)
        m += 1


# ------------------------------------------------------------------------------ BCH
def _bch_describe(q: int, m: int, delta: int, extended: int = 0) -> Instance:
    from codesearch.constructions.algebraic import bch_parameters

    _need(prime_power(q) is not None and q <= 64 and m >= 2 and q**m <= 4096
          and 2 <= delta <= q**m - 1 and extended in (0, 1),
          "BCH codes need a prime power q <= 64, m >= 2, q^m <= 4096, "
          "2 <= delta <= q^m - 1, extended = 0 or 1")
    n, k, d = bch_parameters(q, m, delta, bool(extended))
    base = f"BCH({q**m - 1},{k}){_fq(q)}"
    return _lin("bch", {"q": q, "m": m, "delta": delta, "extended": extended}, q, n, k, d,
                ("extended " if extended else "") + base)


def _bch_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.algebraic import bch_roots

    if prime_power(q) is None or q > 64:
        return
    m = 2
    while q**m - 1 <= nmax and q**m <= 4096:
        seen = set()
        for delta in range(2, q**m - 1):
            roots, bose = bch_roots(q, m, delta)
            key = tuple(roots)
            if key in seen or len(roots) >= q**m - 1:
                continue
            seen.add(key)
            for ext in (0, 1):
                inst = _bch_describe(q, m, bose, ext)
                if inst.n <= nmax and inst.k:
                    yield inst
        m += 1


# ------------------------------------------------------------------------------ QR
#: True minimum distances (QR code, extended QR code), computed by building each code and
#: re-checked by tests/test_constructions.py; lengths with no entry use the square-root bound.
QR_DISTANCES = {
    (2, 7): (3, 4), (2, 17): (5, 6), (2, 23): (7, 8), (2, 31): (7, 8),
    (3, 11): (5, 6), (3, 13): (5, 6),
    (4, 3): (2, 3), (4, 5): (3, 4), (4, 7): (3, 4), (4, 11): (5, 6), (4, 13): (5, 6),
    (5, 11): (5, 6), (5, 31): (9, 10),
}


def _qr_ok(q: int, l: int) -> bool:
    from codesearch.constructions.algebraic import _order_mod, _residues

    if l < 3 or any(l % f == 0 for f in range(2, isqrt(l) + 1)) or q % l == 0:
        return False
    return (q % l) in _residues(l) and q ** _order_mod(q, l) <= 4096


def _qr_describe(q: int, l: int, extended: int = 0) -> Instance:
    _need(prime_power(q) is not None and q <= 64 and extended in (0, 1) and _qr_ok(q, l),
          "QR codes need a prime length l with q a nonzero square mod l, the splitting field "
          "GF(q^ord) of order <= 4096, and extended = 0 or 1")
    k = (l + 1) // 2
    d0 = isqrt(l - 1) + 1  # square-root bound d^2 >= l
    d = QR_DISTANCES.get((q, l), (d0, d0))[extended]
    n = l + extended
    return _lin("qr", {"q": q, "l": l, "extended": extended}, q, n, k, d,
                ("extended " if extended else "") + f"QR({l}){_fq(q)}")


def _qr_instances(q: int, nmax: int) -> Iterator[Instance]:
    if prime_power(q) is None or q > 64:
        return
    for l in range(3, nmax + 1):
        if _qr_ok(q, l):
            for e in (0, 1):
                if l + e <= nmax:
                    yield _qr_describe(q, l, e)


# ------------------------------------------------------------------------------ MDS
def _mds_describe(q: int, n: int, k: int) -> Instance:
    hyper = q % 2 == 0 and q >= 4 and n == q + 2 and k in (3, q - 1)
    _need(prime_power(q) is not None and q <= 64 and 1 <= k <= n and (n <= q + 1 or hyper),
          f"MDS codes need a prime power q <= 64 and 1 <= k <= n <= q + 1 "
          f"(or n = q + 2, k in {{3, q - 1}} for even q)")
    if hyper:
        label = f"hyperoval code({n},{k}) over GF({q})"
    else:
        label = f"{'extended ' * (n - q + 1) if n >= q else ''}RS({n},{k}) over GF({q})"
        label = f"RS({n},{k}) over GF({q})"
    return _lin("mds", {"q": q, "n": n, "k": k}, q, n, k, n - k + 1, label)


def _mds_instances(q: int, nmax: int) -> Iterator[Instance]:
    if prime_power(q) is None or q > 64 or q == 2:
        return
    for n in range(2, min(q + 1, nmax) + 1):
        for k in range(1, n + 1):
            yield _mds_describe(q, n, k)
    if q % 2 == 0 and q + 2 <= nmax:
        for k in sorted({3, q - 1}):
            yield _mds_describe(q, q + 2, k)


# ------------------------------------------------------------------------------ cyclic (user)
def _cyc_describe(q: int, n: int, poly: str) -> Instance:
    from codesearch.constructions.algebraic import parse_polynomial

    _need(prime_power(q) is not None and q <= 64 and n >= 1,
          "cyclic codes need a prime power q <= 64 and n >= 1")
    coeffs = parse_polynomial(str(poly), q)
    while coeffs and coeffs[-1] == 0:
        coeffs.pop()
    _need(0 <= len(coeffs) - 1 < n, f"the generator polynomial needs degree 0..{n - 1}")
    k = n - (len(coeffs) - 1)
    # the minimum distance is not known before building: the build reports it
    return _lin("cyclic", {"q": q, "n": n, "poly": str(poly)}, q, n, k, 1,
                f"cyclic({n},{k}) g={poly}{_fq(q)}")


def _cyc_build(q: int, n: int, poly: str) -> LinearCode:
    from codesearch.constructions.algebraic import cyclic_code, parse_polynomial

    return cyclic_code(q, n, parse_polynomial(str(poly), q))


# ------------------------------------------------------------------------------ Hadamard
_VARIANT_PARAMS = {"A": (-1, 1, 2), "A'": (-2, 0.5, 2), "B": (-1, 2, 2), "C": (0, 2, 2)}


def _had_describe(order: int, variant: str) -> Instance:
    from codesearch.constructions.hadamard import hadamard_recipe

    _need(variant in _VARIANT_PARAMS, "Hadamard code variants: A, A', B, C")
    _need(order >= 4 and hadamard_recipe(order) is not None,
          "Hadamard codes need an order 4t this library builds (4..256 except 92, 116, ...)")
    n = order + _VARIANT_PARAMS[variant][0]
    size = int(order * _VARIANT_PARAMS[variant][1])
    d = order // 2 - (1 if variant == "B" else 0)
    return _inst("hadamard", {"order": order, "variant": variant}, 2, n, d, size,
                 f"Hadamard {variant}({order})", False)


def _had_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.hadamard import hadamard_recipe

    if q != 2:
        return
    for order in range(4, nmax + 3, 4):
        if hadamard_recipe(order) is None:
            continue
        for v in _VARIANT_PARAMS:
            inst = _had_describe(order, v)
            if inst.n <= nmax:
                yield inst


def _lev_describe(n: int, d: int) -> Instance:
    from codesearch.constructions.hadamard import hadamard_recipe, levenshtein_orders, plotkin_size

    _need(1 <= d <= n and (2 * d > n or (2 * d == n and d % 2 == 0)),
          f"Levenshtein codes need 1 <= d <= n < 2d (or n = 2d, d even); got n={n}, d={d}")
    orders = levenshtein_orders(n, d)
    missing = [o for o in orders if hadamard_recipe(o) is None]
    _need(not missing, f"Levenshtein's code for ({n},{d}) needs Hadamard matrices of orders "
                       f"{orders}; {missing} are not built here")
    label = "Levenshtein from Hadamard " + " and ".join(map(str, orders))
    return _inst("levenshtein", {"n": n, "d": d}, 2, n, d, plotkin_size(n, d), label, False)


def _lev_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q != 2:
        return
    for n in range(1, nmax + 1):
        for d in range(1, n + 1):
            if 2 * d > n or (2 * d == n and d % 2 == 0):
                try:
                    yield _lev_describe(n, d)
                except ParameterError:
                    pass


def _conf_describe(q: int) -> Instance:
    _need(q >= 5 and q % 4 == 1 and prime_power(q) is not None and q <= 4096,
          "conference-matrix codes need a prime power q = 1 (mod 4), 5 <= q <= 4096")
    return _inst("conference", {"q": q}, 2, q, (q - 1) // 2, 2 * q + 2,
                 f"conference-matrix code({q})", False)


def _conf_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q != 2:
        return
    for p in range(5, nmax + 1, 4):
        if prime_power(p):
            yield _conf_describe(p)


# ------------------------------------------------------------------------------ Z4
def _z4_describe(kind: str) -> Callable[..., Instance]:
    def describe(m: int = 3) -> Instance:
        from codesearch.constructions import z4

        _need(m >= 3 and m % 2 == 1 and m <= 11,
              f"{kind} codes here come from Z4 codes of odd degree m, 3 <= m <= 11")
        n, size, d = (z4.kerdock_parameters(m) if kind == "kerdock"
                      else z4.preparata_parameters(m))
        rank = m + 1 if kind == "kerdock" else 2**m - m - 1
        label = (f"{kind.capitalize()}({n})" if m > 3 else "Nordstrom-Robinson")
        return _inst(kind, {"m": m}, 2, n, d, size, label, False, balanced=2 * rank - 1)
    return describe


def _nr_describe() -> Instance:
    inst = _z4_describe("kerdock")(3)
    return Instance("nordstrom-robinson", (), 2, inst.n, inst.d, inst.size, inst.label, False,
                    None, inst.balanced)


def _nr_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q == 2 and nmax >= 16:
        yield _nr_describe()


def _z4_instances(kind: str) -> Callable[[int, int], Iterator[Instance]]:
    def gen(q: int, nmax: int) -> Iterator[Instance]:
        if q != 2:
            return
        m = 5  # m = 3 is the Nordstrom-Robinson code, listed under its own name
        while 2 ** (m + 1) <= nmax:
            yield _z4_describe(kind)(m)
            m += 2
    return gen


# ------------------------------------------------------------------------------ partition
def _part_describe(a: int, b: int, kind_a: str = "syndrome",
                   kind_b: str = "syndrome") -> Instance:
    from codesearch.constructions.partition import MAX_SIDE, PARTITION_KINDS, glued_size

    _need(2 <= a <= MAX_SIDE and 2 <= b <= MAX_SIDE and kind_a in PARTITION_KINDS
          and kind_b in PARTITION_KINDS,
          f"glued partitions need sides of length 2..{MAX_SIDE} and kinds "
          f"{', '.join(PARTITION_KINDS)}")
    return _inst("partition", {"a": a, "b": b, "kind_a": kind_a, "kind_b": kind_b}, 2, a + b,
                 4, glued_size(a, b, kind_a, kind_b),
                 f"glued partitions {a}+{b} ({kind_a}/{kind_b})", False)


def _part_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.partition import MAX_SIDE, PARTITION_KINDS

    if q != 2:
        return
    # beyond n = 24 the glued codes (2^19 words and more) only tie shortened Hamming codes
    for n in range(8, min(nmax, 24) + 1):
        best = None
        for a in range(4, n // 2 + 1):
            if n - a > MAX_SIDE:
                continue
            for ka in PARTITION_KINDS:
                for kb in PARTITION_KINDS:
                    inst = _part_describe(a, n - a, ka, kb)
                    if best is None or inst.size > best.size:
                        best = inst
        if best is not None:
            yield best


# ------------------------------------------------------------------------------ sporadic
def _julin_describe() -> Instance:
    # balanced on coordinates 0, 1 (a pair of the partition): see sporadic.py
    return _inst("julin", {}, 2, 12, 4, 144, "Julin(12,144,4)", False, balanced=2)


def _nrtail_describe(a: int) -> Instance:
    _need(isinstance(a, int) and 1 <= a <= 4, "the Nordstrom-Robinson tail code needs 1 <= a <= 4")
    return _inst("nr-tails", {"a": a}, 2, 16 + a, 6, 256 * 2 ** (a - 1),
                 f"Nordstrom-Robinson translates with {a}-bit tails", False)


def _nrtail_instances(q: int, nmax: int) -> Iterator[Instance]:
    if q == 2:
        for a in range(1, min(4, nmax - 16) + 1):
            yield _nrtail_describe(a)


def _orbit_describe(key: str) -> Instance:
    from codesearch.constructions.sporadic import ORBITS

    _need(key in ORBITS, f"orbit codes: key one of {', '.join(ORBITS)}")
    r = ORBITS[key]
    return _inst("orbit", {"key": key}, r.q, r.n, r.d, r.size, r.label, False,
                 balanced=r.balanced)


def _orbit_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.sporadic import ORBITS

    for key, r in ORBITS.items():
        if r.q == q and r.n <= nmax:
            yield _orbit_describe(key)


def _single(describe: Callable[[], Instance]) -> Callable[[int, int], Iterator[Instance]]:
    def gen(q: int, nmax: int) -> Iterator[Instance]:
        inst = describe()
        if q == inst.q and inst.n <= nmax:
            yield inst
    return gen


# ------------------------------------------------------------------------------ searched
def _searched_describe(key: str) -> Instance:
    from codesearch.constructions.searched import RECORDS

    _need(key in RECORDS, f"searched codes: key one of {', '.join(RECORDS)}")
    rec = RECORDS[key]
    return _lin("searched", {"key": key}, 2, rec.n, rec.k, rec.d, rec.label)


def _searched_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.searched import RECORDS

    if q != 2:
        return
    for key, rec in RECORDS.items():
        if rec.n <= nmax:
            yield _searched_describe(key)


# ------------------------------------------------------------------------------ coset unions
def _cosets_describe(key: str) -> Instance:
    from codesearch.constructions.cosets import RECORDS, leading_balance

    _need(key in RECORDS, f"coset unions: key one of {', '.join(RECORDS) or '(none recorded)'}")
    rec = RECORDS[key]
    return _inst("coset-union", {"key": key}, 2, rec.n, rec.d, rec.size, rec.label, False,
                 balanced=leading_balance(rec.generator))


def _cosets_instances(q: int, nmax: int) -> Iterator[Instance]:
    from codesearch.constructions.cosets import RECORDS

    if q != 2:
        return
    for key, rec in RECORDS.items():
        if rec.n <= nmax:
            yield _cosets_describe(key)


# ------------------------------------------------------------------------------ registry
def _builders() -> dict[str, Callable[..., Code | LinearCode]]:
    from codesearch.constructions import algebraic as al
    from codesearch.constructions import cosets as cs
    from codesearch.constructions import hadamard as hd
    from codesearch.constructions import partition as pt
    from codesearch.constructions import searched as sr
    from codesearch.constructions import sporadic as sp
    from codesearch.constructions import z4

    return {
        "hamming": lambda q, m: al.hamming_code(q, m),
        "golay": lambda q, extended=0: al.golay_code(q, bool(extended)),
        "reed-muller": lambda r, m: al.reed_muller_code(r, m),
        "bch": lambda q, m, delta, extended=0: al.bch_code(q, m, delta, bool(extended)),
        "qr": lambda q, l, extended=0: al.qr_code(q, l, bool(extended)),
        "mds": lambda q, n, k: al.mds_code(q, n, k),
        "hadamard": lambda order, variant: hd.hadamard_code(order, variant),
        "levenshtein": lambda n, d: hd.levenshtein_code(n, d),
        "conference": lambda q: hd.conference_code(q),
        "nordstrom-robinson": lambda: z4.nordstrom_robinson_code(),
        "kerdock": lambda m=3: z4.kerdock_code(m),
        "preparata": lambda m=3: z4.preparata_code(m),
        "partition": lambda a, b, kind_a="syndrome", kind_b="syndrome":
            pt.glued_code(a, b, kind_a, kind_b),
        "julin": lambda: sp.julin_code(),
        "orbit": lambda key: sp.orbit_code(key),
        "nr-tails": lambda a: sp.nr_tail_code(a),
        "searched": lambda key: sr.searched_code(key),
        "coset-union": lambda key: cs.coset_union_from_record(key),
    }


def _lazy(name: str) -> Callable[..., Code | LinearCode]:
    def build(**kw: Any) -> Code | LinearCode:
        return _builders()[name](**kw)
    return build


#: name -> Family. One line per family; the lookup engine reads only this dict.
FAMILIES: dict[str, Family] = {f.name: f for f in [
    Family("repetition", "repetition code [n, 1, n]", ("q", "n"), _rep_describe, _rep_build,
           _each_n(_rep_describe, 1)),
    Family("parity-check", "single parity-check code [n, n-1, 2]", ("q", "n"), _par_describe,
           _par_build, _each_n(_par_describe, 2)),
    Family("full-space", "all q^n words [n, n, 1]", ("q", "n"), _full_describe, _full_build,
           _each_n(_full_describe, 1)),
    Family("hamming", "q-ary Hamming code [(q^m-1)/(q-1), n-m, 3]", ("q", "m"), _ham_describe,
           _lazy("hamming"), _ham_instances),
    Family("golay", "binary [23,12,7] / ternary [11,6,5] Golay code, extended = 0 or 1",
           ("q", "extended"), _golay_describe, _lazy("golay"), _golay_instances),
    Family("reed-muller", "Reed-Muller code RM(r, m) [2^m, sum C(m,i), 2^(m-r)]", ("r", "m"),
           _rm_describe, _lazy("reed-muller"), _rm_instances),
    Family("bch", "narrow-sense primitive BCH code of length q^m-1, designed distance delta",
           ("q", "m", "delta", "extended"), _bch_describe, _lazy("bch"), _bch_instances),
    Family("qr", "quadratic-residue code of prime length l", ("q", "l", "extended"),
           _qr_describe, _lazy("qr"), _qr_instances),
    Family("mds", "Reed-Solomon / MDS code [n, k, n-k+1] over GF(q)", ("q", "n", "k"),
           _mds_describe, _lazy("mds"), _mds_instances),
    Family("cyclic", "code generated by a polynomial (poly: coefficients low first, e.g. 1,1,0,1)",
           ("q", "n", "poly"), _cyc_describe, _cyc_build),
    Family("hadamard", "Hadamard-matrix code, variant A (N-1,N,N/2), A' (N-2,N/2,N/2), "
           "B (N-1,2N,N/2-1), C (N,2N,N/2)", ("order", "variant"), _had_describe,
           _lazy("hadamard"), _had_instances),
    Family("levenshtein", "Levenshtein's code meeting the Plotkin bound, 2d > n", ("n", "d"),
           _lev_describe, _lazy("levenshtein"), _lev_instances),
    Family("conference", "conference-matrix code (q, 2q+2, (q-1)/2), q = 1 mod 4", ("q",),
           _conf_describe, _lazy("conference"), _conf_instances),
    Family("nordstrom-robinson", "the Nordstrom-Robinson code (16, 256, 6)", (), _nr_describe,
           _lazy("nordstrom-robinson"), _nr_instances),
    Family("kerdock", "Kerdock code from the Z4 code of odd degree m: (2^(m+1), 4^(m+1), ...)",
           ("m",), _z4_describe("kerdock"), _lazy("kerdock"), _z4_instances("kerdock")),
    Family("preparata", "Preparata-like code from the Z4 code of odd degree m: distance 6",
           ("m",), _z4_describe("preparata"), _lazy("preparata"), _z4_instances("preparata")),
    Family("partition", "distance-4 code glued from partitions of even-weight words "
           "(kind_a, kind_b: syndrome or weight)", ("a", "b", "kind_a", "kind_b"),
           _part_describe, _lazy("partition"), _part_instances),
    Family("julin", "Julin's (12,144,4) code: hexads of S(5,6,12), six pairs, their complements",
           (), _julin_describe, _lazy("julin"), _single(_julin_describe)),
    Family("orbit", "union of recorded orbits under a coordinate permutation (key: the "
           "record)", ("key",), _orbit_describe,
           _lazy("orbit"), _orbit_instances),
    Family("nr-tails", "Construction X on the translates of the Nordstrom-Robinson code: "
           "(16+a, 256*2^(a-1), 6), a = 1..4", ("a",), _nrtail_describe, _lazy("nr-tails"),
           _nrtail_instances),
    Family("searched", "binary linear code found by a recorded seeded search (key: the record)",
           ("key",), _searched_describe, _lazy("searched"), _searched_instances),
    Family("coset-union", "binary union of cosets of a linear code found by a recorded seeded "
           "coset-union search (key: the record)", ("key",), _cosets_describe,
           _lazy("coset-union"), _cosets_instances),
]}


def family_instances(q: int, nmax: int) -> list[Instance]:
    """Every registered family's instances for alphabet q and lengths <= nmax."""
    out: list[Instance] = []
    for fam in FAMILIES.values():
        out.extend(fam.instances(q, nmax))
    return out


def build_family(name: str, **params: Any) -> "Built":  # noqa: F821
    """Build a family code from its definition and verify it.

    Returns
    -------
    codesearch.constructions.operations.Built
        The code, its verified distance and its label. For ``cyclic`` the distance is the
        true minimum distance found by the checker.

    Raises
    ------
    ParameterError
        Unknown family or parameters outside the family's range (one line naming the range).
    VerificationError
        The built code fails its check (a bug).
    """
    from codesearch.constructions.operations import Built, verified

    fam = FAMILIES.get(name)
    if fam is None:
        raise ParameterError(f"unknown family {name!r} (known: {', '.join(FAMILIES)})")
    unknown = set(params) - set(fam.parameters)
    if unknown:
        raise ParameterError(f"family {name} takes parameters {', '.join(fam.parameters) or 'none'}"
                             f"; unknown: {', '.join(sorted(unknown))}")
    try:
        inst = fam.describe(**params)
    except TypeError:
        raise ParameterError(f"family {name} needs parameters {', '.join(fam.parameters)}") \
            from None
    code = fam.build(**params)
    if code.size != inst.size or code.n != inst.n:
        from codesearch.errors import VerificationError

        raise VerificationError(f"{inst.label}: built (n={code.n}, M={code.size}), "
                                f"expected (n={inst.n}, M={inst.size})")
    if name == "cyclic":
        from codesearch import verify
        from codesearch.model import Params

        rep = verify.assert_linear_code(code, Params(code.q, code.n, 1))
        d = rep.min_distance if rep.min_distance is not None else code.n
        return Built(code, d, inst.label)
    return verified(code, inst.d, inst.label)
