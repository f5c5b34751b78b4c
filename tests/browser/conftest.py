"""Browser tests: build the demo site, serve it on 127.0.0.1 and drive
Debian's chromium with playwright (never a downloaded browser)."""

from __future__ import annotations

import functools
import os
import shutil
import threading
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "methods"
CHROMIUM = Path("/usr/bin/chromium")
ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]
ARTIFACTS = ROOT / "test-artifacts"


def pytest_collection_modifyitems(items):
    here = Path(__file__).parent
    for item in items:
        if here in Path(str(item.fspath)).parents:
            item.add_marker(pytest.mark.browser)


def build_into(source: Path, out: Path) -> Path:
    """Build ``source`` into ``out`` with the project's build, or, where
    the build is not importable, with render_site and a plain writer."""
    try:
        from sitegen.build.run import build_site
    except ImportError:
        build_site = None
    if build_site is not None:
        report = build_site(source, out)
        assert report.written, [str(f) for f in report.check.errors]
        return out
    import datetime as dt

    from sitegen.analyse import analyse_method
    from sitegen.load.collection import load_collection
    from sitegen.render.site import RenderOptions, render_site

    col = load_collection(source)
    analyses = {k: analyse_method(v, col.reagents, col.indicators) for k, v in col.methods.items()}
    opts = RenderOptions(ROOT / "theme", dt.date.today(), "test")
    for path, data in render_site(col, analyses, [], opts).items():
        (out / path).parent.mkdir(parents=True, exist_ok=True)
        (out / path).write_bytes(data)
    return out


class _Quiet(SimpleHTTPRequestHandler):
    def log_message(self, format, *args):
        pass


@pytest.fixture(scope="session")
def serve():
    servers = []

    def start(folder: Path) -> str:
        handler = functools.partial(_Quiet, directory=str(folder))
        httpd = ThreadingHTTPServer(("127.0.0.1", 0), handler)
        threading.Thread(target=httpd.serve_forever, daemon=True).start()
        servers.append(httpd)
        return f"http://127.0.0.1:{httpd.server_address[1]}/"

    yield start
    for s in servers:
        s.shutdown()
        s.server_close()


@pytest.fixture(scope="session")
def demo_collection():
    from sitegen.analyse import analyse_method
    from sitegen.load.collection import load_collection

    col = load_collection(DEMO, cwd=ROOT)
    analyses = {k: analyse_method(v, col.reagents, col.indicators) for k, v in col.methods.items()}
    return col, analyses


@pytest.fixture(scope="session")
def site_dir(tmp_path_factory):
    return build_into(DEMO, tmp_path_factory.mktemp("demo") / "site")


@pytest.fixture(scope="session")
def base_url(site_dir, serve):
    return serve(site_dir)


@pytest.fixture(scope="session")
def browser():
    if not CHROMIUM.exists():
        if os.environ.get("CI") == "true":
            pytest.fail(f"{CHROMIUM} is missing; CI must provide Debian's chromium")
        pytest.skip(f"{CHROMIUM} is not installed; browser tests need Debian's chromium")
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=str(CHROMIUM), args=ARGS)
        yield b
        b.close()


@pytest.fixture
def page(browser):
    ctx = browser.new_context(viewport={"width": 1100, "height": 900})
    pg = ctx.new_page()
    errors: list[str] = []
    pg.on("pageerror", lambda e: errors.append(str(e)))
    pg.js_errors = errors  # type: ignore[attr-defined]
    yield pg
    ctx.close()
    assert errors == [], errors


@pytest.fixture(scope="session")
def artifacts():
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS


@pytest.fixture(scope="session")
def build():
    """The site builder (:func:`build_into`) for tests that build their own source."""
    return build_into


@pytest.fixture
def source_copy(tmp_path):
    dst = tmp_path / "src"
    shutil.copytree(DEMO, dst)
    return dst
