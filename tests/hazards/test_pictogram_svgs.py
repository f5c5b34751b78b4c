"""The theme's pictogram drawings: one per GHS code, a red-bordered
diamond (UN GHS Rev. 10, 1.4.10.4.1: black symbol on a white background
within a red diamond frame; from memory), titled with the table's name."""

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from sitegen.hazards import ghs

GHS_DIR = Path(__file__).resolve().parents[2] / "theme" / "static" / "ghs"
NS = "{http://www.w3.org/2000/svg}"


@pytest.mark.parametrize("code", [f"GHS0{i}" for i in range(1, 10)])
def test_pictogram_file(code):
    root = ET.parse(GHS_DIR / f"{code}.svg").getroot()
    assert root.tag == f"{NS}svg"
    title = root.find(f"{NS}title")
    assert title is not None and title.text == f"{code}: {ghs.pictogram_name(code)}"
    frame = root.find(f"{NS}polygon")
    assert frame is not None
    assert frame.get("stroke") == "#e00000" and frame.get("fill") == "#fff"
    # a square standing on a corner: four points on the axes of the box
    pts = [tuple(map(float, p.split(","))) for p in frame.get("points").split()]
    assert len(pts) == 4 and {x for x, _ in pts} == {50.0, 4.0, 96.0}
    assert len(list(root.iter())) > 4  # there is a symbol besides the frame


def test_no_other_files():
    assert sorted(p.name for p in GHS_DIR.iterdir()) == [f"GHS0{i}.svg" for i in range(1, 10)]
