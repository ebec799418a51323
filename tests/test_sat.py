"""SAT search (method ``sat``): encodings, refutations, agreement with networkx clique search.

References: A(6,3) = 8 and A(7,3) = 16 (the [7,4,3] Hamming code is perfect: sphere-packing
bound 2^7 / 8 = 16; A(6,3) = A(7,4) = 8 from the shortened code, MacWilliams & Sloane table,
from memory); A(8,3) = 20 and A(9,4) = 20 (published, MacWilliams & Sloane table, from memory);
the ternary [4,2,3] Hamming code is perfect, so A_3(4,3) = 3^4 / 9 = 9 (sphere packing);
networkx's exact maximum clique on the "distance >= d" graph as an independent computation.
"""

from __future__ import annotations

import itertools
import os

import networkx as nx
import pytest

from codesearch import verify
from codesearch.errors import ParameterError
from codesearch.model import Params
from codesearch.results import Status
from codesearch.search import METHODS, search
from codesearch.search import sat


def _clique_number(q: int, n: int, d: int) -> int:
    words = list(itertools.product(range(q), repeat=n))
    g = nx.Graph()
    g.add_nodes_from(range(len(words)))
    for i, j in itertools.combinations(range(len(words)), 2):
        if sum(a != b for a, b in zip(words[i], words[j])) >= d:
            g.add_edge(i, j)
    clique, size = nx.max_weight_clique(g, weight=None)
    return size


def test_registered_as_exhaustive():
    assert METHODS["sat"].exhaustive is True


@pytest.mark.parametrize("q,n,d", [(2, 4, 2), (2, 5, 3), (2, 6, 3), (2, 6, 4), (3, 3, 2),
                                   (3, 4, 3), (2, 5, 4)])
@pytest.mark.parametrize("symmetry", ["lex", "none"])
def test_agrees_with_networkx_clique(q, n, d, symmetry):
    p = Params(q, n, d)
    res = search(p, "sat", symmetry=symmetry)
    assert res.status is Status.OPTIMAL
    verify.assert_code(res.code, p)
    assert res.size == res.upper == _clique_number(q, n, d)


@pytest.mark.parametrize("symmetry", sat.SYMMETRY)
def test_refutes_9_words_for_6_3(symmetry):
    res = search(Params(2, 6, 3), "sat", size=9, symmetry=symmetry)
    assert res.status is Status.INFEASIBLE
    assert res.upper == 8 and res.exists is False and res.code is None
    assert len(res.settings["reductions"]) == sat.SYMMETRY.index(symmetry)


@pytest.mark.parametrize("symmetry", ["lex", "none"])
def test_refutes_17_words_for_7_3(symmetry):
    res = search(Params(2, 7, 3), "sat", size=17, symmetry=symmetry)
    assert res.status is Status.INFEASIBLE and res.upper == 16


@pytest.mark.parametrize("n,d", [(8, 3), (9, 4)])
def test_finds_20_word_codes(n, d):
    p = Params(2, n, d)
    res = search(p, "sat", size=20, time_limit=120)
    assert res.exists is True and res.size >= 20
    verify.assert_code(res.code, p)
    assert res.status is Status.FEASIBLE


def test_ternary_hamming_optimal():
    res = search(Params(3, 4, 3), "sat")
    assert res.status is Status.OPTIMAL and res.size == 9


def test_encoding_is_pure_and_counts_pairs():
    a = sat.encode(2, 5, 3, 4, "lex", 3)
    b = sat.encode(2, 5, 3, 4, "lex", 3)
    assert a.clauses == b.clauses and a.nvars == b.nvars
    base = sat.encode_base(2, 5, 3, "none")
    # one binary clause per pair at distance 1 or 2: 32 * (5 + 10) / 2
    assert len(base.clauses) == 32 * 15 // 2
    assert all(len(c) == 2 and c[0] < 0 and c[1] < 0 for c in base.clauses)


@pytest.mark.parametrize("encoding", sat.ENCODINGS)
def test_every_cardinality_encoding_agrees(encoding):
    assert search(Params(2, 6, 3), "sat", size=9, encoding=encoding).upper == 8
    assert search(Params(2, 6, 3), "sat", size=8, encoding=encoding).exists is True


@pytest.mark.parametrize("q,n,d,sizes", [(2, 6, 3, (2, 4, 5, 8)), (3, 4, 2, (3, 9, 18, 27)),
                                         (3, 4, 3, (2, 6, 9)), (4, 3, 2, (4, 16))])
def test_lex_leader_keeps_every_branch_answer(q, n, d, sizes):
    # branch by branch, the lex-leader formula is satisfiable iff the "pair" formula is
    from pysat.solvers import Solver

    for w in range(d, n + 1):
        for M in sizes:
            ans = []
            for level in ("pair", "lex"):
                enc = sat.encode(q, n, d, M, level, w)
                with Solver(name="cadical195", bootstrap_with=enc.clauses) as s:
                    ans.append(s.solve())
            assert ans[0] == ans[1], (w, M)


def test_proof_files_written(tmp_path):
    path = os.path.join(tmp_path, "a63.drat")
    res = search(Params(2, 6, 3), "sat", size=9, proof=path)
    assert res.status is Status.INFEASIBLE
    files = res.settings["proof_files"]
    assert len(files) == 2 * len(res.settings["branches_refuted"])
    for f in files:
        assert os.path.getsize(f) > 0
    cnf = [f for f in files if f.endswith(".cnf")][0]
    with open(cnf) as fh:
        assert fh.readline().startswith("p cnf")
    assert "symmetry-reduced" in res.settings["proof_scope"]


def test_time_limit_gives_unknown():
    # A(8,3) <= 20 is far beyond one second of SAT solving
    res = search(Params(2, 8, 3), "sat", size=21, time_limit=1.0)
    assert res.status is Status.UNKNOWN and res.exists is None and res.upper is None


def test_time_limit_without_size_keeps_best_code():
    p = Params(2, 8, 3)
    res = search(p, "sat", time_limit=3.0)
    verify.assert_code(res.code, p)
    assert res.status is Status.FEASIBLE and res.size <= 20


@pytest.mark.parametrize("opts", [
    {"proof": "x.drat"},
    {"symmetry": "all"},
    {"encoding": "magic"},
    {"solver": "nosuchsolver"},
    {"size": -3},
])
def test_bad_options(opts):
    with pytest.raises(ParameterError):
        search(Params(2, 6, 3), "sat", **opts)


def test_too_large_cell():
    with pytest.raises(ParameterError):
        search(Params(2, 20, 3), "sat", size=10)


@pytest.mark.slow
def test_refutes_21_words_for_8_3():
    # A(8,3) = 20 (published, MacWilliams & Sloane table, from memory): with symmetry breaking
    # the 21-word question is refuted in every minimum-distance branch
    res = search(Params(2, 8, 3), "sat", size=21)
    assert res.status is Status.INFEASIBLE and res.upper == 20
    assert res.settings["branches_refuted"] == [3, 4, 5, 6, 7, 8]


@pytest.mark.parametrize("q,n,d", [(2, 6, 3), (2, 7, 4), (3, 4, 3), (2, 8, 5)])
def test_agrees_with_exact_search(q, n, d):
    # the exact max-clique search lives in another module; compare when it is present
    pytest.importorskip("codesearch.search.exact")
    p = Params(q, n, d)
    a = search(p, "sat")
    b = search(p, "exact")
    assert a.status is b.status is Status.OPTIMAL
    assert a.size == b.size
