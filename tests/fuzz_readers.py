"""Mutation fuzzing of every reader of outside data (helpers for tests/test_fuzz_readers.py).

Each reader starts from a small valid file of its kind (made here from definitions and the
tool's own producers) and is fed mutated copies: byte-level edits (flips, insertions,
deletions, duplicated chunks) and, for JSON files, structural edits (one value anywhere in
the tree replaced by a value of another type or size: floats, strings of digits, booleans,
huge integers, empty and deep containers, NaN/Infinity). A reader passes when every input
either reads (and checks) or raises :class:`codesearch.errors.InputError` (one line, exit 2
on the command line): anything else is a traceback, a failure.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import tempfile
from dataclasses import dataclass
from typing import Any, Callable

from hypothesis import strategies as st

from codesearch.errors import InputError

# ------------------------------------------------------------------------------ mutations
_INTERESTING = [None, True, False, 0, -1, 1, 2, 3, 37, 4097, 10**6, 2**64, 2**80, -(2**70),
                0.5, 2.7, 160.9, 1e308, "", "x", "0", "160", "1/0", "-1/3", "1/2", "1e5",
                "p/q", "9" * 5000, [], [[]], {}, {"kind": "theorem"}, ["weight", 1],
                [0] * 50, "NaN", "Infinity", float("inf"), float("nan")]


def _paths(obj: Any, path: tuple = ()) -> list[tuple]:
    out = [path]
    if isinstance(obj, dict):
        for k, v in obj.items():
            out += _paths(v, path + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj[:40]):
            out += _paths(v, path + (i,))
    return out


def _replace(obj: Any, path: tuple, value: Any) -> Any:
    if not path:
        return value
    head, rest = path[0], path[1:]
    if isinstance(obj, dict):
        return {**obj, head: _replace(obj[head], rest, value)}
    copy = list(obj)
    copy[head] = _replace(obj[head], rest, value)
    return copy


@st.composite
def json_mutation(draw: Any, seed: Any) -> bytes:
    """The seed object with one to three values replaced, serialised (NaN/Infinity as the
    JSON extensions Python writes)."""
    obj = seed
    for _ in range(draw(st.integers(1, 3))):
        paths = _paths(obj)
        path = paths[draw(st.integers(0, len(paths) - 1))]
        choice = draw(st.integers(0, len(_INTERESTING) + 2))
        if choice == len(_INTERESTING):
            value = f"__deep_{draw(st.integers(50, 3000))}__"  # spliced in after dumps
        elif choice == len(_INTERESTING) + 1:
            value = draw(st.integers(-(10**30), 10**30))
        elif choice == len(_INTERESTING) + 2:
            value = draw(st.text(max_size=12))
        else:
            value = _INTERESTING[choice]
        if path and draw(st.booleans()) and isinstance(value, (int, str)) and not isinstance(
                value, bool):
            # sometimes drop the key instead (a missing field)
            parent = path[:-1]
            node = obj
            for k in parent:
                node = node[k]
            if isinstance(node, dict):
                trimmed = {k: v for k, v in node.items() if k != path[-1]}
                obj = _replace(obj, parent, trimmed)
                continue
        obj = _replace(obj, path, value)
    text = json.dumps(obj)
    for depth in set(re.findall(r'"__deep_([0-9]+)__"', text)):
        text = text.replace(f'"__deep_{depth}__"', "[" * int(depth) + "1" + "]" * int(depth))
    return text.encode()


@st.composite
def byte_mutation(draw: Any, seed: bytes) -> bytes:
    """The seed bytes with one to four edits: flip, insert, delete, duplicate a chunk."""
    data = bytearray(seed)
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["flip", "insert", "delete", "dup", "digit"]))
        at = draw(st.integers(0, max(len(data) - 1, 0)))
        if op == "flip" and data:
            data[at] ^= 1 << draw(st.integers(0, 7))
        elif op == "insert":
            data[at:at] = draw(st.binary(min_size=1, max_size=8))
        elif op == "delete" and data:
            del data[at:at + draw(st.integers(1, 16))]
        elif op == "dup" and data:
            data[at:at] = data[at:at + draw(st.integers(1, 64))]
        elif op == "digit":
            data[at:at] = draw(st.sampled_from([b"9", b"0", b"-", b".5", b"e9", b"99999999"]))
    return bytes(data)


def mutations(seed: bytes, structured: bool) -> Any:
    """The strategy of mutated inputs for one reader."""
    if structured:
        return st.one_of(json_mutation(json.loads(seed)), byte_mutation(seed))
    return byte_mutation(seed)


# -------------------------------------------------------------------------------- readers
@dataclass
class Reader:
    """One reader under fuzz: a valid seed, whether it is JSON, and ``run(path)`` reading (and
    checking) the file at ``path`` as the command line would."""

    name: str
    seed: bytes
    structured: bool
    run: Callable[[str], Any]
    suffix: str = ""
    files: dict[str, bytes] | None = None  # other files next to it (a bundle's proofs)


def feed(reader: Reader, data: bytes) -> str:
    """Run the reader on ``data``; returns "ok" or "refused" (InputError); anything else
    propagates (the fuzz test fails with its traceback)."""
    tmp = tempfile.mkdtemp(prefix="fuzz-")
    try:
        for name, content in (reader.files or {}).items():
            with open(os.path.join(tmp, name), "wb") as fh:
                fh.write(content)
        path = os.path.join(tmp, "input" + reader.suffix)
        with open(path, "wb") as fh:
            fh.write(data)
        try:
            reader.run(path)
        except InputError as exc:
            assert str(exc) and "\n" not in str(exc).strip(), repr(exc)
            return "refused"
        return "ok"
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


def _check_cert(path: str) -> None:
    from codesearch import codefile, verify

    cert = codefile.read_certificate(path)
    if cert is None:
        raise InputError(f"{path}: not a certificate")
    valid, bound, reason = verify.check_certificate(cert)
    assert isinstance(valid, bool) and isinstance(reason, str)
    assert not valid or (isinstance(bound, int) and not isinstance(bound, bool))


def _read_code(path: str) -> None:
    from codesearch import codefile, verify

    parsed = codefile.read_code(path)
    verify.check_code(parsed.code, parsed.claimed_d)


def _read_generator(path: str) -> None:
    from codesearch import codefile, verify

    rows, q, _ = codefile.read_generator(path)
    verify.check_generator(rows, q, None, "auto")


def _read_published(path: str) -> None:
    from codesearch.store import read_published_file

    read_published_file(path)


def _read_group(path: str) -> None:
    from codesearch.search.groups import parse_group

    with open(path, "rb") as fh:
        raw = fh.read()
    try:
        spec = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError("group spec: not UTF-8 text") from None
    parse_group(spec, 2, 7)
    parse_group(spec, 3, 7)


def _read_store(path: str) -> None:
    from codesearch.report import render
    from codesearch.store import Store

    with Store(path, create=False) as s:
        s.audit()
        render(s, "json")
        render(s, "html")


def _read_manifest(path: str) -> None:
    from codesearch.proofbundle import check_bundle

    check_bundle(path)


def four_point_pass_certificate(n: int, d: int, target: int | None = None) -> dict:
    """The certificate of one semidefinite pass of the four-point program of binary (n, d),
    d even (the solver keeps the Delsarte pass on small cells when it certifies the same
    integer, so its certificates would not exercise the new block families); with
    ``target``, the pair moment blocks are in it (the claimed value is then
    ``max(target - 1, floor(bound))``)."""
    import math

    import numpy as np

    from codesearch.bounds import sdp
    from codesearch.bounds.fourpoint import _program

    prog = _program(n, d, target=target)
    cap = np.array([float(c) for c in prog.caps])
    sv = np.sqrt(np.array([float(s) for s in prog.shapes]) / prog.m0 / cap)
    res = sdp._certify(prog, sdp._solve_scaled(prog.data, prog.m0, sv, dict(prog.exps), None))
    assert res["certified"], res["reason"]
    extra = {} if target is None else {
        "target": target, "value": max(target - 1, math.floor(res["exact"]))}
    return json.loads(json.dumps(dict(res["certificate"], q=2, n=n, d=d, sdp_n=n, sdp_d=d,
                                      even=True, **extra)))


def _size_cut_certificate() -> dict:
    """A(9,4) <= 24 (A(9,4) = 20: published table row n=9, d=4): Delsarte's LP proves 25 and
    the four-point program with the odd-size cut excludes 25."""
    from codesearch.bounds import all_bounds
    from codesearch.bounds.fourpoint import four_point_size_cut
    from codesearch.model import Params

    lp = all_bounds(Params(2, 9, 4))["delsarte-lp"].certificate
    return json.loads(json.dumps(four_point_size_cut(9, 4, lp, passes=1)["certificate"]))


def build_readers() -> list[Reader]:
    """Every reader with its valid seed (takes a few seconds: the SDP seeds are solved)."""
    from codesearch import bounds
    from codesearch.bounds import grid_bounds
    from codesearch.bounds.integral import distance_enumeration
    from codesearch.bounds.qary_sdp import qary_three_point_bound
    from codesearch.bounds.sdp import three_point_bound
    from codesearch.codefile import format_code_json, format_code_text
    from codesearch.model import Code, Params
    from codesearch.results import BoundResult
    from codesearch.store import PublishedRow, Store

    def cert_of(kind: str, cells: list[Params]) -> dict:
        result = grid_bounds(cells, lambda p: bounds.all_bounds(p))
        for p in cells:
            c = bounds.certificate_of(result[p], result)
            if c is not None and c.get("kind") == kind:
                return json.loads(json.dumps(c))
        for p in cells:
            for b in bounds.all_bounds(p).values():
                if b.certificate is not None and b.certificate.get("kind") == kind:
                    return json.loads(json.dumps(b.certificate))
        raise AssertionError(f"no {kind} certificate in {cells}")

    certs = {
        "delsarte-lp": cert_of("delsarte-lp", [Params(2, 6, 4)]),
        "delsarte-lp-qcw": cert_of("delsarte-lp-qcw", [Params(3, n, d) for n in range(4, 8)
                                                         for d in range(3, n)]),
        "three-point-sdp": json.loads(json.dumps(three_point_bound(Params(2, 10, 4)).certificate)),
        "qary-three-point-sdp": json.loads(json.dumps(
            qary_three_point_bound(Params(3, 5, 3)).certificate)),
        # every block family and a 4-set row: A(6,4) = 4 (published table row n=6, d=4)
        "four-point-sdp": four_point_pass_certificate(6, 4),
        "four-point-size-cut": _size_cut_certificate(),
        "lp-odd-size": cert_of("lp-odd-size", [Params(2, 8, 3)]),
        "lp-size-mod-4": cert_of("lp-size-mod-4", [Params(2, 9, 3)]),
        "distance-enumeration": json.loads(json.dumps(
            distance_enumeration(Params(2, 9, 4)).certificate)),
        "relation-chain": cert_of("relation-chain", [Params(2, n, d) for n in range(5, 10)
                                                     for d in range(3, 6)]),
        "profile-lp": cert_of("profile-lp", [Params(2, 11, 4)]),
        "theorem": {"kind": "theorem", "theorem": "hamming", "q": 2, "n": 7, "d": 3,
                    "value": 16},
    }
    readers = [Reader(f"certificate:{k}", json.dumps(c).encode(), True, _check_cert, ".json")
               for k, c in certs.items()]
    # the [5,2,3] code below: words 00000 11100 00111 11011 (pairwise distance >= 3)
    code = Code.from_strings(["00000", "11100", "00111", "11011"], 2)
    readers.append(Reader("code file (text)", format_code_text(code, 3).encode(), False,
                          _read_code, ".code"))
    readers.append(Reader("code file (JSON)", format_code_json(code, 3).encode(), True,
                          _read_code, ".json"))
    # ternary [4,2,3] tetracode generator rows 1011, 0112 (a definition; common practice)
    readers.append(Reader("generator matrix", b"# q: 3\n1011\n0112\n", False,
                          _read_generator, ".gen"))
    # published values: A(7,3) = 16, A(8,3) = 20 (MacWilliams-Sloane, from memory)
    readers.append(Reader("published values (CSV)",
                          b"# sample\nq,n,d,lower,upper,source\n2,7,3,16,16,MS77\n"
                          b"2,8,3,20,20,MS77\n", False, _read_published, ".csv"))
    readers.append(Reader("published values (JSON)", json.dumps(
        [{"q": 2, "n": 7, "d": 3, "lower": 16, "upper": 16, "source": "MS77"},
         {"q": 2, "n": 8, "d": 3, "lower": 20, "upper": 20}]).encode(), True,
        _read_published, ".json"))
    readers.append(Reader("group spec", b"cyclic:0-3*rev:4-6*perm:(0 1)(4 5)*rep", False,
                          _read_group))
    tmp = tempfile.mkdtemp(prefix="fuzz-seed-")
    try:
        store = os.path.join(tmp, "s.sqlite")
        with Store(store) as s:
            s.add_code(code, Params(2, 5, 3), method="exact")
            lp = certs["delsarte-lp"]
            s.add_bound(BoundResult(Params(2, 6, 4), 4, "delsarte-lp", certificate=lp))
            s.add_bound(BoundResult(Params(2, 5, 3), 4, "hamming"))
            s.import_published([PublishedRow(2, 5, 3, 4, 4, "MS77")])
        # fold the WAL into the file, then read the single file
        import sqlite3

        con = sqlite3.connect(store)
        con.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        con.execute("PRAGMA journal_mode = DELETE")
        con.close()
        with open(store, "rb") as fh:
            readers.append(Reader("store", fh.read(), False, _read_store, ".sqlite"))
        readers.append(_manifest_reader(tmp))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return readers


def _manifest_reader(tmp: str) -> Reader:
    from codesearch.model import Params
    from codesearch.search import search

    base = os.path.join(tmp, "a43")
    # no code of 3 words in A(4,3) (A(4,3) = 2, common practice): a refutation bundle
    res = search(Params(2, 4, 3), "sat", size=3, proof=base)
    assert res.exists is False
    files = {}
    with open(base + ".json") as fh:
        manifest = json.load(fh)
    for b in manifest["branches"]:
        for key in ("formula", "proof"):
            with open(os.path.join(tmp, b[key]), "rb") as fh:
                files[b[key]] = fh.read()
    with open(base + ".json", "rb") as fh:
        seed = fh.read()
    return Reader("refutation manifest", seed, True, _read_manifest, ".json", files)
