"""The activity network as a graph: topological order and dependency loops.

Kept apart from the CPM passes because the loader needs it too (a loop is a mistake in
schedule.toml that must be reported with every activity in the loop, in order).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from operator import attrgetter
from typing import TYPE_CHECKING, NamedTuple

if TYPE_CHECKING:  # numpy is imported by the functions that need it (start-up, see below)
    import numpy as np

    from fieldlog.site.model import Link


class LinkEnds(NamedTuple):
    """Each link's two ends as positions in the activity list, in file order, and the level
    of each activity (:func:`levels`), or None when the links form a loop.

    The loader's loop test works these out for every schedule it reads, and the engine's
    network needs exactly the same arrays: :func:`link_ends` makes them once, the network is
    built from them (:func:`fieldlog.engine.network_arrays.build_network`), and the site
    cache stores the link ends from the network instead of looking 800,000 ids up again on
    a 200,000-activity schedule.
    """

    pred: np.ndarray
    succ: np.ndarray
    level: np.ndarray | None


def link_ends(index: Mapping[str, int], links: Sequence[Link]) -> LinkEnds:
    """The :class:`LinkEnds` of ``links`` among the activities at ``index`` (id -> position).

    Raises:
        KeyError: a link names an id that ``index`` does not have.
    """
    import numpy as np

    count = len(links)
    pred = np.fromiter(map(index.__getitem__, map(_PRED, links)), np.int64, count)
    succ = np.fromiter(map(index.__getitem__, map(_SUCC, links)), np.int64, count)
    return ends_at(len(index), pred, succ)


def ends_at(
    count: int, pred: Sequence[int] | np.ndarray, succ: Sequence[int] | np.ndarray
) -> LinkEnds:
    """The :class:`LinkEnds` of links whose ends are already known as positions among
    ``count`` activities (the schedule's bulk checks find them while they check the ids)."""
    import numpy as np

    pred, succ = np.asarray(pred, dtype=np.int64), np.asarray(succ, dtype=np.int64)
    level = levels(count, pred, succ)
    return LinkEnds(pred, succ, None if level is None else level.astype(np.int64))


_PRED, _SUCC = attrgetter("pred"), attrgetter("succ")


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


def levels(n: int, pred: np.ndarray, succ: np.ndarray) -> np.ndarray | None:
    """Longest chain of links into each of ``n`` nodes, or None when the links form a loop.

    Kahn's algorithm one round per level, each round a few array operations: round ``r``
    takes every node whose predecessors were all taken in earlier rounds, so its longest chain
    has ``r`` links. Nodes on or after a loop are never taken. This is the fast test the
    loader runs on every schedule; only a schedule with a loop goes on to
    :func:`topological_order`, which names the loop. numpy is imported here, not at module
    level, so that commands which never build a network do not pay for it.

    A round of few nodes (a long chain of work: one node a round, ten thousand rounds) is
    done one node at a time (:func:`_thin_rounds`): the array operations of a round cost tens
    of microseconds whatever its size.
    """
    import numpy as np

    level = np.zeros(n, dtype=np.int32)
    if not len(succ):
        return level
    waiting = np.bincount(succ, minlength=n)  # predecessors not yet taken, per node
    by_pred = np.argsort(pred, kind="stable")
    out = succ[by_pred]
    first_out = np.searchsorted(pred[by_pred], np.arange(n + 1))
    ready = np.flatnonzero(waiting == 0)
    depth, taken = 0, 0
    lists: tuple[list[int], list[int]] | None = None
    while ready.size:
        if ready.size <= _THIN_ROUND:
            lists = lists or (out.tolist(), first_out.tolist())
            after, depth, thin_taken = _thin_rounds(ready.tolist(), depth, level, waiting, *lists)
            taken += thin_taken
            ready = np.array(after, dtype=np.int64)
            continue
        level[ready] = depth
        taken += ready.size
        count = first_out[ready + 1] - first_out[ready]
        # positions first_out[r] .. first_out[r + 1] - 1 of every ready node r, flattened
        offset = np.repeat(first_out[ready] - np.cumsum(count) + count, count)
        reached = np.sort(out[offset + np.arange(offset.size)])
        if not reached.size:
            break
        # each node reached once, with how many of its links were taken (a sort, no np.unique:
        # that one imports numpy.ma, a tenth of numpy's start-up)
        first = np.flatnonzero(np.concatenate(([True], reached[1:] != reached[:-1])))
        reached = reached[first]
        waiting[reached] -= np.diff(np.append(first, offset.size))
        ready = reached[waiting[reached] == 0]
        depth += 1
    return level if taken == n else None


_THIN_ROUND = 16
"""Rounds of at most this many ready nodes go one node at a time (measured on a chain)."""


def _thin_rounds(
    ready: list[int],
    depth: int,
    level: np.ndarray,
    waiting: np.ndarray,
    out: list[int],
    first_out: list[int],
) -> tuple[list[int], int, int]:
    """Kahn's rounds one node at a time while few nodes are ready: the same rounds as the
    array way (``level`` and ``waiting`` updated in place). Returns the next round's ready
    nodes, its depth and how many nodes were taken."""
    taken = 0
    while ready and len(ready) <= _THIN_ROUND:
        after = []
        for r in ready:
            level[r] = depth
            for j in out[first_out[r] : first_out[r + 1]]:
                waiting[j] -= 1
                if waiting[j] == 0:
                    after.append(j)
        taken += len(ready)
        ready = after
        depth += 1
    return ready, depth, taken


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
