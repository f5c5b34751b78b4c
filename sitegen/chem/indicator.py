"""Redox indicators: transition range, end-point error, fit to the potential break.

An indicator ``In(ox) + m H+ + n e- = In(red)`` shows its oxidised colour once
[In(ox)]/[In(red)] >= 10 and its reduced colour once the ratio is <= 1/10
(the usual visual threshold, common practice), so its transition range is
E0' +- slope/n with E0' = E0 + (slope m / n) log10 [H+]
(Harris, *Quantitative Chemical Analysis*, ch. 16, "Redox indicators";
Skoog, *Fundamentals of Analytical Chemistry*, ch. 19).

The end-point error uses the exact inverse of the titration curve, so it is
right for asymmetric and proton-dependent couples too.
"""

import math
from dataclasses import dataclass

from sitegen.chem.constants import T_STANDARD
from sitegen.chem.curve import (
    Titration,
    equivalence_volume_mL,
    potential_at,
    volume_at_potential,
)
from sitegen.chem.nernst import nernst_slope

__all__ = [
    "RedoxIndicator",
    "formal_potential",
    "indicator_error_percent",
    "indicator_on_break",
    "titration_error_percent",
    "transition_range",
]


@dataclass(frozen=True)
class RedoxIndicator:
    """A redox indicator ``In(ox) + m H+ + n e- = In(red)``.

    Attributes:
        E0: (formal) potential of the indicator couple at [H+] = 1, V vs SHE.
        n: electrons in the indicator half-reaction.
        colour_ox: colour of the oxidised form.
        colour_red: colour of the reduced form.
        m: H+ on the oxidised side (0 for pH-independent indicators).
        label: name for messages.
    """

    E0: float
    n: int
    colour_ox: str
    colour_red: str
    m: float = 0.0
    label: str = ""

    def __post_init__(self) -> None:
        if self.n <= 0:
            raise ValueError(f"indicator {self.label!r}: n must be positive, got {self.n!r}")


def formal_potential(ind: RedoxIndicator, H: float = 1.0, T: float = T_STANDARD) -> float:
    """Return E0' = E0 + (slope m/n) log10 [H+] of the indicator, V.

    Args:
        ind: the indicator.
        H: [H+], mol/L.
        T: temperature, K.
    """
    if not H > 0:
        raise ValueError(f"[H+] must be positive, got {H!r}")
    return ind.E0 + nernst_slope(T) * ind.m / ind.n * math.log10(H)


def transition_range(
    ind: RedoxIndicator, H: float = 1.0, T: float = T_STANDARD
) -> tuple[float, float]:
    """Return (low, high) = E0' -+ slope/n, the visible colour-change interval, V."""
    E = formal_potential(ind, H, T)
    half = nernst_slope(T) / ind.n
    return (E - half, E + half)


def titration_error_percent(t: Titration, E_end: float) -> float:
    """Return 100 (V(E_end) - Veq)/Veq, the end-point error if titration stops at E_end, %.

    Positive: over-titration. Uses the exact inverse of the curve.

    Raises:
        NoRoot: if the curve never reaches E_end.
        CurveUndefined: if E_end falls where the curve is undefined.
    """
    Veq = equivalence_volume_mL(t)
    return 100.0 * (volume_at_potential(t, E_end) - Veq) / Veq


def indicator_error_percent(t: Titration, ind: RedoxIndicator) -> float:
    """Return the end-point error when the titration stops at the indicator's E0', %."""
    return titration_error_percent(t, formal_potential(ind, t.H_mol_per_L, t.T_K))


def indicator_on_break(
    t: Titration, ind: RedoxIndicator, lo: float = 0.999, hi: float = 1.001
) -> bool:
    """Whether the whole transition range lies inside the potential jump.

    The jump is the interval between E(lo Veq) and E(hi Veq) (default 99.9 %
    and 100.1 %, i.e. a titration error within +-0.1 %), in either order so a
    falling curve works too. [H+] and T are taken from the titration.

    Raises:
        CurveUndefined: if either end of the band lies where the curve is undefined.
    """
    Veq = equivalence_volume_mL(t)
    a, b = potential_at(t, lo * Veq), potential_at(t, hi * Veq)
    band_lo, band_hi = min(a, b), max(a, b)
    r_lo, r_hi = transition_range(ind, t.H_mol_per_L, t.T_K)
    return band_lo <= r_lo and r_hi <= band_hi
