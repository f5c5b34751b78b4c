"""Tests for sitegen.chem.uncertainty and sitegen.chem.glassware."""

import math

import pytest

from sitegen.chem.glassware import CLASS_A, tolerance_mL
from sitegen.chem.uncertainty import (
    Quantity,
    propagate,
    relative_budget,
    root_sum_square,
    u_from_expanded,
    u_rectangular,
    u_triangular,
)


def test_linear_model_is_exact():
    # y = a + 2b - c: u_c^2 = u_a^2 + 4 u_b^2 + u_c^2 (GUM eq. 10 with c_i = 1, 2, -1).
    qs = [Quantity("a", 1.0, 0.1, "g"), Quantity("b", 2.0, 0.2, "g"), Quantity("c", 0.5, 0.3, "g")]
    b = propagate(lambda x: x["a"] + 2 * x["b"] - x["c"], qs, unit="g")
    assert b.value == pytest.approx(4.5)
    assert b.u_c == pytest.approx(math.sqrt(0.01 + 4 * 0.04 + 0.09), rel=1e-9)
    assert [c.sensitivity for c in b.contributions] == pytest.approx([1.0, 2.0, -1.0], rel=1e-9)
    assert b.U == pytest.approx(2 * b.u_c)
    assert sum(c.share for c in b.contributions) == pytest.approx(1.0)
    assert b.contributions[2].contribution == pytest.approx(0.3, rel=1e-9)


def test_nonlinear_sensitivity_matches_derivative():
    # y = exp(x) ln(z): dy/dx = y, dy/dz = exp(x)/z (analytic derivatives)
    qs = [Quantity("x", 0.3, 0.01), Quantity("z", 4.0, 0.02)]
    b = propagate(lambda v: math.exp(v["x"]) * math.log(v["z"]), qs)
    cx, cz = (c.sensitivity for c in b.contributions)
    assert cx == pytest.approx(math.exp(0.3) * math.log(4.0), rel=1e-6)
    assert cz == pytest.approx(math.exp(0.3) / 4.0, rel=1e-6)


def test_relative_budget_agrees_with_propagate_for_a_quotient():
    qs = [Quantity("m", 0.3888, 0.00013, "g"), Quantity("V", 18.64, 0.013, "mL")]
    rb = relative_budget(qs, [1, -1], factor=1000.0, unit="g/L")
    pb = propagate(lambda x: 1000.0 * x["m"] / x["V"], qs, unit="g/L")
    assert rb.value == pytest.approx(pb.value, rel=1e-12)
    assert rb.u_c == pytest.approx(pb.u_c, rel=1e-6)
    # (u/y)^2 = (u_m/m)^2 + (u_V/V)^2 (CG4 section 8.2.6 rule 2)
    assert rb.u_rel == pytest.approx(math.hypot(0.00013 / 0.3888, 0.013 / 18.64), rel=1e-12)


def test_zero_uncertainty_input_contributes_nothing():
    qs = [Quantity("a", 2.0, 0.0), Quantity("b", 3.0, 0.1)]
    b = propagate(lambda x: x["a"] * x["b"], qs)
    assert b.contributions[0].contribution == 0.0
    assert b.contributions[0].sensitivity == pytest.approx(3.0, rel=1e-6)
    assert b.u_c == pytest.approx(0.2, rel=1e-9)


def test_bad_inputs():
    with pytest.raises(ValueError, match="duplicate"):
        propagate(lambda x: x["a"], [Quantity("a", 1, 0.1), Quantity("a", 2, 0.1)])
    with pytest.raises(ValueError, match=">= 0"):
        Quantity("a", 1.0, -0.1)
    with pytest.raises(ValueError, match="exponents"):
        relative_budget([Quantity("a", 1, 0.1)], [1, 2])


def test_distribution_conversions():
    # EURACHEM/CITAC CG4, 3rd ed., example A3 (from memory): KHP purity 1.0000 +- 0.0005
    # rectangular -> 0.00029; 20 mL burette +- 0.03 mL triangular -> 0.012 mL.
    assert u_rectangular(0.0005) == pytest.approx(0.00029, abs=5e-6)
    assert u_triangular(0.03) == pytest.approx(0.012, abs=5e-4)
    assert u_rectangular(1.0) == pytest.approx(1 / math.sqrt(3))
    assert u_triangular(1.0) == pytest.approx(1 / math.sqrt(6))
    assert u_from_expanded(0.02, 2.0) == pytest.approx(0.01)
    assert root_sum_square(3.0, 4.0) == pytest.approx(5.0)
    with pytest.raises(ValueError):
        u_rectangular(-1.0)


@pytest.mark.parametrize(
    ("kind", "nominal", "mpe"),
    [
        # ISO 385 / ISO 648 / ISO 1042 Class A tables (from memory)
        ("burette", 50, 0.05),
        ("burette", 25, 0.03),
        ("pipette", 25, 0.030),
        ("pipette", 10, 0.020),
        ("flask", 250, 0.15),
        ("flask", 1000, 0.40),
    ],
)
def test_glassware_tolerances(kind, nominal, mpe):
    assert tolerance_mL(kind, nominal) == pytest.approx(mpe)
    assert "ISO" in CLASS_A[kind].standard


def test_glassware_tolerance_grows_with_volume():
    # Tolerances are non-decreasing with nominal volume in each ISO table (common practice).
    for table in CLASS_A.values():
        sizes = sorted(table.tolerance_mL)
        tol = [table.tolerance_mL[v] for v in sizes]
        assert tol == sorted(tol)
        # and relative tolerance shrinks (bigger glassware is relatively more accurate)
        rel = [t / v for t, v in zip(tol, sizes, strict=True)]
        assert rel == sorted(rel, reverse=True)


def test_glassware_unknown_size_lists_known():
    with pytest.raises(KeyError) as exc:
        tolerance_mL("pipette", 15)
    assert "5, 10, 20, 25, 50, 100" in str(exc.value)
    with pytest.raises(KeyError, match="burette"):
        tolerance_mL("cylinder", 100)


def test_pipette_tolerance_into_a_budget():
    # A 25 mL Class A pipette (+-0.03 mL, rectangular) in a dilution factor 250/25.
    qs = [
        Quantity("Vf", 250.0, u_rectangular(tolerance_mL("flask", 250)), "mL"),
        Quantity("Vp", 25.0, u_rectangular(tolerance_mL("pipette", 25)), "mL"),
    ]
    b = relative_budget(qs, [1, -1])
    assert b.value == pytest.approx(10.0)
    assert b.u_rel == pytest.approx(math.hypot(0.15 / 250, 0.03 / 25) / math.sqrt(3), rel=1e-12)
