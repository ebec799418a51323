"""Command line shell: parse, make one library call, print text or JSON.

Every command has a one-call Python equivalent named in its help. Heavy modules (numba
kernels, solvers, matplotlib) are imported inside the command functions so that
``codesearch --version`` and ``--help`` stay fast.

Exit status: 0 success, 1 a checked claim is false, 2 bad input (one line on stderr), 130
interrupted.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any, Callable, NoReturn, Sequence

from codesearch._version import __version__
from codesearch.errors import InputError, ParameterError

__all__ = ["main", "build_parser"]

_COMMANDS: dict[str, Callable[[argparse.Namespace], int]] = {}


def _int_range(text: str) -> range:
    """Parse ``N`` or ``A..B`` (inclusive) into a range."""
    try:
        if ".." in text:
            lo, hi = text.split("..", 1)
            a, b = int(lo), int(hi)
        else:
            a = b = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected an integer or a range A..B, got {text!r}")
    if b < a:
        raise argparse.ArgumentTypeError(f"empty range {text!r}")
    return range(a, b + 1)


def _word_count(text: str) -> int:
    """Parse a positive word count: ``N`` or ``2^K``."""
    try:
        if "^" in text:
            base, exp = (int(part) for part in text.split("^", 1))
            if exp > 64:  # far past any memory; also keeps the power cheap to compute
                raise argparse.ArgumentTypeError(f"count {text!r} is far too large")
            value = base**exp
        else:
            value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a count N or 2^K, got {text!r}")
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a positive count, got {text!r}")
    return value


#: Digits of the longest exact integer this tool prints (q^n at q = 36, n = 4096 has 6375).
_JSON_DIGITS = 8000


def _print_json(obj: Any) -> None:
    # Exact integers are printed whole; Python refuses past 4300 digits unless told, so the
    # limit is raised for this one dump of our own values (never while reading input).
    old = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(max(old, _JSON_DIGITS) if old else 0)
    try:
        text = json.dumps(obj, sort_keys=False)
    finally:
        sys.set_int_max_str_digits(old)
    print(text)


def _add_progress_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--progress", choices=["auto", "live", "lines", "json", "none"],
                   default="auto",
                   help="progress on stderr: live display (terminal), plain lines (pipe, log "
                   "file), JSON lines, or none; auto picks live on a terminal, lines "
                   "otherwise, json with --json (default auto)")


def _progress_mode(args: argparse.Namespace) -> str:
    from codesearch.report.live import progress_mode

    return progress_mode(args.progress, json_output=args.json, quiet=args.quiet)


def _kernels_first() -> None:
    """Compile the numba kernels before a command that searches or verifies, the first time
    on a machine (numba's cache empty or stale), with a one-line notice on stderr; later
    runs find the stamp and load kernels as they are used (codesearch.search.prepare)."""
    from codesearch.search import prepare

    if prepare.kernels_ready():
        return

    def notice(text: str) -> None:
        print(f"codesearch: {text} ...", end="", file=sys.stderr, flush=True)

    report = prepare.prepare_kernels(notice)
    print(f" done in {report.seconds:.0f} s", file=sys.stderr, flush=True)


# ---------------------------------------------------------------------------------- check
def _add_check(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "check",
        help="verify a code file, generator matrix or bound certificate",
        description="Verify a code file (length, alphabet, minimum distance, distance "
        "distribution, linearity), a generator matrix (--generator) or a bound certificate "
        "(recognised by its content). Python: codesearch.verify.check_code(codesearch.codefile.read_code(path).code, d).",
    )
    p.add_argument("file", help="code file, generator matrix, or certificate (JSON)")
    p.add_argument("--q", type=int, help="alphabet size (default: header, else largest symbol + 1)")
    p.add_argument("--d", type=int, help="claimed minimum distance to check (exit 1 if false)")
    p.add_argument("--generator", action="store_true",
                   help="FILE is a generator matrix (rows over GF(q), q prime): all q^k "
                   "codewords are listed up to 2^32, beyond that only the minimum distance is "
                   "found, by information sets")
    p.add_argument("--min-only", action="store_true",
                   help="with --generator: only the minimum distance, by information sets")
    p.add_argument("--cell", nargs=3, type=int, metavar=("Q", "N", "D"),
                   help="certificate or refutation bundle: the cell it is offered for; one "
                   "stating another cell is refused (exit 1)")
    p.add_argument("--store", metavar="STORE",
                   help="certificate or refutation bundle: once re-checked, record the bound "
                   "in this results store (the report then says 're-checked' for a bundle)")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    _COMMANDS["check"] = _cmd_check


def _cmd_check(args: argparse.Namespace) -> int:
    from codesearch import codefile, verify

    if args.generator:
        rows, q, _ = codefile.read_generator(args.file, args.q)
        report = verify.check_generator(rows, q, args.d,
                                        "information-sets" if args.min_only else "auto")
        return _print_code_report(args, report, None)
    from codesearch import proofbundle  # a SAT refutation bundle (manifest + DRAT proofs)

    cell = None
    if args.cell is not None:
        from codesearch.model import Params

        cell = Params(*args.cell)
    if proofbundle.is_bundle(args.file):
        return proofbundle.check_command(args.file, args.json, cell=cell, store=args.store)
    cert = codefile.read_certificate(args.file)
    if cert is not None:
        valid, bound, reason = verify.check_certificate(cert, cell)
        if valid and args.store:
            _store_certificate(args.store, cert, bound, cell)
        kind = cert["kind"] if isinstance(cert["kind"], str) else "?"
        if args.json:
            _print_json({"certificate": kind, "valid": valid, "bound": bound,
                         "reason": reason, "cell": None if cell is None else list(args.cell)})
        else:
            verdict = "valid" if valid else "INVALID"
            print(f"{args.file}: {kind} certificate {verdict}: {reason}")
        return 0 if valid else 1
    if args.cell is not None or args.store is not None:
        raise InputError(f"{args.file}: --cell and --store are for certificates and "
                         f"refutation bundles, not code files")
    parsed = codefile.read_code(args.file, args.q)
    d = args.d if args.d is not None else parsed.claimed_d
    report = verify.check_code(parsed.code, d)
    return _print_code_report(args, report, parsed)


def _store_certificate(store: str, cert: dict, bound: int, cell: Any) -> None:
    """Record a re-checked certificate's bound in a store (which re-checks it again)."""
    from codesearch.model import Params
    from codesearch.results import BoundResult
    from codesearch.store import Store
    from codesearch.verify.certificates import certificate_cell

    p = cell if cell is not None else Params(*certificate_cell(cert))
    with Store(store) as st:
        st.add_bound(BoundResult(p, bound, str(cert["kind"]), certificate=cert,
                                 note="recorded by codesearch check"))


def _print_code_report(args: argparse.Namespace, report: Any, parsed: Any) -> int:
    from codesearch.report import text

    where = None
    if report.offending is not None and parsed is not None:
        i, j, dist = report.offending
        where = (int(parsed.lines[i]), int(parsed.lines[j]), dist)
    if args.json:
        obj = report.to_json()
        if where is not None:
            obj["offending_lines"] = [where[0], where[1]]
            obj["offending_distance"] = where[2]
        _print_json(obj)
    else:
        print(text.code_report(report, args.file))
    if not report.valid:
        if where is not None:
            print(f"{args.file}:{where[1]}: codeword is at distance {where[2]} from line "
                  f"{where[0]}, below the claimed d={report.claimed_d}", file=sys.stderr)
        else:
            print(f"{args.file}: minimum distance {report.min_distance} is below the claimed "
                  f"d={report.claimed_d}", file=sys.stderr)
        return 1
    return 0


# --------------------------------------------------------------------------------- bounds
def _add_bounds(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "bounds",
        help="upper bounds on A_q(n,d) with exact certificates",
        description="Every closed-form bound, Delsarte's LP with an exact certificate and its "
        "integer refinements, the least one (upper, with its certificate kind; relations "
        "between the cells of the grid included) and the Gilbert-Varshamov existential lower "
        "bound, per cell. "
        "Python: codesearch.bounds.cell_summary(Params(q, n, d)); a grid with its relations: "
        "codesearch.bounds.grid_bounds(cells, all_bounds).",
    )
    p.add_argument("n", type=_int_range, help="length N or range A..B")
    p.add_argument("d", type=_int_range, help="minimum distance D or range A..B")
    p.add_argument("--q", type=int, default=2, help="alphabet size (default 2)")
    p.add_argument("--json", action="store_true", help="one JSON object per cell")
    p.add_argument("--no-lp", action="store_true", help="closed forms only (skip the LPs)")
    p.add_argument("--sdp", action="store_true",
                   help="also the three-point SDP bound (d >= 3; Schrijver's for binary codes, "
                   "Gijswijt-Schrijver-Tanaka's for q >= 3; seconds per cell)")
    p.add_argument("--fast", action="store_true",
                   help="double-precision LP only: no high-precision fallback for cells "
                   "whose LP value is beyond ~2^40 (such cells may stay uncertified)")
    p.add_argument("--certificate", metavar="FILE",
                   help="write the certificate of the upper bound (any kind) as JSON; for a "
                   "grid FILE must contain {n} and {d}; re-check with 'codesearch check FILE'")
    p.add_argument("--four-point", action="store_true",
                   help="also the four-point SDP bound (binary, d >= 3; contains the three-point "
                   "program; minutes per cell from n = 17): up to three solves with the moment "
                   "matrix of word pairs, each trying to exclude a target size. A cell "
                   "whose program would not fit this machine is refused with its size before "
                   "anything is solved")
    p.add_argument("--no-relations", action="store_true",
                   help="each cell on its own (no A(n,d) <= 2 A(n-1,d) etc. across the grid)")
    _COMMANDS["bounds"] = _cmd_bounds


def _cmd_bounds(args: argparse.Namespace) -> int:
    from codesearch import bounds
    from codesearch.model import grid
    from codesearch.report import text

    cells = grid(args.q, args.n, args.d, max_n=bounds.MAX_N, limit="bounds limit")
    pattern = args.certificate
    if pattern is not None and len(cells) != 1 and not ("{n}" in pattern and "{d}" in pattern):
        raise InputError("--certificate for a grid needs {n} and {d} in the file name")
    if args.four_point:
        from codesearch.bounds.fourpoint import check_four_point_fits

        for p in cells:
            if p.q != 2 or p.d >= 3:
                check_four_point_fits(p)  # raises, naming the program's size
    if args.sdp or args.four_point:
        _require_sdp_solver()
    options = dict(lp=not args.no_lp, lp_fallback=not args.fast, sdp=args.sdp,
                   four_point=args.four_point)
    result = bounds.grid_bounds(cells, lambda p: bounds.all_bounds(p, **options),
                                relations=not args.no_relations)
    summaries = [bounds.summarize(p, result[p].bounds, result[p].upper, result[p].cites)
                 for p in cells]
    if args.json:
        for s in summaries:
            _print_json(s)
    else:
        print(text.bounds_table(summaries, lp=options["lp"], sdp=args.sdp or args.four_point))
    if pattern is not None:
        from codesearch.codefile import write_certificate

        for p in cells:
            cert = bounds.certificate_of(result[p], result)
            if cert is None:
                if len(cells) == 1:
                    raise InputError(f"the upper bound of {p} is the closed form "
                                     f"{result[p].upper.method}: no certificate file")
                continue
            name = pattern.replace("{n}", str(p.n)).replace("{d}", str(p.d))
            write_certificate(name.replace("{q}", str(p.q)), cert)
    return 0


def _require_sdp_solver() -> None:
    from codesearch._optional import require

    require("clarabel", "the semidefinite bounds (--sdp)")


# ----------------------------------------------------------------------------------- find
def _add_find(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "find",
        help="search for a large code in one cell",
        description="Search for a large code of length N and minimum distance D. With an "
        "exhaustive method (exact) the result is proved optimal when the search finishes; "
        "on the time limit the best code and the upper bound proved so far are reported. "
        "Python: codesearch.search.search(Params(q, n, d), method, time_limit=, seed=).",
    )
    p.add_argument("n", type=int, help="length")
    p.add_argument("d", type=int, help="minimum distance")
    p.add_argument("--q", type=int, default=2, help="alphabet size (default 2)")
    p.add_argument("--method", default="exact", help="search method (default exact)")
    p.add_argument("--time", type=float, help="time limit in seconds")
    p.add_argument("--seed", type=int, help="random seed")
    p.add_argument("--out", help="write the code found to this file (verified first)")
    p.add_argument("--json", action="store_true",
                   help="print a JSON summary as the last line; progress goes to stderr as "
                   "JSON lines (keys: codesearch.report.live)")
    p.add_argument("--quiet", action="store_true", help="no progress on stderr")
    _add_progress_option(p)
    # sat / heuristics (satheur): passed on as search(..., size=M, proof=FILE) when given
    p.add_argument("--size", type=int, metavar="M",
                   help="ask for a code of M words (sat: decide it; heuristics: stop there); "
                   "JSON then adds 'exists'")
    p.add_argument("--proof", metavar="FILE",
                   help="sat with --size: write FILE[.wW].cnf and the DRAT proof FILE[.wW] of "
                   "each refuted branch (they cover the symmetry-reduced formula)")
    # Orbit search (method orbit) and the portfolio (method auto); dest matches the option name.
    p.add_argument(
        "--group", metavar="SPEC",
        help="orbit/auto: search only codes invariant under this group. SPEC joins factors "
        "with '*'; coordinates are 0..n-1, BLOCKS is 'A-B,C-D' (default: whole word): "
        "cyclic[:BLOCKS] shift, rev[:BLOCKS] reversal, mul:K[:BLOCKS] i->K*i, sym:BLOCKS "
        "all permutations per block, perm:(0 1 2)(3 4) explicit, scale[:A] multiply symbols "
        "(q prime), rep all-ones translations, rm1 cosets of RM(1,m) (n=2^m or 2^m-1), "
        "span:ROW,ROW or span:@FILE cosets of the span of the rows, gray:A:ROW,ROW "
        "(q=2) Gray images of cosets of the additive code in Z2^A x Z4^B spanned by the "
        "rows (A symbols 0-1, then B symbols 0-3; coordinates after A+2B fixed). Examples: "
        "'find 16 6 --method orbit --group rm1', 'find 20 10 --method orbit --group "
        "\"cyclic:0-18*rep\"', 'find 5 3 --q 4 --method orbit --group cyclic'. "
        "For auto: several specs separated by ';' (default: a few natural groups)")
    p.add_argument(
        "--orbit-mode", dest="mode", choices=("exact", "heuristic", "sparse"),
        help="orbit: 'exact' (default) builds the orbit graph, runs the heuristics and then "
        "the exact clique search; 'heuristic' stops after the heuristics; 'sparse' (q = 2) "
        "skips the graph and finds conflicts on demand, for groups that leave more "
        "admissible orbits than the graph's limit (heuristic, nothing proved). With --time, "
        "'heuristic' and 'sparse' search until the time is up (or --size is reached); "
        "without it they stop after 20000 moves")
    p.add_argument(
        "--max-words", dest="max_words", type=_word_count, metavar="N",
        help="orbit: list the orbits of spaces of up to N words, N or 2^K (default 2^22; "
        "about 40 bytes of memory per binary word, 2.5 GiB at 2^26; refused when the estimate "
        "exceeds the memory available)")
    _COMMANDS["find"] = _cmd_find


def _cmd_find(args: argparse.Namespace) -> int:
    from codesearch.model import Params
    from codesearch.report.live import find_progress
    from codesearch.report.text import find_summary
    from codesearch.search import search

    params = Params(args.q, args.n, args.d)
    _kernels_first()  # after the input is checked: bad input never waits for the compiler
    with find_progress(_progress_mode(args), str(params)) as prog:
        names = ("size", "proof", "group", "mode", "max_words")
        options = {name: getattr(args, name) for name in names
                   if getattr(args, name, None) is not None}
        result = search(params, args.method, time_limit=args.time, seed=args.seed,
                        progress=prog, **options)
    if args.out and result.code is not None:
        from codesearch.codefile import write_code

        write_code(args.out, result.code, params.d,
                   {"method": result.method, "status": result.status.value,
                    "upper": result.upper, "seed": result.seed})
    summary = result.to_json(args.out if (args.out and result.code is not None) else None)
    if args.json:
        _print_json(summary)
    else:
        print(find_summary(result))
    return 0


# ---------------------------------------------------------------------------------- table
def _add_store_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--store", default="codesearch.sqlite",
                   help="results store file (default: codesearch.sqlite in this directory)")


