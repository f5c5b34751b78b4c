"""Build benchmark: cold, no-change and incremental builds at scale.

Not collected by pytest. Run ``python tests/benchmarks/run.py`` (or
``./dev bench``); ``--n`` sets the collection size (default 1000) and
``--skip-5000`` leaves out the 5,000-record run. The report is written
to ``tests/benchmarks/REPORT.md``.

Every build is a whole process (``python -m sitegen build``) started
through a small wrapper that reports the peak resident memory of its
children (``resource.getrusage(RUSAGE_CHILDREN).ru_maxrss``: the largest
single process, the main one or a worker). Targets are ratios of numbers
measured in the same run, because the machine is shared and its speed
varies from minute to minute; the yardsticks (one SVG render of a curve,
the pointwise brentq curve) are measured in the same run for that reason.

The synthetic collection is the demo collection with every method record
cloned under new ids and titles until there are N records; the clones
keep the demo's numbers, so every worked example stays consistent (the
point is scale, not variety).
"""

from __future__ import annotations

__all__ = ["main", "make_collection"]

import argparse
import compileall
import json
import os
import platform
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "methods"
REPORT = Path(__file__).resolve().with_name("REPORT.md")
#: 2026-12-01T00:00:00Z: after every approval date of the demo records
EPOCH = "1796083200"

_WRAPPER = r"""
import json, resource, subprocess, sys, time
t0 = time.perf_counter()
p = subprocess.run(sys.argv[1:], capture_output=True, text=True)
dt = time.perf_counter() - t0
rss = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
print(json.dumps({"rc": p.returncode, "seconds": dt, "maxrss_kb": rss, "stderr": p.stderr[-4000:]}))
"""


def make_collection(n: int, dest: Path) -> list[str]:
    """Copy the demo to ``dest/methods`` and clone its method records
    until there are ``n``; returns the method ids, sorted."""
    src = dest / "methods"
    shutil.copytree(DEMO, src)
    records = sorted((src / "records").glob("*.yaml"))
    base = [(p.stem, p.read_text("utf-8")) for p in records]
    ids = [stem for stem, _ in base]
    i = 0
    while len(ids) < n:
        stem, text = base[i % len(base)]
        new = f"{stem}-c{i:05d}"
        body = re.sub(r"^id: .*$", f"id: {new}", text, count=1, flags=re.M)
        body = re.sub(r"^title: (.*)$", lambda m, i=i: f"title: {m.group(1)} (copy {i})", body,
                      count=1, flags=re.M)
        (src / "records" / f"{new}.yaml").write_text(body, "utf-8")
        ids.append(new)
        i += 1
    return sorted(ids[:n])


#: The code under test: a snapshot of the checkout taken at the start, so
#: that edits made to the working tree during the run (the cache keys
#: include the code) neither invalidate the cache between builds nor mix
#: two versions in one report.
_CODE: list[Path] = [ROOT]


