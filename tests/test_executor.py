"""Executors: same results everywhere; failing and dying workers are retried, persistent failures reported."""

import os
import pathlib

import pytest

from numag.errors import InputError
from numag.executor import InProcess, LocalPool, make_executor


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
