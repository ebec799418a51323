"""The code file format: round trips and every kind of bad input, through the library and the CLI."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given, strategies as st

from codesearch import codefile
from codesearch.errors import InputError, VerificationError
from codesearch.model import Code

import known_codes as kc


def run_cli(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "codesearch", *args], capture_output=True,
                          text=True, cwd=cwd, timeout=300)


@given(st.integers(2, 36), st.integers(1, 12), st.integers(1, 20), st.integers(0, 2**31),
       st.booleans())
def test_round_trip_text_and_json(q, n, m, seed, as_json):
    code = Code(np.random.default_rng(seed).integers(0, q, (m, n)), q)
    meta = {"method": "test", "seed": seed, "created": "2026-01-01T00:00:00Z", "software": "x"}
    text = (codefile.format_code_json if as_json else codefile.format_code_text)(code, None, meta)
    parsed = (codefile.parse_code_json(json.loads(text)) if as_json
              else codefile.parse_code_text(text))
    assert parsed.code == code
    again = (codefile.format_code_json if as_json else codefile.format_code_text)(
        parsed.code, None, {k: v for k, v in parsed.header.items()})
    assert again == text


def test_write_then_read_file(tmp_path):
    path = tmp_path / "h.txt"
    codefile.write_code(str(path), kc.hamming_7_4(), 3, {"method": "test"})
    parsed = codefile.read_code(str(path))
    assert parsed.code == kc.hamming_7_4() and parsed.claimed_d == 3
    assert parsed.header["format"] == codefile.FORMAT


def test_write_refuses_false_claim(tmp_path):
    with pytest.raises(VerificationError):
        codefile.write_code(str(tmp_path / "x.txt"), kc.hamming_7_4(), 4)
    assert not (tmp_path / "x.txt").exists()


def test_separated_symbols_and_no_header():
    parsed = codefile.parse_code_text("0, 1, 2\n2 1 0\n1,1,1\n")
    assert parsed.code.q == 3 and parsed.code.n == 3
    parsed = codefile.parse_code_text("0 10 3\n", q=11)
    assert parsed.code.words.tolist() == [[0, 10, 3]]


def test_q_from_option_overrides_guess():
    assert codefile.parse_code_text("01\n10\n", q=5).code.q == 5


BAD = {
    "ragged.txt": ("0000\n111\n", ":2:", "length"),
    "symbol.txt": ("# q: 2\n0101\n0121\n", ":3:", "not below q=2"),
    "alphabet.txt": ("0101\n01x!\n", ":2:", "not a symbol"),
    "upper.txt": ("0101\n0A01\n", ":2:", "not a symbol"),
    "empty.txt": ("", ":1:", "empty"),
    "onlyheader.txt": ("# q: 2\n# n: 4\n", ":", "empty"),
    "size.txt": ("# size: 3\n01\n10\n", ":1:", "size"),
    "format.txt": ("# format: codesearch-code/9\n01\n", ":1:", "newer"),
    "json.txt": ('{"words": [1, 2', ":1:", "invalid JSON"),
}


@pytest.mark.parametrize("name", sorted(BAD))
def test_bad_inputs_through_cli(tmp_path, name):
    content, where, reason = BAD[name]
    path = tmp_path / name
    path.write_text(content)
    proc = run_cli("check", str(path))
    assert proc.returncode == 2, proc.stderr
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in proc.stderr
    assert lines[0].startswith(str(path)) and where in lines[0] and reason in lines[0]


def test_binary_garbage_through_cli(tmp_path):
    path = tmp_path / "garbage.bin"
    path.write_bytes(bytes(range(256)) * 4)
    proc = run_cli("check", str(path))
    assert proc.returncode == 2 and "binary" in proc.stderr and "Traceback" not in proc.stderr


def test_missing_file_and_directory_through_cli(tmp_path):
    proc = run_cli("check", str(tmp_path / "nope.txt"))
    assert proc.returncode == 2 and "no such file" in proc.stderr
    proc = run_cli("check", str(tmp_path))
    assert proc.returncode == 2 and "directory" in proc.stderr


def test_too_large_for_memory_is_refused_before_reading(tmp_path, monkeypatch):
    path = tmp_path / "big.txt"
    path.write_text("0101\n" * 1000)
    monkeypatch.setattr(codefile, "available_memory", lambda: 1000)
    with pytest.raises(InputError, match="too large for memory"):
        codefile.read_code(str(path))


def test_check_cli_claim_false_names_lines(tmp_path):
    path = tmp_path / "c.txt"
    path.write_text("# d: 3\n00000\n11100\n00111\n11101\n")
    proc = run_cli("check", str(path))
    assert proc.returncode == 1
    assert ":5:" in proc.stderr and "line 3" in proc.stderr and "distance 1" in proc.stderr


def test_check_cli_json(tmp_path):
    path = tmp_path / "golay.txt"
    codefile.write_code(str(path), kc.golay_24(), 8)
    proc = run_cli("check", str(path), "--json")
    assert proc.returncode == 0
    obj = json.loads(proc.stdout)
    assert set(obj) >= {"n", "q", "size", "min_distance", "distance_distribution", "linear",
                        "dimension", "valid"}
    assert obj["size"] == 4096 and obj["min_distance"] == 8 and obj["dimension"] == 12


def test_check_cli_generator(tmp_path):
    from known_codes import cyclic_generator

    path = tmp_path / "g.txt"
    gen = cyclic_generator([1, 1, 0, 1], 7)
    path.write_text("\n".join("".join(map(str, r)) for r in gen) + "\n")
    proc = run_cli("check", "--generator", str(path), "--d", "3", "--json")
    assert proc.returncode == 0
    assert json.loads(proc.stdout)["weight_distribution"] == [1, 0, 0, 7, 7, 0, 0, 1]


def test_version_and_help_fast():
    proc = run_cli("--version")
    assert proc.returncode == 0 and "codesearch" in proc.stdout
    proc = run_cli("--help")
    assert proc.returncode == 0
    # importing the CLI must not import numba (what keeps --version and --help fast)
    code = "import codesearch, codesearch.cli, sys; print('numba' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert out.stdout.strip() == "False"
