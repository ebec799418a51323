"""Prescribed-symmetry (orbit) search: group specs, orbits, the orbit graph, the searcher."""

from __future__ import annotations

import itertools
import math

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import _reference as ref
from codesearch import verify
from codesearch.errors import InputError, ParameterError
from codesearch.model import Code, Params
from codesearch.results import Status
from codesearch.search import groups, orbit, search

import known_codes as kc


# ------------------------------------------------------------------------------ orbit counts
def _necklaces(n: int, q: int) -> int:
    # Burnside's lemma for the cyclic group: (1/n) sum_{e | n} phi(e) q^(n/e) (common practice).
    return sum(_phi(e) * q ** (n // e) for e in range(1, n + 1) if n % e == 0) // n


def _phi(m: int) -> int:
    return sum(1 for k in range(1, m + 1) if math.gcd(k, m) == 1)


def _bracelets(n: int, q: int) -> int:
    # Burnside's lemma for the dihedral group (common practice):
    # N = necklaces/2 + (q+1)/4 q^(n/2) for n even, necklaces/2 + q^((n+1)/2)/2 for n odd.
    if n % 2:
        return (_necklaces(n, q) + q ** ((n + 1) // 2)) // 2
    return (2 * _necklaces(n, q) + (q + 1) * q ** (n // 2)) // 4


@pytest.mark.parametrize("n", range(1, 11))
def test_cyclic_orbits_count_necklaces(n):
    for q in (2, 3) if n <= 7 else (2,):
        o = groups.compute_orbits(groups.parse_group("cyclic", q, n))
        assert o.count == _necklaces(n, q)
        assert o.sizes.sum() == q**n


@pytest.mark.parametrize("n", range(3, 11))
def test_dihedral_orbits_count_bracelets(n):
    o = groups.compute_orbits(groups.parse_group("cyclic*rev", 2, n))
    assert o.count == _bracelets(n, 2)


def test_blockwise_symmetric_orbits_are_weight_profiles():
    # Under S_4 x S_3 x S_1 a binary word's orbit is fixed by its weight on each block:
    # (4+1)(3+1)(1+1) orbits (common practice).
    o = groups.compute_orbits(groups.parse_group("sym:0-3,4-6", 2, 8))
    assert o.count == 5 * 4 * 2


def test_rm1_translations_give_cosets():
    # RM(1,4) has 32 words and weights 0, 8, 16 (MacWilliams & Sloane ch. 13, from memory);
    # its cosets split the 2^16 words into 2048 orbits of size 32.
    g = groups.parse_group("rm1", 2, 16)
    o = groups.compute_orbits(g)
    assert o.count == 2048 and set(o.sizes.tolist()) == {32}
    zero_orbit = o.words[o.order[o.starts[0]:o.starts[1]]]
    rm = kc.reed_muller_1(4)
    assert sorted(zero_orbit.sum(axis=1).tolist()) == sorted(rm.words.sum(axis=1).tolist())
    # punctured form for n = 15: 1024 cosets of the [15,5,7] code
    o15 = groups.compute_orbits(groups.parse_group("rm1", 2, 15))
    assert o15.count == 1024


@pytest.mark.parametrize("spec", ["cyclic", "cyclic:0-6*mul:2:0-6", "rev*rep",
                                  "perm:(0 9 3)(1 2)*scale", "rm1", "sym:0-3,4-9",
                                  "gray:2:010123,103210*cyclic:0-1"])
def test_binary_images_computed_on_indices_match_the_word_table(spec):
    # The binary fast path permutes / translates the bits of each index; the word table path
    # applies the generator to explicit words: both must give the same image of every word.
    n = 15 if spec == "rm1" else 10
    group = groups.parse_group(spec, 2, n)
    words = groups.all_words(2, n)
    from codesearch import _kernels

    fused = np.arange(2**n, dtype=np.int64)
    by_table = np.arange(2**n, dtype=np.int64)
    for g in group.generators:
        image = groups.encode(g.apply(words, 2), 2)
        assert np.array_equal(groups._binary_image(g, n), image)
        # the union-find that computes images on the fly joins the same pairs
        _kernels.orbit_union_binary(fused, *groups._binary_tables(g, n))
        _kernels.orbit_union(by_table, np.ascontiguousarray(image, dtype=np.int64))
    assert np.array_equal(_kernels.orbit_flatten(fused)[0], _kernels.orbit_flatten(by_table)[0])
    o = groups.compute_orbits(group)
    assert np.array_equal(o.rows(np.arange(2**n)), words)
    assert np.array_equal(o.planes()[0], groups.encode(words, 2).astype(np.uint64))


def _generator_graph_components(group: groups.Group) -> list[set[int]]:
    # networkx as an outside oracle: orbits are the connected components of the graph with an
    # edge w -- g(w) for every word w and generator g.
    words = groups.all_words(group.q, group.n)
    graph = nx.Graph()
    graph.add_nodes_from(range(words.shape[0]))
    for g in group.generators:
        img = groups.encode(g.apply(words, group.q), group.q)
        graph.add_edges_from(zip(range(words.shape[0]), img.tolist()))
    return [set(c) for c in nx.connected_components(graph)]


@given(
    q=st.sampled_from([2, 3]),
    n=st.integers(2, 6),
    data=st.data(),
)
def test_orbits_equal_generator_graph_components(q, n, data):
    nperm = data.draw(st.integers(0, 2))
    factors = []
    for _ in range(nperm):
        perm = data.draw(st.permutations(range(n)))
        cycles = "".join(f"({a} {b})" for a, b in zip(range(n), perm) if a < b and perm[b] == a)
        if cycles:
            factors.append(f"perm:{cycles}")
    if data.draw(st.booleans()):
        factors.append("cyclic")
    if data.draw(st.booleans()):
        row = "".join(str(data.draw(st.integers(0, q - 1))) for _ in range(n))
        factors.append(f"span:{row}")
    if q == 3 and data.draw(st.booleans()):
        factors.append("scale")
    group = groups.parse_group("*".join(factors) or "id", q, n)
    o = groups.compute_orbits(group)
    mine = sorted(sorted(o.order[o.starts[k]:o.starts[k + 1]].tolist()) for k in range(o.count))
    theirs = sorted(sorted(c) for c in _generator_graph_components(group))
    assert mine == theirs
    # each representative is its orbit's least index
    assert all(o.reps[k] == o.order[o.starts[k]:o.starts[k + 1]].min() for k in range(o.count))


# ------------------------------------------------------------------------------ specs
def test_known_codes_are_invariant_under_their_groups():
    # The Hamming [7,4] code from g(x) = 1 + x + x^3 and the Golay codes are cyclic; the ternary
    # Golay code is linear, so closed under scalar multiples (MacWilliams & Sloane, from memory).
    assert groups.is_invariant(kc.hamming_7_4(), groups.parse_group("cyclic", 2, 7))
    assert groups.is_invariant(kc.golay_23(), groups.parse_group("cyclic", 2, 23))
    assert groups.is_invariant(kc.ternary_golay(), groups.parse_group("cyclic*scale", 3, 11))
    # a linear code is a union of cosets of (here: equal to) its own span
    rm = kc.reed_muller_1(4)
    assert groups.is_invariant(rm, groups.parse_group("rm1", 2, 16))
    assert not groups.is_invariant(kc.hamming_7_4(), groups.parse_group("rep*perm:(0 1)", 2, 7))


def test_spec_parsing_builds_the_right_permutations():
    g = groups.parse_group("cyclic:0-2,3-5", 2, 7)
    assert g.generators[0].data.tolist() == [1, 2, 0, 4, 5, 3, 6]
    g = groups.parse_group("rev:1-4", 2, 6)
    assert g.generators[0].data.tolist() == [0, 4, 3, 2, 1, 5]
    g = groups.parse_group("mul:2:0-4", 2, 5)
    assert g.generators[0].data.tolist() == [0, 2, 4, 1, 3]
    g = groups.parse_group("perm:(0 2)(1 3 4)", 2, 5)
    assert g.generators[0].data.tolist() == [2, 3, 0, 4, 1]
    g = groups.parse_group("scale", 5, 3)
    assert g.generators[0].data.tolist() == [0, 2, 4, 1, 3]  # 2 is the least primitive root mod 5
    assert groups.parse_group("id", 2, 4).generators == ()


@pytest.mark.parametrize("spec", [
    "", "cyclic:0-9", "cyclic:3-1", "sym", "mul:2", "mul:x:0-3", "perm:(0 1", "perm:(0 0)",
    "perm:(0 9)", "scale", "rm1", "span:101", "span:", "frob", "cyclic**rev", "sym:0-3,2-5",
    "gray:2:0123", "gray:1:0123", "gray:x:0123", "gray:0:012", "gray:2:2033", "gray:2",
])
def test_bad_specs_raise_parameter_error(spec):
    # q = 4 (not prime: 'scale' refused), n = 6 (not 2^m or 2^m - 1: 'rm1' refused),
    # 'mul:2' on length 6 (gcd 2)
    with pytest.raises(InputError):
        groups.parse_group(spec, 4, 6)


def test_span_from_file(tmp_path):
    f = tmp_path / "sub.txt"
    f.write_text("# a subcode\n1100\n0011\n")
    g = groups.parse_group("span:@" + str(f), 2, 4)
    assert groups.compute_orbits(g).count == 4
    with pytest.raises(InputError, match="sub.txt:2"):
        f.write_text("1100\n110\n")
        g = groups.parse_group("span:@" + str(f), 2, 4)
    with pytest.raises(InputError):
        groups.parse_group("span:@" + str(tmp_path / "missing.txt"), 2, 4)


# ------------------------------------------------------------------------------ graph
def _all_distances(words: np.ndarray) -> np.ndarray:
    """Full distance matrix by broadcasting (independent of the project's kernels)."""
    return (words[:, None, :] != words[None, :, :]).sum(axis=2)


def _orbit_tables(params: Params, spec: str):
    """Admissible orbits and their compatibility, from all pairwise distances."""
    o = groups.compute_orbits(groups.parse_group(spec, params.q, params.n))
    dist = _all_distances(o.words.astype(np.int64))
    members = [o.order[o.starts[k]:o.starts[k + 1]] for k in range(o.count)]

    def far(a, b):
        sub = dist[np.ix_(a, b)]
        if a is b:
            sub = sub + np.eye(len(a), dtype=np.int64) * (params.n + 1)
        return sub.min() >= params.d

    admissible = [k for k in range(o.count) if far(members[k], members[k])]
    compat = {(a, b): far(members[a], members[b]) for a in admissible for b in admissible
              if a != b}
    return o, members, admissible, compat


@given(q=st.sampled_from([2, 3]), n=st.integers(3, 6), d=st.integers(2, 4), data=st.data())
def test_orbit_graph_matches_all_pairs(q, n, d, data):
    n = min(n, 4) if q == 3 else n
    d = min(d, n)
    spec = data.draw(st.sampled_from(["cyclic", "cyclic*rev", "rep", "id", "cyclic:0-1"]))
    params = Params(q, n, d)
    g = orbit.orbit_graph(params, groups.parse_group(spec, q, n))
    _, _, admissible, compat = _orbit_tables(params, spec)
    assert g.kept.tolist() == admissible
    for i, a in enumerate(g.kept):
        for j, b in enumerate(g.kept):
            if i != j:
                assert g.adj[i, j] == compat[(a, b)]
    assert not g.adj.diagonal().any()


@given(total=st.integers(1, 60), ngens=st.integers(0, 3), seed=st.integers(0, 10**6))
def test_union_find_orbit_kernels_match_the_reference(total, ngens, seed):
    # Random permutations of 0..total-1 as generators: the kernels' labels, grouping and
    # representatives equal those of a breadth-first search over the generator graph.
    from codesearch import _kernels

    rng = np.random.default_rng(seed)
    images = [rng.permutation(total).astype(np.int64) for _ in range(ngens)]
    parent = np.arange(total, dtype=np.int64)
    for img in images:
        _kernels.orbit_union(parent, img)
    order, starts, reps = _kernels.orbit_flatten(parent)
    label, order_ref, starts_ref, reps_ref = ref.orbit_labels(images or [np.arange(total)])
    assert parent.tolist() == label
    assert order.tolist() == order_ref and starts.tolist() == starts_ref
    assert reps.tolist() == reps_ref


@given(data=st.data())
def test_inner_distance_kernel_equals_twin(data):
    # The admissibility test's kernel (distances from each orbit's first word) against all
    # pairs inside each orbit, which is the same minimum only for orbits of a group of
    # isometries: so the orbits here are true orbits, of random permutation groups on words.
    from codesearch import _kernels

    q = data.draw(st.sampled_from([2, 3]))
    n = data.draw(st.integers(2, 6))
    nperm = data.draw(st.integers(1, 2))
    # random cycles on the coordinates, written as a perm spec (a fixed point is allowed)
    specs = []
    for _ in range(nperm):
        points = data.draw(st.permutations(range(n)))
        cut = data.draw(st.integers(2, n))
        specs.append("perm:(" + " ".join(map(str, points[:cut])) + ")")
    spec = "*".join(specs) + ("*rep" if q == 2 else "*scale")
    group = groups.parse_group(spec, q, n)
    o = groups.compute_orbits(group)
    planes = (np.zeros((0, 0), dtype=np.uint64) if o.stored is None
              else o.planes())
    fast = _kernels.orbit_inner_distance(planes, o.order, o.starts, n)
    assert fast.tolist() == ref.orbit_inner_distance(planes, o.order, o.starts, n)


@given(data=st.data())
def test_adjacency_kernel_equals_twin(data):
    from codesearch import _kernels

    nplanes = data.draw(st.integers(1, 2))
    nwords = data.draw(st.integers(2, 40))
    planes = np.array(data.draw(st.lists(st.lists(st.integers(0, 2**12 - 1), min_size=nwords,
                                                  max_size=nwords), min_size=nplanes,
                                         max_size=nplanes)), dtype=np.uint64)
    cuts = sorted(set(data.draw(st.lists(st.integers(1, nwords - 1), max_size=6))))
    starts = np.array([0, *cuts, nwords], dtype=np.int64)
    words = np.array(data.draw(st.permutations(range(nwords))), dtype=np.int64)
    reps = np.array([words[s] for s in starts[:-1]], dtype=np.int64)
    d = data.draw(st.integers(1, 8))
    k = reps.size
    fast = np.zeros((k, k), dtype=np.uint8)
    slow = np.zeros((k, k), dtype=np.uint8)
    _kernels.orbit_adjacency_rows(np.ascontiguousarray(planes), reps, words, starts, d, 0, k, fast)
    ref.orbit_adjacency_rows(planes, reps, words, starts, d, 0, k, slow)
    assert np.array_equal(fast, slow)


# ------------------------------------------------------------------------------ search
def _check(result, params, spec):
    assert result.status in (Status.FEASIBLE, Status.UNKNOWN)
    assert not result.optimal
    verify.assert_code(result.code, params)
    assert groups.is_invariant(result.code, groups.parse_group(spec, params.q, params.n))
    # invariance again, generator by generator, straight from the definition
    words = {tuple(w) for w in result.code.words.tolist()}
    for g in groups.parse_group(spec, params.q, params.n).generators:
        img = g.apply(np.asarray(result.code.words), params.q)
        assert {tuple(w) for w in img.tolist()} == words


def _largest_invariant_by_brute_force(params: Params, spec: str) -> int:
    """Largest union of orbits with minimum distance >= d: every clique of compatible
    admissible orbits, enumerated exhaustively."""
    _, members, admissible, compat = _orbit_tables(params, spec)
    best = 0

    def grow(chosen: list[int], rest: list[int], weight: int) -> None:
        nonlocal best
        best = max(best, weight)
        for i, v in enumerate(rest):
            if all(compat[(u, v)] for u in chosen):
                grow(chosen + [v], rest[i + 1:], weight + len(members[v]))

    grow([], admissible, 0)
    return best


@pytest.mark.parametrize("q,n,d,spec", [
    (2, 5, 3, "cyclic"), (2, 6, 3, "cyclic*rev"), (2, 5, 2, "rep"), (3, 4, 3, "cyclic*scale"),
    (2, 6, 4, "sym:0-2,3-5"), (2, 4, 2, "cyclic"),
])
def test_small_cells_agree_with_brute_force(q, n, d, spec):
    params = Params(q, n, d)
    res = search(params, "orbit", group=spec)
    _check(res, params, spec)
    assert res.settings["invariant_optimal"]
    assert res.size == _largest_invariant_by_brute_force(params, spec)


def test_trivial_group_reaches_known_small_values():
    # With the trivial group the orbit search is an exact clique search on the whole space:
    # A(6,3) = 8, A(5,2) = 2^4 (A_q(n,2) = q^(n-1)), A_3(4,3) = 9 (ternary Hamming code,
    # perfect), all from memory / closed forms.
    for (q, n, d), value in {(2, 6, 3): 8, (2, 5, 2): 16, (3, 4, 3): 9}.items():
        res = search(Params(q, n, d), "orbit", group="id")
        assert res.size == value and res.settings["invariant_optimal"]


def test_hamming_7_4_found_as_cyclic_code():
    # The [7,4,3] Hamming code is cyclic and perfect: 2^7 / (1 + 7) = 16 words (sphere packing).
    params = Params(2, 7, 3)
    res = search(params, "orbit", group="cyclic")
    _check(res, params, "cyclic")
    assert res.size == 16


def test_nordstrom_robinson_as_union_of_rm1_cosets():
    # A(16,6) = 256, met by the Nordstrom-Robinson code, a union of 8 cosets of RM(1,4)
    # (MacWilliams & Sloane ch. 2 section 8 and ch. 15, from memory).
    params = Params(2, 16, 6)
    res = search(params, "orbit", group="rm1", time_limit=60)
    _check(res, params, "rm1")
    assert res.size == 256 and res.settings["orbits_used"] == 8


# ------------------------------------------------------------------------------ Gray group
#: The Gray map of Z4 (Hammons, Kumar, Calderbank, Sloane and Sole, IEEE Trans. IT 40, 1994):
#: 0 -> 00, 1 -> 01, 2 -> 11, 3 -> 10, an isometry from the Lee metric to the Hamming metric.
_GRAY_PAIRS = {0: (0, 0), 1: (0, 1), 2: (1, 1), 3: (1, 0)}


def _gray(vec: list[int], a: int) -> tuple[int, ...]:
    out = list(vec[:a])
    for z in vec[a:]:
        out.extend(_GRAY_PAIRS[z % 4])
    return tuple(out)


@given(a=st.integers(0, 3), b=st.integers(1, 3), data=st.data())
def test_gray_translation_is_addition_in_z2_z4_through_the_gray_map(a, b, data):
    # straight from the definition: Gray(x + t) for every x in Z2^a x Z4^b
    t = data.draw(st.lists(st.integers(0, 1), min_size=a, max_size=a)) + \
        data.draw(st.lists(st.integers(0, 3), min_size=b, max_size=b))
    g = groups.gray_translation(t, a)
    xs = list(itertools.product(*([range(2)] * a + [range(4)] * b)))
    words = np.array([_gray(list(x), a) for x in xs], dtype=np.uint8)
    sums = np.array([_gray([(xi + ti) % (2 if i < a else 4) for i, (xi, ti) in
                            enumerate(zip(x, t))], a) for x in xs], dtype=np.uint8)
    assert np.array_equal(g.apply(words, 2), sums)
    n = a + 2 * b
    if n <= 12:  # the fast binary path agrees with the word table
        assert np.array_equal(groups._binary_image(g, n),
                              groups.encode(g.apply(groups.all_words(2, n), 2), 2))


@pytest.mark.parametrize("spec", ["gray:2:2120", "gray:1:01200", "gray:2:01201", "gray:2:0140",
                                  "gray:7:0120", "gray:2:", "gray:a:0120", "gray:2:0120,012"])
def test_bad_gray_specs_name_the_problem(spec):
    # n = 6: A = 2 binary coordinates and at most 2 Z4 symbols per row; one line naming the
    # factor
    with pytest.raises(ParameterError, match="gray"):
        groups.parse_group(spec, 2, 6)
    assert len(groups.parse_group("gray:2:0120", 2, 6).generators) == 1
    # a shorter Gray part leaves the last coordinates fixed
    g = groups.parse_group("gray:2:013", 2, 6).generators[0]
    words = groups.all_words(2, 6)
    image = g.apply(words, 2)
    assert np.array_equal(image[:, 4:], words[:, 4:])
    assert np.array_equal(image[:, :4], groups.gray_translation([0, 1, 3], 2).apply(
        np.ascontiguousarray(words[:, :4]), 2))


def test_gray_group_of_the_octacode_gives_the_nordstrom_robinson_code():
    # The Nordstrom-Robinson code is the Gray image of the octacode, a Z4-linear code of
    # length 8 with 256 words and Lee distance 6, and A(16,6) = 256 (Hammons et al. 1994;
    # MacWilliams & Sloane ch. 15, from memory). The octacode's generator is the extended
    # cyclic code from the Hensel lift of x^3 + x + 1 (the library's kerdock_z4(3), rebuilt
    # here from its rows); the orbit of the zero word is the NR code, and no other orbit fits.
    from codesearch.constructions.z4 import kerdock_z4

    rows = ",".join("".join(str(int(v)) for v in r) for r in kerdock_z4(3))
    spec = f"gray:0:{rows}"
    g = groups.parse_group(spec, 2, 16)
    o = groups.compute_orbits(g)
    assert o.count == 2**16 // 256 and set(o.sizes.tolist()) == {256}
    params = Params(2, 16, 6)
    res = search(params, "orbit", group=spec, time_limit=60)
    _check(res, params, spec)
    assert res.size == 256 and verify.min_distance(res.code) == 6
    assert res.settings["invariant_optimal"]


def test_heuristic_mode_is_reproducible_and_never_optimal():
    params = Params(2, 12, 4)
    a = search(params, "orbit", group="cyclic", mode="heuristic", seed=7, restarts=30)
    b = search(params, "orbit", group="cyclic", mode="heuristic", seed=7, restarts=30)
    _check(a, params, "cyclic")
    assert a.code == b.code and a.seed == 7
    assert a.settings["invariant_optimal"] is False


def test_bad_options_raise():
    params = Params(2, 7, 3)
    with pytest.raises(ParameterError):
        search(params, "orbit", group="cyclic", mode="fast")
    with pytest.raises(ParameterError):
        search(params, "orbit", group="cyclic", restarts=-1)
    with pytest.raises(ParameterError):
        search(params, "orbit", group="cyclic", colour="red")
    with pytest.raises(ParameterError, match="limit"):
        search(Params(2, 23, 7), "orbit", group="cyclic")
    with pytest.raises(ParameterError, match="admissible orbits"):
        search(Params(2, 16, 2), "orbit", group="cyclic", max_orbits=100)


def test_no_admissible_orbit_gives_unknown():
    # Every coset of the span of 1100 holds two words at distance 2 < d = 4: nothing admissible.
    res = search(Params(2, 4, 4), "orbit", group="span:1100")
    assert res.status is Status.UNKNOWN and res.code is None


# ------------------------------------------------------------------------------ clique heuristics
@given(k=st.integers(1, 14), density=st.floats(0.2, 0.9), seed=st.integers(0, 10**6))
def test_heuristics_return_cliques_no_heavier_than_networkx(k, density, seed):
    rng = np.random.default_rng(seed)
    upper = np.triu(rng.random((k, k)) < density, 1)
    adj = upper | upper.T
    w = rng.integers(1, 20, k)
    graph = nx.Graph()
    graph.add_nodes_from((v, {"weight": int(w[v])}) for v in range(k))
    graph.add_edges_from(zip(*np.nonzero(upper)))
    _, exact = nx.max_weight_clique(graph, weight="weight")  # networkx as the outside oracle
    greedy, _ = orbit.heuristic_clique(adj, w, restarts=5, seed=seed, deadline=None)
    tabu, _ = orbit.tabu_clique(adj, w, greedy, iterations=300, seed=seed, deadline=None)
    for clique in (greedy, tabu):
        assert len(set(clique)) == len(clique)
        assert all(adj[a, b] for a in clique for b in clique if a != b)
        assert int(w[clique].sum()) <= exact
    assert int(w[tabu].sum()) >= int(w[greedy].sum())
    again, _ = orbit.tabu_clique(adj, w, greedy, iterations=300, seed=seed, deadline=None)
    assert again == tabu


def test_sparse_mode_finds_the_nordstrom_robinson_code():
    # A(16,6) = 256, the Nordstrom-Robinson code, a union of 8 cosets of RM(1,4) (see above;
    # from memory). The sparse mode finds it without the orbit graph.
    params = Params(2, 16, 6)
    res = search(params, "orbit", group="rm1", mode="sparse", size=256, time_limit=120)
    _check(res, params, "rm1")
    assert res.size == 256
    assert res.settings["invariant_optimal"] is False
    assert res.settings["clique_engine"].startswith("implicit")


def test_sparse_mode_past_the_orbit_limit_and_reproducible():
    # The dense graph refuses (limit 1 admissible orbit); the sparse mode ignores the limit.
    # The [7,4,3] Hamming code is cyclic and perfect (16 = 2^7 / 8, sphere packing), so 16
    # is the most any code can have.
    params = Params(2, 7, 3)
    with pytest.raises(ParameterError, match="admissible orbits"):
        search(params, "orbit", group="cyclic", max_orbits=1)
    res = search(params, "orbit", group="cyclic", mode="sparse", max_orbits=1, seed=3)
    _check(res, params, "cyclic")
    assert res.size == 16
    a = search(Params(2, 12, 4), "orbit", group="cyclic", mode="sparse", seed=5, iterations=500)
    b = search(Params(2, 12, 4), "orbit", group="cyclic", mode="sparse", seed=5, iterations=500)
    _check(a, Params(2, 12, 4), "cyclic")
    assert a.code == b.code and a.settings["iterations"] == b.settings["iterations"] <= 500
    with pytest.raises(ParameterError, match="q = 2"):
        search(Params(3, 4, 3), "orbit", group="cyclic", mode="sparse")


def test_heuristic_modes_spend_the_time_limit_they_are_given():
    # Without a time limit the sparse tabu stops after the default move count; with one (and
    # no explicit iterations) it moves until the deadline, so a longer budget is not cut
    # short at 20000 moves. An explicit iterations still caps the run. The code is checked
    # as everywhere in this file (distance by the independent checker, invariance).
    params = Params(2, 12, 4)
    capped = search(params, "orbit", group="cyclic", mode="sparse", seed=1)
    assert capped.settings["iterations"] == orbit.DEFAULT_ITERATIONS
    timed = search(params, "orbit", group="cyclic", mode="sparse", seed=1, time_limit=2)
    _check(timed, params, "cyclic")
    assert timed.settings["iterations"] > orbit.DEFAULT_ITERATIONS
    explicit = search(params, "orbit", group="cyclic", mode="sparse", seed=1, time_limit=2,
                      iterations=300)
    assert explicit.settings["iterations"] <= 300
    heur = search(params, "orbit", group="cyclic", mode="heuristic", seed=1, time_limit=1)
    _check(heur, params, "cyclic")
    assert heur.settings["iterations"] > 0


@given(data=st.data())
def test_sparse_mode_returns_invariant_codes_no_larger_than_the_exact_search(data):
    n = data.draw(st.integers(5, 9))
    d = data.draw(st.integers(3, 4))
    spec = data.draw(st.sampled_from(["cyclic", "cyclic*rep", "cyclic*rev"]))
    seed = data.draw(st.integers(0, 1000))
    params = Params(2, n, d)
    sparse = search(params, "orbit", group=spec, mode="sparse", seed=seed, iterations=300)
    exact = search(params, "orbit", group=spec, time_limit=2)
    if sparse.code is None:
        assert exact.code is None
        return
    _check(sparse, params, spec)
    if exact.settings["invariant_optimal"]:
        assert sparse.size <= exact.size


def test_size_option_stops_at_the_target():
    params = Params(2, 10, 4)
    res = search(params, "orbit", group="cyclic", size=30)
    _check(res, params, "cyclic")
    assert res.size >= 30 and res.target == 30 and res.exists is True


def test_bitsets_layout():
    rng = np.random.default_rng(5)
    for k in (1, 63, 64, 65, 130):
        upper = np.triu(rng.random((k, k)) < 0.5, 1)
        adj = upper | upper.T
        bits = orbit.bitsets(adj)
        assert bits.dtype == np.uint64 and bits.shape == (k, (k + 63) // 64)
        for i, j in itertools.product(range(k), repeat=2):
            assert bool((int(bits[i, j >> 6]) >> (j & 63)) & 1) == adj[i, j]
        try:
            from codesearch.search.clique import bitsets_from_dense
        except ImportError:
            continue
        assert np.array_equal(bits, bitsets_from_dense(adj))


def test_importing_orbit_modules_loads_no_numba():
    import subprocess
    import sys

    code = ("import sys, codesearch, codesearch.search.groups, codesearch.search.orbit, "
            "codesearch.search.auto; assert 'numba' not in sys.modules, 'numba imported'")
    subprocess.run([sys.executable, "-c", code], check=True)


def test_public_api_of_the_orbit_modules():
    assert sorted(orbit.__all__) == sorted(["OPTIONS", "run", "OrbitGraph", "orbit_graph",
                                           "heuristic_clique", "tabu_clique", "bitsets",
                                           "sparse_orbit_search"])
    assert sorted(groups.__all__) == sorted([
        "Generator", "Group", "Orbits", "parse_group", "all_words", "encode", "compute_orbits",
        "is_invariant", "DEFAULT_MAX_WORDS", "orbit_memory", "gray_translation"])
    assert orbit.OPTIONS == {"group", "mode", "restarts", "iterations", "size", "max_words",
                             "max_orbits"}
