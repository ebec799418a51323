"""Large binary codes: the linear-time checks against their twins and the definition, the
store's generator form, the migration of version-1 stores, and the improvement log."""

from __future__ import annotations

import sqlite3

import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import _kernels
from codesearch import _reference as ref
from codesearch import verify
from codesearch.errors import InputError, VerificationError
from codesearch.model import Code, LinearCode, Params
from codesearch.store import SCHEMA_VERSION, Store

import known_codes as kc


def _as_ints(code: Code) -> np.ndarray:
    return np.ascontiguousarray(_kernels.pack_words(code.words, 2)[:, 0])


@st.composite
def binary_sets(draw):
    """Small binary codes, half of them linear spans (random generator rows), some with
    duplicates."""
    n = draw(st.integers(1, 12))
    seed = draw(st.integers(0, 2**31))
    rng = np.random.default_rng(seed)
    if draw(st.booleans()):
        k = draw(st.integers(0, min(n, 6)))
        gen = rng.integers(0, 2, (k, n))
        coeffs = np.array([[(i >> j) & 1 for j in range(k)] for i in range(2**k)]).reshape(2**k, k)
        words = (coeffs @ gen) % 2
        rng.shuffle(words)
    else:
        words = rng.integers(0, 2, (draw(st.integers(1, 40)), n))
    return Code(words, 2)


@given(binary_sets())
def test_span_check_equals_twin(code):
    basis = np.zeros(64, dtype=np.uint64)
    got = tuple(int(v) for v in _kernels.binary_span_check(_as_ints(code), basis))
    assert got == ref.binary_span_check([int(w) for w in _as_ints(code)])
    # the basis spans the words (rank of basis + words = rank)
    rows = np.array([[(int(b) >> j) & 1 for j in range(code.n)] for b in basis[: got[0]]],
                    dtype=np.uint8).reshape(got[0], code.n)
    both = np.vstack([rows, code.words])
    assert ref.gf_rank(both, 2) == got[0] == ref.gf_rank(rows, 2)


@given(binary_sets(), st.integers(1, 5))
def test_ball_clash_equals_twin(code, d):
    words = _as_ints(code)
    r = (d - 1) // 2
    ball = np.array([m for m in range(2**code.n) if bin(m).count("1") <= r], dtype=np.uint64)
    probe = np.array([m for m in range(2**code.n) if bin(m).count("1") == r + 1]
                     if d % 2 == 0 else [], dtype=np.uint64)
    clash = int(_kernels.binary_ball_clash(words, code.n, ball, probe)) >= 0
    assert clash == ref.binary_ball_clash([int(w) for w in words], r, d % 2 == 0)


def _shortened_hamming(n: int) -> LinearCode:
    """[n, n - 5] binary code with distance 3: parity checks are the distinct nonzero 5-bit
    columns (a shortened Hamming code, MacWilliams-Sloane Ch. 1 section 7), n <= 31."""
    cols = [c for c in range(1, 32) if c & (c - 1)][: n - 5]  # the non-unit columns first
    k = n - 5
    gen = np.zeros((k, n), dtype=np.uint8)
    for i, c in enumerate(cols):
        gen[i, i] = 1
        gen[i, k:] = [(c >> b) & 1 for b in range(5)]
    return LinearCode(gen, 2)


def test_large_linear_code_checked_as_a_space():
    code = _shortened_hamming(20).words()  # 2^15 words, d = 3
    assert verify.check_cost(code, 3)[0] == "linear"
    method, basis = verify.assert_large_binary(code, 3)
    assert method == "linear" and basis.shape == (15, 20)
    with pytest.raises(VerificationError):
        verify.assert_code(code, Params(2, 20, 4))  # it has weight-3 words


def test_large_nonlinear_code_checked_on_a_bitmap():
    code = _shortened_hamming(18).words()  # 8192 words
    words = np.array(code.words)
    # a translate of half the code keeps distance 3 (translation is an isometry)
    half = words[: 4096] ^ np.eye(18, dtype=np.uint8)[0]
    nonlinear = Code(np.vstack([words[4096:], half[:100]]), 2)
    assert verify.assert_large_binary(Code(words[1:], 2), 3)[0] == "bitmap"
    close = Code(np.vstack([words[1:], words[5] ^ np.eye(18, dtype=np.uint8)[[0]]
                                                 ^ np.eye(18, dtype=np.uint8)[[1]]]), 2)
    with pytest.raises(VerificationError):
        verify.assert_code(close, Params(2, 18, 3))
    # distance 3 = 2r + 1 pairs caught by the probe for even d
    with pytest.raises(VerificationError):
        verify.assert_code(Code(words[1:], 2), Params(2, 18, 4))
    verify.assert_code(nonlinear, Params(2, 18, 1))


def test_even_distance_on_the_bitmap():
    # The even-weight words of a distance-3 linear code form a code of distance 4 (odd
    # distances cannot occur between even words; MacWilliams-Sloane Ch. 1). Without its zero
    # word it is not linear, so the bitmap path (with the radius-2 probe) checks it.
    words = np.array(_shortened_hamming(20).words().words)
    even = words[words.sum(axis=1) % 2 == 0]
    code = Code(even[1:], 2)
    assert verify.assert_large_binary(code, 4)[0] == "bitmap"
    with pytest.raises(VerificationError):
        verify.assert_code(code, Params(2, 20, 5))


