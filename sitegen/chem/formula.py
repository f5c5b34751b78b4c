"""Chemical species: parsing, canonical printing and molar mass.

Grammar (whitespace is allowed only around the whole text)::

    species  := electron | formula charge? state?
    electron := "e" ( "-" | MINUS | "⁻" | "^-" | "^{-}" )
    formula  := part ( DOT mult? part )*          adducts / hydrates
    DOT      := "·" | "•" | "∙" | "⋅" | "*" | "."
    mult     := DIGITS                            e.g. the 7 in FeSO4·7H2O
    part     := group+
    group    := ( ELEMENT | "(" group+ ")" | "[" group+ "]" ) count?
    count    := DIGITS | SUBSCRIPT_DIGITS         1.. (no zero, no leading 0)
    ELEMENT  := [A-Z][a-z]?                       must be a known element
    charge   := "^" body | "^{" body "}"          Fe^3+, Fe^{3+}, Fe^+3, Cr2O7^2-
              | SUPER_DIGITS? SUPER_SIGN          Fe³⁺, SO₄²⁻, MnO₄⁻
              | SUPER_SIGN SUPER_DIGITS           Fe⁺³
              | SIGN+                             MnO4-, H+, SO4--  (|charge| = #signs)
    body     := DIGITS? SIGN | SIGN DIGITS?
    SIGN     := "+" | "-" | MINUS               MINUS is U+2212
    state    := "(aq)" | "(s)" | "(l)" | "(g)"

The first part of a formula may not carry a leading number: in a reaction a
leading number is the stoichiometric coefficient (see
:mod:`sitegen.chem.reaction`). Adduct multipliers are whole numbers.

Ambiguous bare charges. A bare sign directly after an ASCII digit is read as
"count, then charge 1" (``MnO4-``, ``NH4+``, ``I3-``) except where the other
reading "the digit is the charge" is just as plausible; those are rejected
with a :class:`~sitegen.chem.errors.FormulaError` whose ``suggestion`` is the
caret form:

* the digit run before the sign has two or more digits (``SO42-`` ->
  ``SO4^2-``, ``PO43-``),
* the digit run multiplies a bracket (``[Fe(CN)6]3-`` -> ``[Fe(CN)6]^3-``),
* the formula is a single element written once and the sign is ``+``
  (``Fe3+`` -> ``Fe^3+``; any monatomic cation of that charge is plausible),
* the formula is a single element written once, the sign is ``-`` and the
  element forms the monatomic anion of that charge (group 14 with 4-,
  group 15 with 3-, group 16 with 2-: ``S2-`` -> ``S^2-``, ``N3-``). So
  ``I3-`` (I^3- does not exist) is triiodide and ``O3-`` is ozonide.

Canonical spelling (:attr:`Species.canonical`). Each adduct part is printed
with its atoms summed (brackets are not kept, so ``(NH4)2SO4`` prints as
``H8N2SO4``) in this deterministic element order:

1. Parts containing both C and H: Hill order (C, H, then alphabetical),
   as in the CRC Handbook formula index: ``C6H8O6``, ``C2H2O4``; except
   a part with exactly one C and one H (hydrogencarbonate, ``NaHCO3``,
   ``HCO3-``), which follows rule 3.
2. The part that is exactly OH prints as ``OH`` (hydroxide).
3. Otherwise elements follow the electronegativity sequence of the IUPAC
   2005 Red Book, Table VI (electropositive first; from memory), with two
   documented changes so oxo-species read as chemists write them: O is
   moved to just before F (``IO3-``, ``ClO4-``, ``Cl2O7``), and in a part
   that contains O, H is moved to just before B (``H2SO4``, ``HNO3``,
   ``H3AsO3``, ``NaHCO3``). Without O, H keeps its Table VI place after N
   (``NH4+``, ``H2S``, ``HCl``).

Adduct parts after the first are merged when identical and sorted with water
last (``FeSO4·7H2O``); the separator printed is ``·`` (U+00B7). The charge
prints as a bare sign for +/-1 (``MnO4-``, ``H+``) unless that would be
ambiguous by the rules above (then ``O2^-``), else as ``^n+`` / ``^n-``
(``Fe^3+``, ``Cr2O7^2-``). The physical state is not part of the canonical
spelling (nor of equality).
"""

