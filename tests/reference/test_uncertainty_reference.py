"""GUM propagation reproduces a published worked example.

EURACHEM/CITAC Guide CG4, *Quantifying Uncertainty in Analytical Measurement*, 3rd ed.
(2012), example A3, "Standardising a sodium hydroxide solution" against potassium
hydrogen phthalate (KHP). All numbers below are quoted from memory of that example:

  c_NaOH = 1000 m_KHP P_KHP / (M_KHP V_T)  [mol/L], times a repeatability factor 1.0
  rep   1.0       u = 0.0005   (relative, from replicates)
  m_KHP 0.3888 g  u = 0.00013 g
  P_KHP 1.0       u = 0.00029  (1.0000 +- 0.0005, rectangular)
  M_KHP 204.2212 g/mol  u = 0.0038 g/mol
  V_T   18.64 mL  u = 0.013 mL
  result: c_NaOH = 0.10214 mol/L, u_c = 0.00010 mol/L (u_c/c = 0.00097)
"""

import math

import periodictable
import pytest

from sitegen.chem.uncertainty import Quantity, propagate, relative_budget, u_rectangular

INPUTS = [
    Quantity("rep", 1.0, 0.0005, "", "CG4 A3, repeatability (from memory)"),
    Quantity("m_KHP", 0.3888, 0.00013, "g", "CG4 A3, weighing by difference (from memory)"),
    Quantity("P_KHP", 1.0, 0.00029, "", "CG4 A3, supplier's purity (from memory)"),
    Quantity("M_KHP", 204.2212, 0.0038, "g/mol", "CG4 A3, IUPAC atomic weights (from memory)"),
    Quantity("V_T", 18.64, 0.013, "mL", "CG4 A3, piston burette (from memory)"),
]


def model(x):
    return 1000 * x["m_KHP"] * x["P_KHP"] / (x["M_KHP"] * x["V_T"]) * x["rep"]


def test_naoh_standardisation_budget():
    b = propagate(model, INPUTS, unit="mol/L")
    # reported to 5 decimals / 2 significant figures in the guide
    assert b.value == pytest.approx(0.10214, abs=5e-6)
    assert b.u_c == pytest.approx(0.00010, abs=5e-6)
    assert b.u_rel == pytest.approx(0.00097, abs=5e-6)
    assert b.U == pytest.approx(0.00020, abs=1e-5)  # k = 2
    # The guide's chart ranks V_T and repeatability as the largest contributions and
    # M_KHP as negligible.
    share = {c.name: c.share for c in b.contributions}
    order = sorted(share, key=share.get, reverse=True)
    assert order[:2] == ["V_T", "rep"]
    assert order[-1] == "M_KHP"
    # the product/quotient shortcut gives the same
    r = relative_budget(INPUTS, [1, 1, 1, -1, -1], factor=1000.0)
    assert r.u_c == pytest.approx(b.u_c, rel=1e-6)


def test_khp_molar_mass_from_periodictable():
    # periodictable's IUPAC masses give M(C8H5O4K) = 204.2212 g/mol as the guide quotes
    assert periodictable.formula("C8H5O4K").mass == pytest.approx(204.2212, abs=2e-3)


def test_khp_molar_mass_uncertainty():
    # CG4 A3 builds u(M_KHP) from IUPAC atomic-weight intervals taken as rectangular
    # (from memory): C 12.0107 +- 0.0008, H 1.00794 +- 0.00007, O 15.9994 +- 0.0003,
    # K 39.0983 +- 0.0001; M = 8 C + 5 H + 4 O + K, u(M) = 0.0038 g/mol.
    qs = [
        Quantity("C", 12.0107, u_rectangular(0.0008), "g/mol"),
        Quantity("H", 1.00794, u_rectangular(0.00007), "g/mol"),
        Quantity("O", 15.9994, u_rectangular(0.0003), "g/mol"),
        Quantity("K", 39.0983, u_rectangular(0.0001), "g/mol"),
    ]
    b = propagate(lambda a: 8 * a["C"] + 5 * a["H"] + 4 * a["O"] + a["K"], qs, unit="g/mol")
    assert b.value == pytest.approx(204.2212, abs=1e-4)
    assert b.u_c == pytest.approx(0.0038, abs=5e-5)


def test_khp_mass_uncertainty_from_two_weighings():
    # CG4 A3: balance linearity +-0.15 mg, rectangular -> 0.09 mg, counted for the tare
    # and the gross weighing: sqrt(2 * 0.09^2) = 0.13 mg (from memory).
    # The guide rounds the per-weighing term to 0.09 mg before combining; unrounded,
    # 0.15/sqrt(3) = 0.087 mg gives 0.12 mg.
    assert u_rectangular(0.15e-3) == pytest.approx(0.09e-3, abs=5e-6)
    u_lin = round(u_rectangular(0.15e-3), 5)
    qs = [Quantity("gross", 10.0, u_lin, "g"), Quantity("tare", 9.6112, u_lin, "g")]
    b = propagate(lambda x: x["gross"] - x["tare"], qs, unit="g")
    assert b.value == pytest.approx(0.3888, abs=1e-9)
    assert b.u_c == pytest.approx(0.00013, abs=5e-6)
    assert math.isclose(b.u_c, math.sqrt(2) * u_lin, rel_tol=1e-6)
