"""The results store: one SQLite file holding every code, bound and run of a table.

Problem
-------
A table of A_q(n,d) is filled over many runs, on several machines, and must survive crashes.
The store keeps, per cell, every code found (codewords packed into bytes), every upper bound
with its certificate or the name of the theorem behind it, and for each the method, the
parameters, the seed, the software version, the machine, the time taken and when. Published
values imported by the user are kept in their own table, apart from what this tool proved.

Invariants
----------
* Nothing unverified enters. Each code is re-verified with :func:`codesearch.verify.assert_code`
  (and its packed form decoded and compared) inside the transaction that stores it; each
  certificate is re-checked there too (:func:`codesearch.verify.check_certificate` for solver
  certificates, the cited rows of this store for relations between cells). A bound whose
  certificate fails is stored with ``certified = 0`` and never counts as an upper bound.
* Every write is one transaction (``BEGIN IMMEDIATE``), the database runs in WAL mode, so a
  ``kill -9`` at any moment loses at most the transaction in flight and never corrupts what
  was committed. Several processes may write the same store; SQLite serialises them.
* Duplicates cannot arise: a code is identified by a digest of its canonical form, a bound by
  its method and value, a run by its cell and task (``UNIQUE`` constraints, ``INSERT OR
  IGNORE`` / upserts).
* The file carries ``PRAGMA application_id`` (identifies a codesearch store) and ``PRAGMA
  user_version`` (schema version); both are checked on open.

References
----------
SQLite documentation, "Write-Ahead Logging" and "Atomic Commit In SQLite",
https://www.sqlite.org/wal.html, https://www.sqlite.org/atomiccommit.html
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import hashlib
import json
import os
import platform
import sqlite3
import time
from dataclasses import dataclass
from typing import Any, Iterator, Mapping, Sequence

import numpy as np

from codesearch._version import __version__
from codesearch.codefile import file_sha256
from codesearch.errors import InputError, VerificationError
from codesearch.model import MAX_LISTED_WORDS, Code, LinearCode, Params
from codesearch.results import BoundResult, SearchResult, Status

__all__ = [
    "SCHEMA_VERSION",
    "APPLICATION_ID",
    "DEFAULT_STORE",
    "Store",
    "CellSummary",
    "PublishedRow",
    "pack_code",
    "unpack_code",
    "RECORD_KINDS",
    "search_record",
    "refutation_record",
]

#: Schema version written to ``PRAGMA user_version`` (older stores are migrated on open,
#: see :data:`_MIGRATIONS`).
SCHEMA_VERSION = 2
#: ``PRAGMA application_id`` of a codesearch store ("CSRS" in ASCII).
APPLICATION_ID = 0x43535253
#: File name used when no ``--store`` is given (in the current directory).
DEFAULT_STORE = "codesearch.sqlite"
_SQLITE_MAGIC = b"SQLite format 3\x00"

_SCHEMA = """
CREATE TABLE codes(
    id INTEGER PRIMARY KEY,
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    size INTEGER NOT NULL,
    digest TEXT NOT NULL,
    words BLOB NOT NULL,
    method TEXT NOT NULL,
    status TEXT NOT NULL,
    seed INTEGER,
    settings TEXT NOT NULL,
    provenance TEXT,
    version TEXT NOT NULL,
    machine TEXT NOT NULL,
    seconds REAL NOT NULL,
    created TEXT NOT NULL,
    form TEXT NOT NULL DEFAULT 'words',
    UNIQUE(q, n, d, digest)
);
CREATE INDEX codes_cell ON codes(q, n, d, size);
CREATE TABLE bounds(
    id INTEGER PRIMARY KEY,
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    value INTEGER NOT NULL,
    method TEXT NOT NULL,
    kind TEXT NOT NULL,
    certificate TEXT,
    certified INTEGER NOT NULL,
    note TEXT NOT NULL,
    version TEXT NOT NULL,
    machine TEXT NOT NULL,
    seconds REAL NOT NULL,
    created TEXT NOT NULL,
    UNIQUE(q, n, d, method, value)
);
CREATE INDEX bounds_cell ON bounds(q, n, d, value);
CREATE TABLE runs(
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    task TEXT NOT NULL,
    budget REAL NOT NULL,
    seconds REAL NOT NULL,
    status TEXT NOT NULL,
    seed INTEGER,
    version TEXT NOT NULL,
    machine TEXT NOT NULL,
    created TEXT NOT NULL,
    PRIMARY KEY(q, n, d, task)
);
CREATE TABLE published(
    id INTEGER PRIMARY KEY,
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    lower INTEGER,
    upper INTEGER,
    source TEXT NOT NULL,
    imported TEXT NOT NULL,
    UNIQUE(q, n, d, source)
);
"""

# Tables added by schema version 2 (also run by the migration from version 1).
_SCHEMA_V2_TABLES = """
CREATE TABLE improvements(
    id INTEGER PRIMARY KEY,
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    side TEXT NOT NULL,
    old INTEGER,
    new INTEGER NOT NULL,
    method TEXT NOT NULL,
    row_id INTEGER NOT NULL,
    seconds REAL NOT NULL,
    budget REAL,
    created TEXT NOT NULL
);
CREATE INDEX improvements_cell ON improvements(q, n, d);
CREATE TABLE cell_log(
    id INTEGER PRIMARY KEY,
    q INTEGER NOT NULL, n INTEGER NOT NULL, d INTEGER NOT NULL,
    budget REAL NOT NULL,
    seconds REAL NOT NULL,
    stages TEXT NOT NULL,
    version TEXT NOT NULL,
    machine TEXT NOT NULL,
    created TEXT NOT NULL
);
"""
_SCHEMA += _SCHEMA_V2_TABLES
_TABLES = ("codes", "bounds", "runs", "published", "improvements", "cell_log")

#: Statements taking a store from schema version v to v + 1, run in one transaction on open.
#: Version 2: codes may be kept as a generator matrix (``form = 'generator'``, the packed rows
#: of its reduced echelon form); improvements of a cell's lower or upper value are logged with
#: time and method; every cell run logs its stage times. Existing rows are kept as they are.
_MIGRATIONS: dict[int, tuple[str, ...]] = {
    1: ("ALTER TABLE codes ADD COLUMN form TEXT NOT NULL DEFAULT 'words'",
        *(stmt for stmt in _SCHEMA_V2_TABLES.split(";") if stmt.strip())),
}


def _now() -> str:
    return _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds")


def _machine() -> str:
    return platform.node() or "unknown"


# ------------------------------------------------------------------------- packing codes
def _bits(q: int) -> int:
    return max(1, (q - 1).bit_length())


def pack_code(code: Code) -> bytes:
    """Pack codewords into bytes: ``ceil(log2 q)`` bit planes per word, each ``ceil(n/8)`` bytes.

    Row ``i`` of the result is ``plane_0 | plane_1 | ...`` where plane ``p`` holds bit ``p``
    of every symbol (``numpy.packbits`` order, most significant bit first).
    """
    w = np.asarray(code.words, dtype=np.uint8)
    planes = [np.packbits((w >> p) & 1, axis=1) for p in range(_bits(code.q))]
    return np.concatenate(planes, axis=1).tobytes() if w.shape[0] else b""


def unpack_code(blob: bytes, q: int, n: int, size: int) -> Code:
    """Inverse of :func:`pack_code`."""
    nb = (n + 7) // 8
    b = _bits(q)
    raw = np.frombuffer(blob, dtype=np.uint8)
    if raw.size != size * b * nb:
        raise VerificationError(f"packed code has {raw.size} bytes, expected {size * b * nb}")
    raw = raw.reshape(size, b * nb)
    words = np.zeros((size, n), dtype=np.uint8)
    for p in range(b):
        words |= (np.unpackbits(raw[:, p * nb:(p + 1) * nb], axis=1)[:, :n] << p).astype(np.uint8)
    return Code(words, q)


def _canonical(code: Code) -> Code:
    """:meth:`Code.canonical`; large binary codes sort on one 64-bit key per word (position 0
    most significant: the same lexicographic order, one sort instead of n)."""
    if code.q != 2 or code.n > 64 or code.size <= 4096:
        return code.canonical()
    raw = np.packbits(code.words, axis=1)  # big-endian bits: position 0 is the top bit
    keys = np.zeros((code.size, 8), dtype=np.uint8)
    keys[:, : raw.shape[1]] = raw
    order = np.argsort(keys.view(">u8")[:, 0], kind="stable")
    return Code(code.words[order], code.q)


def _digest(code: Code) -> str:
    canon = _canonical(code)
    h = hashlib.sha256()
    h.update(f"{canon.q},{canon.n},{canon.size};".encode())
    h.update(canon.words.tobytes())
    return h.hexdigest()


def _echelon(code: LinearCode) -> LinearCode:
    """The code's generator in reduced row echelon form (one per linear code)."""
    from codesearch.gf import field

    return LinearCode(field(code.q).rref(code.generator)[0], code.q)


