"""Minimum distance of linear codes by information sets, against enumeration and known codes."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import _kernels as K
from codesearch import _reference as ref
from codesearch import verify

import known_codes as kc


@st.composite
def generators(draw, max_k=5, max_n=11):
    q = draw(st.sampled_from([2, 3, 5]))
    k = draw(st.integers(1, max_k))
    n = draw(st.integers(k, max_n))
    seed = draw(st.integers(0, 2**31))
    rows = np.random.default_rng(seed).integers(0, q, (k, n)).astype(np.uint8)
    return q, rows


@given(generators(max_k=4, max_n=9), st.integers(1, 4))
def test_row_sum_kernels_equal_twin(gen, w):
    q, rows = gen
    w = min(w, rows.shape[0])
    if q == 2:
        got = K.least_weight_of_row_sums_binary(K.pack_words(rows, 2), w, 99)
    else:
        got = K.least_weight_of_row_sums_prime(rows.astype(np.int64), q, w, 99)
    assert got == ref.least_weight_of_row_sums(rows, q, w, 99)


@given(generators())
def test_min_distance_equals_enumeration(gen):
    q, rows = gen
    basis = verify.linear._row_basis(rows, q)
    if basis.shape[0] == 0:
        return
    weights = ref.linear_weight_distribution(basis, q)
    expected = next((i for i in range(1, len(weights)) if weights[i]), None)
    got = verify.linear_min_distance(basis, q)
    if expected is None:
        return
    assert got == expected


@pytest.mark.parametrize("q,rows", [
    (2, kc.reed_muller_generator(2, 6)),
    (3, kc.ternary_golay().words),
])
def test_forms_are_disjoint_and_span_the_code(q, rows):
    basis = verify.linear._row_basis(rows, q)
    k = basis.shape[0]
    forms = verify.information_set_forms(basis, q)
    assert forms[0][1] == k
    seen: set[int] = set()
    for form, rank, pivots in forms:
        both = np.ascontiguousarray(np.vstack([basis, form.astype(np.uint8)]))
        assert K.gf_rank(both, q, 2 * k) == k  # same span
        assert np.array_equal(form[:rank][:, pivots], np.eye(rank, dtype=np.int64))
        assert not form[rank:][:, pivots].any()
        assert not seen & set(pivots)
        seen |= set(pivots)


@pytest.mark.parametrize("r,m", [(1, 5), (1, 8), (2, 6), (2, 7), (3, 6)])
def test_reed_muller_distance(r, m):
    # RM(r,m) has minimum distance 2^(m-r) (MacWilliams & Sloane, ch. 13, from memory);
    # RM(2,7) has dimension 29, beyond what listing all codewords does quickly.
    rep = verify.check_generator(kc.reed_muller_generator(r, m), 2, method="information-sets")
    assert rep.min_distance == 2 ** (m - r) and rep.method == "information-sets"
    assert rep.distance_distribution is None and rep.weight_distribution is None


def test_golay_codes():
    # extended binary Golay [24,12,8], ternary Golay [11,6,5] (see known_codes for sources)
    # all codewords given as rows: the check reduces them to a basis first
    rep = verify.check_generator(kc.golay_24().words, 2, method="information-sets")
    assert rep.min_distance == 8 and rep.dimension == 12
    rep = verify.check_generator(kc.ternary_golay().words, 3, method="information-sets")
    assert rep.min_distance == 5 and rep.dimension == 6


def test_claim_below_stops_early_and_fails():
    rep = verify.check_generator(kc.reed_muller_generator(2, 7), 2, d=33,
                                 method="information-sets")
    assert not rep.valid and rep.min_distance is not None and rep.min_distance < 33


def test_cli_min_only(tmp_path):
    path = tmp_path / "rm27.txt"
    path.write_text("\n".join("".join(map(str, row))
                              for row in kc.reed_muller_generator(2, 7)) + "\n")
    out = subprocess.run([sys.executable, "-m", "codesearch", "check", str(path), "--generator",
                          "--min-only", "--json", "--d", "32"], capture_output=True, text=True)
    assert out.returncode == 0, out.stderr
    obj = json.loads(out.stdout.strip().splitlines()[-1])
    assert obj["min_distance"] == 32 and obj["distance_distribution"] is None
    assert obj["dimension"] == 29 and obj["valid"]
