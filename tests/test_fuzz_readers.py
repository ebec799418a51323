"""Every reader of outside data, fuzzed with mutated valid files: no input may end in a
traceback (only a read, a verdict, or one InputError line).

The default suite runs a few deterministic examples per reader; the slow run
(``pytest -m slow tests/test_fuzz_readers.py -s``) feeds at least 10,000 mutated inputs across
all readers and prints the count per reader (also written to
``benchmarks/results_fuzz.md`` when ``CODESEARCH_FUZZ_RESULTS`` names a file).
"""

from __future__ import annotations

import collections
import os

import pytest
from hypothesis import HealthCheck, given, settings

from fuzz_readers import Reader, build_readers, feed, mutations

#: Examples per reader in the default suite (deterministic) and in the slow run.
FAST_EXAMPLES = 25
SLOW_EXAMPLES = int(os.environ.get("CODESEARCH_FUZZ_EXAMPLES", "650"))


@pytest.fixture(scope="module")
def readers() -> dict[str, Reader]:
    return {r.name: r for r in build_readers()}


def _fuzz(reader: Reader, examples: int, outcomes: collections.Counter) -> None:
    @settings(max_examples=examples, derandomize=True, deadline=None, database=None,
              suppress_health_check=list(HealthCheck))
    @given(data=mutations(reader.seed, reader.structured))
    def run(data: bytes) -> None:
        outcomes[feed(reader, data)] += 1

    run()


READERS = ["certificate:delsarte-lp", "certificate:delsarte-lp-qcw",
           "certificate:three-point-sdp", "certificate:qary-three-point-sdp",
           "certificate:four-point-sdp",
           "certificate:four-point-size-cut", "certificate:lp-odd-size",
           "certificate:lp-size-mod-4",
           "certificate:distance-enumeration",
           "certificate:relation-chain", "certificate:theorem", "certificate:profile-lp",
           "code file (text)",
           "code file (JSON)", "generator matrix", "published values (CSV)",
           "published values (JSON)", "group spec", "store", "refutation manifest"]


def test_every_reader_is_fuzzed(readers):
    from codesearch.verify import CERTIFICATE_CHECKERS

    assert sorted(readers) == sorted(READERS)
    # a new certificate kind must join the fuzzed readers
    assert {f"certificate:{k}" for k in CERTIFICATE_CHECKERS} <= set(READERS)
    for r in readers.values():  # the seeds themselves read cleanly
        assert feed(r, r.seed) == "ok", r.name


@pytest.mark.parametrize("name", READERS)
def test_fuzz_fast(readers, name):
    outcomes: collections.Counter = collections.Counter()
    _fuzz(readers[name], FAST_EXAMPLES, outcomes)
    assert sum(outcomes.values()) >= 1


@pytest.mark.slow
def test_fuzz_ten_thousand(readers):
    counts = {}
    for name in READERS:
        outcomes: collections.Counter = collections.Counter()
        _fuzz(readers[name], SLOW_EXAMPLES, outcomes)
        counts[name] = outcomes
    total = sum(sum(c.values()) for c in counts.values())
    lines = ["| reader | inputs | read or checked | refused (one line, exit 2) |",
             "|---|---:|---:|---:|"]
    lines += [f"| {name} | {sum(c.values())} | {c['ok']} | {c['refused']} |"
              for name, c in counts.items()]
    lines.append(f"| total | {total} | {sum(c['ok'] for c in counts.values())} | "
                 f"{sum(c['refused'] for c in counts.values())} |")
    print("\n" + "\n".join(lines))
    out = os.environ.get("CODESEARCH_FUZZ_RESULTS")
    if out:
        with open(out, "w") as fh:
            fh.write("\n".join(lines) + "\n")
    assert total >= 10_000
