"""Make a benchmark measure the numag of this checkout, not an installed copy.

Python puts a script's own directory (``benchmarks/``) first on ``sys.path``, not the checkout
above it: without this, ``python benchmarks/bench_tracker.py`` imports whichever numag pip
installed last and measures that. Every benchmark imports this module before numag.
"""

import pathlib
import sys

ROOT = pathlib.Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))
