"""Run an exact reference computation (sympy) in a child process with a time limit (benchmarks only)."""

import multiprocessing
import os
import time


def _cpu_seconds(pid):
    """CPU seconds (user + system) a live process has used so far (Linux /proc; None elsewhere)."""
    try:
        with open(f"/proc/{pid}/stat") as stat:
            fields = stat.read().rsplit(")", 1)[1].split()
        return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")
    except (OSError, IndexError, ValueError):
        return None


def run_with_time_limit(target, args, seconds, stopped_cpu=None, cpu_limit=None):
    """``target(*args, queue)`` in a child process; what it put on the queue, or None on time-out.

    On a time-out the CPU seconds the child had used are appended to the list ``stopped_cpu`` when one is
    given: on a loaded machine a wall-time limit says little, the CPU spent before the stop is a lower bound.
    ``cpu_limit`` also stops the child once it has used that many CPU seconds (polled every second), so that
    a bound such as "sympy needs more than 800 CPU s" does not depend on the machine's load; ``seconds``
    stays the wall-time cap.
    """
    queue = multiprocessing.Queue()
    process = multiprocessing.Process(target=target, args=tuple(args) + (queue,))
    process.start()
    if cpu_limit is None:
        process.join(seconds)
    else:
        deadline = time.monotonic() + seconds
        while process.is_alive() and time.monotonic() < deadline:
            process.join(min(1.0, max(0.0, deadline - time.monotonic())))
            used = _cpu_seconds(process.pid) if process.is_alive() else None
            if used is not None and used >= cpu_limit:
                break
    if process.is_alive():
        if stopped_cpu is not None:
            stopped_cpu.append(_cpu_seconds(process.pid))
        process.terminate()
        process.join()
        return None
    return queue.get() if not queue.empty() else None
