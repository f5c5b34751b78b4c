"""Tests for sitegen.render.fmt."""

import math
from fractions import Fraction

import pytest

from sitegen.render import fmt


def test_fixed_uses_true_minus_and_never_negative_zero():
    assert fmt.fixed(-1.5, 2) == "\u22121.50"
    assert fmt.fixed(-0.0001, 2) == "0.00"
    assert fmt.fixed(2.675, 1) == "2.7"


@pytest.mark.parametrize("bad", [None, math.nan, math.inf])
def test_missing(bad):
    assert fmt.fixed(bad, 2) == fmt.MISSING
    assert fmt.sig(bad) == fmt.MISSING
    assert fmt.data_float(bad) is None
    assert fmt.csv_number(bad, 3) == ""


@pytest.mark.parametrize(
    ("x", "digits", "text"),
    [
        (0.0012345, 3, "0.00123"),
        (9.996, 3, "10.0"),
        (123.456, 4, "123.5"),
        (1234567.0, 3, "1.23 × 10^6"),
    ],
)
def test_sig(x, digits, text):
    assert fmt.sig(x, digits) == text


def test_plus_minus_rounds_value_to_uncertainty():
    assert fmt.plus_minus(392.1253, 0.0246) == "392.125 ± 0.025"
    assert fmt.plus_minus(17.4213, 0.31) == "17.42 ± 0.31"


def test_signed_and_fraction():
    assert fmt.signed(0.03, 2) == "+0.03"
    assert fmt.signed(-0.03, 2) == "\u22120.03"
    assert fmt.fraction(Fraction(1, 6)) == "1/6"
    assert fmt.fraction(Fraction(2)) == "2"


def test_data_float_is_stable():
    assert fmt.data_float(0.1 + 0.2) == 0.3
    assert fmt.csv_number(-0.00000001, 6) == "0.000000"


def test_general_keeps_inputs_short():
    assert fmt.general(31.25) == "31.25"
    assert fmt.general(0.05) == "0.05"
    assert fmt.general(-0.1) == "\u22120.1"
    assert fmt.general(None) == fmt.MISSING
