"""The layering of the package, read from its import statements (ast, no import needed).

No import loop among codesearch modules, and the checker depends on nothing it checks
(DEVELOPERS.md, "Layout and dependency direction"). Cycles are found with networkx as the
outside graph library.
"""

from __future__ import annotations

import ast
import pathlib

import networkx as nx

ROOT = pathlib.Path(__file__).resolve().parent.parent / "codesearch"


def _modules() -> dict[str, pathlib.Path]:
    out = {}
    for path in ROOT.rglob("*.py"):
        parts = list(path.relative_to(ROOT.parent).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        out[".".join(parts)] = path
    return out


def _imports() -> nx.DiGraph:
    """Module -> every codesearch module it imports (at any depth in the file)."""
    mods = _modules()

    def owner(name: str) -> str | None:
        while name and name not in mods:
            name = name.rpartition(".")[0]
        return name or None

    graph = nx.DiGraph()
    for mod, path in mods.items():
        graph.add_node(mod)
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.module and not node.level:
                names = [f"{node.module}.{a.name}" for a in node.names]
            else:
                continue
            for name in names:
                if name.startswith("codesearch"):
                    target = owner(name)
                    if target is not None and target != mod:
                        graph.add_edge(mod, target)
    return graph


def test_no_import_loops():
    graph = _imports()
    # a package's __init__ re-exporting its own modules is not a loop of the design
    loops = [c for c in nx.simple_cycles(graph)
             if not any(a.startswith(b + ".") or b.startswith(a + ".")
                        for a, b in zip(c, c[1:] + c[:1]))]
    assert loops == []


def test_the_checker_depends_on_nothing_it_checks():
    graph = _imports()
    verify = {m for m in graph if m == "codesearch.verify" or m.startswith("codesearch.verify.")}
    reached = set().union(*(nx.descendants(graph, m) for m in verify)) - verify
    # codesearch.gf comes in through model.LinearCode, which lists its words over GF(p^m); the
    # checker itself adds symbols digit-wise and never multiplies in the field.
    allowed = {"codesearch.model", "codesearch.errors", "codesearch._kernels", "codesearch.gf"}
    assert reached <= allowed, reached


def test_only_searchers_and_the_checker_use_the_kernels():
    graph = _imports()
    users = {m for m in graph.predecessors("codesearch._kernels")}
    assert all(m.startswith(("codesearch.search.", "codesearch.verify.")) for m in users), users