def _snapshot_code(dest: Path) -> Path:
    shutil.copytree(ROOT / "sitegen", dest / "sitegen",
                    ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copytree(ROOT / "theme", dest / "theme")
    # compiled as an installation compiles it (pip writes the .pyc files):
    # a shell with PYTHONDONTWRITEBYTECODE set would otherwise make every
    # measured process compile the package from source
    compileall.compile_dir(dest / "sitegen", quiet=1)
    _CODE[0] = dest
    return dest


def _env(work: Path, stage_log: Path) -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(_CODE[0]) + os.pathsep + env.get("PYTHONPATH", "")
    env["SOURCE_DATE_EPOCH"] = EPOCH
    env["SITEGEN_CACHE"] = str(work / "cache")
    env["SITEGEN_STAGE_LOG"] = str(stage_log)
    return env


def _build(work: Path, jobs: int | None, stage_log: Path) -> dict[str, Any]:
    """One whole-process build in ``work``; seconds, peak RSS, stages."""
    cmd = [sys.executable, "-m", "sitegen", "build", "methods", "--out", "out"]
    if jobs:
        cmd += ["--jobs", str(jobs)]
    before = stage_log.read_text("utf-8").count("\n") if stage_log.exists() else 0
    p = subprocess.run([sys.executable, "-c", _WRAPPER, *cmd], cwd=work,
                       env=_env(work, stage_log), capture_output=True, text=True, check=True)
    res: dict[str, Any] = json.loads(p.stdout)
    if res["rc"] != 0:
        raise SystemExit(f"build failed in {work}:\n{res['stderr']}")
    lines = stage_log.read_text("utf-8").splitlines()
    res["stages"] = json.loads(lines[-1]) if len(lines) > before else {}
    res["summary"] = res["stderr"].strip().splitlines()[-1] if res["stderr"].strip() else ""
    return res


def _cold(work: Path, jobs: int | None, log: Path) -> dict[str, Any]:
    shutil.rmtree(work / "cache", ignore_errors=True)
    shutil.rmtree(work / "out", ignore_errors=True)
    return _build(work, jobs, log)


def _median(runs: list[dict[str, Any]], key: str = "seconds") -> float:
    return float(statistics.median(r[key] for r in runs))


def _plain_svg(curve: Any, indicator: Any) -> str:
    """A comparable figure drawn the everyday way: a new pyplot figure of
    the same size, the same series, tick labels and axis names, a legend
    placed by loc="best", tight_layout, savefig to SVG, close."""
    import io

    import matplotlib

    matplotlib.use("Agg", force=True)
    from matplotlib import pyplot as plt

    with plt.rc_context({"svg.fonttype": "none", "svg.hashsalt": "bench"}):
        fig, ax = plt.subplots(figsize=(6.4, 4.0), dpi=72)
        lo, hi = indicator.range_ref_V
        ax.axhspan(lo, hi, alpha=0.3, label="transition range")
        ax.plot(curve.volumes_mL, curve.E_vs_ref, linewidth=2.0, label="computed potential")
        ax.axvline(curve.equivalence_volume_mL, linestyle="--", label="equivalence volume")
        ax.plot([curve.equivalence_volume_mL], [curve.equivalence_potential_ref_V], "D",
                label="equivalence point")
        ax.set_xlabel("titrant added / mL")
        ax.set_ylabel(f"E / V vs {curve.reference}")
        ax.grid(True)
        ax.legend(loc="best")
        fig.tight_layout()
        buf = io.StringIO()
        fig.savefig(buf, format="svg")
        plt.close(fig)
    return buf.getvalue()


def _svg_yardstick(repeats: int) -> tuple[float, float]:
    """Median seconds of one SVG render of a demo curve: (a comparable
    figure drawn the everyday way, the build's own curve_svg)."""
    sys.path.insert(0, str(_CODE[0]))
    from sitegen.analyse import analyse_method
    from sitegen.hazards.rules_engine import load_rules
    from sitegen.load.collection import load_collection
    from sitegen.render.plots import curve_svg

    col = load_collection(DEMO)
    loaded = col.methods["iron-ii-ceric"]
    a = analyse_method(loaded, col.reagents, col.indicators,
                       safety_rules=load_rules(col.safety_rules_source))
    assert a.curve is not None and a.indicator is not None
    out = []
    for draw in (lambda: _plain_svg(a.curve, a.indicator),
                 lambda: curve_svg(a.curve, a.indicator, loaded.record.title)):
        draw()  # warm-up: import, font cache
        times = []
        for _ in range(repeats):
            t0 = time.perf_counter()
            draw()
            times.append(time.perf_counter() - t0)
        out.append(float(statistics.median(times)))
    return out[0], out[1]


def _curve_yardstick() -> dict[str, Any]:
    sys.path.insert(0, str(Path(__file__).resolve().parent))
    from bench_curve import compare_curve_speed

    return compare_curve_speed(n_points=1000)


def _edit(path: Path, marker: str) -> None:
    text = path.read_text("utf-8")
    path.write_text(text.replace("\nprocedure: |\n", f"\nprocedure: |\n  0. {marker}\n", 1),
                    "utf-8")


def _serve_freshness(work: Path, rec: Path, jobs: int | None, repeats: int) -> list[float]:
    """Seconds from saving an edit of ``rec`` to its page being served
    with the edit, by a running ``sitegen serve`` (its own output folder,
    the benchmark's cache), for ``repeats`` edits."""
    import urllib.request

    cmd = [sys.executable, "-m", "sitegen", "serve", "methods", "--out", "serve-out",
           "--port", "0", "--cache-dir", str(work / "cache")]
    if jobs:
        cmd += ["--jobs", str(jobs)]
    log = work / "serve.log"
    with open(log, "w", encoding="utf-8") as err:
        proc = subprocess.Popen(cmd, cwd=work, env=_env(work, work / "serve-stages.jsonl"),
                                stdout=subprocess.PIPE, stderr=err, text=True)
    try:
        assert proc.stdout is not None
        line = proc.stdout.readline()  # printed once the first build is done
        m = re.search(r"http://([\d.]+):(\d+)/", line)
        if not m:
            raise SystemExit(f"serve did not start: {line!r}\n{log.read_text('utf-8')[-3000:]}")
        url = f"http://{m.group(1)}:{m.group(2)}/methods/{rec.stem}/index.html"
        times = []
        for k in range(repeats):
            marker = f"Served edit {k} at {time.time_ns()}."
            time.sleep(3.0 if k == 0 else 1.0)  # let the server settle and warm up
            _edit(rec, marker)
            t0 = time.perf_counter()
            while True:
                with urllib.request.urlopen(url, timeout=10) as resp:
                    if marker.encode() in resp.read():
                        break
                if time.perf_counter() - t0 > 60:
                    tail = log.read_text("utf-8")[-3000:]
                    raise SystemExit(f"serve never showed the edit\n{tail}")
                time.sleep(0.01)
            times.append(time.perf_counter() - t0)
        return times
    finally:
        proc.send_signal(__import__("signal").SIGINT)
        try:
            proc.wait(timeout=30)
        except subprocess.TimeoutExpired:
            proc.kill()


def _scale(n: int, jobs: int | None, repeats: int, cold_repeats: int, tmp: Path,
           incremental: bool) -> dict[str, Any]:
    work = tmp / f"n{n}"
    work.mkdir()
    ids = make_collection(n, work)
    log = work / "stages.jsonl"
    out: dict[str, Any] = {"n": n}
    colds = [_cold(work, jobs, log) for _ in range(cold_repeats)]
    out["cold"] = colds
    if not incremental:
        return out
    out["nochange"] = [_build(work, jobs, log) for _ in range(repeats)]
    rec = work / "methods" / "records" / f"{ids[len(ids) // 2]}.yaml"
    one = []
    for k in range(repeats):
        _edit(rec, f"Edit {k}.")
        one.append(_build(work, jobs, log))
    out["one_record"] = one
    reagent = work / "methods" / "reagents" / "mercury-ii-chloride.yaml"
    users = sum(1 for p in (work / "methods" / "records").glob("*.yaml")
                if "mercury-ii-chloride" in p.read_text("utf-8"))
    rg = []
    for k in range(repeats):
        text = reagent.read_text("utf-8")
        reagent.write_text(re.sub(r"^name: (.*)$", rf"name: \1 [{k}]", text, count=1,
                                  flags=re.M), "utf-8")
        rg.append(_build(work, jobs, log))
    out["one_reagent"] = rg
    out["reagent_users"] = users
    # the same edit with the curve drawings dropped from the cache: what an
    # edit of the chemistry costs (the changed curve is drawn again, so the
    # process imports matplotlib)
    redraw = []
    for k in range(repeats):
        shutil.rmtree(work / "cache" / "entries" / "drawing", ignore_errors=True)
        _edit(rec, f"Redraw {k}.")
        redraw.append(_build(work, jobs, log))
    out["one_redraw"] = redraw
    out["serve"] = _serve_freshness(work, rec, jobs, repeats)
    return out


def _fmt_s(x: float) -> str:
    return f"{x:.3f} s" if x < 10 else f"{x:.1f} s"


def _row(name: str, target: str, value: str, ok: bool) -> str:
    return f"| {name} | {target} | {value} | {'PASS' if ok else 'FAIL'} |"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--n", type=int, default=1000, help="records in the main run")
    ap.add_argument("--skip-5000", action="store_true", help="leave out the 5,000-record run")
    ap.add_argument("--jobs", type=int, default=None, help="worker processes (default: CPUs)")
    ap.add_argument("--repeats", type=int, default=5, help="runs of each incremental build")
    ap.add_argument("--cold-repeats", type=int, default=3, help="runs of the cold build")
    ap.add_argument("--report", type=Path, default=REPORT)
    args = ap.parse_args(argv)

    t_all = time.perf_counter()
    with tempfile.TemporaryDirectory(prefix="sitegen-bench-") as tmpd:
        tmp = Path(tmpd)
        _snapshot_code(tmp / "code")
        svg = _svg_yardstick(repeats=15)
        curve = _curve_yardstick()
        main_run = _scale(args.n, args.jobs, args.repeats, args.cold_repeats, tmp, True)
        big = None
        if not args.skip_5000:
            big = _scale(5 * args.n, args.jobs, args.repeats, 1, tmp, False)
        svg_after = _svg_yardstick(repeats=15)

    cold = _median(main_run["cold"])
    nochange = _median(main_run["nochange"])
    one = _median(main_run["one_record"])
    reagent = _median(main_run["one_reagent"])
    redraw = _median(main_run["one_redraw"])
    serve_t = float(statistics.median(main_run["serve"]))
    peak_mb = max(r["maxrss_kb"] for r in main_run["cold"]) / 1024
    svg_t = statistics.median([svg[0], svg_after[0]])
    own_t = statistics.median([svg[1], svg_after[1]])
    n = args.n
    rows = [
        "| target | required | measured | result |",
        "|---|---|---|---|",
        _row(f"cold build of {n} vs {n} x one matplotlib SVG render of a comparable figure",
             "<= 0.75",
             f"{cold:.1f} s / ({n} x {svg_t * 1e3:.1f} ms) = {cold / (n * svg_t):.3f}",
             cold <= 0.75 * n * svg_t),
        _row("no-change rebuild vs cold", "< 1 %", f"{100 * nochange / cold:.2f} %",
             nochange < 0.01 * cold),
        _row("no-change rebuild, whole process", "< 0.5 s", _fmt_s(nochange), nochange < 0.5),
        _row("one record changed vs cold", "< 5 %", f"{_fmt_s(one)} = {100 * one / cold:.2f} %",
             one < 0.05 * cold),
        _row("one record changed, in `sitegen serve`: save to fresh page", "< 0.5 s",
             _fmt_s(serve_t), serve_t < 0.5),
        _row("exact 1,000-point curve vs pointwise brentq", ">= 200x within 1e-9 V",
             f"{curve['speedup']:.0f}x (slowest setup {curve['min_speedup']:.0f}x),"
             f" max diff {curve['max_abs_diff_V']:.1e} V",
             curve["min_speedup"] >= 200 and curve["max_abs_diff_V"] <= 1e-9),
        _row(f"peak memory, cold build of {n}", "< 500 MB", f"{peak_mb:.0f} MB",
             peak_mb < 500),
    ]
    if big is not None:
        cold5 = _median(big["cold"])
        mem5 = max(r["maxrss_kb"] for r in big["cold"]) / 1024
        rows.append(_row(f"cold build of {5 * n} vs {n}: time", "<= 5.5x",
                         f"{cold5:.1f} s / {cold:.1f} s = {cold5 / cold:.2f}x",
                         cold5 <= 5.5 * cold))
        rows.append(_row(f"cold build of {5 * n} vs {n}: peak memory", "<= 5.5x",
                         f"{mem5:.0f} MB / {peak_mb:.0f} MB = {mem5 / peak_mb:.2f}x",
                         mem5 <= 5.5 * peak_mb))

    def stages(run: dict[str, Any]) -> str:
        st = run.get("stages") or {}
        return ", ".join(f"{k} {v:.2f}" for k, v in st.items())

    lines = [
        "# Build benchmark",
        "",
        f"Machine: {os.cpu_count()} CPUs (nproc), Python {platform.python_version()},"
        f" {platform.system()} {platform.release()}; jobs = {args.jobs or os.cpu_count()}.",
        f"Collection: the demo's method records cloned to {n} records"
        + (f" (and {5 * n})" if big is not None else "")
        + "; every build is a whole `python -m sitegen build` process; times are medians"
        f" of {args.cold_repeats} cold and {args.repeats} incremental runs.",
        f"Benchmark wall time: {time.perf_counter() - t_all:.0f} s.",
        "",
        *rows,
        "",
        "## Measurements",
        "",
        f"- cold build of {n}: {', '.join(_fmt_s(r['seconds']) for r in main_run['cold'])}",
        f"- no-change rebuild: {', '.join(_fmt_s(r['seconds']) for r in main_run['nochange'])}",
        f"- one record changed: {', '.join(_fmt_s(r['seconds']) for r in main_run['one_record'])}",
        f"- one record changed, its curve drawn again (drawings dropped from the cache, as"
        " after an edit of the chemistry): "
        f"{', '.join(_fmt_s(r['seconds']) for r in main_run['one_redraw'])}"
        f" (median {_fmt_s(redraw)} = {100 * redraw / cold:.2f} % of cold)",
        f"- `sitegen serve`, save to fresh page: {', '.join(_fmt_s(t) for t in main_run['serve'])}",
        f"- one reagent changed ({main_run['reagent_users']} of {n} methods use it):"
        f" {', '.join(_fmt_s(r['seconds']) for r in main_run['one_reagent'])}"
        f" (median {_fmt_s(reagent)})",
        f"- one SVG render of a comparable figure drawn the everyday way (new pyplot figure,"
        f" legend loc='best', tight_layout; median of 15, before and after the builds):"
        f" {svg[0] * 1e3:.1f} ms, {svg_after[0] * 1e3:.1f} ms",
        f"- one SVG render by the build's own curve_svg (reused canvas, fixed margins, HTML"
        f" key): {svg[1] * 1e3:.1f} ms, {svg_after[1] * 1e3:.1f} ms; cold build / ({n} x"
        f" that) = {cold / (n * own_t):.2f} (for information: the plot itself is cheaper"
        f" than the yardstick, so this ratio is not the target's)",
        f"- curve: vectorised {curve['vectorised_s'] * 1e3:.2f} ms, pointwise brentq"
        f" {curve['pointwise_s'] * 1e3:.0f} ms over {len(curve['per_setup'])} setups"
        " (best of each, the two solvers' runs interleaved): "
        + "; ".join(
            f"{r['setup']} {r['vectorised_s'] * 1e3:.3f} ms vs {r['pointwise_s'] * 1e3:.1f} ms"
            f" = {r['speedup']:.0f}x"
            for r in curve["per_setup"]
        ),
    ]
    if big is not None:
        lines.append(f"- cold build of {5 * n}: {_fmt_s(big['cold'][0]['seconds'])}")
    lines += [
        "",
        "## Time per stage (seconds, inside the build process)",
        "",
        f"- cold build of {n}: {stages(main_run['cold'][-1])}",
        f"- no-change rebuild: {stages(main_run['nochange'][-1])}",
        f"- one record changed: {stages(main_run['one_record'][-1])}",
        f"- one record changed, curve drawn again: {stages(main_run['one_redraw'][-1])}",
        f"- one reagent changed: {stages(main_run['one_reagent'][-1])}",
    ]
    if big is not None:
        lines.append(f"- cold build of {5 * n}: {stages(big['cold'][-1])}")
    lines += [
        "",
        "Peak memory is the largest single process of the build (the main process or one"
        " worker), from `ru_maxrss` of the build's process tree.",
        "",
    ]
    text = "\n".join(lines)
    args.report.write_text(text, "utf-8")
    sys.stdout.write(text)
    return 0


if __name__ == "__main__":
    sys.exit(main())
