"""Check every relative link of a rendered site before it is written.

Each HTML file is parsed with :mod:`html.parser`; every ``href`` and
``src`` that is relative is resolved against the page, must name a file
of the site and, with a ``#fragment``, an element id of that file. Links
with a scheme (``https:``, ``mailto:``) are outside the site and are not
followed; ``javascript:`` links are reported, the site never needs them.
"""

from __future__ import annotations

__all__ = ["check_links", "page_ids"]

import posixpath
from collections.abc import Mapping
from html.parser import HTMLParser
from urllib.parse import unquote, urlsplit


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.ids: set[str] = set()
        self.refs: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        for name, value in attrs:
            if value is None:
                continue
            if name in {"id", "name"} and (name == "id" or tag == "a"):
                self.ids.add(value)
            elif name in {"href", "src"} or (name == "xlink:href"):
                self.refs.append(value)

    handle_startendtag = handle_starttag


def _parse(data: bytes) -> _Collect:
    p = _Collect()
    p.feed(data.decode("utf-8", errors="replace"))
    p.close()
    return p


def page_ids(data: bytes) -> set[str]:
    """Every element id in an HTML document."""
    return _parse(data).ids


def check_links(files: Mapping[str, bytes]) -> list[tuple[str, str, str]]:
    """Broken relative links of a site.

    Args:
        files: relative POSIX path -> file bytes, as ``render_site`` returns.

    Returns:
        Sorted ``(page, href, reason)`` triples; empty when every link
        resolves.
    """
    html_pages = sorted(p for p in files if p.endswith(".html"))
    parsed = {p: _parse(files[p]) for p in html_pages}
    broken: set[tuple[str, str, str]] = set()
    for page in html_pages:
        base = posixpath.dirname(page)
        for href in parsed[page].refs:
            parts = urlsplit(href)
            if parts.scheme:
                if parts.scheme.lower() in {"javascript", "vbscript", "data"}:
                    broken.add((page, href, f"{parts.scheme}: links are not allowed"))
                continue
            if parts.netloc or href.startswith("/"):
                broken.add((page, href, "absolute link; the site must work from any base path"))
                continue
            if parts.path:
                joined = posixpath.normpath(posixpath.join(base, unquote(parts.path)))
                if joined == ".." or joined.startswith("../"):
                    broken.add((page, href, "points outside the site"))
                    continue
                if parts.path.endswith("/"):
                    # file:// does not turn a folder into its index.html
                    broken.add((page, href, "links to a folder; name the index.html"))
                    continue
                target = joined
            else:
                target = page
            if target not in files:
                broken.add((page, href, f"no such file {target}"))
                continue
            frag = unquote(parts.fragment)
            if frag and target.endswith(".html") and frag not in parsed[target].ids:
                broken.add((page, href, f"no element with id {frag!r} in {target}"))
    return sorted(broken)
