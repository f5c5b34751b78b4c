"""The built demo site in a real browser."""

from __future__ import annotations

import os
import re
from pathlib import Path

import pytest

from sitegen.render import fmt

AXE = Path(__file__).parent / "vendor" / "axe.min.js"


def _status(col, status):
    return sorted(k for k, v in col.methods.items() if v.record.status.value == status)


def test_home_lists_approved_not_retired(page, base_url, demo_collection, artifacts):
    col, _ = demo_collection
    page.goto(base_url + "index.html")
    hrefs = page.eval_on_selector_all(
        "#approved ~ .analyte-group a", "els => els.map(e => e.getAttribute('href'))"
    )
    for mid in _status(col, "approved"):
        assert f"methods/{mid}/index.html" in hrefs
    everything = page.eval_on_selector_all("main a", "els => els.map(e => e.getAttribute('href'))")
    for mid in _status(col, "retired"):
        assert f"methods/{mid}/index.html" not in everything
    for mid in _status(col, "draft"):
        assert f"methods/{mid}/index.html" not in hrefs
        assert page.locator(f'.drafts a[href="methods/{mid}/index.html"]').count() == 1
    page.screenshot(path=str(artifacts / "home.png"), full_page=True)


def test_filters_narrow_the_list(page, base_url, demo_collection):
    col, _ = demo_collection
    page.goto(base_url + "index.html")
    approved = [col.methods[m].record for m in _status(col, "approved")]
    analyte = approved[0].scope.analyte
    page.select_option("#filter-analyte", analyte)
    shown = page.locator(".analyte-group .method-item:visible")
    assert shown.count() == sum(1 for r in approved if r.scope.analyte == analyte)
    page.select_option("#filter-analyte", "")
    assert page.locator(".analyte-group .method-item:visible").count() == len(approved)


def test_search_by_reagent_name_and_keyboard(page, base_url, demo_collection):
    col, _ = demo_collection
    mid = "iron-ii-ceric"
    name = col.reagents[col.methods[mid].record.titration.titrant].record.name
    query = " ".join(name.split()[:2])
    page.goto(base_url + "index.html")
    page.fill("#search-input", query)
    target = f"methods/{mid}/index.html"
    page.wait_for_selector(f'#search-results a[href="{target}"]')
    assert re.search(r"\d+ methods? found", page.inner_text("#search-count"))
    page.focus("#search-input")
    page.keyboard.press("ArrowDown")
    for _ in range(page.locator("#search-results a").count()):
        if page.evaluate("document.activeElement.getAttribute('href')") == target:
            break
        page.keyboard.press("ArrowDown")
    assert page.evaluate("document.activeElement.getAttribute('href')") == target
    page.keyboard.press("Enter")
    page.wait_for_url("**/" + target)


def test_method_page_curve_and_hazards_first(page, base_url, demo_collection, artifacts):
    mid = "iron-ii-ceric"
    page.goto(base_url + f"methods/{mid}/index.html")
    svg = page.locator("figure.plot svg[role=img]")
    assert svg.count() == 1 and svg.is_visible()
    box = svg.bounding_box()
    assert box["width"] > 300 and box["height"] > 150
    hz = page.locator("section.hazards")
    assert hz.is_visible()
    assert "take precedence" in hz.inner_text()
    before = page.evaluate(
        """() => {
          const h = document.querySelector('section.hazards');
          const p = document.getElementById('procedure');
          return !!(h.compareDocumentPosition(p) & Node.DOCUMENT_POSITION_FOLLOWING);
        }"""
    )
    assert before
    # pictograms load (the files exist and are images)
    for img in page.locator("section.hazards img").all():
        assert page.evaluate("img => img.complete && img.naturalWidth > 0", img.element_handle())
    page.screenshot(path=str(artifacts / "method.png"), full_page=True)


def _inputs(record):
    we = record.calculation.worked_example
    values = {
        "calc-v_start": 0.0,
        "calc-v_end": we.titrant_volume.value,
        "calc-v_blank": we.blank_volume.value,
        "calc-conc": (we.titrant_concentration or record.titration.titrant_concentration).value,
        "calc-sample": we.sample.value,
    }
    xv = we.excess_volume or record.titration.excess_volume
    if xv is not None:
        values["calc-excess_volume"] = xv.value
    if record.titration.excess_concentration is not None:
        values["calc-excess_conc"] = record.titration.excess_concentration.value
    return values


def test_calculator_shows_the_builds_worked_result(page, base_url, demo_collection):
    col, analyses = demo_collection
    tested = 0
    for mid, a in sorted(analyses.items()):
        if a.result is None:
            continue
        page.goto(base_url + f"methods/{mid}/index.html")
        expected = page.inner_text("#worked-result")
        assert expected == fmt.fixed(a.result.value, a.result.decimals)
        # start from a wrong answer so the test sees the calculator react
        page.fill("#calc-v_end", "1")
        assert page.inner_text("#calc-result") != expected or a.result.value == 0
        for field, value in _inputs(col.methods[mid].record).items():
            if page.locator(f"#{field}").count():
                page.fill(f"#{field}", repr(value))
        assert page.inner_text("#calc-result") == expected, mid
        tested += 1
    assert tested >= 1


