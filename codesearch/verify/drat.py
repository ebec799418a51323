"""An independent checker of DRAT refutations: is this CNF formula really unsatisfiable?

Problem
-------
A SAT solver that answers "unsatisfiable" can write a *clausal proof*: a list of lines, each
adding a clause (a *lemma*) or deleting one, ending with the empty clause. The proof is valid
when every added lemma is *redundant* for the clauses present at that moment, so that adding
it keeps a satisfiable formula satisfiable; reaching the empty clause then shows the formula
unsatisfiable. Two redundancy tests are used (DRAT = deletion + RAT):

- **RUP** (reverse unit propagation): assigning every literal of the lemma false and
  propagating unit clauses reaches a falsified clause. Then the lemma is implied.
- **RAT** (resolution asymmetric tautology) on the lemma's first literal ``p``: for every
  present clause ``D`` containing ``-p``, the resolvent ``C u (D - {-p})`` is a tautology or
  RUP. Then any model of the formula can be turned into a model of the formula plus ``C``
  (flip ``p``).

This module parses DIMACS CNF and text DRAT files strictly and checks the proof. It is kept
apart from every solver: it imports nothing from python-sat or :mod:`codesearch.search`, so a
bug in the producer cannot hide in the checker. What the formula *means* (that it encodes a
claim about codes) is checked elsewhere (:mod:`codesearch.proofbundle`).

Semantics (exactly what is accepted)
------------------------------------
- Clauses are literal *sets*: repeated literals are dropped (the first occurrence stays, so
  the RAT pivot is the first literal as written).
- A deletion removes one present clause with the same literal set (the most recently added);
  a deletion of a clause not present is ignored (counted). Deletions are honoured exactly,
  also for clauses that are currently the reason of a unit: the literals that depended on it
  are withdrawn. (Ignoring a deletion would also be sound, but exact deletion makes the
  check independent of how a checker happens to propagate.)
- The proof must contain the empty clause (or the formula must); the refutation holds when
  unit propagation over the formula plus the lemmas up to some line reaches a conflict, and
  every lemma that conflict depends on, directly or through other lemmas' checks, is RUP or
  RAT with respect to the clauses present before it. Lemmas nothing depends on are not
  checked (they cannot make an unsatisfiable verdict wrong: dropping them from the proof
  leaves a valid refutation).

Algorithm
---------
Backward checking with core marking, as in DRAT-trim: a forward pass adds the lines with
two-watched-literal unit propagation until the top level conflicts; the clauses that conflict
depends on are marked; then the lines are undone from the conflict backwards (a deletion is
re-added, a lemma removed) and each marked lemma is checked by RUP (falling back to RAT),
marking the clauses its check used. Literals whose reason is removed are withdrawn with their
dependants; when that may have left unit propagation incomplete and a check fails, the full
top-level closure is rebuilt and the check repeated, so completeness does not depend on the
bookkeeping. The work is done by the numba kernels ``drat_*`` in :mod:`codesearch._kernels`;
:func:`codesearch._reference.drat_check` is a slow forward checker of the same semantics
used by the tests.

Caps
----
Files are read whole: a formula file above :data:`MAX_CNF_BYTES` or a proof above
:data:`MAX_PROOF_BYTES` is refused before reading, and a formula plus proof whose working
arrays are estimated above :data:`MAX_MEMORY` bytes (about 12 bytes per literal, 140 per
clause or proof line, 100 per variable) is refused before they are built, each with one line.

References
----------
E. Goldberg and Y. Novikov, "Verification of proofs of unsatisfiability for CNF formulas",
DATE 2003 (RUP).
M. Järvisalo, M. J. H. Heule and A. Biere, "Inprocessing rules", IJCAR 2012 (RAT).
M. J. H. Heule, W. A. Hunt Jr. and N. Wetzler, "Trimming while checking clausal proofs",
FMCAD 2013 (backward checking, core-first marking).
N. Wetzler, M. J. H. Heule and W. A. Hunt Jr., "DRAT-trim: efficient checking and trimming
using expressive clausal proofs", SAT 2014 (the DRAT format).
M. W. Moskewicz, C. F. Madigan, Y. Zhao, L. Zhang and S. Malik, "Chaff: engineering an
efficient SAT solver", DAC 2001 (two watched literals).
"""

