"""Hill climb over parity checks of additive codes in Z2^a x Z4^b, for unions of few cosets.

A code D = ker H, with H a homomorphism from Z2^a x Z4^b onto A = Z4^s x Z2^r, has |A| cosets,
one per syndrome. Through the Gray map (0 -> 00, 1 -> 01, 2 -> 11, 3 -> 10; binary length
a + 2b) the distance between two words is the Gray weight of their difference, so the union of
the cosets with syndromes g_1 .. g_m has minimum distance >= d exactly when

* no nonzero word of Gray weight < d has syndrome 0 (D itself has distance >= d), and
* every difference g_i - g_j (i != j) is a *good* syndrome: one that no word of Gray weight
  < d has.

The cosets form a clique in the Cayley graph of A on the good syndromes; it is
vertex-transitive, so a largest clique may contain 0. This driver enumerates the words of
Gray weight < d once, computes their syndromes for each H (numpy, about 0.1 s at length 24),
and scores H by the largest clique through a few sampled good syndromes (the library's exact
clique search on their neighbourhoods). Each step redraws one column of H and keeps the
change when the score does not go down: first fewer light words in D, then a larger clique,
then a larger mean neighbourhood. When the goal is met it builds the code, checks it with the
library's checker, prints the group spec ``gray:a:ROWS`` and the coset representatives, and
writes the code file if asked. Nothing is written to the store.

The record ``z2z4-24`` (24, 192, 9) of ``codesearch.constructions.sporadic`` is 6 cosets of a
32-word D in Z2^4 x Z4^10; a scratch version of this climb found it (H onto Z4^8 x Z2^3,
6 cosets after 366 steps, 70 s). This driver finds another (24, 192, 9) code (6 cosets after
521 steps, 126-213 s on a shared 2-core machine; 5 s more to build and check it) with::

    PYTHONPATH=. python benchmarks/scan_additive_syndromes.py 4 10 8 3 9 --goal 6 --seed 3

The record ``z2z4-23`` (23, 128, 9) is 16 cosets of an 8-word D in Z2^3 x Z4^10 (H onto
Z4^9 x Z2^2, from a scratch climb with a greedy clique score). ``--tabu`` scores by a tabu
search instead, for many cosets of a small D; from that H it finds the 16 cosets again (22 s)::

    PYTHONPATH=. python benchmarks/scan_additive_syndromes.py 3 10 9 2 9 --tabu 2000 --steps 0 \
        --seed 1 --columns 2688,797354,919714,192128,1025048,1041379,834539,49146,165256,\
645515,484095,716548,967168

(one line, no spaces in the list). From random starts, ``3 10 9 2 9 --tabu 2000 --goal 16``
found another (23, 128, 9) code with ``--seed 1`` (step 30, 425 s, two runs sharing 2 cores);
``--seed 2`` had 13 cosets at step 58 (690 s). Scratch surveys of random D reached 16 in about
1 draw in 10, never 17.

Usage::

    PYTHONPATH=. python benchmarks/scan_additive_syndromes.py A B S R D [--goal M] [--steps N]
        [--seed S] [--samples K] [--tabu MOVES] [--columns LIST] [--out FILE]

The binary length is A + 2B, and |D| = 2^(A + 2B - 2S - R).
"""

from __future__ import annotations

import argparse
import itertools
import time

import numpy as np

from codesearch.model import Code, Params
from codesearch.search.clique import bitsets_from_dense, max_clique
from codesearch.verify import assert_code
from scan_gray_cosets import spec_of  # sibling script: benchmarks/ is on sys.path

#: binary pair -> Z4 symbol (the inverse Gray map), indexed by 2 * first + second
_FROM_PAIR = np.array([0, 1, 3, 2])
_GRAY = np.array([[0, 0], [0, 1], [1, 1], [1, 0]], dtype=np.uint8)


class Quotient:
    """A = Z4^s x Z2^r, elements packed in an int: Z4 fields are bit pairs 2i, 2i + 1."""

    def __init__(self, s: int, r: int) -> None:
        self.s, self.r = s, r
        self.low = sum(1 << (2 * i) for i in range(s))  # low bit of every Z4 field
        self.size = 1 << (2 * s + r)

    def add(self, x, y):
        # field-wise: the low bits add without carry, the carry goes into the high bit only
        return x ^ y ^ ((x & y & self.low) << 1)

    def neg(self, x):
        return x ^ ((x & self.low) << 1)

    def draw(self, rng: np.random.Generator, binary: bool) -> int:
        """A random image of a coordinate: any element for Z4, one of order <= 2 for Z2."""
        fields = rng.integers(4, size=self.s) & (2 if binary else 3)
        bits = rng.integers(2, size=self.r)
        return int(sum(int(f) << (2 * i) for i, f in enumerate(fields))
                   + sum(int(b) << (2 * self.s + j) for j, b in enumerate(bits)))

    def times(self, x: int, k: int) -> int:
        y = 0
        for _ in range(k):
            y = self.add(y, x)
        return y

    def image_size(self, cols: list[int]) -> int:
        seen = np.zeros(self.size, dtype=bool)
        seen[0] = True
        for g in cols:
            elems = np.nonzero(seen)[0]
            for k in range(1, 4):
                seen[self.add(elems, self.times(g, k))] = True
        return int(seen.sum())


