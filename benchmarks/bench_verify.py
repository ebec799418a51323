"""Distance-distribution speed and memory of the verifier, side by side with general tools.

Run: ``python benchmarks/bench_verify.py [--repeat 5]``. Every figure is a median over rounds
measured in this one run (each round runs every contender once, so load changes hit all
alike), and the ratios compare methods on the same code:

* numpy broadcasting: ``(x[i] != x[j:]).sum(1)`` per row, bincount (the plain check);
* numpy packed: words packed in uint64 planes, ``np.bitwise_count`` of XORs per row;
* a simple numba loop: one histogram, popcount per pair, one core;
* codesearch: ``verify.distance_distribution`` (packing included) on one core and on all cores;
* the popcount ceiling: a numba loop that only sums popcounts of XORs (no histogram), one core.

Memory: peak RSS (``/usr/bin/time -v``) of a process that computes the distance distribution of
a 2^17-word code of length 256, minus that of a process that only builds the same code (and
loads the kernel), against the size of the packed code.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import time

import numba as nb
import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "tests"))

from codesearch import _kernels as K  # noqa: E402
from codesearch import verify  # noqa: E402
from codesearch.model import Code  # noqa: E402


def timed(fn, repeat):
    times = []
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out


def numpy_broadcast(words, rows):
    n = words.shape[1]
    hist = np.zeros(n + 1, dtype=np.int64)
    for i in range(rows):
        hist += np.bincount((words[i + 1 :] != words[i]).sum(axis=1), minlength=n + 1)
    return hist


def numpy_packed(packed, planes, limbs, n):
    m = packed.shape[0]
    hist = np.zeros(n + 1, dtype=np.int64)
    for i in range(m - 1):
        x = packed[i + 1 :] ^ packed[i]
        acc = np.zeros(x.shape[0], dtype=np.int64)
        for l in range(limbs):
            y = x[:, l]
            for p in range(1, planes):
                y = y | x[:, p * limbs + l]
            acc += np.bitwise_count(y)
        hist += np.bincount(acc, minlength=n + 1)
    return hist


@nb.njit(cache=True)
def simple_numba(packed, planes, limbs, n):
    m = packed.shape[0]
    hist = np.zeros(n + 1, dtype=np.int64)
    for i in range(m):
        for j in range(i + 1, m):
            acc = 0
            for l in range(limbs):
                x = np.uint64(0)
                for p in range(planes):
                    x |= packed[i, p * limbs + l] ^ packed[j, p * limbs + l]
                acc += K.popcount64(x)
            hist[acc] += 1
    return hist


@nb.njit(cache=True)
def popcount_ceiling(col):
    m = col.shape[0]
    total = 0
    for i in range(m):
        a = col[i]
        for j in range(i + 1, m):
            total += K.popcount64(a ^ col[j])
    return total


def golay():
    import known_codes

    return known_codes.golay_24()


def bench_code(name, code, repeat, threads):
    m, n = code.size, code.n
    pairs = m * (m - 1) / 2
    planes, limbs = K.plane_count(code.q), K.limb_count(n)
    packed = K.pack_words(code.words, code.q)
    words = np.array(code.words)
    # plain numpy over a slice of rows when the whole triangle would take too long
    rows = min(m - 1, 1500)
    slice_pairs = sum(m - 1 - i for i in range(rows))
    simple_numba(packed[:10], planes, limbs, n)
    for th in threads:
        nb.set_num_threads(th)
        verify.distance_distribution(Code(code.words[:10], code.q))
    # Rounds: every contender runs once per round, so a change in machine load hits them all
    # alike; each figure is the median over the rounds.
    contenders = {
        "np": lambda: numpy_broadcast(words, rows),
        "pk": lambda: numpy_packed(packed, planes, limbs, n),
        "simple": lambda: simple_numba(packed, planes, limbs, n),
    }
    for th in threads:
        # the public path: packing (plane or interleaved layout) counted in the time
        contenders[th] = lambda: verify.distance_distribution(code)
    times = {key: [] for key in contenders}
    outs = {}
    for _ in range(repeat):
        for key, fn in contenders.items():
            if isinstance(key, int):
                nb.set_num_threads(key)
            t0 = time.perf_counter()
            outs[key] = fn()
            times[key].append(time.perf_counter() - t0)
    ref = outs["pk"]
    for key in ["simple", *threads]:
        assert (np.array(outs[key]) == ref).all()
    t_np, t_pk, t_simple = (statistics.median(times[k]) for k in ("np", "pk", "simple"))
    results = {th: statistics.median(times[th]) for th in threads}
    nb.set_num_threads(max(threads))
    rate = {
        "numpy broadcast": slice_pairs / t_np,
        "numpy packed bitwise_count": pairs / t_pk,
        "simple numba loop": pairs / t_simple,
    }
    for th, t in results.items():
        rate[f"codesearch {th} core(s)"] = pairs / t
    print(f"\n{name}: M={m}, n={n}, q={code.q}, {pairs:.3g} pairs")
    base1 = rate["codesearch 1 core(s)"]
    for label, r in rate.items():
        print(f"  {label:<30} {r / 1e6:10.1f} Mpairs/s   codesearch(1 core) is {base1 / r:6.1f}x")
    return base1


def bench_ceiling(repeat):
    rng = np.random.default_rng(5)
    col = rng.integers(0, 2**63, 1 << 14, dtype=np.uint64)
    popcount_ceiling(col[:10])
    nb.set_num_threads(1)
    t, _ = timed(lambda: popcount_ceiling(col), repeat)
    m = col.shape[0]
    return m * (m - 1) / 2 / t


def bench_structure(repeat):
    code = golay()
    t_pairs, _ = timed(lambda: verify.distance_distribution(code), repeat)
    t_lin, rep = timed(lambda: verify.check_code(code), repeat)
    assert rep.linear
    rng = np.random.default_rng(3)
    gen = np.hstack([np.eye(24, dtype=np.uint8), rng.integers(0, 2, (24, 24)).astype(np.uint8)])
    verify.check_generator(gen[:4], 2)
    t_gen, rep = timed(lambda: verify.check_generator(gen, 2), repeat)
    import known_codes

    rm27 = known_codes.reed_muller_generator(2, 7)
    t_enum, rep_e = timed(lambda: verify.check_generator(rm27, 2, method="enumerate"),
                          max(1, repeat // 2))
    t_is, rep_i = timed(lambda: verify.check_generator(rm27, 2, method="information-sets"),
                        repeat)
    assert rep_e.min_distance == rep_i.min_distance == 32
    rm28 = known_codes.reed_muller_generator(2, 8)
    t_is8, rep_8 = timed(lambda: verify.check_generator(rm28, 2, d=64,
                                                        method="information-sets"), 1)
    assert rep_8.min_distance == 64
    print("\nstructure: extended Golay code")
    print(f"  all pairs (kernel)          {t_pairs * 1e3:8.2f} ms")
    print(f"  linear path (weights)       {t_lin * 1e3:8.2f} ms  ({t_pairs / t_lin:.1f}x)")
    print(f"  generator matrix k=24, n=48 {t_gen:8.3f} s for {rep.size} codewords, "
          f"min distance {rep.min_distance}")
    print("  Reed-Muller RM(2,7) [128,29,32], minimum distance:")
    print(f"    listing all 2^29 codewords   {t_enum:8.3f} s")
    print(f"    information sets             {t_is:8.3f} s  ({t_enum / t_is:.1f}x)")
    print(f"  Reed-Muller RM(2,8) [256,37,64] by information sets: {t_is8:.1f} s "
          f"(listing would visit 2^37 codewords, about {t_enum * 2**8:.0f} s at the rate above)")


MEM_SCRIPT = """
import sys, numpy as np
from codesearch.model import Code
from codesearch import _kernels as K
rng = np.random.default_rng(1)
code = Code(rng.integers(0, 2, (1 << 17, 256), dtype=np.uint8), 2)
if sys.argv[1] == "check":
    from codesearch import verify
    verify.distance_distribution(code)