from __future__ import annotations

import os
import time
from dataclasses import dataclass

import numpy as np

from codesearch.errors import InputError

__all__ = ["MAX_CNF_BYTES", "MAX_PROOF_BYTES", "MAX_MEMORY", "MAX_VARS", "Cnf", "Proof",
           "ProofCheck", "parse_cnf", "parse_proof", "read_cnf", "read_proof", "check_proof",
           "check_files", "estimate_memory", "read_bytes"]

#: Largest formula file read (bytes).
MAX_CNF_BYTES = 256 * 2**20
#: Largest proof file read (bytes).
MAX_PROOF_BYTES = 512 * 2**20
#: Largest estimated working memory of one check (bytes).
MAX_MEMORY = 3 * 2**29
#: Largest variable index.
MAX_VARS = 4_000_000

_BYTES_PER_LITERAL = 12
_BYTES_PER_CLAUSE = 140
_BYTES_PER_VAR = 100

_TOKEN_ERRORS = {
    1: "unexpected character",
    2: "literal too large (|literal| must be below 2^31)",
    3: "'d' or a comment inside a clause",
    4: "last clause not closed by 0",
    5: "'-' without a number",
}


@dataclass(frozen=True)
class Cnf:
    """A CNF formula as read from DIMACS.

    Attributes
    ----------
    nvars : int
        The header's variable count.
    raw : numpy.ndarray
        All literals (int64, DIMACS signs), clause after clause, as written.
    start : numpy.ndarray
        Clause ``i`` is ``raw[start[i]:start[i + 1]]``.
    """

    nvars: int
    raw: np.ndarray
    start: np.ndarray

    @property
    def nclauses(self) -> int:
        return int(self.start.size - 1)

    def clause(self, i: int) -> list[int]:
        """Clause ``i`` as a list of DIMACS literals."""
        return self.raw[self.start[i]:self.start[i + 1]].tolist()

    def equals(self, clauses: list[list[int]]) -> int | None:
        """Compare with a clause list, clause for clause and literal for literal.

        Returns None when equal, else the index of the first differing clause (or the
        shorter length when one list is a prefix of the other).
        """
        import itertools

        lens = np.fromiter((len(c) for c in clauses), dtype=np.int64, count=len(clauses))
        flat = np.fromiter(itertools.chain.from_iterable(clauses), dtype=np.int64,
                           count=int(lens.sum()))
        mine = np.diff(self.start)
        k = min(mine.size, lens.size)
        bad = np.nonzero(mine[:k] != lens[:k])[0]
        first = int(bad[0]) if bad.size else k
        # literals agree up to the first clause whose length differs
        upto = int(self.start[first])
        diff = np.nonzero(self.raw[:upto] != flat[:upto])[0]
        if diff.size:
            return int(np.searchsorted(self.start, diff[0], side="right") - 1)
        if first < k or mine.size != lens.size:
            return first
        return None


@dataclass(frozen=True)
class Proof:
    """A DRAT proof: one clause per line, with a deletion flag.

    Attributes
    ----------
    raw, start : numpy.ndarray
        Literals and offsets as in :class:`Cnf`.
    isdel : numpy.ndarray
        uint8, 1 where the line deletes its clause.
    """

    raw: np.ndarray
    start: np.ndarray
    isdel: np.ndarray

    @property
    def nlines(self) -> int:
        return int(self.isdel.size)


