"""The bounds command, the delsarte-lp certificate and its independent checker."""

from __future__ import annotations

import json
from fractions import Fraction

import pytest

from codesearch import codefile, verify
from codesearch.bounds import best_lp_certificate
from codesearch.cli import main
from codesearch.errors import InputError
from codesearch.model import Params


def test_json_lines_for_a_grid(capsys):
    assert main(["bounds", "6..8", "3..4", "--json"]) == 0
    lines = capsys.readouterr().out.strip().splitlines()
    assert len(lines) == 6
    for line in lines:
        obj = json.loads(line)
        assert {"q", "n", "d", "bounds", "upper", "upper_method", "gv"} <= set(obj)
        assert obj["upper"] == min(obj["bounds"].values())
        assert obj["bounds"][obj["upper_method"]] == obj["upper"]
        assert obj["gv"] <= obj["upper"]
    # A(7,3) = 16 from the Hamming code, a perfect code (MacWilliams-Sloane ch. 1).
    first = {(o["n"], o["d"]): o for o in map(json.loads, lines)}
    assert first[(7, 3)]["upper"] == 16
    assert "griesmer" not in first[(7, 3)]["bounds"]


def test_text_table_names_the_winner(capsys):
    assert main(["bounds", "23", "7"]) == 0
    out = capsys.readouterr().out
    assert "hamming" in out.splitlines()[1] and "4096" in out


def test_qary_json(capsys):
    assert main(["bounds", "11", "5", "--q", "3", "--json"]) == 0
    obj = json.loads(capsys.readouterr().out)
    # Ternary Golay code: A_3(11,5) = 729 (MacWilliams-Sloane ch. 20).
    assert obj["upper"] == 729 and obj["q"] == 3


@pytest.mark.parametrize("argv", [
    ["bounds", "5", "7"],
    ["bounds", "5", "3", "--q", "1"],
    ["bounds", "0", "1"],
    ["bounds", "5000", "3"],
    ["bounds", "5..6", "2", "--certificate", "x.json"],
    ["bounds", "9..3", "2"],
    ["bounds", "1..1000000000", "3"],
    ["bounds", "5", "9..1000000000"],
    ["bounds", "5", "3", "--q", "37"],
])
def test_bad_input_exits_2(argv, capsys):
    with pytest.raises(SystemExit) as exc:
        raise SystemExit(main(argv))
    assert exc.value.code == 2
    err = capsys.readouterr().err.strip()
    assert err and "Traceback" not in err


def test_certificate_file_round_trip(tmp_path, capsys):
    path = tmp_path / "cert.json"
    assert main(["bounds", "17", "6", "--certificate", str(path)]) == 0
    cert = json.loads(path.read_text())
    # the upper bound is the LP's 341 with the odd size excluded: A(17,6) <= 340 (published,
    # from memory); the certificate nests the Delsarte LP certificate
    assert cert["kind"] == "lp-odd-size" and cert["lp"]["even"] is True
    assert len(cert["lp"]["y"]) == 17
    loaded = codefile.read_certificate(str(path))
    assert verify.check_certificate(loaded)[0]
    ok, bound, _ = verify.check_certificate(cert)
    assert ok and bound == 340
    ok, bound, _ = verify.check_certificate(cert["lp"])
    assert ok and bound == 341


def test_odd_d_certificate_is_for_the_extended_cell():
    r = best_lp_certificate(Params(2, 23, 7))
    assert (r.certificate["n"], r.certificate["d"]) == (24, 8)
    ok, bound, _ = verify.check_certificate(r.certificate)
    assert ok and bound == 4096


def _cert(n=10, d=4):
    return dict(best_lp_certificate(Params(2, n, d)).certificate)


def test_tampered_certificates_are_rejected():
    cert = _cert()
    ok, bound, _ = verify.check_certificate(cert)
    assert ok and bound == 42  # LP value for A(10,4) computed here, 42 >= A(10,4) = 40
    lower = dict(cert, bound="41/1")
    assert verify.check_certificate(lower)[0] is False
    shrunk = dict(cert, y=[str(Fraction(v) / 2) for v in cert["y"]])
    assert verify.check_certificate(shrunk)[0] is False
    negative = dict(cert, y=["-1/1"] + cert["y"][1:])
    assert verify.check_certificate(negative)[0] is False
    odd = dict(cert, d=5)
    assert verify.check_certificate(odd)[0] is False  # even restriction needs even d
    qary = dict(cert, q=3, even=False)
    assert verify.check_certificate(qary)[0] is False


def test_extra_inequalities_are_rebuilt_by_the_checker():
    from codesearch.bounds.delsarte import delsarte_lp_plus

    r = delsarte_lp_plus(Params(2, 17, 6))
    cert = dict(r.certificate)
    assert cert["extra"]
    assert verify.check_certificate(cert)[:2] == (True, 341)
    # Dropping the extra multipliers breaks the certificate.
    assert verify.check_certificate(dict(cert, extra=[]))[0] is False
    bogus = dict(cert, extra=[dict(cert["extra"][0], family="made-up")])
    with pytest.raises(InputError):
        verify.check_certificate(bogus)


@pytest.mark.parametrize("mutate", [
    lambda c: c.pop("y"),
    lambda c: c.__setitem__("y", c["y"][:-1]),
    lambda c: c.__setitem__("y", ["a/b"] + c["y"][1:]),
    lambda c: c.__setitem__("n", "ten"),
    lambda c: c.__setitem__("bound", 42),
    lambda c: c.__setitem__("kind", "nonsense"),
])
def test_malformed_certificates_raise_input_error(mutate):
    cert = _cert()
    mutate(cert)
    with pytest.raises(InputError):
        verify.check_certificate(cert)


def test_load_certificate_recognises_content(tmp_path):
    code_file = tmp_path / "code.txt"
    code_file.write_text("000\n111\n")
    assert codefile.read_certificate(str(code_file)) is None
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    with pytest.raises(InputError):
        codefile.read_certificate(str(bad))


def test_check_command_on_certificates(tmp_path, capsys):
    good = tmp_path / "good.json"
    assert main(["bounds", "12", "5", "--certificate", str(good)]) == 0
    assert main(["check", str(good)]) == 0
    cert = json.loads(good.read_text())
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps(dict(cert, bound="1/1")))
    assert main(["check", str(bad)]) == 1
    broken = tmp_path / "broken.json"
    broken.write_text(json.dumps(dict(cert, y="nope")))
    assert main(["check", str(broken)]) == 2
