"""Nernst equation, cell potential and equilibrium constants.

All potentials are in volts, temperatures in kelvin. A half-reaction is
written as a reduction, ``ox + n e- = red``; activities are dimensionless
(activity ~ concentration in mol/L when formal potentials are used).

References:
    A. J. Bard, L. R. Faulkner, *Electrochemical Methods*, 2nd ed. (2001),
    sections 2.1 (Nernst equation) and 2.1.5 (cell potential and K).
"""

import math

from sitegen.chem.constants import LN10, T_STANDARD, F, R

__all__ = [
    "cell_potential",
    "log10_K",
    "nernst_potential",
    "nernst_slope",
]


def nernst_slope(T: float = T_STANDARD) -> float:
    """Return the Nernst slope RT ln(10)/F.

    Args:
        T: temperature, K.

    Returns:
        Volts per decade for a one-electron couple (0.05916 V at 298.15 K).

    Raises:
        ValueError: if ``T`` is not positive.
    """
    if not T > 0:
        raise ValueError(f"temperature must be positive, got {T!r} K")
    return R * T * LN10 / F


def cell_potential(E_cathode: float, E_anode: float) -> float:
    """Return E(cell) = E(cathode) - E(anode), both reduction potentials in V."""
    return E_cathode - E_anode


def log10_K(n: int, E_cathode: float, E_anode: float, T: float = T_STANDARD) -> float:
    """Return log10 of the equilibrium constant of a cell reaction.

    From Delta G = -n F E(cell) = -R T ln K, so log10 K = n E(cell) / slope.

    Args:
        n: electrons transferred in the balanced overall reaction.
        E_cathode: (formal) reduction potential of the couple reduced, V.
        E_anode: (formal) reduction potential of the couple oxidised, V.
        T: temperature, K.

    Returns:
        log10 K, dimensionless.

    Raises:
        ValueError: if ``n`` is not a positive integer.
    """
    if int(n) != n or n < 1:
        raise ValueError(f"electron count must be a positive integer, got {n!r}")
    return n * cell_potential(E_cathode, E_anode) / nernst_slope(T)


def nernst_potential(
    E0: float,
    n: int,
    ox_activity_product: float,
    red_activity_product: float,
    T: float = T_STANDARD,
) -> float:
    """Return the electrode potential of a couple from the Nernst equation.

    ``E = E0 + (RT/nF) ln(Q_ox / Q_red)`` where ``Q_ox`` is the product of the
    activities on the oxidised side raised to their coefficients (including
    H+ where it appears there) and ``Q_red`` likewise on the reduced side.

    Args:
        E0: standard or formal reduction potential, V.
        n: electrons in the half-reaction as written.
        ox_activity_product: product of activities on the oxidised side, > 0.
        red_activity_product: product of activities on the reduced side, > 0.
        T: temperature, K.

    Returns:
        Potential, V on the same scale as ``E0``.

    Raises:
        ValueError: if ``n`` is not positive or an activity product is not > 0.
    """
    if n <= 0:
        raise ValueError(f"electron count must be positive, got {n!r}")
    if not (ox_activity_product > 0 and red_activity_product > 0):
        raise ValueError(
            "activity products must be positive, got "
            f"ox={ox_activity_product!r}, red={red_activity_product!r}"
        )
    return E0 + nernst_slope(T) / n * math.log10(ox_activity_product / red_activity_product)
