"""Trust under hostile input: malformed and oversized certificates, certificates offered for
the wrong cell, the crashes found by trying to break the tool, exact values at the extremes.

Each test names the defect it holds (issue "trust under hostile input"). Values used as
outside references: A(12,4) <= 160 is Schrijver's three-point bound (A. Schrijver, IEEE Trans.
Inform. Theory 51 (2005), table: A(12,4) <= 160, from memory); A(6,4) = 4 and A(20,4) is far
above it (common practice); the closed forms (Singleton q^(n-d+1), A_q(n,1) = q^n,
A_q(n,n) = q) are theorems (MacWilliams-Sloane ch. 1, ch. 11).
"""

from __future__ import annotations

import json
import sqlite3
import sys

import pytest
from hypothesis import given, strategies as st

from codesearch import verify
from codesearch.cli import main
from codesearch.errors import InputError
from codesearch.model import Params
from codesearch.report.text import exact_text, format_value
from codesearch.results import BoundResult
from codesearch.store import Store


def _run(argv, capsys) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def lp_cert() -> dict:
    from codesearch.bounds import best_lp_certificate

    return json.loads(json.dumps(best_lp_certificate(Params(2, 6, 4)).certificate))


@pytest.fixture(scope="module")
def tp_cert() -> dict:
    from codesearch.bounds.sdp import three_point_bound

    # A(12,4): its certificate has dual blocks (the LP pass wins at A(13,6))
    return json.loads(json.dumps(three_point_bound(Params(2, 12, 4)).certificate))


@pytest.fixture(scope="module")
def qtp_cert() -> dict:
    from codesearch.bounds.qary_sdp import qary_three_point_bound

    return json.loads(json.dumps(qary_three_point_bound(Params(3, 5, 3)).certificate))


def _write(tmp_path, name, text) -> str:
    path = tmp_path / name
    path.write_text(text)
    return str(path)


