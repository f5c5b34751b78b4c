"""Run the stages in order: load -> analyse -> check -> render -> write.

Each stage is a function of its inputs; data flows one way. ``check``
stops after the check stage; ``build`` goes on to render and write only
when there are no error findings (or, with ``keep_going``, leaves the
failing methods out and lists them on the quality page).
"""

from __future__ import annotations

__all__ = ["BuildReport", "CheckResult", "analyse_all", "build_site", "check_paths"]

import time
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..check.registry import Settings
from ..errors import Finding, Severity, Span, sort_findings

if TYPE_CHECKING:
    from ..load.collection import Collection


@dataclass
class CheckResult:
    """What the check stage produced."""

    collection: Collection
    analyses: dict[str, Any]
    findings: list[Finding]

    @property
    def errors(self) -> list[Finding]:
        return [f for f in self.findings if f.is_error]

    @property
    def warnings(self) -> list[Finding]:
        return [f for f in self.findings if not f.is_error]


@dataclass
class BuildReport:
    """Summary of a build."""

    check: CheckResult
    written: bool = False
    out: Path | None = None
    methods_built: int = 0
    methods_cached: int = 0
    excluded: list[tuple[str, str]] = field(default_factory=list)
    stage_seconds: dict[str, float] = field(default_factory=dict)
    files: int = 0
    #: ids of the methods whose files were rendered anew, sorted
    rebuilt: list[str] = field(default_factory=list)
    #: False when the output already held exactly the new site
    output_rewritten: bool = False


def _reference(collection: Collection) -> str | None:
    return None


def analyse_all(collection: Collection) -> dict[str, Any]:
    """Analyse every loaded method (sorted by id)."""
    from ..analyse import analyse_method
    from ..hazards.rules_engine import load_rules

    rules = load_rules(collection.safety_rules_source)
    site_ref = collection.site.record.reference_electrode if collection.site else None
    return {
        mid: analyse_method(
            loaded,
            collection.reagents,
            collection.indicators,
            reference=site_ref,
            safety_rules=rules,
        )
        for mid, loaded in sorted(collection.methods.items())
    }


def site_settings(collection: Collection, settings: Settings) -> Settings:
    """``settings`` with what the collection's site.yaml sets (the burette
    band)."""
    from dataclasses import replace

    if collection.site is None:
        return settings
    return replace(settings, burette_band=tuple(collection.site.record.burette_band))


def run_checks(
    collection: Collection,
    analyses: dict[str, Any],
    settings: Settings,
    enabled: Iterable[str] | None = None,
) -> list[Finding]:
    """Loader findings plus every enabled rule's findings, sorted."""
    from ..check.run import as_strict, run_rules

    settings = site_settings(collection, settings)
    findings = list(collection.findings)
    findings.extend(run_rules(collection, analyses, settings, enabled))
    return sort_findings(set(as_strict(findings, settings)))


def check_collection(
    collection: Collection, settings: Settings, enabled: Iterable[str] | None = None
) -> CheckResult:
    analyses = analyse_all(collection)
    return CheckResult(collection, analyses, run_checks(collection, analyses, settings, enabled))


def check_paths(
    paths: Sequence[Path], settings: Settings | None = None, enabled: Iterable[str] | None = None
) -> CheckResult:
    """Load, analyse and check the records at ``paths``.

    Raises:
        FileNotFoundError: a path is missing or belongs to no source folder.
    """
    for p in paths:
        if not p.exists():
            raise FileNotFoundError(f"{p}: no such file or folder")
    from ..load.collection import load_paths

    collection = load_paths(list(paths))
    result = check_collection(collection, settings or Settings(), enabled)
    if collection.selected is not None:
        others = {
            p for p in collection.sources if Path(p).parent.name == "records"
        } - collection.selected
        result.findings = [f for f in result.findings if f.span.path not in others]
    return result


def _method_of(finding: Finding, collection: Collection) -> str | None:
    for mid, loaded in collection.methods.items():
        if loaded.source.path == finding.span.path:
            return mid
    return None


def build_site(
    source: Path,
    out: Path,
    settings: Settings | None = None,
    keep_going: bool = False,
    theme: Path | None = None,
    enabled: Iterable[str] | None = None,
) -> BuildReport:
    """Build the site from ``source`` into ``out``.

    Raises:
        OutputRefused: ``out`` may not be written.
        FileNotFoundError: ``source`` has no site.yaml.
    """
    from ..clock import build_date
    from ..load.collection import load_collection
    from ..render.site import RenderOptions, render_site
    from .write import check_output_dir, write_site

    settings = settings or Settings()
    times: dict[str, float] = {}
    check_output_dir(out, source)
    if not (source / "site.yaml").is_file():
        raise FileNotFoundError(f"{source}: no site.yaml; is this a source folder?")
    t0 = time.perf_counter()
    collection = load_collection(source)
    times["load"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    analyses = analyse_all(collection)
    times["analyse"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    findings = run_checks(collection, analyses, settings, enabled)
    times["check"] = time.perf_counter() - t0
    result = CheckResult(collection, analyses, findings)
    report = BuildReport(check=result, out=out, stage_seconds=times)

    errors = result.errors
    if errors and keep_going:
        failing: dict[str, str] = {}
        for f in errors:
            mid = _method_of(f, collection)
            if mid is None:
                return report  # an error outside a method record stops publication
            failing.setdefault(mid, f"{f.rule}: {f.message}")
        report.excluded = sorted(failing.items())
        for mid in failing:
            collection.methods.pop(mid, None)
            analyses.pop(mid, None)
    elif errors:
        return report

    t0 = time.perf_counter()
    options = RenderOptions(
        theme_dir=theme or default_theme(),
        build_date=build_date(),
        generator_version=_version(),
        excluded=tuple(report.excluded),
    )
    files = render_site(collection, analyses, findings, options)
    times["render"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    from ..render.links import check_links

    broken = check_links(files)
    times["links"] = time.perf_counter() - t0
    if broken:
        report.check.findings.extend(
            Finding(
                "broken-link",
                Severity.ERROR,
                f"page {page} links to {href!r}: {reason}",
                Span(str(out / page), 1, 1),
            )
            for page, href, reason in broken
        )
        return report
    t0 = time.perf_counter()
    write_site(out, files)
    times["write"] = time.perf_counter() - t0
    report.written = True
    report.output_rewritten = True
    report.files = len(files)
    report.methods_built = len(collection.methods)
    return report


def default_theme() -> Path:
    """The theme shipped beside the package (the project's theme/ folder)."""
    here = Path(__file__).resolve().parents[2] / "theme"
    return here


def _version() -> str:
    from .installed import installed_version

    return installed_version("sitegen") or "0+unknown"
