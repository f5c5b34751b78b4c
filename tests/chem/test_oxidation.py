"""Tests for sitegen.chem.oxidation.

Expected oxidation numbers are standard textbook assignments (e.g. Harris,
Quantitative Chemical Analysis; Greenwood & Earnshaw, Chemistry of the
Elements; from memory), worked by hand from the rules.
"""

from fractions import Fraction as F

import pytest

from sitegen.chem.errors import CannotBalance
from sitegen.chem.oxidation import oxidation_numbers, redox_changes
from sitegen.chem.reaction import parse_reaction


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("O2", {"O": F(0)}),
        ("Fe", {"Fe": F(0)}),
        ("I2", {"I": F(0)}),
        ("Fe^3+", {"Fe": F(3)}),
        ("I3-", {"I": F(-1, 3)}),
        ("O2^2-", {"O": F(-1)}),
        ("KMnO4", {"K": F(1), "Mn": F(7), "O": F(-2)}),
        ("MnO4-", {"Mn": F(7), "O": F(-2)}),
        ("K2Cr2O7", {"K": F(1), "Cr": F(6), "O": F(-2)}),
        ("Na2C2O4", {"Na": F(1), "C": F(3), "O": F(-2)}),
        ("H2C2O4", {"H": F(1), "C": F(3), "O": F(-2)}),
        ("S2O3^2-", {"S": F(2), "O": F(-2)}),
        ("S4O6^2-", {"S": F(5, 2), "O": F(-2)}),
        ("Fe3O4", {"Fe": F(8, 3), "O": F(-2)}),
        ("H2O2", {"H": F(1), "O": F(-1)}),
        ("Na2O2", {"Na": F(1), "O": F(-1)}),
        ("KO2", {"K": F(1), "O": F(-1, 2)}),
        ("OF2", {"O": F(2), "F": F(-1)}),
        ("ICl", {"I": F(1), "Cl": F(-1)}),
        ("KIO3", {"K": F(1), "I": F(5), "O": F(-2)}),
        ("BrO3-", {"Br": F(5), "O": F(-2)}),
        ("ClO4-", {"Cl": F(7), "O": F(-2)}),
        ("NaH", {"Na": F(1), "H": F(-1)}),
        ("LiAlH4", {"Li": F(1), "Al": F(3), "H": F(-1)}),
        # Peroxodisulfate: 6 O at -2 and 2 at -1 -> average -7/4; S +6.
        ("S2O8^2-", {"S": F(6), "O": F(-7, 4)}),
        ("H3AsO3", {"H": F(1), "As": F(3), "O": F(-2)}),
        ("H3AsO4", {"H": F(1), "As": F(5), "O": F(-2)}),
        ("KHC8H4O4", {"K": F(1), "H": F(1), "C": F(1, 4), "O": F(-2)}),
        ("C6H8O6", {"C": F(2, 3), "H": F(1), "O": F(-2)}),
        ("C6H6O6", {"C": F(1), "H": F(1), "O": F(-2)}),
        ("C2H5OH", {"C": F(-2), "H": F(1), "O": F(-2)}),
        ("CH3COOH", {"C": F(0), "H": F(1), "O": F(-2)}),
        ("CuI", {"Cu": F(1), "I": F(-1)}),
        # Polyatomic-ion splitting: NH4+ (N -3) and SO4^2- (S +6).
        ("(NH4)2Fe(SO4)2·6H2O", {"N": F(-3), "H": F(1), "Fe": F(2), "S": F(6), "O": F(-2)}),
        ("FeSO4", {"Fe": F(2), "S": F(6), "O": F(-2)}),
        ("Ce(SO4)2", {"Ce": F(4), "S": F(6), "O": F(-2)}),
        # 2 N at -3 and 6 N at +5 -> average +3.
        ("(NH4)2Ce(NO3)6", {"N": F(3), "H": F(1), "Ce": F(4), "O": F(-2)}),
        ("K3[Fe(CN)6]", {"K": F(1), "Fe": F(3), "C": F(2), "N": F(-3)}),
        ("Ag2CrO4", {"Ag": F(1), "Cr": F(6), "O": F(-2)}),
        ("e-", {}),
    ],
)
def test_oxidation_numbers(text, expected):
    assert oxidation_numbers(text) == expected


def test_sum_of_oxidation_numbers_equals_charge():
    for text in ["S4O6^2-", "Cr2O7^2-", "(NH4)2Ce(NO3)6", "KO2", "S2O8^2-", "Fe3O4"]:
        from sitegen.chem.formula import parse_species

        sp = parse_species(text)
        total = sum(sp.composition[s] * v for s, v in oxidation_numbers(sp).items())
        assert total == sp.charge


def test_undecidable_names_the_species():
    # Fe and Co with no fixed states and no known ion: cannot split.
    with pytest.raises(CannotBalance) as info:
        oxidation_numbers("FeCo")
    assert info.value.species == ("FeCo",)


def test_redox_changes_permanganate_peroxide():
    # Harris, Quantitative Chemical Analysis (from memory): 10 e- per equation.
    r = parse_reaction("2 MnO4- + 5 H2O2 + 6 H+ -> 2 Mn^2+ + 5 O2 + 8 H2O")
    ch = redox_changes(r)
    assert ch["reduced"] == {"Mn": F(10)}
    assert ch["oxidised"] == {"O": F(10)}
    assert ch["electrons"] == 10


def test_redox_changes_half_reaction():
    ch = redox_changes(parse_reaction("Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O"))
    assert ch["reduced"] == {"Cr": F(6)}
    assert ch["oxidised"] == {}
