"""A search method used only by the table tests: exact maximum clique with networkx.

Vertices are the words of the space, edges join words at distance >= d; a maximum clique is
an optimal code (networkx ``max_weight_clique`` is exhaustive). Only for tiny cells.
"""

from __future__ import annotations

import itertools

import networkx as nx
import numpy as np

from codesearch.errors import ParameterError
from codesearch.model import Code
from codesearch.search.base import Context, Outcome

OPTIONS = frozenset()
SEEDING = "none"


def run(ctx: Context) -> Outcome:
    params = ctx.params
    if params.space_size > 64:
        raise ParameterError(f"stub-clique handles at most 64 words, {params} has more")
    words = list(itertools.product(range(params.q), repeat=params.n))
    g = nx.Graph()
    g.add_nodes_from(range(len(words)))
    for i, j in itertools.combinations(range(len(words)), 2):
        if sum(a != b for a, b in zip(words[i], words[j])) >= params.d:
            g.add_edge(i, j)
    clique, size = nx.max_weight_clique(g, weight=None)
    code = Code(np.array([words[i] for i in clique], dtype=np.uint8), params.q)
    return Outcome(code, int(size))
