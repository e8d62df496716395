"""Run an exact reference computation (sympy) in a child process with a time limit (benchmarks only)."""

import multiprocessing


def run_with_time_limit(target, args, seconds):
    """``target(*args, queue)`` in a child process; what it put on the queue, or None on time-out."""
    queue = multiprocessing.Queue()
    process = multiprocessing.Process(target=target, args=tuple(args) + (queue,))
    process.start()
    process.join(seconds)
    if process.is_alive():
        process.terminate()
        process.join()
        return None
    return queue.get() if not queue.empty() else None
