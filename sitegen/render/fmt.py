"""The one number formatter of the site.

Every number a page, a CSV file or a JSON export shows goes through this
module, so rounding and spelling (minus sign, missing values) are the same
everywhere. Display functions return text for HTML (true minus sign
U+2212); :func:`data_float` and :func:`csv_number` are for machine-readable
exports (ASCII minus, a fixed number of significant digits so the bytes
never depend on float noise).
"""

from __future__ import annotations

__all__ = [
    "MISSING",
    "csv_number",
    "data_float",
    "date",
    "fixed",
    "fraction",
    "general",
    "percent",
    "plus_minus",
    "potential",
    "sig",
    "signed",
    "volume",
]

import datetime as _dt
import math
from fractions import Fraction

#: what a page shows where a value could not be computed
MISSING = "—"

_MINUS = "\u2212"


def _finite(x: float | None) -> bool:
    return x is not None and isinstance(x, int | float) and math.isfinite(x)


def _minus(text: str) -> str:
    # A hyphen-minus next to a digit reads as a dash in many fonts; a page
    # a technician reads at the bench uses the real minus sign.
    return text.replace("-", _MINUS)


def fixed(x: float | None, decimals: int) -> str:
    """``x`` with ``decimals`` decimals, or :data:`MISSING`.

    Args:
        x: the value (None or non-finite -> MISSING).
        decimals: number of decimals (0 or more).
    """
    if not _finite(x):
        return MISSING
    assert x is not None
    text = f"{x:.{max(decimals, 0)}f}"
    if float(text) == 0.0:
        text = text.lstrip("-")  # never print "-0.00"
    return _minus(text)


def signed(x: float | None, decimals: int) -> str:
    """Like :func:`fixed` but always with a sign (+0.12, −0.34)."""
    if not _finite(x):
        return MISSING
    assert x is not None
    text = fixed(x, decimals)
    return text if text.startswith(_MINUS) else "+" + text


def sig(x: float | None, digits: int = 3) -> str:
    """``x`` to ``digits`` significant digits, in positional notation where
    that stays readable (1e-4 <= |x| < 1e6), else as ``1.23 × 10^n`` text."""
    if not _finite(x):
        return MISSING
    assert x is not None
    if x == 0:
        return fixed(0.0, digits - 1)
    exp = math.floor(math.log10(abs(x)))
    if -4 <= exp < 6:
        decimals = max(digits - 1 - exp, 0)
        # rounding may carry into a new digit (9.99 -> 10.0): recompute
        rounded = float(f"{x:.{decimals}f}")
        if rounded != 0 and math.floor(math.log10(abs(rounded))) > exp:
            decimals = max(decimals - 1, 0)
        return fixed(x, decimals)
    mant, e = f"{x:.{digits - 1}e}".split("e")
    return _minus(f"{mant} × 10^{int(e)}")


def general(x: float | None, digits: int = 6) -> str:
    """``x`` in its shortest form up to ``digits`` significant digits
    (31.25, 0.05, 0.1): for inputs as the record gives them."""
    if not _finite(x):
        return MISSING
    assert x is not None
    text = f"{x:.{digits}g}"
    if "e" in text:
        return sig(x, digits)
    return _minus(text)


def potential(volts: float | None) -> str:
    """A potential in volts with millivolt resolution, e.g. ``0.680``."""
    return fixed(volts, 3)


def volume(mL: float | None) -> str:
    """A titrant volume in mL with the burette's resolution (0.01 mL)."""
    return fixed(mL, 2)


def percent(x: float | None, decimals: int = 2) -> str:
    """A percentage with its sign, e.g. ``+0.03`` (the % is in the template)."""
    return signed(x, decimals)


def plus_minus(value: float | None, u: float | None, digits: int = 2) -> str:
    """``value ± u`` with ``u`` to ``digits`` significant digits and the
    value rounded to the same decimal place (GUM 7.2.6)."""
    if not _finite(value):
        return MISSING
    if not _finite(u) or u == 0:
        return sig(value, 6)
    assert value is not None and u is not None
    decimals = max(digits - 1 - math.floor(math.log10(abs(u))), 0)
    return f"{fixed(value, decimals)} ± {fixed(u, decimals)}"


def fraction(q: Fraction | None) -> str:
    """An exact factor as ``1/6`` or ``2``."""
    if q is None:
        return MISSING
    q = Fraction(q)
    text = str(q.numerator) if q.denominator == 1 else f"{q.numerator}/{q.denominator}"
    return _minus(text)


def date(d: _dt.date | None) -> str:
    """An ISO date (2026-02-10): unambiguous in every lab's locale."""
    return MISSING if d is None else d.isoformat()


def data_float(x: float | None, digits: int = 10) -> float | None:
    """A float for JSON: ``digits`` significant digits, None for missing
    or non-finite values (JSON has no NaN)."""
    if not _finite(x):
        return None
    assert x is not None
    return float(f"{float(x):.{digits}g}")


def csv_number(x: float | None, decimals: int) -> str:
    """A CSV field: fixed decimals, ASCII minus, empty when undefined."""
    if not _finite(x):
        return ""
    assert x is not None
    text = f"{x:.{decimals}f}"
    return text.lstrip("-") if float(text) == 0.0 else text
