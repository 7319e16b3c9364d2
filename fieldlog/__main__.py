"""``python -m fieldlog``: the same as the ``fieldlog`` command."""

import sys

from fieldlog.cli import main

sys.exit(main())
