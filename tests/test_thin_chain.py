"""A thin run that is one chain is solved at once; it must equal the one-link-at-a-time loop.

:mod:`fieldlog.engine.thin_levels` solves a run whose every activity has one link, from the
step before, on one calendar, with a running maximum (forward) or minimum (backward) instead
of the loop. The reference here is that loop itself, the way every other run is done (and
itself checked against the frozen reference engine in tests/test_cpm_deep.py): random chains
with every kind of source point (start or finish of the step before), leads and lags, and
floors and latest points drawn close to the computed values so that ties between a link and
a date are common, milestones alone and in rows. Every array the run writes must be equal,
the packed bests (they decide whether a link or a date drives an activity) and the
milestones' reading flags included. All data is invented.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldlog.engine import thin_levels
from fieldlog.engine.thin_levels import BackwardInputs, ForwardInputs, Links, Run

_NONE = np.zeros(0, dtype=np.int64)


@st.composite
def chains(draw: st.DrawFn) -> dict:
    """A chain of ``m`` activities at positions 1..m after one activity 0 outside the run."""
    m = draw(st.integers(2, 40))
    ints = st.integers
    return {
        "m": m,
        "reads_end": draw(st.lists(st.booleans(), min_size=m, max_size=m)),
        "add": draw(st.lists(ints(-4, 6), min_size=m, max_size=m)),
        "dur": draw(st.lists(st.sampled_from((0, 0, 1, 2, 5)), min_size=m, max_size=m)),
        "flags": draw(st.lists(st.booleans(), min_size=2, max_size=2)),
        "bound": draw(st.lists(ints(0, 60), min_size=m, max_size=m)),
        "outside": draw(st.tuples(ints(0, 20), ints(20, 200))),
    }


def _links(c: dict, backward: bool) -> tuple[Links, Run, int]:
    m = c["m"]
    n = m + 1
    who = np.arange(1, n, dtype=np.int64)
    if backward:  # each activity's link comes from the step after; the last from outside
        nxt = np.append(who[1:], 0)
        src = np.where(c["reads_end"], nxt + n, nxt)
    else:  # each activity's link comes from the step before; the first from outside
        prev = np.insert(who[:-1], 0, 0)
        src = np.where(c["reads_end"], prev + n, prev)
    links = Links(
        source=src.astype(np.int64),
        add=np.array(c["add"], dtype=np.int64),
        first=np.arange(m, dtype=np.int64),
        targets=who,
        t_dur=np.array(c["dur"], dtype=np.int64),
        cross_at=_NONE,
        x_from=_NONE,
        x_to=_NONE,
        x_add=_NONE,
    )
    return links, Run(0, m, 0, m, 0, 0), n


@given(chains())
def test_forward_chain_equals_the_loop(c: dict) -> None:
    links, run, n = _links(c, backward=False)
    inputs = ForwardInputs(links, 20, np.array(c["bound"], dtype=np.int64), _NONE)

    def arrays() -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        points = np.zeros((2, n), dtype=np.int64)
        points[:, 0] = c["outside"]
        flags = np.zeros((2, n), dtype=bool)
        flags[:, 0] = c["flags"]  # how the activity before the run is read
        flags[1, 1:] = True  # work is read "after" its finish (milestones get theirs here)
        best = np.full(n, -1, dtype=np.int64)
        return points, flags, best

    fast = arrays()
    assert thin_levels._forward_chain(inputs, run, *fast)
    slow = arrays()
    with pytest.MonkeyPatch.context() as patched:
        patched.setattr(thin_levels, "_forward_chain", lambda *args: False)
        thin_levels.forward_run(inputs, run, *slow, None)  # type: ignore[arg-type]
    for got, want in zip(fast, slow, strict=True):
        assert np.array_equal(got, want)


@given(chains())
def test_backward_chain_equals_the_loop(c: dict) -> None:
    links, run, n = _links(c, backward=True)
    inputs = BackwardInputs(links, np.array(c["bound"], dtype=np.int64) + 100, _NONE)

    def late() -> np.ndarray:
        points = np.full((2, n), 10**6, dtype=np.int64)
        points[:, 0] = (c["outside"][0] + 100, c["outside"][1] + 100)
        return points

    fast = late()
    assert thin_levels._backward_chain(inputs, run, fast)
    slow = late()
    with pytest.MonkeyPatch.context() as patched:
        patched.setattr(thin_levels, "_backward_chain", lambda *args: False)
        thin_levels.backward_run(inputs, run, slow, None)  # type: ignore[arg-type]
    assert np.array_equal(fast, slow)


def test_a_run_that_is_not_one_chain_is_left_to_the_loop() -> None:
    """A link from two steps back, a cross-calendar link: nothing is written."""
    c = {"m": 4, "reads_end": [True] * 4, "add": [0] * 4, "dur": [1, 0, 1, 1],
         "bound": [0] * 4, "outside": (0, 1)}  # fmt: skip
    links, run, n = _links(c, backward=False)
    points, best = np.zeros((2, n), dtype=np.int64), np.full(n, -1, dtype=np.int64)
    flags = np.zeros((2, n), dtype=bool)
    inputs = ForwardInputs(links, 20, np.zeros(4, dtype=np.int64), _NONE)
    skip = links._replace(source=links.source.copy())
    skip.source[3] = 1  # the fourth step waits on the first, not the third
    assert not thin_levels._forward_chain(inputs._replace(links=skip), run, points, flags, best)
    assert not thin_levels._forward_chain(inputs, run._replace(c1=1), points, flags, best)
    assert not points.any() and not flags.any() and (best == -1).all()