@dataclass(frozen=True)
class ProofCheck:
    """The verdict on a proof and what the check did.

    Attributes
    ----------
    valid : bool
        True iff the proof refutes the formula.
    reason : str
        One line: why it is valid or where it fails.
    lemmas, deletions : int
        Proof lines of each kind.
    checked : int
        Lemmas the refutation depends on, each checked (RUP or RAT).
    rat : int
        Lemmas accepted by the RAT test.
    failed_line : int or None
        1-based proof line of the first lemma found not redundant.
    conflict_line : int or None
        1-based proof line after which unit propagation conflicts (0: the formula alone).
    core_clauses : int
        Formula clauses the refutation uses.
    absent_deletions, reason_deletions, repropagations : int
        Deletions of a clause not present (ignored), deletions of a clause that was the
        reason of a unit, full re-propagations needed.
    seconds : float
        Wall time of the check (parsing excluded).
    """

    valid: bool
    reason: str
    lemmas: int
    deletions: int
    checked: int
    rat: int
    failed_line: int | None
    conflict_line: int | None
    core_clauses: int
    absent_deletions: int
    reason_deletions: int
    repropagations: int
    seconds: float

    def to_json(self) -> dict:
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def estimate_memory(nlits: int, nclauses: int, nvars: int) -> int:
    """Estimated peak bytes of the working arrays for a check of this size."""
    return (_BYTES_PER_LITERAL * nlits + _BYTES_PER_CLAUSE * nclauses
            + _BYTES_PER_VAR * nvars)


