"""The verifier against well-known codes and against the slow reference twins."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import _reference as ref
from codesearch import verify
from codesearch.errors import VerificationError
from codesearch.model import Code, Params

import known_codes as kc


def test_hamming_7_4_weight_enumerator():
    # 1 + 7z^3 + 7z^4 + z^7 (MacWilliams & Sloane, ch. 1, from memory)
    rep = verify.check_code(kc.hamming_7_4(), d=3)
    assert rep.linear and rep.dimension == 4
    assert rep.weight_distribution == [1, 0, 0, 7, 7, 0, 0, 1]
    assert rep.min_distance == 3 and rep.valid


def test_extended_golay_weights():
    # 1, 759, 2576, 759, 1 words of weight 0, 8, 12, 16, 24 (MacWilliams & Sloane ch. 2, from memory)
    rep = verify.check_code(kc.golay_24(), d=8)
    wd = rep.weight_distribution
    assert {i: c for i, c in enumerate(wd) if c} == {0: 1, 8: 759, 12: 2576, 16: 759, 24: 1}
    assert rep.dimension == 12 and rep.min_distance == 8


def test_extended_golay_pairs_agree_with_weights():
    # the pairwise kernel must give M * A_i / 2 pairs at distance i for a linear code
    code = kc.golay_24()
    dist = verify.distance_distribution(code)
    wd = verify.check_code(code).weight_distribution
    assert dist == [0] + [4096 * a // 2 for a in wd[1:]]


def test_ternary_golay():
    # [11,6,5] with A_5 = 132, A_6 = 132, A_8 = 330, A_9 = 110, A_11 = 24 (from memory)
    rep = verify.check_code(kc.ternary_golay(), d=5)
    assert rep.dimension == 6 and rep.min_distance == 5
    assert {i: c for i, c in enumerate(rep.weight_distribution) if c} == {
        0: 1, 5: 132, 6: 132, 8: 330, 9: 110, 11: 24}


@pytest.mark.parametrize("m", [2, 3, 4, 5, 6])
def test_reed_muller_first_order(m):
    # RM(1,m) weights 0, 2^(m-1), 2^m (MacWilliams & Sloane ch. 13, from memory)
    rep = verify.check_code(kc.reed_muller_1(m))
    wd = {i: c for i, c in enumerate(rep.weight_distribution) if c}
    assert wd == {0: 1, 2 ** (m - 1): 2 ** (m + 1) - 2, 2**m: 1}


def test_nonlinear_code_detected():
    code = Code(np.array([[0, 0, 0], [1, 1, 0], [0, 1, 1]]), 2)  # size 3 is not a power of 2
    assert verify.check_code(code).linear is False
    words = kc.hamming_7_4().words.copy()
    words[5] ^= np.array([1, 1, 1, 0, 0, 0, 0], dtype=np.uint8)  # 16 words, not closed
    rep = verify.check_code(Code(words, 2))
    assert rep.linear is False and rep.dimension is None


def test_non_prime_alphabet_linearity_not_tested():
    rep = verify.check_code(Code(np.array([[0, 1], [2, 3]]), 4))
    assert rep.linear is None


def test_planted_close_pair_in_large_code():
    # a valid code (extended Golay), one word changed so it lies at distance 1 from another
    code = kc.golay_24().canonical()
    words = code.words.copy()
    words[3000] = words[17]
    words[3000, 5] ^= 1
    rep = verify.check_code(Code(words, 2), d=8)
    assert not rep.valid
    assert rep.min_distance == 1
    i, j, dist = rep.offending
    assert dist < 8 and {i, j} & {17, 3000}


def test_assert_code_raises_on_bad_code():
    with pytest.raises(VerificationError):
        verify.assert_code(kc.hamming_7_4(), Params(2, 7, 4))
    verify.assert_code(kc.hamming_7_4(), Params(2, 7, 3))
    with pytest.raises(VerificationError):
        verify.assert_code(kc.hamming_7_4(), Params(2, 8, 3))


def test_duplicates_reported():
    code = Code(np.array([[0, 1, 1], [0, 1, 1], [1, 0, 0]]), 2)
    rep = verify.check_code(code, d=1)
    assert rep.duplicates == 1 and rep.min_distance == 0 and not rep.valid


def test_generator_enumeration_matches_span():
    rng = np.random.default_rng(7)
    for q, k, n in [(2, 6, 13), (3, 4, 9), (5, 3, 7), (2, 10, 70)]:
        gen = rng.integers(0, q, (k, n)).astype(np.uint8)
        rep = verify.check_generator(gen, q)
        assert rep.weight_distribution == ref.linear_weight_distribution(
            ref_basis(gen, q), q) if q**k <= 4096 else True
        full = kc.span(gen, q)
        assert rep.size == full.size
        assert rep.weight_distribution == verify.check_code(full).weight_distribution


def ref_basis(gen, q):
    rows = []
    for r in gen:
        if ref.gf_rank(np.array(rows + [r]), q) == len(rows) + 1:
            rows.append(r)
    return np.array(rows)


def test_generator_dimension_24_enumerates():
    # k = 24 codewords (16.7 million) through the Gray-code kernel
    rng = np.random.default_rng(3)
    gen = np.hstack([np.eye(24, dtype=np.uint8), rng.integers(0, 2, (24, 16)).astype(np.uint8)])
    rep = verify.check_generator(gen, 2)
    assert rep.size == 2**24 and sum(rep.weight_distribution) == 2**24


# ------------------------------------------------------------------ kernels against twins
@st.composite
def random_codes(draw):
    q = draw(st.integers(2, 9))
    n = draw(st.integers(1, 70))
    m = draw(st.integers(0, 40))
    seed = draw(st.integers(0, 2**32 - 1))
    rng = np.random.default_rng(seed)
    return Code(rng.integers(0, q, (m, n)), q)


@given(random_codes())
def test_distance_distribution_equals_twin(code):
    assert verify.distance_distribution(code) == ref.distance_distribution(code.words)


@given(random_codes(), st.integers(0, 30))
def test_first_close_pair_equals_twin(code, below):
    assert verify.first_close_pair(code, below) == ref.first_close_pair(code.words, below)


@given(random_codes())
def test_rank_equals_twin(code):
    from codesearch import _kernels

    if code.size == 0 or not verify.is_prime(code.q):
        return
    words = np.array(code.words)
    assert _kernels.gf_rank(words, code.q, code.n) == ref.gf_rank(words, code.q)


@given(st.integers(2, 3), st.integers(1, 4), st.integers(1, 7), st.integers(0, 2**31))
def test_generator_kernel_equals_twin(q, k, n, seed):
    gen = np.random.default_rng(seed).integers(0, q, (k, n)).astype(np.uint8)
    basis = ref_basis(gen, q)
    if basis.size == 0:
        return
    assert verify.check_generator(gen, q).weight_distribution == ref.linear_weight_distribution(basis, q)
