"""Shared set-up for the engine tests: one cold build of a small copy of
the demo per session, and a private copy of it for each test (see
:mod:`engine_helpers`). Tests run with the copy as the current folder and
relative paths, so the cache keys (which include the paths shown in
findings) match the session build's.
"""

from __future__ import annotations

__all__: list[str] = []

import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest
from engine_helpers import EPOCH, copy_demo, do_build


@pytest.fixture(scope="session")
def built_demo(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A folder with ``methods/`` (the demo), ``theme/``, and ``out/`` and
    ``cache/`` from one cold build."""
    base = tmp_path_factory.mktemp("demo")
    copy_demo(base)
    mp = pytest.MonkeyPatch()
    mp.setenv("SOURCE_DATE_EPOCH", EPOCH)
    mp.chdir(base)
    try:
        report = do_build()
    finally:
        mp.undo()
    assert report.written, [str(f) for f in report.check.errors]
    return base


@pytest.fixture
def site(built_demo: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Iterator[Path]:
    """A private copy of the built demo, as the current folder."""
    work = tmp_path / "work"
    shutil.copytree(built_demo, work, symlinks=True)
    monkeypatch.chdir(work)
    monkeypatch.setenv("SOURCE_DATE_EPOCH", EPOCH)
    yield work
