"""The heuristic kernels (``heur_*`` in codesearch._kernels) against their pure-Python twins."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from codesearch import _kernels as K
from codesearch import _reference as R
from codesearch.search import _wordspace as ws

# small cells: (q, n) with q^n <= 256 so the twins stay quick
cells = st.sampled_from([(2, 3), (2, 5), (2, 6), (2, 8), (3, 3), (3, 4), (4, 3), (5, 3)])


def _pattern_args(q, n, r):
    empty = np.empty(0, dtype=np.int64)
    if q == 2:
        return ws.ball_masks(n, r), np.zeros(1, dtype=np.int64), empty, empty
    return (empty,) + ws.ball_patterns(q, n, r)


@given(cells, st.integers(0, 2**40), st.integers(0, 2**40))
def test_index_distance_matches_digits(cell, a, b):
    q, n = cell
    x, y = a % q**n, b % q**n
    assert K.heur_index_dist(x, y, q, n) == R.heur_index_dist(x, y, q, n)


@given(st.integers(1, 2**63 - 1))
def test_rng_matches_twin(seed):
    state = np.array([seed], dtype=np.uint64)
    twin = [seed]
    for _ in range(20):
        assert int(K.heur_rand(state)) == R.heur_rand(twin)
    for bound in (1, 2, 7, 1000, 2**40):
        assert K.heur_randint(state, bound) == R.heur_randint(twin, bound)


@given(cells, st.sampled_from([0, 1]))
def test_order_is_a_bijection_matching_twin(cell, kind):
    q, n = cell
    empty = np.empty(0, dtype=np.int64)
    seq = [K.heur_order_at(t, kind, q, n, empty) for t in range(q**n)]
    assert seq == [R.heur_order_at(t, kind, q, n, None) for t in range(q**n)]
    assert sorted(seq) == list(range(q**n))
    if kind == 1:
        # a Gray code: consecutive words differ in exactly one coordinate
        assert all(R.heur_index_dist(seq[i], seq[i + 1], q, n) == 1 for i in range(len(seq) - 1))


def _kernel_greedy(q, n, d, kind, perm):
    space = q**n
    pw = ws.powers(q, n)
    blocked = np.zeros((space + 63) // 64, dtype=np.uint64)
    out = np.empty(space, dtype=np.int64)
    masks, ptr, pos, add = _pattern_args(q, n, d - 1)
    # two chunks, to exercise resuming a scan
    half = space // 2
    if q == 2:
        c = K.heur_greedy_mark_binary(0, half, kind, n, perm, masks, blocked, out, 0)
        c = K.heur_greedy_mark_binary(half, space, kind, n, perm, masks, blocked, out, c)
    else:
        c = K.heur_greedy_mark_qary(0, half, kind, q, n, pw, perm, ptr, pos, add, blocked, out, 0)
        c = K.heur_greedy_mark_qary(half, space, kind, q, n, pw, perm, ptr, pos, add, blocked,
                                    out, c)
    return out[:c].tolist()


@given(cells, st.integers(1, 4), st.sampled_from([0, 1, 2]), st.integers(0, 1000))
def test_greedy_marking_matches_pairwise_twin(cell, d, kind, seed):
    q, n = cell
    d = min(d, n)
    perm = np.random.default_rng(seed).permutation(q**n).astype(np.int64)
    if kind != 2:
        perm = np.empty(0, dtype=np.int64)
    assert _kernel_greedy(q, n, d, kind, perm) == R.heur_greedy(q, n, d, kind, perm)


@given(cells, st.integers(1, 4), st.integers(1, 2**62))
def test_greedy_sample_matches_twin(cell, d, seed):
    q, n = cell
    d = min(d, n)
    out = np.empty(q**n, dtype=np.int64)
    rng = np.array([seed], dtype=np.uint64)
    fails = np.zeros(1, dtype=np.int64)
    c = 0
    for _ in range(10_000):  # small draw budgets per call: resuming must not change the result
        c = K.heur_greedy_sample(q, n, d, q**n, 20, 3, fails, rng, out, c)
        if fails[0] >= 20 or c == q**n:
            break
    assert out[:c].tolist() == R.heur_greedy_sample(q, n, d, q**n, 20, [seed], q**n)


@given(cell=cells, d=st.integers(2, 4), seed=st.integers(1, 2**62), m=st.integers(1, 30),
       cut=st.integers(0, 30))
def test_ball_counts_added_in_slices_match_the_twin(cell, d, seed, m, cut):
    # the local search fills its ball counts in slices under the clock: any split gives the
    # counts of the definition (twin: codesearch._reference.heur_ball_counts)
    q, n = cell
    d = min(d, n)
    m = min(m, q**n)
    cut = min(cut, m)
    words = np.random.default_rng(seed).choice(q**n, m, replace=False).astype(np.int64)
    masks, ptr, pos, add = _pattern_args(q, n, d - 1)
    counts = np.zeros(q**n, dtype=np.uint16)
    pw = ws.powers(q, n)
    K.heur_local_add_balls(q, n, 0, cut, words, pw, masks, ptr, pos, add, counts)
    K.heur_local_add_balls(q, n, cut, m, words, pw, masks, ptr, pos, add, counts)
    assert counts.tolist() == R.heur_ball_counts(words, q, n, d)


@pytest.mark.parametrize("mode", [1, 2])
@given(cell=cells, d=st.integers(2, 4), seed=st.integers(1, 2**62), m=st.integers(2, 30))
def test_local_search_keeps_exact_conflict_counts(mode, cell, d, seed, m):
    q, n = cell
    d = min(d, n)
    space = q**n
    m = min(m, space)
    pw = ws.powers(q, n)
    words = np.zeros(m + 1, dtype=np.int64)
    words[:m] = np.random.default_rng(seed).choice(space, m, replace=False)
    conf = np.zeros(m + 1, dtype=np.int32)
    masks, ptr, pos, add = _pattern_args(q, n, d - 1)
    if mode == 2:
        masks, ptr, pos, add = (np.empty(0, dtype=np.int64), np.zeros(1, dtype=np.int64),
                                np.empty(0, dtype=np.int64), np.empty(0, dtype=np.int64))
    counts = np.zeros(space if mode == 1 else 0, dtype=np.uint16)
    tabu = np.full(6, -1, dtype=np.int64)
    tabu[0] = 0
    rng = np.array([seed], dtype=np.uint64)
    total = K.heur_local_init(q, n, d, m, words, conf, mode, pw, masks, ptr, pos, add, counts)
    for _ in range(3):
        twin_conf = R.heur_conflicts(words[:m], q, n, d)
        assert conf[:m].tolist() == twin_conf
        assert total == sum(twin_conf) // 2
        if mode == 1:
            assert counts.tolist() == R.heur_ball_counts(words[:m], q, n, d)
        total, _ = K.heur_local_steps(q, n, d, space, m, words, conf, total, mode, pw, masks, ptr,
                                      pos, add, counts, tabu, rng, 3, 7)
    if m < space:
        total += K.heur_local_grow(q, n, d, space, m, words, conf, mode, pw, masks, ptr, pos,
                                   add, counts, rng, 5)
        twin_conf = R.heur_conflicts(words[:m + 1], q, n, d)
        assert conf[:m + 1].tolist() == twin_conf
        assert total == sum(twin_conf) // 2
