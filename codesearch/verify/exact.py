"""Exact numbers read from certificates: rationals as ``"p/q"`` strings, never floats."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from codesearch.errors import InputError

__all__ = ["parse_fraction", "rational_field"]


def parse_fraction(text: Any) -> Fraction:
    """Parse ``"p/q"`` or an integer (string or int) into a Fraction; floats are refused."""
    if isinstance(text, bool) or isinstance(text, float):
        raise ValueError(f"expected an exact rational, got {text!r}")
    if isinstance(text, int):
        return Fraction(text)
    if not isinstance(text, str):
        raise ValueError(f"expected a string 'p/q', got {type(text).__name__}")
    if any(c in text for c in ".eE"):
        raise ValueError(f"expected an exact rational 'p/q', got {text!r}")
    return Fraction(text)


def rational_field(text: Any, what: str) -> Fraction:
    """Parse ``"p/q"`` or ``"p"`` (decimal integers, q > 0) exactly."""
    if not isinstance(text, str):
        raise InputError(f"certificate: {what} must be a string 'p/q', got {text!r}")
    num, _, den = text.partition("/")
    try:
        p = int(num)
        q = int(den) if den else 1
    except ValueError:
        raise InputError(f"certificate: {what} is not a rational 'p/q': {text!r}") from None
    if q <= 0:
        raise InputError(f"certificate: {what} needs a positive denominator: {text!r}")
    return Fraction(p, q)
