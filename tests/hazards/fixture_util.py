"""Helpers shared by the hazard and document-control rule tests: lay a
case folder of tests/fixtures/bad_hazards over the clean base folder and
run this package's rules on it."""

from __future__ import annotations

__all__ = ["CASES", "DEMO", "OUR_RULES", "TODAY", "build_case", "run_ours"]

import datetime as dt
import shutil
from pathlib import Path

from sitegen.check.registry import Settings
from sitegen.check.run import run_rules
from sitegen.errors import Finding
from sitegen.load.collection import Collection, load_collection

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = ROOT / "tests" / "fixtures" / "bad_hazards"
CASES = FIXTURES / "cases"
DEMO = ROOT / "methods"
#: The date the fixture expectations were written for.
TODAY = dt.date(2026, 6, 1)

#: Checker rules registered by sitegen.check.rules.hazards and .document.
OUR_RULES = (
    "unknown-hazard-code",
    "withdrawn-hazard-code",
    "unknown-pictogram",
    "signal-word-mismatch",
    "pictogram-mismatch",
    "missing-classification",
    "safety-rule",
    "bad-safety-rule",
    "approval-missing",
    "draft-has-approval",
    "review-overdue",
    "approval-dates",
    "retired-needs-successor",
    "history-revision",
    "supersedes-cycle",
)


def build_case(case: str | None, dest: Path) -> Path:
    """Copy the base folder to ``dest`` and lay case ``case`` over it."""
    shutil.copytree(FIXTURES / "base", dest)
    if case is not None:
        for src in sorted((CASES / case).rglob("*.yaml")):
            target = dest / src.relative_to(CASES / case)
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(src, target)
    return dest


def run_ours(root: Path, settings: Settings | None = None) -> tuple[Collection, list[Finding]]:
    """Load ``root`` (paths shown relative to it) and run our rules."""
    col = load_collection(root, cwd=root)
    assert col.findings == [], col.findings
    return col, run_rules(col, {}, settings or Settings(today=TODAY), enabled=OUR_RULES)
