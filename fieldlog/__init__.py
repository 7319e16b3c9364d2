"""fieldlog: end-of-shift site log, live critical-path float and a two-week lookahead.

The data flows through the packages in this order: :mod:`fieldlog.site` (the office's files
read and checked), :mod:`fieldlog.journal` (the field's log), :mod:`fieldlog.engine` (calendars
and the critical path), :mod:`fieldlog.lookahead` and :mod:`fieldlog.history`, then
:mod:`fieldlog.reports` (everything printed). :mod:`fieldlog.sync` and :mod:`fieldlog.office`
carry logs to and from the office. None of them imports Textual; only :mod:`fieldlog.app` does.
"""

__version__ = "0.1.0"
