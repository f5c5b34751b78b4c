"""Tests for sitegen.chem.curve: solver agreement, balances, monotonicity, API."""

import math
import subprocess
import sys

import numpy as np
import pytest
import scipy.constants as sc
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from sitegen.chem.curve import (
    Couple,
    Titration,
    curve_pointwise_brentq,
    equivalence_volume_mL,
    potential_at,
    potential_break_V,
    speciation,
    stoichiometric_volume_mL,
    titration_curve,
    volume_at_potential,
)
from sitegen.chem.errors import ChemError
from sitegen.chem.numerics_errors import CurveUndefined

# Formal/standard potentials, V vs SHE (Harris, Quantitative Chemical Analysis, appendix H;
# Skoog, Fundamentals of Analytical Chemistry, appendix 5 -- from memory).
FE_H2SO4 = Couple(0.68, 1, label="Fe3+/Fe2+ (1 M H2SO4)")
CE_H2SO4 = Couple(1.44, 1, label="Ce4+/Ce3+ (1 M H2SO4)")
FE = Couple(0.771, 1, label="Fe3+/Fe2+")
MNO4 = Couple(1.507, 5, m=8, label="MnO4-/Mn2+")
CR2O7 = Couple(1.33, 6, a=1, b=2, m=14, label="Cr2O7^2-/Cr3+")
I3 = Couple(0.536, 2, a=1, b=3, label="I3-/I-")
S4O6 = Couple(0.08, 2, a=1, b=2, reversible=False, label="S4O6^2-/S2O3^2-")

SETUPS = {
    "Ce/Fe symmetric": Titration(FE_H2SO4, CE_H2SO4, "red", 2.5, 50.0, 0.1),
    "MnO4/Fe proton": Titration(FE, MNO4, "red", 2.5, 50.0, 0.02, H_mol_per_L=0.5),
    "Cr2O7/Fe asymmetric": Titration(FE, CR2O7, "red", 2.5, 50.0, 0.1 / 6),
    "Cr2O7 in flask, Fe titrant": Titration(CR2O7, FE, "ox", 0.5, 50.0, 0.1),
    "I3- with excess I-, thiosulfate": Titration(
        I3, S4O6, "ox", 1.0, 50.0, 0.1, analyte_partner_mol_per_L=0.1
    ),
    "Fe3+ in flask with Fe2+ partner, Ti-like titrant": Titration(
        FE,
        Couple(0.1, 1, label="Ti(IV)/Ti(III)"),
        "ox",
        2.0,
        40.0,
        0.05,
        analyte_partner_mol_per_L=0.01,
    ),
}


def _grid(t, n=41):
    Veq = equivalence_volume_mL(t)
    V = np.linspace(0.0, 3.0 * Veq, n)
    extra = [Veq, stoichiometric_volume_mL(t), 0.999 * Veq, 1.001 * Veq, 1e-9 * Veq]
    return np.sort(np.concatenate([V, extra]))


@pytest.mark.parametrize("name", sorted(SETUPS))
def test_vectorised_matches_pointwise_brentq(name):
    t = SETUPS[name]
    V = _grid(t)
    fast = titration_curve(t, V).E_V
    ref = curve_pointwise_brentq(t, V)
    assert np.array_equal(np.isnan(fast), np.isnan(ref))
    ok = ~np.isnan(fast)
    assert ok.sum() >= 10
    assert np.max(np.abs(fast[ok] - ref[ok])) < 1e-9


@pytest.mark.parametrize("name", sorted(SETUPS))
def test_dense_volumes_at_equivalence_match_pointwise_brentq(name):
    # Many volumes within 0.1 % of the stoichiometric point take the start's
    # array polish; one or two at a time take its per-point form. Both must
    # give the pointwise solution.
    t = SETUPS[name]
    V_st = stoichiometric_volume_mL(t)
    V = V_st * (1.0 + np.linspace(-9e-4, 9e-4, 64))
    dense = titration_curve(t, V).E_V
    ref = curve_pointwise_brentq(t, V)
    assert np.array_equal(np.isnan(dense), np.isnan(ref))
    ok = ~np.isnan(dense)
    if ok.any():
        assert np.max(np.abs(dense[ok] - ref[ok])) < 1e-9
    alone = np.array([titration_curve(t, [v]).E_V[0] for v in V[::8]])
    assert np.array_equal(np.isnan(alone), np.isnan(dense[::8]))
    ok = ~np.isnan(alone)
    if ok.any():
        assert np.max(np.abs(alone[ok] - dense[::8][ok])) < 1e-12


