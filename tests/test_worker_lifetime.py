"""A killed command leaves no PDF worker and, on the next run, no temporary file behind.

Real processes and real ``kill -9`` here: the subprocess is the point.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from conftest import SAMPLES

BIFILAR = SAMPLES / "hl-0412-bifilar-aiding.yaml"
LINUX = sys.platform.startswith("linux")


def _children(pid: int) -> list[int]:
    out = []
    for d in Path("/proc").iterdir():
        if d.name.isdigit():
            try:
                fields = (d / "stat").read_text().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid:
                out.append(int(d.name))
    return out


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state not in ("Z", "X")  # a zombie has ended; only its exit status is left


def _wait(predicate, timeout: float) -> bool:
    end = time.monotonic() + timeout
    while time.monotonic() < end:
        if predicate():
            return True
        time.sleep(0.05)
    return predicate()


@pytest.mark.skipif(not LINUX or (os.cpu_count() or 1) < 2, reason="the worker is forked on Linux with 2+ cores")
@pytest.mark.parametrize("after_s", [0.3, 1.5])
def test_a_killed_traveller_leaves_no_pdf_worker(tmp_path, after_s):
    env = {**os.environ, "WINDSHEET_PDF_WORKER": "1", "WINDSHEET_REGISTER": str(tmp_path / "reg.db")}
    proc = subprocess.Popen([sys.executable, "-c", "import sys; from windsheet.cli.launch import main; "
                             "sys.argv[0] = 'windsheet'; sys.exit(main())",
                             "traveller", str(BIFILAR), "-o", str(tmp_path / "t.pdf")],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env, cwd=tmp_path)
    try:
        assert _wait(lambda: _children(proc.pid), 10), "the PDF worker was never forked"
        workers = _children(proc.pid)
        time.sleep(after_s)  # 0.3 s: while WeasyPrint loads; 1.5 s: while the command sizes or renders
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=10)
        # The bar: no worker alive 5 s after its parent is killed.
        assert _wait(lambda: not any(_alive(w) for w in workers), 5), [w for w in workers if _alive(w)]
        # And the caller's pipes are let go: reading them reaches their end.
        out = proc.stdout.read()
        assert isinstance(out, bytes)
    finally:
        _reap(proc, locals().get("workers", []))
        proc.stdout.close()
        proc.stderr.close()


def test_the_worker_closes_the_parents_end_of_its_pipe():
    from windsheet.sheets.pdf_worker import PdfWorker

    if not hasattr(os, "fork"):
        pytest.skip("fork only")
    worker = PdfWorker()
    try:
        pid = worker._proc.pid
        parent_fd = worker._conn.fileno()
        # The pipe's inode as the parent sees its own end; the child must hold no descriptor to it.
        mine = os.readlink(f"/proc/self/fd/{parent_fd}")

        def child_holds_it():
            try:
                return any(os.readlink(f"/proc/{pid}/fd/{fd}") == mine for fd in os.listdir(f"/proc/{pid}/fd"))
            except OSError:
                return False
        time.sleep(0.3)
        assert not child_holds_it()
        assert worker("<html><body><p>one line</p></body></html>").startswith(b"%PDF")
    finally:
        worker.close()


def test_a_killed_writers_temp_file_is_cleaned_by_the_next_run(tmp_path):
    out = tmp_path / "sheets"
    out.mkdir()
    # A real writer killed with -9 between staging its file and the rename.
    code = ("import os, sys; from windsheet.common.fileio import stage_file; "
            "stage_file(sys.argv[1], b'%PDF half a sheet' * 2000); os.kill(os.getpid(), 9)")
    for name in ("a.pdf", "b.pdf"):
        res = subprocess.run([sys.executable, "-c", code, str(out / name)], capture_output=True)
        assert res.returncode == -signal.SIGKILL
    stale = sorted(p for p in out.iterdir() if p.name.endswith(".tmp"))
    assert [p.name.split(".")[1] for p in stale] == ["a", "b"] and all(p.stat().st_size == 34000 for p in stale)
    # Not ours, and ours but fresh from a live process: both stay.
    foreign = out / ".notes.tmp"
    foreign.write_text("someone else's")
    from windsheet.common.fileio import _temp_prefix, atomic_write_bytes

    live = out / (_temp_prefix("c.pdf") + "abcd1234.tmp")
    live.write_bytes(b"being written")
    old = time.time() - 60
    for p in stale:
        os.utime(p, (old, old))
    atomic_write_bytes(out / "other.pdf", b"%PDF-1.7")
    left = sorted(p.name for p in out.iterdir())
    assert left == sorted([".notes.tmp", live.name, "other.pdf"]), left


def test_a_temp_file_of_another_host_goes_only_when_a_day_old(tmp_path):
    from windsheet.common.fileio import STALE_TEMP_AGE_S, clean_stale_temps

    other = tmp_path / ".t.pdf.otherhost-123.abcd1234.tmp"
    other.write_bytes(b"x")
    assert clean_stale_temps(tmp_path) == [] and other.exists()
    old = time.time() - STALE_TEMP_AGE_S - 60
    os.utime(other, (old, old))
    assert clean_stale_temps(tmp_path) == [other] and not other.exists()


@pytest.mark.skipif(not LINUX or (os.cpu_count() or 1) < 2, reason="the batch forks its workers on 2+ cores")
def test_a_killed_batch_leaves_no_worker_process(tmp_path):
    orders = sorted(p for p in SAMPLES.glob("hl-*.yaml"))
    env = {**os.environ, "WINDSHEET_REGISTER": str(tmp_path / "reg.db")}
    proc = subprocess.Popen([sys.executable, "-m", "windsheet.cli", "traveller", *map(str, orders),
                             "-o", str(tmp_path / "out"), "--html", "--jobs", "2"],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, cwd=tmp_path)
    try:
        assert _wait(lambda: len(_children(proc.pid)) >= 2, 20), "the batch's workers were never started"
        workers = _children(proc.pid)
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=10)
        assert _wait(lambda: not any(_alive(w) for w in workers), 5), [w for w in workers if _alive(w)]
    finally:
        _reap(proc, locals().get("workers", []))


def _reap(proc, workers):
    """Leave nothing running whatever the test found: the workers it saw (orphans by now) too."""
    for w in set(workers) | set(_children(proc.pid)):
        try:
            ours = b"windsheet" in Path(f"/proc/{w}/cmdline").read_bytes()
        except OSError:
            continue
        if ours and _alive(w):
            try:
                os.kill(w, signal.SIGKILL)
            except OSError:
                pass
