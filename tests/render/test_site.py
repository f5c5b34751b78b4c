"""Tests for sitegen.render.site: the whole site, as bytes."""

from __future__ import annotations

import dataclasses
import json
import re
import shutil
from pathlib import Path
from types import SimpleNamespace

import pytest

from sitegen.analyse import analyse_method
from sitegen.errors import Finding, Severity, Span
from sitegen.load.collection import load_collection
from sitegen.render.links import check_links, page_ids
from sitegen.render.site import render_method_files, render_site

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "methods"
THEME = ROOT / "theme"


def analyse_all(col):
    return {
        k: analyse_method(v, col.reagents, col.indicators) for k, v in sorted(col.methods.items())
    }


@pytest.fixture(scope="module")
def site(demo):
    col, analyses = demo
    import datetime as dt

    from sitegen.render.site import RenderOptions

    opts = RenderOptions(theme_dir=THEME, build_date=dt.date(2026, 12, 2), generator_version="t")
    return render_site(col, analyses, [], opts)


def _by_status(col, status):
    return sorted(k for k, v in col.methods.items() if v.record.status.value == status)


def test_render_is_deterministic(demo, options):
    col, analyses = demo
    a = render_site(col, analyses, [], options)
    b = render_site(col, analyses, [], options)
    assert list(a) == sorted(a)
    assert a == b


def test_expected_files(site, demo):
    col, analyses = demo
    for key in (
        "index.html",
        "archive.html",
        "glossary.html",
        "quality.html",
        "rules.html",
        "search-index.json",
        "search-index.js",
        "static/site.css",
        "static/search.js",
    ):
        assert key in site
    for mid in col.methods:
        assert f"methods/{mid}/index.html" in site
        assert f"methods/{mid}/bench.html" in site
        assert f"methods/{mid}/method.json" in site
        if analyses[mid].curve is not None:
            assert site[f"methods/{mid}/curve.csv"].startswith(b"titrant_mL,E_V_vs_SHE")
    for rid in col.reagents:
        assert f"reagents/{rid}/index.html" in site


def test_no_broken_links(site):
    assert check_links(site) == []


def test_home_lists_approved_and_drafts_apart_and_not_retired(site, demo):
    col, _ = demo
    home = site["index.html"].decode()
    approved, drafts = home.split('id="drafts"') if 'id="drafts"' in home else (home, "")
    for mid in _by_status(col, "approved"):
        assert f"methods/{mid}/index.html" in approved
    for mid in _by_status(col, "draft"):
        assert f"methods/{mid}/index.html" not in approved
        assert f"methods/{mid}/index.html" in drafts
        assert "Drafts - not for use" in home
    for mid in _by_status(col, "retired"):
        assert f"methods/{mid}/index.html" not in home
        assert f"methods/{mid}/index.html" in site["archive.html"].decode()


def test_method_page_order_and_footer(site, demo):
    col, _ = demo
    for mid, lo in col.methods.items():
        page = site[f"methods/{mid}/index.html"].decode()
        order = [
            page.index(s)
            for s in (
                'id="hazards"',
                'id="scope"',
                'id="procedure"',
                'id="calculation"',
                'id="checks"',
                'id="history"',
            )
        ]
        assert order == sorted(order), mid
        assert page.index("<h1>") < page.index('id="hazards"')
        assert "take precedence over this page" in page
        assert lo.source.fingerprint in page
        assert "2026-12-02" in page
        if lo.record.status.value == "draft":
            assert "DRAFT - NOT FOR USE" in page
        if lo.record.status.value == "retired":
            assert "RETIRED" in page


def test_calculator_island_matches_build(site, demo):
    _col, analyses = demo
    a = analyses["iron-ii-ceric"]
    page = site["methods/iron-ii-ceric/index.html"].decode()
    m = re.search(r'<script type="application/json" class="calc-data">(.*?)</script>', page, re.S)
    data = json.loads(m.group(1))
    assert data["factor"] == float(a.result.factor)
    assert data["decimals"] == a.result.decimals
    assert abs(data["molar_mass"] - a.result.molar_mass) < 1e-9


def test_review_overdue_banner(demo, options):
    col, analyses = demo
    mid = _by_status(col, "approved")[0]
    due = col.methods[mid].record.approval.review_due
    late = dataclasses.replace(options, build_date=due.replace(year=due.year + 1))
    early = dataclasses.replace(options, build_date=due)
    def page(o):
        return render_method_files(mid, col, analyses[mid], [], o)[f"methods/{mid}/index.html"]

    assert b"Review overdue" in page(late)
    assert b"Review overdue" not in page(early)


