"""Reference electrodes and conversion of potentials between scales.

Offsets are potentials of the reference electrode vs the standard hydrogen
electrode (SHE) at 25 degC, from A. J. Bard, L. R. Faulkner, *Electrochemical
Methods*, 2nd ed. (2001), Table C.2, and D. T. Sawyer, A. Sobkowiak,
J. L. Roberts, *Electrochemistry for Chemists*, 2nd ed. (1995), ch. 5
(values quoted from memory, not re-read for this module).
"""

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType

__all__ = ["REFERENCE_ELECTRODES", "ReferenceElectrode", "from_reference", "vs_reference"]


@dataclass(frozen=True)
class ReferenceElectrode:
    """A reference electrode and its potential vs SHE.

    Attributes:
        key: short identifier used in records (e.g. ``"SCE"``).
        name: full description including the filling solution.
        offset_V: potential of this electrode vs SHE at 25 degC, V.
        source: where the offset comes from.
    """

    key: str
    name: str
    offset_V: float
    source: str


_SOURCE = (
    "Bard & Faulkner, Electrochemical Methods, 2nd ed., Table C.2; "
    "Sawyer, Sobkowiak & Roberts, Electrochemistry for Chemists (from memory)"
)

REFERENCE_ELECTRODES: Mapping[str, ReferenceElectrode] = MappingProxyType(
    {
        "SHE": ReferenceElectrode(
            "SHE", "standard hydrogen electrode", 0.0, "definition of the scale"
        ),
        "SCE": ReferenceElectrode(
            "SCE", "saturated calomel electrode, Hg/Hg2Cl2, saturated KCl", 0.241, _SOURCE
        ),
        "Ag/AgCl-sat": ReferenceElectrode(
            "Ag/AgCl-sat", "silver/silver chloride, saturated KCl", 0.197, _SOURCE
        ),
        "Ag/AgCl-3M": ReferenceElectrode(
            "Ag/AgCl-3M", "silver/silver chloride, 3 mol/L KCl", 0.210, _SOURCE
        ),
    }
)
"""Known reference electrodes by key (read-only)."""


def _lookup(key: str) -> ReferenceElectrode:
    try:
        return REFERENCE_ELECTRODES[key]
    except KeyError:
        known = ", ".join(sorted(REFERENCE_ELECTRODES))
        raise KeyError(f"unknown reference electrode {key!r}; known: {known}") from None


def vs_reference(E_vs_SHE: float, key: str) -> float:
    """Convert a potential vs SHE to the scale of reference electrode ``key``.

    Args:
        E_vs_SHE: potential vs SHE, V.
        key: one of ``REFERENCE_ELECTRODES``.

    Returns:
        Potential vs the named reference, V (``E_vs_SHE - offset``).

    Raises:
        KeyError: for an unknown key; the message lists the known keys.
    """
    return E_vs_SHE - _lookup(key).offset_V


def from_reference(E_vs_ref: float, key: str) -> float:
    """Convert a potential measured vs reference ``key`` back to the SHE scale, V."""
    return E_vs_ref + _lookup(key).offset_V
