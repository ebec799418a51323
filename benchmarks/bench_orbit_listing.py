"""Orbit listing at n = 24 (group cyclic:0-20*mul:4:0-20): codesearch.compute_orbits against
scipy.sparse.csgraph.connected_components on the generator graph (edges r -> g(r)).

Run each side in its own process, alternating, for wall time and peak memory:

    for r in 1 2 3; do for w in ours scipy; do
        /usr/bin/time -f "%M KB" python benchmarks/bench_orbit_listing.py $w; done; done

The peer gets the generator images from codesearch's index arithmetic (its own share of the
work is building the sparse graph and finding its components); both print the orbit count.
"""
import sys, time, numpy as np
from codesearch.search import groups as G
n = 24
grp = G.parse_group("cyclic:0-20*mul:4:0-20", 2, n)
which = sys.argv[1]
if which == "ours":
    G.compute_orbits(G.parse_group("cyclic", 2, 8))  # kernels loaded before the clock
    t = time.perf_counter(); o = G.compute_orbits(grp, max_words=1 << 26); dt = time.perf_counter() - t
    print(which, f"{dt:.2f}", o.count)
else:
    from scipy.sparse import csr_matrix
    from scipy.sparse.csgraph import connected_components
    t = time.perf_counter()
    N = 1 << n
    rows = np.concatenate([np.arange(N)] * len(grp.generators))
    cols = np.concatenate([G._binary_image(g, n) for g in grp.generators])
    m = csr_matrix((np.ones(rows.size, dtype=np.int8), (rows, cols)), shape=(N, N))
    k, labels = connected_components(m, directed=True, connection="weak")
    dt = time.perf_counter() - t
    print(which, f"{dt:.2f}", k)
