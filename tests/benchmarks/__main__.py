"""``python -m tests.benchmarks``: the benchmark runner (tests/benchmarks/run.py)."""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from run import main  # noqa: E402

sys.exit(main())