def test_store_keeps_large_linear_codes_as_generators(tmp_path):
    lin = _shortened_hamming(20)
    p = Params(2, 20, 3)
    with Store(tmp_path / "s.sqlite") as s:
        a = s.add_code(lin, p, method="construction")
        b = s.add_code(lin.words(), p, method="lexicode")  # same code, listed: no new row
        assert a == b and s.counts()["codes"] == 1
        blob_len = s.rows("codes")[0][6]
        assert len(blob_len) == 15 * 3  # 15 rows of 3 bytes, not 2^15 words
        _, stored = s.get_stored(a)
        assert isinstance(stored, LinearCode) and stored.k == 15
        assert s.get_code(a)[1].size == 2**15
        with pytest.raises(InputError):
            s.get_code(a, max_words=1000)
        assert s.audit() == []


def test_version_1_store_is_migrated(tmp_path):
    path = tmp_path / "old.sqlite"
    with Store(path) as s:
        s.add_code(kc.hamming_7_4(), Params(2, 7, 3), method="exact")
    con = sqlite3.connect(path)  # make it a version-1 store: the old tables only
    con.execute("DROP TABLE improvements")
    con.execute("DROP TABLE cell_log")
    con.execute("CREATE TABLE c2 AS SELECT id,q,n,d,size,digest,words,method,status,seed,"
                "settings,provenance,version,machine,seconds,created FROM codes")
    con.execute("DROP TABLE codes")
    con.execute("ALTER TABLE c2 RENAME TO codes")
    con.execute("PRAGMA user_version = 1")
    con.commit()
    con.close()
    with Store(path) as s:
        assert s.summary(Params(2, 7, 3)).lower == 16
        assert s.best_code(Params(2, 7, 3)).size == 16
        assert s.counts()["improvements"] == 0
    con = sqlite3.connect(path)
    assert con.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    con.close()


def test_improvements_are_logged(tmp_path):
    p = Params(2, 7, 3)
    with Store(tmp_path / "s.sqlite") as s:
        before = s.summary(p)
        s.add_code(Code(np.array(kc.hamming_7_4().words)[:8], 2), p, method="greedy")
        assert s.log_improvements(before, seconds=1.0, budget=5.0) == [("lower", None, 8)]
        before = s.summary(p)
        s.add_code(kc.hamming_7_4(), p, method="exact")
        assert s.log_improvements(before, seconds=2.0) == [("lower", 8, 16)]
        assert [r["method"] for r in s.improvements(p)] == ["greedy", "exact"]


def test_export_generator_form(tmp_path):
    from codesearch.cli import main
    from codesearch.codefile import read_generator

    lin = _shortened_hamming(20)
    path = str(tmp_path / "s.sqlite")
    with Store(path) as s:
        s.add_code(lin, Params(2, 20, 3), method="construction")
    out = tmp_path / "g.code"
    assert main(["export", "20", "3", "--store", path, "--out", str(out), "--generator"]) == 0
    rows, q, _ = read_generator(str(out))
    assert rows.shape == (15, 20) and verify.check_generator(rows, q, 3).valid
    words = tmp_path / "w.code"
    assert main(["export", "20", "3", "--store", path, "--out", str(words)]) == 0
    assert len([ln for ln in words.read_text().splitlines() if not ln.startswith("#")]) == 2**15


@st.composite
def qary_sets(draw):
    q = draw(st.integers(3, 5))
    n = draw(st.integers(1, 5))
    m = draw(st.integers(1, 30))
    rng = np.random.default_rng(draw(st.integers(0, 2**31)))
    return Code(rng.integers(0, q, (m, n)), q)


@given(qary_sets(), st.integers(1, 5))
def test_qary_ball_clash_equals_twin(code, d):
    from codesearch.verify.codes import qary_ball_patterns

    q, n = code.q, code.n
    idx = np.ascontiguousarray(code.words.astype(np.int64) @ (q ** np.arange(n, dtype=np.int64)))
    clash = int(_kernels.qary_ball_clash(idx, q, n, *qary_ball_patterns(q, n, d))) >= 0
    assert clash == ref.qary_ball_clash(code.words, (d - 1) // 2, d % 2 == 0)


def test_large_qary_code_on_the_bitmap():
    # The ternary Hamming [13,10,3] code shortened to length 9 (MacWilliams-Sloane Ch. 6):
    # 3^6 = 729 words, too few; its direct sum with the full space GF(3)^2 of distance 1
    # would have d = 1. Instead: all 3^9 words of GF(3)^9 with digit sum 0 mod 3 form a
    # [9,8,2] code (6561 words), past the pair limit.
    words = np.array([w for w in np.ndindex(*(3,) * 9) if sum(w) % 3 == 0], dtype=np.uint8)
    code = Code(words, 3)
    assert verify.check_cost(code, 2)[0] == "bitmap"
    verify.assert_code(code, Params(3, 9, 2))
    with pytest.raises(VerificationError):
        verify.assert_code(code, Params(3, 9, 3))
