"""Broken records: each case under ``tests/fixtures/bad/<case>/`` is laid over
a copy of the small valid source folder ``tests/fixtures/good/``; loading
and checking that copy must report exactly the findings in the case's
``expected`` file, and must never raise.

``expected`` holds one finding per line, in the printed form
``relpath:line:column: severity: message [rule]`` (paths relative to the
source folder). Path, line, column, severity and rule must match exactly;
the message must contain the expected message text, so that wording can be
improved without touching every fixture. Blank lines and lines starting
with ``#`` are ignored.

A few inputs cannot be committed safely (more than 1 MiB, NUL bytes,
Latin-1 bytes that editors "repair"); their case folder holds only the
``expected`` file and the bytes are written by :data:`GENERATORS`.
"""

from __future__ import annotations

import re
import shutil
from collections.abc import Callable
from pathlib import Path

import pytest

from sitegen.check.run import run_rules
from sitegen.errors import Finding
from sitegen.load.collection import load_collection

FIXTURES = Path(__file__).parent / "fixtures"
GOOD = FIXTURES / "good"
BAD = FIXTURES / "bad"
METHOD = "records/iron-ii-cerium.yaml"

_LINE = re.compile(
    r"^(?P<path>.+?):(?P<line>\d+):(?P<col>\d+): (?P<severity>error|warning): "
    r"(?P<message>.*) \[(?P<rule>[a-z0-9-]+)\]$"
)


def _too_large(root: Path) -> None:
    # A valid record padded with comments past the 1 MiB limit: the size
    # alone must refuse it, before any parsing.
    text = (GOOD / METHOD).read_text(encoding="utf-8")
    pad = "# padding line to push the file past the size limit\n"
    (root / METHOD).write_text(text + pad * (1024 * 1024 // len(pad) + 1), encoding="utf-8")


def _binary(root: Path) -> None:
    text = (GOOD / METHOD).read_text(encoding="utf-8")
    raw = text.replace("title: Iron(II)", "title: Iron\x00(II)", 1).encode("utf-8")
    (root / METHOD).write_bytes(raw)


def _latin1(root: Path) -> None:
    # "25 °C" saved as Latin-1: the degree sign becomes the single byte 0xB0.
    text = (GOOD / METHOD).read_text(encoding="utf-8")
    line = "  hydrogen_ion: 1 mol/L\n"
    text = text.replace(line, line + "  temperature: 25 °C\n", 1)
    (root / METHOD).write_bytes(text.encode("latin-1"))


GENERATORS: dict[str, Callable[[Path], None]] = {
    "file-too-large": _too_large,
    "binary-file": _binary,
    "not-utf8": _latin1,
}

#: Cases the loader gets wrong today: case -> reason. Each runs as a strict
#: xfail, so the test starts failing (and the entry must go) once fixed.
KNOWN_WRONG: dict[str, str] = {
}

CASES = sorted(p.name for p in BAD.iterdir() if p.is_dir())


def _build(case: str, tmp_path: Path) -> Path:
    root = tmp_path / "source"
    shutil.copytree(GOOD, root)
    src = BAD / case
    for f in sorted(src.rglob("*")):
        if f.is_file() and f.name != "expected":
            dest = root / f.relative_to(src)
            dest.parent.mkdir(parents=True, exist_ok=True)
            shutil.copyfile(f, dest)
    if case in GENERATORS:
        GENERATORS[case](root)
    return root


def _check(root: Path) -> list[Finding]:
    collection = load_collection(root, cwd=root)
    return sorted(
        [*collection.findings, *run_rules(collection, analyses={})],
        key=lambda f: (f.span, f.rule, f.message),
    )


def _expected(case: str) -> list[dict[str, str]]:
    out = []
    for raw in (BAD / case / "expected").read_text(encoding="utf-8").splitlines():
        if not raw.strip() or raw.startswith("#"):
            continue
        m = _LINE.match(raw)
        assert m, f"{case}/expected: cannot read {raw!r}"
        out.append(m.groupdict())
    return out


def _printed(f: Finding) -> str:
    return f"{f.span.path}:{f.span.line}:{f.span.col}: {f.severity.value}: {f.message} [{f.rule}]"


def test_every_case_has_an_expected_file() -> None:
    missing = [c for c in CASES if not (BAD / c / "expected").is_file()]
    assert not missing


def test_good_fixture_is_clean(tmp_path: Path) -> None:
    root = tmp_path / "source"
    shutil.copytree(GOOD, root)
    assert [_printed(f) for f in _check(root)] == []


@pytest.mark.parametrize(
    "case",
    [
        pytest.param(c, marks=pytest.mark.xfail(strict=True, reason=KNOWN_WRONG[c]))
        if c in KNOWN_WRONG
        else c
        for c in CASES
    ],
)
def test_bad_case(case: str, tmp_path: Path) -> None:
    root = _build(case, tmp_path)
    # Loading and checking report problems as findings; any exception here
    # is a bug, and pytest shows its traceback.
    findings = _check(root)
    got = [_printed(f) for f in findings]
    want = _expected(case)
    assert len(findings) == len(want), "\n".join(got)
    for f, w in zip(findings, want, strict=True):
        assert Path(f.span.path).as_posix().endswith(w["path"]), got
        assert (f.span.line, f.span.col) == (int(w["line"]), int(w["col"])), got
        assert f.severity.value == w["severity"], got
        assert f.rule == w["rule"], got
        assert w["message"] in f.message, got


def test_generated_inputs_are_what_they_claim(tmp_path: Path) -> None:
    root = _build("file-too-large", tmp_path / "a")
    assert (root / METHOD).stat().st_size > 1024 * 1024
    root = _build("binary-file", tmp_path / "b")
    assert b"\x00" in (root / METHOD).read_bytes()
    root = _build("not-utf8", tmp_path / "c")
    with pytest.raises(UnicodeDecodeError):
        (root / METHOD).read_bytes().decode("utf-8")


@pytest.mark.parametrize("case", CASES)
def test_bad_case_through_the_command_line(case: str, tmp_path: Path) -> None:
    """The whole pipeline (load, analyse, check) on each broken record: exit
    1 or 2, JSON that parses, every finding with a position, never an
    internal error."""
    import io
    import json

    from sitegen.cli import main

    root = _build(case, tmp_path)
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(root), "--format", "json", "--today", "2026-12-01"], out, err)
    assert code in (1, 2), (code, out.getvalue(), err.getvalue())
    assert "internal error" not in err.getvalue()
    data = json.loads(out.getvalue())
    assert data and all(d["line"] >= 1 and d["column"] >= 1 and d["rule"] for d in data)
    wanted = {w["rule"] for w in _expected(case)}
    assert wanted <= {d["rule"] for d in data}
