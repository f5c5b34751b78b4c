"""Reactions and half-reactions: parsing, canonical printing, balance check.

Grammar::

    reaction := side ARROW side
    side     := term ( " + " term )*        the plus must have whitespace on both sides
    term     := coeff? species              species as in sitegen.chem.formula
    coeff    := INT | DECIMAL | INT "/" INT  followed by optional whitespace;
                                            "2H2O" is accepted (formulas never
                                            start with a digit)
    ARROW    := "->" | "→" | "⟶"            a reaction that goes to completion
              | "=" | "⇌" | "<=>" | "⇄"     a half-reaction, couple or equilibrium

Because ``+`` is also a charge sign, terms are separated only by a plus with
whitespace on both sides: ``H+ + e-`` is two terms, ``H++e-`` is an error.

Canonical printing: terms keep their written order, species print in their
canonical spelling, a coefficient of 1 is omitted, fractions print as
``1/2``; the arrow prints as ``->`` or ``=``. Two reactions are equal when
each side holds the same multiset of (coefficient, species) terms.
"""

from __future__ import annotations

__all__ = [
    "Reaction",
    "Term",
    "balance_delta",
    "check_balanced",
    "format_coeff",
    "parse_reaction",
]

import re
from collections import Counter
from dataclasses import dataclass
from fractions import Fraction
from functools import cached_property, lru_cache
from typing import Literal

from sitegen.chem.errors import FormulaError, Unbalanced, UnknownElement
from sitegen.chem.formula import Species, parse_species

Arrow = Literal["->", "="]

_ARROWS: tuple[tuple[str, Arrow], ...] = (
    # longest spellings first so "<=>" is not read as "="
    ("<=>", "="),
    ("->", "->"),
    ("→", "->"),
    ("⟶", "->"),
    ("⇌", "="),
    ("⇄", "="),
    ("=", "="),
)
# Longest coefficient text accepted (e.g. "123456/1000000"); avoids huge ints.
_MAX_COEFF_CHARS = 15
_PLUS = re.compile(r"\s+\+\s+")
_COEFF = re.compile(r"(\d+/\d+|\d+\.\d+|\.\d+|\d+)\s*")


def format_coeff(q: Fraction) -> str:
    """Print a coefficient: ``2``, ``1/2`` (``1`` is printed, callers omit it)."""
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


@dataclass(frozen=True)
class Term:
    """One term of a reaction side: a positive coefficient times a species."""

    coeff: Fraction
    """Stoichiometric coefficient (> 0)."""
    species: Species
    """The species."""

    def __post_init__(self) -> None:
        object.__setattr__(self, "coeff", Fraction(self.coeff))
        if self.coeff <= 0:
            raise ValueError("a term's coefficient must be positive")

    @property
    def canonical(self) -> str:
        """``"8 H+"``, ``"1/2 O2"``, or just the species when the coefficient is 1."""
        if self.coeff == 1:
            return self.species.canonical
        return f"{format_coeff(self.coeff)} {self.species.canonical}"


def _side_key(terms: tuple[Term, ...]) -> tuple[tuple[str, Fraction], ...]:
    return tuple(sorted(Counter((t.species.canonical, t.coeff) for t in terms).elements()))


@dataclass(frozen=True, eq=False)
class Reaction:
    """A reaction ``left ARROW right``.

    ``arrow`` is ``'->'`` for a reaction and ``'='`` for a half-reaction,
    couple or equilibrium. Equality and hashing treat each side as a
    multiset of terms.
    """

    left: tuple[Term, ...]
    """Reactant terms, in written order."""
    right: tuple[Term, ...]
    """Product terms, in written order."""
    arrow: Arrow = "->"
    """``'->'`` or ``'='``."""

    def __post_init__(self) -> None:
        if self.arrow not in ("->", "="):
            raise ValueError(f"arrow must be '->' or '=', not {self.arrow!r}")
        object.__setattr__(self, "left", tuple(self.left))
        object.__setattr__(self, "right", tuple(self.right))

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Reaction):
            return NotImplemented
        return self._key == other._key

    def __hash__(self) -> int:
        return hash(self._key)

    @cached_property
    def _key(self) -> tuple[object, ...]:
        return (_side_key(self.left), _side_key(self.right), self.arrow)

    @property
    def electrons(self) -> Fraction:
        """Net electrons on the left (positive for a reduction half)."""
        left = sum((t.coeff for t in self.left if t.species.is_electron), Fraction(0))
        right = sum((t.coeff for t in self.right if t.species.is_electron), Fraction(0))
        return left - right

    @property
    def is_half(self) -> bool:
        """True when the electron appears on either side."""
        return any(t.species.is_electron for t in (*self.left, *self.right))

    @cached_property
    def canonical(self) -> str:
        """e.g. ``MnO4- + 8 H+ + 5 e- = Mn^2+ + 4 H2O``."""
        lhs = " + ".join(t.canonical for t in self.left)
        rhs = " + ".join(t.canonical for t in self.right)
        return f"{lhs} {self.arrow} {rhs}"

    def __str__(self) -> str:
        return self.canonical

    def scaled(self, k: Fraction | int) -> Reaction:
        """Every coefficient multiplied by ``k`` (> 0)."""
        k = Fraction(k)
        if k <= 0:
            raise ValueError("scale factor must be positive")
        return Reaction(
            tuple(Term(t.coeff * k, t.species) for t in self.left),
            tuple(Term(t.coeff * k, t.species) for t in self.right),
            self.arrow,
        )

    def reversed(self) -> Reaction:
        """Products and reactants swapped."""
        return Reaction(self.right, self.left, self.arrow)

    def species(self) -> tuple[Species, ...]:
        """Distinct species, reactants first, in written order."""
        seen: dict[Species, None] = {}
        for t in (*self.left, *self.right):
            seen.setdefault(t.species, None)
        return tuple(seen)

    def coefficient(self, species: Species | str) -> Fraction:
        """Net coefficient of ``species``: products minus reactants."""
        sp = parse_species(species) if isinstance(species, str) else species
        sp = sp.without_state()
        right = sum((t.coeff for t in self.right if t.species == sp), Fraction(0))
        left = sum((t.coeff for t in self.left if t.species == sp), Fraction(0))
        return right - left