def light_words(a: int, b: int, d: int) -> np.ndarray:
    """Every word of Z2^a x Z4^b of Gray weight 1 .. d - 1, as symbols (one row each)."""
    n = a + 2 * b
    rows = []
    for w in range(1, d):
        for support in itertools.combinations(range(n), w):
            bits = np.zeros(n, dtype=np.int64)
            bits[list(support)] = 1
            rows.append(bits)
    bits = np.array(rows)
    return np.hstack([bits[:, :a], _FROM_PAIR[2 * bits[:, a::2] + bits[:, a + 1::2]]])


def syndromes(quot: Quotient, cols: list[int], symbols: np.ndarray) -> np.ndarray:
    syn = np.zeros(symbols.shape[0], dtype=np.int64)
    for u, h in enumerate(cols):
        table = np.array([quot.times(h, k) for k in range(4)], dtype=np.int64)
        syn = quot.add(syn, table[symbols[:, u]])
    return syn


def good_syndromes(quot: Quotient, cols: list[int], light: np.ndarray
                   ) -> tuple[int, np.ndarray]:
    """(number of light words in D, boolean table of the good syndromes)."""
    syn = syndromes(quot, cols, light)
    good = np.ones(quot.size, dtype=bool)
    good[syn] = False
    good[0] = False
    return int((syn == 0).sum()), good


def clique_through(quot: Quotient, good: np.ndarray, S: np.ndarray, v: int, limit: int,
                   time_limit: float) -> tuple[list[int], int]:
    """A largest set of good syndromes (``S``, all of them) containing v with good pairwise
    differences, and the number of good syndromes compatible with v."""
    nbr = S[good[quot.add(S, quot.neg(v))]]
    if nbr.size == 0 or nbr.size > limit:
        return [v], int(nbr.size)
    diff = quot.add(nbr[None, :], quot.neg(nbr)[:, None])
    dense = good[diff]
    np.fill_diagonal(dense, False)
    res = max_clique(bitsets_from_dense(dense), time_limit=time_limit)
    return [v] + [int(nbr[i]) for i in res.clique], int(nbr.size)


def tabu_clique(quot: Quotient, good: np.ndarray, moves: int, rng: np.random.Generator
                ) -> list[int]:
    """A large set of good syndromes with good pairwise differences, by a tabu search: add a
    syndrome compatible with the whole set, else swap in one that conflicts with a single
    member (which leaves, tabu for a few moves), else drop a random member."""
    S = np.nonzero(good)[0]
    conflicts = np.zeros(S.size, dtype=np.int64)  # members each syndrome conflicts with
    inside = np.zeros(S.size, dtype=bool)
    tabu = np.zeros(S.size, dtype=np.int64)
    members: list[int] = []
    best: list[int] = []

    def toggle(j: int, sign: int) -> None:
        clash = ~good[quot.add(S, quot.neg(int(S[j])))]
        clash[j] = False
        conflicts[clash] += sign

    for move in range(moves):
        free = ~inside & (tabu <= move)
        cand = np.nonzero(free & (conflicts == 0))[0]
        if cand.size == 0:
            cand = np.nonzero(free & (conflicts == 1))[0]
            if cand.size == 0:
                if not members:
                    break
                out = members.pop(int(rng.integers(len(members))))
                inside[out] = False
                toggle(out, -1)
                tabu[out] = move + 7
                continue
            j = int(cand[rng.integers(cand.size)])
            out = next(m for m in members if not good[quot.add(int(S[m]), quot.neg(int(S[j])))])
            members.remove(out)
            inside[out] = False
            toggle(out, -1)
            tabu[out] = move + 7 + int(rng.integers(5))
        else:
            j = int(cand[rng.integers(cand.size)])
        members.append(j)
        inside[j] = True
        toggle(j, +1)
        if len(members) > len(best):
            best = list(members)
    return [int(S[j]) for j in best]


def score(quot: Quotient, cols: list[int], light: np.ndarray, rng: np.random.Generator,
          samples: int, moves: int = 0) -> tuple[tuple[int, int, float], list[int]]:
    zero, good = good_syndromes(quot, cols, light)
    if zero:
        return (-zero, 0, 0.0), []
    S = np.nonzero(good)[0]
    if moves:
        best = tabu_clique(quot, good, moves, rng)
        return (0, len(best) + 1, float(S.size)), best
    best: list[int] = []
    sizes = []
    for v in rng.choice(S, size=min(samples, S.size), replace=False):
        cl, compatible = clique_through(quot, good, S, int(v), 4000, 2.0)
        sizes.append(compatible)
        if len(cl) > len(best):
            best = cl
    # cosets: the clique plus the zero syndrome
    return (0, len(best) + 1, float(np.mean(sizes)) if sizes else 0.0), best


