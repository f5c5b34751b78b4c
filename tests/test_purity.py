"""The chemistry core stays pure: no I/O libraries, no file access."""

import ast
from pathlib import Path

CHEM = Path(__file__).resolve().parents[1] / "sitegen" / "chem"
FORBIDDEN_MODULES = {"yaml", "pydantic", "jinja2", "matplotlib", "markdown_it", "pathlib", "io",
                     "shutil", "subprocess", "socket", "sitegen.load", "sitegen.render"}
FORBIDDEN_CALLS = {"open", "print", "input"}


def _imports(tree):
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            yield from (a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            yield node.module if node.level == 0 else "." * node.level + node.module


def test_chem_modules_import_nothing_impure():
    files = sorted(CHEM.glob("*.py"))
    assert files, "the chemistry package is missing"
    for f in files:
        tree = ast.parse(f.read_text(encoding="utf-8"))
        for mod in _imports(tree):
            root = mod.split(".")[0]
            assert root not in FORBIDDEN_MODULES and mod not in FORBIDDEN_MODULES, (f.name, mod)
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
                assert node.func.id not in FORBIDDEN_CALLS, (f.name, node.func.id, node.lineno)
