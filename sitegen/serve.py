"""Live preview: build, serve the output folder, rebuild on every change.

``sitegen serve`` builds the site, serves the output folder over HTTP on
127.0.0.1 and watches the source folder and the theme (with the
``watchfiles`` library). Each change runs the cached build again, so a
one-record edit is published in about the time of a one-record build.

Pages get a small script that polls ``/__sitegen/version``; the number
there changes after every finished build, and the page reloads itself,
so the browser shows a successful rebuild within half a second. While
the last build failed, *every* request gets an error page listing its
findings instead of the stale site, so nobody reads a page that no
longer matches its record; the next good build brings the site back.

The server is for previewing on one's own machine: it listens on
127.0.0.1 unless another address is named with ``--host``, and it is
the standard library's ``http.server``, not a production server.
"""

from __future__ import annotations

__all__ = ["VERSION_PATH", "serve"]

import html
import ipaddress
import json
import threading
from dataclasses import dataclass, field
from http import HTTPStatus
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from typing import Any, TextIO

#: polled by the pages; answers {"version": n, "ok": bool}
VERSION_PATH = "/__sitegen/version"

#: how often the page asks whether a new build is out (ms); half of the
#: half-second the reload may take
_POLL_MS = 250

_SCRIPT = (
    "<script>(function(){{var v={version};function p(){{fetch('" + VERSION_PATH + "',"
    "{{cache:'no-store'}}).then(function(r){{return r.json()}}).then(function(d){{"
    "if(d.version!==v){{location.reload()}}}}).catch(function(){{}}).then(function(){{"
    "setTimeout(p,{poll})}})}}setTimeout(p,{poll})}})();</script>"
)


@dataclass
class _State:
    """What the request threads read and the build loop writes."""

    version: int = 0
    error_page: bytes | None = None
    lock: threading.Lock = field(default_factory=threading.Lock)
    #: the build cache's entries kept as objects between rebuilds (used by
    #: the build loop only)
    memo: dict[tuple[str, str], Any] = field(default_factory=dict)

    def publish(self, error_page: bytes | None) -> None:
        with self.lock:
            self.error_page = error_page
            self.version += 1

    def snapshot(self) -> tuple[int, bytes | None]:
        with self.lock:
            return self.version, self.error_page


def _script(version: int) -> bytes:
    return _SCRIPT.format(version=version, poll=_POLL_MS).encode("ascii")


def inject(page: bytes, version: int) -> bytes:
    """``page`` with the reload script before ``</body>`` (or at the end)."""
    script = _script(version)
    at = page.lower().rfind(b"</body>")
    if at < 0:
        return page + script
    return page[:at] + script + page[at:]


def error_page(title: str, lines: list[str], version: int) -> bytes:
    """The page served for every request while the last build failed."""
    items = "\n".join(f"<li><pre>{html.escape(line)}</pre></li>" for line in lines)
    body = (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        f"<title>{html.escape(title)}</title>"
        "<style>body{font-family:sans-serif;margin:2em;max-width:60em}"
        "pre{white-space:pre-wrap;margin:0}li{margin:0 0 1em}h1{color:#a00}</style>"
        f"</head><body><h1>{html.escape(title)}</h1>"
        "<p>The site is not shown until the records build again; this page reloads"
        " by itself when they do.</p>"
        f"<ol>{items}</ol></body></html>\n"
    )
    return inject(body.encode("utf-8"), version)


def _finding_lines(report: Any) -> list[str]:
    from .errors import format_finding

    result = report.check
    sources = getattr(result.collection, "sources", {})
    out = []
    for f in result.errors or result.findings:
        src = sources.get(f.span.path)
        out.append(format_finding(f, src.line(f.span.line) if src is not None else None))
    return out or ["the build stopped without a finding; see the terminal"]


class _Handler(SimpleHTTPRequestHandler):
    state: _State
    site: Path

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        super().__init__(*args, directory=str(self.site), **kwargs)

    def log_message(self, format: str, *args: Any) -> None:
        # one line per request would drown the build messages
        return

    def end_headers(self) -> None:
        # the preview must never show a cached page of an older build
        self.send_header("Cache-Control", "no-store")
        super().end_headers()

    def _send(self, status: int, ctype: str, body: bytes, head: bool = False) -> None:
        self.send_response(status)
        self.send_header("Content-Type", ctype)
        self.send_header("Content-Length", str(len(body)))
        self.end_headers()
        if not head:
            self.wfile.write(body)

    def do_HEAD(self) -> None:
        self._get(head=True)

    def do_GET(self) -> None:
        self._get(head=False)

    def _get(self, head: bool) -> None:
        version, failed = self.state.snapshot()
        path = self.path.split("?", 1)[0].split("#", 1)[0]
        if path == VERSION_PATH:
            body = json.dumps({"version": version, "ok": failed is None}).encode("ascii")
            self._send(HTTPStatus.OK, "application/json", body, head)
            return
        if failed is not None:
            self._send(HTTPStatus.INTERNAL_SERVER_ERROR, "text/html; charset=utf-8", failed, head)
            return
        local = Path(self.translate_path(self.path))
        if local.is_dir():
            local = local / "index.html"
        if local.suffix == ".html" and local.is_file():
            try:
                page = local.read_bytes()
            except OSError:
                self.send_error(HTTPStatus.NOT_FOUND)
                return
            self._send(HTTPStatus.OK, "text/html; charset=utf-8", inject(page, version), head)
            return
        if head:
            super().do_HEAD()
        else:
            super().do_GET()


def _is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False


