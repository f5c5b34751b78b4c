"""Rules are small registered functions with an id.

A rule is a generator function decorated with :func:`rule`. Its docstring
is the user-facing explanation (shown by ``sitegen rules`` and on the
quality overview page). Rules take a :class:`Context` and, by scope, one
item:

* ``method``:    ``f(ctx, loaded, analysis) -> Iterable[Finding]``
* ``reagent``:   ``f(ctx, loaded) -> Iterable[Finding]``
* ``indicator``: ``f(ctx, loaded) -> Iterable[Finding]``
* ``collection``: ``f(ctx) -> Iterable[Finding]``

Registration order is import order of :mod:`sitegen.check.rules`, which
lists its modules in one explicit sequence.
"""

from __future__ import annotations

__all__ = ["RULES", "Context", "RuleInfo", "Settings", "rule"]

import datetime as _dt
import inspect
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

from ..errors import Finding, Severity, Span

Scope = Literal["method", "reagent", "indicator", "collection"]


@dataclass(frozen=True)
class RuleInfo:
    """A registered rule.

    Attributes:
        id: the rule name printed in findings, e.g. ``factor-mismatch``.
        scope: what the rule runs over.
        func: the rule function.
        doc: its plain explanation (the first docstring paragraph).
    """

    id: str
    scope: Scope
    func: Callable[..., Iterable[Finding]]
    doc: str


RULES: dict[str, RuleInfo] = {}


def rule(
    rule_id: str, scope: Scope = "method"
) -> Callable[[Callable[..., Any]], Callable[..., Any]]:
    """Register a rule function under ``rule_id``."""

    def deco(func: Callable[..., Any]) -> Callable[..., Any]:
        if rule_id in RULES:
            raise ValueError(f"rule id {rule_id!r} registered twice")
        doc = inspect.cleandoc(func.__doc__ or "").split("\n\n")[0].replace("\n", " ")
        RULES[rule_id] = RuleInfo(rule_id, scope, func, doc)
        return func

    return deco


@dataclass(frozen=True)
class Settings:
    """Knobs that change what the rules report (profiles are data, see
    :mod:`sitegen.check.profiles`).

    Attributes:
        today: the date review deadlines are compared with.
        strict: warnings count as errors.
        burette_band: expected titrant volume as a fraction of the
            burette's capacity (common practice: 20-90 %).
        min_log10_k: smallest log10 K accepted for a sharp endpoint.
        min_break_V: smallest potential break between 99.9 % and 100.1 %.
        max_indicator_error_percent: largest accepted titration error.
    """

    today: _dt.date = field(default_factory=_dt.date.today)
    strict: bool = False
    burette_band: tuple[float, float] = (0.20, 0.90)
    min_log10_k: float = 8.0
    min_break_V: float = 0.20
    max_indicator_error_percent: float = 0.1
    concentration_tolerance: float = 0.005


@dataclass
class Context:
    """What every rule may read: the whole collection, every method's
    analysis and the settings. Rules must not modify it."""

    collection: Any
    analyses: Mapping[str, Any]
    settings: Settings = field(default_factory=Settings)

    def span(self, loaded: Any, *path: str | int) -> Span:
        """Position of ``path`` inside a loaded record."""
        return loaded.span(*path)  # type: ignore[no-any-return]

    def finding(
        self,
        rule_id: str,
        loaded: Any,
        path: tuple[str | int, ...],
        message: str,
        severity: Severity = Severity.ERROR,
    ) -> Finding:
        """A finding of ``rule_id`` at ``path`` inside ``loaded``."""
        return Finding(rule_id, severity, message, loaded.span(*path))
