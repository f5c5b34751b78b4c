"""Titration curves against closed-form textbook results.

Potentials, V vs SHE (from memory):
  Ce4+/Ce3+ 1.44 V and Fe3+/Fe2+ 0.68 V, formal, in 1 M H2SO4 -- Skoog, West, Holler,
  Crouch, *Fundamentals of Analytical Chemistry*, appendix 5; Harris, *Quantitative
  Chemical Analysis*, appendix H.
  MnO4-/Mn2+ 1.507 V, Fe3+/Fe2+ 0.771 V, Cr2O7^2-/Cr3+ 1.33 V (Skoog appendix 5; Harris
  lists 1.36 V), I3-/I- 0.536 V, S4O6^2-/S2O3^2- 0.08 V -- standard potentials, same tables.

Closed forms (Skoog ch. 19, "Titration curves"; Harris ch. 16, "Redox titrations" -- from
memory): before equivalence E follows the analyte couple with the ratio of titrated to
untitrated analyte; after it, the titrant couple with the ratio of excess to consumed
titrant; at equivalence E = (n1 E1 + n2 E2)/(n1 + n2) for symmetric couples, with the
[H+] and [Cr3+] terms for the proton-dependent and asymmetric ones. Each expectation
below is computed from those formulas, not from the solver.
"""

import math

import numpy as np
import pytest
import scipy.constants as sc

from sitegen.chem.curve import (
    Couple,
    Titration,
    equivalence_volume_mL,
    potential_at,
    potential_break_V,
    stoichiometric_volume_mL,
    titration_curve,
)

# Nernst slope from scipy's CODATA constants (not from sitegen.chem.constants).
S = sc.R * 298.15 * math.log(10) / sc.physical_constants["Faraday constant"][0]

FE_H2SO4 = Couple(0.68, 1, label="Fe3+/Fe2+")
CE_H2SO4 = Couple(1.44, 1, label="Ce4+/Ce3+")
FE = Couple(0.771, 1, label="Fe3+/Fe2+")
MNO4 = Couple(1.507, 5, m=8, label="MnO4-/Mn2+")
CR2O7 = Couple(1.33, 6, a=1, b=2, m=14, label="Cr2O7^2-/Cr3+")
I3 = Couple(0.536, 2, a=1, b=3, label="I3-/I-")
S4O6 = Couple(0.08, 2, a=1, b=2, reversible=False, label="S4O6^2-/S2O3^2-")


# ---------------------------------------------------------------- Ce(IV) / Fe(II)

# 50.00 mL of 0.0500 M Fe2+ titrated with 0.1000 M Ce4+: Veq = 25.00 mL
# (the classic textbook example, Skoog ch. 19 -- from memory).
CE_FE = Titration(FE_H2SO4, CE_H2SO4, "red", 2.5, 50.0, 0.1)


def test_ce_fe_half_way_is_the_iron_potential():
    # At 50 %: [Fe3+]/[Fe2+] = (f + 1/2)/(1/2 - f) with the initial oxidised trace f,
    # so E = E(Fe) + S log10 of that (exactly E(Fe) for f -> 0).
    f = CE_FE.initial_fraction
    expected = 0.68 + S * math.log10((0.5 + f) / (0.5 - f))
    assert potential_at(CE_FE, 12.5) == pytest.approx(expected, abs=1e-9)
    assert potential_at(CE_FE, 12.5) == pytest.approx(0.68, abs=1e-6)


def test_ce_fe_at_200_percent_is_the_cerium_potential():
    # At 200 %: Ce4+ in excess = 2 - (1 - f), Ce3+ = 1 - f (per mmol of Fe).
    f = CE_FE.initial_fraction
    expected = 1.44 + S * math.log10((1 + f) / (1 - f))
    assert potential_at(CE_FE, 50.0) == pytest.approx(expected, abs=1e-9)


def test_ce_fe_equivalence_potential_is_the_mean():
    # (n1 E1 + n2 E2)/(n1 + n2) = (0.68 + 1.44)/2 = 1.06 V (textbook value).
    c = titration_curve(CE_FE, [25.0])
    assert c.equivalence_potential_V == pytest.approx(1.06, abs=1e-7)
    # at the nominal Veq the trace f of Fe3+ shifts it; with f -> 0 the mean returns
    t = Titration(FE_H2SO4, CE_H2SO4, "red", 2.5, 50.0, 0.1, initial_fraction=1e-13)
    assert potential_at(t, 25.0) == pytest.approx(1.06, abs=1e-6)


def test_ce_fe_quadratic_at_nominal_equivalence():
    # At V = Veq with trace f: Fe2+ left x, Ce4+ left x + f (per mmol). Equal potentials:
    # K = [Ce3+][Fe3+]/([Ce4+][Fe2+]) = (1 - x - f)(1 - x)/((x + f) x), K = 10^((1.44-0.68)/S)
    # (textbook equilibrium algebra), i.e. the quadratic
    # (1 - 1/K) x^2 + (f + (2 - f)/K) x - (1 - f)/K = 0, solved in the cancellation-free form.
    f = CE_FE.initial_fraction
    Kinv = 10 ** (-(1.44 - 0.68) / S)
    qa, qb, qc = 1 - Kinv, f + (2 - f) * Kinv, -(1 - f) * Kinv
    x = 2 * -qc / (qb + math.sqrt(qb * qb - 4 * qa * qc))
    expected = 0.68 + S * math.log10((1 - x) / x)
    assert potential_at(CE_FE, 25.0) == pytest.approx(expected, abs=1e-8)


