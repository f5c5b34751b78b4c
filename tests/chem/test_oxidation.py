"""Tests for sitegen.chem.oxidation.

Expected oxidation numbers are standard textbook assignments (e.g. Harris,
Quantitative Chemical Analysis; Greenwood & Earnshaw, Chemistry of the
Elements; from memory), worked by hand from the rules.
"""

from fractions import Fraction

import pytest

from sitegen.chem.errors import CannotBalance
from sitegen.chem.oxidation import oxidation_numbers, redox_changes
from sitegen.chem.reaction import parse_reaction


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("O2", {"O": Fraction(0)}),
        ("Fe", {"Fe": Fraction(0)}),
        ("I2", {"I": Fraction(0)}),
        ("Fe^3+", {"Fe": Fraction(3)}),
        ("I3-", {"I": Fraction(-1, 3)}),
        ("O2^2-", {"O": Fraction(-1)}),
        ("KMnO4", {"K": Fraction(1), "Mn": Fraction(7), "O": Fraction(-2)}),
        ("MnO4-", {"Mn": Fraction(7), "O": Fraction(-2)}),
        ("K2Cr2O7", {"K": Fraction(1), "Cr": Fraction(6), "O": Fraction(-2)}),
        ("Na2C2O4", {"Na": Fraction(1), "C": Fraction(3), "O": Fraction(-2)}),
        ("H2C2O4", {"H": Fraction(1), "C": Fraction(3), "O": Fraction(-2)}),
        ("S2O3^2-", {"S": Fraction(2), "O": Fraction(-2)}),
        ("S4O6^2-", {"S": Fraction(5, 2), "O": Fraction(-2)}),
        ("Fe3O4", {"Fe": Fraction(8, 3), "O": Fraction(-2)}),
        ("H2O2", {"H": Fraction(1), "O": Fraction(-1)}),
        ("Na2O2", {"Na": Fraction(1), "O": Fraction(-1)}),
        ("KO2", {"K": Fraction(1), "O": Fraction(-1, 2)}),
        ("OF2", {"O": Fraction(2), "F": Fraction(-1)}),
        ("ICl", {"I": Fraction(1), "Cl": Fraction(-1)}),
        ("KIO3", {"K": Fraction(1), "I": Fraction(5), "O": Fraction(-2)}),
        ("BrO3-", {"Br": Fraction(5), "O": Fraction(-2)}),
        ("ClO4-", {"Cl": Fraction(7), "O": Fraction(-2)}),
        ("NaH", {"Na": Fraction(1), "H": Fraction(-1)}),
        ("LiAlH4", {"Li": Fraction(1), "Al": Fraction(3), "H": Fraction(-1)}),
        # Peroxodisulfate: 6 O at -2 and 2 at -1 -> average -7/4; S +6.
        ("S2O8^2-", {"S": Fraction(6), "O": Fraction(-7, 4)}),
        ("H3AsO3", {"H": Fraction(1), "As": Fraction(3), "O": Fraction(-2)}),
        ("H3AsO4", {"H": Fraction(1), "As": Fraction(5), "O": Fraction(-2)}),
        ("KHC8H4O4", {"K": Fraction(1), "H": Fraction(1), "C": Fraction(1, 4), "O": Fraction(-2)}),
        ("C6H8O6", {"C": Fraction(2, 3), "H": Fraction(1), "O": Fraction(-2)}),
        ("C6H6O6", {"C": Fraction(1), "H": Fraction(1), "O": Fraction(-2)}),
        ("C2H5OH", {"C": Fraction(-2), "H": Fraction(1), "O": Fraction(-2)}),
        ("CH3COOH", {"C": Fraction(0), "H": Fraction(1), "O": Fraction(-2)}),
        ("CuI", {"Cu": Fraction(1), "I": Fraction(-1)}),
        # Polyatomic-ion splitting: NH4+ (N -3) and SO4^2- (S +6).
        (
            "(NH4)2Fe(SO4)2·6H2O",
            {
                "N": Fraction(-3),
                "H": Fraction(1),
                "Fe": Fraction(2),
                "S": Fraction(6),
                "O": Fraction(-2),
            },
        ),
        ("FeSO4", {"Fe": Fraction(2), "S": Fraction(6), "O": Fraction(-2)}),
        ("Ce(SO4)2", {"Ce": Fraction(4), "S": Fraction(6), "O": Fraction(-2)}),
        # 2 N at -3 and 6 N at +5 -> average +3.
        (
            "(NH4)2Ce(NO3)6",
            {"N": Fraction(3), "H": Fraction(1), "Ce": Fraction(4), "O": Fraction(-2)},
        ),
        ("K3[Fe(CN)6]", {"K": Fraction(1), "Fe": Fraction(3), "C": Fraction(2), "N": Fraction(-3)}),
        # Ammonium peroxodisulfate: NH4+ split off, then S capped at +6.
        (
            "(NH4)2S2O8",
            {"N": Fraction(-3), "H": Fraction(1), "S": Fraction(6), "O": Fraction(-7, 4)},
        ),
        # 1 N at -3 and 1 at +5.
        ("NH4NO3", {"N": Fraction(1), "H": Fraction(1), "O": Fraction(-2)}),
        ("KSCN", {"K": Fraction(1), "S": Fraction(-2), "C": Fraction(4), "N": Fraction(-3)}),
        ("Ag2CrO4", {"Ag": Fraction(1), "Cr": Fraction(6), "O": Fraction(-2)}),
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
    # Urea: C and N both unknown and C is not in a cyanide group; the
    # rules do not guess.
    with pytest.raises(CannotBalance):
        oxidation_numbers("CO(NH2)2")


def test_redox_changes_permanganate_peroxide():
    # Harris, Quantitative Chemical Analysis (from memory): 10 e- per equation.
    r = parse_reaction("2 MnO4- + 5 H2O2 + 6 H+ -> 2 Mn^2+ + 5 O2 + 8 H2O")
    ch = redox_changes(r)
    assert ch["reduced"] == {"Mn": Fraction(10)}
    assert ch["oxidised"] == {"O": Fraction(10)}
    assert ch["electrons"] == 10


def test_redox_changes_half_reaction():
    ch = redox_changes(parse_reaction("Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O"))
    assert ch["reduced"] == {"Cr": Fraction(6)}
    assert ch["oxidised"] == {}


@pytest.mark.parametrize(
    ("text", "electrons", "oxidised", "reduced"),
    [
        # Comproportionation and disproportionation: I and Cl go both ways
        # (textbook electron counts, e.g. Harris; from memory).
        ("IO3- + 5 I- + 6 H+ -> 3 I2 + 3 H2O", 5, {"I": 5}, {"I": 5}),
        ("3 Cl2 + 6 OH- -> 5 Cl- + ClO3- + 3 H2O", 5, {"Cl": 5}, {"Cl": 5}),
        ("2 MnO4- + 3 Mn^2+ + 2 H2O -> 5 MnO2 + 4 H+", 6, {"Mn": 6}, {"Mn": 6}),
        # Molecular equation with spectators (K+, SO4^2-).
        (
            "2 KMnO4 + 10 FeSO4 + 8 H2SO4 -> K2SO4 + 2 MnSO4 + 5 Fe2(SO4)3 + 8 H2O",
            10,
            {"Fe": 10},
            {"Mn": 10},
        ),
    ],
)
def test_redox_changes_counts_both_directions(text, electrons, oxidised, reduced):
    ch = redox_changes(parse_reaction(text))
    assert ch["electrons"] == electrons
    assert ch["oxidised"] == oxidised
    assert ch["reduced"] == reduced
