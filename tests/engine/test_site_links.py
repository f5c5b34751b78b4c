"""The build checks links over cached page summaries; it must find what
the renderer's own link checker finds."""

from __future__ import annotations

__all__: list[str] = []

from html.parser import HTMLParser
from pathlib import Path

from sitegen.render.links import check_links, check_summaries, page_links

BROKEN_SITE = {
    "index.html": (
        b'<html><body id="top"><a href="a/page.html#here">ok</a>'
        b'<a href="a/page.html#nowhere">bad id</a><a href="missing.html">gone</a>'
        b'<a href="/abs.html">absolute</a><a href="javascript:alert(1)">js</a>'
        b'<a href="https://example.org/">outside</a><a href="a/">folder</a>'
        b'<a href="../up.html">up</a><a href="#top">self</a><a href="#nope">self bad</a>'
        b'<img src="img/x.svg"><a href="a/page%20two.html">quoted</a>'
        b'<a href="data.csv#x">fragment on a file</a>'
        b'<svg><use xlink:href="#top"/><use xlink:href="#gone"/></svg></body></html>'
    ),
    "a/page.html": b'<p id="here">x</p><a name="anchor"></a><a href="../index.html#top">b</a>'
                   b'<a href="../index.html#anchor">wrong page</a>',
    "a/page two.html": b'<a href="page.html#anchor">named anchor</a>',
    "img/x.svg": b"<svg/>",
    "data.csv": b"1,2\n",
}


def test_every_kind_of_broken_link_is_found() -> None:
    assert check_links(BROKEN_SITE) == [
        ("a/page.html", "../index.html#anchor", "no element with id 'anchor' in index.html"),
        ("index.html", "#gone", "no element with id 'gone' in index.html"),
        ("index.html", "#nope", "no element with id 'nope' in index.html"),
        ("index.html", "../up.html", "points outside the site"),
        ("index.html", "/abs.html", "absolute link; the site must work from any base path"),
        ("index.html", "a/", "links to a folder; name the index.html"),
        ("index.html", "a/page.html#nowhere", "no element with id 'nowhere' in a/page.html"),
        ("index.html", "javascript:alert(1)", "javascript: links are not allowed"),
        ("index.html", "missing.html", "no such file missing.html"),
    ]


def test_only_the_pages_asked_for_are_checked() -> None:
    summaries = {p: page_links(d) for p, d in BROKEN_SITE.items() if p.endswith(".html")}
    assert {b[0] for b in check_summaries(summaries, BROKEN_SITE, ["a/page.html"])} == {
        "a/page.html"
    }


class _Reference(HTMLParser):
    """Python's own HTML parser, collecting what page_links collects."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.ids: set[str] = set()
        self.refs: set[str] = set()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        for name, value in attrs:
            if value is None:
                continue
            if name == "id" or (name == "name" and tag == "a"):
                self.ids.add(value)
            elif name in {"href", "src", "xlink:href"}:
                self.refs.add(value)

    handle_startendtag = handle_starttag


def test_page_links_read_what_pythons_html_parser_reads(built_demo: Path) -> None:
    # every page of the demo site, and a few awkward spellings
    out = built_demo / "out"
    pages = {p.relative_to(out).as_posix(): p.read_bytes() for p in out.rglob("*.html")}
    pages["odd.html"] = (
        b"<A HREF='x.html?a=1&amp;b=2'>q</A><p id=bare>u</p><!-- <a href=\"c.html\"> -->"
        b"<script>var s = '<a href=\"s.html\">';</script><a name=n href=\"y&#46;html\">e</a>"
    )
    assert len(pages) > 20
    for rel, data in pages.items():
        ref = _Reference()
        ref.feed(data.decode("utf-8"))
        ref.close()
        assert page_links(data) == (tuple(sorted(ref.ids)), tuple(sorted(ref.refs))), rel


def test_a_page_is_checked_again_when_its_target_loses_an_id(site: Path) -> None:
    from engine_helpers import do_build

    base = site / "theme/templates/base.html"
    text = base.read_text("utf-8")
    assert 'id="main"' in text
    base.write_text(text.replace('id="main"', 'id="content"'), "utf-8")
    report = do_build()
    assert not report.written
    assert any(f.rule == "broken-link" and "#main" in f.message for f in report.check.errors)
