"""Broken records for the chemistry, calculation, hazard and document rules.

Each case under ``tests/fixtures/bad_rules/cases/<case>/`` is laid over a
copy of ``tests/fixtures/bad_rules/base/`` (a small clean source folder: a
direct cerium(IV) titration of iron(II) with ferroin, an iodometric copper
method and a back titration of manganese dioxide) and the whole pipeline
runs on it: load, analyse, check, with today fixed at 2026-12-01.

A case folder holds the files it replaces or adds (same relative paths),
an ``expected`` file and, optionally, an ``options`` file:

* ``expected``: one finding per line, as the checker prints it,
  ``relpath:line:column: severity: message [rule]``. Path (as a suffix),
  line, column, severity and rule must match exactly; the finding's message
  must contain the expected message. No finding lines means the case must
  check clean. Lines starting with ``#`` are comments.
* ``options``: words, one a line; ``strict`` runs the check in strict mode
  (warnings become errors), as ``sitegen check --strict`` does.

The command line must exit with 1 when an expected finding is an error
and 0 otherwise.
"""

from __future__ import annotations

import datetime as dt
import io
import json
import re
import shutil
from pathlib import Path

import pytest

from sitegen.build.run import check_paths
from sitegen.check.registry import Settings
from sitegen.cli import main
from sitegen.errors import Finding

ROOT = Path(__file__).parent / "fixtures" / "bad_rules"
BASE = ROOT / "base"
CASES_DIR = ROOT / "cases"
TODAY = dt.date(2026, 12, 1)
CASE_FILES = {"expected", "options"}
OPTIONS = {"strict"}

_LINE = re.compile(
    r"^(?P<path>.+?):(?P<line>\d+):(?P<col>\d+): (?P<severity>error|warning): "
    r"(?P<message>.*) \[(?P<rule>[a-z0-9-]+)\]$"
)

#: Cases the pipeline gets wrong today: case -> reason. Their ``expected``
#: files describe the right behaviour; each runs as a strict xfail, so the
#: entry must go once the pipeline is fixed.
KNOWN_WRONG: dict[str, str] = {}

CASES = sorted(p.name for p in CASES_DIR.iterdir() if p.is_dir())


def _options(case: str) -> set[str]:
    path = CASES_DIR / case / "options"
    if not path.is_file():
        return set()
    return {w for w in path.read_text(encoding="utf-8").split() if not w.startswith("#")}


def _expected(case: str) -> list[dict[str, str]]:
    out = []
    for raw in (CASES_DIR / case / "expected").read_text(encoding="utf-8").splitlines():
        if not raw.strip() or raw.startswith("#"):
            continue
        m = _LINE.match(raw)
        assert m, f"{case}/expected: cannot read {raw!r}"
        out.append(m.groupdict())
    return out


def _build(case: str, tmp_path: Path) -> Path:
    root = tmp_path / "source"
    shutil.copytree(BASE, root)
    src = CASES_DIR / case
    for f in sorted(src.rglob("*")):
        if f.is_file() and f.name not in CASE_FILES:
            dest = root / f.relative_to(src)
            dest.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(f, dest)
    return root


def _check(root: Path, strict: bool) -> list[Finding]:
    # Any exception escaping here is a bug: bad records must become findings.
    return check_paths([root], Settings(today=TODAY, strict=strict)).findings


def _printed(f: Finding) -> str:
    return f"{f.span.path}:{f.span.line}:{f.span.col}: {f.severity.value}: {f.message} [{f.rule}]"


def test_cases_are_well_formed() -> None:
    assert CASES, "no cases found"
    for case in CASES:
        assert (CASES_DIR / case / "expected").is_file(), case
        assert _options(case) <= OPTIONS, (case, _options(case))
        overlays = [f for f in (CASES_DIR / case).rglob("*") if f.is_file()]
        assert {f.name for f in overlays} - CASE_FILES, f"{case} changes no file"
    assert set(KNOWN_WRONG) <= set(CASES)


@pytest.mark.parametrize("strict", [False, True], ids=["default", "strict"])
def test_base_is_clean(tmp_path: Path, strict: bool) -> None:
    root = tmp_path / "source"
    shutil.copytree(BASE, root)
    assert [_printed(f) for f in _check(root, strict)] == []


@pytest.mark.parametrize(
    "case",
    [
        pytest.param(c, marks=pytest.mark.xfail(strict=True, reason=KNOWN_WRONG[c]))
        if c in KNOWN_WRONG
        else c
        for c in CASES
    ],
)
def test_rule_case(case: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    root = _build(case, tmp_path)
    monkeypatch.chdir(root)
    strict = "strict" in _options(case)
    findings = _check(root, strict)
    got = "\n".join(_printed(f) for f in findings)
    for f in findings:
        assert f.span.line >= 1 and f.span.col >= 1, _printed(f)
    want = _expected(case)
    assert len(findings) == len(want), got
    for f, w in zip(findings, want, strict=True):
        assert Path(f.span.path).as_posix().endswith(w["path"]), got
        assert (f.span.line, f.span.col) == (int(w["line"]), int(w["col"])), got
        assert f.severity.value == w["severity"], got
        assert f.rule == w["rule"], got
        assert w["message"] in f.message, got


@pytest.mark.parametrize("case", CASES)
def test_rule_case_exit_code(case: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    root = _build(case, tmp_path)
    monkeypatch.chdir(root)
    argv = ["check", str(root), "--today", TODAY.isoformat(), "--format", "json"]
    if "strict" in _options(case):
        argv.append("--strict")
    out, err = io.StringIO(), io.StringIO()
    code = main(argv, out=out, err=err)
    # the command line turns a crash into exit 1 plus a message; that must
    # not be what gave the exit code
    assert "internal error" not in err.getvalue(), err.getvalue()
    want = _expected(case)
    assert code == (1 if any(w["severity"] == "error" for w in want) else 0), out.getvalue()
    assert len(json.loads(out.getvalue())) == len(want) or case in KNOWN_WRONG