from __future__ import annotations

__all__ = ["Species", "molar_mass", "parse_species"]

import math
from collections import Counter
from dataclasses import dataclass, field
from functools import cached_property, lru_cache

from sitegen.chem.elements import atomic_weight, element_symbols
from sitegen.chem.errors import FormulaError, UnknownElement

Part = tuple[int, tuple[tuple[str, int], ...]]

# IUPAC Nomenclature of Inorganic Chemistry, Recommendations 2005, Table VI
# (element sequence, electropositive end first; from memory), modified as
# documented in the module docstring: O moved to just before F.
# fmt: off
_SEQUENCE = (
    "Og", "Rn", "Xe", "Kr", "Ar", "Ne", "He", "Fr", "Cs", "Rb", "K", "Na", "Li", "Ra", "Ba", "Sr",
    "Ca", "Mg", "Be", "Lr", "No", "Md", "Fm", "Es", "Cf", "Bk", "Cm", "Am", "Pu", "Np", "U", "Pa",
    "Th", "Ac", "Lu", "Yb", "Tm", "Er", "Ho", "Dy", "Tb", "Gd", "Eu", "Sm", "Pm", "Nd", "Pr",
    "Ce", "La", "Y", "Sc", "Rf", "Hf", "Zr", "Ti", "Db", "Ta", "Nb", "V", "Sg", "W", "Mo", "Cr",
    "Bh", "Re", "Tc", "Mn", "Hs", "Os", "Ru", "Fe", "Mt", "Ir", "Rh", "Co", "Ds", "Pt", "Pd",
    "Ni", "Rg", "Au", "Ag", "Cu", "Cn", "Hg", "Cd", "Zn", "Nh", "Tl", "In", "Ga", "Al", "B", "Fl",
    "Pb", "Sn", "Ge", "Si", "C", "Mc", "Bi", "Sb", "As", "P", "N", "H", "Lv", "Po", "Te", "Se",
    "S", "Ts", "At", "I", "Br", "Cl", "O", "F",
)
# fmt: on
_RANK = {s: float(i) for i, s in enumerate(_SEQUENCE)}
# H placed just before B in oxygen-containing parts (oxoacid convention).
_H_WITH_O_RANK = _RANK["B"] - 0.5

# Monatomic anions whose charge equals a plausible single-digit count, by
# periodic group (group 14: 4-, 15: 3-, 16: 2-); common practice.
_ANION_CHARGE = {
    "C": 4, "Si": 4, "Ge": 4,
    "N": 3, "P": 3, "As": 3, "Sb": 3,
    "O": 2, "S": 2, "Se": 2, "Te": 2,
}  # fmt: skip

_DOTS = "·•∙⋅*."
_MINUS = "\u2212"  # Unicode MINUS SIGN, accepted like "-"
_SIGNS = {"+": 1, "-": -1, _MINUS: -1}
_SUPER_SIGNS = {"⁺": 1, "⁻": -1}
_SUPER_DIGITS = {c: str(i) for i, c in enumerate("⁰¹²³⁴⁵⁶⁷⁸⁹")}
_SUB_DIGITS = {c: str(i) for i, c in enumerate("₀₁₂₃₄₅₆₇₈₉")}
_STATES = ("aq", "s", "l", "g")
_ELECTRON_SPELLINGS = frozenset({"e-", "e" + _MINUS, "e⁻", "e^-", "e^{-}", "e^" + _MINUS})
_SEPARATOR = "·"
# Longest count or charge accepted; keeps int() far from Python's
# 4300-digit conversion limit and rejects nonsense early.
_MAX_DIGITS = 6


