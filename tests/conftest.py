"""Fixtures shared by every test: no test touches the real home folder or the user's colours."""

from __future__ import annotations

import gc
import os
import shutil
from pathlib import Path

import pytest
from hypothesis import settings

ROOT = Path(__file__).resolve().parent.parent

# CI replays the same examples every run, so a landing is judged on the code, not on the
# draw; a developer's run keeps exploring new examples (and Hypothesis's database replays any
# it has seen fail). Select it with HYPOTHESIS_PROFILE=ci; CI=true selects it too.
settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("HYPOTHESIS_PROFILE") == "ci" or os.environ.get("CI") == "true":
    settings.load_profile("ci")
SAMPLE_SITE = ROOT / "sample_sites" / "kestrel-yard"


@pytest.fixture(autouse=True)
def _isolated_home(tmp_path_factory: pytest.TempPathFactory, monkeypatch: pytest.MonkeyPatch):
    """Device ids and app state go to a fresh folder, never the real user data folder."""
    home = tmp_path_factory.mktemp("fieldlog-home")
    # A device already set up: its author's name was given once (tests of the first-run
    # question use a fresh FIELDLOG_HOME of their own).
    (home / "device.toml").write_text('author = "T. Foreman"\n', encoding="utf-8")
    monkeypatch.setenv("FIELDLOG_HOME", str(home))
    # NO_COLOR changes Textual's rendering and breaks snapshots (libraries.md 1.2).
    monkeypatch.delenv("NO_COLOR", raising=False)
    return home


@pytest.fixture(autouse=True)
def _loads_not_frozen(monkeypatch: pytest.MonkeyPatch):
    """A command run in-process (cli.main) asks site loads to freeze what they make, as a
    one-shot process may; this long test process must not keep that (see site/files.py)."""
    from fieldlog.site import files

    monkeypatch.setattr(files, "_freeze", [False])
    yield
    gc.unfreeze()


@pytest.fixture
def sample_site(tmp_path: Path) -> Path:
    """A scratch copy of the sample site, safe to write to."""
    target = tmp_path / "kestrel-yard"
    shutil.copytree(SAMPLE_SITE, target)
    return target


@pytest.fixture
def synced_sample(sample_site: Path, tmp_path: Path) -> tuple[Path, Path]:
    """A scratch copy of the sample site after one clean sync with an empty office folder."""
    from tests.helpers.sync_helpers import sync

    office = tmp_path / "office"
    office.mkdir()
    assert sync(sample_site, office).exit_code == 0
    return sample_site, office


@pytest.fixture(params=["rtoml", "tomllib"])
def toml_reader(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> str:
    """Run a test once with rtoml reading every file (however small) and once with rtoml
    hidden, so both readers of fieldlog/fast_toml.py meet the same files and errors.

    Child processes started through tests/test_hostile_files.py's wrapper follow the same
    choice through ``TOML_READER`` (read only by that wrapper, never by fieldlog)."""
    from fieldlog import fast_toml

    if request.param == "rtoml":
        if fast_toml.rtoml_module() is None:
            pytest.skip("rtoml is not installed")
        monkeypatch.setattr(fast_toml, "FAST_MIN_CHARS", 0)
    else:
        monkeypatch.setattr(fast_toml, "_parser", None)
    monkeypatch.setenv("TOML_READER", request.param)
    return request.param