def test_findings_are_shown_and_exported(demo, options):
    col, analyses = demo
    lo = col.methods["iron-ii-ceric"]
    f = Finding(
        "factor-mismatch", Severity.ERROR, "stated 2, derived 1", Span(lo.source.path, 40, 3)
    )
    files = render_site(col, analyses, [f], options)
    page = files["methods/iron-ii-ceric/index.html"].decode()
    assert "stated 2, derived 1" in page and "result-fail" in page
    assert json.loads(files["methods/iron-ii-ceric/method.json"])["findings"][0]["line"] == 40


def test_excluded_methods_are_not_published_but_listed(demo, options):
    col, analyses = demo
    mid = _by_status(col, "approved")[0]
    opts = dataclasses.replace(options, excluded=((mid, "factor-mismatch: boom"),))
    files = render_site(col, analyses, [], opts)
    assert f"methods/{mid}/index.html" not in files
    assert "factor-mismatch: boom" in files["quality.html"].decode()
    assert check_links(files) == []


def test_missing_analysis_still_renders(demo, options):
    col, _ = demo
    files = render_site(col, {}, [], options)
    page = files["methods/iron-ii-ceric/index.html"].decode()
    assert "could not be computed" in page
    assert "Hazards and safety" in page and "H314" in page
    assert "methods/iron-ii-ceric/curve.csv" not in files


def test_budget_table(demo, options):
    col, analyses = demo
    a = analyses["iron-ii-ceric"]
    c = SimpleNamespace(
        name="titrant volume",
        value=31.2,
        u=0.02,
        unit="mL",
        sensitivity=0.56,
        contribution=0.011,
        share=0.4,
    )
    bud = SimpleNamespace(value=17.4213, u_c=0.031, k=2, U=0.062, unit="g/L", contributions=(c,))
    files = render_method_files(
        "iron-ii-ceric", col, dataclasses.replace(a, budget=bud), [], options
    )
    page = files["methods/iron-ii-ceric/index.html"].decode()
    assert "Uncertainty budget" in page and "titrant volume" in page
    assert "17.421 ± 0.062" in page and "k = 2" in page
    data = json.loads(files["methods/iron-ii-ceric/method.json"])
    assert data["expanded_uncertainty"] == {"value": 0.062, "unit": "g/L", "k": 2}


def test_glossary_anchors_exist_for_linked_terms(site):
    ids = page_ids(site["glossary.html"])
    for path, data in site.items():
        if path.startswith("methods/") and path.endswith("index.html"):
            for anchor in re.findall(rb'glossary\.html#([^"]+)"', data):
                assert anchor.decode() in ids


def test_record_text_cannot_inject(tmp_path, options):
    src = tmp_path / "src"
    shutil.copytree(DEMO, src)
    rec = (src / "records" / "iron-ii-ceric.yaml").read_text()
    rec = rec.replace(
        "title: Iron(II) in pickling bath samples by cerium(IV)",
        'title: "Iron <script>window.pwned=1</script> test"',
    )
    rec = rec.replace(
        "procedure: |\n",
        "procedure: |\n  Click [here](javascript:alert(1)) <img src=x onerror=alert(1)>\n",
    )
    (src / "records" / "iron-ii-ceric.yaml").write_text(rec)
    col = load_collection(src, cwd=ROOT)
    assert "iron-ii-ceric" in col.methods
    files = render_site(col, analyse_all(col), [], options)
    for path, data in files.items():
        if path.endswith(".html"):
            assert b"<script>window.pwned" not in data, path
            assert not re.search(rb"(href|src)\s*=\s*\"?\s*javascript:", data, re.I), path
            assert b"<img src=x" not in data, path
    assert (
        b"&lt;script&gt;window.pwned=1&lt;/script&gt;" in files["methods/iron-ii-ceric/index.html"]
    )
    index = json.loads(files["search-index.json"])
    assert any("<script>" in d["title"] for d in index["documents"])  # data, shown via textContent


def test_search_index_content(site, demo):
    col, _ = demo
    data = json.loads(site["search-index.json"])
    js = site["search-index.js"].decode()
    assert (
        js.startswith("window.SITEGEN_SEARCH = ")
        and json.loads(js[len("window.SITEGEN_SEARCH = ") : -2]) == data
    )
    docs = {d["id"]: d for d in data["documents"]}
    for mid, lo in col.methods.items():
        rec = lo.record
        if rec.status.value == "retired":
            assert mid not in docs
            continue
        d = docs[mid]
        assert d["title"] == rec.title and d["analyte"] == rec.scope.analyte
        assert d["matrix"] == rec.scope.matrix
        for use in rec.reagents:
            r = col.reagents[use.ref].record
            assert r.name in d["reagents"] and r.formula in d["formulas"]
        assert d["url"] in site


def test_every_page_says_that_local_rules_and_the_sds_take_precedence(site):
    pages = [p for p in site if p.endswith(".html")]
    assert len(pages) > 20
    for p in pages:
        text = site[p].decode("utf-8")
        assert "supplier&#39;s safety data sheet take precedence" in text or (
            "supplier's safety data sheet take precedence" in text
        ), p
