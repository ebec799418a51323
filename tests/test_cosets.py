"""The coset-union search and its recorded unions, checked against outside facts.

Sources named beside each check.
"""

from __future__ import annotations

import itertools
import os
import subprocess
import sys

import numpy as np
import pytest

from codesearch import verify
from codesearch.constructions import build_family, candidates
from codesearch.constructions.cosets import (
    RECORDS, coset_union_search, coset_weights, good_syndromes, leading_balance,
    random_subcode, symmetric_coset_union_search, syndrome_action, union_words,
)
from codesearch.errors import ParameterError
from codesearch.model import Code, LinearCode, Params

_DATA = os.path.join(os.path.dirname(__file__), "..", "data", "published_binary.csv")


def _published() -> dict[tuple[int, int], int]:
    out = {}
    with open(_DATA) as fh:
        for line in fh:
            if line.startswith(("#", "q,")):
                continue
            q, n, d, lower = line.split(",")[:4]
            if q == "2":
                out[(int(n), int(d))] = int(lower)
    return out


def test_coset_weights_equal_brute_force():
    # the minimum weight of the coset with syndrome s, found by listing all 2^n words for a
    # [15, 4] code (definition of a coset leader, MacWilliams-Sloane Ch. 1 s. 3)
    code = random_subcode(build_family("hamming", q=2, m=4).code, 4, seed=3)
    w = coset_weights(code)
    n = code.n
    words = np.array(list(itertools.product((0, 1), repeat=n)), dtype=np.int64)
    syn = np.zeros(len(words), dtype=np.int64)
    for j in range(n):
        syn ^= words[:, j] * int(w.columns[j])
    wt = words.sum(axis=1)
    brute = np.full(1 << (n - code.k), 99)
    np.minimum.at(brute, syn, wt)
    assert (brute == w.weight).all()
    for s in range(1 << (n - code.k)):
        leader = w.leader(s)
        assert w.syndrome(leader) == s and bin(leader).count("1") == w.weight[s]
    # the Hamming code is perfect: covering radius 1 (MacWilliams-Sloane Ch. 1 s. 7)
    assert coset_weights(build_family("hamming", q=2, m=4).code).covering_radius == 1


def test_nordstrom_robinson_is_eight_cosets_of_first_order_reed_muller():
    # the Nordstrom-Robinson code (16, 256, 6) is a union of 8 cosets of RM(1,4), and
    # A(16,6) = 256 (MacWilliams-Sloane Ch. 2 s. 8 and Ch. 15 s. 5): the exhausted search
    # finds 8 cosets and proves no union of 9 exists
    rm = build_family("reed-muller", r=1, m=4).code
    res = coset_union_search(rm, 6, method="exact", time_limit=60)
    assert res.size == 256 and res.optimal
    code = union_words(tuple(int(sum(int(b) << j for j, b in enumerate(r))) for r in
                             rm.generator), res.leaders, 16)
    assert code.size == 256
    verify.assert_code(code, Params(2, 16, 6))


def test_connection_set_is_every_good_nonzero_syndrome():
    # brute force over all words of length 10: the syndromes of the cosets whose least
    # weight is >= d, 0 excluded (the definition of the Cayley graph's connection set)
    code = build_family("reed-muller", r=1, m=3).code  # [8,4,4], padded below
    code = LinearCode(np.hstack([code.generator, np.zeros((4, 2), np.uint8)]), 2)
    w = coset_weights(code)
    least: dict[int, int] = {}
    for x in range(1 << 10):
        s = w.syndrome(x)
        least[s] = min(least.get(s, 99), bin(x).count("1"))
    for d in (1, 2, 3, 4):
        expect = sorted(s for s, m in least.items() if s != 0 and m >= d)
        assert good_syndromes(w, d).tolist() == expect


@pytest.mark.parametrize("n,d", [(7, 3), (8, 4), (9, 5)])
def test_clique_stage_matches_networkx(n, d):
    # the largest union of cosets of the repetition code = 2 x the clique number of the
    # Cayley graph on F_2^(n-1) with connection set {w(s) >= d}; networkx computes the
    # clique number of the whole graph independently (networkx.max_weight_clique)
    nx = pytest.importorskip("networkx")
    rep = build_family("repetition", q=2, n=n).code
    w = coset_weights(rep)
    good = set(good_syndromes(w, d).tolist())
    g = nx.Graph()
    g.add_nodes_from(range(1 << (n - 1)))
    g.add_edges_from((a, b) for a in range(1 << (n - 1)) for b in range(a + 1, 1 << (n - 1))
                     if (a ^ b) in good)
    _, omega = nx.max_weight_clique(g, weight=None)
    res = coset_union_search(rep, d, method="exact", time_limit=60)
    assert res.optimal and len(res.syndromes) == omega


