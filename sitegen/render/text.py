"""Record text (Markdown) -> safe HTML, with glossary terms linked.

Markdown is parsed by markdown-it in CommonMark mode with raw HTML off, so
record text can never inject markup; markdown-it's link validation already
refuses ``javascript:``, ``vbscript:``, ``file:`` and most ``data:`` URLs
(those links stay literal text). Glossary linking works on the token
stream: text tokens outside links and code are split around the first
occurrence of each term per section (a section starts at a heading).
"""

from __future__ import annotations

__all__ = ["glossary_anchor", "markdown_html", "markdown_text"]

import re
from collections.abc import Mapping
from functools import lru_cache

from markdown_it import MarkdownIt
from markdown_it.token import Token


@lru_cache(maxsize=1)
def _md() -> MarkdownIt:
    return MarkdownIt("commonmark", {"html": False})


def glossary_anchor(term: str) -> str:
    """The id of a term's entry on the glossary page (``term-formal-potential``)."""
    slug = re.sub(r"[^a-z0-9]+", "-", term.casefold()).strip("-")
    return "term-" + (slug or "x")


def _pattern(terms: Mapping[str, str]) -> re.Pattern[str] | None:
    if not terms:
        return None
    # longest first, so "formal potential" wins over "potential"
    alts = sorted(terms, key=lambda t: (-len(t), t.casefold()))
    body = "|".join(re.escape(t) for t in alts)
    return re.compile(rf"(?<!\w)({body})(?!\w)", re.IGNORECASE)


def _link_terms(
    children: list[Token], pattern: re.Pattern[str], hrefs: Mapping[str, str], seen: set[str]
) -> list[Token]:
    out: list[Token] = []
    depth = 0  # inside a link: never nest a glossary link
    for tok in children:
        if tok.type == "link_open":
            depth += 1
        elif tok.type == "link_close":
            depth -= 1
        if tok.type != "text" or depth > 0:
            out.append(tok)
            continue
        text = tok.content
        pos = 0
        for m in pattern.finditer(text):
            key = m.group(1).casefold()
            if key in seen:
                continue
            seen.add(key)
            if m.start() > pos:
                out.append(Token("text", "", 0, content=text[pos : m.start()]))
            opener = Token("link_open", "a", 1, attrs={"href": hrefs[key], "class": "term"})
            out.append(opener)
            out.append(Token("text", "", 0, content=m.group(1)))
            out.append(Token("link_close", "a", -1))
            pos = m.end()
        if pos == 0:
            out.append(tok)
        elif pos < len(text):
            out.append(Token("text", "", 0, content=text[pos:]))
    return out


def markdown_html(text: str, glossary_hrefs: Mapping[str, str] | None = None) -> str:
    """Render record Markdown to safe HTML.

    Args:
        text: the record text.
        glossary_hrefs: term -> href of its glossary entry (relative to the
            page being rendered); terms match case-insensitively as whole
            words.

    Returns:
        HTML; raw HTML in the text is escaped, unsafe links stay text.
    """
    md = _md()
    env: dict[str, object] = {}
    tokens = md.parse(text, env)
    hrefs = {k.casefold(): v for k, v in (glossary_hrefs or {}).items()}
    pattern = _pattern(hrefs)
    if pattern is not None:
        seen: set[str] = set()
        for tok in tokens:
            if tok.type == "heading_open":
                seen = set()  # a new section links each term once more
            elif tok.type == "inline" and tok.children:
                tok.children = _link_terms(tok.children, pattern, hrefs, seen)
    return str(md.renderer.render(tokens, md.options, env))


def markdown_text(text: str) -> str:
    """The plain words of record Markdown (for the search index)."""
    words: list[str] = []
    for tok in _md().parse(text):
        if tok.type == "inline" and tok.children:
            words.extend(c.content for c in tok.children if c.type in {"text", "code_inline"})
        elif tok.type in {"code_block", "fence"}:
            words.append(tok.content)
    return " ".join(" ".join(words).split())
