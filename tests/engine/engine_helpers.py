"""Helpers of the engine tests: small copies of the demo collection,
file digests and build runners (a module of its own: a `conftest` name
is shared by every test folder).

A cold build of the demo takes seconds (every curve is plotted), so one
cold build is made per session and each test starts from a copy of its
source, output and cache. Tests run with the copy as the current folder
and relative paths, so the cache keys (which include the paths shown in
findings) match the session build's.
"""

from __future__ import annotations

__all__ = ["DEMO", "EPOCH", "KEEP", "ROOT", "THEME", "contents", "copy_demo", "do_build",
           "run_cli", "tree_hashes"]

import hashlib
import os
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "methods"
THEME = ROOT / "theme"
#: 2026-12-01T00:00:00Z: after every approval date of the demo records
EPOCH = "1796083200"
#: The demo methods the tests keep: the four standardisations (every
#: titrant record names one), a method that shares no reagent record with
#: another, and two that use mercury(II) chloride, of the demo's fourteen.
KEEP = (
    "ceric-standardisation-arsenic-trioxide",
    "copper-iodometric",
    "iodine-standardisation-arsenic-trioxide",
    "iron-ii-ceric",
    "iron-ore-dichromate",
    "iron-ore-zimmermann-reinhardt",
    "permanganate-standardisation-oxalate",
    "thiosulfate-standardisation-iodate",
)


def copy_demo(dest: Path) -> None:
    """The demo collection with the records of :data:`KEEP`, and the theme."""
    shutil.copytree(DEMO, dest / "methods")
    for p in (dest / "methods" / "records").glob("*.yaml"):
        if p.stem not in KEEP:
            p.unlink()
    shutil.copytree(THEME, dest / "theme")


def tree_hashes(folder: Path) -> dict[str, tuple[str, int]]:
    """Every file under ``folder``: relative path -> (sha256, mtime_ns)."""
    out = {}
    for p in sorted(folder.rglob("*")):
        if p.is_file():
            out[p.relative_to(folder).as_posix()] = (
                hashlib.sha256(p.read_bytes()).hexdigest(),
                p.stat().st_mtime_ns,
            )
    return out


def contents(folder: Path) -> dict[str, str]:
    """relative path -> sha256 of every file under ``folder``."""
    return {k: v[0] for k, v in tree_hashes(folder).items()}


def run_cli(*args: str, cwd: Path, env: dict[str, str] | None = None,
            **kw: Any) -> subprocess.CompletedProcess[str]:
    """``python -m sitegen ARGS`` in ``cwd`` with this checkout importable."""
    e = dict(os.environ)
    e["PYTHONPATH"] = str(ROOT) + os.pathsep + e.get("PYTHONPATH", "")
    e["SOURCE_DATE_EPOCH"] = EPOCH
    e.update(env or {})
    return subprocess.run(
        [sys.executable, "-m", "sitegen", *args], cwd=cwd, env=e, text=True,
        capture_output=True, timeout=120, **kw,
    )


def do_build(**kw: Any) -> Any:
    """:func:`sitegen.build.engine.build` of ``methods`` into ``out`` in the
    current folder, with the cache in ``cache``."""
    from sitegen.build.engine import build
    from sitegen.check.registry import Settings
    from sitegen.clock import build_date

    kw.setdefault("cache_dir", Path("cache"))
    kw.setdefault("jobs", 2)
    kw.setdefault("theme", Path("theme"))
    return build(Path("methods"), Path("out"), settings=Settings(today=build_date()), **kw)
