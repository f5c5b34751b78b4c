"""Tests for sitegen.render.links."""

from sitegen.render.links import check_links


def _page(body):
    return f"<!DOCTYPE html><html><body>{body}</body></html>".encode()


def test_good_site_has_no_broken_links():
    files = {
        "index.html": _page('<a href="methods/a/index.html#proc">a</a><link href="static/s.css">'),
        "methods/a/index.html": _page(
            '<h2 id="proc">P</h2><a href="../../index.html">home</a><a href="#proc">x</a>'
            '<img src="../../static/p.svg"><a href="https://example.org/">ext</a>'
        ),
        "static/s.css": b"",
        "static/p.svg": b"<svg/>",
    }
    assert check_links(files) == []


def test_broken_site_names_page_and_link():
    files = {
        "index.html": _page(
            '<a href="methods/missing/index.html">m</a>'
            '<a href="glossary.html#no-such-term">g</a>'
            '<a href="#nowhere">n</a>'
            '<a href="/abs/index.html">abs</a>'
            '<a href="methods/a/">folder</a>'
            '<a href="../up.html">up</a>'
            '<a href="javascript:alert(1)">js</a>'
        ),
        "glossary.html": _page('<dt id="term-blank">blank</dt>'),
        "methods/a/index.html": _page(""),
    }
    broken = check_links(files)
    hrefs = {h: r for _, h, r in broken}
    assert all(p == "index.html" for p, _, _ in broken)
    assert "no such file methods/missing/index.html" in hrefs["methods/missing/index.html"]
    assert "no-such-term" in hrefs["glossary.html#no-such-term"]
    assert "nowhere" in hrefs["#nowhere"]
    assert "absolute" in hrefs["/abs/index.html"]
    assert "index.html" in hrefs["methods/a/"]
    assert "outside" in hrefs["../up.html"]
    assert "javascript" in hrefs["javascript:alert(1)"]
    assert len(broken) == 7
