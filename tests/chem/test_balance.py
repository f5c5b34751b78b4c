"""Tests for sitegen.chem.balance.

Expected equations are the ones printed in analytical-chemistry textbooks
(Harris, Quantitative Chemical Analysis; Skoog, West, Holler & Crouch,
Fundamentals of Analytical Chemistry; all from memory). The comparison
against an independent balancer (chempy) is in tests/reference/.
"""

from fractions import Fraction

import pytest

from sitegen.chem.balance import Balanced, balance, half_reaction, nullspace
from sitegen.chem.errors import CannotBalance, FormulaError
from sitegen.chem.reaction import check_balanced, parse_reaction


def _same(b: Balanced, expected: str) -> None:
    assert b.equation == parse_reaction(expected), str(b.equation)
    check_balanced(b.equation)


@pytest.mark.parametrize(
    ("skeleton", "medium", "expected", "electrons"),
    [
        # Skoog, permanganate titration of iron(II) (from memory).
        (
            "MnO4- + Fe^2+ -> Mn^2+ + Fe^3+",
            "acidic",
            "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O",
            5,
        ),
        # Harris, standardisation of permanganate with oxalic acid (from memory).
        (
            "MnO4- + H2C2O4 -> Mn^2+ + CO2",
            "acidic",
            "2 MnO4- + 5 H2C2O4 + 6 H+ -> 2 Mn^2+ + 10 CO2 + 8 H2O",
            10,
        ),
        # Harris: permanganate and hydrogen peroxide; the O2 comes from H2O2.
        (
            "MnO4- + H2O2 -> Mn^2+ + O2",
            "acidic",
            "2 MnO4- + 5 H2O2 + 6 H+ -> 2 Mn^2+ + 5 O2 + 8 H2O",
            10,
        ),
        (
            "MnO4- + H2O2 + H+ -> Mn^2+ + O2 + H2O",
            None,
            "2 MnO4- + 5 H2O2 + 6 H+ -> 2 Mn^2+ + 5 O2 + 8 H2O",
            10,
        ),
        # Skoog, dichromate titration of iron(II) (from memory).
        (
            "Cr2O7^2- + Fe^2+ -> Cr^3+ + Fe^3+",
            "acidic",
            "Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O",
            6,
        ),
        ("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+", None, "Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+", 1),
        # Iodometry (Harris, from memory).
        ("I2 + S2O3^2- -> I- + S4O6^2-", None, "I2 + 2 S2O3^2- -> 2 I- + S4O6^2-", 2),
        ("I3- + S2O3^2- -> I- + S4O6^2-", None, "I3- + 2 S2O3^2- -> 3 I- + S4O6^2-", 2),
        ("Cu^2+ + I- -> CuI + I3-", None, "2 Cu^2+ + 5 I- -> 2 CuI + I3-", 2),
        ("Cu^2+ + I- -> CuI + I2", None, "2 Cu^2+ + 4 I- -> 2 CuI + I2", 2),
        # KIO3 standardisation.
        # 5 e-: I3- is I2·I-, so this is IO3- + 5 I- -> 3 I2 plus 3 I- bound to the
        # iodine (Harris, Quantitative Chemical Analysis, iodometry; from memory)
        ("IO3- + I- -> I3-", "acidic", "IO3- + 8 I- + 6 H+ -> 3 I3- + 3 H2O", Fraction(5)),
        ("IO3- + I- -> I2", "acidic", "IO3- + 5 I- + 6 H+ -> 3 I2 + 3 H2O", 5),
        ("BrO3- + Br- -> Br2", "acidic", "BrO3- + 5 Br- + 6 H+ -> 3 Br2 + 3 H2O", 5),
        ("BrO3- + H3AsO3 -> Br- + H3AsO4", "acidic", "BrO3- + 3 H3AsO3 -> Br- + 3 H3AsO4", 6),
        # Comproportionation of Mn(VII) and Mn(II) to MnO2.
        ("MnO4- + Mn^2+ -> MnO2", "basic", "2 MnO4- + 3 Mn^2+ + 4 OH- -> 5 MnO2 + 2 H2O", 6),
        ("MnO4- + Mn^2+ -> MnO2", "acidic", "2 MnO4- + 3 Mn^2+ + 2 H2O -> 5 MnO2 + 4 H+", 6),
        # Disproportionation of chlorine in hot base.
        ("Cl2 -> Cl- + ClO3-", "basic", "3 Cl2 + 6 OH- -> 5 Cl- + ClO3- + 3 H2O", 5),
        (
            "MnO4- + SO3^2- -> MnO2 + SO4^2-",
            "basic",
            "2 MnO4- + 3 SO3^2- + H2O -> 2 MnO2 + 3 SO4^2- + 2 OH-",
            6,
        ),
        # Iodimetry of arsenic(III).
        ("H3AsO3 + I2 -> H3AsO4 + I-", "acidic", "H3AsO3 + I2 + H2O -> H3AsO4 + 2 I- + 2 H+", 2),
        ("I2 + C6H8O6 -> I- + C6H6O6", "acidic", "I2 + C6H8O6 -> 2 I- + C6H6O6 + 2 H+", 2),
        ("Fe^3+ + Sn^2+ -> Fe^2+ + Sn^4+", None, "2 Fe^3+ + Sn^2+ -> 2 Fe^2+ + Sn^4+", 2),
        (
            "Cr2O7^2- + C2H5OH -> Cr^3+ + CH3COOH",
            "acidic",
            "2 Cr2O7^2- + 3 C2H5OH + 16 H+ -> 4 Cr^3+ + 3 CH3COOH + 11 H2O",
            12,
        ),
        (
            "Ce^4+ + H2C2O4 -> Ce^3+ + CO2",
            "acidic",
            "2 Ce^4+ + H2C2O4 -> 2 Ce^3+ + 2 CO2 + 2 H+",
            2,
        ),
        ("H2O2 + Fe^2+ -> Fe^3+", "acidic", "H2O2 + 2 Fe^2+ + 2 H+ -> 2 Fe^3+ + 2 H2O", 2),
    ],
)
def test_textbook_equations(skeleton, medium, expected, electrons):
    b = balance(skeleton, medium)
    _same(b, expected)
    assert b.electrons == electrons
    assert b.medium == medium
    kinds = sorted(h.kind for h in b.halves)
    assert kinds == ["oxidation", "reduction"]
    for h in b.halves:
        check_balanced(h.reaction)
        assert h.reaction.arrow == "="
        assert abs(h.reaction.electrons) == h.n
        assert (h.reaction.electrons > 0) == (h.kind == "reduction")


