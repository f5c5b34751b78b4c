"""Loading a whole source folder."""

import os
import shutil
from pathlib import Path

from sitegen.load.collection import load_collection

DEMO = Path(__file__).resolve().parents[2] / "methods"


def test_symlink_out_of_the_source_folder_is_refused(tmp_path: Path):
    src = tmp_path / "src"
    shutil.copytree(DEMO, src)
    secret = tmp_path / "elsewhere.yaml"
    secret.write_text("id: elsewhere\n", encoding="utf-8")
    os.symlink(secret, src / "records" / "elsewhere.yaml")
    col = load_collection(src, cwd=tmp_path)
    hits = [f for f in col.findings if f.rule == "outside-source"]
    assert len(hits) == 1 and hits[0].span.path.endswith("elsewhere.yaml")
    assert "elsewhere" not in col.methods


def test_demo_loads_sorted_and_clean():
    col = load_collection(DEMO)
    assert col.findings == []
    assert list(col.methods) == sorted(col.methods)
    assert len(col.methods) >= 10
