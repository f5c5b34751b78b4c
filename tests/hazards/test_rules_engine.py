"""The safety-rule engine: the built-in rules on small records, lab rule
files (adding, overriding, malformed) and the rule language.

Chemistry behind the cases: permanganate oxidises chloride to chlorine in
hydrochloric acid unless Zimmermann-Reinhardt preventive solution is
present (Vogel's Textbook of Quantitative Chemical Analysis, permanganate
titrations, from memory); the other rules are common practice.
"""

from pathlib import Path

import pytest
from fixture_util import FIXTURES

from sitegen.errors import Severity, Span
from sitegen.hazards.rules_engine import (
    builtin_rules,
    elements_of,
    evaluate,
    load_rules,
    parse_rules,
)
from sitegen.load.collection import load_collection
from sitegen.load.source import Source
from sitegen.model import ReagentUse, Role


@pytest.fixture(scope="module")
def base():
    col = load_collection(FIXTURES / "base", cwd=FIXTURES / "base")
    assert col.findings == []
    reagents = {k: v.record for k, v in col.reagents.items()}
    return col.methods["iron-permanganate"].record, reagents


def with_(record, **changes):
    return record.model_copy(update=changes)


def in_hcl(record, preventive=False):
    uses = [
        ReagentUse(ref="potassium-permanganate", role=Role.TITRANT),
        ReagentUse(ref="hydrochloric-acid", role=Role.ACID),
    ]
    if preventive:
        uses.append(ReagentUse(ref="zimmermann-reinhardt", role=Role.PREVENTIVE))
    cond = record.conditions.model_copy(update={"medium": "1 M HCl"})
    return with_(record, reagents=uses, conditions=cond)


def ids(triggered):
    return [t.rule.id for t in triggered]


def test_builtin_rules_are_well_formed():
    rs = builtin_rules()
    assert rs.findings == ()
    assert [r.id for r in rs.rules] == [
        "permanganate-chloride-medium",
        "hypochlorite-acidified",
        "acid-to-oxidiser",
        "chromium-vi-reagent",
        "perchloric-acid-concentrated",
        "mercury-ii-salt",
        "iodine-vapour",
        "arsenic-compound",
    ]
    assert all(r.source for r in rs.rules)


def test_sulfuric_medium_only_gets_the_acid_caution(base):
    rec, rg = base
    fired = evaluate(rec, rg)
    assert ids(fired) == ["acid-to-oxidiser"]
    assert not fired[0].reports  # caution-only: page text, no finding


def test_permanganate_in_hcl_without_preventive_fires_at_the_medium(base):
    rec, rg = base
    fired = {t.rule.id: t for t in evaluate(in_hcl(rec), rg)}
    t = fired["permanganate-chloride-medium"]
    assert t.severity == "error" and t.reports
    assert t.where == ("conditions", "medium")
    assert "Zimmermann-Reinhardt" in t.message and "Vogel" in t.source


def test_permanganate_in_hcl_with_preventive_does_not_fire(base):
    rec, rg = base
    assert "permanganate-chloride-medium" not in ids(evaluate(in_hcl(rec, preventive=True), rg))


def test_hcl_reagent_alone_is_enough_for_the_chloride_rule(base):
    rec, rg = base
    r = in_hcl(rec)
    r = with_(r, conditions=r.conditions.model_copy(update={"medium": "dilute acid"}))
    t = {t.rule.id: t for t in evaluate(r, rg)}["permanganate-chloride-medium"]
    # medium did not match, so the finding points at the HCl reagent instead
    assert t.where == ("reagents", 1)


