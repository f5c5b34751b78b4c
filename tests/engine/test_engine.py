"""The cached, parallel build: what is rebuilt, and that nothing stale is
ever published."""

from __future__ import annotations

__all__: list[str] = []

import re
import shutil
from pathlib import Path

import pytest
from engine_helpers import contents, do_build, run_cli, tree_hashes

from sitegen.build.engine import MANIFEST


def _edit(path: Path, old: str, new: str) -> None:
    text = path.read_text("utf-8")
    assert old in text, f"{old!r} not in {path}"
    path.write_text(text.replace(old, new, 1), "utf-8")


def _cold_contents(work: Path) -> dict[str, str]:
    """The site a cold build (fresh cache and output) makes of ``work``."""
    fresh = work.parent / "fresh"
    shutil.rmtree(fresh, ignore_errors=True)
    shutil.copytree(work / "methods", fresh / "methods")
    shutil.copytree(work / "theme", fresh / "theme")
    import os

    old = Path.cwd()
    os.chdir(fresh)
    try:
        report = do_build()
    finally:
        os.chdir(old)
    assert report.written
    return contents(fresh / "out")


def _all_ids(work: Path) -> list[str]:
    return sorted(p.stem for p in (work / "methods" / "records").glob("*.yaml"))


def test_unchanged_rebuild_builds_and_rewrites_nothing(site: Path) -> None:
    before = tree_hashes(site / "out")
    inodes = {p: p.stat().st_ino for p in (site / "out").rglob("*")}
    report = do_build()
    assert report.written
    assert report.methods_built == 0
    assert report.methods_cached == len(_all_ids(site))
    assert report.rebuilt == []
    assert tree_hashes(site / "out") == before  # bytes and mtimes
    assert {p: p.stat().st_ino for p in (site / "out").rglob("*")} == inodes