def _add_table(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "table", help="fill a table of cells into the results store",
        description="Run bounds and searches on every cell (q, n, d) of a range and store the "
        "results as they arrive; rerunning resumes, skipping work done at the same or a larger "
        "budget. Python: codesearch.batch.run_table(store, cells, budget=..., methods=...).",
    )
    p.add_argument("--q", type=int, default=2, help="alphabet size (default 2)")
    p.add_argument("--n", type=_int_range, required=True, help="lengths A..B")
    p.add_argument("--d", type=_int_range, required=True, help="minimum distances A..B")
    p.add_argument("--budget", type=float, default=10.0,
                   help="search seconds per cell, shared among the methods (default 10)")
    p.add_argument("--methods", help="comma-separated search methods (default: auto or exact)")
    _add_store_option(p)
    g = p.add_mutually_exclusive_group()
    g.add_argument("--workers", type=int, help="local worker processes (default: CPU count)")
    g.add_argument("--scheduler", help="Dask scheduler address, e.g. tcp://host:8786")
    p.add_argument("--seed", type=int, default=0, help="run seed (default 0)")
    p.add_argument("--no-bounds", action="store_true", help="skip the bounds stage")
    p.add_argument("--sdp", action="store_true", help="bounds stage also tries the SDP bound")
    p.add_argument("--four-point", type=float, default=0.0, metavar="SECONDS",
                   help="also the four-point SDP bound (binary) on every open cell whose "
                   "estimated solve time is at most SECONDS (minutes from n = 17, hours "
                   "from n = 21; outside the search budget; a rerun with a larger cap "
                   "tries the cells left over)")
    p.add_argument("--no-propagate", action="store_true", help="do not derive between cells")
    p.add_argument("--no-constructions", action="store_true",
                   help="do not ask the construction library before the searches")
    p.add_argument("--quiet", action="store_true", help="no progress on stderr")
    p.add_argument("--json", action="store_true",
                   help="print a JSON summary; progress goes to stderr as JSON lines (keys: "
                   "codesearch.report.live)")
    _add_progress_option(p)
    _COMMANDS["table"] = _cmd_table


