"""Chemistry text -> HTML: subscripts, superscripts, real arrows and minus.

A pure string function with no chemistry knowledge beyond spelling, so it
also typesets text the chemistry core refused (the page still shows what
the record says). Accepted spellings follow :mod:`sitegen.chem.formula`
and :mod:`sitegen.chem.reaction`:

* counts after an element or bracket become ``<sub>``: ``H2SO4``;
* charges ``^2-``, ``^{2-}``, ``^+3`` or trailing signs (``MnO4-``,
  ``SO4--``) become ``<sup>`` with a true minus sign (U+2212);
* the electron ``e-`` prints as e<sup>−</sup>;
* ``->``, ``→`` become → (goes to completion); ``=``, ``<=>``, ``⇌``
  become ⇌ (half-reaction or equilibrium);
* a leading number of a term is its coefficient and stays on the line;
  a number right after an adduct dot (``·6H2O``) too.

Everything else is HTML-escaped, so record text cannot inject markup.
"""

from __future__ import annotations

__all__ = ["reaction_html", "species_html"]

import html
import re

_MINUS = "\u2212"
_ARROWS = (
    ("<=>", "⇌"),
    ("->", "→"),
    ("→", "→"),
    ("⟶", "→"),
    ("⇌", "⇌"),
    ("⇄", "⇌"),
    ("=", "⇌"),
)
_PLUS = re.compile(r"\s+\+\s+")
_COEFF = re.compile(r"^(\d+/\d+|\d+\.\d+|\.\d+|\d+)\s*(?=\D)")
_DOTS = "·•∙⋅*"
_STATE = re.compile(r"\((aq|s|l|g)\)$")
_CARET = re.compile(r"\^\{?([0-9]*[+\-−][0-9]*)\}?$")
_TRAIL = re.compile(r"([+\-−]+)$")
_SUPER = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻", "0123456789+-")
_SUPER_TAIL = re.compile(r"([⁰¹²³⁴⁵⁶⁷⁸⁹]*[⁺⁻][⁰¹²³⁴⁵⁶⁷⁸⁹]*)$")
_SUB = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")


def _charge(body: str) -> str:
    """'2-' / '-2' / '+' / '--' -> display text '2−', '+', '2−'."""
    body = body.replace("−", "-")
    signs = [c for c in body if c in "+-"]
    digits = "".join(c for c in body if c.isdigit())
    sign = signs[0]
    if not digits and len(signs) > 1:
        digits = str(len(signs))
    if digits == "1":
        digits = ""
    return digits + ("+" if sign == "+" else _MINUS)


def _formula(text: str) -> str:
    """Typeset a formula without charge/state: digits after a letter or a
    closing bracket are counts; digits after an adduct dot are a
    multiplier and stay on the line."""
    out: list[str] = []
    prev = ""
    i = 0
    text = text.translate(_SUB)
    while i < len(text):
        ch = text[i]
        if ch.isdigit():
            j = i
            while j < len(text) and text[j].isdigit():
                j += 1
            run = text[i:j]
            if prev and (prev.isalpha() or prev in ")]"):
                out.append(f"<sub>{run}</sub>")
            else:
                out.append(run)
            prev = run[-1]
            i = j
            continue
        if ch in _DOTS:
            out.append("·")
        else:
            out.append(html.escape(ch))
        prev = ch if ch not in _DOTS else "·"
        i += 1
    return "".join(out)


def species_html(text: str) -> str:
    """One species (or formula) as HTML.

    Args:
        text: e.g. ``Cr2O7^2-``, ``Fe³⁺``, ``(NH4)2Fe(SO4)2·6H2O``, ``e-``.

    Returns:
        Escaped HTML using ``<sub>``/``<sup>`` and U+2212 for minus.
    """
    s = text.strip()
    if not s:
        return ""
    state = ""
    m = _STATE.search(s)
    if m:
        state = f"({m.group(1)})"
        s = s[: m.start()]
    charge = ""
    m = _SUPER_TAIL.search(s)
    if m and m.start() > 0:
        charge = _charge(m.group(1).translate(_SUPER))
        s = s[: m.start()]
    else:
        m = _CARET.search(s)
        if m:
            charge = _charge(m.group(1))
            s = s[: m.start()]
        else:
            m = _TRAIL.search(s)
            if m and m.start() > 0:
                charge = _charge(m.group(1))
                s = s[: m.start()]
    body = _formula(s)
    sup = f"<sup>{charge}</sup>" if charge else ""
    return f"{body}{sup}{html.escape(state)}"


def _term(text: str) -> str:
    m = _COEFF.match(text)
    if m:
        coeff = m.group(1)
        rest = text[m.end() :]
        return f'<span class="coeff">{html.escape(coeff)}</span>\u2009{species_html(rest)}'
    return species_html(text)


def _side(text: str) -> str:
    return " + ".join(_term(t) for t in _PLUS.split(text.strip()) if t)


def reaction_html(text: str) -> str:
    """A reaction or half-reaction as HTML with real arrows.

    Args:
        text: e.g. ``Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O``.

    Returns:
        Escaped HTML; text without an arrow is typeset as one side.
    """
    for spelling, arrow in _ARROWS:
        # "=" inside "<=>" is handled by trying the longest spelling first
        if spelling in text:
            left, _, right = text.partition(spelling)
            return f"{_side(left)} {arrow} {_side(right)}"
    return _side(text)
