"""The loader's level test (``topology.levels``) against networkx on random link sets.

Reference: networkx's ``is_directed_acyclic_graph`` for "is there a loop" and its
``topological_sort`` order with the textbook longest-chain recurrence (a node's level is one
more than its highest predecessor's, 0 without predecessors) for the levels. Each case runs
with every round done the array way, every round one node at a time, and the default mix, so
both ways agree on every shape: long chains, fans, repeated links, loops. All data invented.
"""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.engine import topology


def _reference(n: int, links: list[tuple[int, int]]) -> list[int] | None:
    g = nx.MultiDiGraph()
    g.add_nodes_from(range(n))
    g.add_edges_from(links)
    if not nx.is_directed_acyclic_graph(g):
        return None
    level = [0] * n
    for v in nx.topological_sort(g):
        for u in g.predecessors(v):
            level[v] = max(level[v], level[u] + 1)
    return level


@st.composite
def link_sets(draw: st.DrawFn) -> tuple[int, list[tuple[int, int]]]:
    """Random links among up to 60 nodes: forward links (a DAG), a chain now and then, and
    sometimes a backward link (usually a loop)."""
    n = draw(st.integers(1, 60))
    links = draw(st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)), max_size=3 * n))
    links = [(a, b) if a < b else (b, a) for a, b in links if a != b]
    if draw(st.booleans()):
        links += [(k, k + 1) for k in range(n - 1)]
    if n > 1 and draw(st.integers(0, 4)) == 0:
        a, b = draw(st.integers(0, n - 2)), draw(st.integers(1, n - 1))
        links.append((max(a, b), min(a, b)) if a != b else (n - 1, 0))
    return n, links


@pytest.mark.parametrize("thin", [0, topology._THIN_ROUND, 10**9])
@settings(max_examples=150, deadline=None)
@given(case=link_sets())
def test_levels_match_networkx(case: tuple[int, list[tuple[int, int]]], thin: int) -> None:
    n, links = case
    pred = np.array([a for a, _ in links], dtype=np.int64)
    succ = np.array([b for _, b in links], dtype=np.int64)
    saved = topology._THIN_ROUND
    topology._THIN_ROUND = thin
    try:
        got = topology.levels(n, pred, succ)
    finally:
        topology._THIN_ROUND = saved
    want = _reference(n, links)
    assert (got is None) == (want is None)
    if want is not None:
        assert got is not None and got.tolist() == want


def test_a_long_chain_then_a_fan() -> None:
    """10,000 nodes in one chain, then 500 nodes all after its end: the rounds go one node
    at a time for the chain and the array way for the fan; the levels are the chain's
    positions and 10,000 for the fan."""
    chain = [(k, k + 1) for k in range(9_999)]
    fan = [(9_999, 10_000 + k) for k in range(500)]
    links = chain + fan
    pred = np.array([a for a, _ in links], dtype=np.int64)
    succ = np.array([b for _, b in links], dtype=np.int64)
    got = topology.levels(10_500, pred, succ)
    assert got is not None
    assert got.tolist() == list(range(10_000)) + [10_000] * 500
