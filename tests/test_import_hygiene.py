"""The core is reachable without the TUI: importing it must never pull in Textual.

This runs the real imports in a fresh interpreter and looks at ``sys.modules``: the only way to
prove that nothing imports Textual at module level, directly or through another module.
"""

from __future__ import annotations

import pkgutil
import subprocess
import sys

import fieldlog

UI_PACKAGES = {"fieldlog.app"}


def core_modules() -> list[str]:
    """Every fieldlog module except the app package."""
    names = []
    for info in pkgutil.walk_packages(fieldlog.__path__, "fieldlog."):
        if any(info.name == p or info.name.startswith(p + ".") for p in UI_PACKAGES):
            continue
        if info.name == "fieldlog.__main__":
            continue
        names.append(info.name)
    return sorted(names)


def test_core_never_imports_textual() -> None:
    modules = core_modules()
    assert "fieldlog.engine.cpm" in modules and "fieldlog.cli" in modules
    assert "fieldlog.history.build" in modules and "fieldlog.commands.history" in modules
    code = (
        "import importlib, sys\n"
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        "leaked = sorted(m for m in sys.modules if m == 'textual' or m.startswith('textual.'))\n"
        "print(','.join(leaked))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "", f"core modules imported Textual: {out.stdout.strip()}"


def test_cli_parser_builds_without_textual() -> None:
    """`fieldlog schedule` and friends start fast: building the parser loads no UI."""
    code = (
        "import sys\n"
        "from fieldlog.cli import build_parser\n"
        "build_parser()\n"
        "print('textual' in sys.modules)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


TEST_ONLY = ("networkx", "scipy")
"""Outside references the tests check against; the installed tool must run without them."""


def test_no_module_imports_a_test_only_library() -> None:
    """networkx and scipy are in the test extra only, so no fieldlog module may import them."""
    modules = sorted(
        info.name
        for info in pkgutil.walk_packages(fieldlog.__path__, "fieldlog.")
        if info.name != "fieldlog.__main__"
    )
    assert "fieldlog.app.app" in modules and "fieldlog.engine.cpm" in modules
    code = (
        "import importlib, sys\n"
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        f"leaked = sorted(m for m in sys.modules if m.split('.')[0] in {TEST_ONLY!r})\n"
        "print(','.join(leaked))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "", f"fieldlog imported a test-only library: {out.stdout.strip()}"