def _tokens(data: bytes, allow_delete: bool, what: str, line_base: int = 0
            ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    from codesearch import _kernels as K

    buf = np.frombuffer(data, dtype=np.uint8)
    max_lits = MAX_MEMORY // _BYTES_PER_LITERAL
    max_clauses = MAX_MEMORY // _BYTES_PER_CLAUSE
    raw, start, isdel, err = K.drat_tokens(buf, allow_delete, max_lits, max_clauses)
    code, offset = int(err[0]), int(err[1])
    if code == 0:
        return raw, start, isdel
    line = line_base + data.count(b"\n", 0, offset) + 1
    if code == 6:
        raise InputError(f"{what}: more than {max_lits} literals or {max_clauses} clauses by "
                         f"line {line}: past the checker's cap of {MAX_MEMORY // 2**20} MiB")
    msg = _TOKEN_ERRORS.get(code, "malformed")
    if code == 1 and offset < len(data):
        ch = data[offset:offset + 1]
        shown = ch.decode("ascii") if 32 < ch[0] < 127 else f"byte 0x{ch[0]:02x}"
        msg = f"unexpected {shown!r}" if 32 < ch[0] < 127 else f"unexpected {shown}"
        if allow_delete and (ch[0] == 0x61 or ch[0] < 9 or ch[0] > 127):
            msg += " (binary DRAT is not read: write the proof as text)"
    raise InputError(f"{what}:{line}: {msg}")


def parse_cnf(data: bytes, what: str = "formula") -> Cnf:
    """Parse DIMACS CNF text: comment lines, ``p cnf V C``, then C clauses closed by 0.

    Raises
    ------
    InputError
        One line naming the file, the line and the problem.
    """
    pos = 0
    line = 0
    header = None
    while pos < len(data):
        end = data.find(b"\n", pos)
        end = len(data) if end < 0 else end
        text = data[pos:end].strip()
        line += 1
        pos = end + 1
        if not text or text.startswith(b"c"):
            continue
        header = text
        break
    if header is None:
        raise InputError(f"{what}: no 'p cnf' header")
    parts = header.split()
    if (len(parts) != 4 or parts[0] != b"p" or parts[1] != b"cnf"
            or not all(p.isdigit() and len(p) <= 12 for p in parts[2:])):
        raise InputError(f"{what}:{line}: expected 'p cnf VARIABLES CLAUSES', got "
                         f"{header[:40].decode('ascii', 'replace')!r}")
    nvars, ncl = int(parts[2]), int(parts[3])
    if nvars > MAX_VARS:
        raise InputError(f"{what}:{line}: {nvars} variables is past the checker's cap "
                         f"({MAX_VARS})")
    raw, start, _ = _tokens(data[pos:], False, what, line)
    if start.size - 1 != ncl:
        raise InputError(f"{what}: header says {ncl} clauses, the file has {start.size - 1}")
    if raw.size and int(np.abs(raw).max()) > nvars:
        raise InputError(f"{what}: literal {int(np.abs(raw).max())} beyond the header's "
                         f"{nvars} variables")
    return Cnf(nvars, raw, start)


def parse_proof(data: bytes, what: str = "proof") -> Proof:
    """Parse a text DRAT proof: one clause per line closed by 0, ``d`` before deletions.

    Raises
    ------
    InputError
        One line naming the file, the line and the problem.
    """
    raw, start, isdel = _tokens(data, True, what)
    return Proof(raw, start, isdel)


def read_bytes(path: str, cap: int, what: str) -> bytes:
    """The bytes of ``path``, refused with one line when larger than ``cap``."""
    try:
        size = os.path.getsize(path)
    except OSError as exc:
        raise InputError(f"{path}: cannot read: {exc.strerror}") from None
    if size > cap:
        raise InputError(f"{path}: {size} bytes is past the cap for a {what} ({cap} bytes)")
    try:
        with open(path, "rb") as fh:
            return fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot read: {exc.strerror}") from None


def read_cnf(path: str) -> Cnf:
    """Read a DIMACS CNF file (see :func:`parse_cnf`)."""
    return parse_cnf(read_bytes(path, MAX_CNF_BYTES, "formula"), path)


def read_proof(path: str) -> Proof:
    """Read a text DRAT proof file (see :func:`parse_proof`)."""
    return parse_proof(read_bytes(path, MAX_PROOF_BYTES, "proof"), path)


def check_proof(cnf: Cnf, proof: Proof) -> ProofCheck:
    """Check that ``proof`` refutes ``cnf`` (see the module docstring for the semantics).

    Raises
    ------
    InputError
        When the check would pass :data:`MAX_MEMORY` or :data:`MAX_VARS`.
    """
    from codesearch import _kernels as K

    nvars = cnf.nvars
    if proof.raw.size:
        nvars = max(nvars, int(np.abs(proof.raw).max()))
    if nvars > MAX_VARS:
        raise InputError(f"proof uses variable {nvars}, past the checker's cap ({MAX_VARS})")
    nlits = cnf.raw.size + proof.raw.size
    ncl = cnf.nclauses + proof.nlines
    need = estimate_memory(nlits, ncl, nvars)
    if need > MAX_MEMORY:
        raise InputError(f"checking {ncl} clauses and proof lines with {nlits} literals needs "
                         f"about {need // 2**20} MiB, past the cap of {MAX_MEMORY // 2**20} MiB")
    nvars = max(nvars, 1)
    t0 = time.perf_counter()
    raw = np.concatenate([cnf.raw, proof.raw]).astype(np.int64)
    start = np.concatenate([cnf.start, proof.start[1:] + cnf.start[-1]]).astype(np.int64)
    lits, start = K.drat_encode(raw, start, nvars)
    del raw
    nform = cnf.nclauses
    isdel = np.ascontiguousarray(proof.isdel, dtype=np.uint8)
    target = K.drat_match_deletions(lits, start, nform, isdel, 2 * nvars)
    core = np.zeros(start.size - 1, np.uint8)
    stats = np.zeros(10, np.int64)
    K.drat_check(lits, start, nform, isdel, target, nvars, core, stats)
    seconds = time.perf_counter() - t0
    status = int(stats[0])
    failed = int(stats[1]) + 1 if status == 1 else None
    conflict = int(stats[2]) + 1 if status == 0 else None
    if status == 0:
        reason = (f"refutation holds: conflict after line {conflict}, {int(stats[4])} of "
                  f"{int(stats[3])} lemmas needed and checked ({int(stats[5])} by RAT)")
    elif status == 1:
        line = f"proof line {failed} (the empty clause)" if (
            proof.start[failed] == proof.start[failed - 1]) else f"proof line {failed}"
        reason = f"{line}: lemma is neither RUP nor RAT"
    elif status == 2:
        reason = "the proof never adds the empty clause"
    else:
        reason = "unit propagation over the formula and all lemmas reaches no conflict"
    return ProofCheck(
        valid=status == 0, reason=reason, lemmas=int(stats[3]), deletions=int(stats[9]),
        checked=int(stats[4]), rat=int(stats[5]), failed_line=failed,
        conflict_line=conflict, core_clauses=int(core[:nform].sum()),
        absent_deletions=int(stats[6]), reason_deletions=int(stats[7]),
        repropagations=int(stats[8]), seconds=seconds)


def check_files(cnf_path: str, proof_path: str) -> ProofCheck:
    """Read a DIMACS formula and a text DRAT proof and check the proof (one call)."""
    return check_proof(read_cnf(cnf_path), read_proof(proof_path))
