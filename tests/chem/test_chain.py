"""Tests for sitegen.chem.chain.

Expected ratios are the textbook stoichiometric factors of iodometry,
dichromatometry and back titration (Harris, Quantitative Chemical Analysis;
Skoog, Fundamentals of Analytical Chemistry; from memory).
"""

from fractions import Fraction

import pytest

from sitegen.chem.chain import back_titration_ratio, mole_ratio
from sitegen.chem.errors import NoChain
from sitegen.chem.reaction import parse_reaction

THIOSULFATE = "I3- + 2 S2O3^2- -> 3 I- + S4O6^2-"


def test_iodometric_copper():
    # 1 mol Cu per mol thiosulfate (Harris, iodometric copper; from memory).
    rs = ["2 Cu^2+ + 5 I- -> 2 CuI + I3-", THIOSULFATE]
    assert mole_ratio(rs, "Cu^2+", "S2O3^2-") == 1


def test_iodate_standardisation_of_thiosulfate():
    # KIO3 primary standard: 1 IO3- -> 3 I3- -> 6 S2O3^2- (Skoog; from memory).
    rs = ["IO3- + 8 I- + 6 H+ -> 3 I3- + 3 H2O", THIOSULFATE]
    assert mole_ratio(rs, "IO3-", "S2O3^2-") == Fraction(1, 6)


def test_dichromate_iron_direct():
    rs = [parse_reaction("Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O")]
    assert mole_ratio(rs, "Fe^2+", "Cr2O7^2-") == 6
    assert mole_ratio(rs, "Cr2O7^2-", "Fe^2+") == Fraction(1, 6)


def test_prereduction_then_titration():
    # Fe(III) reduced by Sn(II), then Fe(II) titrated with dichromate.
    rs = [
        "2 Fe^3+ + Sn^2+ -> 2 Fe^2+ + Sn^4+",
        "Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O",
    ]
    assert mole_ratio(rs, "Fe^3+", "Cr2O7^2-") == 6


def test_regenerated_reagent_is_not_an_intermediate():
    # I- is produced by the thiosulfate step but consumed earlier: if it were
    # followed, Cu/S2O3 would come out 3/5 instead of 1.
    rs = ["2 Cu^2+ + 5 I- -> 2 CuI + I3-", THIOSULFATE]
    assert mole_ratio(rs, "Cu^2+", "S2O3^2-") != Fraction(3, 5)


def test_back_titration():
    # Dichromate determined with excess Fe(II), the rest titrated with
    # permanganate: 1/6 mol Cr2O7^2- per mol Fe^2+, 5 mol Fe^2+ per MnO4-.
    rs = [
        "Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O",
        "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O",
    ]
    assert back_titration_ratio(rs, "Cr2O7^2-", "Fe^2+", "MnO4-") == (Fraction(1, 6), 5)
    assert mole_ratio(rs, "Cr2O7^2-", "Fe^2+") == Fraction(1, 6)


def test_no_chain():
    rs = ["2 Cu^2+ + 5 I- -> 2 CuI + I3-", THIOSULFATE]
    with pytest.raises(NoChain) as info:
        mole_ratio(rs, "Cu^2+", "MnO4-")
    assert info.value.analyte == "Cu^2+"
    assert info.value.titrant == "MnO4-"
    # Order matters: titrant step listed before the step that makes I3-.
    with pytest.raises(NoChain):
        mole_ratio(list(reversed(rs)), "Cu^2+", "S2O3^2-")


def test_conflicting_paths():
    # Fe(II) titrated by permanganate to Mn(II) (1:5) and, listed as well, to
    # MnO2 (1:3, hand-balanced): the chain is ambiguous.
    rs = [
        "2 Fe^3+ + Sn^2+ -> 2 Fe^2+ + Sn^4+",
        "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O",
        "MnO4- + 3 Fe^2+ + 4 H+ -> MnO2 + 3 Fe^3+ + 2 H2O",
    ]
    with pytest.raises(NoChain) as info:
        mole_ratio(rs, "Fe^3+", "MnO4-")
    assert "different ratios" in info.value.reason
