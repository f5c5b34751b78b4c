"""The GUM uncertainty budget of a method's worked result.

The measurement model is the method's own result formula
(:func:`sitegen.calc.result_value`); inputs carry standard uncertainties
from the glassware tolerances (Class A, ISO 385 burettes, ISO 648
pipettes, triangular distribution as in the EURACHEM/CITAC guide CG4,
3rd ed., 2012, section 8.1), the balance, the titrant's concentration, the
molar mass (IUPAC abridged atomic weights, rectangular) and end-point
detection. The values marked "common practice" are defaults a lab would
replace by its own validation data.
"""

from __future__ import annotations

__all__ = ["ASSUMPTIONS", "result_budget"]

import math
from collections.abc import Mapping
from typing import Any

#: Defaults where the record gives no uncertainty of its own.
ASSUMPTIONS: dict[str, tuple[float, str]] = {
    # A standardised titrant is known to about 0.1 % (common practice).
    "titrant_rel_u": (0.001, "standardised titrant, 0.1 % relative (common practice)"),
    # Analytical balance, readability 0.1 mg, weighing by difference: two
    # readings, each rectangular over ±0.1 mg (common practice).
    "balance_u_g": (
        math.sqrt(2) * 0.0001 / math.sqrt(3),
        "balance 0.1 mg, two readings, rectangular",
    ),
    # End point: one drop of about 0.05 mL, rectangular (common practice).
    "endpoint_u_mL": (
        0.05 / math.sqrt(3),
        "end point, one drop (0.05 mL), rectangular (common practice)",
    ),
    # Purity of a primary standard certified as 99.95 ± 0.05 %: rectangular.
    "purity_u": (0.0005 / math.sqrt(3), "purity ±0.05 %, rectangular (common practice)"),
}


def _tolerance(kind: str, nominal_mL: float) -> tuple[float, str]:
    from .chem.glassware import tolerance_mL
    from .chem.uncertainty import u_triangular

    try:
        tol = tolerance_mL(kind, nominal_mL)
    except KeyError:
        # Not a tabulated size: scale the 50 mL burette / 25 mL pipette
        # tolerance by volume (common practice for an estimate).
        ref = {"burette": (50.0, 0.05), "pipette": (25.0, 0.03), "flask": (100.0, 0.10)}[kind]
        tol = ref[1] * nominal_mL / ref[0]
        return u_triangular(
            tol
        ), f"{kind} {nominal_mL:g} mL, ±{tol:.3g} mL scaled (common practice)"
    std = {"burette": "ISO 385", "pipette": "ISO 648", "flask": "ISO 1042"}[kind]
    return u_triangular(tol), f"{kind} {nominal_mL:g} mL Class A ±{tol:g} mL ({std}), triangular"


def result_budget(rec: Any, result: Any, reagents: Mapping[str, Any]) -> Any:
    """The budget (a :class:`sitegen.chem.uncertainty.Budget`) of the
    recomputed worked result, or None if the inputs are incomplete."""
    from .calc import result_value
    from .chem.uncertainty import Quantity, propagate

    values = {sym: val for sym, _desc, val, _unit in result.inputs}
    units = {sym: unit for sym, _desc, _val, unit in result.inputs}
    descs = {sym: desc for sym, desc, _val, _unit in result.inputs}
    burette = rec.titration.burette.value
    u_bur, src_bur = _tolerance("burette", burette)
    u_end, src_end = ASSUMPTIONS["endpoint_u_mL"]
    rel_c, src_c = ASSUMPTIONS["titrant_rel_u"]
    us: dict[str, tuple[float, str]] = {
        "V": (math.hypot(u_bur, u_end), f"{src_bur}; {src_end}"),
        "V_blank": (u_end, src_end),
        "c": (rel_c * values["c"], src_c),
        "M": (result.molar_mass_u, "IUPAC 2021 abridged atomic weights, rectangular"),
    }
    if "m" in values:
        us["m"] = ASSUMPTIONS["balance_u_g"]
    if "V_s" in values:
        us["V_s"] = _tolerance("pipette", values["V_s"])
    if "P" in values:
        us["P"] = ASSUMPTIONS["purity_u"]
    if "V_x" in values:
        us["V_x"] = _tolerance("pipette", values["V_x"])
    if "c_x" in values:
        us["c_x"] = (rel_c * values["c_x"], src_c)
    inputs = [
        Quantity(
            name=sym,
            value=values[sym],
            u=us[sym][0],
            unit=units[sym],
            source=f"{descs[sym]}: {us[sym][1]}",
        )
        for sym in values
        if sym in us and us[sym][0] > 0
    ]
    fixed = {k: v for k, v in values.items()}

    def model(x: Mapping[str, float]) -> float:
        merged = dict(fixed)
        merged.update(x)
        return result_value(result.kind, merged, result.scale)

    return propagate(model, inputs, k=2.0, unit=result.unit)
