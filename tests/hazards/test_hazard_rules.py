"""Checker rules of sitegen.check.rules.hazards on the broken fixtures in
tests/fixtures/bad_hazards/cases, and on the demo collection.

Every case's expected.txt holds the exact findings; each finding names a
position, and each case fires the rule it is named after.
"""

import pytest
from fixture_util import CASES, DEMO, OUR_RULES, build_case, run_ours

from sitegen.check.registry import RULES, Settings
from sitegen.check.run import run_rules
from sitegen.errors import format_finding
from sitegen.load.collection import load_collection

HAZARD_CASES = [
    "unknown-hazard-code",
    "withdrawn-hazard-code",
    "unknown-pictogram",
    "signal-word-mismatch",
    "pictogram-mismatch",
    "missing-classification",
    "permanganate-chloride-medium",
    "bad-safety-rule",
    "lab-rules",
]
HAZARD_RULES = [r for r in OUR_RULES if RULES[r].func.__module__.endswith(".hazards")]


def test_rule_ids_registered():
    assert set(OUR_RULES) <= set(RULES)
    assert set(HAZARD_RULES) == {
        "unknown-hazard-code", "withdrawn-hazard-code", "unknown-pictogram",
        "signal-word-mismatch", "pictogram-mismatch", "missing-classification",
        "safety-rule", "bad-safety-rule",
    }
    for rid in OUR_RULES:
        assert RULES[rid].doc, rid  # the docstring is the user-facing text


@pytest.mark.parametrize("case", HAZARD_CASES)
def test_case(case, tmp_path):
    root = build_case(case, tmp_path / "src")
    _, findings = run_ours(root)
    got = "".join(format_finding(f) + "\n" for f in findings)
    assert got == (CASES / case / "expected.txt").read_text()
    named = {f.rule for f in findings}
    if case != "lab-rules":
        assert case in named
    assert all(f.span.line >= 1 and f.span.col >= 1 for f in findings)


def test_base_is_clean(tmp_path):
    _, findings = run_ours(build_case(None, tmp_path / "src"))
    assert findings == []


def test_preventive_reagent_silences_the_chloride_rule(tmp_path):
    root = build_case("permanganate-chloride-medium", tmp_path / "src")
    rec = root / "records" / "permanganate-in-hcl.yaml"
    text = rec.read_text()
    fixed = text.replace(
        "  - {ref: hydrochloric-acid, role: acid}",
        "  - {ref: hydrochloric-acid, role: acid}\n"
        "  - {ref: zimmermann-reinhardt, role: preventive}",
    )
    assert fixed != text
    rec.write_text(fixed)
    _, findings = run_ours(root)
    assert [f.rule for f in findings] == []


def test_draft_method_needs_no_classification(tmp_path):
    root = build_case("missing-classification", tmp_path / "src")
    rec = root / "records" / "uses-unclassified.yaml"
    rec.write_text(
        rec.read_text()
        .replace("status: approved", "status: draft")
        .replace(
            "approval:\n  approved_by: Fixture approver\n  approved_on: 2026-01-10\n"
            "  review_due: 2027-01-10\n",
            "",
        )
    )
    _, findings = run_ours(root)
    assert "missing-classification" not in {f.rule for f in findings}


@pytest.fixture(scope="module")
def demo_findings():
    col = load_collection(DEMO, cwd=DEMO.parent)
    return run_rules(col, {}, Settings(), enabled=OUR_RULES)


def _from(rule_id, finding):
    # findings of the data-driven rules carry the data rule's own id
    if rule_id == "safety-rule":
        return finding.rule not in RULES
    return finding.rule == rule_id


@pytest.mark.parametrize("rule_id", HAZARD_RULES)
def test_demo_collection_has_no_errors(demo_findings, rule_id):
    # Warnings about the demo data are reported to its authors, not hidden;
    # an error would stop the demo site from building.
    errors = [format_finding(f) for f in demo_findings if _from(rule_id, f) and f.is_error]
    assert errors == []
