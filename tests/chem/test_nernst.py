"""Tests for sitegen.chem.nernst against outside values."""

import math

import pytest
import scipy.constants as sc

from sitegen.chem import constants
from sitegen.chem.nernst import cell_potential, log10_K, nernst_potential, nernst_slope


def test_constants_match_scipy_codata():
    # scipy.constants carries the CODATA set; F and R are exact since the 2019 SI, and
    # CODATA prints them to 10 significant digits (96485.33212..., 8.314462618...).
    assert constants.F == pytest.approx(sc.physical_constants["Faraday constant"][0], rel=1e-10)
    assert constants.R == pytest.approx(sc.physical_constants["molar gas constant"][0], rel=1e-9)


def test_slope_at_25C_is_textbook_value():
    # 0.05916 V/decade at 25 degC: Bard & Faulkner, Electrochemical Methods, 2nd ed., eq. 2.1.
    assert nernst_slope(298.15) == pytest.approx(0.05916, abs=5e-6)
    # 0.05916 -> 0.06154 V at 37 degC scales with T (ideal-gas R, textbook relation).
    assert nernst_slope(310.15) == pytest.approx(0.05916 * 310.15 / 298.15, rel=1e-4)


def test_slope_rejects_nonpositive_temperature():
    with pytest.raises(ValueError, match="temperature"):
        nernst_slope(0.0)


def test_cell_potential_daniell():
    # Daniell cell: E(Cu2+/Cu) = 0.339 V, E(Zn2+/Zn) = -0.762 V, E(cell) = 1.101 V
    # (Harris, Quantitative Chemical Analysis, appendix H; from memory).
    assert cell_potential(0.339, -0.762) == pytest.approx(1.101, abs=1e-12)


@pytest.mark.parametrize(
    ("n", "E_cat", "E_an", "expected", "tol"),
    [
        # Ce4+/Fe2+ in 1 M H2SO4, formal potentials 1.44 V and 0.68 V
        # (Skoog, Fundamentals of Analytical Chemistry, appendix 5; from memory):
        # log K = 0.76/0.05916 = 12.8.
        (1, 1.44, 0.68, 12.8, 0.05),
        # MnO4-/Mn2+ 1.507 V, Fe3+/Fe2+ 0.771 V, n = 5 (Harris appendix H; from memory):
        # log K = 5 * 0.736 / 0.05916 = 62.2, "about 62".
        (5, 1.507, 0.771, 62.2, 0.05),
        # Cr2O7^2-/Cr3+ 1.36 V vs Fe3+/Fe2+ 0.771 V, n = 6 (Harris appendix H; from memory):
        # log K = 6 * 0.589 / 0.05916 = 59.7.
        (6, 1.36, 0.771, 59.7, 0.05),
    ],
)
def test_log10_K_of_titration_reactions(n, E_cat, E_an, expected, tol):
    assert log10_K(n, E_cat, E_an) == pytest.approx(expected, abs=tol)


def test_log10_K_consistent_with_gibbs_energy():
    # Delta G = -nFE = -RT ln K, written with scipy's constants, not ours.
    n, E = 2, 0.5
    lnK = (
        n
        * sc.physical_constants["Faraday constant"][0]
        * E
        / (sc.physical_constants["molar gas constant"][0] * 298.15)
    )
    assert log10_K(n, E, 0.0) == pytest.approx(lnK / math.log(10), rel=1e-9)


def test_log10_K_rejects_bad_n():
    with pytest.raises(ValueError, match="electron count"):
        log10_K(0, 1.0, 0.5)


def test_nernst_potential_fe_ratio():
    # Fe3+/Fe2+ at a 10:1 ratio: 0.771 + 0.05916 = 0.830 V (textbook Nernst example).
    assert nernst_potential(0.771, 1, 10.0, 1.0) == pytest.approx(0.8302, abs=1e-4)


def test_nernst_potential_permanganate_pH():
    # MnO4- + 8H+ + 5e- = Mn2+ + 4H2O at [H+] = 0.1 M, equal MnO4-/Mn2+:
    # E = 1.507 - (0.05916/5) * 8 = 1.412 V (Harris, ch. 14 style worked example; from memory).
    E = nernst_potential(1.507, 5, 1.0 * 0.1**8, 1.0)
    assert E == pytest.approx(1.507 - 8 * 0.05916 / 5, abs=1e-4)


def test_nernst_potential_rejects_nonpositive_activity():
    with pytest.raises(ValueError, match="activity"):
        nernst_potential(0.7, 1, 0.0, 1.0)