def _cmd_table(args: argparse.Namespace) -> int:
    from codesearch import batch
    from codesearch.model import grid
    from codesearch.report.live import table_progress
    from codesearch.report.text import table_summary

    cells = grid(args.q, args.n, args.d)
    if args.sdp or args.four_point:
        _require_sdp_solver()
    if args.four_point < 0:
        raise ParameterError(f"--four-point takes seconds >= 0, got {args.four_point:g}")
    methods = None if args.methods is None else [m.strip() for m in args.methods.split(",") if m.strip()]
    kwargs = dict(budget=args.budget, methods=methods, workers=args.workers,
                  scheduler=args.scheduler, seed=args.seed, bounds=not args.no_bounds,
                  sdp=args.sdp, propagate=not args.no_propagate,
                  constructions=not args.no_constructions, four_point=args.four_point)
    _kernels_first()
    with table_progress(_progress_mode(args)) as display:
        summary = batch.run_table(args.store, cells, progress=display, **kwargs)
    if args.json:
        _print_json(summary.to_json())
    else:
        print(table_summary(summary, args.store))
        for err in summary.errors[:10]:
            print(f"  {err}", file=sys.stderr)
    return 0


# --------------------------------------------------------------------------------- report
def _add_report(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "report", help="render the stored table",
        description="The stored table with lower, upper and gap per cell, provenance, and the "
        "comparison with imported published values. Python: codesearch.report.write_report().",
    )
    _add_store_option(p)
    p.add_argument("--q", type=int, help="only this alphabet size")
    p.add_argument("--format", default="md", choices=["md", "csv", "tex", "html", "json"],
                   help="output format (default md)")
    p.add_argument("--out", help="write to this file instead of standard output")
    _COMMANDS["report"] = _cmd_report


