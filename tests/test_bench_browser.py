"""The bench page end to end in headless Debian chromium, driven by Playwright.

One browser for the whole module; the server is ``windsheet bench`` itself, in a
subprocess on a free port.  Skipped only where chromium is not installed (the
Makefile's set-up installs it as root).
"""

from __future__ import annotations

import io
import re
import subprocess
import sys
from pathlib import Path

import pypdf
import pytest

from bench_helpers import issue_with_traveller
from windsheet.records.register import open_register

CHROMIUM = Path("/usr/bin/chromium")
playwright_sync = pytest.importorskip("playwright.sync_api")
pytestmark = pytest.mark.skipif(not CHROMIUM.exists(), reason="Debian's chromium is not installed")

# Quiet flags: this machine's network is closed, and chromium's background calls only fail.
_FLAGS = ["--disable-gpu", "--disable-background-networking", "--disable-component-update",
          "--disable-sync", "--no-first-run", "--disable-quic"]


class BenchServer:
    def __init__(self, register: Path):
        self.register = register
        self.proc = None
        self.url = None

    def start(self):
        self.proc = subprocess.Popen(
            [sys.executable, "-c", "from windsheet.cli.app import main; main()", "bench",
             "--register", str(self.register), "--port", "0"], stderr=subprocess.PIPE, text=True)
        line = ""
        while "open http" not in line:
            line = self.proc.stderr.readline()
            assert line, "windsheet bench exited before printing its address"
        self.url = re.search(r"open (\S+)", line).group(1).rstrip("/")
        return self

    def stop(self):
        if self.proc and self.proc.poll() is None:
            self.proc.terminate()
            self.proc.wait(timeout=10)


@pytest.fixture(scope="module")
def browser():
    with playwright_sync.sync_playwright() as pw:
        b = pw.chromium.launch(executable_path=str(CHROMIUM), headless=True, args=_FLAGS)
        yield b
        b.close()


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    s = BenchServer(issue_with_traveller(tmp_path_factory.mktemp("browser"))).start()
    yield s
    s.stop()


@pytest.fixture
def page(browser):
    context = browser.new_context(accept_downloads=True)
    p = context.new_page()
    p.set_default_timeout(15_000)
    yield p
    context.close()


def _cell(page, unit, row):
    return page.locator(f'[id="c-{unit}-{row}"]')


def test_enter_judge_sign_off_and_download(page, server, tmp_path):
    page.goto(server.url + "/")
    page.get_by_role("link", name="HL-0412").click()
    for serial in ("HL-0412-01", "HL-0412-02", "HL-0412-03", "HL-0412-04"):
        assert page.locator("th.serial", has_text=serial).count() == 1
    page.fill('input[name="r:job:ambient"]', "21.5 degC")
    page.fill('input[name="r:0:terminals.inductance"]', "398.1 uH")
    page.fill('input[name="r:0:terminals.resistance"]', "1.7431 ohm")
    # The server judges the line as it is typed; the browser only shows its words.
    summary = page.locator('[id="s-0"]')
    # In band, but the other required lines are not read yet.
    _cell(page, 0, "terminal.resistance").get_by_text("PASS").wait_for()
    summary.get_by_text("INCOMPLETE").wait_for()
    page.fill('input[name="r:0:strands.A.inductance"]', "100.4 uH")
    _cell(page, 0, "strand.A.inductance").get_by_text("PASS 100.4").wait_for()
    # Out of band: about 50 % over the strand's predicted inductance.
    page.fill('input[name="r:0:strands.A.inductance"]', "150 uH")
    _cell(page, 0, "strand.A.inductance").get_by_text("FAIL 150.0").wait_for()
    summary.get_by_text("FAIL").wait_for()
    page.fill("#inspector", "P. Browser")
    page.click("#signoff")
    page.locator("#signed").get_by_text("Signed off: FAIL").wait_for()

    with open_register(server.register, create=False) as reg:
        rows = reg.conn.execute("SELECT serial, verdict, inspector FROM unit_signoffs").fetchall()
    assert rows == [("HL-0412-01", "fail", "P. Browser")]

    with page.expect_download() as dl:
        page.click("#signoff-pdf")
    pdf = Path(dl.value.path()).read_bytes()
    text = "".join(p.extract_text() for p in pypdf.PdfReader(io.BytesIO(pdf)).pages)
    assert "HL-0412-01" in text and "P. Browser" in text


def test_drafts_survive_a_server_restart(page, server):
    page.goto(server.url + "/job/HL-0412")
    page.fill('input[name="r:job:ambient"]', "21.5 degC")
    page.fill('input[name="r:3:terminals.inductance"]', "400.6 uH")
    page.fill('input[name="r:3:terminals.resistance"]', "1.7488 ohm")
    # Saved once the server has answered with the line's judgement.
    _cell(page, 3, "terminal.resistance").get_by_text(re.compile("PASS|FAIL")).wait_for()
    server.stop()
    server.start()
    page.goto(server.url + "/job/HL-0412")
    assert page.input_value('input[name="r:3:terminals.inductance"]') == "400.6 uH"
    assert page.input_value('input[name="r:3:terminals.resistance"]') == "1.7488 ohm"
