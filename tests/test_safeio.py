"""Safe file access: bounded reads, strict JSON, writes that respect links, modes and special files."""

import os
import stat

import pytest

from numag.errors import SystemFileError
from numag.app.report import read_report, write_report
from numag.system.safeio import loads_json, read_limited, sweep_temporary_files, write_file


@pytest.mark.parametrize("device", ["/dev/zero", "/dev/urandom"])
def test_devices_are_refused_without_reading_them(device):
    if not os.path.exists(device):
        pytest.skip(f"no {device}")
    with pytest.raises(SystemFileError, match="is a device"):
        read_limited(device, 1000, "system file")


def test_reads_stop_at_the_limit_also_for_pipes(tmp_path):
    big = tmp_path / "big.json"
    big.write_bytes(b" " * 101)
    with pytest.raises(SystemFileError, match="larger than the 100-byte limit"):
        read_limited(big, 100, "report")
    read, write = os.pipe()
    os.write(write, b"x" * 200)
    os.close(write)
    with pytest.raises(SystemFileError, match="larger than"):
        read_limited(f"/proc/self/fd/{read}", 100, "points file")
    os.close(read)


@pytest.mark.parametrize("text, fragment", [
    ('{"a": 1, "a": 2}', "appears twice"),
    ('[NaN]', "not a JSON number"),
    ('[Infinity]', "not a JSON number"),
    ("[" * 100000 + "]" * 100000, "nested too deeply"),
    ('{"a": ', "not valid JSON \\(line 1"),
    (b"\xff\xfe", "not UTF-8"),
])
def test_strict_json(text, fragment):
    with pytest.raises(SystemFileError, match=fragment):
        loads_json(text.encode() if isinstance(text, str) else text, "x.json")


def test_write_keeps_the_mode_and_follows_links(tmp_path):
    target = tmp_path / "report.json"
    write_report(target, {"a": 1})
    os.chmod(target, 0o644)
    link = tmp_path / "link.json"
    link.symlink_to(target)
    write_report(link, {"a": 2})
    assert link.is_symlink() and read_report(link) == {"a": 2} and read_report(target) == {"a": 2}
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o644
    os.chmod(target, 0o640)
    write_report(target, {"a": 3})
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640
    assert sorted(p.name for p in tmp_path.iterdir()) == ["link.json", "report.json"]


def test_special_files_are_written_through_not_replaced(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    reader = os.open(fifo, os.O_RDONLY | os.O_NONBLOCK)
    write_file(fifo, b"hello")
    assert os.read(reader, 100) == b"hello" and stat.S_ISFIFO(os.stat(fifo).st_mode)
    os.close(reader)
    write_file("/dev/null", b"nothing")
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)
    with pytest.raises(SystemFileError, match="is a directory"):
        write_file(tmp_path, b"x")


def test_temporary_files_of_dead_processes_are_swept(tmp_path):
    dead = tmp_path / ".numag-999999999-abc.tmp"  # beyond any pid the kernel hands out
    alive = tmp_path / f".numag-{os.getppid()}-abc.tmp"
    dead.write_bytes(b"debris")
    alive.write_bytes(b"in use")
    write_file(tmp_path / "out.json", b"{}")
    assert not dead.exists() and alive.exists()
    assert sweep_temporary_files(tmp_path) == 0
