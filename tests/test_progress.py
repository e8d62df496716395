"""The progress reporter: one protocol (stages and counts), quiet when asked, never silent for long."""

import functools
import io
import time

import pytest

from numag.app.cli import main
from numag.app.progress import Reporter

NODAL = 'variables = ["x", "y"]\nequations = ["y^2 - x^2*(x + 1)"]\n'


def reporter(**options):
    stream = io.StringIO()
    return Reporter(stream=stream, terminal=False, **options), stream


def test_quiet_prints_nothing():
    progress, stream = reporter(quiet=True, grace=0.0, heartbeat=0.0)
    progress("decomposing X")
    progress("paths", done=5, total=10)
    progress("paths", done=10, total=10)
    progress.beat()
    assert stream.getvalue() == ""


def test_a_stage_within_the_grace_period_is_printed_when_it_ends():
    progress, stream = reporter(grace=60.0)
    progress("decomposing X")
    progress.beat()
    assert stream.getvalue() == ""  # a short run stays quiet
    progress.started -= 61.0        # the run has now lasted past the grace period
    progress.beat()
    assert stream.getvalue().startswith("numag: decomposing X")


def test_a_long_silence_gets_a_line_saying_what_the_run_is_doing():
    progress, stream = reporter(grace=0.0, heartbeat=5.0)
    progress("codimension 2: judging 3 candidate sets")
    progress.beat()
    assert stream.getvalue().count("\n") == 1  # nothing new to say yet
    progress.last_output -= 6.0
    progress.beat()
    assert stream.getvalue().splitlines()[-1].startswith("numag: still working: codimension 2: judging 3")
    progress("paths", done=0, total=8)
    progress("paths", done=8, total=8)
    progress.last_output -= 6.0
    progress.beat()
    assert "8/8 paths tracked; working on their endpoints" in stream.getvalue().splitlines()[-1]


def test_counts_are_lines_in_logs_and_a_bar_on_a_terminal():
    progress, stream = reporter(grace=0.0, count_interval=0.0)
    progress("paths", done=0, total=4)
    progress("paths", done=2, total=4)
    assert "2/4 paths (50%)" in stream.getvalue()
    pytest.importorskip("tqdm")
    terminal = io.StringIO()
    with Reporter(stream=terminal, terminal=True, grace=0.0) as bar:
        bar("tracking")
        bar("paths", done=0, total=4)
        bar("paths", done=3, total=4)
        assert bar.bar is not None and bar.bar.n == 3 and bar.bar.total == 4
    assert "3/4" in terminal.getvalue()


@pytest.mark.parametrize("switch, silent", [(None, False), ("--quiet", True), ("--json", True)])
def test_the_command_line_reports_its_stages_unless_quiet(tmp_path, monkeypatch, capsys, switch, silent):
    monkeypatch.setattr("numag.app.commands.common.Reporter", functools.partial(Reporter, grace=0.0))
    system = tmp_path / "nodal.toml"
    system.write_text(NODAL)
    argv = ["check", str(system), "--point", "x=0,y=0", "--seed", "1"] + ([switch] if switch else [])
    assert main(argv, out=io.StringIO()) == 0
    err = capsys.readouterr().err
    assert (err == "") if silent else ("numag: judging 1 point by the Jacobian criterion" in err)


def test_the_heartbeat_thread_stops_with_the_run():
    progress, _ = reporter()
    with progress:
        thread = progress._thread
        assert thread.is_alive()
    time.sleep(0.01)
    assert not thread.is_alive()