def _cmd_report(args: argparse.Namespace) -> int:
    from codesearch import report

    text = report.write_report(args.store, args.format, q=args.q, out=args.out)
    if not args.out:
        sys.stdout.write(text)
    return 0


# --------------------------------------------------------------------------------- export
def _add_export(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "export", help="write the best stored code of a cell to a code file",
        description="Python: codesearch.report.export_code(store, Params(q, n, d), out).",
    )
    p.add_argument("n", type=int, help="length")
    p.add_argument("d", type=int, help="minimum distance")
    p.add_argument("--q", type=int, default=2, help="alphabet size (default 2)")
    _add_store_option(p)
    p.add_argument("--out", required=True, help="code file to write (.json for JSON)")
    p.add_argument("--generator", action="store_true",
                   help="for a linear code, write its generator rows instead of every word "
                   "(done anyway past 2^22 words)")
    _COMMANDS["export"] = _cmd_export


def _cmd_export(args: argparse.Namespace) -> int:
    from codesearch import report
    from codesearch.model import Params

    rows = report.export_code(args.store, Params(args.q, args.n, args.d), args.out,
                              generator=args.generator)
    print(f"wrote {rows} rows to {args.out}")
    return 0


# --------------------------------------------------------------------------------- import
def _add_import(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "import", help="import published values (kept apart from proven ones)",
        description="Read a CSV (columns q,n,d,lower,upper,source) or a JSON list of such "
        "objects and store it apart from this tool's results; a value contradicting a proven "
        "entry is refused and nothing is stored. Python: Store(path).import_published(rows).",
    )
    p.add_argument("file", help="CSV or JSON file of published values")
    _add_store_option(p)
    _COMMANDS["import"] = _cmd_import


