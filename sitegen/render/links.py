"""Check every relative link of a rendered site before it is written.

Each HTML file is parsed with lxml's HTML parser (libxml2: the pages
carry inline SVG curves of tens of kilobytes, which a pure-Python parser
reads several times slower); every ``href``, ``src`` and ``xlink:href``
that is relative is resolved against the page, must name a file of the
site and, with a ``#fragment``, an element id of that file. Links with a
scheme (``https:``, ``mailto:``) are outside the site and are not
followed; ``javascript:`` links are reported, the site never needs them.

The check works on page summaries, ``(ids, links)`` per page
(:func:`page_links`), so that a build can keep the summaries of pages it
did not render again and check only what changed.
"""

from __future__ import annotations

__all__ = ["PageLinks", "check_links", "check_summaries", "page_ids", "page_links"]

import posixpath
from collections.abc import Iterable, Iterator, Mapping
from urllib.parse import unquote, urlsplit

#: (sorted element ids, sorted distinct link targets) of one page
PageLinks = tuple[tuple[str, ...], tuple[str, ...]]

_REF_ATTRS = frozenset({"href", "src", "xlink:href"})


def page_links(data: bytes) -> PageLinks:
    """The element ids and the link targets of an HTML page.

    An id is any element's ``id`` or an ``<a>``'s ``name``; a link is any
    ``href``, ``src`` or ``xlink:href`` value, character references
    decoded.
    """
    from lxml import etree

    text = data.decode("utf-8", errors="replace")
    if not text.strip():
        return (), ()
    parser = etree.HTMLParser(remove_comments=True, remove_pis=True, huge_tree=True)
    root = etree.fromstring(text, parser)
    if root is None:
        return (), ()
    ids: set[str] = set()
    refs: set[str] = set()
    for el in root.iter(etree.Element):
        tag = el.tag
        for name, value in el.attrib.items():
            if name == "id" or (name == "name" and tag == "a"):
                ids.add(value)
            elif name in _REF_ATTRS:
                refs.add(value)
    return tuple(sorted(ids)), tuple(sorted(refs))


def page_ids(data: bytes) -> set[str]:
    """Every element id in an HTML document."""
    return set(page_links(data)[0])


def _why_broken(page: str, href: str, names: set[str],
                ids: Mapping[str, frozenset[str]]) -> str | None:
    """Why ``href`` on ``page`` is broken, or None when it resolves."""
    parts = urlsplit(href)
    if parts.scheme:
        if parts.scheme.lower() in {"javascript", "vbscript", "data"}:
            return f"{parts.scheme}: links are not allowed"
        return None
    if parts.netloc or href.startswith("/"):
        return "absolute link; the site must work from any base path"
    if parts.path:
        joined = posixpath.normpath(posixpath.join(posixpath.dirname(page), unquote(parts.path)))
        if joined == ".." or joined.startswith("../"):
            return "points outside the site"
        if parts.path.endswith("/"):
            # file:// does not turn a folder into its index.html
            return "links to a folder; name the index.html"
        target = joined
    else:
        target = page
    if target not in names:
        return f"no such file {target}"
    frag = unquote(parts.fragment)
    if frag and target.endswith(".html") and frag not in ids.get(target, frozenset()):
        return f"no element with id {frag!r} in {target}"
    return None


class _Ids(Mapping[str, frozenset[str]]):
    """Page -> its element ids, each set made when a link first points into
    that page (a build that checks a few changed pages would otherwise make
    one for every page of the site)."""

    def __init__(self, summaries: Mapping[str, PageLinks]) -> None:
        self._summaries = summaries
        self._made: dict[str, frozenset[str]] = {}

    def __getitem__(self, page: str) -> frozenset[str]:
        made = self._made.get(page)
        if made is None:
            made = self._made[page] = frozenset(self._summaries[page][0])
        return made

    def __iter__(self) -> Iterator[str]:
        return iter(self._summaries)

    def __len__(self) -> int:
        return len(self._summaries)


def check_summaries(
    summaries: Mapping[str, PageLinks], names: Iterable[str], pages: Iterable[str] | None = None
) -> list[tuple[str, str, str]]:
    """Broken links of ``pages`` (default: every summarised page).

    Args:
        summaries: page path -> :func:`page_links` of every HTML page.
        names: the relative path of every file of the site.
        pages: the pages whose links to check.

    Returns:
        Sorted ``(page, href, reason)`` triples.
    """
    name_set = set(names)
    ids = _Ids(summaries)
    broken = set()
    for page in sorted(summaries if pages is None else pages):
        for href in summaries[page][1]:
            why = _why_broken(page, href, name_set, ids)
            if why is not None:
                broken.add((page, href, why))
    return sorted(broken)


def check_links(files: Mapping[str, bytes]) -> list[tuple[str, str, str]]:
    """Broken relative links of a site.

    Args:
        files: relative POSIX path -> file bytes, as ``render_site`` returns.

    Returns:
        Sorted ``(page, href, reason)`` triples; empty when every link
        resolves.
    """
    summaries = {p: page_links(files[p]) for p in sorted(files) if p.endswith(".html")}
    return check_summaries(summaries, files)
