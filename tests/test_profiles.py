"""The profile-moment bound for d = 3, 4 (codesearch.bounds.profiles) and its checker
(codesearch.verify.profile_lp).

References (outside the project):
- Extended Hamming codes [2^m, 2^m - m - 1, 4] and their shortenings, built from the definition
  of the Hamming code (MacWilliams-Sloane ch. 1, from memory): real distance-4 codes whose words
  must all have admissible profiles and whose moments must match the identities.
- Greedy (lexicographic) codes of distance 4 in a random word order: real codes of odd length.
- Published value A(20,3) = A(21,4) <= 43688 (data/published_binary.csv, from memory of the
  published tables); Delsarte's LP gives 43690.
"""

from __future__ import annotations

import copy
from fractions import Fraction

import numpy as np
import pytest

from codesearch.errors import InputError
from codesearch.model import Params
from codesearch.verify import check_certificate
from codesearch.verify.profile_lp import (
    FAMILIES,
    intersection_number,
    profile_program,
    profiles,
)
from tests.known_codes import hamming


def _extended_hamming(m: int) -> list[int]:
    """Words of the extended Hamming code of length 2^m as integers (bit i = coordinate i)."""
    words = []
    for row in hamming(m).words:
        w = sum(int(b) << i for i, b in enumerate(row))
        words.append(w | ((bin(w).count("1") & 1) << (2**m - 1)))
    return words


def _shorten(words: list[int], N: int, times: int) -> list[int]:
    """Keep the words that vanish on the last ``times`` coordinates, then drop those."""
    keep = (1 << (N - times)) - 1
    return [w for w in words if w & ~keep == 0]


def _greedy_even(N: int, seed: int) -> list[int]:
    """A distance-4 code of even words, greedy over the even words in a random order."""
    rng = np.random.default_rng(seed)
    order = [x for x in rng.permutation(2**N).tolist() if bin(x).count("1") % 2 == 0]
    code: list[int] = []
    for x in order:
        if all(bin(x ^ c).count("1") >= 4 for c in code):
            code.append(x)
    return code


def _codes():
    h8, h16 = _extended_hamming(3), _extended_hamming(4)
    return [
        (8, h8),
        (12, _shorten(h16, 16, 4)),
        (13, _shorten(h16, 16, 3)),
        (11, _shorten(h16, 16, 5)),
        (9, _greedy_even(9, 1)),
        (10, _greedy_even(10, 2)),
        (11, _greedy_even(11, 3)),
    ]


def _profiles_of(N: int, code: list[int]) -> tuple[np.ndarray, np.ndarray]:
    """counts[s, x] = number of codewords at distance s from x, and the distance distribution."""
    space = np.arange(2**N, dtype=np.int64)
    pop = np.array([bin(x).count("1") for x in range(2**N)])
    counts = np.zeros((N + 1, 2**N), dtype=np.int64)
    for c in code:
        np.add.at(counts, (pop[space ^ c], space), 1)
    dist = np.zeros(N + 1, dtype=np.int64)
    for c in code:
        dist += np.bincount(pop[np.array(code) ^ c], minlength=N + 1)
    return counts, dist


@pytest.mark.parametrize("N, code", _codes(), ids=lambda v: str(v) if isinstance(v, int) else "")
def test_real_codes_have_admissible_profiles_and_the_moments(N, code):
    assert min(bin(a ^ b).count("1") for i, a in enumerate(code) for b in code[:i]) >= 4
    assert all(bin(c).count("1") % 2 == 0 for c in code)
    counts, dist = _profiles_of(N, code)
    M = len(code)
    prog = profile_program(N, ("odd", "even"))
    parity = np.array([bin(x).count("1") & 1 for x in range(2**N)])
    for f, odd in (("odd", 1), ("even", 0)):
        coords = FAMILIES[f]
        allowed = set(profiles(N, f))
        words = np.flatnonzero(parity == odd)
        seen = {tuple(int(counts[s, x]) for s in coords) for x in words}
        assert seen <= allowed, sorted(seen - allowed)[:5]
        for j, m in enumerate(prog.monomials[f]):
            total = sum(int(np.prod([counts[coords[a], x] for a in m])) for x in words)
            # sum_x m(profile(x)) = M (constant + sum_h A_h coeff_h), A_h = dist_h / M
            expect = M * prog.constant[f][j] + sum(
                int(dist[h]) * prog.coeff[f][j][h] for h in prog.distances)
            assert total == expect, (f, m)


def test_intersection_numbers_by_counting():
    N = 7
    pop = [bin(x).count("1") for x in range(2**N)]
    for h in range(N + 1):
        w = (1 << h) - 1
        for s in range(N + 1):
            for t in range(N + 1):
                brute = sum(1 for x in range(2**N) if pop[x] == s and pop[x ^ w] == t)
                assert intersection_number(N, h, s, t) == brute


@pytest.fixture(scope="module")
def a21():
    from codesearch.bounds.profiles import profile_lp

    return profile_lp(Params(2, 21, 4))


def test_published_value_a21_4(a21):
    assert a21 is not None and a21.certified and a21.value == 43688  # published (from memory)
    ok, value, _ = check_certificate(a21.certificate)
    assert ok and value == 43688
    from codesearch.bounds.profiles import profile_lp

    b = profile_lp(Params(2, 20, 3))  # the same program through A(20,3) = A(21,4)
    assert b is not None and b.value == 43688 and check_certificate(b.certificate)[0]


def test_tampered_certificates_are_rejected(a21):
    cert = a21.certificate
    lower = dict(cert, value=43687)
    assert check_certificate(lower)[0] is False
    bad = copy.deepcopy(cert)
    fam = bad["profiles"][0]["mu"]
    key = next(iter(fam))
    fam[key] = str(Fraction(fam[key]) * 2)
    assert check_certificate(bad)[0] is False
    neg = dict(cert, **{"lambda": "-1"})
    assert check_certificate(neg)[0] is False
    wrong_top = copy.deepcopy(cert)
    wrong_top["top"]["y"][0] = "0"
    assert check_certificate(wrong_top)[0] is False
    with pytest.raises(InputError):
        check_certificate({k: v for k, v in cert.items() if k != "y"})
    with pytest.raises(InputError):
        check_certificate(dict(cert, top=dict(cert["top"], n=22)))
    with pytest.raises(InputError):
        check_certificate(dict(cert, profiles=[{"family": "odd", "mu": {"5": "1"}}]))
    with pytest.raises(InputError):
        check_certificate(dict(cert, d=5))


@pytest.mark.parametrize("N, size", [(12, 128), (11, 64), (13, 256)])
def test_no_certificate_below_a_real_code(N, size):
    """A real code of ``size`` words (shortened extended Hamming) has admissible profiles and
    the moment identities, so the LP's dual at any U below it cannot prove A(N,4) <= U."""
    from codesearch.bounds.delsarte import delsarte_lp_plus
    from codesearch.bounds.profiles import profile_certificate

    code = _shorten(_extended_hamming(4), 16, 16 - N)
    assert len(code) == size
    top = delsarte_lp_plus(Params(2, N, 4)).certificate
    for U in (size - 1, size // 2):
        cert = profile_certificate(N, 4, U, top)
        assert cert is None or check_certificate(cert)[0] is False


def test_cells_outside_the_range():
    from codesearch.bounds.profiles import profile_lp

    assert profile_lp(Params(2, 21, 5)) is None
    assert profile_lp(Params(3, 21, 4)) is None
    assert profile_lp(Params(2, 6, 3)) is None
