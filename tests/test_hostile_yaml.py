"""Hostile YAML is refused quickly, in one line.

Most cases run the command in process (typer's runner) under a 60 s alarm, so a
hang fails the test instead of sticking the suite. The cases whose failure would
take the test worker down with it run in a real ``windsheet`` process with a
timeout (:data:`OWN_PROCESS`): if a limit regressed, a billion laughs or a deep
nesting would exhaust the worker's memory or C stack, and reading ``/dev/zero``
would never end. No wall time is asserted.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from types import SimpleNamespace

import pytest
from typer.testing import CliRunner

from conftest import SAMPLES

SINGLE = (SAMPLES / "hl-0410-single.yaml").read_text(encoding="utf-8")

BILLION_LAUGHS = "\n".join(
    ["a0: &a0 [lol, lol, lol, lol, lol, lol, lol, lol, lol, lol]"]
    + [f"a{k}: &a{k} [{', '.join([f'*a{k - 1}'] * 10)}]" for k in range(1, 10)]
) + "\n"

# Each case: file bytes and words the one-line refusal must contain.
HOSTILE = {
    "billion-laughs": (BILLION_LAUGHS.encode(), "aliases"),
    "alias-in-order": (SINGLE.replace("wire: {size: 0.50 mm, grade: 2}",
                                      "wire: &w {size: 0.50 mm, grade: 2}\nx: *w").encode(), "aliases"),
    "deep-flow-nesting": (b"job: " + b"[" * 50_000 + b"]" * 50_000 + b"\n", "nested"),
    "deep-block-nesting": ("".join(f"{'  ' * k}k{k}:\n" for k in range(200)).encode() + b"  " * 200 + b"x: 1\n",
                           "nested"),
    "multi-megabyte": ((SINGLE + "# padding\n" * 400_000).encode(), "larger than"),
    "long-scalar": (SINGLE.replace('"Pickup loop, 40 t on 50 mm"', '"' + "x" * 300_000 + '"').encode(),
                    "larger than"),
    "binary-junk": (bytes(range(256)) * 64, "UTF-8"),
    "nul-bytes": (SINGLE.encode() + b"\x00\x00\x00", "NUL"),
    "invalid-utf8": (SINGLE.encode().replace(b"PTFE", b"PT\xff\xfeE"), "UTF-8"),
    "python-object-apply": (b"job: !!python/object/apply:os.system ['echo pwned > /tmp/ws-pwned']\n",
                            "job: the YAML tag !!python/object/apply:os.system is not accepted"),
    "python-name": (b"job: !!python/name:os.system\n", "job: the YAML tag !!python/name:os.system is not accepted"),
    "python-object-new": (b"job: !!python/object/new:subprocess.Popen [['true']]\n",
                          "job: the YAML tag !!python/object/new:subprocess.Popen is not accepted"),
    # A set's order follows the hash seed while the order's hash stays the same: serials would move.
    "set-serials": (SINGLE.replace("quantity: 2", "quantity: 2\n  units: !!set {HL-0410-01, HL-0410-02}").encode(),
                    "job.units: the YAML tag !!set is not accepted; write the plain list or mapping"),
    "binary-scalar": (SINGLE.replace("revision: A", "revision: !!binary QQ==").encode(),
                      "job.revision: the YAML tag !!binary is not accepted"),
    "local-tag": (SINGLE.replace("hookup: single", "hookup: !mine single").encode(),
                  "hookup: the YAML tag !mine is not accepted"),
    "just-a-scalar": (b"42\n", "mapping"),
    "just-a-string": (b"HL-0412 please wind 60 turns\n", "mapping"),
    "empty-file": (b"", "the file is empty"),
    "a-list": (b"- job\n- form\n", "mapping"),
    "two-documents": ((SINGLE + "\n---\n" + SINGLE).encode(), "not valid YAML"),
    "unhashable-key": (b"? [a, b]\n: 1\n", "YAML"),
    "tab-indent": (SINGLE.replace("  number:", "\tnumber:").encode(), "not valid YAML"),
    "repeated-section": ((SINGLE + "duty: {voltage: 400 V}\n").encode(), "twice"),
    "anchor-without-alias": (SINGLE.replace("wire: {size", "wire: &w {size").encode(), "anchors"),
    "merge-key": (SINGLE.replace("wire: {size: 0.50 mm, grade: 2}", "wire: {<<: {grade: 2}, size: 0.50 mm}").encode(),
                  "merge keys (<<) are not accepted"),
    "octal-turns": (SINGLE.replace("turns: 40,", "turns: 040,").encode(), "winding.turns: 040 has a leading zero"),
    "power-tower": (SINGLE.replace("diameter: 50 mm", 'diameter: "9**9**9 mm"').encode(), "arithmetic is not read"),
}


# The cases that get a process of their own (see the module's docstring).
OWN_PROCESS = {"billion-laughs", "deep-flow-nesting", "deep-block-nesting"}


def _run_process(tmp_path, *args, timeout=60):
    return subprocess.run([sys.executable, "-m", "windsheet.cli", *args], capture_output=True, text=True,
                          timeout=timeout, cwd=tmp_path)


def _expire(signum, frame):
    raise TimeoutError("no answer in 60 s: the command hangs")


def _run(tmp_path, *args, timeout=60):
    """The command in process, as the console script runs it (exit status, stdout, stderr)."""
    from windsheet.cli.app import app

    cwd = os.getcwd()
    old = signal.signal(signal.SIGALRM, _expire)
    signal.alarm(timeout)
    try:
        os.chdir(tmp_path)
        res = CliRunner().invoke(app, [str(a) for a in args])
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, old)
        os.chdir(cwd)
    return SimpleNamespace(returncode=res.exit_code, stdout=res.stdout, stderr=res.stderr)


def _assert_one_line_refusal(res, words):
    assert res.returncode == 2, (res.returncode, res.stdout[:500], res.stderr[:2000])
    assert res.stdout == ""
    lines = res.stderr.splitlines()
    assert len(lines) == 1, res.stderr[:2000]
    assert lines[0].startswith("windsheet: ") and "Traceback" not in res.stderr
    assert words in lines[0], lines[0]
    # One line a person can read, not the document echoed back.
    assert len(lines[0]) < 400, lines[0][:400]


@pytest.mark.parametrize("name", sorted(HOSTILE))
def test_hostile_order_is_refused(tmp_path, name):
    data, words = HOSTILE[name]
    f = tmp_path / "order.yaml"
    f.write_bytes(data)
    run = _run_process if name in OWN_PROCESS else _run
    res = run(tmp_path, "size", str(f), "--json")
    _assert_one_line_refusal(res, words)
    assert not (tmp_path / "ws-pwned").exists()


@pytest.mark.parametrize("name", ["billion-laughs", "deep-flow-nesting", "binary-junk", "python-object-apply",
                                  "just-a-scalar", "multi-megabyte"])
def test_hostile_measured_values_are_refused(tmp_path, name):
    data, words = HOSTILE[name]
    order = tmp_path / "order.yaml"
    order.write_text(SINGLE, encoding="utf-8")
    measured = tmp_path / "measured.yaml"
    measured.write_bytes(data)
    run = _run_process if name in OWN_PROCESS else _run
    res = run(tmp_path, "signoff", str(order), str(measured), "--inspector", "QC",
               "--register", str(tmp_path / "register.db"))
    expected = {"just-a-scalar": "expected a mapping"}.get(name, words)
    _assert_one_line_refusal(res, expected)
    # Refused before the register is touched.
    assert not (tmp_path / "register.db").exists()


def test_python_tag_never_runs(tmp_path):
    f = tmp_path / "order.yaml"
    marker = tmp_path / "ran"
    f.write_text(f"job: !!python/object/apply:os.system ['touch {marker}']\n" + SINGLE.split("\n", 1)[1])
    res = _run(tmp_path, "size", str(f))
    assert res.returncode == 2
    assert not marker.exists()


@pytest.mark.parametrize("transform", [
    lambda t: "\ufeff" + t,                 # a byte-order mark from a Windows editor
    lambda t: t.replace("\n", "\r\n"),      # CRLF line ends from e-mail
])
def test_harmless_encodings_still_size(tmp_path, transform):
    f = tmp_path / "order.yaml"
    f.write_bytes(transform(SINGLE).encode("utf-8"))
    res = _run(tmp_path, "size", str(f), "--json")
    assert res.returncode == 0, res.stderr
    assert '"turns_per_strand": 40' in res.stdout


# ---------------------------------------------------------------- files that are not regular files
def _runner(kind):
    # Reading /dev/zero to the end, if the regular-file check regressed, would fill the worker's memory.
    return _run_process if kind == "device" else _run


def _special(tmp_path, kind):
    """A path that is not a regular file: a FIFO nobody writes to, a device, a folder."""
    if kind == "fifo":
        path = tmp_path / "pipe.yaml"
        os.mkfifo(path)
        return str(path), "named pipe (FIFO)"
    if kind == "device":
        return "/dev/zero", "is a device"
    path = tmp_path / "folder.yaml"
    path.mkdir()
    return str(path), "is a folder"


@pytest.mark.parametrize("kind", ["fifo", "device", "folder"])
def test_order_that_is_not_a_regular_file(tmp_path, kind):
    # A blocking open of a FIFO, or reading /dev/zero to the end, shows as TimeoutExpired.
    path, words = _special(tmp_path, kind)
    res = _runner(kind)(tmp_path, "size", path, "--json")
    _assert_one_line_refusal(res, words)
    assert path in res.stderr


@pytest.mark.parametrize("kind", ["fifo", "device"])
def test_measured_file_that_is_not_a_regular_file(tmp_path, kind):
    order = tmp_path / "order.yaml"
    order.write_text(SINGLE, encoding="utf-8")
    path, words = _special(tmp_path, kind)
    res = _runner(kind)(tmp_path, "signoff", str(order), path, "--inspector", "QC", "--register", str(tmp_path / "r.db"))
    _assert_one_line_refusal(res, words)
    assert not (tmp_path / "r.db").exists()


@pytest.mark.parametrize("kind", ["fifo", "device", "folder"])
def test_catalog_that_is_not_a_regular_file(tmp_path, kind):
    path, words = _special(tmp_path, kind)
    order = tmp_path / "order.yaml"
    order.write_text(SINGLE.replace("wire: {size: 0.50 mm, grade: 2}", f"wire: {{size: X, catalog: '{path}'}}"),
                     encoding="utf-8")
    res = _runner(kind)(tmp_path, "size", str(order), "--json")
    _assert_one_line_refusal(res, words)


@pytest.mark.parametrize("kind", ["fifo", "device"])
@pytest.mark.parametrize("command", [["register"], ["register", "--issue", "ORDER"]])
def test_register_that_is_not_a_regular_file(tmp_path, kind, command):
    path, words = _special(tmp_path, kind)
    order = tmp_path / "order.yaml"
    order.write_text(SINGLE, encoding="utf-8")
    args = [str(order) if a == "ORDER" else a for a in command]
    res = _runner(kind)(tmp_path, *args, "--register", path)
    _assert_one_line_refusal(res, words)