def test_greedy_is_seeded_and_never_claims_optimality():
    rm = build_family("reed-muller", r=1, m=4).code
    a = coset_union_search(rm, 6, method="greedy", seed=5, restarts=20)
    b = coset_union_search(rm, 6, method="greedy", seed=5, restarts=20)
    assert a.syndromes == b.syndromes and not a.optimal
    verify.assert_code(union_words(tuple(int(sum(int(x) << j for j, x in enumerate(r)))
                                         for r in rm.generator), a.leaders, 16),
                       Params(2, 16, 6))


def test_bad_parameters_raise_one_line_errors():
    rm = build_family("reed-muller", r=1, m=4).code
    with pytest.raises(ParameterError, match="method"):
        coset_union_search(rm, 6, method="fast")
    with pytest.raises(ParameterError, match="1 <= d"):
        coset_union_search(rm, 20)
    with pytest.raises(ParameterError, match="inner code"):  # RM(1,4) has distance 8
        coset_union_search(rm, 9)
    # a start supercode: local method only, and every one of its cosets must be good
    with pytest.raises(ParameterError, match="local"):
        coset_union_search(rm, 6, method="greedy", start=(1,))
    with pytest.raises(ParameterError, match="weight below"):  # the coset of e_0: weight 1
        coset_union_search(rm, 6, method="local", start=(1,))


def test_start_supercode_is_kept_or_improved():
    # x0 x1 + x2 x3 is a bent function: its coset of RM(1,4) has weight 6 (MacWilliams-
    # Sloane ch. 14), so the start {RM(1,4), that coset} is good at d = 6; the search keeps
    # it and reaches 8 cosets, the Nordstrom-Robinson size A(16,6) = 256 (MacWilliams-Sloane
    # App. A)
    rm = build_family("reed-muller", r=1, m=4).code
    pts = [[(p >> i) & 1 for i in range(4)] for p in range(16)]
    q = sum(1 << p for p in range(16) if (pts[p][0] & pts[p][1]) ^ (pts[p][2] & pts[p][3]))
    res = coset_union_search(rm, 6, method="local", seed=0, goal=8, start=(q,),
                             time_limit=30)
    assert len(res.syndromes) == 8 and res.size == 256
    assert coset_weights(rm).syndrome(q) in res.syndromes


# ----------------------------------------------------------------------------- symmetry
def _rows_to_ints(code: LinearCode) -> tuple[int, ...]:
    return tuple(int(sum(int(b) << j for j, b in enumerate(r))) for r in code.generator)


def test_syndrome_action_is_the_syndrome_of_the_permuted_word():
    # definition: a permutation preserving L maps the coset x + L to p(x) + L; the induced
    # syndrome map must agree with the syndrome of the permuted word, and keep coset weights
    # (a permutation keeps Hamming weights); L = {(u|u) : u even of length 5}, p = the
    # cyclic shift of both halves
    u = np.array([[1, 0, 0, 0, 1], [0, 1, 0, 0, 1], [0, 0, 1, 0, 1], [0, 0, 0, 1, 1]],
                 dtype=np.uint8)
    code = LinearCode(np.concatenate([u, u], axis=1), 2)
    perm = [(j + 1) % 5 for j in range(5)] + [5 + (j + 1) % 5 for j in range(5)]
    w = coset_weights(code)
    image = syndrome_action(w, perm)
    rng = np.random.default_rng(0)
    for x in rng.integers(0, 1 << 10, 200).tolist():
        y = sum(1 << perm[j] for j in range(10) if (x >> j) & 1)
        assert image[w.syndrome(x)] == w.syndrome(y)
    assert (w.weight[image] == w.weight).all()


def test_symmetric_search_finds_the_cyclic_hamming_code():
    # the [7,4] Hamming code is cyclic and contains the all-ones word, so it is a union of 8
    # cosets of the repetition code invariant under the cyclic shift; 16 words of length 7
    # with distance 3 meet the sphere-packing bound 2^7 / 8 (MacWilliams-Sloane Ch. 1 s. 5,
    # Ch. 7), so no union of more cosets exists, with or without symmetry
    rep = build_family("repetition", q=2, n=7).code
    shift = [(j + 1) % 7 for j in range(7)]
    res = symmetric_coset_union_search(rep, 3, [shift], time_limit=60)
    assert res.optimal and res.method == "orbit" and res.size == 16
    code = union_words(_rows_to_ints(rep), res.leaders, 7)
    verify.assert_code(code, Params(2, 7, 3))
    chosen = set(res.syndromes)
    image = syndrome_action(coset_weights(rep), shift)
    assert {int(image[s]) for s in chosen} == chosen  # the union is invariant


@pytest.mark.parametrize("n,d", [(8, 4), (9, 5)])
def test_symmetric_search_with_the_trivial_group_matches_networkx(n, d):
    # with the identity as the only permutation every orbit is one syndrome, and the search
    # is the plain clique problem: its optimum is the clique number networkx computes
    nx = pytest.importorskip("networkx")
    rep = build_family("repetition", q=2, n=n).code
    good = set(good_syndromes(coset_weights(rep), d).tolist())
    g = nx.Graph()
    g.add_nodes_from(range(1 << (n - 1)))
    g.add_edges_from((a, b) for a in range(1 << (n - 1)) for b in range(a + 1, 1 << (n - 1))
                     if (a ^ b) in good)
    _, omega = nx.max_weight_clique(g, weight=None)
    res = symmetric_coset_union_search(rep, d, [list(range(n))], time_limit=60)
    assert res.optimal and len(res.syndromes) == omega


