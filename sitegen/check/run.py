"""Run the enabled rules over a loaded collection."""

from __future__ import annotations

__all__ = ["as_strict", "rules_by_scope", "run_rules"]

from collections.abc import Iterable, Mapping
from typing import Any

from ..errors import Finding, Severity, sort_findings
from . import rules as _rules  # noqa: F401  (registers the rules)
from .registry import RULES, Context, Settings


def rules_by_scope(enabled: Iterable[str] | None = None) -> tuple[list[str], dict[str, list[Any]]]:
    """The enabled rule ids (all by default) in order, and their rules by
    scope.

    Raises:
        KeyError: an enabled rule id is unknown (the message lists the
            known ids).
    """
    ids = list(RULES) if enabled is None else list(enabled)
    unknown = [i for i in ids if i not in RULES]
    if unknown:
        raise KeyError(f"unknown rule id(s) {', '.join(unknown)}; known: {', '.join(RULES)}")
    scoped: dict[str, list[Any]] = {}
    for rid in ids:
        scoped.setdefault(RULES[rid].scope, []).append(RULES[rid])
    return ids, scoped


def as_strict(findings: Iterable[Finding], settings: Settings) -> list[Finding]:
    """The findings, with warnings reported as errors under ``settings.strict``."""
    if not settings.strict:
        return list(findings)
    return [
        Finding(f.rule, Severity.ERROR, f.message, f.span) if not f.is_error else f
        for f in findings
    ]


def run_rules(
    collection: Any,
    analyses: Mapping[str, Any],
    settings: Settings | None = None,
    enabled: Iterable[str] | None = None,
) -> list[Finding]:
    """Every finding of the enabled rules (all rules by default), sorted.

    Under ``settings.strict`` warnings are reported as errors.

    Raises:
        KeyError: an enabled rule id is unknown (the message lists the
            known ids).
    """
    settings = settings or Settings()
    ids, _scoped = rules_by_scope(enabled)
    ctx = Context(collection=collection, analyses=analyses, settings=settings)
    out: list[Finding] = []
    for rid in ids:
        info = RULES[rid]
        if info.scope == "method":
            for mid, loaded in collection.methods.items():
                out.extend(info.func(ctx, loaded, analyses.get(mid)))
        elif info.scope == "reagent":
            for loaded in collection.reagents.values():
                out.extend(info.func(ctx, loaded))
        elif info.scope == "indicator":
            for loaded in collection.indicators.values():
                out.extend(info.func(ctx, loaded))
        else:
            out.extend(info.func(ctx))
    return sort_findings(as_strict(out, settings))