def test_print_hides_navigation(page, base_url):
    page.goto(base_url + "methods/iron-ii-ceric/index.html")
    assert page.locator(".site-nav").is_visible()
    page.emulate_media(media="print")
    assert not page.locator(".site-nav").is_visible()
    assert not page.locator(".calculator").is_visible()
    assert page.locator("section.hazards").is_visible()


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_bench_sheet_prints_on_a4_and_letter(page, base_url, paper):
    page.goto(base_url + "methods/iron-ii-ceric/bench.html")
    page.emulate_media(media="print")
    # printable width of either paper with 15 mm margins: 180 mm = 680 CSS px
    page.set_viewport_size({"width": 680, "height": 900})
    assert page.evaluate("document.documentElement.scrollWidth") <= 680
    order = page.evaluate(
        "() => [...document.querySelectorAll('section')]"
        ".map(s => s.getAttribute('aria-labelledby'))"
    )
    assert order[0] == "hazards"
    assert {"sample", "readings", "result", "sign"} <= set(order)
    pdf = page.pdf(format=paper, prefer_css_page_size=True)
    pages = len(re.findall(rb"/Type\s*/Page[^s]", pdf))
    assert 1 <= pages <= 2  # hazards and readings on the first sheet, the rest on the second


def _axe(page):
    if not AXE.is_file():
        if os.environ.get("CI") == "true":
            pytest.fail(f"{AXE} is missing; ./dev test installs axe-core from the npm registry")
        pytest.skip(f"{AXE} is missing; run ./dev test to install axe-core")
    page.add_script_tag(path=str(AXE))
    return page.evaluate(
        """async () => {
          const r = await axe.run(document, {resultTypes: ['violations']});
          return r.violations.map(v => ({id: v.id, impact: v.impact,
                                         nodes: v.nodes.map(n => n.target.join(' ')).slice(0, 5)}));
        }"""
    )


@pytest.mark.parametrize(
    "path",
    [
        "index.html",
        "methods/iron-ii-ceric/index.html",
        "reagents/cerium-iv-sulfate/index.html",
        "methods/iron-ii-ceric/bench.html",
    ],
)
def test_accessibility_audit(page, base_url, path):
    page.goto(base_url + path)
    bad = [v for v in _axe(page) if v["impact"] in {"serious", "critical"}]
    assert bad == []


def test_record_text_never_runs(browser, serve, source_copy, tmp_path, build):
    rec_path = source_copy / "records" / "iron-ii-ceric.yaml"
    rec = rec_path.read_text()
    rec = rec.replace(
        "title: Iron(II) in pickling bath samples by cerium(IV)",
        "title: \"Iron <script>window.pwned=1;alert('t')</script> by cerium\"",
    )
    rec = rec.replace(
        "procedure: |\n",
        "procedure: |\n  Go [here](javascript:window.pwned=2) or <script>window.pwned=3</script>"
        ' <img src=x onerror="window.pwned=4">\n\n',
    )
    rec_path.write_text(rec)
    url = serve(build(source_copy, tmp_path / "out"))
    ctx = browser.new_context()
    pg = ctx.new_page()
    dialogs = []
    pg.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    for path in ("index.html", "methods/iron-ii-ceric/index.html"):
        pg.goto(url + path)
        assert pg.evaluate("typeof window.pwned") == "undefined"
    pg.goto(url + "index.html")
    pg.fill("#search-input", "cerium")
    pg.wait_for_selector("#search-results li")
    assert pg.evaluate("typeof window.pwned") == "undefined"
    pg.goto(url + "methods/iron-ii-ceric/index.html")
    assert "<script>window.pwned=1" in pg.inner_text("h1")
    assert pg.locator("a[href^='javascript']").count() == 0
    assert "javascript:window.pwned=2" in pg.inner_text("#procedure + .prose")
    assert dialogs == []
    ctx.close()


def test_works_from_file_url(page, site_dir):
    page.goto((site_dir / "index.html").as_uri())
    assert page.locator(".analyte-group a").count() > 0
    page.fill("#search-input", "iron")
    page.wait_for_selector("#search-results a")
    first = page.locator("#search-results a").first
    first.click()
    page.wait_for_load_state()
    assert page.url.startswith("file://") and page.url.endswith("/index.html")
    assert page.locator("section.hazards").is_visible()
    # relative links keep working: back to the home page through the header
    page.click(".lab a")
    assert page.url == (site_dir / "index.html").as_uri()


def test_readable_without_javascript(browser, base_url, demo_collection):
    col, _ = demo_collection
    ctx = browser.new_context(java_script_enabled=False)
    pg = ctx.new_page()
    pg.goto(base_url + "index.html")
    assert pg.locator(".analyte-group .method-item:visible").count() == len(
        _status(col, "approved")
    )
    assert not pg.locator(".filters").is_visible()
    assert "needs JavaScript" in pg.inner_text("#search-count")
    pg.goto(base_url + "methods/iron-ii-ceric/index.html")
    assert pg.locator("section.hazards").is_visible()
    assert pg.locator("figure.plot svg.curve").is_visible()
    assert pg.locator("figure.plot .curve-key li").count() == 4  # line, dashed, marker, band
    # the worked result is in the page itself, not computed by the script
    assert pg.inner_text("#calc-result") == pg.inner_text("#worked-result")
    ctx.close()
