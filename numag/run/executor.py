"""Running independent batches: in this process, in a local process pool, or on a Dask cluster.

Paths are independent, so a run is a list of batches and a function that tracks
one batch. An executor runs ``function(batch)`` for every batch and hands each
result back as it arrives; the caller writes it to its checkpoint. Three
implementations behind one interface:

* :class:`InProcess`: one batch after another, here (small runs; the default when
  a run fits in one batch);
* :class:`LocalPool`: a pool of worker processes on this machine (``workers``
  processes, BLAS pinned to one thread in each: parallelism comes from batches);
* :class:`DaskCluster`: a Dask client (``dask.distributed``, the optional extra
  ``cluster``) connected to a scheduler address, or a local Dask cluster that
  numag starts (for testing, or to use Dask's dashboard on one machine).

Failures are never lost: a batch whose function raises, or whose worker dies, is
retried once (on a fresh pool when a worker died); a batch that fails twice is
reported in :attr:`Executor.failures` with its error and left to the caller.

Examples
--------
>>> with InProcess() as executor:
...     results = dict(executor.run(abs, [-1, -2, 3]))
>>> results
{0: 1, 1: 2, 2: 3}
"""

from contextlib import contextmanager
import contextvars
from dataclasses import dataclass
import os
import signal
import threading
import time
import weakref

from ..errors import InputError, LimitError

__all__ = ["Executor", "InProcess", "LocalPool", "DaskCluster", "BatchFailure", "make_executor", "default_workers",
           "using", "current_executor", "ambient_executor", "WorkLimits", "work_limits", "charge_paths", "check_memory",
           "abort_workers"]


@dataclass(frozen=True)
class WorkLimits:
    """How much work one run may do (the command line's ``--max-paths`` and ``--max-memory``).

    Attributes
    ----------
    max_paths : int
        Paths a run may track in all: a solve's Bezout number; for witness sets, decompositions and
        singular loci every homotopy's paths, added up and checked before each homotopy starts (the
        command line also checks the regeneration's bound before it starts).
    max_memory : int
        Bytes one evaluation table or one batch of paths may take (estimated before allocating).
    """

    max_paths: int = 100_000_000
    max_memory: int = 8 * 1024 ** 3


_LIMITS = contextvars.ContextVar("numag_work_limits", default=None)


@contextmanager
def work_limits(limits):
    """Apply ``limits`` (a :class:`WorkLimits`) to every homotopy inside the ``with`` block.

    Examples
    --------
    >>> with work_limits(WorkLimits(max_paths=10)):
    ...     charge_paths(8, "a test")
    ...     charge_paths(8, "a second test")
    Traceback (most recent call last):
    ...
    numag.errors.LimitError: a second test needs 8 paths, 16 in all with the 8 tracked before: over the limit of 10 (--max-paths)
    """
    token = _LIMITS.set([limits, 0])
    try:
        yield limits
    finally:
        _LIMITS.reset(token)


def _active():
    state = _LIMITS.get()
    return [WorkLimits(), 0] if state is None else state  # outside a block: each request alone


def charge_paths(count, what):
    """Count ``count`` paths against the run's ``max_paths`` before they are tracked; refuse beyond it.

    Raises
    ------
    LimitError
        Naming the estimate, the total and the option that raises the limit.
    """
    state = _active()
    total = state[1] + int(count)
    if total > state[0].max_paths:
        before = f", {total:,} in all with the {state[1]:,} tracked before" if state[1] else ""
        raise LimitError(f"{what} needs {int(count):,} paths{before}: over the limit of {state[0].max_paths:,} "
                         "(--max-paths)", "max_paths", state[0].max_paths)
    state[1] = total


def check_memory(size, what):
    """Refuse an allocation of about ``size`` bytes beyond the run's ``max_memory``.

    Raises
    ------
    LimitError
        Naming the estimate in GiB and the option that raises the limit.
    """
    limit = _active()[0].max_memory
    if size > limit:
        raise LimitError(f"{what} would need about {size / 1024 ** 3:.3g} GiB, over the limit of "
                         f"{limit / 1024 ** 3:.3g} GiB (--max-memory)", "max_memory", limit)

# The executor of the stages that track paths deep inside (witness sets, decomposition, singular
# locus): set once around a run with ``using``, read where batches of paths are tracked.
_CURRENT = contextvars.ContextVar("numag_executor", default=None)


@contextmanager
def using(executor):
    """Make ``executor`` run the batches of every stage inside the ``with`` block.

    Examples
    --------
    >>> with InProcess() as executor, using(executor):
    ...     current_executor() is executor
    True
    >>> current_executor() is None
    True
    """
    token = _CURRENT.set(executor)
    try:
        yield executor
    finally:
        _CURRENT.reset(token)


def current_executor():
    """The executor set by :func:`using`, or None (then stages run their batches in-process)."""
    return _CURRENT.get()


