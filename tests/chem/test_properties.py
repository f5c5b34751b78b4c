"""Property-based tests (hypothesis) for parsing, printing and balancing.

The expected values here are computed in the test from the generated input
(atom counting), never taken from the code under test.
"""

from collections import Counter
from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sitegen.chem.balance import balance, half_reaction
from sitegen.chem.elements import element_symbols
from sitegen.chem.errors import Unbalanced
from sitegen.chem.formula import parse_species
from sitegen.chem.reaction import Reaction, Term, check_balanced, parse_reaction

SYMBOLS = sorted(element_symbols())
SUB = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")
SUP = str.maketrans("0123456789+-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻")

counts = st.integers(min_value=1, max_value=12)
atom = st.tuples(st.sampled_from(SYMBOLS), counts)
group = st.one_of(
    atom.map(lambda a: ("atom", a)),
    st.tuples(st.lists(atom, min_size=1, max_size=3), counts, st.sampled_from("([")).map(
        lambda g: ("bracket", g)
    ),
)
part = st.lists(group, min_size=1, max_size=4)
species_spec = st.tuples(
    part,
    st.lists(st.tuples(counts, part), max_size=2),
    st.integers(min_value=-4, max_value=4),
    st.sampled_from([None, "aq", "s", "l", "g"]),
)


def _render_part(groups, unicode: bool) -> tuple[str, Counter]:
    text, comp = "", Counter()

    def num(n: int) -> str:
        if n == 1:
            return ""
        return str(n).translate(SUB) if unicode else str(n)

    for kind, g in groups:
        if kind == "atom":
            sym, n = g
            text += sym + num(n)
            comp[sym] += n
        else:
            atoms, k, opener = g
            closer = ")" if opener == "(" else "]"
            text += opener + "".join(s + num(n) for s, n in atoms) + closer + num(k)
            for s, n in atoms:
                comp[s] += n * k
    return text, comp


def _render(spec, unicode: bool) -> tuple[str, dict, int]:
    first, adducts, charge, state = spec
    text, comp = _render_part(first, unicode)
    for mult, p in adducts:
        t, c = _render_part(p, unicode)
        text += "·" + (str(mult) if mult > 1 else "") + t
        for s, n in c.items():
            comp[s] += mult * n
    if charge:
        mag = str(abs(charge)) if abs(charge) > 1 else ""
        sign = "+" if charge > 0 else "-"
        text += (mag + sign).translate(SUP) if unicode else f"^{mag}{sign}"
    if state:
        text += f"({state})"
    return text, dict(comp), charge


@settings(max_examples=300, deadline=None)
@given(species_spec, st.booleans())
def test_random_formula_round_trips(spec, unicode):
    text, comp, charge = _render(spec, unicode)
    sp = parse_species(text)
    assert sp.composition == comp
    assert sp.charge == charge
    again = parse_species(sp.canonical)
    assert again == sp
    assert again.canonical == sp.canonical


# Balanced equations from textbooks (Harris; Skoog; from memory).
BALANCED = [
    "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O",
    "Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O",
    "2 MnO4- + 5 H2O2 + 6 H+ -> 2 Mn^2+ + 5 O2 + 8 H2O",
    "IO3- + 8 I- + 6 H+ -> 3 I3- + 3 H2O",
    "2 Cu^2+ + 5 I- -> 2 CuI + I3-",
    "3 Cl2 + 6 OH- -> 5 Cl- + ClO3- + 3 H2O",
    "I3- + 2 S2O3^2- -> 3 I- + S4O6^2-",
    "FeSO4·7H2O -> FeSO4 + 7 H2O",
]
positive = st.fractions(min_value=Fraction(1, 50), max_value=50).filter(lambda q: q > 0)


