"""The DRAT checker (codesearch.verify.drat): valid refutations accepted, every tampering rejected.

Outside references: the pigeonhole principle (PHP(n+1, n) is unsatisfiable, and minimally
so: without any one clause it has a model; a theorem), truth tables by brute force over all
assignments, and proofs written by CaDiCaL through python-sat (an outside producer). The
checker itself imports nothing from python-sat.
"""

from __future__ import annotations

import itertools
import random

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from codesearch import _reference as R
from codesearch.verify import drat
from codesearch.errors import InputError


# ----------------------------------------------------------------------------- helpers
def php(n: int) -> list[list[int]]:
    """PHP(n+1, n): pigeon i in hole j is variable i*n + j + 1."""
    var = lambda i, j: i * n + j + 1  # noqa: E731
    clauses = [[var(i, j) for j in range(n)] for i in range(n + 1)]
    for j in range(n):
        for a, b in itertools.combinations(range(n + 1), 2):
            clauses.append([-var(a, j), -var(b, j)])
    return clauses


def dimacs(clauses: list[list[int]], nvars: int | None = None) -> bytes:
    nv = nvars if nvars is not None else max((abs(x) for c in clauses for x in c), default=0)
    lines = [f"p cnf {nv} {len(clauses)}"] + [" ".join(map(str, c + [0])) for c in clauses]
    return ("\n".join(lines) + "\n").encode()


def proof_text(lines: list[tuple[bool, list[int]]]) -> bytes:
    return "".join(("d " if dl else "") + " ".join(map(str, c + [0])) + "\n"
                   for dl, c in lines).encode()


def solver_proof(clauses: list[list[int]]) -> list[tuple[bool, list[int]]] | None:
    """CaDiCaL's DRAT proof (None if the formula is satisfiable)."""
    from pysat.solvers import Solver

    with Solver(name="cadical195", bootstrap_with=clauses, with_proof=True) as s:
        if s.solve():
            return None
        out = []
        for line in s.get_proof():
            toks = line.split()
            dl = toks[0] == "d"
            out.append((dl, [int(t) for t in toks[1 if dl else 0:-1]]))
        return out


def satisfiable(clauses: list[list[int]], nvars: int) -> bool:
    """Brute force over all 2^nvars assignments."""
    bits = ((np.arange(2**nvars)[:, None] >> np.arange(nvars)[None, :]) & 1).astype(bool)
    ok = np.ones(2**nvars, dtype=bool)
    for c in clauses:
        sat = np.zeros(2**nvars, dtype=bool)
        for lit in c:
            sat |= bits[:, abs(lit) - 1] if lit > 0 else ~bits[:, abs(lit) - 1]
        ok &= sat
    return bool(ok.any())


def check(clauses, lines, nvars=None) -> drat.ProofCheck:
    return drat.check_proof(drat.parse_cnf(dimacs(clauses, nvars)),
                            drat.parse_proof(proof_text(lines)))


# ----------------------------------------------------------------------------- valid proofs
@pytest.mark.parametrize("n", [2, 3, 4, 5])
def test_pigeonhole_refutations_accepted(n):
    clauses = php(n)
    lines = solver_proof(clauses)
    res = check(clauses, lines)
    assert res.valid, res.reason
    assert R.drat_check(clauses, lines) if n <= 3 else True


def test_formula_with_empty_clause_is_refuted_by_an_empty_proof():
    assert check([[1, 2], []], [], nvars=2).valid


def test_rat_lemma_accepted():
    # x3 is a fresh variable: "x3" is RAT (no clause holds -x3), and the rest uses it
    clauses = [[1, 2], [-1, 2], [1, -2], [-1, -2]]
    lines = [(False, [3]), (False, [1, -3]), (False, [1]), (False, [])]
    res = check(clauses, lines, nvars=3)
    assert res.valid, res.reason
    assert R.drat_check(clauses, lines)


def test_deleted_reason_is_honoured():
    # 1 is forced by (1 5)(1 -5), 3 by (3 7)(3 -7), then (-1 2) gives 2 and the last two
    # clauses clash. Lemma "1" makes 2 true through (-1 2); deleting (-1 2) must withdraw 2:
    # without that clause the formula plus the lemmas 1, 3 has a model (1, -2, 3, 5, 7).
    clauses = [[-1, 2], [1, 5], [1, -5], [-2, -3, 6], [-2, -3, -6], [3, 7], [3, -7]]
    valid = [(False, [1]), (False, [3]), (False, [])]
    assert check(clauses, valid).valid and R.drat_check(clauses, valid)
    tampered = [(False, [1]), (True, [2, -1]), (False, [3]), (False, [])]
    assert satisfiable(clauses[1:] + [[1], [3]], 7)
    res = check(clauses, tampered)
    assert not res.valid and res.failed_line == 4, res.reason
    assert not R.drat_check(clauses, tampered)