def test_symmetric_search_rejects_bad_permutations():
    rep = build_family("repetition", q=2, n=7).code
    with pytest.raises(ParameterError, match="not a permutation"):
        symmetric_coset_union_search(rep, 3, [[0, 0, 1, 2, 3, 4, 5]])
    ham = LinearCode(np.array([[1, 1, 1, 0, 0, 0, 0], [0, 0, 0, 1, 1, 1, 1]], np.uint8), 2)
    with pytest.raises(ParameterError, match="onto itself"):
        symmetric_coset_union_search(ham, 3, [[(j + 1) % 7 for j in range(7)]])


# ----------------------------------------------------------------------------- records
@pytest.mark.parametrize("key", sorted(RECORDS))
def test_records_verify_and_meet_the_published_values(key):
    # every record rebuilds, passes the independent checker, is equidistributed on the
    # coordinates the table shortens on, and its cell (and the extended cell for odd d)
    # reaches the published lower value of data/published_binary.csv (from memory of the
    # tables of Agrell-Vardy-Zeger 2001 / Schrijver 2005 / Gijswijt-Mittelmann-Schrijver 2012;
    # the source column names each row)
    rec = RECORDS[key]
    b = build_family("coset-union", key=key)
    assert (b.code.n, b.code.size, b.d) == (rec.n, rec.size, rec.d)
    verify.assert_code(b.code, Params(2, rec.n, rec.d))
    bal = leading_balance(rec.generator)
    words = b.code.words
    for t in range(1, bal + 1):
        counts = np.unique(words[:, :t] @ (1 << np.arange(t)), return_counts=True)[1]
        assert len(counts) == 2**t and (counts == counts[0]).all()
    pub = _published()
    if key in _SHORT_OF_PUBLISHED:
        # an improvement on the library's earlier best that still falls short of the
        # published value: the table reaches the record's size, in its cell and extended
        earlier = _SHORT_OF_PUBLISHED[key]
        assert earlier < rec.size < pub[(rec.n, rec.d)], key
        assert candidates(Params(2, rec.n, rec.d))[0].size >= rec.size
        if rec.d % 2 == 1:
            assert candidates(Params(2, rec.n + 1, rec.d + 1))[0].size >= rec.size
        return
    assert rec.size >= pub[(rec.n, rec.d)], key
    assert candidates(Params(2, rec.n, rec.d))[0].size >= pub[(rec.n, rec.d)]
    if rec.d % 2 == 1 and (rec.n + 1, rec.d + 1) in pub:
        assert candidates(Params(2, rec.n + 1, rec.d + 1))[0].size >= pub[(rec.n + 1, rec.d + 1)]


#: records short of the published lower value, with the library's best before them
#: (A(22,9) >= 52 and A(23,9) >= 64 from the other families; published 76 and 136, from
#: memory, marked uncertain)
_SHORT_OF_PUBLISHED = {"rep22": 52, "rep23": 64}


# ----------------------------------------------------------------------------- CLI
def _cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "codesearch", *args], capture_output=True,
                          text=True)


def test_cli_coset_union(tmp_path):
    # A(8,4) = 16 (MacWilliams-Sloane App. A): 8 cosets of the repetition code
    out = tmp_path / "u.txt"
    r = _cli("construct", "--coset-union", "4", "repetition", "--param", "q=2", "--param",
             "n=8", "--out", str(out))
    assert r.returncode == 0, r.stderr
    assert "16 words" in r.stdout and "largest for this inner code" in r.stdout
    r = _cli("check", str(out), "--d", "4")
    assert r.returncode == 0, r.stderr
    r = _cli("construct", "--coset-union", "6", "julin")
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    r = _cli("construct", "--coset-union", "4", "--inner-cell", "8", "9")
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    # a union too large to list: one line naming the cap, no traceback
    r = _cli("construct", "--coset-union", "3", "hamming", "--param", "q=2", "--param", "m=5")
    assert r.returncode == 2 and "cap" in r.stderr and len(r.stderr.strip().splitlines()) == 1


#: records whose rerun takes more than a few seconds (run with -m slow)
_SLOW_RERUNS = {"rm14-tail4", "rep22", "rep23"}


@pytest.mark.parametrize("key", [pytest.param(k, marks=pytest.mark.slow) if k in _SLOW_RERUNS
                                 else k for k in sorted(RECORDS)])
def test_records_rerun_to_their_leaders(key):
    # reproducibility: the recorded search settings (seed, restarts, moves; no deadline)
    # give the recorded cosets again
    assert RECORDS[key].rerun() == RECORDS[key].leaders
