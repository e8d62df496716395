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


def measure_other(other):
    """Measure the numag of the checkout ``other`` (a path, or None for this one), with this checkout's tests
    importable (their cases are the benchmark's); call before importing numag or a test module.

    Examples
    --------
    >>> measure_other(None)   # this checkout's numag, its tests on the path
    """
    if other is not None:  # put before this checkout
        sys.path.insert(0, str(pathlib.Path(other).resolve()))
    sys.path.insert(1, str(ROOT / "tests"))