# ----------------------------------------------------------------------------- tampering
def test_missing_empty_clause_rejected():
    clauses = php(3)
    lines = [ln for ln in solver_proof(clauses) if ln[1] or ln[0]]
    res = check(clauses, lines)
    assert not res.valid and "empty clause" in res.reason


def test_deletion_of_a_needed_clause_rejected():
    # PHP is minimally unsatisfiable (theorem), so without any one clause no refutation exists
    clauses = php(4)
    lines = solver_proof(clauses)
    for k in (0, 3, len(clauses) - 1):
        assert satisfiable([c for i, c in enumerate(clauses) if i != k], 20)
        res = check(clauses, [(True, clauses[k])] + lines)
        assert not res.valid, k


def test_lemma_neither_rup_nor_rat_rejected():
    # G = PHP(4,3) without "pigeon 0 sits somewhere" has a model (minimality), so the proof
    # that first re-adds that clause as a lemma must fail exactly there.
    full = php(3)
    clauses = full[1:]
    lines = [(False, full[0])] + solver_proof(full)
    assert not R.drat_rup(clauses, full[0]) and not R.drat_rat(clauses, full[0])
    res = check(clauses, lines)
    assert not res.valid and res.failed_line == 1, res.reason


def test_changed_lemma_rejected():
    # change a lemma of a real proof so that the twin finds it neither RUP nor RAT and the
    # rest of the proof must rely on it: the empty clause right after it
    clauses = php(3)
    lines = solver_proof(clauses)
    bad = 0
    for i, (dl, c) in enumerate(lines):
        if dl or len(c) < 2:
            continue
        changed = [-c[0]] + c[1:]
        tampered = lines[:i] + [(False, changed), (False, [])]
        if not R.drat_check(clauses, tampered):
            assert not check(clauses, tampered).valid
            bad += 1
    assert bad > 0


def test_satisfiable_formula_never_accepted():
    clauses = [[1, 2], [-1, 2], [1, -2]]
    for lines in ([(False, [])], [(False, [-1]), (False, [])], [(False, [2]), (False, [])],
                  [(True, [1, 2]), (False, [])]):
        assert not check(clauses, lines).valid


# ------------------------------------------------------------------- random formulas
def _random_formula(rng: random.Random, nvars: int, ncl: int) -> list[list[int]]:
    return [[rng.choice((-1, 1)) * v for v in rng.sample(range(1, nvars + 1), 3)]
            for _ in range(ncl)]


def _mutate(rng: random.Random, lines, clauses, nvars):
    lines = list(lines)
    kind = rng.randrange(5)
    if kind == 0 and lines:
        del lines[rng.randrange(len(lines))]
    elif kind == 1 and lines:
        i = rng.randrange(len(lines))
        dl, c = lines[i]
        if c:
            c = list(c)
            c[rng.randrange(len(c))] *= -1
            lines[i] = (dl, c)
    elif kind == 2:
        c = [rng.choice((-1, 1)) * v for v in rng.sample(range(1, nvars + 1), rng.randint(1, 2))]
        lines.insert(rng.randrange(len(lines) + 1), (False, c))
    elif kind == 3:
        lines.insert(rng.randrange(len(lines) + 1), (True, rng.choice(clauses)))
    else:
        lines = lines[: rng.randrange(len(lines) + 1)]
    return lines


@given(st.integers(0, 2**32 - 1))
def test_random_refutations_and_mutations(seed):
    rng = random.Random(seed)
    nvars = rng.randint(4, 8)
    clauses = _random_formula(rng, nvars, rng.randint(4 * nvars, 8 * nvars))
    lines = solver_proof(clauses)
    if lines is None:
        assert satisfiable(clauses, nvars)
        assert not check(clauses, [(False, [])], nvars).valid
        return
    assert not satisfiable(clauses, nvars)
    assert check(clauses, lines, nvars).valid
    assert R.drat_check(clauses, lines)
    for _ in range(4):
        mutated = _mutate(rng, lines, clauses, nvars)
        # the kernel checks only the lemmas a conflict depends on: it accepts whatever the
        # every-lemma twin accepts
        if R.drat_check(clauses, mutated):
            assert check(clauses, mutated, nvars).valid


