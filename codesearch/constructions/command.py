"""The ``construct`` command's library side: build a family code, list the routes to a cell.

Each function here is the one-call Python equivalent of a form of the command; the CLI only
parses and prints.
"""

from __future__ import annotations

from typing import Any

from codesearch.errors import ParameterError
from codesearch.model import Code, LinearCode, Params

__all__ = ["parse_params", "family_listing", "build_to_file", "cell_listing", "coset_union_run"]

#: Codes up to this many words are written word by word; larger linear codes as generators.
WRITE_WORDS_LIMIT = 1 << 16


def parse_params(items: list[str] | None) -> dict[str, Any]:
    """``["q=2", "m=4"]`` -> ``{"q": 2, "m": 4}`` (values that are not integers stay text)."""
    out: dict[str, Any] = {}
    for item in items or []:
        key, sep, value = item.partition("=")
        if not sep or not key:
            raise ParameterError(f"--param needs NAME=VALUE, got {item!r}")
        try:
            out[key.strip()] = int(value)
        except ValueError:
            out[key.strip()] = value.strip()
    return out


def family_listing() -> list[dict[str, Any]]:
    """Every family with its parameters and summary."""
    from codesearch.constructions.registry import FAMILIES

    return [{"family": f.name, "parameters": list(f.parameters), "summary": f.summary}
            for f in FAMILIES.values()]


def _write(path: str, code: Code | LinearCode, d: int, meta: dict[str, Any],
           generator: bool) -> str:
    from codesearch.codefile import write_code

    if isinstance(code, LinearCode) and (generator or code.size > WRITE_WORDS_LIMIT):
        # rows of the generator, in the code-file syntax: `codesearch check --generator FILE`
        write_code(path, Code(code.generator, code.q), None,
                   {**meta, "contents": "generator matrix", "dimension": code.k,
                    "verified-distance": d})
        return "generator"
    words = code.words() if isinstance(code, LinearCode) else code
    claim = d if words.size <= WRITE_WORDS_LIMIT else None
    write_code(path, words, claim, {**meta, "verified-distance": d})
    return "words"


def build_to_file(family: str, params: dict[str, Any], out: str | None = None,
                  generator: bool = False) -> dict[str, Any]:
    """Build a family code (verified); write it to ``out`` if given; return a summary."""
    from codesearch.constructions.registry import build_family

    built = build_family(family, **params)
    code = built.code
    summary: dict[str, Any] = {
        "family": family, "parameters": params, "q": code.q, "n": code.n, "size": code.size,
        "d": built.d, "linear": isinstance(code, LinearCode),
        "dimension": code.k if isinstance(code, LinearCode) else None,
        "provenance": built.provenance, "file": None, "written": None,
    }
    if out:
        summary["written"] = _write(out, code, built.d,
                                    {"method": f"construction {family}",
                                     "provenance": built.provenance}, generator)
        summary["file"] = out
    return summary


def cell_listing(params: Params, out: str | None = None, max_words: int | None = None,
                 generator: bool = False) -> dict[str, Any]:
    """The routes to ``params`` (largest first); with ``out``, build the best and write it."""
    from codesearch.constructions.lookup import best, candidates
    from codesearch.model import MAX_LISTED_WORDS

    routes = [{"size": c.size, "d": c.d, "n": c.n, "linear": c.linear, "root": c.root,
               "steps": c.steps, "provenance": c.provenance} for c in candidates(params)]
    summary: dict[str, Any] = {"q": params.q, "n": params.n, "d": params.d, "routes": routes,
                               "file": None}
    if out:
        cap = MAX_LISTED_WORDS if max_words is None else max_words
        code, provenance = best(params, max_words=cap)
        summary["written"] = _write(out, code, params.d,
                                    {"method": "construction", "provenance": provenance},
                                    generator)
        summary["file"] = out
        summary["built"] = {"size": code.size, "provenance": provenance}
    return summary


def _inner_code(family: str | None, params: dict[str, Any],
                cell: tuple[int, int] | None) -> tuple[LinearCode, str]:
    """The inner code of a coset-union run: a family code or the best linear code of a cell."""
    if cell is not None:
        from codesearch.constructions.lookup import table

        n, d = cell
        if not 1 <= d <= n:
            raise ParameterError(f"--inner-cell needs 1 <= D <= N, got N={n}, D={d}")
        c = table(2, max(32, n)).best_at(n, d, linear_only=True)
        if c is None:
            raise ParameterError(f"no linear construction for A_2({n},{d})")
        built = c.build()
    else:
        from codesearch.constructions.registry import build_family

        if not family:
            raise ParameterError("coset unions: name the inner code's FAMILY or use --inner-cell")
        built = build_family(family, **params)
    if not isinstance(built.code, LinearCode) or built.code.q != 2:
        raise ParameterError(f"coset unions need a binary linear inner code, "
                             f"{built.provenance} is not")
    return built.code, built.provenance


def coset_union_run(d: int, family: str | None = None, params: dict[str, Any] | None = None,
                    cell: tuple[int, int] | None = None, dimension: int | None = None,
                    seed: int = 0, method: str = "auto", time_limit: float = 10.0,
                    goal: int | None = None, out: str | None = None) -> dict[str, Any]:
    """Search the largest union of cosets of an inner code with distance >= d (verified).

    The inner code is a family code (``family``, ``params``) or the best linear construction
    of ``cell``; with ``dimension`` a random subcode of that dimension (seeded) is used.
    """
    from codesearch.constructions.cosets import coset_union_search, random_subcode, union_words
    from codesearch.constructions.operations import verified

    code, inner = _inner_code(family, params or {}, cell)
    if dimension is not None and dimension != code.k:
        code = random_subcode(code, dimension, seed)
        inner = f"a random {dimension}-dimensional subcode (seed {seed}) of {inner}"
    from codesearch.model import MAX_LISTED_WORDS

    if code.size > MAX_LISTED_WORDS:
        raise ParameterError(f"coset unions: the inner code alone has {code.size} words, above "
                             f"the cap of {MAX_LISTED_WORDS} listed words")
    res = coset_union_search(code, d, method=method, time_limit=time_limit, seed=seed,
                             goal=goal)
    rows = tuple(int(sum(int(b) << j for j, b in enumerate(row))) for row in code.generator)
    provenance = f"union of {len(res.syndromes)} cosets of {inner}"
    built = verified(union_words(rows, res.leaders, code.n), d, provenance)
    summary: dict[str, Any] = {
        "n": code.n, "d": d, "inner": inner, "inner_dimension": code.k,
        "cosets": len(res.syndromes), "size": built.code.size, "optimal": res.optimal,
        "method": res.method, "seed": seed, "connection_set": res.connection_set,
        "syndromes": list(res.syndromes), "leaders": list(res.leaders),
        "generator": list(rows), "seconds": round(res.seconds, 3),
        "provenance": provenance, "file": None,
    }
    if out:
        _write(out, built.code, d, {"method": f"coset-union search ({res.method}, seed {seed})",
                                    "provenance": provenance}, False)
        summary["file"] = out
    return summary