def test_ce_fe_break_between_999_and_1001_per_mille():
    # 99.9 %: 0.68 + 3S; 100.1 %: 1.44 - 3S (ratios 999:1 and 1:1000) -> jump 0.76 - 6S.
    expected = (1.44 + S * math.log10(0.001 / 1.0)) - (0.68 + S * math.log10(0.999 / 0.001))
    assert potential_break_V(CE_FE) == pytest.approx(expected, abs=2e-5)


# ---------------------------------------------------------------- MnO4- / Fe(II)


@pytest.mark.parametrize("H", [1.0, 0.5, 0.1])
def test_permanganate_equivalence_depends_on_acid(H):
    # E_eq = (5 E_Mn + E_Fe)/6 + (8 S/6) log10 [H+]; at [H+] = 1: (5*1.507 + 0.771)/6 = 1.384 V
    # (Skoog ch. 19 worked example, from memory).
    t = Titration(FE, MNO4, "red", 2.5, 50.0, 0.02, H_mol_per_L=H)
    expected = (5 * 1.507 + 0.771) / 6 + 8 * S / 6 * math.log10(H)
    assert titration_curve(t, [25.0]).equivalence_potential_V == pytest.approx(expected, abs=1e-7)
    if H == 1.0:
        assert expected == pytest.approx(1.384, abs=5e-4)


def test_permanganate_after_equivalence():
    # At 200 %: [MnO4-] = [Mn2+], E = 1.507 + (8S/5) log10 [H+] = 1.4785 V at [H+] = 0.5.
    t = Titration(FE, MNO4, "red", 2.5, 50.0, 0.02, H_mol_per_L=0.5)
    f = t.initial_fraction
    expected = 1.507 + S / 5 * math.log10((1 + f) / (1 - f) * 0.5**8)
    assert potential_at(t, 50.0) == pytest.approx(expected, abs=1e-9)
    assert potential_at(t, 12.5) == pytest.approx(0.771, abs=1e-6)


# ---------------------------------------------------------------- Cr2O7^2- / Fe(II)


def _cr_eq_closed_form(cr3):
    # E_eq = (6 E_Cr + E_Fe)/7 - (S/7) log10(2 [Cr3+] / [H+]^14), [H+] = 1 M.
    return (6 * 1.33 + 0.771) / 7 - S / 7 * math.log10(2 * cr3)


@pytest.mark.parametrize(("mmol", "V0"), [(2.5, 50.0), (0.5, 100.0), (5.0, 20.0)])
def test_dichromate_equivalence_depends_on_chromium(mmol, V0):
    c_titrant = 0.1 / 6
    t = Titration(FE, CR2O7, "red", mmol, V0, c_titrant)
    V_st = stoichiometric_volume_mL(t)
    # [Cr3+] at equivalence: 2 Cr per Cr2O7, mmol Cr2O7 = mmol Fe/6 (minus a negligible
    # unreacted remainder), diluted to V0 + Veq.
    cr3 = 2 * (1 - t.initial_fraction) * mmol / 6 / (V0 + V_st)
    E_eq = titration_curve(t, [V_st]).equivalence_potential_V
    assert E_eq == pytest.approx(_cr_eq_closed_form(cr3), abs=2e-8)


def test_dichromate_in_flask_titrated_with_iron():
    # 0.5 mmol Cr2O7^2- in 50 mL, 0.1 M Fe2+: Veq = 30 mL. Half way, [Cr2O7] = 0.25 mmol,
    # [Cr3+] = 0.5 mmol in 65 mL: E = 1.33 + (S/6) log10([Cr2O7]/[Cr3+]^2) at [H+] = 1.
    t = Titration(CR2O7, FE, "ox", 0.5, 50.0, 0.1, initial_fraction=1e-12)
    Vt = 65.0
    expected = 1.33 + S / 6 * math.log10((0.25 / Vt) / (0.5 / Vt) ** 2)
    assert potential_at(t, 15.0) == pytest.approx(expected, abs=1e-9)
    # same equivalence formula, read from the other side: [Cr3+] = 1.0 mmol / 80 mL
    E_eq = titration_curve(t, [30.0]).equivalence_potential_V
    assert E_eq == pytest.approx(_cr_eq_closed_form(1.0 / 80.0), abs=2e-8)
    # after equivalence Fe2+ in excess: 200 % -> [Fe3+] = [Fe2+], E = E(Fe)
    assert potential_at(t, 60.0) == pytest.approx(0.771, abs=1e-9)


# ---------------------------------------------------------------- iodine / thiosulfate


def test_iodine_with_excess_iodide():
    # 1.0 mmol I3- liberated in 50 mL containing 0.1 M excess I-, titrated with 0.1 M S2O3^2-.
    # Half way (10 mL): I3- 0.5 mmol; I- = 5.0 + 3 * 0.5 mmol (excess + formed), in 60 mL:
    # E = 0.536 + (S/2) log10([I3-]/[I-]^3).
    t = Titration(
        I3, S4O6, "ox", 1.0, 50.0, 0.1, analyte_partner_mol_per_L=0.1, initial_fraction=1e-12
    )
    expected = 0.536 + S / 2 * math.log10((0.5 / 60.0) / (6.5 / 60.0) ** 3)
    assert potential_at(t, 10.0) == pytest.approx(expected, abs=1e-9)
    c = titration_curve(t, np.linspace(0.0, 60.0, 61))
    past = c.volumes_mL >= 20.0
    assert np.all(np.isnan(c.E_V[past])) and np.all(np.isfinite(c.E_V[~past]))
    assert "thiosulfate" in c.note or "S2O3" in c.note
    assert equivalence_volume_mL(t) == pytest.approx(20.0)
