"""Refutation bundles: SAT proofs bound to the claim they refute, re-checked by `check`.

Outside references: A(6,3) = 8 (from memory; the shortened Hamming code [6,3,3] gives 8
words, and the sphere-packing bound gives only <= 9, so the SAT refutation of 9 is what
settles the cell), A_3(5,3) = 18 (from memory).
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil

import pytest
from hypothesis import given, strategies as st

from codesearch import proofbundle
from codesearch.cli import main
from codesearch.model import Params
from codesearch.search import search


@pytest.fixture(scope="module")
def bundle63(tmp_path_factory):
    d = tmp_path_factory.mktemp("a63")
    res = search(Params(2, 6, 3), "sat", size=9, proof=str(d / "a63"))
    assert res.upper == 8
    return res.settings["proof_bundle"]


def _copy(bundle: str, tmp_path) -> str:
    src = os.path.dirname(bundle)
    for name in os.listdir(src):
        shutil.copy(os.path.join(src, name), tmp_path / name)
    return str(tmp_path / os.path.basename(bundle))


def _edit(path: str, fn) -> None:
    with open(path) as fh:
        obj = json.load(fh)
    fn(obj)
    with open(path, "w") as fh:
        json.dump(obj, fh)


def _sha(path) -> str:
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest()


def test_sat_bundle_rechecked_end_to_end(bundle63, capsys):
    res = proofbundle.check_bundle(bundle63)
    assert res.valid and res.bound == 8, res.reason
    assert [b.weight for b in res.branches] == [3, 4, 5, 6]
    assert any("pair" in t for t in res.rests_on)
    assert main(["check", bundle63]) == 0
    out = capsys.readouterr().out
    assert out.startswith("re-checked: no code of size 9 in A(6,3), so A(6,3) <= 8")
    assert main(["check", bundle63, "--json"]) == 0
    obj = json.loads(capsys.readouterr().out)
    assert obj["valid"] and obj["bound"] == 8


def test_bundle_for_another_claim_refused(bundle63, tmp_path, capsys):
    assert not proofbundle.check_bundle(bundle63, expect=(2, 6, 3, 10)).valid
    assert not proofbundle.check_bundle(bundle63, expect=(2, 7, 3, 9)).valid
    # the manifest rewritten to claim another cell: the formulas are not its encoding
    for claim in ({"size": 10}, {"n": 7, "size": 17}, {"d": 4, "size": 5}):
        path = _copy(bundle63, tmp_path)
        _edit(path, lambda o: o["claim"].update(claim))
        if "d" in claim:
            _edit(path, lambda o: o.update(branches=o["branches"][1:]))
        assert main(["check", path]) == 1, claim
        assert "NOT re-checked" in capsys.readouterr().out
    # A branch formula depends on w, not on d: the branches w = 4..6 of "9 words in A(6,3)"
    # are those of "9 words in A(6,4)", so that sub-bundle is a valid refutation of its own.
    path = _copy(bundle63, tmp_path)
    _edit(path, lambda o: (o["claim"].update(d=4), o.update(branches=o["branches"][1:])))
    assert main(["check", path]) == 0
    assert "A(6,4) <= 8" in capsys.readouterr().out


def test_tampered_proof_rejected(bundle63, tmp_path, capsys):
    path = _copy(bundle63, tmp_path)
    proof = tmp_path / "a63.w3"
    lines = proof.read_text().splitlines()
    kept = [ln for ln in lines if not ln.startswith("d ")]
    # keep only the last few lemmas: the conflict now needs lemmas that were removed
    proof.write_text("\n".join(kept[-3:]) + "\n")
    _edit(path, lambda o: o["branches"][0].update(proof_sha256=_sha(proof)))
    assert main(["check", path]) == 1
    assert "w=3" in capsys.readouterr().out


def test_digest_mismatch_and_swapped_files(bundle63, tmp_path, capsys):
    path = _copy(bundle63, tmp_path)
    with open(tmp_path / "a63.w4", "a") as fh:
        fh.write("c appended\n")
    assert main(["check", path]) == 1
    assert "digest" in capsys.readouterr().out
    path = _copy(bundle63, tmp_path)

    def swap(o):
        a, b = o["branches"][0], o["branches"][1]
        a["formula"], b["formula"] = b["formula"], a["formula"]
        a["formula_sha256"], b["formula_sha256"] = b["formula_sha256"], a["formula_sha256"]
    _edit(path, swap)
    assert main(["check", path]) == 1
    assert "not the encoding" in capsys.readouterr().out


def test_missing_branch_refused(bundle63, tmp_path, capsys):
    path = _copy(bundle63, tmp_path)
    _edit(path, lambda o: o.update(branches=o["branches"][:-1]))
    assert main(["check", path]) == 1
    assert "split" in capsys.readouterr().out


@pytest.mark.parametrize("edit, part", [
    (lambda o: o["claim"].update(q=True), "integer"),
    (lambda o: o["claim"].update(size=1), "1 word"),
    (lambda o: o["claim"].update(n=10**9), "too large"),
    (lambda o: o["encoding"].update(symmetry="all"), "unknown symmetry"),
    (lambda o: o["branches"][0].update(proof="../x"), "plain file name"),
    (lambda o: o["branches"][0].update(proof="gone"), "not found"),
    (lambda o: o["branches"][0].update(formula_sha256="xyz"), "SHA-256"),
    (lambda o: o.update(branches=[]), "non-empty"),
])
def test_malformed_bundle_exit_2(bundle63, tmp_path, capsys, edit, part):
    path = _copy(bundle63, tmp_path)
    _edit(path, edit)
    assert main(["check", path]) == 2
    err = capsys.readouterr().err
    assert part in err and err.count("\n") == 1


def test_malformed_files_in_bundle_exit_2(bundle63, tmp_path, capsys):
    path = _copy(bundle63, tmp_path)
    proof = tmp_path / "a63.w3"
    proof.write_bytes(b"1 2 x 0\n")
    _edit(path, lambda o: o["branches"][0].update(proof_sha256=_sha(proof)))
    assert main(["check", path]) == 2
    assert "unexpected 'x'" in capsys.readouterr().err


_JSONISH = st.recursive(
    st.none() | st.booleans() | st.integers(-3, 40) | st.floats(allow_nan=False)
    | st.text(max_size=6),
    lambda inner: st.lists(inner, max_size=3) | st.dictionaries(st.text(max_size=5), inner,
                                                                max_size=3),
    max_leaves=6)


@given(st.data())
def test_fuzzed_manifests_never_crash(bundle63, tmp_path_factory, data):
    tmp = tmp_path_factory.mktemp("fuzz")
    path = _copy(bundle63, tmp)
    with open(path) as fh:
        obj = json.load(fh)
    # replace one value somewhere in the manifest by an arbitrary JSON value
    target = data.draw(st.sampled_from(["claim", "encoding", "branch", "top"]))
    value = data.draw(_JSONISH)
    if target == "branch":
        key = data.draw(st.sampled_from(["weight", "formula", "proof", "formula_sha256"]))
        obj["branches"][data.draw(st.integers(0, 3))][key] = value
    elif target == "top":
        obj[data.draw(st.sampled_from(["claim", "encoding", "branches"]))] = value
    else:
        obj[target][data.draw(st.sampled_from(sorted(obj[target])))] = value
    text = json.dumps(obj)
    if data.draw(st.booleans()):
        cut = data.draw(st.integers(0, len(text)))
        text = text[:cut] + data.draw(st.text(max_size=3)) + text[cut:]
    with open(path, "w") as fh:
        fh.write(text)
    assert main(["check", path]) in (0, 1, 2)


@pytest.mark.slow
@pytest.mark.parametrize("q, n, d, size", [(3, 5, 3, 19), (2, 8, 3, 21)])
def test_larger_bundles(tmp_path, q, n, d, size):
    # A_3(5,3) = 18 and A(8,3) = 20 (from memory)
    res = search(Params(q, n, d), "sat", size=size, proof=str(tmp_path / "p"))
    assert res.upper == size - 1
    chk = proofbundle.check_bundle(res.settings["proof_bundle"], expect=(q, n, d, size))
    assert chk.valid, chk.reason