def _generator_digest(code: LinearCode) -> str:
    h = hashlib.sha256()
    h.update(f"generator:{code.q},{code.n},{code.k};".encode())
    h.update(np.ascontiguousarray(code.generator).tobytes())
    return h.hexdigest()


#: Codes with more words than this are stored as a generator matrix when they are linear.
GENERATOR_FORM_WORDS = 4096
#: Largest code size the store keeps (SQLite integers are 64-bit).
_MAX_STORED_SIZE = (1 << 63) - 1


# ------------------------------------------------------------------------------- records
@dataclass(frozen=True)
class CellSummary:
    """What the store knows about one cell: best code size and best proven upper bound.

    ``lower`` is 0 and ``upper`` is None when nothing is stored. ``lower_*`` and ``upper_*``
    describe the row that gives the value (method, seconds, certificate kind, row id).
    """

    q: int
    n: int
    d: int
    lower: int
    upper: int | None
    lower_method: str | None
    upper_method: str | None
    lower_seconds: float | None
    upper_seconds: float | None
    upper_kind: str | None
    code_id: int | None
    bound_id: int | None
    lower_provenance: Mapping[str, Any] | None

    @property
    def params(self) -> Params:
        return Params(self.q, self.n, self.d)

    @property
    def exact(self) -> bool:
        return self.upper is not None and self.lower == self.upper


@dataclass(frozen=True)
class PublishedRow:
    """One imported published value (kept apart from what this tool proved)."""

    q: int
    n: int
    d: int
    lower: int | None
    upper: int | None
    source: str