# --------------------------------------------------- malformed certificates: one line, exit 2
@pytest.mark.parametrize("mutate", [
    lambda c: c.update(kind=["three-point-sdp"]),                     # kind a list (TypeError)
    lambda c: c["multipliers"].append({"row": [], "value": "1"}),     # empty row (IndexError)
    lambda c: c.update(sdp_n=10**6, n=10**6 - 1),                     # huge size (RecursionError)
    lambda c: c.update(n=2**80),
    lambda c: c.update(value=160.9),                                   # float accepted before
    lambda c: c.update(value="32"),                                    # string accepted before
    lambda c: c.update(q=2.7),
    lambda c: c.update(even=1),                                        # int for bool
    lambda c: c["blocks"][0].update(family=True),
    lambda c: c["blocks"][0].update(weights=[6.0, 8.0]),
    lambda c: c["blocks"][0].update(matrix="1/2"),
    lambda c: c["blocks"][0]["matrix"][0].append("1"),
    lambda c: c["multipliers"][0].update(value=0.25),
    lambda c: c.update(bound=32),
    lambda c: c.pop("multipliers"),
])
def test_malformed_three_point_certificate_exits_2(tp_cert, tmp_path, capsys, mutate):
    cert = json.loads(json.dumps(tp_cert))
    mutate(cert)
    with pytest.raises(InputError):
        verify.check_certificate(cert)
    code, out, err = _run(["check", _write(tmp_path, "c.json", json.dumps(cert))], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_infinity_and_nan_are_refused_on_reading(tp_cert, tmp_path, capsys):
    text = json.dumps(tp_cert).replace('"value": 160', '"value": Infinity')
    assert "Infinity" in text
    code, _, err = _run(["check", _write(tmp_path, "inf.json", text)], capsys)
    assert code == 2 and "Infinity" in err and len(err.strip().splitlines()) == 1
    deep = '{"kind": "relation-chain", "cites": ' + "[" * 100_000 + "]" * 100_000 + "}"
    code, _, err = _run(["check", _write(tmp_path, "deep.json", deep)], capsys)
    assert code == 2 and "nested too deeply" in err


def test_qary_checker_is_as_strict(qtp_cert):
    assert verify.check_certificate(qtp_cert)[:2] == (True, qtp_cert["value"])
    for key, value in (("value", float(qtp_cert["value"])), ("value", str(qtp_cert["value"])),
                       ("q", 3.0), ("n", True), ("bound", 18), ("n", 65)):
        with pytest.raises(InputError):
            verify.check_certificate(dict(qtp_cert, **{key: value}))


def test_sdp_checkers_compare_claims_with_what_they_prove(tp_cert, qtp_cert):
    # the exact value field must be what the dual proves, and value its floor (as for LP)
    for cert in (tp_cert, qtp_cert):
        assert verify.check_certificate(dict(cert, bound="1/1"))[0] is False
        for v in (cert["value"] - 1, cert["value"] + 1):
            valid, _, reason = verify.check_certificate(dict(cert, value=v))
            assert not valid and "claimed" in reason


def test_lp_certificate_sizes_capped_before_work(lp_cert):
    # n = 4096 took 20 s and 5 GB before; now refused up front, in one line, naming the cap
    big = dict(lp_cert, n=4096, d=4, y=["0"] * 4096, even=False)
    with pytest.raises(InputError, match="cap"):
        verify.check_certificate(big)
    with pytest.raises(InputError):
        verify.check_certificate(dict(lp_cert, q=1 << 16))
    with pytest.raises(InputError):
        verify.check_certificate(dict(lp_cert, y=["1/" + "7" * 5000] + lp_cert["y"][1:]))


def test_every_kind_rejects_a_wrong_claim(lp_cert):
    assert verify.check_certificate(lp_cert)[0]
    theorem = {"kind": "theorem", "theorem": "singleton", "q": 3, "n": 5, "d": 3, "value": 27}
    assert verify.check_certificate(theorem)[:2] == (True, 27)
    assert verify.check_certificate(dict(theorem, value=28))[0] is False  # weaker: not what it proves
    assert verify.check_certificate(dict(theorem, value=26))[0] is False


# ------------------------------------------------------------ a certificate is bound to its cell
def test_check_refuses_a_certificate_for_another_cell(tp_cert, tmp_path, capsys):
    path = _write(tmp_path, "tp.json", json.dumps(tp_cert))
    assert _run(["check", path, "--cell", 2, 12, 4], capsys)[0] == 0
    assert _run(["check", path, "--cell", 2, 11, 3], capsys)[0] == 0  # A(11,3) = A(12,4)
    code, out, _ = _run(["check", path, "--cell", 2, 20, 6, "--json"], capsys)
    assert code == 1 and "not A(20,6)" in json.loads(out)["reason"]
    assert _run(["check", path, "--cell", 3, 12, 4], capsys)[0] == 1


def test_store_refuses_a_certificate_for_another_cell(lp_cert, tmp_path):
    # the defect: a valid certificate for A(6,4) was stored as the bound of A(20,4)
    with Store(tmp_path / "s.sqlite") as s:
        value = verify.check_certificate(lp_cert)[1]
        with pytest.raises(InputError, match="refused"):
            s.add_bound(BoundResult(Params(2, 20, 4), value, "delsarte-lp",
                                    certificate=lp_cert))
        assert s.counts()["bounds"] == 0
        s.add_bound(BoundResult(Params(2, 6, 4), value, "delsarte-lp", certificate=lp_cert))
        s.add_bound(BoundResult(Params(2, 5, 3), value, "delsarte-lp", certificate=lp_cert))
        assert s.audit() == []


def test_audit_rechecks_the_binding(lp_cert, tmp_path):
    path = tmp_path / "s.sqlite"
    with Store(path) as s:
        value = verify.check_certificate(lp_cert)[1]
        s.add_bound(BoundResult(Params(2, 6, 4), value, "delsarte-lp", certificate=lp_cert))
    con = sqlite3.connect(path)
    con.execute("UPDATE bounds SET n = 20")  # moved behind the store's back
    con.commit()
    con.close()
    with Store(path) as s:
        problems = s.audit()
    assert len(problems) == 1 and "not A(20,4)" in problems[0]


def test_bounds_sdp_certificate_is_the_reported_upper(tmp_path, capsys):
    # `bounds 12 4 --sdp --certificate` reported 160 but wrote the LP certificate (168)
    pytest.importorskip("clarabel")
    path = tmp_path / "c.json"
    code, out, _ = _run(["bounds", 12, 4, "--sdp", "--json", "--certificate", path], capsys)
    assert code == 0 and json.loads(out)["upper"] == 160
    code, out, _ = _run(["check", path, "--cell", 2, 12, 4, "--json"], capsys)
    verdict = json.loads(out)
    assert code == 0 and verdict["bound"] == 160 and verdict["certificate"] == "three-point-sdp"


# ------------------------------------------------------------------------ crashes, extremes
def test_constant_weight_bound_at_the_bounds_limit(capsys):
    # RecursionError in the constant-weight bound before
    code, out, _ = _run(["bounds", 2048, 1024, "--no-lp", "--json"], capsys)
    obj = json.loads(out)
    # Plotkin: A(2d, d) = 4d for d even (Levenshtein; MacWilliams-Sloane ch. 2 section 3)
    assert code == 0 and obj["upper"] == 4096


def test_huge_values_print_exactly_or_say_they_are_abbreviated(capsys):
    # OverflowError formatting before; 2.199e+12 could show less than was proved
    code, out, _ = _run(["bounds", 1100, 3, "--no-lp"], capsys)
    assert code == 0 and "e+" not in out and "~ = abbreviated" in out
    code, out, _ = _run(["bounds", 41, 3, "--no-lp"], capsys)
    assert "52295440084" in out and "~" not in out  # exact below 10^15
    code, out, _ = _run(["bounds", 1100, 3, "--no-lp", "--json"], capsys)
    obj = json.loads(out)
    assert obj["bounds"]["singleton"] == 2**1098  # Singleton: q^(n-d+1), exactly


@given(st.integers(min_value=0, max_value=10**400))
def test_abbreviation_never_claims_more_than_proved(v):
    up, down = format_value(v), format_value(v, round_up=False)
    if not up.startswith("~"):
        assert up == down == str(v)
        return
    for text, ok in ((up, lambda x: x >= v), (down, lambda x: x <= v)):
        mant, exp = text[1:].split("e")
        whole, frac = mant.split(".")
        assert ok(int(whole + frac) * 10 ** (int(exp) - len(frac))), (v, text)


def test_exact_text_past_pythons_digit_limit():
    v = 36**4096 - 1  # 6375 digits
    text = exact_text(v)
    assert len(text) == 6375 and set(text[:3]) <= set("0123456789") and text.endswith("5")
    assert int(text[:4000]) == v // 10 ** (6375 - 4000)


@pytest.mark.parametrize("q", [2, 3, 36])
@pytest.mark.parametrize("n", [1, 2, 4096])
def test_bounds_at_the_extremes(q, n, capsys):
    # d = 1, 2, n at n = 1, 2 and the stated maximum 4096, q up to 36 (the alphabet limit)
    ds = sorted({1, min(2, n), n})
    cells = ",".join(map(str, ds))
    for d in ds:
        code, out, err = _run(["bounds", n, d, "--q", q, "--no-lp", "--json"], capsys)
        assert code == 0, err
        old = sys.get_int_max_str_digits()
        sys.set_int_max_str_digits(0)  # 36^4096 has 6375 digits, printed whole
        try:
            obj = json.loads(out)
        finally:
            sys.set_int_max_str_digits(old)
        if d == 1:
            assert obj["upper"] == q**n  # every word
        elif d == n:
            assert obj["upper"] == q  # Singleton, met by the repetition code
        else:
            assert obj["upper"] == q ** (n - 1)  # A_q(n,2) = q^(n-1)
        assert obj["gv"] <= obj["upper"]
    assert cells


def test_sdp_and_lp_at_the_extremes_refuse_or_answer(capsys):
    for argv in (["bounds", 4096, 4, "--q", 36], ["bounds", 200, 2, "--q", 36],
                 ["bounds", 64, 3, "--sdp", "--q", 36]):
        code, _, err = _run(argv, capsys)
        assert code in (0, 2) and "Traceback" not in err


def test_fuzz_findings_stay_fixed(tmp_path):
    # found by tests/test_fuzz_readers.py: "meta": true in a JSON code file (AttributeError)
    from codesearch.codefile import parse_code_json
    from codesearch.store import read_published_file

    base = {"format": "codesearch-code/1", "q": 2, "n": 3, "words": ["000", "111"]}
    for bad in ({"meta": True}, {"meta": {"x": [1]}}, {"q": 2.0}, {"n": "3"}, {"d": True}):
        with pytest.raises(InputError):
            parse_code_json({**base, **bad})
    # published values in JSON: exact types (no "16", 16.0 or a list for the source)
    for rec in ({"lower": "16"}, {"lower": 16.0}, {"source": ["MS77"]}):
        path = tmp_path / "p.json"
        path.write_text(json.dumps([{"q": 2, "n": 7, "d": 3, "lower": 16, **rec}]))
        with pytest.raises(InputError):
            read_published_file(str(path))


@pytest.mark.parametrize("argv, named", [
    (["find", "7", "3", "--max-words", "abc"], "--max-words"),
    (["table", "--n", "4..x", "--d", "3"], "--n"),
    (["find"], "required"),
    (["find", "7", "3", "--orbit-mode", "bogus"], "--orbit-mode"),
    (["bounds", "17", "4", "--method", "sdp4"], "--method sdp4"),
    (["construct", "list", "18", "4"], "18 4"),
])
def test_usage_errors_are_one_line_naming_the_argument(argv, named, capsys):
    # argparse prints its whole usage block before the error; the tool keeps to one line
    # naming the argument and the subcommand's --help (exit 2, as for every bad input)
    with pytest.raises(SystemExit) as exc:
        main(argv)
    assert exc.value.code == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and named in err[0] and "--help" in err[0]
    assert err[0].startswith(f"codesearch {argv[0]}:")