@settings(max_examples=150, deadline=None)
@given(st.sampled_from(BALANCED), positive, st.data())
def test_scaled_balanced_reactions_stay_balanced(text, k, data):
    r = parse_reaction(text)
    check_balanced(r.scaled(k))
    # Bumping one coefficient must break the balance by exactly that
    # species' atoms and charge.
    terms = list(r.left)
    i = data.draw(st.integers(min_value=0, max_value=len(terms) - 1))
    terms[i] = Term(terms[i].coeff + 1, terms[i].species)
    bumped = Reaction(tuple(terms), r.right, r.arrow)
    sp = terms[i].species
    with pytest.raises(Unbalanced) as info:
        check_balanced(bumped)
    assert info.value.atoms_delta == {s: Fraction(-n) for s, n in sp.composition.items()}
    assert info.value.charge_delta == -sp.charge


# Couples (oxidised form, reduced form) with no element in common other
# than H and O, so any oxidant/reductant pair makes a redox equation.
COUPLES = [
    ("MnO4-", "Mn^2+"),
    ("Cr2O7^2-", "Cr^3+"),
    ("Ce^4+", "Ce^3+"),
    ("Fe^3+", "Fe^2+"),
    ("I2", "I-"),
    ("BrO3-", "Br-"),
    ("H3AsO4", "H3AsO3"),
    ("Sn^4+", "Sn^2+"),
    ("S4O6^2-", "S2O3^2-"),
    ("NO3-", "NO"),
    ("Cu^2+", "Cu"),
    ("CO2", "H2C2O4"),
    ("Ag+", "Ag"),
    ("VO2+", "VO^2+"),
]


def _independent_delta(r: Reaction) -> tuple[Counter, int]:
    atoms: Counter = Counter()
    charge = 0
    for sign, terms in ((-1, r.left), (1, r.right)):
        for t in terms:
            assert t.coeff.denominator == 1 and t.coeff > 0
            for s, n in t.species.composition.items():
                atoms[s] += sign * int(t.coeff) * n
            charge += sign * int(t.coeff) * t.species.charge
    return +atoms + (-atoms), charge  # drop zeros (both signs)


@settings(max_examples=120, deadline=None)
@given(
    st.integers(min_value=0, max_value=len(COUPLES) - 1),
    st.integers(min_value=0, max_value=len(COUPLES) - 1),
    st.sampled_from(["acidic", "basic"]),
)
def test_balancer_never_returns_unbalanced(i, j, medium):
    if i == j:
        return
    ox1, red1 = COUPLES[i]
    ox2, red2 = COUPLES[j]
    skeleton = f"{ox1} + {red2} -> {red1} + {ox2}"
    b = balance(skeleton, medium)
    atoms, charge = _independent_delta(b.equation)
    assert not atoms
    assert charge == 0
    # Lowest whole numbers: the coefficients share no common factor.
    from math import gcd

    g = 0
    for t in (*b.equation.left, *b.equation.right):
        g = gcd(g, int(t.coeff))
    assert g == 1
    # Electrons: per mol of oxidant, as in its own (handbook-checked) half.
    h = half_reaction(ox1, red1, medium)
    ox_sp = parse_species(ox1)
    per_ox = Fraction(h.n) / next(t.coeff for t in h.reaction.left if t.species == ox_sp)
    coeff = next(t.coeff for t in b.equation.left if t.species == ox_sp)
    assert b.electrons == coeff * per_ox


ALPHABET = "HCONSFeMnCrIKa()[]{}^+-·*.0123456789 ₂₄³⁺⁻e\u2212"


@settings(max_examples=400, deadline=None)
@given(st.text(alphabet=ALPHABET, max_size=14))
def test_parse_species_fails_only_with_chem_errors(text):
    """Arbitrary text either parses or raises a ChemError - never a crash."""
    from sitegen.chem.errors import ChemError

    try:
        sp = parse_species(text)
    except ChemError as e:
        index = getattr(e, "index", None)
        assert index is None or 0 <= index <= len(text)
        return
    assert parse_species(sp.canonical) == sp


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet=ALPHABET + "=>→ /", max_size=24))
def test_parse_reaction_fails_only_with_chem_errors(text):
    from sitegen.chem.errors import ChemError

    try:
        parse_reaction(text)
    except ChemError as e:
        index = getattr(e, "index", None)
        assert index is None or 0 <= index <= len(text)
