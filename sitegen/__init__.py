"""sitegen: check and publish a lab's collection of redox-titration methods.

The public API is small: :func:`check` and :func:`build` run the stages,
and every problem comes back as a :class:`Finding` at a :class:`Span`.
"""

from __future__ import annotations

__all__ = ["Finding", "Severity", "SitegenError", "Span", "build", "check"]

from pathlib import Path
from typing import Any

from .errors import Finding, Severity, SitegenError, Span


def check(*paths: str | Path, strict: bool = False) -> list[Finding]:
    """Load, analyse and check the records at ``paths``; the sorted findings."""
    from .build.run import check_paths
    from .check.registry import Settings

    result = check_paths([Path(p) for p in paths] or [Path("methods")], Settings(strict=strict))
    return result.findings


def build(source: str | Path = "methods", out: str | Path = "output", **kwargs: Any) -> Any:
    """Build the site; raises :class:`SitegenError` when errors stop it."""
    from .build.run import build_site

    report = build_site(Path(source), Path(out), **kwargs)
    if not report.written:
        raise SitegenError(report.check.errors)
    return report
