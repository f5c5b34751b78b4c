"""Element table: symbols, atomic numbers and standard atomic weights.

Values: IUPAC/CIAAW 2021 *abridged* standard atomic weights (five significant
figures), T. Prohaska et al., Pure Appl. Chem. 94 (2022) 573-600, "Standard
atomic weights of the elements 2021 (IUPAC Technical Report)", Table 2. The
table lives in :mod:`sitegen.chem._atomic_weights` as a Python literal (typed
from memory; checked against ``periodictable`` in the reference tests).

Uncertainty convention: the abridged table gives ``value +/- a`` where ``a``
is the half-width of an interval expected to contain the atomic weight of
any normal material. Following the GUM (JCGM 100:2008, 4.3.7) and the
EURACHEM/CITAC guide "Quantifying Uncertainty in Analytical Measurement"
(3rd ed., 2012, section 8.1 / Appendix E), such an interval is treated as a
rectangular distribution, so the standard uncertainty is ``u = a / sqrt(3)``.
:func:`atomic_weight` returns that standard uncertainty.
"""

from __future__ import annotations

__all__ = ["atomic_number", "atomic_weight", "element_symbols", "half_width"]

import math
from functools import cache

from sitegen.chem._atomic_weights import ABRIDGED_2021
from sitegen.chem.errors import NoAtomicWeight, UnknownElement

# GUM 4.3.7: rectangular distribution of half-width a has u = a/sqrt(3).
_RECTANGULAR = 1.0 / math.sqrt(3.0)

_SYMBOLS: frozenset[str] = frozenset(ABRIDGED_2021)


def element_symbols() -> frozenset[str]:
    """Return every known element symbol (H..Og, 118 elements)."""
    return _SYMBOLS


def atomic_number(symbol: str) -> int:
    """Return the atomic number Z of ``symbol``.

    Raises:
        UnknownElement: ``symbol`` is not an element.
    """
    try:
        return ABRIDGED_2021[symbol][0]
    except KeyError:
        raise UnknownElement(symbol) from None


def half_width(symbol: str) -> float:
    """Return the abridged table's +/- half-width for ``symbol`` (g/mol).

    Raises:
        UnknownElement: ``symbol`` is not an element.
        NoAtomicWeight: the element has no standard atomic weight.
    """
    return _entry(symbol)[1]


@cache
def atomic_weight(symbol: str) -> tuple[float, float]:
    """Standard atomic weight of an element.

    Args:
        symbol: Element symbol, e.g. ``"Fe"``.

    Returns:
        ``(value, u)`` in g/mol: the abridged 2021 value and its standard
        uncertainty (half-width / sqrt(3), rectangular distribution).

    Raises:
        UnknownElement: ``symbol`` is not an element.
        NoAtomicWeight: the element has no standard atomic weight.
    """
    value, a = _entry(symbol)
    return value, a * _RECTANGULAR


def _entry(symbol: str) -> tuple[float, float]:
    try:
        _z, value, a = ABRIDGED_2021[symbol]
    except KeyError:
        raise UnknownElement(symbol) from None
    if value is None or a is None:
        raise NoAtomicWeight(symbol)
    return value, a