@given(st.integers(0, 2**32 - 1))
def test_proof_of_a_stronger_formula_never_refutes_a_satisfiable_one(seed):
    rng = random.Random(seed)
    nvars = rng.randint(4, 8)
    clauses = _random_formula(rng, nvars, 2 * nvars)
    if not satisfiable(clauses, nvars):
        return
    stronger = list(clauses)
    lines = None
    while lines is None:
        stronger += _random_formula(rng, nvars, 3)
        lines = solver_proof(stronger)
    assert not check(clauses, lines, nvars).valid
    assert not R.drat_check(clauses, lines)
    mutated = _mutate(rng, lines, clauses, nvars)
    assert not check(clauses, mutated, nvars).valid


# ----------------------------------------------------------------------------- parsing
def _kernel_tokens(data: bytes, allow_delete: bool):
    from codesearch import _kernels as K

    raw, start, isdel, err = K.drat_tokens(np.frombuffer(data, np.uint8), allow_delete,
                                          10**6, 10**6)
    if err[0]:
        return None
    return [(bool(isdel[i]), raw[start[i]:start[i + 1]].tolist())
            for i in range(start.size - 1)]


_VALID = (b"c a comment\n1 -2 0\nd 1 -2 0\n  3\t4 0 -5 0\n0\nc end\n")


_VALID_CNF = b"c made by hand\np cnf 5 3\n1 -2 0\n3 4\n0 -5 0\n"


def _tokens_case(data) -> None:
    raw = bytearray(data.draw(st.sampled_from([_VALID, _VALID_CNF])))
    for _ in range(data.draw(st.integers(0, 4))):
        op = data.draw(st.integers(0, 2))
        pos = data.draw(st.integers(0, len(raw)))
        ch = data.draw(st.sampled_from(b"0123456789- dc\n\t\rxp\x00\xff"))
        if op == 0:
            raw.insert(pos, ch)
        elif op == 1 and pos < len(raw):
            raw[pos] = ch
        elif pos < len(raw):
            del raw[pos]
    text = bytes(raw)
    for allow in (True, False):
        assert _kernel_tokens(text, allow) == R.drat_tokens(text, allow)
        try:
            (drat.parse_proof if allow else drat.parse_cnf)(text)
        except InputError as exc:
            assert "\n" not in str(exc)


@given(st.data())
def test_tokens_kernel_equals_twin_on_mutated_text(data):
    _tokens_case(data)


@given(st.binary(max_size=80))
def test_parsers_give_one_line_errors(blob):
    for parse in (drat.parse_cnf, drat.parse_proof):
        try:
            parse(blob)
        except InputError as exc:
            assert "\n" not in str(exc)


@pytest.mark.parametrize("text, part", [
    (b"1 2 0\n", "expected 'p cnf"),
    (b"c only\n", "no 'p cnf' header"),
    (b"p cnf 2\n1 2 0\n", "expected 'p cnf"),
    (b"p cnf 2 2\n1 2 0\n", "header says 2 clauses"),
    (b"p cnf 2 1\n1 3 0\n", "beyond the header"),
    (b"p cnf 2 1\n1 2\n", "not closed"),
    (b"p cnf 2 1\n1 x 0\n", "unexpected 'x'"),
    (b"p cnf 2 1\nd 1 2 0\n", "unexpected 'd'"),
    (b"p cnf 2 1\n1 99999999999 0\n", "too large"),
])
def test_malformed_formula_messages(text, part):
    with pytest.raises(InputError, match=part):
        drat.parse_cnf(text)


def test_binary_proof_is_named():
    with pytest.raises(InputError, match="binary DRAT"):
        drat.parse_proof(b"a\x02\x04\x00")


def test_caps_refuse_before_work(tmp_path, monkeypatch):
    f = tmp_path / "big.cnf"
    f.write_bytes(dimacs([[1, 2]] * 50))
    monkeypatch.setattr(drat, "MAX_CNF_BYTES", 100)
    with pytest.raises(InputError, match="cap"):
        drat.read_cnf(str(f))
    monkeypatch.setattr(drat, "MAX_MEMORY", 1000)
    with pytest.raises(InputError, match="cap"):
        drat.check_proof(drat.parse_cnf(dimacs(php(3))), drat.parse_proof(b"0\n"))


def test_checker_imports_no_solver():
    import ast
    import inspect

    tree = ast.parse(inspect.getsource(drat))
    names = [a.name for node in ast.walk(tree) if isinstance(node, ast.Import) for a in node.names]
    names += [node.module for node in ast.walk(tree) if isinstance(node, ast.ImportFrom)]
    assert not any(n.startswith(("pysat", "codesearch.search")) for n in names if n)


@pytest.mark.slow
@settings(max_examples=3000)
@given(st.data())
def test_tokens_kernel_equals_twin_many(data):
    # the slow suite's share of the fuzzing target: 3000 mutated formula / proof texts
    _tokens_case(data)
