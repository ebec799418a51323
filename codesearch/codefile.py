"""The codesearch code file: a versioned text format (and a JSON twin) for explicit codes.

Text form::

    # format: codesearch-code/1
    # q: 2
    # n: 7
    # size: 16
    # d: 3
    # method: exact
    0000000
    1101000
    ...

Header lines are ``# key: value``; other lines starting with ``#`` are comments. Each codeword
is one line of symbols ``0-9`` then ``a-z`` (so q <= 36). On reading, symbols may also be
separated by spaces, commas or tabs, and then a symbol may be written as a decimal number. A
file with no header is accepted: q is then the largest symbol + 1 unless given.

JSON form: one object ``{"format": "codesearch-code/1", "q", "n", "size", "d", "meta": {...},
"words": ["0101...", ...]}``.

Bound certificates are JSON files too: :func:`read_certificate` recognises one by its content
and returns the object for :func:`codesearch.verify.check_certificate`.

Errors are :class:`~codesearch.errors.InputError` with one line ``FILE:LINE: reason``.
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import re
import tempfile
from dataclasses import dataclass, field
from typing import Any, Mapping

import numpy as np

from codesearch import verify
from codesearch._version import __version__
from codesearch.errors import InputError
from codesearch.model import MAX_Q, Code

__all__ = [
    "FORMAT",
    "CodeFile",
    "read_code",
    "parse_code_text",
    "parse_code_json",
    "format_code_text",
    "format_code_json",
    "write_code",
    "read_generator",
    "read_json",
    "parse_json_text",
    "read_certificate",
    "write_certificate",
    "check_fits_in_memory",
    "available_memory",
]

#: Format name and version written in every file this tool produces.
FORMAT = "codesearch-code/1"

_HEADER_ORDER = ("format", "q", "n", "size", "d", "method", "seed", "created", "software")
_HEADER_RE = re.compile(r"^#\s*([A-Za-z][A-Za-z0-9_\-]*)\s*:\s*(.*?)\s*$")
_SEPARATORS = re.compile(r"[\s,;]+")

# byte -> symbol value, 255 for bytes outside the alphabet
_LOOKUP = np.full(256, 255, dtype=np.uint8)
for _i, _ch in enumerate(b"0123456789abcdefghijklmnopqrstuvwxyz"):
    _LOOKUP[_ch] = _i


@dataclass(frozen=True, eq=False)
class CodeFile:
    """A code read from a file, with its header and the line number of each codeword.

    Attributes
    ----------
    code : Code
        The codewords, in file order.
    header : Mapping[str, str]
        Header values as written (strings), including keys this version does not know.
    lines : numpy.ndarray
        1-based line number of each codeword in the file (for error messages).
    path : str
        Where it was read from.
    """

    code: Code
    header: Mapping[str, str] = field(default_factory=dict)
    lines: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    path: str = "<string>"

    @property
    def claimed_d(self) -> int | None:
        """The minimum distance claimed in the header, if any."""
        value = self.header.get("d")
        return None if value in (None, "") else int(value)


def available_memory() -> int:
    """Bytes of memory available now (MemAvailable; 2^62 when unknown)."""
    try:
        with open("/proc/meminfo") as fh:
            for line in fh:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    try:
        return os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE")
    except (ValueError, OSError):
        return 1 << 62


def check_fits_in_memory(path: str, needed: int, what: str) -> None:
    """Raise InputError when ``needed`` bytes clearly exceed the memory available now."""
    avail = available_memory()
    if needed > avail:
        raise InputError(
            f"{path}: too large for memory: {what} needs about {needed / 2**30:.1f} GiB, "
            f"{avail / 2**30:.1f} GiB available"
        )


def _file_size(path: str) -> int:
    """Size of a readable regular file, or a one-line InputError."""
    try:
        size = os.path.getsize(path)
    except FileNotFoundError:
        raise InputError(f"{path}: no such file") from None
    except OSError as exc:
        raise InputError(f"{path}: cannot read: {exc.strerror}") from None
    if os.path.isdir(path):
        raise InputError(f"{path}: is a directory, not a code file")
    return size


def _read_head(path: str, count: int = 256) -> bytes:
    """The first ``count`` bytes of a file (to recognise its kind without reading it all)."""
    _file_size(path)
    try:
        with open(path, "rb") as fh:
            return fh.read(count)
    except OSError as exc:
        raise InputError(f"{path}: cannot read: {exc.strerror}") from None


def _read_bytes(path: str) -> bytes:
    size = _file_size(path)
    # the raw bytes, the symbol array and the packed copy together stay below ~3x the file
    check_fits_in_memory(path, 3 * size, f"a {size / 2**30:.1f} GiB file")
    try:
        with open(path, "rb") as fh:
            return fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot read: {exc.strerror}") from None


def _decode(data: bytes, path: str) -> str:
    nul = data.find(b"\x00")
    if nul >= 0:
        line = data.count(b"\n", 0, nul) + 1
        raise InputError(f"{path}:{line}: binary data (NUL byte), not a text code file")
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise InputError(f"{path}:{line}: binary data (invalid UTF-8), not a text code file") from None


def _header_int(header: Mapping[str, str], key: str, path: str, line: int, lo: int) -> int | None:
    if key not in header:
        return None
    try:
        value = int(header[key])
    except ValueError:
        raise InputError(f"{path}:{line}: header {key!r} is not an integer: {header[key]!r}") from None
    if value < lo:
        raise InputError(f"{path}:{line}: header {key!r} must be at least {lo}, got {value}")
    return value


def _parse_separated(text: str, path: str, lineno: int) -> list[int]:
    out = []
    for token in _SEPARATORS.split(text.strip()):
        if not token:
            continue
        if token.isdigit():
            out.append(int(token))
        elif len(token) == 1 and token in "abcdefghijklmnopqrstuvwxyz":
            out.append(int(token, 36))
        else:
            raise InputError(f"{path}:{lineno}: {token!r} is not a symbol (0-9, a-z)")
    return out


def parse_code_text(text: str, path: str = "<string>", q: int | None = None) -> CodeFile:
    """Parse the text form. ``q`` overrides the header (and the largest-symbol guess)."""
    header: dict[str, str] = {}
    header_lines: dict[str, int] = {}
    plain: list[str] = []
    plain_lines: list[int] = []
    separated: list[list[int]] = []
    separated_lines: list[int] = []
    for lineno, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line:
            continue
        if line.startswith("#"):
            if not plain and not separated:
                m = _HEADER_RE.match(line)
                if m:
                    header[m.group(1).lower()] = m.group(2)
                    header_lines[m.group(1).lower()] = lineno
            continue
        if _SEPARATORS.search(line):
            separated.append(_parse_separated(line, path, lineno))
            separated_lines.append(lineno)
        else:
            plain.append(line)
            plain_lines.append(lineno)
    if "format" in header and not header["format"].startswith("codesearch-code/"):
        raise InputError(f"{path}:{header_lines['format']}: unknown format {header['format']!r}")
    if "format" in header and header["format"] != FORMAT:
        raise InputError(
            f"{path}:{header_lines['format']}: format version {header['format']!r} is newer "
            f"than this tool reads ({FORMAT})"
        )
    if not plain and not separated:
        last = max(len(text.splitlines()), 1)
        raise InputError(f"{path}:{last}: empty file: no codewords")

    lines = np.array(plain_lines + separated_lines, dtype=np.int64)
    lengths = [len(w) for w in plain] + [len(w) for w in separated]
    n = _header_int(header, "n", path, header_lines.get("n", 1), 1)
    expected = n if n is not None else lengths[0]
    order = np.argsort(lines, kind="stable")
    for idx in order:
        if lengths[idx] != expected:
            src = "header n" if n is not None else f"line {lines[order[0]]}"
            raise InputError(
                f"{path}:{lines[idx]}: word has length {lengths[idx]}, expected {expected} ({src})"
            )
    m = len(lengths)
    words = np.empty((m, expected), dtype=np.uint8)
    if plain:
        buf = np.frombuffer("".join(plain).encode("ascii", errors="replace"), dtype=np.uint8)
        if buf.size != len(plain) * expected:  # a non-ASCII character widened some line
            for w, ln in zip(plain, plain_lines):
                bad = [c for c in w if c not in "0123456789abcdefghijklmnopqrstuvwxyz"]
                if bad or len(w.encode("utf-8")) != len(w):
                    raise InputError(f"{path}:{ln}: character {bad[0]!r} is not a symbol (0-9, a-z)")
        vals = _LOOKUP[buf].reshape(len(plain), expected)
        bad_rows = np.flatnonzero((vals == 255).any(axis=1))
        if bad_rows.size:
            r = int(bad_rows[0])
            col = int(np.flatnonzero(vals[r] == 255)[0])
            raise InputError(
                f"{path}:{plain_lines[r]}: character {plain[r][col]!r} is not a symbol (0-9, a-z)"
            )
        words[: len(plain)] = vals
    if separated:
        for r, (vals_list, ln) in enumerate(zip(separated, separated_lines)):
            if max(vals_list) >= MAX_Q:
                raise InputError(f"{path}:{ln}: symbol {max(vals_list)} is not below {MAX_Q}")
            words[len(plain) + r] = vals_list
    words = words[order]
    lines = lines[order]

    header_q = _header_int(header, "q", path, header_lines.get("q", 1), 2)
    if q is None:
        q = header_q if header_q is not None else max(int(words.max()) + 1, 2)
    if not 2 <= q <= MAX_Q:
        raise InputError(f"{path}:{header_lines.get('q', 1)}: alphabet size q={q} is outside 2..{MAX_Q}")
    too_big = np.flatnonzero((words >= q).any(axis=1))
    if too_big.size:
        r = int(too_big[0])
        sym = int(words[r][words[r] >= q][0])
        raise InputError(f"{path}:{lines[r]}: symbol {np.base_repr(sym, 36).lower()!r} is not below q={q}")
    size = _header_int(header, "size", path, header_lines.get("size", 1), 0)
    if size is not None and size != m:
        raise InputError(
            f"{path}:{header_lines['size']}: header says size {size} but the file has {m} codewords"
        )
    d = _header_int(header, "d", path, header_lines.get("d", 1), 0)
    if d is not None and d > expected + 1:
        raise InputError(f"{path}:{header_lines['d']}: claimed d={d} exceeds the length n={expected}")
    return CodeFile(Code(words, q), header, lines, path)


def parse_code_json(obj: Any, path: str = "<json>", q: int | None = None) -> CodeFile:
    """Parse the JSON form (an already-decoded object)."""
    if not isinstance(obj, dict) or "words" not in obj:
        raise InputError(f"{path}:1: JSON is not a code (an object with 'words')")
    fmt = obj.get("format", FORMAT)
    if fmt != FORMAT:
        raise InputError(f"{path}:1: unknown or newer format {fmt!r} (this tool reads {FORMAT})")
    words = obj["words"]
    if not isinstance(words, list) or not all(isinstance(w, str) for w in words):
        raise InputError(f"{path}:1: 'words' must be a list of strings")
    meta = obj.get("meta") or {}
    if not isinstance(meta, dict) or not all(
            isinstance(v, (str, int, float, type(None))) for v in meta.values()):
        raise InputError(f"{path}:1: 'meta' must be an object of plain values")
    header = {str(k).lower(): str(v).replace("\n", " ") for k, v in meta.items()}
    for key in ("q", "n", "size", "d"):
        value = obj.get(key)
        if value is None:
            continue
        if isinstance(value, bool) or not isinstance(value, int):
            raise InputError(f"{path}:1: {key!r} must be an integer, got {value!r:.40}")
        header[key] = str(value)
    header["format"] = FORMAT
    text = "".join(f"# {k}: {v}\n" for k, v in header.items()) + "\n".join(words) + "\n"
    parsed = parse_code_text(text, path, q)
    return CodeFile(parsed.code, parsed.header, np.arange(1, parsed.code.size + 1), path)


def read_code(path: str, q: int | None = None) -> CodeFile:
    """Read a code file (text or JSON form, recognised by content)."""
    text = _decode(_read_bytes(path), path)
    if text.lstrip().startswith("{"):
        return parse_code_json(parse_json_text(text, path), path, q)
    return parse_code_text(text, path, q)


def _header_for(code: Code, d: int | None, meta: Mapping[str, Any] | None) -> dict[str, str]:
    header = {"format": FORMAT, "q": str(code.q), "n": str(code.n), "size": str(code.size)}
    if d is not None:
        header["d"] = str(int(d))
    for key, value in (meta or {}).items():
        if key in ("format", "q", "n", "size", "d") or value is None:
            continue
        header[str(key).lower()] = str(value).replace("\n", " ")
    ordered = {k: header[k] for k in _HEADER_ORDER if k in header}
    ordered.update({k: v for k, v in header.items() if k not in ordered})
    return ordered


def format_code_text(code: Code, d: int | None = None, meta: Mapping[str, Any] | None = None) -> str:
    """The text form of a code with its header."""
    header = _header_for(code, d, meta)
    head = "".join(f"# {k}: {v}\n" for k, v in header.items())
    return head + "".join(w + "\n" for w in code.to_strings())


def format_code_json(code: Code, d: int | None = None, meta: Mapping[str, Any] | None = None) -> str:
    """The JSON form of a code."""
    header = _header_for(code, d, meta)
    obj: dict[str, Any] = {"format": FORMAT, "q": code.q, "n": code.n, "size": code.size,
                           "d": None if d is None else int(d)}
    obj["meta"] = {k: v for k, v in header.items() if k not in ("format", "q", "n", "size", "d")}
    obj["words"] = code.to_strings()
    return json.dumps(obj, indent=1) + "\n"


def write_code(
    path: str,
    code: Code,
    d: int | None = None,
    meta: Mapping[str, Any] | None = None,
    *,
    as_json: bool | None = None,
    stamp: bool = True,
) -> None:
    """Verify the code, then write it atomically (temporary file + rename).

    Parameters
    ----------
    path : str
        Destination; the JSON form is used when it ends in ``.json`` (or ``as_json``).
    code : Code
        The code to write.
    d : int, optional
        Claimed minimum distance, checked by :func:`codesearch.verify.assert_code` first.
    meta : Mapping, optional
        Extra header entries (method, seed, ...).
    stamp : bool
        Add ``created`` and ``software`` entries when absent.
    """
    if d is not None:
        verify.assert_min_distance(code, d)
    meta = dict(meta or {})
    if stamp:
        meta.setdefault("created", _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"))
        meta.setdefault("software", f"codesearch {__version__}")
    if as_json is None:
        as_json = str(path).endswith(".json")
    text = format_code_json(code, d, meta) if as_json else format_code_text(code, d, meta)
    _write_atomic(path, text)


def _write_atomic(path: str, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename: a reader never sees
    half a file, and a failed write leaves the old file as it was."""
    directory = os.path.dirname(os.path.abspath(path))
    try:
        fd, tmp = tempfile.mkstemp(prefix=".codesearch-", dir=directory)
    except OSError as exc:
        raise InputError(f"{path}: cannot write: {exc.strerror}") from None
    try:
        with os.fdopen(fd, "w") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def write_certificate(path: str, certificate: Mapping[str, Any]) -> None:
    """Write a bound certificate as indented JSON (atomically, like :func:`write_code`)."""
    _write_atomic(path, json.dumps(dict(certificate), indent=1) + "\n")


