"""Operations that make new codes from old ones, on explicit codes and on generator matrices.

Problem
-------
Most record codes of a table are descendants of a few family codes: shortened, punctured,
extended, padded, or combined. Each operation here takes codes and returns the new code; the
distance it guarantees is stated beside it. Linear inputs (:class:`~codesearch.model.LinearCode`)
give linear outputs wherever the operation preserves linearity, so that large codes are never
listed word by word.

Operations (n, M, d) -> guarantee
    parity_extend   binary: (n + 1, M, d + 1 if d odd); q-ary linear: append -(sum of symbols)
    puncture        delete a coordinate: (n - 1, M, d - 1)  (M kept when d >= 2)
    shorten         keep the words with a given symbol at a coordinate, delete it: (n - 1, M', d);
                    linear: M' = M/q on any coordinate where the code is not identically zero
    pad             append a constant coordinate: (n + 1, M, d)
    u_u_plus_v      {(u | u + v)}: (2n, M1 M2, min(2 d1, d2)); + is the field's addition
                    (digit-wise) for prime powers, addition mod q otherwise
    construction_x  C2 < C1 linear, auxiliary [a, k1 - k2, delta]: append the auxiliary encoding of
                    the coset of C2: [n + a, k1, min(d2, d1 + delta)]
    construction_xx C2, C3 < C1 = C2 + C3, C4 = C2 /\\ C3, auxiliaries for C1/C2 and C1/C3:
                    [n + a2 + a3, k1, min(d4, d2 + delta3, d3 + delta2, d1 + delta2 + delta3)]
    juxtapose       linear, same k: [G1 | G2]: [n1 + n2, k, d1 + d2]
    direct_sum      (n1 + n2, M1 M2, min(d1, d2))
    concatenate     outer linear over GF(p^m) with inner linear [n, m, delta] over GF(p):
                    [N n, K m, D delta] over GF(p)
    translate       add a fixed word: same parameters
    coset_union     the union of translates of a code (its distance is whatever the check finds)

References
----------
F. J. MacWilliams and N. J. A. Sloane, *The Theory of Error-Correcting Codes*, North-Holland,
1977: ch. 1 section 9 (extending, puncturing, shortening), ch. 2 section 9 ((u|u+v)),
ch. 18 section 7 (Construction X, direct sums, juxtaposition / "|u|v|" codes), ch. 10
section 11 (concatenated codes); W. O. Alltop, A method for extending binary linear codes,
*IEEE Trans. Inform. Theory* 30 (1984) 871-872 (Construction XX).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from codesearch.errors import ParameterError
from codesearch.gf import digit_add_table, field, prime_power
from codesearch.model import MAX_LISTED_WORDS, Code, LinearCode, Params

__all__ = [
    "Built",
    "verified",
    "parity_extend",
    "puncture",
    "shorten",
    "pad",
    "u_u_plus_v",
    "construction_x",
    "construction_xx",
    "juxtapose",
    "direct_sum",
    "concatenate",
    "translate",
    "coset_union",
]

AnyCode = Code | LinearCode


@dataclass(frozen=True)
class Built:
    """A code with the minimum distance the checker confirmed and where it came from.

    Attributes
    ----------
    code : Code or LinearCode
    d : int
        Every two codewords are at least ``d`` apart (verified).
    provenance : str
        How the code was made, for a reader of a table ("shortened extended BCH(31,11)").
    """

    code: AnyCode
    d: int
    provenance: str

    @property
    def params(self) -> Params:
        return Params(self.code.q, self.code.n, self.d)

    @property
    def size(self) -> int:
        return self.code.size

    def words(self, max_words: int = MAX_LISTED_WORDS) -> Code:
        """The code as explicit codewords (linear codes expanded up to ``max_words``)."""
        return self.code.words(max_words) if isinstance(self.code, LinearCode) else self.code


def verified(code: AnyCode, d: int, provenance: str) -> Built:
    """Check ``code`` with :mod:`codesearch.verify` at distance ``d`` and wrap it.

    Raises
    ------
    VerificationError
        When two codewords are closer than ``d`` (a bug in the producer).
    """
    from codesearch import verify

    params = Params(code.q, code.n, max(1, min(d, code.n)))
    if isinstance(code, LinearCode):
        verify.assert_linear_code(code, params)
    else:
        cost = verify.ball_check_cost(code, params.d)
        if cost is not None and cost < code.size * code.size // 8:
            verify.assert_code_by_balls(code, params)
        else:
            verify.assert_code(code, params)
    return Built(code, params.d, provenance)


# ------------------------------------------------------------------ raw operations (no check)
def _gen(code: LinearCode) -> np.ndarray:
    return code.generator.astype(np.int64)


def _add(q: int) -> np.ndarray:
    return digit_add_table(q).astype(np.int64) if prime_power(q) else None


def _group_add(q: int, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """The alphabet's group addition: the field's for prime powers, mod q otherwise."""
    table = _add(q)
    if table is None:
        return (a.astype(np.int64) + b.astype(np.int64)) % q
    return table[a.astype(np.int64), b.astype(np.int64)]


def raw_parity_extend(code: AnyCode) -> AnyCode:
    if isinstance(code, LinearCode):
        from codesearch.constructions.algebraic import extend

        return extend(code)
    if code.q != 2:
        raise ParameterError("parity extension of a nonlinear code needs q = 2")
    parity = (code.words.sum(axis=1) % 2).astype(np.uint8)[:, None]
    return Code(np.hstack([code.words, parity]), 2)


def raw_puncture(code: AnyCode, i: int = -1) -> AnyCode:
    if isinstance(code, LinearCode):
        return LinearCode(np.delete(code.generator, i, axis=1), code.q)
    return Code(np.delete(code.words, i, axis=1), code.q)


def raw_shorten(code: AnyCode, i: int | None = None, symbol: int = 0) -> AnyCode:
    """Linear: on coordinate i (default: the last one not identically zero). Nonlinear: the
    words with ``symbol`` at coordinate i (default 0), coordinate i deleted."""
    if isinstance(code, LinearCode):
        g = _gen(code)
        if i is None:
            nz = np.nonzero(g.any(axis=0))[0]
            if nz.size == 0:
                raise ParameterError("cannot shorten the zero code")
            i = int(nz[-1])
        gf = field(code.q)
        rows = np.nonzero(g[:, i])[0]
        if rows.size == 0:
            return LinearCode(np.delete(code.generator, i, axis=1), code.q)
        r = int(rows[0])
        piv = g[r] if False else gf.mul[gf.inv[g[r, i]], g[r]]
        out = []
        for j in range(code.k):
            if j == r:
                continue
            row = g[j]
            if row[i]:
                row = gf.add[row, gf.mul[gf.neg[row[i]], piv]]
            out.append(row)
        arr = np.array(out, dtype=np.uint8).reshape(len(out), code.n)
        return LinearCode(np.delete(arr, i, axis=1), code.q)
    i = 0 if i is None else i
    rows = code.words[code.words[:, i] == symbol]
    return Code(np.delete(rows, i, axis=1).reshape(rows.shape[0], code.n - 1), code.q)


def raw_pad(code: AnyCode, symbol: int = 0) -> AnyCode:
    if isinstance(code, LinearCode):
        if symbol:
            raise ParameterError("padding a linear code keeps it linear only with symbol 0")
        return LinearCode(np.hstack([code.generator, np.zeros((code.k, 1), np.uint8)]), code.q)
    col = np.full((code.size, 1), symbol, dtype=np.uint8)
    return Code(np.hstack([code.words, col]), code.q)


def raw_u_u_plus_v(c1: AnyCode, c2: AnyCode) -> AnyCode:
    if c1.q != c2.q or c1.n != c2.n:
        raise ParameterError("(u|u+v) needs two codes of the same length and alphabet")
    if isinstance(c1, LinearCode) and isinstance(c2, LinearCode):
        top = np.hstack([c1.generator, c1.generator])
        bottom = np.hstack([np.zeros_like(c2.generator), c2.generator])
        return LinearCode(np.vstack([top, bottom]), c1.q)
    u = _words(c1)
    v = _words(c2)
    uu = np.repeat(u, v.shape[0], axis=0)
    vv = np.tile(v, (u.shape[0], 1))
    return Code(np.hstack([uu, _group_add(c1.q, uu, vv)]).astype(np.uint8), c1.q)


def _words(code: AnyCode) -> np.ndarray:
    return code.words().words if isinstance(code, LinearCode) else code.words


def raw_direct_sum(c1: AnyCode, c2: AnyCode) -> AnyCode:
    if c1.q != c2.q:
        raise ParameterError("a direct sum needs codes over the same alphabet")
    if isinstance(c1, LinearCode) and isinstance(c2, LinearCode):
        g = np.zeros((c1.k + c2.k, c1.n + c2.n), dtype=np.uint8)
        g[: c1.k, : c1.n] = c1.generator
        g[c1.k:, c1.n:] = c2.generator
        return LinearCode(g, c1.q)
    a, b = _words(c1), _words(c2)
    return Code(np.hstack([np.repeat(a, b.shape[0], axis=0), np.tile(b, (a.shape[0], 1))]), c1.q)


def raw_juxtapose(c1: LinearCode, c2: LinearCode) -> LinearCode:
    if c1.q != c2.q or c1.k != c2.k:
        raise ParameterError("juxtaposition needs two linear codes of the same dimension")
    return LinearCode(np.hstack([c1.generator, c2.generator]), c1.q)


def _complement_rows(big: LinearCode, small: LinearCode) -> np.ndarray:
    """Rows of ``big``'s generator completing ``small``'s basis to a basis of ``big``."""
    gf = field(big.q)
    if gf.rank(np.vstack([small.generator, big.generator])) != big.k:
        raise ParameterError("the smaller code is not contained in the larger one")
    basis = small.generator
    extra = []
    for row in big.generator:
        trial = np.vstack([basis, row[None, :]])
        if gf.rank(trial) == trial.shape[0]:
            basis = trial
            extra.append(row)
    return np.array(extra, dtype=np.uint8).reshape(len(extra), big.n)


def raw_construction_x(c1: LinearCode, c2: LinearCode, aux: LinearCode) -> LinearCode:
    extra = _complement_rows(c1, c2)
    if aux.k != extra.shape[0] or aux.q != c1.q:
        raise ParameterError(
            f"Construction X needs an auxiliary code of dimension {extra.shape[0]}")
    top = np.hstack([c2.generator, np.zeros((c2.k, aux.n), np.uint8)])
    bottom = np.hstack([extra, aux.generator])
    return LinearCode(np.vstack([top, bottom]), c1.q)


def raw_construction_xx(c1: LinearCode, c2: LinearCode, c3: LinearCode,
                        aux2: LinearCode, aux3: LinearCode) -> LinearCode:
    gf = field(c1.q)
    n = c1.n
    # C4 = C2 /\ C3 from the null space of [G2; -G3]^T
    stacked = np.vstack([c2.generator, gf.neg[c3.generator.astype(np.int64)].astype(np.uint8)])
    kernel = gf.null_space(stacked.T)
    inter = gf.matmul(kernel[:, : c2.k], c2.generator) if kernel.size else np.zeros((0, n))
    inter = gf.rref(inter)[0] if inter.shape[0] else inter.astype(np.uint8)
    c4 = LinearCode(inter, c1.q) if inter.shape[0] else None
    if gf.rank(np.vstack([c2.generator, c3.generator])) != c1.k or \
            gf.rank(np.vstack([c1.generator, c2.generator, c3.generator])) != c1.k:
        raise ParameterError("Construction XX needs C1 = C2 + C3")
    zero4 = LinearCode(np.zeros((0, n), np.uint8), c1.q) if c4 is None else c4
    a2 = _complement_rows(c2, zero4) if c4 is None else _complement_rows(c2, c4)
    a3 = _complement_rows(c3, zero4) if c4 is None else _complement_rows(c3, c4)
    # aux2 encodes the coset modulo C2, read from the A3 part; aux3 the coset modulo C3 (A2)
    if aux2.k != a3.shape[0] or aux3.k != a2.shape[0]:
        raise ParameterError(f"Construction XX needs auxiliary codes of dimensions "
                             f"{a3.shape[0]} (for C1/C2) and {a2.shape[0]} (for C1/C3)")
    rows = []
    k4 = 0 if c4 is None else c4.k
    if k4:
        rows.append(np.hstack([c4.generator, np.zeros((k4, aux2.n + aux3.n), np.uint8)]))
    rows.append(np.hstack([a2, np.zeros((a2.shape[0], aux2.n), np.uint8), aux3.generator]))
    rows.append(np.hstack([a3, aux2.generator, np.zeros((a3.shape[0], aux3.n), np.uint8)]))
    return LinearCode(np.vstack(rows), c1.q)


def raw_concatenate(outer: LinearCode, inner: LinearCode) -> LinearCode:
    pm = prime_power(outer.q)
    p, m = pm  # type: ignore[misc]
    if inner.q != p or inner.k != m:
        raise ParameterError(
            f"an outer code over GF({outer.q}) needs an inner code over GF({p}) of dimension {m}")
    basis = outer.additive_basis().astype(np.int64)
    digits = np.stack([(basis // p**j) % p for j in range(m)], axis=-1)  # (r, N, m)
    img = np.einsum("rnj,jl->rnl", digits, inner.generator.astype(np.int64)) % p
    return LinearCode(img.reshape(basis.shape[0], -1).astype(np.uint8), p)


# ------------------------------------------------------------------ public, verified
def parity_extend(b: Built) -> Built:
    """Append an overall check symbol; binary codes of odd d gain one in distance."""
    code = raw_parity_extend(b.code)
    gain = 1 if code.q == 2 and b.d % 2 else 0
    return verified(code, b.d + gain, f"extended {b.provenance}")


def puncture(b: Built, i: int = -1) -> Built:
    """Delete coordinate ``i``: distance at least d - 1."""
    if b.code.n < 2:
        raise ParameterError("cannot puncture a code of length 1")
    return verified(raw_puncture(b.code, i), max(1, b.d - 1), f"punctured {b.provenance}")


def shorten(b: Built, i: int | None = None, symbol: int = 0) -> Built:
    """Shorten on coordinate ``i`` (see :func:`raw_shorten`); distance at least d."""
    if b.code.n < 2:
        raise ParameterError("cannot shorten a code of length 1")
    return verified(raw_shorten(b.code, i, symbol), b.d, f"shortened {b.provenance}")


def pad(b: Built, symbol: int = 0) -> Built:
    """Append a constant coordinate: A_q(n+1, d) >= A_q(n, d)."""
    return verified(raw_pad(b.code, symbol), b.d, f"padded {b.provenance}")


def u_u_plus_v(b1: Built, b2: Built) -> Built:
    """(u | u+v): distance at least min(2 d1, d2)."""
    return verified(raw_u_u_plus_v(b1.code, b2.code), min(2 * b1.d, b2.d),
                    f"(u|u+v) of {b1.provenance} and {b2.provenance}")


def direct_sum(b1: Built, b2: Built) -> Built:
    """All concatenations (a | b): distance min(d1, d2)."""
    return verified(raw_direct_sum(b1.code, b2.code), min(b1.d, b2.d),
                    f"direct sum of {b1.provenance} and {b2.provenance}")


def juxtapose(b1: Built, b2: Built) -> Built:
    """[G1 | G2] of two linear codes of the same dimension: distance d1 + d2."""
    if not (isinstance(b1.code, LinearCode) and isinstance(b2.code, LinearCode)):
        raise ParameterError("juxtaposition needs linear codes")
    return verified(raw_juxtapose(b1.code, b2.code), b1.d + b2.d,
                    f"juxtaposition of {b1.provenance} and {b2.provenance}")


def construction_x(b1: Built, b2: Built, aux: Built) -> Built:
    """Construction X from C2 < C1 and an auxiliary code: distance min(d2, d1 + delta)."""
    codes = (b1.code, b2.code, aux.code)
    if not all(isinstance(c, LinearCode) for c in codes):
        raise ParameterError("Construction X needs linear codes")
    return verified(raw_construction_x(*codes), min(b2.d, b1.d + aux.d),  # type: ignore[arg-type]
                    f"Construction X on {b1.provenance} > {b2.provenance} with {aux.provenance}")


def construction_xx(b1: Built, b2: Built, b3: Built, b4_d: int,
                    aux2: Built, aux3: Built) -> Built:
    """Construction XX; ``b4_d`` is a lower bound on the distance of C2 /\\ C3 (e.g. max(d2, d3))."""
    codes = (b1.code, b2.code, b3.code, aux2.code, aux3.code)
    if not all(isinstance(c, LinearCode) for c in codes):
        raise ParameterError("Construction XX needs linear codes")
    d = min(b4_d, b2.d + aux3.d, b3.d + aux2.d, b1.d + aux2.d + aux3.d)
    return verified(raw_construction_xx(*codes), d,  # type: ignore[arg-type]
                    f"Construction XX on {b1.provenance} > {b2.provenance}, {b3.provenance}")


def concatenate(outer: Built, inner: Built) -> Built:
    """Concatenation of a linear outer code over GF(p^m) with an inner [n, m, delta] code."""
    if not (isinstance(outer.code, LinearCode) and isinstance(inner.code, LinearCode)):
        raise ParameterError("concatenation needs linear codes")
    return verified(raw_concatenate(outer.code, inner.code), outer.d * inner.d,
                    f"{outer.provenance} concatenated with {inner.provenance}")


def translate(b: Built, word: np.ndarray) -> Built:
    """The code plus a fixed word (the alphabet's group addition): same distance."""
    words = b.words()
    w = np.asarray(word, dtype=np.uint8).reshape(1, -1)
    if w.shape[1] != words.n:
        raise ParameterError(f"the translating word needs length {words.n}")
    out = Code(_group_add(words.q, words.words, np.broadcast_to(w, words.words.shape))
               .astype(np.uint8), words.q)
    return verified(out, b.d, f"translate of {b.provenance}")


def coset_union(b: Built, translates: np.ndarray, d: int) -> Built:
    """The union of the translates ``C + t`` of the code, claimed to have distance ``d``."""
    words = b.words()
    ts = np.atleast_2d(np.asarray(translates, dtype=np.uint8))
    parts = [_group_add(words.q, words.words, np.broadcast_to(t, words.words.shape))
             for t in ts]
    out = Code(np.unique(np.vstack(parts).astype(np.uint8), axis=0), words.q)
    return verified(out, d, f"union of {ts.shape[0]} translates of {b.provenance}")
