"""Class A volumetric glassware: maximum permissible errors (tolerances).

Tables of the International Standards, quoted from memory (not re-read here):
  burettes          ISO 385:2005  "Laboratory glassware - Burettes", Class A;
  one-mark pipettes ISO 648:2008  "Laboratory glassware - Single-volume pipettes", Class A;
  volumetric flasks ISO 1042:1998 "Laboratory glassware - One-mark volumetric flasks", Class A.

A tolerance +-a is a limit, not a standard uncertainty; a budget usually turns
it into u with a rectangular (a/sqrt 3) or triangular (a/sqrt 6) distribution
(see :mod:`sitegen.chem.uncertainty`).
"""

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType

__all__ = ["CLASS_A", "GlasswareTable", "tolerance_mL"]


@dataclass(frozen=True)
class GlasswareTable:
    """Class A tolerances for one kind of glassware.

    Attributes:
        kind: ``"burette"``, ``"pipette"`` or ``"flask"``.
        standard: the International Standard the values come from.
        tolerance_mL: nominal volume (mL) -> maximum permissible error (+- mL).
    """

    kind: str
    standard: str
    tolerance_mL: Mapping[float, float]


CLASS_A: Mapping[str, GlasswareTable] = MappingProxyType(
    {
        "burette": GlasswareTable(
            "burette",
            "ISO 385 Class A (from memory)",
            MappingProxyType({10.0: 0.02, 25.0: 0.03, 50.0: 0.05}),
        ),
        "pipette": GlasswareTable(
            "pipette",
            "ISO 648 Class A, one-mark (from memory)",
            MappingProxyType(
                {5.0: 0.015, 10.0: 0.020, 20.0: 0.030, 25.0: 0.030, 50.0: 0.050, 100.0: 0.080}
            ),
        ),
        "flask": GlasswareTable(
            "flask",
            "ISO 1042 Class A, one-mark (from memory)",
            MappingProxyType({100.0: 0.10, 250.0: 0.15, 500.0: 0.25, 1000.0: 0.40}),
        ),
    }
)
"""Tolerance tables by kind (read-only)."""


def tolerance_mL(kind: str, nominal_mL: float) -> float:
    """Return the Class A maximum permissible error for a piece of glassware, +- mL.

    Args:
        kind: ``"burette"``, ``"pipette"`` or ``"flask"``.
        nominal_mL: nominal volume, mL.

    Raises:
        KeyError: for an unknown kind or size; the message lists the known ones.
    """
    try:
        table = CLASS_A[kind]
    except KeyError:
        raise KeyError(
            f"unknown glassware kind {kind!r}; known: {', '.join(sorted(CLASS_A))}"
        ) from None
    try:
        return table.tolerance_mL[float(nominal_mL)]
    except KeyError:
        sizes = ", ".join(f"{v:g}" for v in sorted(table.tolerance_mL))
        raise KeyError(
            f"no {table.standard} tolerance for a {nominal_mL:g} mL {kind}; "
            f"known sizes (mL): {sizes}"
        ) from None