def read_generator(path: str, q: int | None = None) -> tuple[np.ndarray, int, np.ndarray]:
    """Read a generator matrix (same syntax as a code file: one row per line).

    Returns ``(rows, q, lines)`` with rows an (k, n) uint8 array. q must be prime.
    """
    parsed = read_code(path, q)
    q = parsed.code.q
    if q < 2 or any(q % p == 0 for p in range(2, int(q**0.5) + 1)):
        raise InputError(f"{path}:1: generator matrices need a prime q (GF(q)), got q={q}")
    return np.array(parsed.code.words), q, parsed.lines


def _no_constant(name: str) -> Any:
    raise ValueError(f"{name} is not an exact number")


def parse_json_text(text: str, path: str) -> Any:
    """Decode JSON strictly: ``NaN``/``Infinity`` are refused, and an integer past Python's
    digit limit or a nesting past its stack is a one-line :class:`InputError`."""
    try:
        return json.loads(text, parse_constant=_no_constant)
    except json.JSONDecodeError as exc:
        raise InputError(f"{path}:{exc.lineno}: invalid JSON: {exc.msg}") from None
    except RecursionError:
        raise InputError(f"{path}: invalid JSON: nested too deeply") from None
    except ValueError as exc:
        raise InputError(f"{path}: invalid JSON: {str(exc).splitlines()[0][:80]}") from None