def test_chromium_rule_names_the_alternative_and_is_quieted_by_a_caution(base):
    rec, rg = base
    dichromate = rg["potassium-permanganate"].model_copy(
        update={"id": "potassium-dichromate", "formula": "K2Cr2O7", "supplies": "Cr2O7^2-"}
    )
    rg2 = {**rg, "potassium-dichromate": dichromate}
    r = with_(
        rec,
        reagents=[ReagentUse(ref="potassium-dichromate", role=Role.TITRANT)],
        alternative="iron-permanganate",
    )
    t = {t.rule.id: t for t in evaluate(r, rg2)}["chromium-vi-reagent"]
    assert t.reports and "The record names an alternative: iron-permanganate." in t.message
    r2 = with_(r, safety=["Reduce all dichromate waste to Cr(III) with iron(II) before disposal."])
    t2 = {t.rule.id: t for t in evaluate(r2, rg2)}["chromium-vi-reagent"]
    assert t2.satisfied and not t2.reports and t2.caution == t.caution


@pytest.mark.parametrize(
    ("formula", "rule_id"),
    [
        ("HgCl2", "mercury-ii-salt"),
        ("As2O3", "arsenic-compound"),
        ("HClO4", "perchloric-acid-concentrated"),
        ("I2", "iodine-vapour"),
        ("NaOCl", "hypochlorite-acidified"),
    ],
)
def test_each_element_rule_fires_on_its_reagent(base, formula, rule_id):
    rec, rg = base
    extra = rg["iron-ii-salt"].model_copy(
        update={"id": "extra", "formula": formula, "supplies": None}
    )
    r = with_(rec, reagents=[*rec.reagents, ReagentUse(ref="extra", role=Role.AUXILIARY)])
    assert rule_id in ids(evaluate(r, {**rg, "extra": extra}))
    assert rule_id not in ids(evaluate(rec, rg))


def test_elements_of_formula():
    assert elements_of("K2Cr2O7") == {"K", "Cr", "O"}
    assert elements_of("(NH4)2Fe(SO4)2·6H2O") == {"N", "H", "Fe", "S", "O"}
    assert "C" not in elements_of("Cl2") and "H" not in elements_of("Hg")


def test_lab_file_adds_and_overrides(base):
    rec, rg = base
    src_path = FIXTURES / "cases" / "lab-rules" / "safety-rules.yaml"
    lab = Source("safety-rules.yaml", src_path.read_text(), "x")
    rs = load_rules(lab)
    assert rs.findings == ()
    assert [r.id for r in rs.rules][-1] == "sulfuric-acid-dilution"
    assert rs.get("acid-to-oxidiser").severity == "warning"  # overridden in place
    assert len(rs.rules) == len(builtin_rules().rules) + 1
    fired = {t.rule.id: t for t in evaluate(rec, rg, rs)}
    assert fired["sulfuric-acid-dilution"].reports
    assert fired["sulfuric-acid-dilution"].where == ("reagents", 1)
    assert fired["acid-to-oxidiser"].reports
    quiet = with_(rec, safety=["Add acid to water, never the reverse."])
    assert "sulfuric-acid-dilution" not in ids(evaluate(quiet, rg, rs))


def test_malformed_lab_file_gives_positions():
    text = (FIXTURES / "cases" / "bad-safety-rule" / "safety-rules.yaml").read_text()
    rules, findings = parse_rules(text, "lab/safety-rules.yaml")
    assert [r.id for r in rules] == ["well-formed"]
    assert {f.rule for f in findings} == {"bad-safety-rule"}
    assert all(f.severity is Severity.ERROR for f in findings)
    spans = [f.span for f in findings]
    # the misspelt key 'formual' on line 5 ("      reagent: {formual: ...}")
    assert spans[0] == Span("lab/safety-rules.yaml", 5, 17)
    assert "did you mean 'formula'" in findings[0].message
    assert [s.line for s in spans] == [5, 9, 16, 23, 27]