def test_unchanged_rebuild_with_a_new_code_key_still_skips_the_write(
    site: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Everything recomputed (no cache), same bytes: the output is left alone.
    before = tree_hashes(site / "out")
    shutil.rmtree(site / "cache")
    report = do_build()
    assert report.methods_built == len(_all_ids(site))
    assert report.output_rewritten is False
    assert tree_hashes(site / "out") == before


def test_one_changed_record_rebuilds_only_that_method(site: Path) -> None:
    _edit(site / "methods/records/copper-iodometric.yaml", "\nprocedure: |\n",
          "\nprocedure: |\n  0. Wear gloves.\n")
    report = do_build()
    assert report.rebuilt == ["copper-iodometric"]
    assert report.methods_cached == len(_all_ids(site)) - 1
    assert report.output_rewritten
    assert contents(site / "out") == _cold_contents(site)


def test_changed_reagent_rebuilds_exactly_the_methods_that_use_it(site: Path) -> None:
    reagent = "mercury-ii-chloride"
    users = sorted(
        p.stem
        for p in (site / "methods/records").glob("*.yaml")
        if re.search(rf"\b{reagent}\b", p.read_text("utf-8"))
    )
    assert 0 < len(users) < len(_all_ids(site))
    before = contents(site / "out")
    _edit(site / f"methods/reagents/{reagent}.yaml", "name: Mercury(II) chloride",
          "name: Mercuric chloride")
    report = do_build()
    assert report.rebuilt == users
    after = contents(site / "out")
    for mid in users:
        assert after[f"methods/{mid}/index.html"] != before[f"methods/{mid}/index.html"]
    assert after == _cold_contents(site)


def test_changed_standardisation_method_rebuilds_the_pages_naming_it(site: Path) -> None:
    # A method page shows the title of its titrant's standardisation
    # method: a method that names none of it directly still depends on it.
    std = "ceric-standardisation-arsenic-trioxide"
    text = (site / f"methods/records/{std}.yaml").read_text("utf-8")
    title = re.search(r"^title: (.*)$", text, re.M)
    assert title is not None
    _edit(site / f"methods/records/{std}.yaml", f"title: {title.group(1)}",
          f"title: {title.group(1)} (revised)")
    report = do_build()
    assert std in report.rebuilt
    assert len(report.rebuilt) > 1
    assert contents(site / "out") == _cold_contents(site)


def test_changed_template_rebuilds_every_page(site: Path) -> None:
    _edit(site / "theme/templates/base.html", "</body>", "<!-- theme v2 --></body>")
    report = do_build()
    assert report.rebuilt == _all_ids(site)
    page = (site / "out/methods/copper-iodometric/index.html").read_text("utf-8")
    assert "theme v2" in page
    assert contents(site / "out") == _cold_contents(site)


def test_jobs_do_not_change_the_output(built_demo: Path, tmp_path: Path,
                                       monkeypatch: pytest.MonkeyPatch) -> None:
    from engine_helpers import EPOCH

    monkeypatch.setenv("SOURCE_DATE_EPOCH", EPOCH)
    sites = {}
    for jobs in (1, 2):
        work = tmp_path / f"j{jobs}"
        shutil.copytree(built_demo / "methods", work / "methods")
        shutil.copytree(built_demo / "theme", work / "theme")
        monkeypatch.chdir(work)
        report = do_build(jobs=jobs)
        assert report.written and report.methods_cached == 0
        sites[jobs] = contents(work / "out")
    assert sites[1] == sites[2]
    assert sites[1] == contents(built_demo / "out")


def test_engine_matches_the_serial_build(site: Path) -> None:
    from sitegen.build.run import build_site
    from sitegen.check.registry import Settings
    from sitegen.clock import build_date

    report = build_site(Path("methods"), Path("serial"), settings=Settings(today=build_date()),
                        theme=Path("theme"))
    assert report.written
    ours = contents(site / "out")
    del ours[MANIFEST]
    assert ours == contents(site / "serial")


def test_deleted_output_is_restored_from_the_cache(site: Path) -> None:
    before = contents(site / "out")
    shutil.rmtree(site / "out")
    report = do_build()
    assert report.written and report.methods_built == 0
    assert contents(site / "out") == before


def test_damaged_cache_entries_are_misses(site: Path) -> None:
    before = contents(site / "out")
    for p in (site / "cache").rglob("*"):
        if p.is_file():
            p.write_bytes(b"garbage")
    shutil.rmtree(site / "out")
    report = do_build()
    assert report.written
    assert report.methods_built == len(_all_ids(site))
    assert contents(site / "out") == before


def test_keep_going_leaves_failing_methods_out(site: Path) -> None:
    bad = "copper-iodometric"
    _edit(site / f"methods/records/{bad}.yaml", "  factor: 1   #", "  factor: 3   #")
    before = contents(site / "out")
    stopped = do_build()
    assert not stopped.written
    assert contents(site / "out") == before
    report = do_build(keep_going=True)
    assert report.written
    assert [mid for mid, _ in report.excluded] == [bad]
    out = contents(site / "out")
    assert not any(p.startswith(f"methods/{bad}/") for p in out)
    quality = (site / "out/quality.html").read_text("utf-8")
    assert bad in quality


def test_keep_going_leaves_out_a_record_that_does_not_load(site: Path) -> None:
    bad = "copper-iodometric"
    _edit(site / f"methods/records/{bad}.yaml", "\nprocedure:", "\nprocedur:")
    report = do_build(keep_going=True)
    assert report.written
    assert [mid for mid, _ in report.excluded] == [bad]
    assert not (site / f"out/methods/{bad}").exists()


def test_the_cached_load_assembles_the_collection_as_the_loader_does(
    site: Path, tmp_path: Path
) -> None:
    # A link out of the source folder, a record that does not validate and
    # one whose id differs from its file name: the engine's cached, parallel
    # load must report them exactly as load_collection does (same findings,
    # same unloadable ids), cold and from the cache.
    from sitegen.build.cache import Cache, code_digest
    from sitegen.build.engine import _load
    from sitegen.load.collection import load_collection

    records = site / "methods" / "records"
    secret = tmp_path / "elsewhere.yaml"
    secret.write_text("id: elsewhere\n", encoding="utf-8")
    (records / "elsewhere.yaml").symlink_to(secret)
    (records / "broken.yaml").write_text("id: broken\ntitle: [unclosed\n", "utf-8")
    text = (records / "copper-iodometric.yaml").read_text("utf-8")
    (records / "renamed.yaml").write_text(text, "utf-8")
    root, cwd = Path("methods"), Path.cwd().resolve()
    want = load_collection(root, cwd=cwd)
    rules = {f.rule for f in want.findings}
    assert {"outside-source", "id-mismatch"} <= rules, rules
    cache = Cache(tmp_path / "cache")
    for jobs in (1, 2, 1):  # cold in one process, cold in a pool, then cached
        if jobs == 2:
            cache = Cache(tmp_path / "cache2")
        got = _load(root, cwd, cache, code_digest("test"), jobs)
        assert got.findings == want.findings
        assert got.unloadable == want.unloadable
        assert list(got.methods) == list(want.methods)
        assert list(got.reagents) == list(want.reagents)
        assert got.sources.keys() == want.sources.keys()


def test_a_prose_edit_is_rebuilt_without_the_plotting_library(site: Path) -> None:
    # The curve's drawing is kept by what it draws: changing a record's
    # procedure text re-renders its page from the kept drawing (no
    # matplotlib import in the whole process), and the site equals a cold
    # build of the edited sources.
    _edit(site / "methods" / "records" / "copper-iodometric.yaml",
          "\nprocedure: |\n", "\nprocedure: |\n  0. Check the burette tip for bubbles.\n")
    r = run_cli("build", "methods", "--out", "out", "--theme", "theme", "--jobs", "2",
                "--cache-dir", "cache", cwd=site, env={"PYTHONPROFILEIMPORTTIME": "1"})
    assert r.returncode == 0, r.stderr[-3000:]
    assert "1 method(s) built" in r.stderr
    imported = {line.rsplit("|", 1)[-1].strip() for line in r.stderr.splitlines()
                if line.startswith("import time:")}
    assert "sitegen.analyse" in imported  # the record was analysed again
    assert not any(m == "matplotlib" or m.startswith("matplotlib.") for m in imported)
    assert contents(site / "out") == _cold_contents(site)
    # the quantities the record holds are now known to the cache: another
    # edit is read and analysed without importing pint either
    _edit(site / "methods" / "records" / "copper-iodometric.yaml",
          "\nprocedure: |\n", "\nprocedure: |\n  0. Dry the flask.\n")
    r = run_cli("build", "methods", "--out", "out", "--theme", "theme", "--jobs", "2",
                "--cache-dir", "cache", cwd=site, env={"PYTHONPROFILEIMPORTTIME": "1"})
    assert r.returncode == 0, r.stderr[-3000:]
    imported = {line.rsplit("|", 1)[-1].strip() for line in r.stderr.splitlines()
                if line.startswith("import time:")}
    assert "sitegen.analyse" in imported and "pint" not in imported
    assert contents(site / "out") == _cold_contents(site)


def test_a_memo_kept_between_builds_gives_the_same_site(site: Path) -> None:
    # sitegen serve keeps the cache's entries as objects between rebuilds;
    # the site must be what a cold build gives, and the memo must hold
    # only what the last build used.
    memo: dict = {}
    _edit(site / "methods/records/copper-iodometric.yaml", "\nprocedure: |\n",
          "\nprocedure: |\n  0. Wear gloves.\n")
    assert do_build(memo=memo).written
    kinds = {k for k, _ in memo}
    assert {"loaded", "analysis", "render"} <= kinds
    first = set(memo)
    _edit(site / "methods/records/copper-iodometric.yaml", "\nprocedure: |\n",
          "\nprocedure: |\n  0. Rinse the burette.\n")
    report = do_build(memo=memo)
    assert report.rebuilt == ["copper-iodometric"]
    assert contents(site / "out") == _cold_contents(site)
    gone = first - set(memo)
    assert gone and {"analysis", "render", "build"} <= {kind for kind, _ in gone}
    assert len(memo) <= len(first) + 1
    # a build answered from its snapshot keeps the memo whole
    size = len(memo)
    assert do_build(memo=memo).methods_built == 0
    assert len(memo) >= size


def _serial_findings() -> list:
    from sitegen.build.run import check_collection
    from sitegen.check.registry import Settings
    from sitegen.clock import build_date
    from sitegen.load.collection import load_collection

    col = load_collection(Path("methods"), cwd=Path.cwd().resolve())
    return check_collection(col, Settings(today=build_date())).findings


def test_kept_rule_findings_equal_a_full_check_and_follow_moved_lines(site: Path) -> None:
    # The engine keeps each method's rule findings and the collection-wide
    # rules' findings between builds. They must equal a full check by the
    # serial checker: after a change that makes collection-wide findings
    # (a titrant concentration that disagrees with its reagent record), and
    # after an edit that changes no data but moves every line of a record
    # the findings point into (their positions must follow).
    rec = site / "methods/records/iron-ii-ceric.yaml"
    _edit(rec, "  titrant_concentration: 0.1000 mol/L", "  titrant_concentration: 0.1050 mol/L")
    first = do_build(keep_going=True)
    want = _serial_findings()
    assert first.check.findings == want
    assert any(f.rule == "standardisation-mismatch" and f.span.path.endswith(rec.name)
               for f in want)
    rec.write_text("# moved down by this comment\n\n" + rec.read_text("utf-8"), "utf-8")
    second = do_build(keep_going=True)
    want2 = _serial_findings()
    assert second.check.findings == want2
    assert [f.span.line for f in want2 if f.span.path.endswith(rec.name)] == [
        f.span.line + 2 for f in want if f.span.path.endswith(rec.name)]
    # and unchanged again: the kept findings are used as they are
    assert do_build(keep_going=True).check.findings == want2


def test_kept_shared_pages_follow_every_field_but_the_procedure(site: Path) -> None:
    # The shared pages are kept by every method's record minus its
    # procedure: a title edit must reach the home page and the search
    # index, a procedure edit the search index (and the site must equal a
    # cold build each time).
    rec = site / "methods/records/copper-iodometric.yaml"
    title = re.search(r"^title: (.*)$", rec.read_text("utf-8"), re.M)
    assert title
    _edit(rec, f"title: {title.group(1)}", "title: Copper in brass by iodometry, revised")
    assert do_build().written
    assert "Copper in brass by iodometry, revised" in (site / "out/index.html").read_text("utf-8")
    assert contents(site / "out") == _cold_contents(site)
    _edit(rec, "\nprocedure: |\n", "\nprocedure: |\n  0. Zircon-dust check.\n")
    assert do_build().written
    assert "Zircon-dust" in (site / "out/search-index.json").read_text("utf-8")
    assert contents(site / "out") == _cold_contents(site)


def test_shared_pages_do_not_read_the_procedure(tmp_path: Path) -> None:
    # What the engine's facts digest leaves out (its _OWN_ONLY fields) must
    # not reach any shared page: give every demo method another procedure
    # and compare the shared pages, search index aside.
    from engine_helpers import DEMO, THEME

    from sitegen.build.engine import _OWN_ONLY
    from sitegen.build.run import analyse_all
    from sitegen.clock import build_date
    from sitegen.load.collection import load_collection
    from sitegen.render.site import RenderOptions, render_shared

    assert _OWN_ONLY == {"procedure"}
    src = tmp_path / "m"
    shutil.copytree(DEMO, src)
    options = RenderOptions(theme_dir=THEME, build_date=build_date(), generator_version="t")

    def shared() -> dict[str, bytes]:
        col = load_collection(src, cwd=tmp_path)
        return render_shared(col, analyse_all(col), [], options, search=False)

    before = shared()
    for p in (src / "records").glob("*.yaml"):
        text = p.read_text("utf-8")
        assert "\nprocedure: |\n" in text
        p.write_text(text.replace("\nprocedure: |\n", "\nprocedure: |\n  0. Other words.\n"),
                     "utf-8")
    assert shared() == before


def test_analysis_digests_do_not_depend_on_the_process() -> None:
    # The collection-wide rules' kept findings are keyed by a digest of
    # every analysis: the same record analysed in a worker, here, or read
    # back from the cache (in processes with different hash seeds) must
    # give the same digest, or every small edit re-runs those rules over
    # the whole collection.
    import subprocess
    import sys

    from engine_helpers import ROOT

    prog = (
        "from pathlib import Path\n"
        "from sitegen.analyse import analyse_method\n"
        "from sitegen.build.cache import dumps, loads\n"
        "from sitegen.build.engine import _value_digest\n"
        "from sitegen.load.collection import load_collection\n"
        f"col = load_collection(Path({str(ROOT / 'methods')!r}))\n"
        "for mid, lo in col.methods.items():\n"
        "    an = analyse_method(lo, col.reagents, col.indicators,\n"
        "                        reference=col.site.record.reference_electrode)\n"
        "    assert _value_digest(an) == _value_digest(loads(dumps(an))), mid\n"
        "    print(mid, _value_digest(an))\n"
    )
    runs = [subprocess.run([sys.executable, "-c", prog], capture_output=True, text=True,
                           check=True, env={**__import__("os").environ, "PYTHONHASHSEED": seed})
            .stdout for seed in ("1", "2")]
    assert runs[0] == runs[1] and len(runs[0].splitlines()) >= 10


def test_the_output_does_not_depend_on_where_the_build_runs(site: Path, tmp_path: Path) -> None:
    # The same sources built from their parent folder (so every path in a
    # finding reads differently) give the same bytes.
    import os

    from sitegen.build.engine import build
    from sitegen.check.registry import Settings
    from sitegen.clock import build_date

    old = Path.cwd()
    os.chdir(site.parent)
    try:
        report = build(site.name / Path("methods"), tmp_path / "elsewhere",
                       settings=Settings(today=build_date()), cache_dir=tmp_path / "cache",
                       theme=site.name / Path("theme"), jobs=2)
    finally:
        os.chdir(old)
    assert report.written
    assert contents(tmp_path / "elsewhere") == contents(site / "out")
