"""method_hazards: union of the reagents' classifications, strongest
signal word, canonical order, PPE union and cautions."""

import pytest
from fixture_util import DEMO, FIXTURES

from sitegen.hazards import method_hazards
from sitegen.hazards.summary import UNKNOWN_TEXT
from sitegen.load.collection import load_collection
from sitegen.model import HazardData, ReagentUse, Role


@pytest.fixture(scope="module")
def base():
    col = load_collection(FIXTURES / "base", cwd=FIXTURES / "base")
    return col.methods["iron-permanganate"].record, {k: v.record for k, v in col.reagents.items()}


def test_union_in_canonical_order(base):
    rec, rg = base
    s = method_hazards(rec, rg)
    # permanganate: H272 H302 H314 H410; sulfuric acid: H290 H314
    assert [c for c, _ in s.hazard_statements] == ["H272", "H290", "H302", "H314", "H410"]
    assert dict(s.hazard_statements)["H314"] == "Causes severe skin burns and eye damage."
    assert [c for c, _ in s.precautionary] == [
        "P210",
        "P273",
        "P280",
        "P301+P330+P331",
        "P303+P361+P353",
        "P305+P351+P338",
    ]
    assert s.pictograms == (
        ("GHS03", "flame over circle"),
        ("GHS05", "corrosion"),
        ("GHS07", "exclamation mark"),
        ("GHS09", "environment"),
    )
    assert s.ppe == ("acid-resistant gloves", "nitrile gloves", "safety goggles")
    assert [r.id for r in s.per_reagent] == ["potassium-permanganate", "sulfuric-acid"]


def test_signal_word_is_the_strongest(base):
    rec, rg = base
    warn_only = rec.model_copy(
        update={"reagents": [ReagentUse(ref="iron-ii-salt", role=Role.REDUCTANT)]}
    )
    assert method_hazards(warn_only, rg).signal_word == "Warning"
    both = rec.model_copy(update={"reagents": [*warn_only.reagents, *rec.reagents]})
    assert method_hazards(both, rg).signal_word == "Danger"
    none = rg["iron-ii-salt"].model_copy(
        update={"id": "water", "hazards": HazardData(signal_word="none", source="not classified")}
    )
    only_none = rec.model_copy(update={"reagents": [ReagentUse(ref="water", role=Role.SOLVENT)]})
    assert method_hazards(only_none, {"water": none}).signal_word == "none"


def test_cautions_are_the_records_then_the_rules(base):
    rec, rg = base
    rec2 = rec.model_copy(update={"safety": ["Wear goggles.", "wear  goggles."]})
    s = method_hazards(rec2, rg)
    assert s.cautions[0] == "Wear goggles."
    assert len(s.cautions) == 2  # the repeat differing in case/space is dropped
    assert s.cautions[1].startswith("Add the acid slowly")  # acid-to-oxidiser
    assert [t.rule.id for t in s.triggered] == ["acid-to-oxidiser"]


def test_unclassified_and_unknown_codes_still_render(base):
    rec, rg = base
    odd = rg["iron-ii-salt"].model_copy(
        update={
            "id": "odd",
            "hazards": HazardData(
                signal_word="Warning",
                hazard_statements=["H999", "h302"],
                precautionary_statements=["P304+P340+P310"],
                source="x",
            ),
        }
    )
    bare = rg["iron-ii-salt"].model_copy(update={"id": "bare", "hazards": None})
    r = rec.model_copy(
        update={
            "reagents": [
                ReagentUse(ref="odd", role=Role.AUXILIARY),
                ReagentUse(ref="bare", role=Role.AUXILIARY),
                ReagentUse(ref="gone", role=Role.AUXILIARY),
            ]
        }
    )
    s = method_hazards(r, {"odd": odd, "bare": bare})
    assert s.hazard_statements == (("H302", "Harmful if swallowed."), ("H999", UNKNOWN_TEXT))
    assert s.precautionary[0][1].startswith("IF INHALED: Remove person to fresh air")
    assert s.unclassified == ("bare",)
    assert [p.signal_word for p in s.per_reagent] == ["Warning", None]


def test_demo_methods_summarise():
    col = load_collection(DEMO, cwd=DEMO)
    rg = {k: v.record for k, v in col.reagents.items()}
    s = method_hazards(col.methods["iron-ii-ceric"].record, rg)
    # cerium(IV) sulfate in sulfuric acid is corrosive: Danger, H314, GHS05
    assert s.signal_word == "Danger"
    assert "H314" in dict(s.hazard_statements)
    assert ("GHS05", "corrosion") in s.pictograms
