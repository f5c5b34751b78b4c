"""The build checks links over cached page summaries; it must find what
the renderer's own link checker finds."""

from __future__ import annotations

__all__: list[str] = []

from pathlib import Path

from sitegen.build.engine import _link_summary, check_summaries
from sitegen.render.links import check_links

BROKEN_SITE = {
    "index.html": (
        b'<html><body id="top"><a href="a/page.html#here">ok</a>'
        b'<a href="a/page.html#nowhere">bad id</a><a href="missing.html">gone</a>'
        b'<a href="/abs.html">absolute</a><a href="javascript:alert(1)">js</a>'
        b'<a href="https://example.org/">outside</a><a href="a/">folder</a>'
        b'<a href="../up.html">up</a><a href="#top">self</a><a href="#nope">self bad</a>'
        b'<img src="img/x.svg"><a href="a/page%20two.html">quoted</a>'
        b'<a href="data.csv#x">fragment on a file</a></body></html>'
    ),
    "a/page.html": b'<p id="here">x</p><a name="anchor"></a><a href="../index.html#top">b</a>'
                   b'<a href="../index.html#anchor">wrong page</a>',
    "a/page two.html": b'<a href="page.html#anchor">named anchor</a>',
    "img/x.svg": b"<svg/>",
    "data.csv": b"1,2\n",
}


def _summaries(files: dict[str, bytes]) -> dict[str, tuple[tuple[str, ...], tuple[str, ...]]]:
    return {p: _link_summary(d) for p, d in files.items() if p.endswith(".html")}


def test_summaries_find_every_kind_of_broken_link() -> None:
    expected = check_links(BROKEN_SITE)
    assert len(expected) >= 8
    assert check_summaries(_summaries(BROKEN_SITE), BROKEN_SITE) == expected


def test_summaries_agree_on_the_demo_site(built_demo: Path) -> None:
    out = built_demo / "out"
    files = {
        p.relative_to(out).as_posix(): p.read_bytes()
        for p in out.rglob("*") if p.is_file() and not p.name.startswith(".")
    }
    # break a few links on purpose, so both checkers have something to find
    files["index.html"] += (
        b'<a href="methods/none/index.html">x</a><a href="glossary.html#no">y</a>'
    )
    expected = check_links(files)
    assert len(expected) == 2
    assert check_summaries(_summaries(files), files) == expected


def test_a_page_is_checked_again_when_its_target_loses_an_id(site: Path) -> None:
    from conftest import do_build

    base = site / "theme/templates/base.html"
    text = base.read_text("utf-8")
    assert 'id="main"' in text
    base.write_text(text.replace('id="main"', 'id="content"'), "utf-8")
    report = do_build()
    assert not report.written
    assert any(f.rule == "broken-link" and "#main" in f.message for f in report.check.errors)
