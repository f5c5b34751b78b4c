"""Tests for sitegen.chem.indicator against textbook values and closed forms."""

import math

import pytest
import scipy.constants as sc

from sitegen.chem.curve import Couple, Titration
from sitegen.chem.indicator import (
    RedoxIndicator,
    formal_potential,
    indicator_error_percent,
    indicator_on_break,
    titration_error_percent,
    transition_range,
)

S = sc.R * 298.15 * math.log(10) / sc.physical_constants["Faraday constant"][0]

# Indicator potentials (Skoog, Fundamentals of Analytical Chemistry, table of redox
# indicators, ch. 19 -- from memory): ferroin 1.11 V in 1 M H2SO4, n = 1;
# diphenylamine sulfonic acid 0.85 V in dilute acid, n = 2.
FERROIN = RedoxIndicator(1.11, 1, "pale blue", "red", label="ferroin")
DPASA = RedoxIndicator(0.85, 2, "red-violet", "colourless", label="diphenylamine sulfonate")

# Ce4+/Fe2+ in 1 M H2SO4 (1.44 V, 0.68 V; Skoog appendix 5, from memory). A tiny initial
# fraction keeps the stoichiometric point at the nominal Veq for the error tests.
CE_FE = Titration(
    Couple(0.68, 1, label="Fe3+/Fe2+"),
    Couple(1.44, 1, label="Ce4+/Ce3+"),
    "red",
    2.5,
    50.0,
    0.1,
    initial_fraction=1e-13,
)


def test_transition_range_is_plus_minus_slope_over_n():
    # E0 +- 0.05916/n V at 25 degC (Harris ch. 16, indicator transition range).
    lo, hi = transition_range(FERROIN)
    assert (lo, hi) == pytest.approx((1.11 - S, 1.11 + S), abs=1e-9)
    lo, hi = transition_range(DPASA)
    assert hi - lo == pytest.approx(S, abs=1e-9)  # 2 * slope/2


def test_proton_dependent_indicator_shifts_with_acid():
    # In(ox) + 2H+ + 2e- = In(red): E0' = E0 - 0.05916 pH (Nernst with m = n = 2).
    ind = RedoxIndicator(0.53, 2, "blue", "colourless", m=2, label="m=2 indicator")
    assert formal_potential(ind, H=0.1) == pytest.approx(0.53 - S, abs=1e-9)
    assert formal_potential(ind, H=1.0) == pytest.approx(0.53, abs=1e-12)


def test_ferroin_suits_cerium_iron():
    # Break 99.9 %..100.1 %: 0.68 + 3S = 0.857 V to 1.44 - 3S = 1.263 V; ferroin
    # 1.05..1.17 V lies inside (the textbook choice for cerimetry).
    assert indicator_on_break(CE_FE, FERROIN)


def test_diphenylamine_sulfonate_fails_cerium_iron_without_phosphate():
    # 0.835..0.865 V straddles the 99.9 % point 0.857 V: the colour starts too early.
    # Lowering the iron potential (phosphate complexes Fe3+; common practice) by
    # 0.2 V moves the 99.9 % point to 0.657 V and the indicator fits.
    assert not indicator_on_break(CE_FE, DPASA)
    t = Titration(Couple(0.48, 1), Couple(1.44, 1), "red", 2.5, 50.0, 0.1)
    assert indicator_on_break(t, DPASA)


def _titrated_fraction(E):
    # Exact for two one-electron couples (f -> 0, dilution cancels): at potential E the
    # iron is oxidised to g = 1/(1 + 10^((0.68 - E)/S)); every Fe3+ came from a Ce3+ and
    # [Ce4+]/[Ce3+] = 10^((E - 1.44)/S), so V/Veq = g (1 + 10^((E - 1.44)/S)).
    g = 1 / (1 + 10 ** ((0.68 - E) / S))
    return g * (1 + 10 ** ((E - 1.44) / S))


def test_error_after_equivalence_matches_closed_form():
    # Ferroin at 1.11 V: over-titration by about 100 * 10^((1.11 - 1.44)/S) = +2.6e-4 %
    # (textbook estimate that neglects the unreacted Fe2+).
    got = titration_error_percent(CE_FE, 1.11)
    assert got == pytest.approx(100 * (_titrated_fraction(1.11) - 1), rel=1e-6)
    assert got == pytest.approx(100 * 10 ** ((1.11 - 1.44) / S), rel=0.05)
    assert indicator_error_percent(CE_FE, FERROIN) == pytest.approx(got, rel=1e-9)


def test_error_before_equivalence_matches_closed_form():
    E_end = 0.90
    got = titration_error_percent(CE_FE, E_end)
    assert got == pytest.approx(100 * (_titrated_fraction(E_end) - 1), rel=1e-6)
    # textbook estimate: -100 / (1 + 10^((E - 0.68)/S)) = -0.019 %
    assert got == pytest.approx(-0.019, abs=5e-4)


def test_error_at_equivalence_potential_is_zero():
    # (0.68 + 1.44)/2 = 1.06 V is the equivalence potential: error 0 to within 1e-9 %.
    assert titration_error_percent(CE_FE, 1.06) == pytest.approx(0.0, abs=1e-9)
