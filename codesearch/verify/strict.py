"""Strict readers of the fields of outside data, and the caps every checker states up front.

Certificates, manifests and published-value files come from outside: a careless or hostile
file may hold a float where an integer belongs (``160.9``), an integer written as a string
(``"160"``), ``true`` for ``1``, a list where a name belongs, a size field that asks for
astronomically large work, or a deep nesting that exhausts Python's stack. Every reader of
the :mod:`codesearch.verify` package takes its fields through the functions here: exact
types (``bool`` is not an ``int``, a float is never an integer or a rational), ranges checked
before anything is allocated, and one :class:`~codesearch.errors.InputError` line naming the
field and the problem.

Caps (a check refuses, saying so, before it starts work past them)
-----------------------------------------------------------------
:data:`MAX_CERTIFICATE_BYTES`  size of a certificate file;
:data:`MAX_DIGITS`             decimal digits of one integer in a rational ``"p/q"``;
:data:`MAX_DENOMINATOR_BITS`   bits of the common denominator of one LP dual vector;
:data:`MAX_WORK`               elementary steps of one certificate check (nested ones summed):
                               about a minute of Python arithmetic, a few hundred MB at most.

References
----------
Common practice (strict schema validation of untrusted input; no source needed).
"""

from __future__ import annotations

import re
from fractions import Fraction
from typing import Any, Mapping

from codesearch.errors import InputError

__all__ = ["MAX_CERTIFICATE_BYTES", "MAX_DIGITS", "MAX_DENOMINATOR_BITS", "MAX_WORK",
           "MAX_ROWS", "mapping", "field", "integer", "get_int", "get_bool", "get_str",
           "get_list", "rational", "check_work", "short", "common_denominator"]

#: Largest certificate file read (bytes).
MAX_CERTIFICATE_BYTES = 64 * 2**20
#: Longest integer (decimal digits) in a rational ``"p/q"`` (Python's own int/str limit is 4300).
MAX_DIGITS = 4000
#: Largest common denominator (bits) of one LP dual vector.
MAX_DENOMINATOR_BITS = 1 << 16
#: Elementary steps one certificate check may take, nested certificates included.
MAX_WORK = 400_000_000
#: Longest list of multipliers or extra inequalities read.
MAX_ROWS = 2_000_000

_RATIONAL = re.compile(r"-?[0-9]+(/[0-9]+)?")


def short(value: Any, width: int = 40) -> str:
    """``repr`` of a value cut to ``width`` characters (messages stay one short line)."""
    try:
        text = repr(value)
    except (ValueError, RecursionError):  # an int past Python's digit limit, deep nesting
        return f"a {type(value).__name__}"
    return text if len(text) <= width else text[: width - 3] + "..."


def mapping(obj: Any, what: str) -> Mapping[str, Any]:
    """``obj`` if it is a JSON object, else a one-line :class:`InputError`."""
    if not isinstance(obj, Mapping):
        raise InputError(f"{what} must be a JSON object, got {type(obj).__name__}")
    return obj


def field(obj: Mapping[str, Any], key: str, what: str) -> Any:
    """The value of ``key``; a missing key is an :class:`InputError` naming it."""
    if key not in obj:
        raise InputError(f"{what}: missing key {key!r}")
    return obj[key]


def integer(value: Any, what: str, lo: int | None = None, hi: int | None = None) -> int:
    """``value`` if it is an ``int`` (not a bool, a float or a string) within ``lo..hi``."""
    if isinstance(value, bool) or not isinstance(value, int):
        raise InputError(f"{what} must be an integer, got {short(value)}")
    if (lo is not None and value < lo) or (hi is not None and value > hi):
        lo_s = "" if lo is None else str(lo)
        hi_s = "" if hi is None else str(hi)
        shown = str(value) if value.bit_length() < 64 else f"an integer of {value.bit_length()} bits"
        raise InputError(f"{what} must be in {lo_s}..{hi_s}, got {shown}")
    return value