class Store:
    """A results store backed by one SQLite file.

    Parameters
    ----------
    path : str or PathLike
        The database file. Created (with the schema) when missing and ``create`` is true.
    create : bool
        When false, a missing file is an :class:`InputError`.

    Raises
    ------
    InputError
        If the file is not an SQLite database, is an SQLite database of another program, has
        a newer schema, or fails SQLite's quick integrity check.
    """

    def __init__(self, path: str | os.PathLike[str], *, create: bool = True) -> None:
        self.path = os.fspath(path)
        exists = os.path.exists(self.path)
        if not exists and not create:
            raise InputError(f"{self.path}: no such store")
        if exists:
            self._check_header()
        try:
            self._conn = sqlite3.connect(self.path, timeout=120.0, isolation_level=None)
        except sqlite3.Error as exc:
            raise InputError(f"{self.path}: cannot open store ({exc})") from None
        try:
            self._setup()
        except sqlite3.DatabaseError as exc:
            self._conn.close()
            raise InputError(f"{self.path}: not a usable codesearch store ({exc})") from None
        except InputError:
            self._conn.close()
            raise

    # ------------------------------------------------------------------ opening, schema
    def _check_header(self) -> None:
        try:
            with open(self.path, "rb") as fh:
                head = fh.read(len(_SQLITE_MAGIC))
        except OSError as exc:
            raise InputError(f"{self.path}: cannot read store ({exc.strerror})") from None
        if head and head != _SQLITE_MAGIC:
            raise InputError(f"{self.path}: not a codesearch store (not an SQLite database)")

    def _setup(self) -> None:
        c = self._conn
        c.execute("PRAGMA busy_timeout = 120000")
        app, ver, tables = self._snapshot()
        if app == APPLICATION_ID:
            if ver < SCHEMA_VERSION:
                self._migrate()
            self._check_version(self._snapshot()[1])
            self._set_wal()
        else:
            self._reject_foreign(app, tables)
            # Creation races with other processes: the check is repeated under the write lock.
            self._set_wal()
            c.execute("BEGIN IMMEDIATE")
            try:
                app, ver, tables = self._ids()
                if app != APPLICATION_ID:
                    self._reject_foreign(app, tables)
                    # executescript() would COMMIT first, so the schema runs statement by statement.
                    for stmt in _SCHEMA.split(";"):
                        if stmt.strip():
                            c.execute(stmt)
                    c.execute(f"PRAGMA application_id = {APPLICATION_ID}")
                    c.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
                c.execute("COMMIT")
            except BaseException:
                c.execute("ROLLBACK")
                raise
            self._check_version(self._snapshot()[1])
        # NORMAL is durable against process crashes in WAL mode (only power loss may drop
        # the last commits), which is the failure the store is designed for.
        c.execute("PRAGMA synchronous = NORMAL")
        row = c.execute("PRAGMA quick_check").fetchone()
        if row is None or row[0] != "ok":
            raise InputError(f"{self.path}: store fails its integrity check ({row[0] if row else '?'})")

    def _set_wal(self) -> None:
        # Switching the journal mode can answer "database is locked" at once, without the busy
        # handler, while another process is creating the same file: retry for a while.
        delay = 0.005
        deadline = time.monotonic() + 60.0
        while True:
            try:
                self._conn.execute("PRAGMA journal_mode = WAL")
                return
            except sqlite3.OperationalError as exc:
                if "locked" not in str(exc) or time.monotonic() > deadline:
                    raise
                time.sleep(delay)
                delay = min(delay * 2, 0.2)

    def _ids(self) -> tuple[int, int, int]:
        app = self._conn.execute("PRAGMA application_id").fetchone()[0]
        ver = self._conn.execute("PRAGMA user_version").fetchone()[0]
        tables = self._conn.execute("SELECT count(*) FROM sqlite_master").fetchone()[0]
        return int(app), int(ver), int(tables)

    def _snapshot(self) -> tuple[int, int, int]:
        # One read transaction, so that a store being created by another process is seen
        # either empty or complete (never tables without the application id).
        self._conn.execute("BEGIN")
        try:
            return self._ids()
        finally:
            self._conn.execute("COMMIT")

    def _migrate(self) -> None:
        """Bring an older store to :data:`SCHEMA_VERSION`, one version per step, all in one
        transaction (a failure leaves the store as it was)."""
        c = self._conn
        c.execute("BEGIN IMMEDIATE")
        try:
            ver = self._ids()[1]  # again under the write lock: another process may have done it
            while ver < SCHEMA_VERSION and ver in _MIGRATIONS:
                for stmt in _MIGRATIONS[ver]:
                    c.execute(stmt)
                ver += 1
                c.execute(f"PRAGMA user_version = {ver}")
            c.execute("COMMIT")
        except BaseException:
            c.execute("ROLLBACK")
            raise

    def _reject_foreign(self, app: int, tables: int) -> None:
        if app != 0 or tables:
            raise InputError(f"{self.path}: SQLite file of another program, not a codesearch store")

    def _check_version(self, ver: int) -> None:
        if ver != SCHEMA_VERSION:
            raise InputError(
                f"{self.path}: store schema version {ver}, this codesearch reads {SCHEMA_VERSION}"
            )

    def close(self) -> None:
        """Close the connection (idempotent)."""
        with contextlib.suppress(Exception):
            self._conn.close()

    def __enter__(self) -> "Store":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # ---------------------------------------------------------------------- transactions
    @contextlib.contextmanager
    def transaction(self) -> Iterator["Store"]:
        """One write transaction; everything inside commits together or not at all.

        Nested use joins the outer transaction.
        """
        if self._conn.in_transaction:
            yield self
            return
        self._conn.execute("BEGIN IMMEDIATE")
        try:
            yield self
        except BaseException:
            self._conn.execute("ROLLBACK")
            raise
        self._conn.execute("COMMIT")

    # ----------------------------------------------------------------------------- codes
    def add_code(
        self,
        code: Code | LinearCode,
        params: Params,
        *,
        method: str,
        status: Status | str = Status.FEASIBLE,
        seed: int | None = None,
        settings: Mapping[str, Any] | None = None,
        seconds: float = 0.0,
        provenance: Mapping[str, Any] | None = None,
    ) -> int:
        """Verify ``code`` for cell ``params`` and store it; return its row id.

        A :class:`~codesearch.model.LinearCode` is kept as its generator matrix (reduced
        echelon form) and checked by :func:`codesearch.verify.assert_linear_code`; an explicit
        code of more than :data:`GENERATOR_FORM_WORDS` binary words that is a linear space is
        kept the same way, anything else as its packed words. A code already stored for the
        cell (same canonical words, or same echelon generator) is not duplicated; the existing
        row's id is returned.

        Raises
        ------
        VerificationError
            If the code is not a code of the cell (the producer has a bug); nothing is stored.
        """
        status_text = status.value if isinstance(status, Status) else str(status)
        with self.transaction():
            form, stored = self._verified_form(code, params)
            if stored.size > _MAX_STORED_SIZE:
                raise InputError(f"{params}: a code of {stored.size} words is past what the store keeps")
            if form == "generator":
                rows = Code(stored.generator, stored.q)  # type: ignore[union-attr]
                blob = pack_code(rows) if stored.k else b""  # type: ignore[union-attr]
                if stored.k and unpack_code(blob, rows.q, rows.n, rows.size) != rows:  # type: ignore[union-attr]
                    raise VerificationError("packed generator does not decode to the original rows")
                digest = _generator_digest(stored)  # type: ignore[arg-type]
            else:
                blob = pack_code(stored)  # type: ignore[arg-type]
                # The bytes we store are decoded and compared, so a packing bug cannot slip by.
                if unpack_code(blob, stored.q, stored.n, stored.size) != stored:
                    raise VerificationError("packed code does not decode to the original words")
                digest = _digest(stored)  # type: ignore[arg-type]
            cur = self._conn.execute(
                "INSERT OR IGNORE INTO codes(q,n,d,size,digest,words,method,status,seed,settings,"
                "provenance,version,machine,seconds,created,form) "
                "VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)",
                (
                    params.q, params.n, params.d, int(stored.size), digest, blob, method,
                    status_text, seed, json.dumps(dict(settings or {}), sort_keys=True, default=str),
                    None if provenance is None else json.dumps(dict(provenance), sort_keys=True),
                    __version__, _machine(), float(seconds), _now(), form,
                ),
            )
            if cur.rowcount:
                return int(cur.lastrowid)
            row = self._conn.execute(
                "SELECT id FROM codes WHERE q=? AND n=? AND d=? AND digest=?",
                (params.q, params.n, params.d, digest),
            ).fetchone()
            return int(row[0])

    @staticmethod
    def _verified_form(code: Code | LinearCode, params: Params) -> tuple[str, Code | LinearCode]:
        """Check ``code`` for the cell; return how it is kept ("words" or "generator")."""
        from codesearch import verify

        if isinstance(code, LinearCode):
            verify.assert_linear_code(code, params)
            return "generator", _echelon(code)
        if not isinstance(code, Code):
            raise VerificationError(f"expected a Code or a LinearCode, got {type(code).__name__}")
        if code.q == 2 and code.n <= 64 and code.size > GENERATOR_FORM_WORDS \
                and code.q == params.q and code.n == params.n:
            _method, basis = verify.assert_large_binary(code, params.d)
            if basis is not None:
                return "generator", _echelon(LinearCode(basis, 2))
            return "words", code
        verify.assert_code(code, params)
        return "words", code

    def _load(self, code_id: int) -> tuple[Params, Code | LinearCode]:
        row = self._conn.execute(
            "SELECT q,n,d,size,words,form FROM codes WHERE id=?", (code_id,)
        ).fetchone()
        if row is None:
            raise InputError(f"no stored code with id {code_id}")
        q, n, d, size, blob, form = row
        if form == "generator":
            k = 0
            while q**k < size:
                k += 1
            if q**k != size:
                raise VerificationError(f"code #{code_id}: size {size} is not a power of {q}")
            rows = unpack_code(blob, q, n, k).words if k else np.zeros((0, n), np.uint8)
            return Params(q, n, d), LinearCode(rows, q)
        if form != "words":
            raise InputError(f"code #{code_id}: unknown storage form {form!r}")
        return Params(q, n, d), unpack_code(blob, q, n, size)

    def get_stored(self, code_id: int) -> tuple[Params, Code | LinearCode]:
        """The cell and the code ``code_id`` as stored (a :class:`LinearCode` for the generator
        form, else a :class:`Code`), re-verified on the way out.

        Raises
        ------
        VerificationError
            If the stored bytes no longer decode to a code of the cell (a damaged store).
        """
        from codesearch import verify

        params, code = self._load(code_id)
        if isinstance(code, LinearCode):
            verify.assert_linear_code(code, params)
        else:
            verify.assert_code(code, params)
        return params, code

    def get_code(self, code_id: int, max_words: int = MAX_LISTED_WORDS) -> tuple[Params, Code]:
        """The cell and the codewords of stored code ``code_id``, re-verified on the way out.

        A code kept as a generator matrix is listed word by word, up to ``max_words`` words.

        Raises
        ------
        InputError
            If the code has more than ``max_words`` words (use :meth:`get_stored`).
        VerificationError
            If the stored bytes no longer decode to a code of the cell (a damaged store).
        """
        params, code = self.get_stored(code_id)
        if isinstance(code, LinearCode):
            if code.size > max_words:
                raise InputError(f"code #{code_id} has {code.size} words, more than {max_words} "
                                 "to list; it is stored as a generator matrix")
            code = code.words(max_words)
        return params, code

    def code_size(self, code_id: int) -> int:
        """Number of words of stored code ``code_id`` (nothing decoded)."""
        row = self._conn.execute("SELECT size FROM codes WHERE id=?", (code_id,)).fetchone()
        if row is None:
            raise InputError(f"no stored code with id {code_id}")
        return int(row[0])

    def best_code(self, params: Params) -> Code | None:
        """The largest stored code of the cell as codewords (None when there is none)."""
        row = self._conn.execute(
            "SELECT id FROM codes WHERE q=? AND n=? AND d=? ORDER BY size DESC, id LIMIT 1",
            (params.q, params.n, params.d),
        ).fetchone()
        return None if row is None else self.get_code(int(row[0]))[1]

    def best_stored(self, params: Params) -> Code | LinearCode | None:
        """The largest stored code of the cell as stored (see :meth:`get_stored`)."""
        row = self._conn.execute(
            "SELECT id FROM codes WHERE q=? AND n=? AND d=? ORDER BY size DESC, id LIMIT 1",
            (params.q, params.n, params.d),
        ).fetchone()
        return None if row is None else self.get_stored(int(row[0]))[1]

    # ---------------------------------------------------------------------------- bounds
    def add_bound(self, bound: BoundResult, *, seconds: float = 0.0) -> int | None:
        """Store an upper bound after re-checking its certificate; return its row id.

        Bounds that are not valid for all codes (``scope != "all"``) are not stored (None is
        returned). A certificate that fails its exact re-check, or that cannot be re-checked,
        is stored with ``certified = 0``: kept as a record, never used as a bound. A
        certificate of kind ``"cell-relation"`` is checked against the cited rows of this
        store; an invalid one raises :class:`VerificationError`.

        A certificate is bound to its cell: one stating another cell (see
        :func:`codesearch.verify.certificates.binding_problem`) is refused with
        :class:`InputError` and nothing is stored. The records of :data:`RECORD_KINDS` (what
        an exhaustive search or a re-checked refutation bundle proved) are not certificates:
        they are stored as their producer certified them, bound to the cell, and the report
        labels them for what they are.

        Raises
        ------
        InputError
            A certificate for another cell or value, or a malformed one (unreadable cell).
        """
        if bound.scope != "all":
            return None
        p = bound.params
        cert = None if bound.certificate is None else dict(bound.certificate)
        with self.transaction():
            if cert is None:
                kind, certified = "theorem", bool(bound.certified)
            elif cert.get("kind") == "cell-relation":
                self._check_relation(p, bound.value, cert)
                kind, certified = "cell-relation", True
            else:
                kind = str(cert.get("kind", "certificate"))
                self._check_binding(p, bound.value, cert)
                if kind in RECORD_KINDS:
                    certified = bool(bound.certified)
                else:
                    certified = bound.certified and self._check_certificate(cert, bound.value)
            cur = self._conn.execute(
                "INSERT OR IGNORE INTO bounds(q,n,d,value,method,kind,certificate,certified,note,"
                "version,machine,seconds,created) VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?)",
                (
                    p.q, p.n, p.d, int(bound.value), bound.method, kind,
                    None if cert is None else json.dumps(cert, sort_keys=True, default=str),
                    int(certified), bound.note, __version__, _machine(), float(seconds), _now(),
                ),
            )
            if cur.rowcount:
                return int(cur.lastrowid)
            row = self._conn.execute(
                "SELECT id FROM bounds WHERE q=? AND n=? AND d=? AND method=? AND value=?",
                (p.q, p.n, p.d, bound.method, int(bound.value)),
            ).fetchone()
            return int(row[0])

    @staticmethod
    def _check_binding(p: Params, value: int, cert: Mapping[str, Any]) -> None:
        """Refuse a certificate or record that states another cell (or, for a record,
        another value) than the bound it is offered for."""
        from codesearch.verify.certificates import binding_problem

        try:
            problem = binding_problem(cert, p)
        except InputError:
            if cert.get("kind") in RECORD_KINDS:
                raise
            return  # states no readable cell: it cannot re-check either (stored uncertified)
        if problem is None and cert.get("kind") in RECORD_KINDS and cert.get("value") != value:
            problem = f"record states the bound {cert.get('value')!r:.30}, not {value}"
        if problem is not None:
            raise InputError(f"bound for {p} refused: {problem}")

    @staticmethod
    def _check_certificate(cert: Mapping[str, Any], value: int) -> bool:
        from codesearch import verify

        try:
            valid, proved, _reason = verify.check_certificate(cert)
        except InputError:  # a malformed certificate is an uncertified bound, not a crash
            return False
        return bool(valid) and proved is not None and int(proved) <= int(value)

    def _check_relation(self, p: Params, value: int, cert: Mapping[str, Any]) -> None:
        """Re-check a bound derived from other cells' stored bounds (:mod:`verify.relations`)."""
        from codesearch import verify

        def lookup(bound_id: int) -> tuple[int, int, int, int, bool] | None:
            row = self._conn.execute(
                "SELECT q,n,d,value,certified FROM bounds WHERE id=?", (bound_id,)).fetchone()
            return None if row is None else (row[0], row[1], row[2], row[3], bool(row[4]))

        verify.check_cell_relation(p, value, cert, lookup)

    # -------------------------------------------------------------------- search results
    def add_search_result(self, result: SearchResult, *, exhaustive: bool) -> tuple[int | None, int | None]:
        """Store a search's code and, for an exhaustive method, the upper bound it proved.

        Returns ``(code_id, bound_id)`` (None where nothing was stored).
        """
        code_id = bound_id = None
        with self.transaction():
            if result.code is not None and result.code.size > 0:
                code_id = self.add_code(
                    result.code, result.params, method=result.method, status=result.status,
                    seed=result.seed, settings=result.settings, seconds=result.seconds,
                )
            if (exhaustive and result.upper is not None
                    and result.status in (Status.OPTIMAL, Status.INFEASIBLE)):
                bound_id = self.add_bound(
                    BoundResult(result.params, int(result.upper), f"search:{result.method}",
                                certificate=search_record(result),
                                note="proved by exhaustive search"),
                    seconds=result.seconds,
                )
        return code_id, bound_id

    # ------------------------------------------------------------------------------ runs
    def mark_run(self, params: Params, task: str, *, budget: float, seconds: float,
                 status: str, seed: int | None = None) -> None:
        """Record that ``task`` ran on the cell with ``budget``; keeps the largest budget."""
        with self.transaction():
            self._conn.execute(
                "INSERT INTO runs(q,n,d,task,budget,seconds,status,seed,version,machine,created) "
                "VALUES (?,?,?,?,?,?,?,?,?,?,?) ON CONFLICT(q,n,d,task) DO UPDATE SET "
                "budget=excluded.budget, seconds=excluded.seconds, status=excluded.status, "
                "seed=excluded.seed, version=excluded.version, machine=excluded.machine, "
                "created=excluded.created WHERE excluded.budget >= runs.budget",
                (params.q, params.n, params.d, task, float(budget), float(seconds), status, seed,
                 __version__, _machine(), _now()),
            )

    def run_budget(self, params: Params, task: str) -> float | None:
        """The largest budget ``task`` has run with on the cell (None if never)."""
        row = self._conn.execute(
            "SELECT budget FROM runs WHERE q=? AND n=? AND d=? AND task=?",
            (params.q, params.n, params.d, task),
        ).fetchone()
        return None if row is None else float(row[0])

    # ------------------------------------------------------------------ hunts and timings
    def log_improvements(self, before: CellSummary, *, seconds: float,
                         budget: float | None = None) -> list[tuple[str, int | None, int]]:
        """Record what raised the cell's lower value or lowered its upper value since
        ``before`` (a :meth:`summary` taken earlier): side, old and new value, the method and
        row that did it, and ``seconds`` (the time the work took). Returns the changes."""
        after = self.summary(before.params)
        changes: list[tuple[str, int | None, int, str, int]] = []
        if after.lower > before.lower and after.code_id is not None:
            changes.append(("lower", before.lower or None, after.lower,
                            after.lower_method or "?", after.code_id))
        if after.upper is not None and after.bound_id is not None and (
                before.upper is None or after.upper < before.upper):
            changes.append(("upper", before.upper, after.upper, after.upper_method or "?",
                            after.bound_id))
        with self.transaction():
            for side, old, new, method, row_id in changes:
                self._conn.execute(
                    "INSERT INTO improvements(q,n,d,side,old,new,method,row_id,seconds,budget,"
                    "created) VALUES (?,?,?,?,?,?,?,?,?,?,?)",
                    (before.q, before.n, before.d, side, old, new, method, row_id,
                     float(seconds), budget, _now()))
        return [(side, old, new) for side, old, new, _m, _r in changes]

    def improvements(self, params: Params | None = None) -> list[dict[str, Any]]:
        """The improvements logged (all cells, or one), oldest first."""
        sql = ("SELECT q,n,d,side,old,new,method,row_id,seconds,budget,created "
               "FROM improvements")
        args: tuple[Any, ...] = ()
        if params is not None:
            sql += " WHERE q=? AND n=? AND d=?"
            args = (params.q, params.n, params.d)
        keys = ("q", "n", "d", "side", "old", "new", "method", "row_id", "seconds", "budget",
                "created")
        return [dict(zip(keys, r)) for r in self._conn.execute(sql + " ORDER BY id", args)]

    def log_cell(self, params: Params, *, budget: float, seconds: float,
                 stages: Mapping[str, float]) -> None:
        """Append one cell run to the log: its budget, wall time and the seconds of each stage."""
        with self.transaction():
            self._conn.execute(
                "INSERT INTO cell_log(q,n,d,budget,seconds,stages,version,machine,created) "
                "VALUES (?,?,?,?,?,?,?,?,?)",
                (params.q, params.n, params.d, float(budget), float(seconds),
                 json.dumps({k: round(float(v), 4) for k, v in stages.items()}, sort_keys=True),
                 __version__, _machine(), _now()))

    def cell_log(self) -> list[dict[str, Any]]:
        """Every logged cell run, oldest first (stages decoded)."""
        rows = self._conn.execute(
            "SELECT q,n,d,budget,seconds,stages,created FROM cell_log ORDER BY id").fetchall()
        return [{"q": q, "n": n, "d": d, "budget": b, "seconds": sec,
                 "stages": json.loads(st), "created": c} for q, n, d, b, sec, st, c in rows]

    # --------------------------------------------------------------------------- queries
    def cells(self, q: int | None = None) -> list[Params]:
        """Every cell with a code, a bound or a run stored, sorted."""
        sql = ("SELECT q,n,d FROM codes UNION SELECT q,n,d FROM bounds "
               "UNION SELECT q,n,d FROM runs")
        rows = self._conn.execute(f"SELECT DISTINCT q,n,d FROM ({sql}) ORDER BY q,n,d").fetchall()
        return [Params(*r) for r in rows if q is None or r[0] == q]

    def summary(self, params: Params) -> CellSummary:
        """Best lower and upper bound stored for one cell, with the rows giving them."""
        q, n, d = params.q, params.n, params.d
        lo = self._conn.execute(
            "SELECT id,size,method,seconds,provenance FROM codes WHERE q=? AND n=? AND d=? "
            "ORDER BY size DESC, id LIMIT 1", (q, n, d),
        ).fetchone()
        up = self._conn.execute(
            "SELECT id,value,method,seconds,kind FROM bounds WHERE q=? AND n=? AND d=? "
            "AND certified=1 ORDER BY value, id LIMIT 1", (q, n, d),
        ).fetchone()
        return CellSummary(
            q, n, d,
            lower=int(lo[1]) if lo else 0,
            upper=int(up[1]) if up else None,
            lower_method=lo[2] if lo else None,
            upper_method=up[2] if up else None,
            lower_seconds=float(lo[3]) if lo else None,
            upper_seconds=float(up[3]) if up else None,
            upper_kind=up[4] if up else None,
            code_id=int(lo[0]) if lo else None,
            bound_id=int(up[0]) if up else None,
            lower_provenance=json.loads(lo[4]) if lo and lo[4] else None,
        )

    def summaries(self, q: int | None = None) -> list[CellSummary]:
        """:meth:`summary` of every stored cell (optionally of one alphabet size)."""
        return [self.summary(p) for p in self.cells(q)]

    def best_upper_row(self, params: Params) -> tuple[int, int] | None:
        """``(bound_id, value)`` of the least certified upper bound of the cell, or None."""
        row = self._conn.execute(
            "SELECT id,value FROM bounds WHERE q=? AND n=? AND d=? AND certified=1 "
            "ORDER BY value, id LIMIT 1", (params.q, params.n, params.d),
        ).fetchone()
        return None if row is None else (int(row[0]), int(row[1]))

    def counts(self) -> dict[str, int]:
        """Row counts per table (for tests and status lines)."""
        return {
            t: int(self._conn.execute(f"SELECT count(*) FROM {t}").fetchone()[0])
            for t in _TABLES
        }

    def rows(self, table: str) -> list[tuple[Any, ...]]:
        """All rows of one table (read-only helper for reports and tests)."""
        if table not in _TABLES:
            raise InputError(f"unknown store table {table!r}")
        return self._conn.execute(f"SELECT * FROM {table} ORDER BY rowid").fetchall()

    # ------------------------------------------------------------------------- published
    def import_published(self, rows: Sequence[PublishedRow]) -> int:
        """Store published values after checking them against each other and the store.

        All rows go in one transaction, or none: a row with ``lower > upper``, a published
        lower bound above an upper bound this tool proved, or a published upper bound below
        a code this tool holds is a contradiction and raises :class:`InputError` naming it.

        Returns the number of rows stored (rows already present are replaced).
        """
        with self.transaction():
            for r in rows:
                p = Params(r.q, r.n, r.d)
                if r.lower is not None and r.upper is not None and r.lower > r.upper:
                    raise InputError(f"{r.source}: {p} has lower {r.lower} > upper {r.upper}")
                best = self.best_upper_row(p)
                if r.lower is not None and best is not None and r.lower > best[1]:
                    raise InputError(
                        f"contradiction: {r.source} gives {p} >= {r.lower} but bound "
                        f"#{best[0]} proves {p} <= {best[1]}"
                    )
                s = self.summary(p)
                if r.upper is not None and s.lower > r.upper:
                    raise InputError(
                        f"contradiction: {r.source} gives {p} <= {r.upper} but stored code "
                        f"#{s.code_id} has {s.lower} words"
                    )
                self._conn.execute(
                    "INSERT INTO published(q,n,d,lower,upper,source,imported) VALUES "
                    "(?,?,?,?,?,?,?) ON CONFLICT(q,n,d,source) DO UPDATE SET "
                    "lower=excluded.lower, upper=excluded.upper, imported=excluded.imported",
                    (r.q, r.n, r.d, r.lower, r.upper, r.source, _now()),
                )
        return len(rows)

    def published(self, params: Params) -> list[PublishedRow]:
        """Imported published values for one cell (all sources)."""
        rows = self._conn.execute(
            "SELECT q,n,d,lower,upper,source FROM published WHERE q=? AND n=? AND d=? "
            "ORDER BY source", (params.q, params.n, params.d),
        ).fetchall()
        return [PublishedRow(*r) for r in rows]

    def published_cells(self, q: int | None = None) -> list[Params]:
        rows = self._conn.execute("SELECT DISTINCT q,n,d FROM published ORDER BY q,n,d").fetchall()
        return [Params(*r) for r in rows if q is None or r[0] == q]

    # ------------------------------------------------------------------------- auditing
    def audit(self) -> list[str]:
        """Re-check the whole store; return a list of problems (empty when all is well).

        Runs ``PRAGMA integrity_check``, decodes and re-verifies every stored code, re-checks
        every certified bound's certificate, and compares best codes with best bounds.
        """
        from codesearch import verify

        problems: list[str] = []
        for (msg,) in self._conn.execute("PRAGMA integrity_check").fetchall():
            if msg != "ok":
                problems.append(f"integrity: {msg}")
        for (cid,) in self._conn.execute("SELECT id FROM codes").fetchall():
            try:
                self.get_stored(int(cid))
            except Exception as exc:
                problems.append(f"code #{cid}: {exc}")
        for bid, q, n, d, value, kind, cert, certified in self._conn.execute(
            "SELECT id,q,n,d,value,kind,certificate,certified FROM bounds"
        ).fetchall():
            if not certified or cert is None:
                continue
            try:
                c = json.loads(cert)
                if not isinstance(c, dict):
                    raise InputError("stored certificate is not a JSON object")
                if kind == "cell-relation":
                    self._check_relation(Params(q, n, d), value, c)
                    continue
                if c.get("kind") != kind:
                    problems.append(f"bound #{bid}: stored as kind {kind!r} but its certificate "
                                    f"is of kind {c.get('kind')!r:.40}")
                    continue
                self._check_binding(Params(q, n, d), value, c)
                if kind == "sat-refutation":
                    moved = _refutation_problem(c)
                    if moved is not None:
                        problems.append(f"bound #{bid}: {moved}")
                elif kind not in RECORD_KINDS and not self._check_certificate(c, value):
                    problems.append(f"bound #{bid}: certificate fails its re-check")
            except Exception as exc:
                problems.append(f"bound #{bid}: {str(exc).splitlines()[0] if str(exc) else exc!r}")
        for s in self.summaries():
            if s.upper is not None and s.lower > s.upper:
                problems.append(f"{s.params}: code of size {s.lower} above bound {s.upper}")
        return problems