def _order(counts: dict[str, int]) -> tuple[tuple[str, int], ...]:
    """Canonical element order of one adduct part (see module docstring)."""
    if "C" in counts and "H" in counts and (counts["C"], counts["H"]) != (1, 1):
        rest = sorted(s for s in counts if s not in ("C", "H"))
        return tuple((s, counts[s]) for s in ["C", "H", *rest])
    if counts == {"O": 1, "H": 1}:
        return (("O", 1), ("H", 1))
    has_o = "O" in counts

    def key(sym: str) -> float:
        if sym == "H" and has_o:
            return _H_WITH_O_RANK
        return _RANK[sym]

    return tuple((s, counts[s]) for s in sorted(counts, key=key))


def _part_text(atoms: tuple[tuple[str, int], ...]) -> str:
    return "".join(s if n == 1 else f"{s}{n}" for s, n in atoms)


def _bare_sign_ambiguous(
    digits: str, single_element: str | None, sign: int, after_bracket: bool
) -> bool:
    """Whether ``<digits><one sign>`` could equally mean a charge of ``digits``.

    Args:
        digits: The ASCII digit run written just before the sign.
        single_element: The element symbol if the formula is that element
            written once (``Fe3``), else ``None``.
        sign: +1 or -1.
        after_bracket: The digits multiply a bracketed group.
    """
    if len(digits) >= 2 or after_bracket:
        return True
    if single_element is None:
        return False
    if sign > 0:
        return True
    return _ANION_CHARGE.get(single_element) == int(digits)


@dataclass(frozen=True)
class Species:
    """A chemical species: adduct parts, charge and (optional) state.

    ``parts`` is normalised on construction: atoms within a part are merged
    and put in canonical order, later parts are merged and sorted. Two
    species are equal when parts and charge are equal; ``state`` is ignored
    for equality and hashing.
    """

    parts: tuple[Part, ...]
    """Adduct parts ``(multiplier, ((symbol, count), ...))``; the first
    part has multiplier 1. The electron has no parts."""
    charge: int = 0
    """Net charge in elementary charges."""
    state: str | None = field(default=None, compare=False)
    """Physical state label: 'aq', 's', 'l', 'g' or None."""

    def __post_init__(self) -> None:
        norm: list[Part] = []
        for mult, atoms in self.parts:
            counts: Counter[str] = Counter()
            for sym, n in atoms:
                counts[sym] += n
            if mult < 1 or any(n < 1 for n in counts.values()) or not counts:
                raise ValueError(f"invalid species part {(mult, atoms)!r}")
            norm.append((mult, _order(dict(counts))))
        if norm and norm[0][0] != 1:
            raise ValueError("the first part of a species must have multiplier 1")
        if len(norm) > 1:
            merged: Counter[tuple[tuple[str, int], ...]] = Counter()
            for mult, atoms in norm[1:]:
                merged[atoms] += mult
            rest = sorted(
                merged.items(), key=lambda kv: (kv[0] == (("H", 2), ("O", 1)), _part_text(kv[0]))
            )
            norm = [norm[0], *((m, a) for a, m in rest)]
        if not norm and self.charge != -1:
            raise ValueError("a species without atoms must be the electron (charge -1)")
        if self.state is not None and self.state not in _STATES:
            raise ValueError(f"unknown state {self.state!r}")
        object.__setattr__(self, "parts", tuple(norm))
        object.__setattr__(self, "charge", int(self.charge))

    @cached_property
    def composition(self) -> dict[str, int]:
        """Total atoms per element symbol, all adduct parts summed."""
        total: Counter[str] = Counter()
        for mult, atoms in self.parts:
            for sym, n in atoms:
                total[sym] += mult * n
        return dict(total)

    @property
    def is_electron(self) -> bool:
        """True for the electron ``e-`` (no atoms, charge -1)."""
        return not self.parts and self.charge == -1

    @cached_property
    def canonical(self) -> str:
        """The one canonical spelling (see module docstring)."""
        if not self.parts:
            return "e-" if self.charge == -1 else _charge_text(self.charge, True)
        texts = [_part_text(self.parts[0][1])]
        for mult, atoms in self.parts[1:]:
            texts.append((str(mult) if mult > 1 else "") + _part_text(atoms))
        body = _SEPARATOR.join(texts)
        if self.charge in (1, -1):
            last = self.parts[-1][1]
            sym, n = last[-1]
            single = sym if len(self.parts) == 1 and len(last) == 1 else None
            ambiguous = n > 1 and _bare_sign_ambiguous(str(n), single, self.charge, False)
            return body + _charge_text(self.charge, not ambiguous)
        return body + _charge_text(self.charge, True)

    @property
    def label(self) -> str:
        """Canonical spelling followed by the state, e.g. ``Fe^3+(aq)``."""
        return self.canonical + (f"({self.state})" if self.state else "")

    def without_state(self) -> Species:
        """The same species with ``state=None`` (``self`` if already so)."""
        if self.state is None:
            return self
        return Species(self.parts, self.charge)

    def __str__(self) -> str:
        return self.canonical


