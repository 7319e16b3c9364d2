"""The two-week lookahead: what MUST, MAY and CANNOT run on each day, why, and the crew load.

Modules, in the order data flows through them:

* :mod:`~fieldlog.lookahead.classify`: the exact must / may / cannot rule per activity and day;
* :mod:`~fieldlog.lookahead.reasons`: the reasons in words ("waiting on ...", "n days of float");
* :mod:`~fieldlog.lookahead.crew_load`: headcount per crew and day against what each crew has;
* :mod:`~fieldlog.lookahead.positions` and :mod:`~fieldlog.lookahead.levelling`: a
  Burgess-Killebrew levelling suggestion that never moves the finish nor breaks a link;
* :mod:`~fieldlog.lookahead.build`: :func:`build_lookahead`, which puts them together;
* :mod:`~fieldlog.reports.lookahead_text` and :mod:`~fieldlog.reports.lookahead_data`: the
  printable sheet, JSON and CSV.
"""

from fieldlog.lookahead.build import ActivityRow, FinishedRow, Lookahead, build_lookahead
from fieldlog.lookahead.classify import Cell

__all__ = ["ActivityRow", "Cell", "FinishedRow", "Lookahead", "build_lookahead"]