#: Kinds of stored upper-bound records that are not certificates a checker re-derives:
#: ``exhaustive-search`` (what an exhaustive method proved: method, version, nodes, seed;
#: nothing a reader can re-check) and ``sat-refutation`` (a refutation bundle that
#: ``codesearch check`` re-checked before storing: manifest path and digest).
RECORD_KINDS = ("exhaustive-search", "sat-refutation")


def search_record(result: SearchResult) -> dict[str, Any]:
    """The record stored with an upper bound proved by an exhaustive search: what ran
    (method, software version, nodes, seed, settings, seconds), bound to the cell."""
    from codesearch.results import plain

    p = result.params
    return {"kind": "exhaustive-search", "q": p.q, "n": p.n, "d": p.d,
            "value": int(result.upper) if result.upper is not None else None,
            "method": result.method, "version": __version__, "nodes": int(result.nodes),
            "seed": result.seed, "seconds": round(float(result.seconds), 3),
            "settings": plain(result.settings)}


def refutation_record(manifest: str, q: int, n: int, d: int, size: int, reason: str
                      ) -> dict[str, Any]:
    """The record stored with an upper bound ``A_q(n,d) <= size - 1`` whose refutation bundle
    (manifest ``manifest``) was just re-checked by :func:`codesearch.proofbundle.check_bundle`."""
    path = os.path.abspath(manifest)
    return {"kind": "sat-refutation", "q": q, "n": n, "d": d, "value": size - 1,
            "manifest": path, "manifest_sha256": file_sha256(path), "checked": _now(),
            "checker": f"codesearch {__version__}", "reason": reason}