def _parse_coeff(text: str, term: str, offset: int) -> tuple[Fraction, int]:
    """Leading coefficient of one term and where the species starts."""
    m = _COEFF.match(term)
    if not m:
        return Fraction(1), 0
    raw = m.group(1)
    if len(raw) > _MAX_COEFF_CHARS:
        raise FormulaError(text, offset, f"coefficient longer than {_MAX_COEFF_CHARS} characters")
    if "/" in raw:
        num, den = raw.split("/")
        if int(den) == 0:
            raise FormulaError(text, offset, "zero denominator in a coefficient")
        q = Fraction(int(num), int(den))
    else:
        q = Fraction(raw)
    if q == 0:
        raise FormulaError(text, offset, "zero coefficient")
    return q, m.end()


def _parse_side(text: str, start: int, end: int) -> tuple[Term, ...]:
    segment = text[start:end]
    if not segment.strip():
        raise FormulaError(text, start, "empty side of a reaction")
    terms: list[Term] = []
    pos = 0
    pieces: list[tuple[int, int]] = []
    for m in _PLUS.finditer(segment):
        pieces.append((pos, m.start()))
        pos = m.end()
    pieces.append((pos, len(segment)))
    for a, b in pieces:
        raw = segment[a:b]
        lead = len(raw) - len(raw.lstrip())
        body = raw.strip()
        at = start + a + lead
        if not body:
            raise FormulaError(text, at, "missing term")
        coeff, skip = _parse_coeff(text, body, at)
        sp_text = body[skip:]
        if not sp_text:
            raise FormulaError(text, at + skip, "coefficient without a species")
        try:
            sp = parse_species(sp_text)
        except FormulaError as e:
            raise e.shifted(text, at + skip) from None
        except UnknownElement as e:
            raise UnknownElement(
                e.symbol, None if e.index is None else e.index + at + skip
            ) from None
        terms.append(Term(coeff, sp.without_state()))
    return tuple(terms)


@lru_cache(maxsize=8192)
def parse_reaction(text: str) -> Reaction:
    """Parse a reaction or half-reaction.

    Args:
        text: e.g. ``"MnO4- + 8 H+ + 5 e- = Mn^2+ + 4 H2O"``.

    Returns:
        The :class:`Reaction` (state labels are dropped from the species).

    Raises:
        FormulaError: with ``index`` a 0-based offset into the whole ``text``.
        UnknownElement: with ``index`` likewise into ``text``.
    """
    found: list[tuple[int, str, Arrow]] = []
    i = 0
    while i < len(text):
        for spelling, kind in _ARROWS:
            if text.startswith(spelling, i):
                # "->" is an arrow, but a "-" that ends a charge ("MnO4-")
                # followed by ">" cannot occur otherwise, so no ambiguity.
                found.append((i, spelling, kind))
                i += len(spelling) - 1
                break
        i += 1
    if not found:
        raise FormulaError(text, len(text.rstrip()), "no reaction arrow ('->' or '=')")
    if len(found) > 1:
        raise FormulaError(text, found[1][0], "more than one reaction arrow")
    at, spelling, kind = found[0]
    left = _parse_side(text, 0, at)
    right = _parse_side(text, at + len(spelling), len(text))
    return Reaction(left, right, kind)


def balance_delta(r: Reaction) -> tuple[dict[str, Fraction], Fraction]:
    """Atom and charge imbalance of a reaction.

    Returns:
        ``(atoms, charge)``: per element, products minus reactants (only
        non-zero entries), and charge of products minus reactants.
    """
    atoms: dict[str, Fraction] = {}
    charge = Fraction(0)
    for sign, terms in ((-1, r.left), (1, r.right)):
        for t in terms:
            for sym, n in t.species.composition.items():
                atoms[sym] = atoms.get(sym, Fraction(0)) + sign * t.coeff * n
            charge += sign * t.coeff * t.species.charge
    return {s: d for s, d in sorted(atoms.items()) if d != 0}, charge


def check_balanced(r: Reaction) -> None:
    """Raise :class:`Unbalanced` unless atoms and charge balance.

    Raises:
        Unbalanced: carrying the per-element and charge deltas.
    """
    atoms, charge = balance_delta(r)
    if atoms or charge:
        raise Unbalanced(atoms, charge)
