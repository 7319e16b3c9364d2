"""The activity network as a graph: topological order and dependency loops.

Kept apart from the CPM passes because the loader needs it too (a loop is a mistake in
schedule.toml that must be reported with every activity in the loop, in order).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence


def topological_order(
    nodes: Sequence[str], edges: Iterable[tuple[str, str]]
) -> tuple[list[str], list[str] | None]:
    """Order ``nodes`` so that every edge ``(a, b)`` has ``a`` before ``b``.

    Ties are broken by the order of ``nodes`` (the file order), so the result is deterministic.

    Returns:
        ``(order, None)`` for an acyclic network, or ``(partial, cycle)`` where ``cycle`` lists
        the activities of one loop in order with the first repeated at the end.
    """
    position = {n: i for i, n in enumerate(nodes)}
    succs: list[list[int]] = [[] for _ in nodes]
    indegree = [0] * len(nodes)
    for a, b in edges:
        ia, ib = position[a], position[b]
        succs[ia].append(ib)
        indegree[ib] += 1
    ready = [i for i, d in enumerate(indegree) if d == 0]
    ready.reverse()  # pop() from the end keeps file order
    order: list[int] = []
    while ready:
        i = ready.pop()
        order.append(i)
        released = []
        for j in succs[i]:
            indegree[j] -= 1
            if indegree[j] == 0:
                released.append(j)
        ready.extend(sorted(released, reverse=True))
    if len(order) == len(nodes):
        return [nodes[i] for i in order], None
    remaining = {i for i, d in enumerate(indegree) if d > 0}
    cycle = _find_cycle(succs, remaining)
    return [nodes[i] for i in order], [nodes[i] for i in cycle]


def _find_cycle(succs: list[list[int]], candidates: set[int]) -> list[int]:
    """One loop among ``candidates`` (nodes left after Kahn's pass), first node repeated."""
    start = min(candidates)
    # Every candidate lies on a loop or downstream of one; walking successors inside the
    # candidate set must therefore revisit a node.
    seen: dict[int, int] = {}
    path: list[int] = []
    node = start
    while node not in seen:
        seen[node] = len(path)
        path.append(node)
        node = next(j for j in succs[node] if j in candidates)
    loop = path[seen[node] :]
    return [*loop, loop[0]]
