"""Tests for sitegen.render.chemtext."""

import pytest

from sitegen.render.chemtext import reaction_html, species_html


@pytest.mark.parametrize(
    ("text", "html"),
    [
        ("H2SO4", "H<sub>2</sub>SO<sub>4</sub>"),
        ("Fe^3+", "Fe<sup>3+</sup>"),
        ("Fe^{3+}", "Fe<sup>3+</sup>"),
        ("Fe^+3", "Fe<sup>3+</sup>"),
        ("Fe³⁺", "Fe<sup>3+</sup>"),
        ("Cr2O7^2-", "Cr<sub>2</sub>O<sub>7</sub><sup>2\u2212</sup>"),
        ("MnO4-", "MnO<sub>4</sub><sup>\u2212</sup>"),
        ("SO4--", "SO<sub>4</sub><sup>2\u2212</sup>"),
        ("H+", "H<sup>+</sup>"),
        ("e-", "e<sup>\u2212</sup>"),
        ("I3-", "I<sub>3</sub><sup>\u2212</sup>"),
        ("FeSO4·7H2O", "FeSO<sub>4</sub>·7H<sub>2</sub>O"),
        (
            "(NH4)2Fe(SO4)2·6H2O",
            "(NH<sub>4</sub>)<sub>2</sub>Fe(SO<sub>4</sub>)<sub>2</sub>·6H<sub>2</sub>O",
        ),
        ("Fe^2+(aq)", "Fe<sup>2+</sup>(aq)"),
        ("H2O", "H<sub>2</sub>O"),
    ],
)
def test_species(text, html):
    assert species_html(text) == html


def test_half_reaction_uses_equilibrium_arrow_and_coefficients():
    out = reaction_html("Cr2O7^2- + 14 H+ + 6 e- = 2 Cr^3+ + 7 H2O")
    assert " ⇌ " in out and "=" not in out.replace('class="coeff"', "")
    assert '<span class="coeff">14</span>' in out
    assert out.count("<sub>") == 3  # 2, 7 and the water's 2; coefficients stay on the line


def test_reaction_arrow():
    assert " → " in reaction_html("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+")
    assert " ⇌ " in reaction_html("A <=> B")
    assert reaction_html("I2 + 2 e- ⇌ 2 I-").count("⇌") == 1


def test_no_hyphen_minus_left_in_charges():
    out = reaction_html("2 S2O3^2- + I3- -> S4O6^2- + 3 I-")
    assert "-" not in out.replace("->", "")
    assert out.count("\u2212") == 4


def test_markup_in_text_is_escaped():
    out = species_html("<script>alert(1)</script>")
    assert "<script>" not in out and "&lt;script&gt;" in out
    assert "<img" not in reaction_html("<img src=x onerror=alert(1)> -> B")