def _refutation_problem(record: Mapping[str, Any]) -> str | None:
    """A re-checked bundle's manifest changed since (a missing file is not a problem: the
    record says what was re-checked and when)."""
    path = record.get("manifest")
    if not isinstance(path, str) or not os.path.isfile(path):
        return None
    if file_sha256(path) != record.get("manifest_sha256"):
        return f"refutation manifest {path} changed since it was re-checked"
    return None


def read_published_file(path: str) -> list[PublishedRow]:
    """Read published values from CSV or JSON (columns ``q,n,d,lower,upper,source``).

    ``lower`` or ``upper`` may be empty; CSV lines starting with ``#`` are comments. JSON is a list of objects with the same keys. A
    missing ``source`` takes the file name.

    Raises
    ------
    InputError
        ``FILE:LINE: reason`` for an unreadable file or a malformed row.
    """
    import csv

    try:
        with open(path, encoding="utf-8", newline="") as fh:
            text = fh.read()
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"{path}: cannot read ({getattr(exc, 'strerror', None) or exc})") from None
    default_source = os.path.basename(path)
    records: list[tuple[int, Mapping[str, Any]]] = []
    is_json = path.lower().endswith(".json")
    if is_json:
        from codesearch.codefile import parse_json_text

        data = parse_json_text(text, path)
        if not isinstance(data, list) or not all(isinstance(x, dict) for x in data):
            raise InputError(f"{path}:1: expected a JSON list of objects")
        records = [(i + 1, x) for i, x in enumerate(data)]
    else:
        # Lines starting with '#' are comments (sources, notes); line numbers stay true.
        lines = text.splitlines()
        body = [(i + 1, ln) for i, ln in enumerate(lines) if ln.strip() and not ln.startswith("#")]
        reader = csv.DictReader([ln for _, ln in body])
        need = {"q", "n", "d"}
        if reader.fieldnames is None or not need <= set(reader.fieldnames):
            raise InputError(f"{path}:1: header must name columns q,n,d,lower,upper,source")
        if not {"lower", "upper"} & set(reader.fieldnames):
            raise InputError(f"{path}:1: header needs a lower or an upper column")
        records = [(body[i + 1][0], row) for i, row in enumerate(reader)]

    def _int(value: Any, line: int, name: str, optional: bool) -> int | None:
        if value is None or (isinstance(value, str) and value.strip() == ""):
            if optional:
                return None
            raise InputError(f"{path}:{line}: missing {name}")
        try:
            if isinstance(value, bool) or (is_json and not isinstance(value, int)):
                raise ValueError  # JSON: exact types (no "16", 16.0 or true for 16)
            out = int(str(value).strip())
        except ValueError:
            raise InputError(f"{path}:{line}: {name} must be an integer, got {value!r}") from None
        if optional and out < 1:
            raise InputError(f"{path}:{line}: {name} must be positive, got {out}")
        return out

    out: list[PublishedRow] = []
    for line, rec in records:
        q, n, d = (_int(rec.get(k), line, k, False) for k in ("q", "n", "d"))
        try:
            Params(q, n, d)
        except InputError as exc:
            raise InputError(f"{path}:{line}: {exc}") from None
        lower = _int(rec.get("lower"), line, "lower", True)
        upper = _int(rec.get("upper"), line, "upper", True)
        if lower is None and upper is None:
            raise InputError(f"{path}:{line}: neither lower nor upper given")
        if lower is not None and upper is not None and lower > upper:
            raise InputError(f"{path}:{line}: lower {lower} > upper {upper}")
        source = rec.get("source")
        if source is not None and not isinstance(source, str):
            raise InputError(f"{path}:{line}: source must be text, got {source!r:.40}")
        source = (source or "").strip() or default_source
        out.append(PublishedRow(q, n, d, lower, upper, source))
    if not out:
        raise InputError(f"{path}:1: no rows")
    return out