else:
    K.distance_distribution_packed(K.pack_words(code.words[:8], 2), 1, 4, 256)
"""


def peak_rss(mode):
    proc = subprocess.run(["/usr/bin/time", "-v", sys.executable, "-c", MEM_SCRIPT, mode],
                          capture_output=True, text=True)
    for line in proc.stderr.splitlines():
        if "Maximum resident set size" in line:
            return int(line.split()[-1]) * 1024
    raise RuntimeError(proc.stderr)


def bench_memory():
    if not os.path.exists("/usr/bin/time"):
        print("\nmemory: /usr/bin/time not found, skipped")
        return
    base, full = peak_rss("base"), peak_rss("check")
    packed = (1 << 17) * 32
    print(f"\nmemory, 2^17 words of length 256 (packed code {packed / 2**20:.0f} MiB), "
          f"full distance distribution:")
    print(f"  peak RSS beyond building the code: {(full - base) / 2**20:.1f} MiB "
          f"= {(full - base) / packed:.2f} x the packed code")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    threads = sorted({1, nb.config.NUMBA_NUM_THREADS})
    rng = np.random.default_rng(11)
    ceiling = bench_ceiling(args.repeat)
    one = bench_code("random binary", Code(rng.integers(0, 2, (1 << 14, 64)), 2), args.repeat, threads)
    bench_code("random 5-ary", Code(rng.integers(0, 5, (4000, 20)), 5), args.repeat, threads)
    bench_code("extended Golay (all pairs)", golay(), args.repeat, threads)
    print(f"\npopcount ceiling (one 64-bit limb, one core): {ceiling / 1e6:.1f} Mpairs/s; "
          f"codesearch reaches {one / ceiling:.2f} of it on the random binary code")
    bench_structure(args.repeat)
    bench_memory()


if __name__ == "__main__":
    main()