def _build_once(args: Any, state: _State, err: TextIO, warm: bool = False) -> bool:
    """Build; publish the outcome to the server. False if the output
    folder was refused (nothing can be served then)."""
    from .build.engine import build
    from .build.write import OutputRefused
    from .check.registry import Settings
    from .clock import build_date

    try:
        report = build(
            Path(args.source), Path(args.out),
            settings=Settings(today=build_date(), strict=bool(getattr(args, "strict", False))),
            theme=getattr(args, "theme", None), jobs=getattr(args, "jobs", None), progress=err,
            cache_dir=getattr(args, "cache_dir", None), memo=state.memo, warm=warm,
        )
    except OutputRefused as exc:
        print(f"sitegen serve: error: {exc}", file=err)
        return False
    except FileNotFoundError as exc:
        state.publish(error_page("The site could not be built", [str(exc)], state.version + 1))
        print(f"sitegen serve: error: {exc}", file=err)
        return True
    except Exception as exc:  # a bug must not end the preview; show it
        state.publish(error_page("The build crashed", [f"{type(exc).__name__}: {exc}"],
                                 state.version + 1))
        print(f"sitegen serve: build crashed: {type(exc).__name__}: {exc}", file=err)
        return True
    if report.written:
        state.publish(None)
        print(f"sitegen serve: built: {report.methods_built} method(s) rebuilt,"
              f" {report.methods_cached} from cache", file=err)
    else:
        lines = _finding_lines(report)
        state.publish(error_page(f"The build failed: {len(report.check.errors)} error(s)", lines,
                                 state.version + 1))
        print(f"sitegen serve: build failed with {len(report.check.errors)} error(s):", file=err)
        for line in lines:
            print(line, file=err)
    err.flush()
    _settle_heap()
    return True


def _settle_heap() -> None:
    """Collect the build's garbage now, between builds, and move what
    stays (the memo) out of the collector's reach: a collection during the
    next rebuild would otherwise walk the whole kept heap."""
    import gc

    gc.collect()
    gc.freeze()


def _warm_up(theme: Path) -> None:
    """Import and build now what the first rebuild would otherwise wait
    for: the validation, chemistry, checking and rendering code, the unit
    registry, the theme's compiled templates and the plot canvas. The
    first build may have needed none of it (every result came from the
    cache)."""
    import importlib

    from .render.env import environment

    env = environment(theme)
    for name in env.list_templates(extensions=["html"]):
        env.get_template(name)

    import pkgutil

    from . import chem

    names = ["sitegen.analyse", "sitegen.budget", "sitegen.calc", "sitegen.check.rules",
             "sitegen.load.records", "sitegen.model", "sitegen.render.links",
             "sitegen.render.search", "sitegen.render.site", "lxml.etree"]
    names += [f"sitegen.chem.{m.name}" for m in pkgutil.iter_modules(chem.__path__)]
    for name in names:
        importlib.import_module(name)
    from .load.collection import KINDS
    from .model import SiteConfig
    from .render import plots
    from .units import registry

    for model in (*KINDS.values(), SiteConfig):
        model.model_rebuild()  # pydantic builds deferred validators here
    registry()
    plots._canvas()


def serve(args: Any, out: TextIO, err: TextIO) -> int:
    """Build, serve and rebuild until interrupted.

    Args:
        args: ``source``, ``out``, ``host`` and ``port`` (and optionally
            ``theme``, ``jobs``, ``strict``), as the command line parses
            them.
        out: the address is printed here.
        err: build messages.

    Returns:
        0 after Ctrl-C; 2 when the output folder is refused or the address
        cannot be used.
    """
    import watchfiles

    from .build.run import default_theme

    host = getattr(args, "host", None) or "127.0.0.1"
    if not _is_loopback(host):
        print(f"sitegen serve: warning: listening on {host}: anyone who can reach this"
              " machine can read the preview", file=err)
    state = _State()
    # the first build runs every stage, so that the memo holds what the
    # next rebuild reads
    if not _build_once(args, state, err, warm=True):
        return 2
    handler = type("Handler", (_Handler,), {"state": state, "site": Path(args.out).resolve()})
    try:
        server = ThreadingHTTPServer((host, int(args.port)), handler)
    except OSError as exc:
        print(f"sitegen serve: error: cannot listen on {host}:{args.port}: {exc}", file=err)
        return 2
    server.daemon_threads = True
    bound_port = server.server_address[1]  # the port chosen when asked for 0
    shown = f"[{host}]" if ":" in host else host
    print(f"sitegen serve: http://{shown}:{bound_port}/ (Ctrl-C to stop)", file=out)
    out.flush()
    thread = threading.Thread(target=server.serve_forever, name="sitegen-serve", daemon=True)
    thread.start()
    theme = Path(getattr(args, "theme", None) or default_theme())
    watched = [str(Path(args.source))] + ([str(theme)] if theme.is_dir() else [])
    warm = True
    try:
        # yield_on_timeout: an empty set after each quiet 0.1 s; the first
        # one is used to load what a rebuild needs (changes made meanwhile
        # are kept by the watcher and come next)
        for changes in watchfiles.watch(*watched, debounce=300, step=30, raise_interrupt=True,
                                        yield_on_timeout=True, rust_timeout=100):
            if not changes:
                if warm:
                    _warm_up(theme)
                    _settle_heap()  # what the warm-up loaded stays too
                    from .build.write import prepare_spare

                    prepare_spare(Path(args.out))
                    warm = False
                continue
            if not _build_once(args, state, err):
                return 2
    except KeyboardInterrupt:
        pass
    finally:
        server.shutdown()
        server.server_close()
    print("sitegen serve: stopped", file=err)
    return 0
