"""Chemistry errors. They carry numbers and chemical data, never file positions.

The only position-like datum is ``FormulaError.index``: a 0-based character
offset inside the *text that was parsed* (a species or a reaction string), so
a caller that knows where that text came from can put a caret under the right
column. Mapping it to a file line is the loader's job, not ours.

Hierarchy::

    ChemError
     +-- FormulaError          text could not be parsed
     +-- UnknownElement        symbol is not in the element table
     +-- NoAtomicWeight        element has no standard atomic weight
     +-- Unbalanced            atoms or charge differ between the two sides
     +-- CannotBalance         no unique balanced equation / undecidable state
     +-- NoChain               no stoichiometric path analyte -> titrant
"""

from __future__ import annotations

__all__ = [
    "CannotBalance",
    "ChemError",
    "FormulaError",
    "NoAtomicWeight",
    "NoChain",
    "Unbalanced",
    "UnknownElement",
]

from fractions import Fraction


def _fmt(q: Fraction) -> str:
    """Print a Fraction as an integer when it is one, else as ``p/q``."""
    return str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


class ChemError(Exception):
    """Base class of every error raised by :mod:`sitegen.chem`."""


class FormulaError(ChemError):
    """A species or reaction text could not be parsed.

    Args:
        text: The text that was being parsed.
        index: 0-based character offset in ``text`` where parsing failed.
        reason: What is wrong, in plain words.
        suggestion: A corrected spelling when one is obvious, else ``None``.
    """

    def __init__(self, text: str, index: int, reason: str, suggestion: str | None = None):
        self.text = text
        self.index = index
        self.reason = reason
        self.suggestion = suggestion
        msg = f"{reason} at character {index + 1} of {text!r}"
        if suggestion is not None:
            msg += f"; did you mean {suggestion!r}?"
        super().__init__(msg)

    def shifted(self, text: str, offset: int) -> FormulaError:
        """Return the same error re-anchored inside a larger ``text``.

        Used by the reaction parser so the index points into the whole
        reaction string, not into one term.
        """
        return FormulaError(text, self.index + offset, self.reason, self.suggestion)


class UnknownElement(ChemError):
    """An element symbol that is not in the table of elements.

    Args:
        symbol: The offending symbol, as written.
        index: 0-based offset of the symbol in the parsed text, if known.
    """

    def __init__(self, symbol: str, index: int | None = None):
        self.symbol = symbol
        self.index = index
        super().__init__(f"unknown element symbol {symbol!r}")


class NoAtomicWeight(ChemError):
    """The element exists but has no standard atomic weight (e.g. Tc, Pm, Po).

    Args:
        symbol: The element symbol.
    """

    def __init__(self, symbol: str):
        self.symbol = symbol
        super().__init__(f"element {symbol!r} has no standard atomic weight (no stable isotope)")


class Unbalanced(ChemError):
    """A reaction whose atoms or charge do not balance.

    Args:
        atoms_delta: Element symbol -> (products - reactants) atom count, only
            the non-zero entries.
        charge_delta: Charge of products minus charge of reactants
            (elementary charges).
    """

    def __init__(self, atoms_delta: dict[str, Fraction], charge_delta: Fraction):
        self.atoms_delta = dict(atoms_delta)
        self.charge_delta = Fraction(charge_delta)
        parts = []
        for sym in sorted(self.atoms_delta):
            d = self.atoms_delta[sym]
            side = "products" if d > 0 else "reactants"
            parts.append(f"{sym} is off by {_fmt(abs(d))} (excess on the {side} side)")
        if self.charge_delta != 0:
            side = "products" if self.charge_delta > 0 else "reactants"
            parts.append(
                f"charge is off by {_fmt(abs(self.charge_delta))} "
                f"(more positive on the {side} side)"
            )
        super().__init__("unbalanced: " + "; ".join(parts) if parts else "unbalanced")


class CannotBalance(ChemError):
    """No unique balanced equation (or oxidation state) could be found.

    Args:
        reason: Why, in plain words.
        species: Canonical spellings of the species involved.
    """

    def __init__(self, reason: str, species: tuple[str, ...]):
        self.reason = reason
        self.species = tuple(species)
        super().__init__(f"cannot balance: {reason} (species: {', '.join(self.species)})")


class NoChain(ChemError):
    """No stoichiometric path links the analyte to the titrant.

    Args:
        analyte: Canonical spelling of the analyte.
        titrant: Canonical spelling of the titrant (or excess reagent).
        reason: Why no (unique) path exists.
    """

    def __init__(self, analyte: str, titrant: str, reason: str):
        self.analyte = analyte
        self.titrant = titrant
        self.reason = reason
        super().__init__(f"no stoichiometric chain from {analyte} to {titrant}: {reason}")
