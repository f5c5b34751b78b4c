"""The published site is never half-written, never someone else's folder,
and the same sources give the same bytes wherever they are built."""

from __future__ import annotations

__all__: list[str] = []

import os
import signal
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path

import pytest
from engine_helpers import EPOCH, ROOT, contents, copy_demo, run_cli, tree_hashes


def _start_build(cwd: Path, env: dict[str, str]) -> subprocess.Popen[bytes]:
    e = dict(os.environ)
    e["PYTHONPATH"] = str(ROOT) + os.pathsep + e.get("PYTHONPATH", "")
    e["SOURCE_DATE_EPOCH"] = EPOCH
    e.update(env)
    return subprocess.Popen(
        [sys.executable, "-m", "sitegen", "build", "methods", "--out", "out",
         "--theme", "theme", "--jobs", "2"],
        cwd=cwd, env=e, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
    )


def _built_from_nothing(site: Path, fresh: Path) -> Path:
    """``fresh`` holding the sources of ``site`` built by a new process
    into ``fresh/out`` with an empty cache."""
    import shutil

    shutil.rmtree(fresh, ignore_errors=True)
    for sub in ("methods", "theme"):
        shutil.copytree(site / sub, fresh / sub)
    cold = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=fresh,
                   env={"SITEGEN_CACHE": str(fresh / "cache")})
    assert cold.returncode == 0, cold.stderr
    return fresh


def _kill_once(proc: subprocess.Popen[bytes], writing: Callable[[], bool],
               settle: float) -> None:
    """SIGKILL ``proc`` ``settle`` seconds after ``writing()`` first holds
    (the build has started writing), failing if it never does or the
    build ends first."""
    try:
        deadline = time.monotonic() + 60
        while time.monotonic() < deadline and proc.poll() is None and not writing():
            time.sleep(0.02)
        assert writing(), "the build never started writing"
        time.sleep(settle)  # a few more files
        assert proc.poll() is None, "the build finished before it could be killed"
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=10)
    finally:
        if proc.poll() is None:
            proc.kill()


def test_killed_while_writing_leaves_the_previous_site(site: Path) -> None:
    before = tree_hashes(site / "out")
    # a change, so that the build has to write
    rec = site / "methods/records/copper-iodometric.yaml"
    rec.write_text(rec.read_text("utf-8").replace("\nprocedure: |\n",
                                                  "\nprocedure: |\n  0. Wear gloves.\n"), "utf-8")
    proc = _start_build(site, {"SITEGEN_TEST_WRITE_DELAY": "0.05",
                               "SITEGEN_CACHE": str(site / "cache")})
    _kill_once(proc, lambda: any(any(p.rglob("*.html")) for p in site.glob(".out.s*")), 0.2)
    assert tree_hashes(site / "out") == before
    # and the next build publishes the change
    done = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=site,
                   env={"SITEGEN_CACHE": str(site / "cache")})
    assert done.returncode == 0, done.stderr
    assert "Wear gloves" in (site / "out/methods/copper-iodometric/index.html").read_text("utf-8")


def test_a_spare_left_half_changed_by_a_kill_is_never_trusted(site: Path,
                                                               tmp_path: Path) -> None:
    # Two builds leave the site before the current one in the spare folder;
    # a third build, which stages in that spare, is killed half-way. The
    # published site must be untouched, and the next build must publish
    # exactly what a build from nothing publishes.
    env = {"SITEGEN_CACHE": str(site / "cache")}
    rec = site / "methods/records/copper-iodometric.yaml"
    rec.write_text(rec.read_text("utf-8").replace("\nprocedure: |\n",
                                                  "\nprocedure: |\n  0. Wear gloves.\n"), "utf-8")
    assert run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=site,
                   env=env).returncode == 0
    spare = site / ".out.spare"
    assert (spare / ".sitegen-output").is_file()
    before = tree_hashes(site / "out")
    base = site / "theme/templates/base.html"
    base.write_text(base.read_text("utf-8") + "<!-- v2 -->\n", "utf-8")
    proc = _start_build(site, {**env, "SITEGEN_TEST_WRITE_DELAY": "0.05"})
    _kill_once(proc, lambda: (spare / ".sitegen-staging").exists(), 0.3)
    assert tree_hashes(site / "out") == before
    done = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=site, env=env)
    assert done.returncode == 0, done.stderr
    fresh = _built_from_nothing(site, tmp_path / "fresh")
    assert contents(site / "out") == contents(fresh / "out")
    assert not (site / "out" / ".sitegen-staging").exists()
    # and a spare in good order is reused: only what changed is rewritten,
    # and the result is still what a build from nothing gives
    for folder in (site, fresh):
        r = folder / "methods/records/copper-iodometric.yaml"
        r.write_text(r.read_text("utf-8").replace("Wear gloves.", "Wear goggles."), "utf-8")
    kept = {p.relative_to(spare): p.stat().st_ino for p in spare.rglob("*.csv")}
    assert kept and (spare / ".sitegen-output").is_file()
    again = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=site, env=env)
    assert again.returncode == 0, again.stderr
    assert run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=fresh,
                   env={"SITEGEN_CACHE": str(fresh / "cache")}).returncode == 0
    assert contents(site / "out") == contents(fresh / "out")
    assert {p: (site / "out" / p).stat().st_ino for p in kept} == kept  # files kept, not copied