def get_int(obj: Mapping[str, Any], key: str, what: str, lo: int | None = None,
            hi: int | None = None) -> int:
    """``obj[key]`` as a strict integer within ``lo..hi``."""
    return integer(field(obj, key, what), f"{what}: {key}", lo, hi)


def get_bool(obj: Mapping[str, Any], key: str, what: str) -> bool:
    """``obj[key]`` if it is ``true`` or ``false`` (not 0/1, not a string)."""
    value = field(obj, key, what)
    if not isinstance(value, bool):
        raise InputError(f"{what}: {key} must be true or false, got {short(value)}")
    return value


def get_str(obj: Mapping[str, Any], key: str, what: str,
            choices: tuple[str, ...] | None = None) -> str:
    """``obj[key]`` if it is a string (one of ``choices`` when given)."""
    value = field(obj, key, what)
    if not isinstance(value, str):
        raise InputError(f"{what}: {key} must be a string, got {short(value)}")
    if choices is not None and value not in choices:
        raise InputError(f"{what}: {key} must be one of {', '.join(choices)}, got {short(value)}")
    return value


def get_list(obj: Mapping[str, Any], key: str, what: str, max_len: int,
             length: int | None = None) -> list[Any]:
    """``obj[key]`` if it is a list of at most ``max_len`` items (exactly ``length`` if given)."""
    value = field(obj, key, what)
    if not isinstance(value, list):
        raise InputError(f"{what}: {key} must be a list, got {type(value).__name__}")
    if length is not None and len(value) != length:
        raise InputError(f"{what}: {key} must have {length} items, has {len(value)}")
    if len(value) > max_len:
        raise InputError(f"{what}: {key} has {len(value)} items, past the cap {max_len}")
    return value


def rational(value: Any, what: str, *, allow_int: bool = True) -> Fraction:
    """An exact rational: the string ``"p/q"`` or ``"p"`` (decimal, ``q > 0``, at most
    :data:`MAX_DIGITS` digits each) or, when ``allow_int``, a JSON integer. Floats, bools and
    anything else are refused."""
    if isinstance(value, int) and not isinstance(value, bool) and allow_int:
        if value.bit_length() > 4 * MAX_DIGITS:
            raise InputError(f"{what} has more than {MAX_DIGITS} digits")
        return Fraction(value)
    if not isinstance(value, str):
        kind = "a string 'p/q'" + (" or an integer" if allow_int else "")
        raise InputError(f"{what} must be {kind}, got {short(value)}")
    if len(value) > 2 * MAX_DIGITS + 2:
        raise InputError(f"{what} has more than {MAX_DIGITS} digits")
    if not _RATIONAL.fullmatch(value):
        raise InputError(f"{what} is not an exact rational 'p/q': {short(value)}")
    num, _, den = value.partition("/")
    if len(num.lstrip("-")) > MAX_DIGITS or len(den) > MAX_DIGITS:
        raise InputError(f"{what} has more than {MAX_DIGITS} digits")
    q = int(den) if den else 1
    if q == 0:
        raise InputError(f"{what} needs a positive denominator: {short(value)}")
    return Fraction(int(num), q)


def common_denominator(values: Any, what: str) -> int:
    """The lcm of the denominators of exact rationals, refused past
    :data:`MAX_DENOMINATOR_BITS` before any arithmetic on the scaled values."""
    import math

    den = 1
    for v in values:
        den = math.lcm(den, v.denominator)
        if den.bit_length() > MAX_DENOMINATOR_BITS:
            raise InputError(f"{what}: common denominator past {MAX_DENOMINATOR_BITS} bits")
    return den


def check_work(steps: int | float, what: str, cap: int = MAX_WORK) -> None:
    """Refuse up front a check estimated to take more than ``cap`` elementary steps."""
    if steps > cap:
        raise InputError(f"{what}: checking needs about {float(steps):.2g} steps, past the cap "
                         f"{float(cap):.2g}; refused before starting")
