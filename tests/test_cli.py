"""The command line: exit codes, output formats, positions of findings."""

from __future__ import annotations

import io
import json
import shutil
from pathlib import Path

import pytest

from sitegen.cli import main

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "methods"


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture
def demo_copy(tmp_path: Path) -> Path:
    dst = tmp_path / "src"
    shutil.copytree(DEMO, dst)
    return dst


def test_demo_collection_checks_clean():
    code, out, err = run("check", str(DEMO), "--today", "2026-12-01")
    assert code == 0, out + err
    assert ": error:" not in out


def test_json_format_has_the_published_keys(demo_copy: Path):
    rec = next(sorted((demo_copy / "records").glob("*.yaml")).__iter__())
    rec.write_text(rec.read_text(encoding="utf-8").replace("revision:", "revison:", 1),
                   encoding="utf-8")
    code, out, _ = run("check", str(demo_copy), "--format", "json")
    assert code == 1
    data = json.loads(out)
    assert data and all(
        set(d) == {"file", "line", "column", "rule", "severity", "message"} for d in data
    )
    typo = [d for d in data if d["rule"] == "unknown-key"]
    assert typo and "did you mean 'revision'" in typo[0]["message"]


def _edit_titration(demo_copy: Path, old: str, new: str) -> tuple[Path, int]:
    path = demo_copy / "records" / "iron-ii-ceric.yaml"
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    for i, line in enumerate(lines):
        if line.lstrip().startswith("titration:") and "->" in line:
            lines[i] = line.replace(old, new)
            path.write_text("".join(lines), encoding="utf-8")
            return path, i + 1
    raise AssertionError("no titration reaction line")


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        # atoms: one Fe too many on the right
        ("+ Fe^3+", "+ 2 Fe^3+", "Fe"),
        # charge only: Ce^3+ written as Ce^4+ on the right
        ("-> Ce^3+", "-> Ce^4+", "charge"),
    ],
)
def test_unbalanced_titration_reaction_points_at_its_line(demo_copy, old, new, needle):
    path, line_no = _edit_titration(demo_copy, old, new)
    code, out, _ = run("check", str(path))
    assert code == 1
    hits = [ln for ln in out.splitlines() if "[reaction-unbalanced]" in ln]
    assert hits, out
    assert f"iron-ii-ceric.yaml:{line_no}:" in hits[0]
    assert needle in hits[0]


def test_usage_errors_exit_2():
    assert run("check", "/no/such/folder")[0] == 2
    assert run("frobnicate")[0] == 2
    assert run("check", "--format", "xml")[0] == 2


def test_schema_is_json_with_every_kind():
    code, out, _ = run("schema")
    assert code == 0
    data = json.loads(out)
    assert set(data) == {"method", "reagent", "indicator", "site"}
    assert "titration" in data["method"]["properties"]


def test_rules_lists_ids_with_explanations():
    code, out, _ = run("rules")
    assert code == 0
    assert "reaction-unbalanced (method):" in out
    assert "factor-mismatch (method):" in out