def ambient_executor(batches):
    """The executor of :func:`using` for a run of ``batches`` batches, or None to run them here.

    The one rule by which every stage reaches an executor: a run of one batch stays in this process
    (sending it to a worker costs a transfer and gains nothing), a longer one goes to the ambient
    executor, if any.

    Examples
    --------
    >>> with InProcess() as executor, using(executor):
    ...     ambient_executor(3) is executor, ambient_executor(1)
    (True, None)
    """
    return current_executor() if batches > 1 else None


@dataclass
class BatchFailure:
    """A batch that failed twice: its index and the last error (type and message)."""

    index: int
    error: str
    attempts: int


def default_workers():
    """Cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not on Linux
        return max(1, os.cpu_count() or 1)


_POOLS = weakref.WeakSet()  # live local pools, so that a terminating parent can stop their workers


def _die_with_parent(parent):
    """Run in each worker as it starts: the worker ends when the process that started it ends.

    On Linux the kernel sends SIGKILL to the worker when its parent dies (prctl PR_SET_PDEATHSIG,
    which holds even for SIGKILL of the parent); everywhere a daemon thread also checks once a
    second that the parent is still the same process and ends the worker when it is not.
    """
    import ctypes  # only workers need it: not imported at the start of every process
    signal.signal(signal.SIGTERM, signal.SIG_DFL)  # the parent's handler is not the worker's
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C is the parent's to handle
    try:
        # the process's loaded symbols include the C library's (find_library would run ldconfig per worker)
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGKILL, 0, 0, 0)  # 1 = PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        pass
    if os.getppid() != parent:  # the parent died before the request took effect
        os._exit(1)

    def watch():
        while True:
            time.sleep(1.0)
            if os.getppid() != parent:
                os._exit(1)

    threading.Thread(target=watch, daemon=True, name="numag-parent-watch").start()


def abort_workers():
    """Stop the workers of every live local pool at once (the command line calls this on SIGTERM)."""
    for pool in list(_POOLS):
        pool.abort()


def _pinned(function, batch):
    """Run one batch with BLAS on one thread (small batched products are faster so; see DESIGN)."""
    from threadpoolctl import threadpool_limits
    with threadpool_limits(limits=1):
        return function(batch)


class Executor:
    """Base class: ``run(function, batches)`` yields (index, result) as batches finish.

    Attributes
    ----------
    name : str
    workers : int
    retries : int
        Batches run again after a failure.
    failures : list of BatchFailure
        Batches of the latest ``run`` that failed twice (their results are missing).
    """

    name = "executor"

    def __init__(self, workers=1):
        self.workers = int(workers)
        self.retries = 0
        self.failures = []

    def run(self, function, batches, attempts=2):
        """Yield ``(index, function(batches[index]))`` for every batch that succeeds, in completion order."""
        raise NotImplementedError

    def close(self):
        """Release workers (a no-op for in-process execution)."""

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
        return False

    def describe(self):
        """A plain summary for reports."""
        return {"executor": self.name, "workers": self.workers, "retries": self.retries,
                "failed_batches": [{"index": f.index, "error": f.error, "attempts": f.attempts}
                                   for f in self.failures]}


class InProcess(Executor):
    """Batches one after another in this process."""

    name = "in-process"

    def run(self, function, batches, attempts=2):
        self.failures = []
        for index, batch in enumerate(batches):
            for attempt in range(1, attempts + 1):
                try:
                    result = _pinned(function, batch)
                except Exception as err:  # noqa: BLE001 - a failing batch is retried, then reported
                    if attempt == attempts:
                        self.failures.append(BatchFailure(index, f"{type(err).__name__}: {err}", attempt))
                    else:
                        self.retries += 1
                    continue
                yield index, result
                break


class LocalPool(Executor):
    """A pool of ``workers`` processes on this machine (fork where available: workers start fast)."""

    name = "process pool"

    def __init__(self, workers=None):
        # multiprocessing and concurrent.futures are imported here, where a pool is made, not at start-up
        # (about 10 ms of every `numag` process that runs in-process; decision 0067)
        import multiprocessing
        super().__init__(workers or default_workers())
        methods = multiprocessing.get_all_start_methods()
        self._context = multiprocessing.get_context("fork" if "fork" in methods else "spawn")
        self._pool = None

    def _fresh_pool(self):
        from concurrent.futures import ProcessPoolExecutor
        if self._pool is not None:
            self._pool.shutdown(wait=False, cancel_futures=True)
        self._pool = ProcessPoolExecutor(max_workers=self.workers, mp_context=self._context,
                                         initializer=_die_with_parent, initargs=(os.getpid(),))
        _POOLS.add(self)
        return self._pool

    def abort(self):
        """Kill the workers now (the pool is then broken; :meth:`close` returns at once)."""
        pool = self._pool
        if pool is None:
            return
        for process in list((getattr(pool, "_processes", None) or {}).values()):
            try:
                process.kill()
            except (OSError, ValueError, AttributeError):
                pass

    def run(self, function, batches, attempts=2):
        from concurrent.futures import FIRST_COMPLETED, wait
        from concurrent.futures.process import BrokenProcessPool
        self.failures = []
        pool = self._pool or self._fresh_pool()
        tries = {index: 0 for index in range(len(batches))}
        waiting = list(range(len(batches)))[::-1]
        running = {}
        while waiting or running:
            # keep a few batches per worker in flight, not all: results are written as they come
            while waiting and len(running) < 2 * self.workers:
                index = waiting.pop()
                tries[index] += 1
                running[pool.submit(_pinned, function, batches[index])] = index
            done, _ = wait(running, return_when=FIRST_COMPLETED)
            broken = False
            for future in done:
                index = running.pop(future)
                try:
                    result = future.result()
                except BrokenProcessPool as err:
                    broken = True
                    self._retry_or_fail(index, tries, attempts, waiting, f"worker died: {err}")
                    continue
                except Exception as err:  # noqa: BLE001 - retried, then reported
                    self._retry_or_fail(index, tries, attempts, waiting, f"{type(err).__name__}: {err}")
                    continue
                yield index, result
            if broken:  # every batch still running on the broken pool must go again
                for future, index in list(running.items()):
                    self._retry_or_fail(index, tries, attempts, waiting, "worker pool broke")
                running.clear()
                pool = self._fresh_pool()

    def _retry_or_fail(self, index, tries, attempts, waiting, error):
        if tries[index] >= attempts:
            self.failures.append(BatchFailure(index, error, tries[index]))
        else:
            self.retries += 1
            waiting.append(index)

    def close(self):
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None


class DaskCluster(Executor):
    """Batches on a Dask cluster: a scheduler at ``address``, or a local cluster started here.

    Parameters
    ----------
    address : str, optional
        Scheduler address (``tcp://host:8786``). Without it a local cluster of ``workers``
        single-threaded worker processes is started and shut down on :meth:`close`.
    workers : int, optional
    """

    name = "dask"

    def __init__(self, address=None, workers=None):
        try:
            from dask.distributed import Client, LocalCluster
        except ImportError:
            raise InputError("the Dask executor needs the optional extra: pip install 'numag[cluster]'") from None
        self._cluster = None
        if address is None:
            self._cluster = LocalCluster(n_workers=workers or default_workers(), threads_per_worker=1,
                                         processes=True, dashboard_address=None)
            self._client = Client(self._cluster)
        else:
            try:
                self._client = Client(address, timeout="20s")
            except OSError as err:
                raise InputError(f"cannot reach the Dask scheduler at {address}: {err}") from None
        super().__init__(workers or len(self._client.scheduler_info().get("workers", {})) or 1)
        self.address = address or self._cluster.scheduler_address

    def run(self, function, batches, attempts=2):
        from dask.distributed import as_completed
        self.failures = []
        tries = {}
        futures = {}
        # the function (a tracker holding the homotopy) goes to every worker once, not with every batch
        shared = self._client.scatter(function, broadcast=True)
        for index, batch in enumerate(batches):
            tries[index] = 1
            futures[self._client.submit(_pinned, shared, batch, pure=False)] = index
        pending = as_completed(list(futures))
        for future in pending:
            index = futures.pop(future)
            try:
                result = future.result()
            except Exception as err:  # noqa: BLE001 - retried, then reported
                if tries[index] >= attempts:
                    self.failures.append(BatchFailure(index, f"{type(err).__name__}: {err}", tries[index]))
                else:
                    self.retries += 1
                    tries[index] += 1
                    again = self._client.submit(_pinned, shared, batches[index], pure=False)
                    futures[again] = index
                    pending.add(again)
                continue
            yield index, result

    def close(self):
        self._client.close()
        if self._cluster is not None:
            self._cluster.close()

    def describe(self):
        data = super().describe()
        data["scheduler"] = self.address
        return data


def make_executor(workers=None, scheduler=None, local_dask=False, batches=1):
    """The executor a run asks for.

    Parameters
    ----------
    workers : int, optional
        Worker processes; default: every core when there is more than one batch, else in-process.
    scheduler : str, optional
        Address of a Dask scheduler.
    local_dask : bool
        Start a local Dask cluster (testing, or Dask's tools on one machine).
    batches : int
        Number of batches of the run (decides the default).

    Returns
    -------
    Executor
    """
    if workers is not None and workers < 1:
        raise InputError(f"workers must be at least 1, got {workers}")
    if scheduler is not None or local_dask:
        return DaskCluster(scheduler, workers)
    if workers is None:
        workers = default_workers() if batches > 1 else 1
    if workers == 1:
        return InProcess()
    return LocalPool(workers)
