"""Schedule health checks: the published DCMA 14-point assessment, applied to a site.

Entry point :func:`check_site` (used by ``fieldlog check``). Each check is a small function in
:mod:`~fieldlog.checks.logic` (1-5), :mod:`~fieldlog.checks.dates` (6-11) or
:mod:`~fieldlog.checks.path` (12-14) returning a :class:`~fieldlog.checks.result.CheckResult`;
the pass marks and where they come from are in :mod:`~fieldlog.checks.sources`.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from fieldlog.checks import dates, logic, path
from fieldlog.checks.baseline import Baseline, load_baseline
from fieldlog.checks.result import CheckResult, Outcome
from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.readiness import holds
from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import Site
from fieldlog.workspace import SiteState, load_state

__all__ = ["CheckResult", "HealthReport", "Outcome", "check_site", "check_state"]


@dataclass(frozen=True)
class HealthReport:
    """Every check's finding for one site as of one status date."""

    site_name: str
    revision: int
    as_of: date
    baseline: str
    """Where the baseline dates came from."""
    checks: tuple[CheckResult, ...]

    @property
    def failed(self) -> tuple[CheckResult, ...]:
        """The checks outside their pass mark."""
        return tuple(c for c in self.checks if c.failed)


def check_state(state: SiteState, baseline: Baseline | None = None) -> HealthReport:
    """Run all fourteen checks on a loaded site (baseline: :func:`load_baseline`)."""
    site, result = state.site, state.schedule
    base = baseline or load_baseline(state.folder, site)
    rp = state.replay

    def reschedule(changed: Site) -> ScheduleResult:
        return compute_schedule(
            changed,
            result.as_of,
            rp.progress,
            lost_days=rp.lost_days,
            holds=holds(rp.readiness, result.as_of),
        )

    checks = (
        logic.check_logic(site, result),
        logic.check_leads(site, result),
        logic.check_lags(site, result),
        logic.check_relationship_types(site, result),
        logic.check_hard_constraints(site, result),
        dates.check_high_float(result),
        dates.check_negative_float(result),
        dates.check_high_duration(site, result, base),
        dates.check_invalid_dates(result),
        dates.check_resources(site, result),
        dates.check_missed_tasks(site, result, base),
        path.check_critical_path(site, result, reschedule),
        path.check_cpli(site, result, base),
        path.check_bei(site, result, base),
    )
    return HealthReport(site.name, site.revision, result.as_of, base.source, checks)


def check_site(folder: str, as_of: date | None = None) -> HealthReport:
    """Load the site folder and run every check as of ``as_of`` (default: last logged day)."""
    return check_state(load_state(folder, as_of))
