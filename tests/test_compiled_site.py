"""The compiled form of a site: built once, shared explicitly, picklable, and never hidden on
the Site.

The schedule computed from a compiled site must equal the one computed from the plain Site
and the one of the independent reference engine (tests/helpers/reference_cpm.py, the one-activity-
at-a-time passes); the compiled value must survive a pickle round trip (the site cache may
store it beside the Site) and give the same schedule afterwards.
"""

from __future__ import annotations

import copyreg
import dataclasses
import io
import pickle
from datetime import timedelta
from types import MappingProxyType

import numpy as np

from fieldlog.engine.compiled import CompiledSite, compile_site, compiled
from fieldlog.engine.cpm import compute_schedule
from fieldlog.lookahead import build_lookahead
from fieldlog.site.cache import frozen_mapping
from tests.helpers import reference_cpm
from tests.test_cpm_differential import assert_same, random_case


def _round_trip(value: object) -> object:
    """Pickle and unpickle with the site cache's rule for read-only mappings."""
    buf = io.BytesIO()
    pickler = pickle.Pickler(buf, protocol=pickle.HIGHEST_PROTOCOL)
    table = copyreg.dispatch_table.copy()
    table[MappingProxyType] = lambda m: (frozen_mapping, (dict(m),))
    pickler.dispatch_table = table
    pickler.dump(value)
    return pickle.loads(buf.getvalue())


def test_a_compiled_site_pickles_and_schedules_the_same():
    site, status, progress, lost, holds = random_case(11)
    comp = compile_site(site)
    back = _round_trip(comp)
    assert isinstance(back, CompiledSite)
    assert back.site == site
    for name in ("ids", "level", "pred", "succ", "lag", "by_pred"):
        assert np.array_equal(np.asarray(getattr(back.net, name)), getattr(comp.net, name))
    ref = reference_cpm.compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    assert_same(compute_schedule(back, status, progress, lost_days=lost, holds=holds), ref)


def test_the_plain_site_and_its_compiled_form_give_the_same_schedule():
    for seed in range(4):
        site, status, progress, lost, holds = random_case(seed)
        comp = compile_site(site)
        a = compute_schedule(site, status, progress, lost_days=lost, holds=holds)
        b = compute_schedule(comp, status, progress, lost_days=lost, holds=holds)
        assert a == b
        assert b.compiled is comp  # the result carries the value it was computed from


def test_compiling_leaves_the_site_value_as_it_was():
    site = random_case(2)[0]
    before = dict(vars(site))
    comp = compiled(site)
    compute_schedule(comp, site.start - timedelta(days=1))
    assert vars(site) == before
    assert compiled(comp) is comp
    assert set(vars(site)) == {f.name for f in dataclasses.fields(site)}


def test_the_lookahead_reads_the_links_of_the_compiled_form():
    site, status, progress, lost, holds = random_case(5)
    result = compute_schedule(site, status, progress, lost_days=lost, holds=holds)
    comp = result.compiled
    for link in site.links:
        assert link in comp.links_out[link.pred] and link in comp.links_in[link.succ]
    assert sum(map(len, comp.links_out.values())) == len(site.links)
    build_lookahead(result)  # uses comp's links; must not touch the site
    assert set(vars(site)) <= {f.name for f in dataclasses.fields(site)} | {"_by_id"}
