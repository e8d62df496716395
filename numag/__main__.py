"""``python -m numag``: the command line."""

import sys

from .app.cli import main

sys.exit(main())