@pytest.mark.parametrize(
    ("skeleton", "expected", "electrons"),
    [
        # Molecular (salt) equations: no ions to build halves, so the null
        # space decides (Skoog; from memory).
        (
            "KMnO4 + FeSO4 + H2SO4 -> K2SO4 + MnSO4 + Fe2(SO4)3 + H2O",
            "2 KMnO4 + 10 FeSO4 + 8 H2SO4 -> K2SO4 + 2 MnSO4 + 5 Fe2(SO4)3 + 8 H2O",
            10,
        ),
        (
            "KIO3 + KI + H2SO4 -> I2 + K2SO4 + H2O",
            "KIO3 + 5 KI + 3 H2SO4 -> 3 I2 + 3 K2SO4 + 3 H2O",
            5,
        ),
        ("Cu + HNO3 -> Cu(NO3)2 + NO + H2O", "3 Cu + 8 HNO3 -> 3 Cu(NO3)2 + 2 NO + 4 H2O", 6),
    ],
)
def test_molecular_equations(skeleton, expected, electrons):
    b = balance(skeleton)
    _same(b, expected)
    assert b.halves == ()
    assert b.electrons == electrons


def test_written_medium_species_are_replaced_when_a_medium_is_given():
    a = balance("MnO4- + Fe^2+ + H2O -> Mn^2+ + Fe^3+", "acidic")
    _same(a, "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O")


def test_accepts_reaction_objects_and_is_cached():
    r = parse_reaction("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+")
    assert balance(r) is balance("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+")