def read_json(path: str, max_bytes: int | None = None) -> Any:
    """Read a JSON file with one-line errors (refused past ``max_bytes`` before reading)."""
    if max_bytes is not None and _file_size(path) > max_bytes:
        raise InputError(f"{path}: {_file_size(path)} bytes, past the cap of {max_bytes} "
                         f"bytes for this kind of file")
    return parse_json_text(_decode(_read_bytes(path), path), path)


def read_certificate(path: str) -> dict[str, Any] | None:
    """The JSON object in ``path`` if it looks like a certificate (has ``kind``), else None.

    Lets ``codesearch check FILE`` recognise a certificate by content, not by name. Only the
    first bytes are read unless the file starts like JSON.
    """
    from codesearch.verify.strict import MAX_CERTIFICATE_BYTES

    head = _read_head(path)
    if head.startswith(b"\x1f\x8b"):  # gzip: long certificates are kept compressed
        obj = parse_json_text(_decode(_gunzip(path, MAX_CERTIFICATE_BYTES), path), path)
        if not (isinstance(obj, dict) and "kind" in obj):
            raise InputError(f"{path}: a gzipped file that is not a certificate")
        return obj
    if not head.lstrip().startswith(b"{"):
        return None
    obj = read_json(path, MAX_CERTIFICATE_BYTES)
    return obj if isinstance(obj, dict) and "kind" in obj else None


def _gunzip(path: str, max_bytes: int) -> bytes:
    """The decompressed bytes of a gzip file, refused once they pass ``max_bytes``."""
    import gzip
    import zlib

    _read_head(path)
    try:
        with gzip.open(path, "rb") as fh:
            data = fh.read(max_bytes + 1)
    except (OSError, EOFError, zlib.error) as exc:
        raise InputError(f"{path}: not a readable gzip file ({exc})") from None
    if len(data) > max_bytes:
        raise InputError(f"{path}: more than {max_bytes} bytes once decompressed, past the "
                         f"cap for a certificate")
    return data


def file_sha256(path: str) -> str:
    """Hex SHA-256 of a file's bytes (proof bundles and stored refutations bind their files)."""
    import hashlib

    with open(path, "rb") as fh:
        return hashlib.file_digest(fh, "sha256").hexdigest()