def _cmd_import(args: argparse.Namespace) -> int:
    from codesearch.store import Store, read_published_file

    rows = read_published_file(args.file)
    with Store(args.store) as st:
        count = st.import_published(rows)
    print(f"imported {count} published values into {args.store}")
    return 0


# ----------------------------------------------------------------------------------- plot
def _add_plot(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "plot",
        help="draw the rate-distance picture",
        description="Asymptotic bounds on the rate against relative distance (Singleton, "
        "Hamming, Plotkin, Elias-Bassalygo, first LP bound, Gilbert-Varshamov) and, with "
        "--n, the finite cells of those lengths (bar from GV to the best upper bound). "
        "Python: codesearch.report.plot.save_rate_distance(path, q, points).",
    )
    p.add_argument("--q", type=int, default=2, help="alphabet size (default 2)")
    p.add_argument("--n", type=_int_range, help="also draw the cells of lengths N or A..B")
    p.add_argument("--no-lp", action="store_true", help="finite cells from closed forms only")
    p.add_argument("--store", help="draw the cells of this results store instead "
                   "(codesearch.report.plot_store)")
    p.add_argument("--out", default="rate-distance.png",
                   help="output file, .png, .svg or .pdf (default rate-distance.png)")
    _COMMANDS["plot"] = _cmd_plot