@pytest.mark.parametrize(
    ("text", "line", "col", "fragment"),
    [
        ("rules: [1, 2\n", 2, 1, "malformed YAML"),
        ("other: []\n", 1, 1, "one key, 'rules'"),
        (
            "rules:\n  - {id: a, severity: error, when: {colour: red}, message: m, caution: c,"
            " source: s}\n",
            2,
            37,
            "unknown condition 'colour'",
        ),
        (
            "rules:\n  - {id: a, severity: error, when: {all: []}, message: m, caution: c,"
            " source: s}\n",
            2,
            42,
            "non-empty list",
        ),
        (
            "rules:\n  - {id: a, severity: error, when: {medium: x}, message: m, caution: c,"
            " source: s, colour: red}\n",
            2,
            84,
            "unknown key 'colour'",
        ),
    ],
)
def test_malformed_variants(text, line, col, fragment):
    rules, findings = parse_rules(text, "s.yaml")
    assert rules == []
    assert len(findings) == 1
    f = findings[0]
    assert (f.rule, f.span.line, f.span.col) == ("bad-safety-rule", line, col)
    assert fragment in f.message


def test_duplicate_id_in_one_file():
    rule = "  - {id: a, severity: error, when: {medium: x}, message: m, caution: c, source: s}\n"
    rules, findings = parse_rules("rules:\n" + rule + rule, "s.yaml")
    assert [r.id for r in rules] == ["a"]
    assert findings[0].span.line == 3 and "defined twice" in findings[0].message


def test_not_and_field_conditions(base):
    rec, rg = base
    text = (
        "rules:\n"
        "  - id: needs-alternative\n"
        "    severity: warning\n"
        "    when: {all: [{reagent: {element: Mn}}, {not: {field: alternative}}]}\n"
        "    message: m\n    caution: c\n    source: common practice\n"
    )
    rules, findings = parse_rules(text, "s.yaml")
    assert findings == []
    from sitegen.hazards.rules_engine import RuleSet

    rs = RuleSet(tuple(rules))
    assert ids(evaluate(rec, rg, rs)) == ["needs-alternative"]
    assert ids(evaluate(with_(rec, alternative="some other method"), rg, rs)) == []


def test_lab_rules_cached_per_source_text():
    a = Source("s.yaml", "rules: []\n", "1")
    assert load_rules(a) is load_rules(Source("s.yaml", "rules: []\n", "1"))
    assert load_rules(None) is builtin_rules()


def test_builtin_file_is_package_data():
    # the engine reads the same file the repository holds
    path = Path(__file__).resolve().parents[2] / "sitegen" / "data" / "safety-rules.yaml"
    rules, findings = parse_rules(path.read_text(), "x")
    assert findings == [] and [r.id for r in rules] == [r.id for r in builtin_rules().rules]


@pytest.mark.parametrize(
    ("analyte", "species", "fires"),
    [
        ("arsenic(III)", "HAsO2", True),
        ("total As", "As^3+", True),
        # "Assay" and "as" are not the symbol As
        ("Assay of iron as Fe(II)", "Fe^2+", False),
    ],
)
def test_arsenic_rule_also_reads_the_sample(base, analyte, species, fires):
    rec, rg = base
    scope = rec.scope.model_copy(update={"analyte": analyte, "analyte_species": species})
    got = {t.rule.id: t for t in evaluate(with_(rec, scope=scope), rg)}
    assert ("arsenic-compound" in got) is fires
    if fires:
        assert got["arsenic-compound"].where[0] == "scope"


def test_hypochlorite_sample_acidified(base):
    rec, rg = base
    scope = rec.scope.model_copy(update={"matrix": "sodium hypochlorite bleach, diluted"})
    t = {t.rule.id: t for t in evaluate(with_(rec, scope=scope), rg)}["hypochlorite-acidified"]
    assert t.where == ("scope", "matrix") and t.reports
    quiet = with_(rec, scope=scope, safety=["Acidified hypochlorite releases chlorine gas."])
    assert not {t.rule.id: t for t in evaluate(quiet, rg)}["hypochlorite-acidified"].reports
