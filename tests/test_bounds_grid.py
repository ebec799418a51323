"""Cell relations across a grid of bounds, and the ``relation-chain`` certificate checker.

References (outside the project):
- MacWilliams and Sloane (1977), Ch. 1 and Ch. 17 section 1: A(n,d) <= 2 A(n-1,d),
  A(n,2t-1) = A(n+1,2t), monotonicity in n and d.
- Published lower values in data/published_binary.csv (sources named per row there).
- Best et al., IEEE Trans. Inform. Theory 24 (1978), and the tables after them: A(18,4) <= 6552
  and A(19,4) <= 13104 (from memory), the latter being twice the former.
"""

from __future__ import annotations

import copy
import csv
import json
import os

import pytest

from codesearch import verify
from codesearch.bounds import all_bounds, certificate_of, grid_bounds
from codesearch.cli import main
from codesearch.errors import InputError
from codesearch.model import Params

_DATA = os.path.join(os.path.dirname(__file__), "..", "data", "published_binary.csv")


def _published_lower() -> dict[tuple[int, int], int]:
    out = {}
    with open(_DATA, encoding="utf-8") as fh:
        for row in csv.DictReader(line for line in fh if not line.startswith("#")):
            if row["q"] == "2" and row["lower"]:
                out[(int(row["n"]), int(row["d"]))] = int(row["lower"])
    return out


@pytest.fixture(scope="module")
def grid_16_18():
    cells = [Params(2, n, 4) for n in (17, 18, 19)]
    return grid_bounds(cells, all_bounds)


def test_doubling_reaches_the_published_a19_4(grid_16_18):
    cell = grid_16_18[Params(2, 19, 4)]
    assert cell.upper.value == 13104  # published (from memory), = 2 * 6552
    assert cell.upper.method == "relation:times-q-shorter"
    assert cell.kind == "relation-chain"
    assert [(p.n, p.d, v) for p, v in cell.cites] == [(18, 4, 6552)]
    cert = certificate_of(cell, grid_16_18)
    ok, bound, reason = verify.check_certificate(cert)
    assert ok and bound == 13104, reason


def _tampered(cert):
    c = copy.deepcopy(cert)
    yield "lower claim", dict(c, value=13103)
    bad = copy.deepcopy(c)
    bad["cites"][0]["value"] = 6551
    yield "cited value below its proof", bad
    bad = copy.deepcopy(c)
    bad["rule"] = "longer"
    yield "wrong rule", bad
    bad = copy.deepcopy(c)
    bad["cites"][0]["certificate"]["lp"]["y"][0] = "0/1"
    yield "nested certificate altered", bad
    bad = copy.deepcopy(c)
    bad["cites"][0]["n"] = 17
    yield "wrong cited cell", bad


def test_tampered_relation_certificates_are_rejected(grid_16_18):
    cert = certificate_of(grid_16_18[Params(2, 19, 4)], grid_16_18)
    for what, bad in _tampered(cert):
        try:
            ok, _, _ = verify.check_certificate(bad)
        except InputError:
            ok = False
        assert not ok, what


def test_theorem_certificates():
    assert verify.check_certificate({"kind": "theorem", "theorem": "hamming", "q": 2, "n": 7,
                                     "d": 3, "value": 16})[:2] == (True, 16)
    assert not verify.check_certificate({"kind": "theorem", "theorem": "hamming", "q": 2,
                                         "n": 7, "d": 3, "value": 15})[0]
    assert not verify.check_certificate({"kind": "theorem", "theorem": "plotkin", "q": 2,
                                         "n": 7, "d": 3, "value": 16})[0]


def test_grid_never_below_published_lower_values():
    lower = _published_lower()
    cells = [Params(2, n, d) for n in range(4, 17) for d in range(3, 9) if d <= n]
    result = grid_bounds(cells, lambda p: all_bounds(p, lp_fallback=False))
    for p, cell in result.items():
        assert cell.upper.value >= lower.get((p.n, p.d), 0), p
        # each cell's upper bound is at most its own least bound, and relations hold
        own = min(b.value for b in cell.bounds.values() if b.usable)
        assert cell.upper.value <= own
        if p.n - 1 >= p.d and Params(2, p.n - 1, p.d) in result:
            assert cell.upper.value <= 2 * result[Params(2, p.n - 1, p.d)].upper.value


