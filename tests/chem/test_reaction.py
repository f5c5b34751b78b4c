"""Tests for sitegen.chem.reaction: parsing, printing, balance check."""

from fractions import Fraction

import pytest

from sitegen.chem.errors import FormulaError, Unbalanced, UnknownElement
from sitegen.chem.formula import parse_species
from sitegen.chem.reaction import (
    Reaction,
    Term,
    balance_delta,
    check_balanced,
    parse_reaction,
)

# Permanganate half-reaction as tabulated in the CRC Handbook "Electrochemical
# Series" (MnO4- + 8H+ + 5e- = Mn2+ + 4H2O; from memory).
MNO4 = "MnO4- + 8 H+ + 5 e- = Mn^2+ + 4 H2O"


def test_parse_half_reaction():
    r = parse_reaction(MNO4)
    assert r.arrow == "="
    assert r.is_half
    assert r.electrons == 5
    assert [t.coeff for t in r.left] == [1, 8, 5]
    assert r.left[0].species == parse_species("MnO4-")
    assert r.canonical == MNO4
    check_balanced(r)


@pytest.mark.parametrize(
    "text",
    [
        "MnO4- + 8H+ + 5e- = Mn^2+ + 4H2O",
        "MnO₄⁻ + 8 H⁺ + 5 e⁻ ⇌ Mn²⁺ + 4 H₂O",
        "MnO4-(aq) + 8 H+(aq) + 5 e- <=> Mn^2+(aq) + 4 H2O(l)",
        "MnO4- + 8 H+ + 5 e- ⇄ Mn^{2+} + 4 H2O",
        "  MnO4-   +   8 H+ + 5 e-   =   Mn^2+ + 4 H2O  ",
    ],
)
def test_spellings_give_the_same_reaction(text):
    assert parse_reaction(text) == parse_reaction(MNO4)
    assert parse_reaction(text).canonical == MNO4


@pytest.mark.parametrize("arrow", ["->", "→", "⟶"])
def test_reaction_arrows(arrow):
    r = parse_reaction(f"2 H2 + O2 {arrow} 2 H2O")
    assert r.arrow == "->"
    assert r.canonical == "2 H2 + O2 -> 2 H2O"


def test_coefficients_integer_decimal_fraction():
    a = parse_reaction("H2 + 1/2 O2 -> H2O")
    b = parse_reaction("H2 + 0.5 O2 -> H2O")
    assert a == b
    assert a.left[1].coeff == Fraction(1, 2)
    assert a.canonical == "H2 + 1/2 O2 -> H2O"
    assert a.scaled(2) == parse_reaction("2H2 + O2 -> 2H2O")


def test_equality_is_multiset_per_side():
    assert parse_reaction("H2 + Cl2 -> 2 HCl") == parse_reaction("Cl2 + H2 -> 2 HCl")
    assert parse_reaction("H2 + Cl2 -> 2 HCl") != parse_reaction("H2 + Cl2 = 2 HCl")
    assert parse_reaction("H2 + Cl2 -> 2 HCl") != parse_reaction("2 HCl -> H2 + Cl2")
    assert len({parse_reaction("H2 + Cl2 -> 2 HCl"), parse_reaction("Cl2 + H2 -> 2 HCl")}) == 1


def test_plus_needs_spaces_charge_plus_is_kept():
    r = parse_reaction("Fe^3+ + e- = Fe^2+")
    assert [t.species.canonical for t in r.left] == ["Fe^3+", "e-"]
    r = parse_reaction("H+ + OH- -> H2O")
    assert [t.species.canonical for t in r.left] == ["H+", "OH-"]


def test_species_and_coefficient_helpers():
    r = parse_reaction(MNO4)
    assert [s.canonical for s in r.species()] == ["MnO4-", "H+", "e-", "Mn^2+", "H2O"]
    assert r.coefficient("H+") == -8
    assert r.coefficient("H2O") == 4
    assert r.reversed().electrons == -5


def test_term_rejects_non_positive():
    with pytest.raises(ValueError):
        Term(Fraction(0), parse_species("H2O"))
    with pytest.raises(ValueError):
        parse_reaction(MNO4).scaled(-1)
    with pytest.raises(ValueError):
        Reaction((), (), "=>")  # type: ignore[arg-type]


def test_unbalanced_reports_element_and_charge_separately():
    # Fe^3+ + e- = Fe^2+ with the electron forgotten: atoms fine, charge off.
    with pytest.raises(Unbalanced) as info:
        check_balanced(parse_reaction("Fe^3+ = Fe^2+"))
    assert info.value.atoms_delta == {}
    assert info.value.charge_delta == -1
    assert "charge is off by 1" in str(info.value)
    # Hydrogen forgotten on the left of the permanganate half.
    with pytest.raises(Unbalanced) as info:
        check_balanced(parse_reaction("MnO4- + 5 e- = Mn^2+ + 4 H2O"))
    assert info.value.atoms_delta == {"H": Fraction(8)}
    assert info.value.charge_delta == 8
    assert "H is off by 8" in str(info.value)
    assert "charge is off by 8" in str(info.value)
    # Oxygen only.
    with pytest.raises(Unbalanced) as info:
        check_balanced(parse_reaction("2 H2 + 2 O2 -> 2 H2O"))
    assert info.value.atoms_delta == {"O": Fraction(-2)}
    assert info.value.charge_delta == 0
    assert "O is off by 2" in str(info.value)
    assert "charge" not in str(info.value)


def test_balance_delta_of_balanced_reaction_is_zero():
    assert balance_delta(parse_reaction(MNO4)) == ({}, Fraction(0))


@pytest.mark.parametrize(
    ("text", "index"),
    [
        ("MnO4- + Fe3+ -> Mn^2+", 10),  # ambiguous charge, offset into whole text
        ("H2 + O2", 7),  # no arrow: caret at the end
        ("H2 -> H2 -> H2", 9),  # second arrow
        (" -> H2", 0),  # empty side
        ("H2 + -> H2", 5),  # "+ ->" : the plus needs a term after it
        ("H++e- = H", 3),
        ("2 -> H2", 1),
        ("0 H2 -> H2", 0),
        ("1/0 H2 -> H2", 0),
    ],
)
def test_parse_errors_carry_index_in_whole_text(text, index):
    with pytest.raises(FormulaError) as info:
        parse_reaction(text)
    assert info.value.index == index
    assert info.value.text == text


@pytest.mark.parametrize("coeff", ["9" * 5000, "1/" + "9" * 5000, "0." + "5" * 5000])
def test_absurd_coefficients_are_formula_errors(coeff):
    with pytest.raises(FormulaError) as info:
        parse_reaction(f"{coeff} H2 -> H2")
    assert info.value.index == 0


def test_ambiguous_charge_suggestion_survives_in_reaction():
    with pytest.raises(FormulaError) as info:
        parse_reaction("Fe3+ + e- = Fe^2+")
    assert info.value.suggestion == "Fe^3+"


def test_unknown_element_index_in_reaction():
    with pytest.raises(UnknownElement) as info:
        parse_reaction("Fe + Xx2 -> FeXx2")
    assert info.value.symbol == "Xx"
    assert info.value.index == 5