@pytest.mark.parametrize(
    ("name", "Veq"),
    [
        # Stoichiometry by hand: 2.5 mmol Fe2+ / 0.1 M Ce4+ (1:1) = 25 mL
        ("Ce/Fe symmetric", 25.0),
        # 2.5 mmol Fe2+ / (5 e- x 0.02 M MnO4-) = 25 mL
        ("MnO4/Fe proton", 25.0),
        # 2.5 mmol Fe2+ / (6 e- x 0.1/6 M Cr2O7^2-) = 25 mL
        ("Cr2O7/Fe asymmetric", 25.0),
        # 0.5 mmol Cr2O7^2- x 6 e- / 0.1 M Fe2+ = 30 mL
        ("Cr2O7 in flask, Fe titrant", 30.0),
        # 1.0 mmol I3- needs 2 S2O3^2-: 2.0 mmol / 0.1 M = 20 mL
        ("I3- with excess I-, thiosulfate", 20.0),
    ],
)
def test_equivalence_volume(name, Veq):
    assert equivalence_volume_mL(SETUPS[name]) == pytest.approx(Veq, rel=1e-12)


def test_irreversible_titrant_gives_nan_and_note():
    t = SETUPS["I3- with excess I-, thiosulfate"]
    c = titration_curve(t, [0.0, 10.0, 19.0, 20.0, 30.0, 60.0])
    assert np.all(np.isfinite(c.E_V[:3]))
    assert np.all(np.isnan(c.E_V[3:]))
    assert c.equivalence_potential_V is None
    assert c.note is not None and "not electrochemically reversible" in c.note
    assert "S4O6^2-/S2O3^2-" in c.note
    with pytest.raises(CurveUndefined):
        potential_at(t, 25.0)
    with pytest.raises(CurveUndefined):
        potential_break_V(t)
    # the error is a chemistry error for the caller's `located(...)` wrapper
    assert issubclass(CurveUndefined, ChemError)


def test_irreversible_analyte_masks_the_first_branch():
    t = Titration(
        Couple(0.08, 2, a=1, b=2, reversible=False, label="S4O6^2-/S2O3^2-"),
        Couple(0.536, 2, a=1, b=3, label="I3-/I-"),
        "red",
        2.0,
        50.0,
        0.05,
    )
    Veq = equivalence_volume_mL(t)
    c = titration_curve(t, [0.0, 0.5 * Veq, stoichiometric_volume_mL(t), 1.5 * Veq])
    assert np.all(np.isnan(c.E_V[:3]))
    assert np.isfinite(c.E_V[3])
    assert c.note is not None and "up to the equivalence point" in c.note


def test_curve_fields_and_read_only():
    t = SETUPS["Ce/Fe symmetric"]
    c = titration_curve(t, [0.0, 12.5, 25.0, 50.0])
    assert c.fraction.tolist() == pytest.approx([0.0, 0.5, 1.0, 2.0])
    assert c.equivalence_volume_mL == pytest.approx(25.0)
    assert c.note is None
    with pytest.raises(ValueError):
        c.E_V[0] = 0.0


def test_rejects_bad_input():
    with pytest.raises(ValueError, match="positive"):
        Couple(0.7, 0)
    with pytest.raises(ValueError, match="analyte_form"):
        Titration(FE, CE_H2SO4, "both", 1.0, 50.0, 0.1)  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="initial_fraction"):
        Titration(FE, CE_H2SO4, "red", 1.0, 50.0, 0.1, initial_fraction=0.0)
    with pytest.raises(ValueError, match="V0_mL"):
        Titration(FE, CE_H2SO4, "red", 1.0, 0.0, 0.1)
    with pytest.raises(ValueError, match="volumes"):
        titration_curve(SETUPS["Ce/Fe symmetric"], [-1.0])