def test_cli_grid_names_rule_and_cells(tmp_path, capsys):
    pattern = str(tmp_path / "c_{n}_{d}.json")
    assert main(["bounds", "18..19", "4", "--certificate", pattern]) == 0
    out = capsys.readouterr().out
    assert "relation:times-q-shorter" in out and "relation-chain" in out
    assert "A(19,4) <= 13104: times-q-shorter from A(18,4) <= 6552" in out
    assert main(["check", str(tmp_path / "c_19_4.json")]) == 0
    assert main(["check", str(tmp_path / "c_18_4.json")]) == 0
    assert main(["bounds", "18..19", "4", "--json", "--no-relations"]) == 0
    rows = [json.loads(line) for line in capsys.readouterr().out.splitlines()
            if line.startswith("{")]
    assert rows[-1]["upper"] > 13104 and "relation" not in rows[-1]


# ------------------------------------------------------ integral distance distributions
def test_distance_enumeration_proves_a9_4():
    from codesearch.bounds.integral import distance_enumeration, size_is_impossible

    # A(9,4) = 20 (Best et al. 1978; MacWilliams-Sloane App. A, from memory): the LP with
    # constant-weight rows gives 21, integrality and parity of the distance distribution 20.
    res = distance_enumeration(Params(2, 9, 4))
    assert res.value == 20 and res.certificate["kind"] == "distance-enumeration"
    ok, bound, reason = verify.check_certificate(res.certificate)
    assert ok and bound == 20, reason
    # a code of size 20 exists, so size 20 must not be ruled out (soundness)
    from codesearch.bounds.integral import _caps

    assert size_is_impossible(9, 4, 20, _caps(9, 4)) is False
    assert not verify.check_certificate(dict(res.certificate, value=19))[0]
    assert distance_enumeration(Params(2, 8, 3)).value == 20  # A(8,3) = A(9,4)


def test_distance_enumeration_never_below_known_codes():
    from codesearch.bounds.integral import _caps, size_is_impossible

    # sizes of codes that exist (MacWilliams-Sloane App. A, from memory; Hamming, RM, NR):
    # none may be declared impossible
    for n, d, m in [(8, 4, 16), (10, 4, 40), (12, 6, 24), (13, 6, 32), (16, 8, 32),
                    (10, 6, 6)]:
        assert size_is_impossible(n, d, m, _caps(n, d)) is False, (n, d)


def test_odd_size_cut():
    from codesearch.bounds.integral import odd_size

    # Published A(24,6) <= 24106 and A(17,6) <= 340 (Best et al. 1978 / Brouwer's table, from
    # memory); the LP gives 24107 and 341, both odd sizes.
    for n, d, want in [(24, 6, 24106), (17, 6, 340), (23, 5, 24106)]:
        res = odd_size(Params(2, n, d))
        assert res is not None and res.value == want
        ok, bound, reason = verify.check_certificate(res.certificate)
        assert ok and bound == want, reason
        assert not verify.check_certificate(dict(res.certificate, value=want - 1))[0]
    # an even LP floor gains nothing: A(16,8) = 32 (RM(1,4) with complements)
    assert odd_size(Params(2, 16, 8)) is None
    res = odd_size(Params(2, 24, 6))
    bad = copy.deepcopy(res.certificate)
    bad["lp"]["y"][0] = "0/1"
    try:
        assert not verify.check_certificate(bad)[0]
    except InputError:
        pass


