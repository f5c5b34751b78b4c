"""Validate parsed YAML against the record types; every error becomes a
:class:`~sitegen.errors.Finding` with the position of the offending value.
"""

from __future__ import annotations

__all__ = ["Loaded", "load_text", "validate"]

import difflib
from dataclasses import dataclass
from typing import Any, TypeVar

from pydantic import BaseModel, ValidationError

from ..errors import Finding, Severity, Span
from .source import Source
from .spans import KeyPath, Parsed, YamlProblem, parse_yaml

M = TypeVar("M", bound=BaseModel)


@dataclass(frozen=True)
class Loaded:
    """A validated record with the positions of its values."""

    record: Any
    source: Source
    parsed: Parsed

    def span(self, *path: str | int) -> Span:
        line, col = self.parsed.position(tuple(path))
        return Span(self.source.path, line, col)


def _fields_at(model: type[BaseModel], loc: KeyPath) -> list[str]:
    """Field names valid at ``loc`` (the mapping that holds the bad key)."""
    current: Any = model
    for part in loc:
        if isinstance(part, int):
            continue
        if not (isinstance(current, type) and issubclass(current, BaseModel)):
            return []
        info = current.model_fields.get(part)
        if info is None:
            return []
        current = _unwrap(info.annotation)
    if isinstance(current, type) and issubclass(current, BaseModel):
        return list(current.model_fields)
    return []


def _unwrap(tp: Any) -> Any:
    """The BaseModel inside Optional[...] / list[...] annotations, if any."""
    args = getattr(tp, "__args__", None)
    if isinstance(tp, type) and issubclass(tp, BaseModel):
        return tp
    for a in args or ():
        found = _unwrap(a)
        if isinstance(found, type) and issubclass(found, BaseModel):
            return found
    return tp


_MESSAGES = {
    "missing": "required field {name!r} is missing",
    "extra_forbidden": "unknown key {name!r}",
}


def validate(model: type[M], parsed: Parsed, source: Source) -> tuple[M | None, list[Finding]]:
    """Validate ``parsed.data`` as ``model``; errors become findings."""
    if not isinstance(parsed.data, dict):
        return None, [
            Finding(
                "record-not-mapping",
                Severity.ERROR,
                "a record is a YAML mapping of keys to values",
                Span(source.path, 1, 1),
            )
        ]
    try:
        return model.model_validate(parsed.data), []
    except ValidationError as exc:
        findings = [_finding(model, err, parsed, source) for err in exc.errors()]
        # A typo'd key gives "unknown key 'revison'; did you mean 'revision'?"
        # and "required field 'revision' is missing": keep only the first.
        suggested = {
            f.message.split("did you mean ")[1].strip("'?")
            for f in findings
            if f.rule == "unknown-key" and "did you mean" in f.message
        }
        findings = [
            f
            for f in findings
            if not (f.rule == "missing-field" and f.message.split("'")[1] in suggested)
        ]
        # A union tries each branch; keep one message per position.
        unique = {(f.span, f.rule): f for f in findings}
        return None, list(unique.values())


def _finding(model: type[BaseModel], err: Any, parsed: Parsed, source: Source) -> Finding:
    loc: KeyPath = tuple(p for p in err["loc"] if isinstance(p, str | int))
    # pydantic appends validator names (e.g. 'function-after[...]') to loc
    loc = tuple(p for p in loc if not (isinstance(p, str) and "[" in p))
    kind = err["type"]
    name = loc[-1] if loc else ""
    if kind == "extra_forbidden":
        line, col = parsed.key_position(loc)
        known = _fields_at(model, loc[:-1])
        guess = difflib.get_close_matches(str(name), known, n=1, cutoff=0.6)
        hint = f"; did you mean {guess[0]!r}?" if guess else ""
        if not guess and known:
            hint = "; known keys here: " + ", ".join(sorted(known))
        return Finding(
            "unknown-key",
            Severity.ERROR,
            f"unknown key {name!r}{hint}",
            Span(source.path, line, col),
        )
    if kind == "missing":
        line, col = parsed.position(loc[:-1])
        where = ".".join(str(p) for p in loc[:-1]) or "the record"
        return Finding(
            "missing-field",
            Severity.ERROR,
            f"required field {name!r} is missing from {where}",
            Span(source.path, line, col),
        )
    line, col = parsed.position(loc)
    field = ".".join(str(p) for p in loc) or "record"
    msg = str(err.get("msg", "invalid value"))
    if msg.startswith("Value error, "):
        msg = msg[len("Value error, ") :]
    rule = "bad-value"
    if "unit" in msg or "dimension" in msg:
        rule = "bad-unit"
    elif kind.endswith("_type") or kind in {"int_parsing", "float_parsing", "bool_parsing"}:
        rule = "wrong-type"
    elif kind in {"literal_error", "enum"}:
        rule = "bad-choice"
    elif "not a valid id" in msg:
        rule = "bad-id"
    return Finding(rule, Severity.ERROR, f"{field}: {msg}", Span(source.path, line, col))


def load_text(model: type[M], source: Source) -> tuple[Loaded | None, list[Finding]]:
    """Parse and validate one source's text."""
    try:
        parsed = parse_yaml(source.text)
    except YamlProblem as p:
        return None, [Finding(p.rule, Severity.ERROR, p.message, Span(source.path, p.line, p.col))]
    record, findings = validate(model, parsed, source)
    if record is None:
        return None, findings
    return Loaded(record=record, source=source, parsed=parsed), []