@pytest.mark.parametrize("name", sorted(SETUPS))
def test_volume_at_potential_inverts_the_curve(name):
    t = SETUPS[name]
    Veq = equivalence_volume_mL(t)
    for frac in (0.1, 0.5, 0.99, 0.9995):
        V = frac * Veq
        E = potential_at(t, V)
        assert volume_at_potential(t, E) == pytest.approx(V, rel=1e-8)


def test_scipy_is_not_imported_by_the_curve_module():
    code = (
        "import sys, numpy as np\n"
        "from sitegen.chem import curve\n"
        "t = curve.Titration(curve.Couple(0.68, 1), curve.Couple(1.44, 1), 'red', 2.5, 50.0, 0.1)\n"
        "curve.titration_curve(t, np.linspace(0, 50, 11))\n"
        "curve.volume_at_potential(t, 1.0)\n"
        "print('scipy' in sys.modules)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd="."
    )
    assert out.stdout.strip() == "False"


# ------------------------------------------------------------------ properties

_SHAPES = [(1.0, 1.0), (1.0, 2.0), (1.0, 3.0), (2.0, 1.0)]


@st.composite
def titrations(draw, partner=True):
    form = draw(st.sampled_from(["red", "ox"]))
    a1, b1 = draw(st.sampled_from(_SHAPES))
    a2, b2 = draw(st.sampled_from(_SHAPES))
    n1 = draw(st.sampled_from([1, 2, 5, 6]))
    n2 = draw(st.sampled_from([1, 2, 5, 6]))
    E_an = draw(st.floats(-0.3, 1.2))
    gap = draw(st.floats(0.25, 1.0))  # favourable reaction, log K of ~4 or more per electron
    m_an = draw(st.sampled_from([0.0, 8.0, 14.0, -2.0]))
    m_ti = draw(st.sampled_from([0.0, 8.0]))
    H = draw(st.floats(0.05, 2.0))
    # the gap is between the potentials at this [H+] (E0 + slope m/n log10 [H+]),
    # otherwise the "titrant" may not react at all
    shift = 0.05916 * math.log10(H) * (m_an / n1 - m_ti / n2)
    E_ti = E_an + shift + (gap if form == "red" else -gap)
    analyte = Couple(E_an, n1, a=a1, b=b1, m=m_an)
    titrant = Couple(E_ti, n2, a=a2, b=b2, m=m_ti)
    t = Titration(
        analyte,
        titrant,
        form,
        analyte_mmol=draw(st.floats(0.05, 5.0)),
        V0_mL=draw(st.floats(10.0, 200.0)),
        titrant_mol_per_L=draw(st.floats(0.005, 0.5)),
        H_mol_per_L=H,
        initial_fraction=10 ** draw(st.floats(-9.0, -3.0)),
        analyte_partner_mol_per_L=draw(st.sampled_from([0.0, 0.0, 0.01, 0.2])) if partner else 0.0,
    )
    # a burette delivers at most a few flask volumes
    assume(equivalence_volume_mL(t) <= 3.0 * t.V0_mL)
    return t


_PROP = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@_PROP
@given(titrations(partner=False))
def test_curve_is_monotone(t):
    """E(V) is monotone when the reaction, not the dilution, changes the ratios.

    For an asymmetric couple dilution alone shifts E (see the next test), so a
    flask holding much of the couple's other form can legitimately show E
    moving the "wrong" way for the first drops; such setups are excluded here.
    """
    V = np.linspace(0.0, 3.0 * equivalence_volume_mL(t), 301)
    E = titration_curve(t, V).E_V
    assert np.all(np.isfinite(E))
    d = np.diff(E)
    # adding an oxidant raises E, adding a reductant lowers it; allow solver noise
    if t.analyte_form == "red":
        assert d.min() >= -1e-10
    else:
        assert d.max() <= 1e-10