def test_size_two_mod_four_fact_on_real_codes():
    # The fact behind the cut, on random even-weight codes of sizes 2 mod 4 (n = 8..10):
    # t_u = #{x : u.x odd} has the parity of u.sigma (sigma = sum of the words), and
    # b_k = sum_{wt u = k} S_u^2 >= 2 (C(n,k) + K_k(s)), s = wt(sigma) even.
    # Krawtchouk values from their definition as sign sums (Delsarte 1973; common practice).
    import itertools
    import math
    import random

    rng = random.Random(7)
    for n in (8, 9, 10):
        evens = [x for x in range(1 << n) if bin(x).count("1") % 2 == 0]
        for M in (2, 6, 10, 14, 22):
            code = rng.sample(evens, M)
            sigma = 0
            for x in code:
                sigma ^= x
            s = bin(sigma).count("1")
            assert s % 2 == 0
            for k in range(1, n + 1):
                b_k = 0
                n_even = 0
                kraw = 0
                for support in itertools.combinations(range(n), k):
                    u = sum(1 << j for j in support)
                    t_u = sum(bin(u & x).count("1") % 2 for x in code)
                    assert t_u % 2 == bin(u & sigma).count("1") % 2
                    b_k += (M - 2 * t_u) ** 2
                    kraw += (-1) ** bin(u & sigma).count("1")
                    n_even += bin(u & sigma).count("1") % 2 == 0
                assert 2 * n_even == math.comb(n, k) + kraw
                assert b_k >= 2 * (math.comb(n, k) + kraw), (n, M, k)


def test_size_two_mod_four_cut():
    from codesearch.bounds.integral import size_mod_4

    # Published A(22,6) <= 6941, A(27,6) <= 157285, A(28,6) <= 291269 (Brouwer's table, from
    # memory); the LP gives 6943, 157286, 291271 and the odd-size cut alone 6942, 157286,
    # 291270, all sizes 2 mod 4. Odd d through A(n+1, d+1) (MacWilliams-Sloane ch. 2).
    for n, d, want in [(22, 6, 6941), (21, 5, 6941), (27, 6, 157285), (26, 5, 157285),
                       (28, 6, 291269), (27, 5, 291269)]:
        res = size_mod_4(Params(2, n, d))
        assert res is not None and res.value == want and res.method == "lp-size-mod-4"
        ok, bound, reason = verify.check_certificate(res.certificate)
        assert ok and bound == want, reason
        assert not verify.check_certificate(dict(res.certificate, value=want - 1))[0]
    # never below a published lower value: A(24,6) >= 16384 (published table); the cut gives
    # 24105 there, one below the recalled upper value 24106 (see results_bounds_published.md)
    res = size_mod_4(Params(2, 24, 6))
    assert res.value == 24105 and res.value >= 16384
    # a floor that is 0 mod 4 gains nothing: A(16,8) = 32 (RM(1,4) with complements)
    assert size_mod_4(Params(2, 16, 8)) is None
    bad = copy.deepcopy(size_mod_4(Params(2, 22, 6)).certificate)
    bad["lp"]["y"][0] = "0/1"
    try:
        assert not verify.check_certificate(bad)[0]
    except InputError:
        pass


def test_four_point_request_is_refused_with_its_size(capsys):
    # past this machine: refused in one line naming the size, exit 2, nothing solved
    with pytest.raises(SystemExit) as exc:
        raise SystemExit(main(["bounds", "26", "8", "--four-point"]))
    assert exc.value.code == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "four-point SDP for A(26,8)" in err and "terms" in err
    with pytest.raises(SystemExit) as exc:
        raise SystemExit(main(["bounds", "31", "7", "--four-point"]))
    assert exc.value.code == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "A(32,8)" in err  # odd d through A(n+1, d+1)


@pytest.mark.slow
def test_published_grid_sound_and_every_certificate_rechecks():
    # the benchmark's grid (binary n = 4..28, d = 3..10 with the three-point SDP): no upper
    # bound below a published lower value, and the certificate written for each cell's upper
    # bound re-checks to that value
    lower = _published_lower()
    cells = [Params(2, n, d) for n in range(4, 29) for d in range(3, 11) if d <= n]
    result = grid_bounds(cells, lambda p: all_bounds(p, sdp=True))
    for p, cell in result.items():
        assert cell.upper.value >= lower.get((p.n, p.d), 0), p
        cert = certificate_of(cell, result)
        if cert is None:
            continue  # a closed form no checker recomputes, no computed bound of that value
        ok, bound, reason = verify.check_certificate(cert)
        assert ok and bound == cell.upper.value, (p, reason)