def test_killed_early_leaves_the_previous_site(site: Path) -> None:
    before = tree_hashes(site / "out")
    (site / "theme/templates/base.html").write_text(
        (site / "theme/templates/base.html").read_text("utf-8") + "<!-- v2 -->\n", "utf-8")
    # slowed writes, so that on a fast machine the build is still running
    # when the signal comes (while it imports, checks or renders)
    proc = _start_build(site, {"SITEGEN_CACHE": str(site / "cache"),
                               "SITEGEN_TEST_WRITE_DELAY": "0.05"})
    time.sleep(0.5)
    assert proc.poll() is None, "the build finished before it could be killed"
    proc.send_signal(signal.SIGKILL)
    proc.wait(timeout=10)
    assert tree_hashes(site / "out") == before


def test_foreign_output_folder_is_refused_and_untouched(site: Path) -> None:
    foreign = site / "mine"
    foreign.mkdir()
    (foreign / "notes.txt").write_text("my notes\n", "utf-8")
    r = run_cli("build", "methods", "--out", "mine", cwd=site)
    assert r.returncode == 2
    assert "did not write" in r.stderr
    assert [p.name for p in foreign.iterdir()] == ["notes.txt"]
    assert (foreign / "notes.txt").read_text("utf-8") == "my notes\n"


@pytest.mark.parametrize("out", ["methods", "."])
def test_output_that_is_or_holds_the_source_is_refused(site: Path, out: str) -> None:
    before = contents(site / "methods")
    r = run_cli("build", "methods", "--out", out, cwd=site)
    assert r.returncode == 2
    assert "source folder" in r.stderr
    assert contents(site / "methods") == before


def test_same_sources_in_different_folders_give_the_same_site(tmp_path: Path) -> None:
    sites = []
    for name in ("first", "second/deeper"):
        work = tmp_path / name
        copy_demo(work)
        r = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=work,
                    env={"SITEGEN_CACHE": str(work / "cache")})
        assert r.returncode == 0, r.stderr
        assert "0 from cache" in r.stderr
        sites.append(contents(work / "out"))
    assert sites[0] == sites[1]
    assert len(sites[0]) > 20


def test_no_change_rebuild_does_not_import_the_heavy_libraries(site: Path) -> None:
    # up to date with the code on disk now (which others may be editing)
    warm = run_cli("build", "methods", "--out", "out", "--theme", "theme", cwd=site,
                   env={"SITEGEN_CACHE": str(site / "cache")})
    assert warm.returncode == 0, warm.stderr
    code = (
        "import sys, pathlib\n"
        "from sitegen.build.engine import build\n"
        "from sitegen.check.registry import Settings\n"
        "from sitegen.clock import build_date\n"
        "r = build(pathlib.Path('methods'), pathlib.Path('out'), theme=pathlib.Path('theme'),"
        " cache_dir=pathlib.Path('cache'), settings=Settings(today=build_date()))\n"
        "assert r.written and r.methods_built == 0, r.rebuilt\n"
        "heavy = sorted(m for m in ('matplotlib', 'scipy', 'numpy', 'pydantic', 'yaml',"
        " 'pint', 'jinja2') if m in sys.modules)\n"
        "print(','.join(heavy))\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT), SOURCE_DATE_EPOCH=EPOCH)
    r = subprocess.run([sys.executable, "-c", code], cwd=site, env=env, text=True,
                       capture_output=True, timeout=60)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip() == ""


def test_a_prepared_spare_is_used_and_the_site_stays_right(site: Path, tmp_path: Path) -> None:
    # sitegen serve makes the spare while idle (hard links to the current
    # site); the next build must replace only what changed and publish
    # what a build from nothing publishes.
    from engine_helpers import do_build

    from sitegen.build.write import prepare_spare, spare_dir

    assert not spare_dir(site / "out").exists()
    assert prepare_spare(site / "out")
    assert not prepare_spare(site / "out")  # there is one already
    spare = spare_dir(site / "out")
    assert contents(spare) == contents(site / "out")
    csv = sorted(spare.rglob("curve.csv"))[0].relative_to(spare)
    inode = (spare / csv).stat().st_ino
    rec = site / "methods/records/copper-iodometric.yaml"
    text = rec.read_text("utf-8")
    rec.write_text(text.replace("\nprocedure: |\n", "\nprocedure: |\n  0. Label the flask.\n"),
                   "utf-8")
    assert do_build().written
    assert (site / "out" / csv).stat().st_ino == inode  # kept, not copied
    assert contents(site / "out") == contents(_built_from_nothing(site, tmp_path / "fresh") / "out")