def _charge_text(charge: int, bare_ok: bool) -> str:
    if charge == 0:
        return ""
    sign = "+" if charge > 0 else "-"
    if abs(charge) == 1:
        return sign if bare_ok else "^" + sign
    return f"^{abs(charge)}{sign}"


ELECTRON = Species((), -1)


class _Parser:
    """Recursive-descent parser over ``text[start:end]``."""

    def __init__(self, text: str, start: int, end: int):
        self.t = text
        self.i = start
        self.end = end
        self.symbols = element_symbols()
        # Info about the most recent ASCII count, for the ambiguity rule.
        self.last_digits = ""
        self.last_digits_end = -1
        self.last_after_bracket = False
        self.n_groups_top = 0
        self.first_symbol: str | None = None
        self.n_parts = 0

    def fail(
        self, reason: str, at: int | None = None, suggestion: str | None = None
    ) -> FormulaError:
        return FormulaError(self.t, self.i if at is None else at, reason, suggestion)

    def peek(self) -> str:
        return self.t[self.i] if self.i < self.end else ""

    def count(self, allow_ascii: bool = True) -> int | None:
        start = self.i
        digits = ""
        table = None
        while self.i < self.end:
            c = self.t[self.i]
            if c.isascii() and c.isdigit() and table in (None, "ascii") and allow_ascii:
                table = "ascii"
                digits += c
            elif c in _SUB_DIGITS and table in (None, "sub"):
                table = "sub"
                digits += _SUB_DIGITS[c]
            else:
                break
            self.i += 1
        if not digits:
            return None
        if len(digits) > _MAX_DIGITS:
            raise self.fail(f"count longer than {_MAX_DIGITS} digits", start)
        if digits[0] == "0":
            raise self.fail("zero count" if int(digits) == 0 else "leading zero in a count", start)
        if table == "ascii":
            self.last_digits = digits
            self.last_digits_end = self.i
        else:
            self.last_digits = ""
            self.last_digits_end = -1
        return int(digits)

    def groups(self, closer: str | None, depth: int) -> Counter[str]:
        total: Counter[str] = Counter()
        n = 0
        while True:
            c = self.peek()
            start = self.i
            if (
                c == ""
                or c in _DOTS
                or c in "^+-"
                or c == _MINUS
                or c in _SUPER_SIGNS
                or c in _SUPER_DIGITS
            ):
                break
            if c in ")]":
                if closer is None:
                    raise self.fail(f"unmatched {c!r}")
                if c != closer:
                    raise self.fail(f"expected {closer!r} but found {c!r}")
                break
            if c in "([":
                self.i += 1
                inner = self.groups(")" if c == "(" else "]", depth + 1)
                if self.peek() != (")" if c == "(" else "]"):
                    raise self.fail(f"unclosed {c!r}", start)
                self.i += 1
                after = True
                group = inner
            elif c.isascii() and c.isupper():
                sym = c
                if (
                    self.i + 1 < self.end
                    and self.t[self.i + 1].isascii()
                    and self.t[self.i + 1].islower()
                ):
                    sym += self.t[self.i + 1]
                if sym not in self.symbols:
                    raise UnknownElement(sym, start)
                self.i += len(sym)
                after = False
                group = Counter({sym: 1})
                if depth == 0 and self.first_symbol is None:
                    self.first_symbol = sym
            elif c.isascii() and c.islower():
                raise self.fail("element symbols start with a capital letter")
            elif c.isdigit() or c in _SUB_DIGITS:
                raise self.fail("a count must follow an element or a bracket")
            else:
                raise self.fail(f"unexpected character {c!r}")
            k = self.count()
            if k is None:
                self.last_digits = ""
                self.last_digits_end = -1
            else:
                self.last_after_bracket = after
            for sym, m in group.items():
                total[sym] += m * (k or 1)
            n += 1
            if depth == 0:
                self.n_groups_top += 1
        if n == 0:
            raise self.fail("empty group" if closer else "expected an element symbol")
        return total

    def charge(self) -> int:
        c = self.peek()
        start = self.i
        if c == "^":
            self.i += 1
            brace = self.peek() == "{"
            if brace:
                self.i += 1
            digits = ""
            sign = 0
            if self.peek() in _SIGNS:
                sign = _SIGNS[self.peek()]
                self.i += 1
                while self.peek().isascii() and self.peek().isdigit():
                    digits += self.peek()
                    self.i += 1
            else:
                while self.peek().isascii() and self.peek().isdigit():
                    digits += self.peek()
                    self.i += 1
                if self.peek() not in _SIGNS:
                    raise self.fail("charge needs a sign (+ or -) after '^'")
                sign = _SIGNS[self.peek()]
                self.i += 1
            if brace:
                if self.peek() != "}":
                    raise self.fail("expected '}' to close the charge")
                self.i += 1
            if len(digits) > _MAX_DIGITS:
                raise self.fail(f"charge longer than {_MAX_DIGITS} digits", start)
            if digits and int(digits) == 0:
                raise self.fail("zero charge magnitude", start)
            return sign * int(digits or "1")
        if c in _SUPER_SIGNS or c in _SUPER_DIGITS:
            digits = ""
            sign = 0
            if c in _SUPER_SIGNS:
                sign = _SUPER_SIGNS[c]
                self.i += 1
                while self.peek() in _SUPER_DIGITS:
                    digits += _SUPER_DIGITS[self.peek()]
                    self.i += 1
            else:
                while self.peek() in _SUPER_DIGITS:
                    digits += _SUPER_DIGITS[self.peek()]
                    self.i += 1
                if self.peek() not in _SUPER_SIGNS:
                    raise self.fail("superscript charge needs a sign (⁺ or ⁻)")
                sign = _SUPER_SIGNS[self.peek()]
                self.i += 1
            if len(digits) > _MAX_DIGITS:
                raise self.fail(f"charge longer than {_MAX_DIGITS} digits", start)
            if digits and int(digits) == 0:
                raise self.fail("zero charge magnitude", start)
            return sign * int(digits or "1")
        # bare signs
        sign = _SIGNS[c]
        n = 0
        while self.peek() in _SIGNS:
            if _SIGNS[self.peek()] != sign:
                raise self.fail("mixed + and - in a charge")
            n += 1
            self.i += 1
        if n == 1 and self.last_digits and self.last_digits_end == start:
            single = (
                self.first_symbol
                if self.n_groups_top == 1 and not self.last_after_bracket
                else None
            )
            if self.n_parts > 1:
                single = None
            if _bare_sign_ambiguous(self.last_digits, single, sign, self.last_after_bracket):
                d0 = start - 1
                sugg = self.t[:d0] + "^" + self.t[d0] + self.t[start : self.end]
                sugg = sugg.strip()
                alt = self.t[:start].strip() + "^" + c
                raise FormulaError(
                    self.t,
                    d0,  # the digit before which the caret belongs
                    f"ambiguous charge {self.last_digits + c!r}: write the charge with a caret, "
                    f"e.g. {sugg!r} (charge {self.t[d0]}{c}) or {alt!r} (charge 1{c})",
                    sugg,
                )
        if n == 1 and self.peek().isascii() and self.peek().isdigit():
            # "Fe+3", "SO4-2": sign before the magnitude needs the caret.
            j = self.i
            while j < self.end and self.t[j].isascii() and self.t[j].isdigit():
                j += 1
            digits = self.t[self.i : j]
            sugg = (self.t[:start] + "^" + digits + c + self.t[j : self.end]).strip()
            raise self.fail(
                "a charge written sign-first needs a caret, magnitude first is canonical",
                suggestion=sugg,
            )
        return sign * n


