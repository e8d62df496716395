"""Run an exact reference computation (sympy) in a child process with a time limit (benchmarks only)."""

import multiprocessing
import os


def _cpu_seconds(pid):
    """CPU seconds (user + system) a live process has used so far (Linux /proc; None elsewhere)."""
    try:
        with open(f"/proc/{pid}/stat") as stat:
            fields = stat.read().rsplit(")", 1)[1].split()
        return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")
    except (OSError, IndexError, ValueError):
        return None


def run_with_time_limit(target, args, seconds, stopped_cpu=None):
    """``target(*args, queue)`` in a child process; what it put on the queue, or None on time-out.

    On a time-out the CPU seconds the child had used are appended to the list ``stopped_cpu`` when one is
    given: on a loaded machine a wall-time limit says little, the CPU spent before the stop is a lower bound.
    """
    queue = multiprocessing.Queue()
    process = multiprocessing.Process(target=target, args=tuple(args) + (queue,))
    process.start()
    process.join(seconds)
    if process.is_alive():
        if stopped_cpu is not None:
            stopped_cpu.append(_cpu_seconds(process.pid))
        process.terminate()
        process.join()
        return None
    return queue.get() if not queue.empty() else None
