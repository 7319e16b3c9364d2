"""The end-of-shift terminal app (Textual): ``fieldlog open SITE`` and ``fieldlog demo``.

The only package of fieldlog that imports Textual. It reads results from the core and appends
journal entries through :mod:`fieldlog.journal`; it never edits the office's schedule file.

This ``__init__`` stays free of Textual on purpose: ``fieldlog open`` first loads the site with
:mod:`fieldlog.app.session` (pure Python), so a broken site fails with the CLI's one-line
message before any terminal is taken over. Build the app with :func:`fieldlog.app.app.make_app`.

Layout of the package (pure Python first, then the Textual side):

* ``session``: loads the site and recomputes the schedule and lookahead, in two steps so the
  view on screen repaints before the full lookahead is done (thread-safe, versioned).
* ``shift``, ``float_filter``, ``history_rows``: pick, order and word the rows of the lists.
* ``forms``: small forms as data, and reading what was typed.
* ``recording``: the one place where a key press becomes a journal entry (forms are built
  from the journal's own field specs).
* ``printing``: write the lookahead sheet to a file; print it when a printer is set up.
* ``keymap``: every key as data with a stable id (bindings, help overlay, command palette).
* ``host``: the read-only protocol screens read the app through; ``messages``: what they ask
  the App to do (record, open a form, recompute, show a status line, help).
* ``app``: the App, the write-then-recompute loop and :func:`~fieldlog.app.app.make_app`; it
  imports the screens, never the reverse.
* ``screens/``: one module per view (today, lookahead, float_list, history, sync, report) and per
  overlay (form, pick, help); ``widgets/``: the shared bars and the fast row list.
* ``commands``: the command palette provider; ``app.tcss``: the styles.
"""
