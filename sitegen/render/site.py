"""The render stage: collection + analyses + findings -> ``{path: bytes}``.

:func:`render_site` is pure and deterministic: keys are sorted, nothing
depends on dict or set order, and the only date is
``options.build_date``. It is split so the build can cache and
parallelise by method: :func:`render_method_files` renders one method's
own files, :func:`render_shared` everything else.
"""

from __future__ import annotations

__all__ = ["RenderOptions", "render_method_files", "render_shared", "render_site"]

import datetime as _dt
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..errors import Finding
from . import pages
from .env import environment
from .exports import curve_csv, method_json
from .search import search_files

if TYPE_CHECKING:
    from .plots import DrawingStore


@dataclass(frozen=True)
class RenderOptions:
    """Settings of one render.

    Attributes:
        theme_dir: theme folder holding ``templates/`` and ``static/``.
        build_date: the build's date (from SOURCE_DATE_EPOCH).
        generator_version: shown in the footer.
        excluded: (method id, reason) of methods left out under
            --keep-going; listed on the quality page, never linked.
    """

    theme_dir: Path
    build_date: _dt.date
    generator_version: str
    excluded: tuple[tuple[str, str], ...] = ()


def _render(page: pages.Page, options: RenderOptions) -> bytes:
    env = environment(options.theme_dir)
    return env.get_template(page.template).render(page.context).encode("utf-8")


def render_method_files(
    method_id: str,
    collection: Any,
    analysis: Any,
    method_findings: Sequence[Finding],
    options: RenderOptions,
    drawings: DrawingStore | None = None,
) -> dict[str, bytes]:
    """One method's own files: its page, bench sheet, curve.csv and
    method.json.

    Args:
        method_id: the method.
        collection: the loaded collection (for reagents, glossary, site).
        analysis: the method's analysis (may be None or partly None).
        method_findings: the findings of this method (see
            :func:`sitegen.render.pages.method_findings`).
        options: render options.
        drawings: the curve drawings already made, by
            :func:`sitegen.render.plots.drawing_key` (see
            :func:`sitegen.render.plots.curve_svg`).
    """
    loaded = collection.methods[method_id]
    base = f"methods/{method_id}/"
    out = {
        base + "index.html": _render(
            pages.method_page(method_id, collection, analysis, method_findings, options, drawings),
            options,
        ),
        base + "bench.html": _render(
            pages.bench_page(method_id, collection, analysis, options), options
        ),
        base + "method.json": method_json(loaded, analysis, method_findings),
    }
    if analysis is not None and analysis.curve is not None:
        out[base + "curve.csv"] = curve_csv(analysis.curve)
    return dict(sorted(out.items()))


def _static(theme_dir: Path) -> dict[str, bytes]:
    from .env import theme_layers

    out: dict[str, bytes] = {}
    # default theme first, so the lab's files replace same-named ones
    for layer in reversed(theme_layers(theme_dir)):
        root = layer / "static"
        if not root.is_dir():
            continue
        for p in sorted(root.rglob("*")):
            if p.is_file() and not p.name.startswith("."):
                out["static/" + p.relative_to(root).as_posix()] = p.read_bytes()
    return dict(sorted(out.items()))


def render_shared(
    collection: Any,
    analyses: Mapping[str, Any],
    findings: Sequence[Finding],
    options: RenderOptions,
    search: bool = True,
) -> dict[str, bytes]:
    """Every file that is not one method's own: home, archive, reagent and
    indicator pages, glossary, quality and rules pages, search index and
    the theme's static files (``search``: False leaves the search index
    out, for a caller that assembles it from documents it kept)."""
    published = pages.published_methods(collection, options)
    page_list = [
        pages.home_page(collection, options),
        pages.archive_page(collection, options),
        pages.glossary_page(collection, options),
        pages.quality_page(collection, analyses, findings, options),
        pages.rules_page(collection, options),
        pages.reagents_index_page(collection, options),
        pages.indicators_index_page(collection, options),
    ]
    uses = pages.reagent_uses(collection, options)
    page_list += [
        pages.reagent_page(r, collection, options, uses) for r in sorted(collection.reagents)
    ]
    page_list += [
        pages.indicator_page(i, collection, options) for i in sorted(collection.indicators)
    ]
    out = {p.path: _render(p, options) for p in page_list}
    if search:
        out.update(search_files(collection, published))
    out.update(_static(options.theme_dir))
    return dict(sorted(out.items()))


def render_site(
    collection: Any,
    analyses: Mapping[str, Any],
    findings: Sequence[Finding],
    options: RenderOptions,
) -> dict[str, bytes]:
    """The whole site as relative POSIX path -> bytes, sorted by path.

    Args:
        collection: the loaded collection.
        analyses: method id -> Analysis (missing ids render without
            chemistry).
        findings: every finding of the run.
        options: render options.
    """
    out = render_shared(collection, analyses, findings, options)
    for mid, loaded in pages.published_methods(collection, options).items():
        analysis = analyses.get(mid)
        own = pages.method_findings(findings, loaded, analysis)
        out.update(render_method_files(mid, collection, analysis, own, options))
    return dict(sorted(out.items()))
