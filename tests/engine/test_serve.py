"""The live preview: serves the site, injects the reload script, shows an
error page while the build fails, and exits 0 on Ctrl-C."""

from __future__ import annotations

__all__: list[str] = []

import json
import os
import re
import signal
import subprocess
import sys
import time
import urllib.error
import urllib.request
from pathlib import Path

from engine_helpers import EPOCH, ROOT

from sitegen.serve import error_page, inject


def _get(url: str) -> tuple[int, str]:
    try:
        with urllib.request.urlopen(url, timeout=10) as r:
            return r.status, r.read().decode("utf-8")
    except urllib.error.HTTPError as exc:
        return exc.code, exc.read().decode("utf-8")


def _version(base: str) -> int:
    return int(json.loads(_get(base + "__sitegen/version")[1])["version"])


def _wait_version(base: str, above: int, timeout: float = 60) -> int:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        v = _version(base)
        if v > above:
            return v
        time.sleep(0.1)
    raise AssertionError("no rebuild was published")


def test_error_page_escapes_the_findings() -> None:
    page = error_page("failed", ["x.yaml:1:1: error: <script>alert(1)</script> [r]"], 3)
    assert b"<script>alert(1)</script>" not in page
    assert b"&lt;script&gt;" in page
    assert b"var v=3;" in page


def test_reload_script_goes_before_the_end_of_the_body() -> None:
    page = inject(b"<html><body><p>x</p></body></html>", 7)
    assert page.endswith(b"</body></html>")
    assert b"__sitegen/version" in page and b"var v=7;" in page


def test_serve_rebuilds_shows_errors_and_stops_cleanly(site: Path) -> None:
    env = dict(os.environ, PYTHONPATH=str(ROOT), SOURCE_DATE_EPOCH=EPOCH,
               SITEGEN_CACHE=str(site / "cache"))
    proc = subprocess.Popen(
        [sys.executable, "-m", "sitegen", "serve", "methods", "--out", "out", "--port", "0"],
        cwd=site, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
    )
    try:
        assert proc.stdout is not None
        line = proc.stdout.readline()
        m = re.search(r"http://127\.0\.0\.1:(\d+)/", line)
        assert m, line
        base = m.group(0)
        status, page = _get(base + "methods/copper-iodometric/index.html")
        assert status == 200
        assert "__sitegen/version" in page
        v0 = _version(base)

        rec = site / "methods/records/copper-iodometric.yaml"
        good = rec.read_text("utf-8")
        rec.write_text(good.replace("  factor: 1   #", "  factor: 3   #"), "utf-8")
        v1 = _wait_version(base, v0)
        for path in ("index.html", "methods/iron-ii-ceric/index.html", "static/site.css"):
            status, page = _get(base + path)
            assert status == 500
            assert "factor-mismatch" in page
            assert f"var v={v1};" in page

        rec.write_text(good.replace("\nprocedure: |\n", "\nprocedure: |\n  0. Wear <gloves>.\n"),
                       "utf-8")
        _wait_version(base, v1)
        status, page = _get(base + "methods/copper-iodometric/index.html")
        assert status == 200
        assert "Wear &lt;gloves&gt;." in page

        proc.send_signal(signal.SIGINT)
        assert proc.wait(timeout=60) == 0  # a loaded machine may be mid-rebuild
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
