"""The allocator setting: applied once, can be refused, and removes the page faults of batched evaluation."""

import os
import subprocess
import sys
import textwrap

import pytest

from numag.run.allocation import retain_freed_memory

FAULTS = textwrap.dedent("""
    import resource
    import numpy as np
    import numag
    from numag.tracking.homotopy import StraightLineHomotopy
    names = [f"x{j}" for j in range(8)]
    terms = [f"{names[i]}*{names[j]}" for i in range(8) for j in range(i, 8)] + names + ["1"]
    rng = np.random.default_rng(0)
    equations = [" + ".join(f"({c})*{m}" for c, m in zip(rng.integers(1, 9, len(terms)), terms)) for _ in range(8)]
    homotopy = StraightLineHomotopy.total_degree(numag.parse_system(equations, names), rng)
    points = homotopy.start_solutions()
    s = np.full(len(points), 0.5 + 0j)
    for _ in range(3):
        homotopy.evaluate(points, s)
    before = resource.getrusage(resource.RUSAGE_SELF).ru_minflt
    for _ in range(20):
        homotopy.evaluate(points, s)
    print((resource.getrusage(resource.RUSAGE_SELF).ru_minflt - before) / 20)
""")


def faults_per_evaluation(keep):
    environment = dict(os.environ, NUMAG_KEEP_ALLOCATOR="1" if keep else "0")
    output = subprocess.run([sys.executable, "-c", FAULTS], capture_output=True, text=True, env=environment,
                            check=True, timeout=120)
    return float(output.stdout.strip())


def test_applied_once_and_answer_stable():
    first = retain_freed_memory()
    assert retain_freed_memory() is first


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="mallopt is glibc's")
def test_page_faults_of_batched_evaluation_removed():
    # 256 paths of eight quadrics: megabyte arrays freed and allocated on every call. Without the
    # pad every call faults on the fresh pages (hundreds per call); with it the pages are reused.
    # (Measured with getrusage; common practice, no source.)
    if not retain_freed_memory():
        pytest.skip("this C library has no mallopt")
    untouched = faults_per_evaluation(keep=True)
    if untouched < 50:
        pytest.skip(f"this C library kept the pages by itself ({untouched} faults per evaluation)")
    tuned = faults_per_evaluation(keep=False)
    assert tuned < 0.1 * untouched
