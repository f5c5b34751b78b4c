"""The analysis of a method against hand calculations from outside values."""

from __future__ import annotations

import math
import shutil
from fractions import Fraction
from pathlib import Path

import pytest

from sitegen.build.run import analyse_all
from sitegen.load.collection import load_collection

DEMO = Path(__file__).resolve().parents[1] / "methods"

# IUPAC/CIAAW 2021 abridged standard atomic weight of Fe (Prohaska et al.,
# Pure Appl. Chem. 94 (2022) 573)
M_FE = 55.845
# CODATA 2018: R = 8.314462618 J/(mol K), F = 96485.33212 C/mol
SLOPE_25C = 8.314462618 * 298.15 * math.log(10) / 96485.33212


@pytest.fixture(scope="module")
def demo():
    col = load_collection(DEMO)
    return col, analyse_all(col)


def test_ceric_iron_by_hand(demo):
    _, analyses = demo
    a = analyses["iron-ii-ceric"]
    # (31.25 - 0.05) mL * 0.1000 mol/L * 1 * 55.845 g/mol / 10.00 mL, in g/L
    assert a.result.value == pytest.approx(31.20 * 0.1000 * M_FE / 10.00, rel=1e-12)
    assert a.factor_derived == Fraction(1)
    # log10 K = (1.44 - 0.68) V / slope, formal potentials in 1 M H2SO4
    # (Harris, Quantitative Chemical Analysis, appendix H; from memory)
    assert a.log10_K == pytest.approx((1.44 - 0.68) / SLOPE_25C, rel=1e-9)
    # symmetric couples: E_eq = (n1 E1 + n2 E2) / (n1 + n2)
    assert a.curve.equivalence_potential_V == pytest.approx((1.44 + 0.68) / 2, abs=1e-6)
    assert a.curve.equivalence_volume_mL == pytest.approx(31.20, rel=1e-12)
    # SCE is +0.241 V against SHE (Bard & Faulkner, Electrochemical Methods,
    # 2nd ed., table C.2; from memory)
    assert a.curve.equivalence_potential_ref_V == pytest.approx(1.06 - 0.241, abs=1e-6)


def test_every_demo_method_has_its_numbers(demo):
    _, analyses = demo
    for mid, a in analyses.items():
        assert a.findings == (), mid
        assert a.result is not None and a.result.agrees, mid
        assert a.factor_derived is not None, mid
        assert a.curve is not None, mid
        assert a.budget is not None and a.budget.U > 0, mid
        assert a.log10_K is not None and a.log10_K > 8, mid


def test_site_reference_electrode_is_the_default(tmp_path: Path):
    src = tmp_path / "src"
    shutil.copytree(DEMO, src)
    rec = src / "records" / "iron-ii-ceric.yaml"
    text = rec.read_text(encoding="utf-8")
    lines = [ln for ln in text.splitlines(keepends=True) if "reference_electrode:" not in ln]
    rec.write_text("".join(lines), encoding="utf-8")
    site = src / "site.yaml"
    site.write_text(
        site.read_text(encoding="utf-8").replace(
            "reference_electrode: SCE", "reference_electrode: Ag/AgCl-3M"
        ),
        encoding="utf-8",
    )
    col = load_collection(src)
    a = analyse_all(col)["iron-ii-ceric"]
    assert a.curve.reference == "Ag/AgCl-3M"
    # Ag/AgCl in 3 M KCl: +0.210 V against SHE (Bard & Faulkner; from memory)
    assert a.curve.equivalence_potential_ref_V == pytest.approx(1.06 - 0.210, abs=1e-6)