def test_non_redox_falls_back_to_nullspace():
    b = balance("Ag+ + CrO4^2- -> Ag2CrO4")
    _same(b, "2 Ag+ + CrO4^2- -> Ag2CrO4")
    assert b.halves == ()
    assert b.electrons == 0
    b = balance("H+ + OH- -> H2O")
    _same(b, "H+ + OH- -> H2O")
    # 2 H2 + O2 -> 2 H2O: 4 electrons move, found without half-reactions.
    b = balance("H2 + O2 -> H2O")
    _same(b, "2 H2 + O2 -> 2 H2O")
    assert b.electrons == 4


@pytest.mark.parametrize(
    ("skeleton", "medium", "fragment"),
    [
        # Without H+ and H2O there is no way to balance O.
        ("MnO4- + Fe^2+ -> Mn^2+ + Fe^3+", None, "no balanced equation"),
        # Two reductants: electron split between them is not fixed.
        ("MnO4- + Fe^2+ + H2C2O4 -> Mn^2+ + Fe^3+ + CO2", "acidic", "independent"),
        # Mn on the left only.
        ("MnO4- + Fe^2+ -> Fe^3+", "acidic", ""),
        ("Fe^3+ + e- -> Fe^2+", None, "electrons"),
        ("Fe -> Fe", None, "both sides"),
    ],
)
def test_cannot_balance(skeleton, medium, fragment):
    with pytest.raises(CannotBalance) as info:
        balance(skeleton, medium)
    assert fragment in str(info.value)
    assert info.value.species


def test_bad_formula_in_skeleton():
    with pytest.raises(FormulaError) as info:
        balance("MnO4- + Fe2+ -> Mn^2+ + Fe^3+", "acidic")
    assert info.value.suggestion == "Fe^2+"


def test_bad_medium():
    with pytest.raises(ValueError):
        balance("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+", "neutral")  # type: ignore[arg-type]


@pytest.mark.parametrize(
    ("ox", "red", "medium", "expected", "n"),
    [
        # CRC Handbook, "Electrochemical Series" / Bard, Parsons & Jordan,
        # Standard Potentials in Aqueous Solution (1985); from memory.
        ("MnO4-", "Mn^2+", "acidic", "MnO4- + 8 H+ + 5 e- = Mn^2+ + 4 H2O", 5),
        ("Cr2O7^2-", "Cr^3+", "acidic", "Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O", 6),
        ("I3-", "I-", "acidic", "I3- + 2 e- = 3 I-", 2),
        ("S4O6^2-", "S2O3^2-", "acidic", "S4O6^2- + 2 e- = 2 S2O3^2-", 2),
        ("MnO4-", "MnO2", "basic", "MnO4- + 2 H2O + 3 e- = MnO2 + 4 OH-", 3),
        ("O2", "H2O", "acidic", "O2 + 4 H+ + 4 e- = 2 H2O", 4),
        ("O2", "H2O2", "acidic", "O2 + 2 H+ + 2 e- = H2O2", 2),
        ("Fe^3+", "Fe^2+", None, "Fe^3+ + e- = Fe^2+", 1),
    ],
)
def test_half_reaction(ox, red, medium, expected, n):
    h = half_reaction(ox, red, medium)
    assert h.reaction == parse_reaction(expected)
    assert h.n == n
    assert h.kind == "reduction"


def test_half_reaction_from_couple_text():
    h = half_reaction("Cr2O7^2- = Cr^3+")
    assert h.n == 6
    assert h.reaction.canonical == "Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O"


@pytest.mark.parametrize(
    ("ox", "red", "medium"),
    [
        ("Fe^2+", "Fe^3+", "acidic"),  # written as an oxidation
        ("Fe^3+", "Fe^3+", "acidic"),
        ("MnO4-", "Fe^2+", "acidic"),  # no common element
        ("MnO4-", "Mn^2+", None),  # O cannot go anywhere
    ],
)
def test_half_reaction_errors(ox, red, medium):
    with pytest.raises(CannotBalance):
        half_reaction(ox, red, medium)


def test_nullspace_small_matrix():
    # x + y - z = 0, 2y - z = 0 (hand-solved: (1, 1, 2)).
    f = Fraction
    basis = nullspace([[f(1), f(1), f(-1)], [f(0), f(2), f(-1)]], 3)
    assert len(basis) == 1
    v = basis[0]
    assert [x / v[0] for x in v] == [1, 1, 2]
    assert nullspace([[f(1), f(0)], [f(0), f(1)]], 2) == []
