"""Log problems on stderr, for the commands that print something else on stdout.

``schedule``, ``lookahead``, ``report`` and ``history`` repeat every problem the log holds on
stderr, so a damaged file or a contradiction is never missed. A log with thousands of bad
entries once buried the schedule under thousands of lines; the first ten are now shown, then
one line that counts the rest and names the command that lists every one (``verify``).

The data is still printed, but a log with problems is a problem found: these commands then
exit 1, as ``verify`` does (exit 0 ok, 1 problem found, 2 bad input). A script that read the
schedule of a forged log used to see exit 0.
"""

from __future__ import annotations

import sys
from collections.abc import Iterable

from fieldlog.commands.arguments import EXIT_OK, EXIT_PROBLEM
from fieldlog.reports.words import count

SHOWN = 10
"""Problems shown in full before the rest are counted."""


def warn_log_problems(messages: Iterable[str], site: str) -> int:
    """``fieldlog: log: <message>`` on stderr for the first :data:`SHOWN`, then a count.

    Returns:
        The command's exit code: ``EXIT_PROBLEM`` when there was any problem, else ``EXIT_OK``.
    """
    rest = 0
    seen = 0
    for n, message in enumerate(messages):
        seen = n + 1
        if n < SHOWN:
            print(f"fieldlog: log: {message}", file=sys.stderr)
        else:
            rest += 1
    if rest:
        more = count(rest, "more log problem", "more log problems")
        print(
            f"fieldlog: log: and {more}: 'fieldlog verify {site}' lists every one",
            file=sys.stderr,
        )
    return EXIT_PROBLEM if seen else EXIT_OK
