"""Tests for sitegen.chem.formula: grammar, canonical spelling, errors."""

import ast
import pathlib

import pytest

from sitegen.chem import formula
from sitegen.chem.errors import FormulaError, NoAtomicWeight, UnknownElement
from sitegen.chem.formula import Species, molar_mass, parse_species


@pytest.mark.parametrize(
    ("text", "composition", "charge"),
    [
        # Compositions worked out by hand from the formulas (textbook counting).
        ("Fe^3+", {"Fe": 1}, 3),
        ("Fe^{3+}", {"Fe": 1}, 3),
        ("Fe^+3", {"Fe": 1}, 3),
        ("Fe³⁺", {"Fe": 1}, 3),
        ("Fe⁺³", {"Fe": 1}, 3),
        ("Cr2O7^2-", {"Cr": 2, "O": 7}, -2),
        ("MnO4-", {"Mn": 1, "O": 4}, -1),
        ("MnO₄⁻", {"Mn": 1, "O": 4}, -1),
        ("SO₄²⁻", {"S": 1, "O": 4}, -2),
        ("MnO4\u2212", {"Mn": 1, "O": 4}, -1),  # U+2212 MINUS SIGN
        ("SO4--", {"S": 1, "O": 4}, -2),
        ("H+", {"H": 1}, 1),
        ("NH4+", {"N": 1, "H": 4}, 1),
        ("I3-", {"I": 3}, -1),
        ("O3-", {"O": 3}, -1),  # ozonide: O^3- does not exist
        ("S4O6^2-", {"S": 4, "O": 6}, -2),
        ("e-", {}, -1),
        ("e⁻", {}, -1),
        ("FeSO4·7H2O", {"Fe": 1, "S": 1, "O": 11, "H": 14}, 0),
        ("FeSO4*7H2O", {"Fe": 1, "S": 1, "O": 11, "H": 14}, 0),
        ("FeSO4.7H2O", {"Fe": 1, "S": 1, "O": 11, "H": 14}, 0),
        ("CuSO4·5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0),
        ("(NH4)2Fe(SO4)2·6H2O", {"N": 2, "H": 20, "Fe": 1, "S": 2, "O": 14}, 0),
        ("[Fe(CN)6]^3-", {"Fe": 1, "C": 6, "N": 6}, -3),
        ("K3[Fe(CN)6]", {"K": 3, "Fe": 1, "C": 6, "N": 6}, 0),
        ("Ca3(PO4)2", {"Ca": 3, "P": 2, "O": 8}, 0),
        ("Na₂S₂O₃·5H₂O", {"Na": 2, "S": 2, "O": 8, "H": 10}, 0),
    ],
)
def test_parse_composition_and_charge(text, composition, charge):
    sp = parse_species(text)
    assert sp.composition == composition
    assert sp.charge == charge


@pytest.mark.parametrize(
    ("text", "state"),
    [("H2O(l)", "l"), ("Fe^3+(aq)", "aq"), ("CuI(s)", "s"), ("O2(g)", "g"), ("MnO4-", None)],
)
def test_state_label_parsed_but_ignored_for_equality(text, state):
    sp = parse_species(text)
    assert sp.state == state
    assert sp == sp.without_state()
    assert hash(sp) == hash(sp.without_state())


@pytest.mark.parametrize(
    ("text", "canonical"),
    [
        # Spellings required by the house canonical form (formula.py docstring).
        ("Fe^{3+}", "Fe^3+"),
        ("Cr2O7--", "Cr2O7^2-"),
        ("MnO₄⁻", "MnO4-"),
        ("H^+", "H+"),
        ("e^-", "e-"),
        ("I3-", "I3-"),
        ("S4O6^2-", "S4O6^2-"),
        ("S2O3^2-", "S2O3^2-"),
        ("FeSO4*7H2O", "FeSO4·7H2O"),
        ("CuSO4.5H2O", "CuSO4·5H2O"),
        ("KIO3", "KIO3"),
        ("IO3-", "IO3-"),
        ("BrO3-", "BrO3-"),
        ("ClO4-", "ClO4-"),
        ("KMnO4", "KMnO4"),
        ("K2Cr2O7", "K2Cr2O7"),
        ("Na2C2O4", "Na2C2O4"),
        ("H2SO4", "H2SO4"),
        ("HNO3", "HNO3"),
        ("H3AsO3", "H3AsO3"),
        ("NaHCO3", "NaHCO3"),
        ("HCO3-", "HCO3-"),
        ("OH-", "OH-"),
        ("NH4+", "NH4+"),
        ("H2S", "H2S"),
        ("HCl", "HCl"),
        ("H2O2", "H2O2"),
        ("CuI", "CuI"),
        # Hill order for parts with C and H (CRC Handbook formula index style).
        ("C6H8O6", "C6H8O6"),
        ("CH3CH2OH", "C2H6O"),
        ("H2C2O4", "C2H2O4"),
        ("KHC8H4O4", "C8H5KO4"),
        # Brackets are summed.
        ("(NH4)2SO4", "H8N2SO4"),
        # Bare sign would be ambiguous -> caret.
        ("O2^-", "O2^-"),
        ("Hg2^2+", "Hg2^2+"),
        ("Hg2^+", "Hg2^+"),
    ],
)
def test_canonical_spelling(text, canonical):
    sp = parse_species(text)
    assert sp.canonical == canonical
    assert str(sp) == canonical
    assert parse_species(canonical) == sp


def test_canonical_independent_of_spelling():
    assert parse_species("Fe(NH4)2(SO4)2·6H2O") == parse_species("(NH4)2Fe(SO4)2·6H2O")
    assert parse_species("OFe") == parse_species("FeO")
    assert parse_species("FeSO4·3H2O·4H2O") == parse_species("FeSO4·7H2O")
    assert parse_species("Fe^3+") == parse_species("Fe³⁺") == parse_species("Fe^{+3}")


def test_species_direct_construction_is_normalised():
    a = Species(((1, (("O", 4), ("Mn", 1))),), -1)
    assert a == parse_species("MnO4-")
    assert a.canonical == "MnO4-"
    with pytest.raises(ValueError):
        Species(((2, (("H", 2), ("O", 1))),), 0)
    with pytest.raises(ValueError):
        Species((), 2)  # only the electron has no atoms


@pytest.mark.parametrize(
    # index: the digit before which the caret belongs
    ("text", "suggestion", "index"),
    [
        ("Fe3+", "Fe^3+", 2),
        ("Cu2+", "Cu^2+", 2),
        ("SO42-", "SO4^2-", 3),
        ("PO43-", "PO4^3-", 3),
        ("S2-", "S^2-", 1),
        ("N3-", "N^3-", 1),
        ("[Fe(CN)6]3-", "[Fe(CN)6]^3-", 9),
        ("Fe3+(aq)", "Fe^3+", 2),
    ],
)
def test_ambiguous_bare_charge_rejected_with_caret_suggestion(text, suggestion, index):
    with pytest.raises(FormulaError) as info:
        parse_species(text)
    assert info.value.suggestion == suggestion
    assert info.value.index == index
    assert suggestion in str(info.value)
    # The suggestion itself must parse.
    parse_species(suggestion)


@pytest.mark.parametrize(
    ("text", "suggestion"), [("Fe+3", "Fe^3+"), ("SO4-2", "SO4^2-"), ("Fe+3(aq)", "Fe^3+")]
)
def test_sign_first_bare_charge_suggests_caret(text, suggestion):
    with pytest.raises(FormulaError) as info:
        parse_species(text)
    assert info.value.suggestion == suggestion
    assert (
        parse_species(suggestion).charge
        == parse_species(suggestion.replace("^", "^{") + "}").charge
    )


@pytest.mark.parametrize(
    ("text", "index"), [("H" + "9" * 5000, 1), ("Fe^" + "9" * 5000 + "+", 2), ("H1234567", 1)]
)
def test_absurd_numbers_are_formula_errors(text, index):
    with pytest.raises(FormulaError) as info:
        parse_species(text)
    assert info.value.index == index


def test_unknown_element():
    with pytest.raises(UnknownElement) as info:
        parse_species("XxO2")
    assert info.value.symbol == "Xx"
    assert info.value.index == 0
    with pytest.raises(UnknownElement) as info:
        parse_species("NaQ")
    assert info.value.symbol == "Q"
    assert info.value.index == 2


@pytest.mark.parametrize(
    ("text", "index"),
    [
        ("", 0),
        ("   ", 0),
        ("(NH4", 0),
        ("NH4)2", 3),
        ("Fe(CN]6", 5),
        ("()", 1),
        ("O0", 1),
        ("H02", 1),
        ("Fe^0+", 2),
        ("Fe^3", 4),
        ("Fe^{3+", 6),
        ("Na+-", 3),
        ("Fe 3", 2),
        ("Fe$", 2),
        ("fe", 0),
        ("2H2O", 0),
        ("FeSO4·", 6),
        ("e", 0),
        ("H2O(xq)", 4),
        ("Fe^3+Cl", 5),
    ],
)
def test_malformed_formulas_report_index(text, index):
    with pytest.raises(FormulaError) as info:
        parse_species(text)
    assert info.value.index == index
    assert info.value.text == text


def test_electron():
    e = parse_species("e-")
    assert e.is_electron
    assert e.composition == {}
    assert e.canonical == "e-"
    assert not parse_species("H+").is_electron
    assert molar_mass("e-") == (0.0, 0.0)


def test_molar_mass_hand_computed_from_table_values():
    # Hand sum of the 2021 abridged values (Prohaska et al. 2022; from memory):
    # H2O = 2*1.0080 + 15.999 = 18.015 g/mol.
    m, u = molar_mass("H2O")
    assert m == pytest.approx(18.015, abs=1e-9)
    # u: H atoms correlated (2*0.0002/sqrt3), O independent (0.001/sqrt3).
    assert u == pytest.approx(((2 * 0.0002) ** 2 + 0.001**2) ** 0.5 / 3**0.5, rel=1e-12)
    # State labels do not change the mass.
    assert molar_mass("H2O(l)") == molar_mass("H2O")


def test_no_standard_weight():
    sp = parse_species("TcO4-")  # parses: Tc is an element
    with pytest.raises(NoAtomicWeight):
        molar_mass(sp)


def test_parse_is_cached():
    assert parse_species("KMnO4") is parse_species("KMnO4")


def test_grammar_is_in_the_docstring():
    doc = formula.__doc__ or ""
    for token in ("species", "electron", "charge", "state", "Hill", "Table VI"):
        assert token in doc


CHEM_DIR = pathlib.Path(formula.__file__).parent
FORBIDDEN = {"yaml", "pydantic", "jinja2", "matplotlib", "ruamel", "io", "os", "pathlib"}


@pytest.mark.parametrize(
    "name",
    [
        "errors",
        "elements",
        "_atomic_weights",
        "formula",
        "reaction",
        "oxidation",
        "balance",
        "chain",
    ],
)
def test_my_chem_modules_are_pure(name):
    """No I/O imports and no open() calls in the core modules written here."""
    tree = ast.parse((CHEM_DIR / f"{name}.py").read_text(encoding="utf-8"))
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            assert not {a.name.split(".")[0] for a in node.names} & FORBIDDEN
        elif isinstance(node, ast.ImportFrom) and node.module:
            assert node.module.split(".")[0] not in FORBIDDEN
        elif isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
            assert node.func.id not in {"open", "print", "input"}
    assert "__all__" in (CHEM_DIR / f"{name}.py").read_text(encoding="utf-8")
