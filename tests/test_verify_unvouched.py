"""``verify`` says when nothing vouches for the end of the log yet.

Found by attack: deleting the newest day file of a site that never synced (or cutting the
last entries from it) left a log that ``verify`` called "intact" with no word more. A hash
chain shows an edited or removed entry in the middle, never one removed from the end
(common practice for hash chains: only a record held elsewhere shows a shortened chain);
the office receipt is that record. Before the first sync ``verify`` now says so; after it,
the same deletion is a receipt finding (exit 1).
"""

from __future__ import annotations

from fieldlog.cli import main
from tests.helpers.sync_helpers import sync

NEWEST = "2026-09-25_site-laptop-1.toml"
NOTE = "not yet vouched for: this site has no office receipt"


def test_a_site_that_never_synced_is_intact_but_not_yet_vouched_for(sample_site, capsys):
    assert main(["verify", str(sample_site)]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[-2].startswith("log intact: 18 file(s), 106 entries")
    assert lines[-1].startswith(NOTE) and "'fieldlog sync'" in lines[-1]


def test_before_a_sync_a_deleted_newest_day_file_cannot_be_seen_and_it_says_so(sample_site, capsys):
    (sample_site / "log" / NEWEST).unlink()
    assert main(["verify", str(sample_site)]) == 0  # the known limit, now stated
    assert capsys.readouterr().out.splitlines()[-1].startswith(NOTE)


def test_after_a_sync_the_note_goes_and_the_same_deletion_is_found(sample_site, tmp_path, capsys):
    office = tmp_path / "office"
    office.mkdir()
    sync(sample_site, office)
    capsys.readouterr()
    main(["verify", str(sample_site)])
    assert NOTE not in capsys.readouterr().out
    (sample_site / "log" / NEWEST).unlink()
    assert main(["verify", str(sample_site)]) == 1
    out = capsys.readouterr().out
    assert "was removed after a sync" in out and NEWEST in out and NOTE not in out