def test_dilution_shifts_an_asymmetric_couple():
    # Cr2O7^2- + 14H+ + 6e- = 2Cr3+: [Ox]/[Red]^2 grows with the volume, so pure
    # dilution (a titrant too dilute to react) raises E by (slope/6) log10(Vtot/V0)
    # (Nernst equation with a = 1, b = 2; Harris, ch. 14 -- textbook relation).
    t = Titration(CR2O7, FE, "ox", 0.5, 50.0, 1e-12, analyte_partner_mol_per_L=0.2)
    slope = sc.R * 298.15 * math.log(10) / sc.physical_constants["Faraday constant"][0]
    E0, E1 = potential_at(t, 0.0), potential_at(t, 50.0)
    assert E1 - E0 == pytest.approx(slope / 6 * math.log10(100.0 / 50.0), abs=1e-9)


@_PROP
@given(titrations())
def test_balances_hold_at_the_solution(t):
    Veq = equivalence_volume_mL(t)
    V = np.array([0.0, 0.3, 0.9, 0.999, 1.0, 1.001, 1.2, 3.0]) * Veq
    sp = speciation(t, V)
    Vtot = t.V0_mL + V
    an, ti = t.analyte, t.titrant
    partner = t.analyte_partner_mol_per_L * t.V0_mL
    A, f = t.analyte_mmol, t.initial_fraction
    # Nernst for both couples at the one potential (R, F from scipy's CODATA set).
    slope = sc.R * t.T_K / sc.physical_constants["Faraday constant"][0]
    lnH = math.log(t.H_mol_per_L)
    for cp, lnox, lnred, has in (
        (an, sp.ln_analyte_ox, sp.ln_analyte_red, np.ones(V.size, bool)),
        (ti, sp.ln_titrant_ox, sp.ln_titrant_red, V > 0),
    ):
        with np.errstate(invalid="ignore"):  # -inf - -inf where the titrant is absent
            E_nernst = cp.E0 + slope / cp.n * (cp.a * lnox + cp.m * lnH - cp.b * lnred)
        assert np.max(np.abs(E_nernst[has] - sp.E_V[has])) < 1e-9
    # Mass balance per couple in Red-equivalents, written plainly in mmol.
    if t.analyte_form == "red":
        T_an = A + an.b / an.a * partner
        T_ti = ti.b / ti.a * t.titrant_mol_per_L * V
    else:
        T_an = an.b / an.a * A + partner
        T_ti = t.titrant_mol_per_L * V
    got_an = (sp.analyte_red + an.b / an.a * sp.analyte_ox) * Vtot
    got_ti = (sp.titrant_red + ti.b / ti.a * sp.titrant_ox) * Vtot
    assert np.allclose(got_an, T_an, rtol=1e-11, atol=0)
    assert np.allclose(got_ti[1:], T_ti[1:], rtol=1e-11, atol=0)
    # Electron balance: electrons lost by the reductant = gained by the oxidant.
    if t.analyte_form == "red":
        ox0 = f * A * an.a / an.b + partner  # Ox of the analyte couple at V = 0, mmol
        lost = an.n / an.a * (sp.analyte_ox * Vtot - ox0)
        gained = ti.n / ti.b * sp.titrant_red * Vtot
        scale = A * an.n / an.b
    else:
        red0 = f * A * an.b / an.a + partner
        gained = an.n / an.b * (sp.analyte_red * Vtot - red0)
        lost = ti.n / ti.a * sp.titrant_ox * Vtot
        scale = A * an.n / an.a
    assert np.max(np.abs(lost - gained)) / scale < 1e-10


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(titrations())
def test_random_setups_match_brentq(t):
    V = np.array([0.0, 0.2, 0.5, 0.99, 1.0, 1.01, 2.0, 3.0]) * equivalence_volume_mL(t)
    assert np.max(np.abs(titration_curve(t, V).E_V - curve_pointwise_brentq(t, V))) < 1e-9
