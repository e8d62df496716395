"""Progress of a long run on standard error: one protocol for every sub-command, never silent.

The library reports in two forms: a stage (``progress("decomposing X")``) and a count of paths
(``progress(done, total)``). :class:`Reporter` takes both, so every sub-command hands the same
object to whatever it runs. On a terminal with tqdm installed (``pip install 'numag[progress]'``)
counts are a progress bar and stages are lines above it; elsewhere (logs, pipes) both are lines.
Runs shorter than ``grace`` seconds print nothing; after that, every stage is printed, and when
nothing has been printed for ``heartbeat`` seconds a line says what the run is still doing, so a
long stage never goes silent. ``quiet`` (``--json``, ``--quiet``) prints nothing at all.

Examples
--------
>>> import io
>>> stream = io.StringIO()
>>> with Reporter(stream=stream, grace=0.0) as progress:
...     progress("decomposing X")
>>> stream.getvalue()
'numag: decomposing X (0 s)\\n'
"""

import sys
import threading
import time

__all__ = ["Reporter"]


def _tqdm():
    try:
        from tqdm import tqdm
    except ImportError:  # optional: lines instead of a bar
        return None
    return tqdm


class Reporter:
    """Stages and path counts on a stream: a bar on a terminal (tqdm), lines in logs, a heartbeat in between.

    Parameters
    ----------
    quiet : bool
        Print nothing.
    stream : file, optional
        Default: standard error.
    terminal : bool, optional
        Draw a bar (when tqdm is installed); default: whether ``stream`` is a terminal.
    grace : float
        Seconds before anything is printed (short runs stay quiet).
    heartbeat : float
        Longest silence, in seconds, once the grace period is over.
    count_interval : float
        Shortest time between two count lines (logs).
    """

    def __init__(self, quiet=False, stream=None, terminal=None, grace=2.0, heartbeat=10.0, count_interval=1.0):
        self.quiet = quiet
        self.stream = stream if stream is not None else sys.stderr
        if terminal is None:
            terminal = bool(getattr(self.stream, "isatty", lambda: False)())
        self.bar_class = _tqdm() if terminal and not quiet else None
        self.bar = None
        self.grace, self.heartbeat, self.count_interval = grace, heartbeat, count_interval
        self.started = time.perf_counter()
        self.last_output = self.started  # when something was last printed (or the run started)
        self.stage_text, self.stage_shown, self.stage_started = None, True, 0.0
        self.done = self.total = None
        self.base = None  # paths already done at the first count (read back from a run folder)
        self.last = 0.0   # elapsed time of the last count line
        self.last_done = None
        self._lock = threading.RLock()
        self._stop = threading.Event()
        self._thread = None

    # -- the protocol --------------------------------------------------------------------------------
    def __call__(self, message, *, done=None, total=None):
        """A :class:`~numag.run.progress.Progress`: a count of paths when ``done`` and ``total`` are given,
        else a new stage named by ``message``."""
        if done is not None and total is not None:
            self.count(done, total)
        else:
            self.stage(message)

    def stage(self, message):
        """A new stage of the run begins."""
        if self.quiet:
            return
        with self._lock:
            self.stage_text, self.stage_shown, self.stage_started = message, False, self.elapsed()
            if self.elapsed() >= self.grace:
                self._show_stage()

    def count(self, done, total, unit="paths"):
        """``done`` of ``total`` paths (or other units) are finished."""
        if self.quiet or not total:
            return
        with self._lock:
            if self.base is None or (self.total is not None and total != self.total):
                # the first report of a homotopy only marks where this run starts (a resumed run)
                self.base, self.last_done = (done if done < total else 0), None
                self.total = total
                self.done = done
                if done < total and self.bar is None:
                    return
            self.total, self.done = total, done
            now = self.elapsed()
            if self.bar_class is not None:
                self._draw_bar(done, total, unit)
                return
            if now < self.grace or done == self.last_done or (now - self.last < self.count_interval and done < total):
                return
            self.last, self.last_done = now, done
            rate = (done - self.base) / now if now > 0 else 0.0
            left = (total - done) / rate if rate > 0 else float("inf")
            self._write(f"numag: {done}/{total} {unit} ({100 * done / total:.0f}%), {rate:.0f} {unit}/s, "
                        f"about {left:.0f} s left\n")

    # -- time, output and the heartbeat ---------------------------------------------------------------
    def elapsed(self):
        """Seconds since the run started."""
        return time.perf_counter() - self.started

    def _write(self, line):
        if self.bar is not None:
            self.bar.write(line.rstrip("\n"), file=self.stream)
        else:
            self.stream.write(line)
            self.stream.flush()
        self.last_output = time.perf_counter()

    def _show_stage(self):
        self.stage_shown = True
        if self.bar is not None:
            self.bar.set_description_str(self.stage_text[:40], refresh=False)
        self._write(f"numag: {self.stage_text} ({self.stage_started:.0f} s)\n")

    def _draw_bar(self, done, total, unit):
        if self.bar is None:
            self.bar = self.bar_class(total=total, unit=unit[:-1] if unit.endswith("s") else unit, file=self.stream,
                                      leave=False, dynamic_ncols=True, initial=done,
                                      desc=(self.stage_text or "tracking")[:40])
        elif self.bar.total != total:
            self.bar.reset(total=total)
        self.bar.n = done
        self.bar.refresh()
        self.last_output = time.perf_counter()

    def _doing(self):
        """What the run is doing now, for the heartbeat."""
        if self.total and self.done is not None and self.done >= self.total:
            return f"{self.done}/{self.total} paths tracked; working on their endpoints"
        if self.total and self.done is not None:
            return f"{self.done}/{self.total} paths"
        return self.stage_text or "working"

    def beat(self):
        """One look at the clock: print the pending stage, or a line when the run has been silent too long."""
        with self._lock:
            now = self.elapsed()
            if self.quiet or now < self.grace:
                return
            if not self.stage_shown:
                self._show_stage()
            elif time.perf_counter() - self.last_output >= self.heartbeat:
                if self.bar is not None:
                    self.bar.refresh()  # the bar's clock moves on
                self._write(f"numag: still working: {self._doing()} ({now:.0f} s)\n")

    def _run(self):
        while not self._stop.wait(0.25):
            self.beat()

    def __enter__(self):
        if not self.quiet:
            self._thread = threading.Thread(target=self._run, name="numag-progress", daemon=True)
            self._thread.start()
        return self

    def __exit__(self, *exc):
        self.close()
        return False

    def close(self):
        """Stop the heartbeat and remove the bar."""
        self._stop.set()
        if self._thread is not None:
            self._thread.join()
            self._thread = None
        with self._lock:
            if self.bar is not None:
                self.bar.close()
                self.bar = None
