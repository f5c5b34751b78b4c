"""One finding shape, one exception, one formatter.

Every problem the tool reports, whether a YAML syntax error, a schema
violation or a failed chemistry check, becomes a :class:`Finding` with a
1-based :class:`Span`. :func:`format_finding` prints the one text form
``path:line:column: severity: message [rule]`` used by every command.
"""

from __future__ import annotations

__all__ = [
    "Finding",
    "Severity",
    "SitegenError",
    "Span",
    "finding_to_json",
    "format_finding",
    "sort_findings",
]

import enum
from collections.abc import Iterable
from dataclasses import dataclass


class Severity(enum.StrEnum):
    """How bad a finding is: an error stops publication, a warning does not
    (unless the run is strict)."""

    ERROR = "error"
    WARNING = "warning"


@dataclass(frozen=True, order=True)
class Span:
    """A position in a source file.

    Attributes:
        path: the file as the user named it (relative paths stay relative).
        line: 1-based line number.
        col: 1-based column number.
    """

    path: str
    line: int = 1
    col: int = 1

    def __str__(self) -> str:
        return f"{self.path}:{self.line}:{self.col}"


@dataclass(frozen=True)
class Finding:
    """One problem found in one place.

    Attributes:
        rule: the rule id, e.g. ``reaction-unbalanced``.
        severity: error or warning.
        message: one plain sentence (or two) for the method owner.
        span: where the problem is.
    """

    rule: str
    severity: Severity
    message: str
    span: Span

    @property
    def is_error(self) -> bool:
        return self.severity is Severity.ERROR


class SitegenError(Exception):
    """Raised at a stage boundary with the findings that stop the run."""

    def __init__(self, findings: Iterable[Finding]) -> None:
        self.findings: tuple[Finding, ...] = tuple(findings)
        super().__init__("\n".join(format_finding(f) for f in self.findings))


def sort_findings(findings: Iterable[Finding]) -> list[Finding]:
    """Findings in file, line, column, rule order, so output never depends
    on the order in which rules ran."""
    return sorted(findings, key=lambda f: (f.span, f.rule, f.message))


def format_finding(finding: Finding, source_line: str | None = None) -> str:
    """The one text form of a finding.

    Args:
        finding: the finding.
        source_line: the offending source line; when given, it is printed
            below with a caret under the column.
    """
    head = f"{finding.span}: {finding.severity.value}: {finding.message} [{finding.rule}]"
    if source_line is None:
        return head
    line = source_line.rstrip("\n").expandtabs(1)
    caret = " " * max(finding.span.col - 1, 0) + "^"
    return f"{head}\n    {line}\n    {caret}"


def finding_to_json(finding: Finding) -> dict[str, object]:
    """The JSON object of a finding (keys file, line, column, rule,
    severity, message)."""
    return {
        "file": finding.span.path,
        "line": finding.span.line,
        "column": finding.span.col,
        "rule": finding.rule,
        "severity": finding.severity.value,
        "message": finding.message,
    }
