"""The result formulas, in one place.

The build's worked result, the uncertainty budget and the in-page
calculator (theme/static/calculator.js mirrors :func:`result_value`) all
use these formulas, so they cannot disagree. Inputs are plain floats in
fixed units: volumes in mL, concentrations in mol/L, masses in g, molar
masses in g/mol. ``scale`` converts the formula's base quantity (g/g for a
mass fraction, mg/mL for a mass concentration, mol/L for a titrant
concentration) to the unit the method reports.
"""

from __future__ import annotations

__all__ = ["FORMULAS", "result_value"]

from collections.abc import Mapping

#: Plain-text formula per kind, shown on the method page.
FORMULAS: dict[str, str] = {
    "mass-fraction": "w = (V − V_blank) · c · f · M / m",
    "mass-concentration": "ρ = (V − V_blank) · c · f · M / V_s",
    "titrant-concentration": "c = m · P / (M · f · (V − V_blank))",
    "back-mass-fraction": "w = f · (c_x · V_x − f_x · c · (V − V_blank)) · M / m",
    "back-mass-concentration": "ρ = f · (c_x · V_x − f_x · c · (V − V_blank)) · M / V_s",
}


def result_value(kind: str, x: Mapping[str, float], scale: float) -> float:
    """The result in the reported unit.

    Args:
        kind: a key of :data:`FORMULAS`.
        x: inputs by symbol: V, V_blank, c, f, M and, by kind, m, V_s, P,
            c_x, V_x, f_x.
        scale: base quantity -> reported unit.

    Raises:
        KeyError: an input the formula needs is missing.
        ZeroDivisionError: a zero sample or net titrant volume.
    """
    net = x["V"] - x["V_blank"]
    if kind == "titrant-concentration":
        return x["m"] * x["P"] / (x["M"] * x["f"] * net / 1000.0) * scale
    if kind.startswith("back-"):
        mmol = x["f"] * (x["c_x"] * x["V_x"] - x["f_x"] * x["c"] * net)
        kind = kind[len("back-") :]
    else:
        mmol = x["f"] * x["c"] * net
    mg = mmol * x["M"]
    if kind == "mass-fraction":
        return mg / 1000.0 / x["m"] * scale
    if kind == "mass-concentration":
        return mg / x["V_s"] * scale
    raise KeyError(kind)
