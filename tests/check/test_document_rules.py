"""Document-control rules (sitegen.check.rules.document) on the broken
fixtures in tests/fixtures/bad_hazards/cases and on the demo collection."""

import datetime as dt
import importlib.util
from pathlib import Path

import pytest

from sitegen.check.registry import RULES, Settings
from sitegen.check.run import run_rules
from sitegen.errors import Severity, format_finding
from sitegen.load.collection import load_collection

# The fixture helper lives beside the hazard tests; load it by path so this
# file runs on its own too.
_spec = importlib.util.spec_from_file_location(
    "fixture_util", Path(__file__).resolve().parents[1] / "hazards" / "fixture_util.py"
)
fx = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(fx)

DOCUMENT_RULES = [
    "approval-missing",
    "draft-has-approval",
    "review-overdue",
    "approval-dates",
    "retired-needs-successor",
    "history-revision",
    "supersedes-cycle",
]


def test_registered_with_docs():
    for rid in DOCUMENT_RULES:
        assert RULES[rid].func.__module__ == "sitegen.check.rules.document"
        assert RULES[rid].doc


@pytest.mark.parametrize("case", DOCUMENT_RULES)
def test_case(case, tmp_path):
    root = fx.build_case(case, tmp_path / "src")
    _, findings = fx.run_ours(root)
    got = "".join(format_finding(f) + "\n" for f in findings)
    assert got == (fx.CASES / case / "expected.txt").read_text()
    assert case in {f.rule for f in findings}


def test_past_review_is_a_warning_and_strict_makes_it_an_error(tmp_path):
    root = fx.build_case("review-overdue", tmp_path / "src")
    _, lenient = fx.run_ours(root)
    assert [(f.rule, f.severity) for f in lenient] == [("review-overdue", Severity.WARNING)]
    _, strict = fx.run_ours(root, Settings(today=fx.TODAY, strict=True))
    assert [(f.rule, f.severity) for f in strict] == [("review-overdue", Severity.ERROR)]


def test_review_due_today_is_not_overdue(tmp_path):
    root = fx.build_case("review-overdue", tmp_path / "src")
    _, findings = fx.run_ours(root, Settings(today=dt.date(2026, 5, 31)))
    assert findings == []


def test_three_record_cycle_is_reported_once_at_the_smallest_id(tmp_path):
    root = fx.build_case("supersedes-cycle", tmp_path / "src")
    _, findings = fx.run_ours(root)
    cycles = [f for f in findings if f.rule == "supersedes-cycle"]
    assert len(cycles) == 1
    assert cycles[0].span.path == "records/cycle-a.yaml"
    assert "cycle-a -> cycle-b -> cycle-c -> cycle-a" in cycles[0].message


def test_cycle_through_a_successor_link(tmp_path):
    # "a supersedes b" and "b's successor is a" say the same thing: no cycle.
    # b also superseding a closes one.
    root = fx.build_case(None, tmp_path / "src")
    base = (root / "records" / "iron-permanganate.yaml").read_text()
    (root / "records" / "iron-permanganate.yaml").unlink()
    a = base.replace("id: iron-permanganate", "id: a").replace(
        "status: approved\n", "status: approved\nsupersedes: [b]\n"
    )
    b = (
        base.replace("id: iron-permanganate", "id: b")
        .replace("status: approved\n", "status: retired\nsuccessor: a\n")
        .replace(
            "approval:\n  approved_by: Fixture approver\n  approved_on: 2026-01-10\n"
            "  review_due: 2027-01-10\n",
            "",
        )
    )
    (root / "records" / "a.yaml").write_text(a)
    (root / "records" / "b.yaml").write_text(b)
    _, findings = fx.run_ours(root)
    assert findings == []
    (root / "records" / "b.yaml").write_text(
        b.replace("successor: a\n", "successor: a\nsupersedes: [a]\n")
    )
    _, findings = fx.run_ours(root)
    assert [(f.rule, f.span.path) for f in findings] == [("supersedes-cycle", "records/a.yaml")]


def test_self_supersession_is_a_cycle(tmp_path):
    root = fx.build_case(None, tmp_path / "src")
    p = root / "records" / "iron-permanganate.yaml"
    p.write_text(
        p.read_text().replace(
            "status: approved\n", "status: approved\nsupersedes: [iron-permanganate]\n"
        )
    )
    _, findings = fx.run_ours(root)
    assert [f.rule for f in findings] == ["supersedes-cycle"]
    assert findings[0].span.line == 5


def test_demo_collection_has_no_document_errors():
    col = load_collection(fx.DEMO, cwd=fx.DEMO.parent)
    findings = run_rules(col, {}, Settings(), enabled=DOCUMENT_RULES)
    assert [format_finding(f) for f in findings if f.is_error] == []
