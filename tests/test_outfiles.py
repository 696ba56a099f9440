"""Output files are written whole or not at all (behaviour users rely on; no external source).

Every output file goes through :mod:`compromise.outfiles`: a uniquely named temporary file in
the target folder, renamed into place. A writer killed mid-write leaves the old file or the new
one, never a partial file; two processes writing the same file leave one complete version; a bad
output path is refused before any work, with one line naming the option.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from compromise.errors import CaseError
from compromise.outfiles import (
    atomic_output,
    check_output_file,
    check_output_folder,
    write_bytes,
    write_text,
)

WRITER = """
import sys
from compromise.outfiles import atomic_output
path, tag, n = sys.argv[1], sys.argv[2].encode(), int(sys.argv[3])
for i in range(n):
    with atomic_output(path, binary=True) as fh:
        for _ in range(200):
            fh.write(tag * 5000)
"""


def _complete(data: bytes) -> bool:
    return len(data) == 1_000_000 and len(set(data)) == 1


def test_write_text_and_bytes_replace_the_file(tmp_path: Path) -> None:
    target = tmp_path / "out.csv"
    write_text(target, "old\n")
    write_text(target, "new\n")
    assert target.read_text() == "new\n"
    write_bytes(tmp_path / "fig.png", b"\x89PNG")
    assert (tmp_path / "fig.png").read_bytes() == b"\x89PNG"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["fig.png", "out.csv"]


def test_failure_inside_the_writer_keeps_the_old_file(tmp_path: Path) -> None:
    target = tmp_path / "table.csv"
    target.write_text("old\n")
    with pytest.raises(RuntimeError, match="boom"), atomic_output(target) as fh:
        fh.write("half")
        raise RuntimeError("boom")
    assert target.read_text() == "old\n"
    assert [p.name for p in tmp_path.iterdir()] == ["table.csv"]


def test_killed_writer_leaves_old_or_new_never_partial(tmp_path: Path) -> None:
    target = tmp_path / "big.bin"
    target.write_bytes(b"o" * 1_000_000)
    for delay in (0.05, 0.15, 0.3):
        proc = subprocess.Popen([sys.executable, "-c", WRITER, str(target), "n", "1000"])
        time.sleep(delay)
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        assert _complete(target.read_bytes())


def test_concurrent_writers_leave_one_complete_file(tmp_path: Path) -> None:
    target = tmp_path / "shared.bin"
    procs = [
        subprocess.Popen([sys.executable, "-c", WRITER, str(target), tag, "15"])
        for tag in ("a", "b")
    ]
    for p in procs:
        assert p.wait(timeout=120) == 0
    data = target.read_bytes()
    assert _complete(data) and data[:1] in (b"a", b"b")
    assert [p.name for p in tmp_path.iterdir()] == ["shared.bin"]


def test_output_folder_checks_name_the_option(tmp_path: Path) -> None:
    a_file = tmp_path / "file.txt"
    a_file.write_text("x")
    with pytest.raises(CaseError, match=r"is a file; expected a folder"):
        check_output_folder(a_file, key="-o")
    with pytest.raises(CaseError, match=r"lies under .*file\.txt, which is a file"):
        check_output_folder(a_file / "sub", key="--csv")
    assert check_output_folder(tmp_path / "new" / "deeper").is_dir()


@pytest.mark.skipif(os.geteuid() == 0, reason="root may write anywhere")
def test_unwritable_folder_is_refused(tmp_path: Path) -> None:
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        with pytest.raises(CaseError, match="not writable"):
            check_output_folder(locked)
    finally:
        locked.chmod(0o700)


def test_existing_output_file_needs_force(tmp_path: Path) -> None:
    target = tmp_path / "report.html"
    target.write_text("keep me")
    with pytest.raises(CaseError, match="exists; use --force"):
        check_output_file(target)
    assert check_output_file(target, force=True) == target
    with pytest.raises(CaseError, match="is a folder"):
        check_output_file(tmp_path)
    assert target.read_text() == "keep me"
