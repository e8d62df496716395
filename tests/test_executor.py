"""Executors: same results everywhere; failing and dying workers are retried, persistent failures reported."""

import os
import pathlib

import pytest

from numag.errors import InputError
from numag.run.executor import InProcess, LocalPool, make_executor


def square_all(batch):
    return [value * value for value in batch]


def fails_on_three(batch):
    if 3 in batch:
        raise ValueError("batch with 3 always fails")
    return sum(batch)


class FailsOnce:
    """Raises (or kills its worker) the first time it sees a batch holding ``trigger``."""

    def __init__(self, marker, trigger, die=False):
        self.marker, self.trigger, self.die = str(marker), trigger, die

    def __call__(self, batch):
        if self.trigger in batch and not os.path.exists(self.marker):
            pathlib.Path(self.marker).write_text("failed once")
            if self.die:
                os._exit(3)  # a worker killed mid-batch
            raise RuntimeError("transient failure")
        return sum(batch)


BATCHES = [[1, 2], [3, 4], [5], [6, 7, 8]]


@pytest.mark.parametrize("make", [InProcess, lambda: LocalPool(2)])
def test_same_results_in_any_executor(make):
    with make() as executor:
        results = dict(executor.run(square_all, BATCHES))
    assert results == {k: square_all(b) for k, b in enumerate(BATCHES)}
    assert executor.retries == 0 and executor.failures == []


@pytest.mark.parametrize("make", [InProcess, lambda: LocalPool(2)])
def test_a_failing_batch_is_retried_then_reported(make, tmp_path):
    with make() as executor:
        results = dict(executor.run(FailsOnce(tmp_path / "m", 5), BATCHES))
    assert results == {k: sum(b) for k, b in enumerate(BATCHES)} and executor.retries == 1
    with make() as executor:
        results = dict(executor.run(fails_on_three, BATCHES))
    assert sorted(results) == [0, 2, 3]
    assert [f.index for f in executor.failures] == [1] and executor.failures[0].attempts == 2
    assert "always fails" in executor.failures[0].error
    assert executor.describe()["failed_batches"][0]["index"] == 1


def test_a_killed_worker_is_replaced_and_its_batch_retried(tmp_path):
    with LocalPool(2) as executor:
        results = dict(executor.run(FailsOnce(tmp_path / "m", 6, die=True), BATCHES))
    assert results == {k: sum(b) for k, b in enumerate(BATCHES)}
    assert executor.retries >= 1 and executor.failures == []


def test_default_choice_and_bad_worker_counts():
    assert isinstance(make_executor(batches=1), InProcess)
    assert make_executor(workers=1, batches=10).name == "in-process"
    with make_executor(workers=2, batches=10) as executor:
        assert executor.name == "process pool" and executor.workers == 2
    with pytest.raises(InputError, match="at least 1"):
        make_executor(workers=0)


_ORPHAN_SCRIPT = """
import os, sys, threading, time
sys.path.insert(0, {root!r})
from numag.run.executor import LocalPool

def slow(batch):
    time.sleep(600)
    return batch

pool = LocalPool(2)
threading.Thread(target=lambda: list(pool.run(slow, [1, 2, 3, 4])), daemon=True).start()
deadline = time.monotonic() + 60  # never wait for ever: the test then fails instead of hanging
while (pool._pool is None or len(pool._pool._processes or {{}}) < 2) and time.monotonic() < deadline:
    time.sleep(0.05)
print(" ".join(str(pid) for pid in pool._pool._processes), flush=True)
time.sleep(600)
"""


def _running(pid):
    """True while the process exists and is not a zombie (a container's init may not reap orphans)."""
    try:
        with open(f"/proc/{pid}/stat") as handle:
            return handle.read().rsplit(")", 1)[1].split()[0] != "Z"
    except FileNotFoundError:
        return False


@pytest.mark.skipif(not pathlib.Path("/proc/self/stat").exists(), reason="needs /proc (Linux)")
@pytest.mark.parametrize("signal_number", [9, 15])
def test_workers_die_with_their_parent(tmp_path, signal_number):
    import subprocess
    import sys
    import time
    script = tmp_path / "parent.py"
    script.write_text(_ORPHAN_SCRIPT.format(root=str(pathlib.Path(__file__).resolve().parent.parent)))
    parent = subprocess.Popen([sys.executable, str(script)], stdout=subprocess.PIPE, text=True)
    workers = [int(pid) for pid in parent.stdout.readline().split()]
    assert len(workers) == 2 and all(_running(pid) for pid in workers)
    os.kill(parent.pid, signal_number)
    parent.wait()
    deadline = time.monotonic() + 60  # a bound for a loaded machine, not a timing assertion
    while any(_running(pid) for pid in workers) and time.monotonic() < deadline:
        time.sleep(0.1)
    left = [pid for pid in workers if _running(pid)]
    for pid in left:  # never leave them behind, even when the test fails
        os.kill(pid, 9)
    assert not left