@lru_cache(maxsize=8192)
def parse_species(text: str) -> Species:
    """Parse a species written in the grammar of this module.

    Args:
        text: e.g. ``"MnO4-"``, ``"Fe^3+"``, ``"FeSO4·7H2O"``, ``"SO₄²⁻"``.

    Returns:
        The :class:`Species`.

    Raises:
        FormulaError: malformed text; ``index`` is the 0-based offset.
        UnknownElement: a symbol that is not an element.
    """
    start = len(text) - len(text.lstrip())
    end = len(text.rstrip())
    if start >= end:
        raise FormulaError(text, 0, "empty formula")
    state = None
    if text[end - 1] == ")":
        for st in _STATES:
            suffix = f"({st})"
            if text[start:end].endswith(suffix) and end - len(suffix) > start:
                state = st
                end -= len(suffix)
                break
    body = text[start:end]
    if body in _ELECTRON_SPELLINGS:
        return Species((), -1, state)
    if body.startswith("e") and (len(body) == 1 or not body[1].islower()):
        raise FormulaError(text, start, "the electron is written 'e-'", "e-")
    p = _Parser(text, start, end)
    parts: list[Part] = []
    while True:
        mult = 1
        if parts:
            m = p.count()
            if m is not None:
                mult = m
        elif p.peek().isdigit() or p.peek() in _SUB_DIGITS:
            raise p.fail(
                "a formula cannot start with a number (a coefficient belongs to a reaction)"
            )
        p.n_parts = len(parts) + 1
        p.n_groups_top = 0
        counts = p.groups(None, 0)
        parts.append((mult, tuple(counts.items())))
        if p.peek() and p.peek() in _DOTS:
            p.i += 1
            if p.i >= p.end:
                raise p.fail("adduct separator must be followed by a formula")
            continue
        break
    charge = 0
    if p.i < p.end:
        charge = p.charge()
    if p.i < p.end:
        raise p.fail(f"unexpected character {p.t[p.i]!r}")
    return Species(tuple(parts), charge, state)


@lru_cache(maxsize=8192)
def _molar_mass(species: Species) -> tuple[float, float]:
    value = 0.0
    var = 0.0
    for sym, n in sorted(species.composition.items()):
        w, u = atomic_weight(sym)
        value += n * w
        # Atoms of one element share one atomic weight: fully correlated, so
        # their uncertainties add linearly (n*u); different elements are
        # taken as independent and add in quadrature (GUM 5.1.2).
        var += (n * u) ** 2
    return value, math.sqrt(var)


def molar_mass(species: Species | str) -> tuple[float, float]:
    """Molar mass from the 2021 abridged standard atomic weights.

    Args:
        species: A :class:`Species` or its text.

    Returns:
        ``(M, u)`` in g/mol: value and standard uncertainty (element
        uncertainties as in :func:`sitegen.chem.elements.atomic_weight`).
        The electron's own mass is neglected (charge changes M by less than
        0.001 g/mol per elementary charge).

    Raises:
        NoAtomicWeight: the species contains an element without one.
    """
    if isinstance(species, str):
        species = parse_species(species)
    return _molar_mass(species.without_state())
