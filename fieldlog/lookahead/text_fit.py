"""Moved to :mod:`fieldlog.text_fit` (every printed output uses it, not only the lookahead).

Kept so that code written against the old place still imports; new code imports
``fieldlog.text_fit``.
"""

from fieldlog.text_fit import abbreviate, fit, graphemes, head, right, tail, to_ascii, width, wrap

__all__ = ["abbreviate", "fit", "graphemes", "head", "right", "tail", "to_ascii", "width", "wrap"]