def build(a: int, b: int, quot: Quotient, cols: list[int], clique: list[int], d: int
          ) -> tuple[Code, list[np.ndarray], list[np.ndarray]]:
    """The union of the cosets, checked; also generators of D and the coset representatives."""
    radix = np.array([2] * a + [4] * b)
    n_sym = a + b
    shifts = np.array(list(range(a)) + [a + 2 * j for j in range(b)])
    kernel_parts, found = [], {}
    for start in range(0, 1 << (a + 2 * b), 1 << 20):  # all of Z2^a x Z4^b, in chunks
        x = np.arange(start, start + (1 << 20), dtype=np.int64)
        sym = (x[:, None] >> shifts[None, :]) & (radix - 1)[None, :]
        syn = syndromes(quot, cols, sym)
        kernel_parts.append(sym[syn == 0])
        for g in clique:
            hit = np.nonzero(syn == g)[0]
            if g not in found and hit.size:
                found[g] = sym[hit[0]]
    kernel = np.vstack(kernel_parts)
    reps = [np.zeros(n_sym, dtype=np.int64)] + [found[g] for g in clique]
    words = np.vstack([(r + kernel) % radix for r in reps])
    binary = np.hstack([words[:, :a].astype(np.uint8),
                        _GRAY[words[:, a:]].reshape(len(words), 2 * b)])
    code = Code(binary, 2)
    assert_code(code, Params(2, a + 2 * b, d))
    gens: list[np.ndarray] = []
    spanned = {tuple([0] * n_sym)}
    for x in sorted(kernel.tolist(), key=lambda v: -sum(t % 2 for t in v[a:])):
        if tuple(x) not in spanned:
            gens.append(np.array(x))
            for _ in range(3):
                spanned |= {tuple((np.array(y) + gens[-1]) % radix) for y in spanned}
    return code, gens, reps


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    for name in ("a", "b", "s", "r", "d"):
        ap.add_argument(name, type=int)
    ap.add_argument("--goal", type=int, default=0, help="stop at this many cosets")
    ap.add_argument("--steps", type=int, default=2000)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--samples", type=int, default=20, help="good syndromes sampled per score")
    ap.add_argument("--tabu", type=int, default=0, metavar="MOVES",
                    help="score by a tabu search of this many moves instead of exact searches "
                         "around sampled syndromes (for many cosets of a small D)")
    ap.add_argument("--columns", help="start from these columns of H (comma-separated "
                    "packed elements of A, as printed at the end of a run)")
    ap.add_argument("--out", help="write the code file here")
    args = ap.parse_args()
    a, b, d = args.a, args.b, args.d
    quot = Quotient(args.s, args.r)
    rng = np.random.default_rng(args.seed)
    t0 = time.time()
    light = light_words(a, b, d)
    print(f"length {a + 2 * b}, |D| = 2^{a + 2 * b - 2 * args.s - args.r}, "
          f"{len(light)} words of Gray weight < {d} ({time.time() - t0:.1f} s)", flush=True)

    def draw_all() -> list[int]:
        return [quot.draw(rng, u < a) for u in range(a + b)]

    if args.columns:
        cols = [int(x) for x in args.columns.split(",")]
        if len(cols) != a + b or quot.image_size(cols) != quot.size:
            raise SystemExit(f"--columns: need {a + b} columns whose images span A")
    else:
        cols = draw_all()
        while quot.image_size(cols) != quot.size:
            cols = draw_all()
    sc, clique = score(quot, cols, light, rng, args.samples, args.tabu)
    for step in range(1, args.steps + 1):
        if args.goal and sc[1] >= args.goal:
            break
        new = list(cols)
        u = int(rng.integers(a + b))
        new[u] = quot.draw(rng, u < a)
        if quot.image_size(new) != quot.size:
            continue
        sc2, clique2 = score(quot, new, light, rng, args.samples, args.tabu)
        if sc2 >= sc:
            if sc2[:2] > sc[:2]:
                print(f"{time.time() - t0:7.1f} s, step {step}: light words in D {-sc2[0]}, "
                      f"cosets {sc2[1]}", flush=True)
            cols, sc, clique = new, sc2, clique2
    print(f"columns {','.join(map(str, cols))}: {sc[1]} cosets")
    if sc[0] == 0 and len(clique) + 1 == sc[1]:
        code, gens, reps = build(a, b, quot, cols, clique, d)
        spec = spec_of(gens, a)
        print(f"({a + 2 * b}, {code.size}, {d}) code checked; group {spec}")
        print("coset representatives (symbols):",
              ["".join(map(str, r.tolist())) for r in reps])
        if args.out:
            from codesearch.codefile import write_code
            write_code(args.out, code, d=d)
            print(f"written to {args.out}")


if __name__ == "__main__":
    main()