def _cmd_plot(args: argparse.Namespace) -> int:
    if args.store:
        from codesearch import report as table_report

        count = table_report.plot_store(args.store, args.out, q=args.q)
        print(f"{args.out} ({count} stored cells)")
        return 0
    from codesearch.bounds import finite_points
    from codesearch.model import Params
    from codesearch.report.plot import save_rate_distance

    Params(args.q, 1, 1)  # validates q with the usual one-line error
    points = finite_points(args.q, args.n, lp=not args.no_lp) if args.n is not None else None
    print(save_rate_distance(args.out, args.q, points))
    return 0


# ----------------------------------------------------------------------------------- demo
def _add_demo(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("demo", help="run the built-in demo scenario end to end")
    p.add_argument("--workdir", help="directory for the demo's files (default: a temp dir)")
    _COMMANDS["demo"] = _cmd_demo


def _cmd_demo(args: argparse.Namespace) -> int:
    _kernels_first()
    from codesearch import demo

    return demo.run(args.workdir)


# ------------------------------------------------------------------------------ construct
def _add_construct(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "construct",
        help="build a code family from its definition, or list the constructions for a cell",
        description="'construct FAMILY --param NAME=VALUE ... [--out FILE]' builds and verifies "
        "a family code (codesearch.constructions.build_family); 'construct --cell N D [--q Q]' "
        "lists the families and chains of operations that give a code for the cell, largest "
        "first (codesearch.constructions.candidates), and with --out writes the best "
        "(codesearch.constructions.best); 'construct --families' lists the families; "
        "'construct --coset-union D (FAMILY --param ... | --inner-cell N D0) [--dimension K]' "
        "searches the largest union of cosets of that binary linear code with distance >= D "
        "(codesearch.constructions.command.coset_union_run).",
    )
    p.add_argument("family", nargs="?", help="family name (see --families)")
    p.add_argument("--param", action="append", metavar="NAME=VALUE",
                   help="a family parameter, repeated (e.g. --param q=2 --param m=5)")
    p.add_argument("--cell", nargs=2, type=int, metavar=("N", "D"),
                   help="list the constructions for length N, distance D")
    p.add_argument("--q", type=int, default=2, help="alphabet size for --cell (default 2)")
    p.add_argument("--families", action="store_true", help="list the families")
    p.add_argument("--out", help="write the code (verified) to this file")
    p.add_argument("--generator", action="store_true",
                   help="write a linear code as its generator matrix (always done past 2^16 words)")
    p.add_argument("--max-words", type=int, help="with --cell --out: largest nonlinear code built")
    p.add_argument("--json", action="store_true", help="print JSON")
    g = p.add_argument_group("coset unions")
    g.add_argument("--coset-union", type=int, metavar="D",
                   help="search a union of cosets of the inner code (FAMILY or --inner-cell) "
                   "with distance >= D")
    g.add_argument("--inner-cell", nargs=2, type=int, metavar=("N", "D0"),
                   help="inner code: the best linear construction of length N, distance D0")
    g.add_argument("--dimension", type=int, metavar="K",
                   help="use a random K-dimensional subcode of the inner code (seeded)")
    g.add_argument("--seed", type=int, default=0, help="seed (subcode, greedy restarts)")
    g.add_argument("--method", choices=["auto", "exact", "greedy"], default="auto",
                   help="clique stage: exact branch and bound, greedy restarts, or auto")
    g.add_argument("--time-limit", type=float, default=10.0, help="seconds for the clique stage")
    g.add_argument("--goal", type=int, metavar="M", help="stop at a union of M cosets")
    _COMMANDS["construct"] = _cmd_construct


def _cmd_construct(args: argparse.Namespace) -> int:
    from codesearch.constructions import command

    if args.families:
        rows = command.family_listing()
        if args.json:
            _print_json(rows)
        else:
            for r in rows:
                print(f"{r['family']:<20} {' '.join(r['parameters']):<28} {r['summary']}")
        return 0
    if args.coset_union is not None:
        summary = command.coset_union_run(
            args.coset_union, args.family, command.parse_params(args.param),
            tuple(args.inner_cell) if args.inner_cell else None, args.dimension, args.seed,
            args.method, args.time_limit, args.goal, args.out)
        if args.json:
            _print_json(summary)
        else:
            status = "largest for this inner code" if summary["optimal"] else "not proved largest"
            print(f"{summary['provenance']}: n={summary['n']}, {summary['size']} words, "
                  f"d>={summary['d']} (verified; {summary['method']} search, {status})"
                  + (f"; wrote {summary['file']}" if summary["file"] else ""))
        return 0
    if args.cell:
        from codesearch.model import Params

        summary = command.cell_listing(Params(args.q, *args.cell), args.out, args.max_words,
                                       args.generator)
        if args.json:
            _print_json(summary)
            return 0
        for r in summary["routes"]:
            kind = "linear" if r["linear"] else "nonlinear"
            print(f"{r['size']:>12}  d>={r['d']:<3} {kind:<9} {r['provenance']}")
        if not summary["routes"]:
            print(f"no construction for {Params(args.q, *args.cell)}")
        if summary["file"]:
            print(f"wrote {summary['built']['size']} words ({summary['built']['provenance']}) "
                  f"to {summary['file']}")
        return 0
    if not args.family:
        raise InputError("construct: name a FAMILY, or use --cell N D or --families")
    summary = command.build_to_file(args.family, command.parse_params(args.param), args.out,
                                    args.generator)
    if args.json:
        _print_json(summary)
    else:
        print(f"{summary['provenance']}: n={summary['n']}, {summary['size']} words, "
              f"d>={summary['d']} (verified)" + (f"; wrote {summary['file']}" if summary["file"]
                                                 else ""))
    return 0


# -------------------------------------------------------------------------------- prepare
def _add_prepare(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "prepare", help="compile the search kernels now (after install, in an image build)",
        description="Compile (or load, when numba's cache is warm) every numba kernel and "
        "record that this machine's cache is ready, so that no command compiles inside a "
        "time budget. Commands that search or verify do this themselves the first time, "
        "with a one-line notice. Python: codesearch.search.prepare.prepare_kernels().",
    )
    p.add_argument("--json", action="store_true", help="print one JSON object")
    _COMMANDS["prepare"] = _cmd_prepare


def _cmd_prepare(args: argparse.Namespace) -> int:
    from codesearch.search import prepare

    report = prepare.prepare_kernels()
    if args.json:
        _print_json({"seconds": round(report.seconds, 3), "kernels": report.kernels,
                     "missing": list(report.missing), "cache_dir": report.cache_dir})
    else:
        print(f"{report.kernels} kernels ready in {report.seconds:.1f} s"
              + (f" (cache: {report.cache_dir})" if report.cache_dir else ""))
        if report.missing:
            print(f"not reached by the warm-up: {', '.join(report.missing)}", file=sys.stderr)
    return 0


# ------------------------------------------------------------------------------------ main
class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line (and exit status 2), like every
    other bad-input error of the tool; the full usage stays on ``--help``."""

    def error(self, message: str) -> NoReturn:
        self.exit(2, f"{self.prog}: {message} (see '{self.prog} --help')\n")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every subcommand."""
    parser = _Parser(
        prog="codesearch",
        description="Find codes, prove upper bounds and fill tables of A_q(n,d).",
    )
    parser.add_argument("--version", action="version", version=f"codesearch {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for add in (_add_check, _add_bounds, _add_find, _add_table, _add_report, _add_export,
                _add_import, _add_plot, _add_demo, _add_construct, _add_prepare):
        add(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``codesearch`` console script; returns the exit status."""
    parser = build_parser()
    args, extra = parser.parse_known_args(argv)
    if extra:
        # named after the subcommand whose options they are not
        prog = f"codesearch {args.command}" if args.command else "codesearch"
        parser.exit(2, f"{prog}: unrecognized arguments: {' '.join(extra)} "
                       f"(see '{prog} --help')\n")
    if args.command is None:
        parser.print_help()
        return 2
    try:
        return _COMMANDS[args.command](args)
    except InputError as exc:
        print(str(exc).splitlines()[0] if str(exc) else type(exc).__name__, file=sys.stderr)
        return 2
    except BrokenPipeError:
        # the reader (e.g. `| head`) went away: stop quietly, as text tools do
        import os

        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return 0
    except KeyboardInterrupt:
        print(f"codesearch {args.command}: interrupted", file=sys.stderr)
        return 130
    except ImportError as exc:
        # a Ctrl-C that lands inside a C extension's import surfaces as an ImportError
        if isinstance(exc.__context__, KeyboardInterrupt):
            print(f"codesearch {args.command}: interrupted", file=sys.stderr)
            return 130
        raise
