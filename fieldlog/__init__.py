"""fieldlog: end-of-shift site log, live critical-path float and a two-week lookahead.

The core modules (model, site_files, calendars, network, progress, cpm, schedule_result,
journal, lookahead, sync, reports) never import Textual; only :mod:`fieldlog.app` does.
"""

__version__ = "0.1.0"
