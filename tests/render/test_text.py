"""Tests for sitegen.render.text: Markdown safety and glossary linking."""

from sitegen.render.text import glossary_anchor, markdown_html, markdown_text

GLOSS = {
    "end point": "../../glossary.html#term-end-point",
    "blank": "../../glossary.html#term-blank",
}


def test_raw_html_is_escaped():
    out = markdown_html("Titrate <script>alert(1)</script> now.\n\n<img src=x onerror=alert(1)>")
    assert "<script>" not in out and "<img" not in out
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in out


def test_javascript_links_are_not_links():
    for text in (
        "[x](javascript:alert(1))",
        "[x](JaVaScRiPt:alert(1))",
        "<javascript:alert(1)>",
        "[x](vbscript:msgbox(1))",
    ):
        out = markdown_html(text)
        assert "href" not in out, out


def test_ordinary_links_survive():
    assert '<a href="https://example.org/a">a</a>' in markdown_html("[a](https://example.org/a)")


def test_first_occurrence_per_section_is_linked_case_insensitively():
    out = markdown_html("Stop at the End point. The end point again.\n\n# Next\n\nend point", GLOSS)
    assert out.count('class="term"') == 2
    assert '<a href="../../glossary.html#term-end-point" class="term">End point</a>' in out


def test_whole_words_only_and_never_inside_code_or_links():
    out = markdown_html("blanks `blank` [the blank](x.html) blanket", GLOSS)
    assert 'class="term"' not in out
    out = markdown_html("`blank` then blank", GLOSS)
    assert out.count('class="term"') == 1 and "<code>blank</code>" in out


def test_longest_term_wins():
    g = {"potential": "g.html#term-potential", "formal potential": "g.html#term-formal-potential"}
    out = markdown_html("the formal potential and the potential", g)
    assert 'href="g.html#term-formal-potential"' in out
    assert 'href="g.html#term-potential"' in out


def test_glossary_text_cannot_inject_markup():
    out = markdown_html("a <b>blank</b>", GLOSS)
    assert "<b>" not in out


def test_anchor_and_plain_text():
    assert glossary_anchor("Half-reaction") == "term-half-reaction"
    assert (
        markdown_text("1. Add **20 mL** of `acid`.\n2. Titrate.") == "Add 20 mL of acid . Titrate."
    )
