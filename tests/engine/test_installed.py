"""Installed versions read from dist-info folder names agree with the
standard library's importlib.metadata."""

import sys
from importlib.metadata import version
from pathlib import Path

import pytest

from sitegen.build import installed
from sitegen.build.installed import installed_version


@pytest.mark.parametrize("name", ["sitegen", "pint", "matplotlib", "PyYAML", "markdown-it-py",
                                  "jinja2", "numpy"])
def test_agrees_with_importlib_metadata(name):
    assert installed_version(name) == version(name)


def test_missing_distribution_is_none():
    assert installed_version("no-such-distribution-here") is None


def test_name_forms_and_first_on_path(tmp_path: Path, monkeypatch):
    first, second = tmp_path / "a", tmp_path / "b"
    (first / "Lab_Tools-2.0.1.dist-info").mkdir(parents=True)
    (second / "lab_tools-1.0.dist-info").mkdir(parents=True)
    monkeypatch.setattr(sys, "path", [str(first), str(second)])
    installed._listing.cache_clear()
    installed_version.cache_clear()
    try:
        # PEP 503 names compare with -, _ and . alike and without case
        for name in ("lab-tools", "Lab.Tools", "LAB_TOOLS"):
            assert installed_version(name) == "2.0.1"
    finally:
        installed._listing.cache_clear()
        installed_version.cache_clear()


def test_read_from_the_folder_names_without_the_standard_library(monkeypatch):
    # the fast path must answer for the project's own dependencies
    import importlib.metadata

    def refuse(name):
        raise AssertionError(f"importlib.metadata asked for {name}")

    monkeypatch.setattr(importlib.metadata, "version", refuse)
    for name in ("sitegen", "pint", "matplotlib"):
        assert installed_version(name)
