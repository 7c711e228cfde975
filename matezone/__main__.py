"""``python -m matezone``: the same as the ``matezone`` command."""

import sys

from matezone.cli import main

sys.exit(main())
