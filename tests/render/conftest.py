"""Shared fixtures: the demo collection, its analyses and render options."""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest

from sitegen.analyse import analyse_method
from sitegen.load.collection import load_collection
from sitegen.render.site import RenderOptions

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "methods"
THEME = ROOT / "theme"


def analyse_all(collection):
    return {
        mid: analyse_method(lo, collection.reagents, collection.indicators)
        for mid, lo in sorted(collection.methods.items())
    }


@pytest.fixture(scope="session")
def demo():
    col = load_collection(DEMO, cwd=ROOT)
    return col, analyse_all(col)


@pytest.fixture
def options():
    return RenderOptions(theme_dir=THEME, build_date=dt.date(2026, 12, 2), generator_version="test")
