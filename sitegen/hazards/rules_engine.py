"""Chemistry-aware safety rules read from data files.

The built-in rules are ``sitegen/data/safety-rules.yaml``; a lab extends
them with ``SOURCE/safety-rules.yaml`` in the same format, where a rule
with an existing id replaces the built-in one (and may, for instance,
lower it to ``caution-only``). The format::

    rules:
      - id: permanganate-chloride-medium     # lower-case words and '-'
        severity: error                      # error | warning | caution-only
        when: CONDITION                      # the rule fires when it holds
        satisfied_by: CONDITION              # optional: the method already
                                             #   deals with it; the caution
                                             #   stays, the finding goes
        point_at: medium                     # optional: reagent | medium |
                                             #   procedure | safety | sample
        suggest_alternative: true            # optional: name the record's
                                             #   `alternative` in the message
        message: plain explanation for the method owner
        caution: the sentence shown on the method page
        source: a citation, or "common practice"

A CONDITION is one mapping with exactly one key:

* ``all: [CONDITION, ...]`` / ``any: [CONDITION, ...]`` / ``not: CONDITION``
* ``reagent: {FIELD: VALUE, ...}``: some reagent the method lists matches
  every field given. Fields: ``id``, ``role`` (the role in the method),
  ``supplies`` (species, compared without spaces and ``^``), ``element``
  (an element symbol in the formula), ``hazard`` (an H/EUH code of the
  reagent, also inside a combined code), ``formula`` and ``name``
  (regular expressions). A list VALUE means "any of these".
* ``medium: REGEX`` - the text of ``conditions.medium``;
* ``procedure: REGEX`` - the procedure text;
* ``safety: REGEX`` - one of the record's own safety cautions;
* ``sample: REGEX`` - what is titrated: the scope's analyte, analyte
  species or matrix (a hazardous sample needs cautions as much as a
  hazardous reagent);
* ``field: NAME`` - the record field NAME (e.g. ``alternative``) is set.

Regular expressions are searched case-insensitively (Python ``re``).
A malformed file gives ``bad-safety-rule`` findings with the position of
the offending value; the rules that are well formed still apply.
"""

from __future__ import annotations

__all__ = [
    "SEVERITIES",
    "Condition",
    "RuleSet",
    "SafetyRule",
    "Triggered",
    "builtin_rules",
    "elements_of",
    "evaluate",
    "load_rules",
    "parse_rules",
]

import difflib
import functools
import re
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from importlib import resources
from typing import Any

from ..errors import Finding, Severity, Span
from ..load.source import Source
from ..load.spans import KeyPath, Parsed, YamlProblem, parse_yaml
from .ghs import normalise

SEVERITIES = ("error", "warning", "caution-only")
BAD_RULE = "bad-safety-rule"
BUILTIN_PATH = "sitegen/data/safety-rules.yaml"

_ID_RE = re.compile(r"^[a-z0-9][a-z0-9-]{0,79}$")
_ELEMENT_RE = re.compile(r"[A-Z][a-z]?")
_RULE_KEYS = (
    "id",
    "severity",
    "when",
    "satisfied_by",
    "point_at",
    "suggest_alternative",
    "message",
    "caution",
    "source",
)
_REQUIRED = ("id", "severity", "when", "message", "caution", "source")
_REAGENT_FIELDS = ("id", "role", "supplies", "element", "hazard", "formula", "name")
_POINT_AT = {
    "reagent": "reagents",
    "medium": "conditions",
    "procedure": "procedure",
    "safety": "safety",
    "sample": "scope",
}
_LEAVES = ("reagent", "medium", "procedure", "safety", "sample", "field")
_OPERATORS = ("all", "any", "not")

#: A witness is the key path, inside the method record, of what made a
#: condition true; findings point there.
Witnesses = tuple[KeyPath, ...]


def elements_of(formula: str) -> frozenset[str]:
    """Element symbols written in a formula (``"K2Cr2O7"`` -> K, Cr, O).

    Relies on the usual capitalisation of symbols, which the record format
    requires; it does not check that a symbol exists.
    """
    return frozenset(_ELEMENT_RE.findall(formula))


def _species(s: str) -> str:
    # "MnO4^-", "MnO4 -" and "MnO4-" name the same ion
    return re.sub(r"[\s^]", "", s)


@dataclass(frozen=True)
class Condition:
    """A compiled condition: ``test(record, reagents)`` returns the
    witnesses when it holds and None when it does not."""

    describe: str
    test: Callable[[Any, Mapping[str, Any]], Witnesses | None] = field(compare=False, repr=False)


@dataclass(frozen=True)
class SafetyRule:
    """One safety rule.

    Attributes:
        id: its name, used as the finding's rule id.
        severity: ``error``, ``warning`` or ``caution-only`` (page only).
        when: fires when this holds.
        satisfied_by: when this also holds, no finding (caution stays).
        point_at: which witness a finding points at, if there is one
            (reagent, medium, procedure, safety or sample).
        suggest_alternative: append the record's ``alternative``.
        message: the finding's explanation.
        caution: the page caution.
        source: citation or "common practice".
        origin: where the rule is defined.
    """

    id: str
    severity: str
    when: Condition
    message: str
    caution: str
    source: str
    origin: Span
    satisfied_by: Condition | None = None
    point_at: str | None = None
    suggest_alternative: bool = False


@dataclass(frozen=True)
class Triggered:
    """A rule that fired on one method.

    Attributes:
        rule: the rule.
        message: its message, with the alternative added when asked for.
        caution: the page caution.
        severity: the rule's severity.
        source: the rule's source.
        where: key path in the record the finding should point at.
        satisfied: the method already deals with it (no finding).
    """

    rule: SafetyRule
    message: str
    caution: str
    severity: str
    source: str
    where: KeyPath
    satisfied: bool = False

    @property
    def reports(self) -> bool:
        """Whether this becomes a checker finding."""
        return self.severity != "caution-only" and not self.satisfied


@dataclass(frozen=True)
class RuleSet:
    """Rules in application order, plus problems found reading them."""

    rules: tuple[SafetyRule, ...]
    findings: tuple[Finding, ...] = ()

    def get(self, rule_id: str) -> SafetyRule | None:
        return next((r for r in self.rules if r.id == rule_id), None)


# --- compiling conditions -------------------------------------------------


class _Bad(Exception):
    """A malformed rule: message and key path; ``at_key`` points at the
    mapping key itself (an unknown key) rather than its value."""

    def __init__(self, message: str, path: KeyPath, at_key: bool = False) -> None:
        super().__init__(message)
        self.message = message
        self.path = path
        self.at_key = at_key


def _regex(value: object, path: KeyPath) -> re.Pattern[str]:
    if not isinstance(value, str) or not value:
        raise _Bad("expected a regular expression (text)", path)
    try:
        return re.compile(value, re.IGNORECASE)
    except re.error as exc:
        raise _Bad(f"bad regular expression {value!r}: {exc}", path) from None


def _texts(value: object, path: KeyPath) -> tuple[str, ...]:
    items = value if isinstance(value, list) else [value]
    out = []
    for i, v in enumerate(items):
        if isinstance(v, bool) or not isinstance(v, str | int | float) or str(v) == "":
            raise _Bad(
                "expected text or a list of texts", (*path, i) if isinstance(value, list) else path
            )
        out.append(str(v))
    return tuple(out)


def _compile_reagent(spec: object, path: KeyPath) -> Condition:
    if not isinstance(spec, dict) or not spec:
        raise _Bad(f"'reagent' takes a mapping of fields: {', '.join(_REAGENT_FIELDS)}", path)
    checks: list[Callable[[Any, Any], bool]] = []
    for key, value in spec.items():
        kp = (*path, key)
        if key not in _REAGENT_FIELDS:
            raise _Bad(_unknown("reagent field", key, _REAGENT_FIELDS), kp, at_key=True)
        if key in ("formula", "name"):
            rx = _regex(value, kp)
            checks.append(
                lambda use, r, rx=rx, key=key: r is not None and bool(rx.search(getattr(r, key)))
            )
        elif key == "role":
            roles = _texts(value, kp)
            checks.append(lambda use, r, roles=roles: use.role.value in roles)
        elif key == "id":
            ids = _texts(value, kp)
            checks.append(lambda use, r, ids=ids: use.ref in ids)
        elif key == "supplies":
            sp = frozenset(_species(s) for s in _texts(value, kp))
            checks.append(
                lambda use, r, sp=sp: (
                    r is not None and r.supplies is not None and _species(r.supplies) in sp
                )
            )
        elif key == "element":
            els = frozenset(_texts(value, kp))
            checks.append(
                lambda use, r, els=els: r is not None and bool(els & elements_of(r.formula))
            )
        else:  # hazard
            codes = frozenset(normalise(c) for c in _texts(value, kp))
            checks.append(
                lambda use, r, codes=codes: r is not None and bool(codes & _hazard_parts(r))
            )

    def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
        for i, use in enumerate(record.reagents):
            r = reagents.get(use.ref)
            if all(c(use, r) for c in checks):
                return (("reagents", i),)
        return None

    return Condition(f"reagent {spec}", test)


def _hazard_parts(reagent: Any) -> frozenset[str]:
    if reagent.hazards is None:
        return frozenset()
    parts: set[str] = set()
    for code in reagent.hazards.hazard_statements:
        c = normalise(code)
        parts.add(c)
        parts.update(c.split("+"))
    return frozenset(parts)


def _compile_text(key: str, value: object, path: KeyPath) -> Condition:
    rx = _regex(value, path)
    if key == "medium":

        def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
            return (("conditions", "medium"),) if rx.search(record.conditions.medium) else None

    elif key == "procedure":

        def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
            return (("procedure",),) if rx.search(record.procedure) else None

    elif key == "sample":

        def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
            for name in ("analyte", "analyte_species", "matrix"):
                if rx.search(getattr(record.scope, name)):
                    return (("scope", name),)
            return None

    else:  # safety

        def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
            for i, text in enumerate(record.safety):
                if rx.search(text):
                    return (("safety", i),)
            return None

    return Condition(f"{key} ~ /{rx.pattern}/", test)


def _compile_field(value: object, path: KeyPath) -> Condition:
    if not isinstance(value, str) or not re.fullmatch(r"[a-z_]+", value):
        raise _Bad("'field' takes a record field name, e.g. alternative", path)

    def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
        if not hasattr(record, value):
            return None
        v = getattr(record, value)
        return ((value,),) if v not in (None, "", [], ()) else None

    return Condition(f"field {value}", test)


def _compile(spec: object, path: KeyPath) -> Condition:
    known = (*_OPERATORS, *_LEAVES)
    if not isinstance(spec, dict) or len(spec) != 1:
        raise _Bad("a condition is a mapping with exactly one of: " + ", ".join(known), path)
    ((key, value),) = spec.items()
    kp = (*path, key)
    if key in ("all", "any"):
        if not isinstance(value, list) or not value:
            raise _Bad(f"'{key}' takes a non-empty list of conditions", kp)
        parts = tuple(_compile(v, (*kp, i)) for i, v in enumerate(value))
        return _all(parts) if key == "all" else _any(parts)
    if key == "not":
        inner = _compile(value, kp)
        return Condition(
            f"not {inner.describe}", lambda rec, rg: () if inner.test(rec, rg) is None else None
        )
    if key == "reagent":
        return _compile_reagent(value, kp)
    if key in ("medium", "procedure", "safety", "sample"):
        return _compile_text(key, value, kp)
    if key == "field":
        return _compile_field(value, kp)
    raise _Bad(_unknown("condition", key, known), kp, at_key=True)


def _all(parts: tuple[Condition, ...]) -> Condition:
    def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
        out: list[KeyPath] = []
        for p in parts:
            w = p.test(record, reagents)
            if w is None:
                return None
            out.extend(w)
        return tuple(out)

    return Condition("all(" + ", ".join(p.describe for p in parts) + ")", test)


def _any(parts: tuple[Condition, ...]) -> Condition:
    def test(record: Any, reagents: Mapping[str, Any]) -> Witnesses | None:
        for p in parts:
            w = p.test(record, reagents)
            if w is not None:
                return w
        return None

    return Condition("any(" + ", ".join(p.describe for p in parts) + ")", test)


def _unknown(what: str, key: object, known: Sequence[str]) -> str:
    guess = difflib.get_close_matches(str(key), known, n=1, cutoff=0.6)
    hint = f"; did you mean {guess[0]!r}?" if guess else "; known: " + ", ".join(known)
    return f"unknown {what} {key!r}{hint}"


# --- reading rule files ---------------------------------------------------


def _text_field(raw: dict[str, Any], key: str, path: KeyPath) -> str:
    v = raw[key]
    if not isinstance(v, str) or not v.strip():
        raise _Bad(f"'{key}' must be non-empty text", (*path, key))
    return " ".join(v.split())


def _rule(raw: object, path: KeyPath, parsed: Parsed, file: str) -> SafetyRule:
    if not isinstance(raw, dict):
        raise _Bad("each rule is a mapping with keys " + ", ".join(_REQUIRED), path)
    for key in raw:
        if key not in _RULE_KEYS:
            raise _Bad(_unknown("key", key, _RULE_KEYS), (*path, key), at_key=True)
    missing = [k for k in _REQUIRED if k not in raw]
    if missing:
        raise _Bad("rule lacks " + ", ".join(repr(m) for m in missing), path)
    rid = raw["id"]
    if not isinstance(rid, str) or not _ID_RE.match(rid):
        raise _Bad("a rule id is lower-case letters, digits and '-'", (*path, "id"))
    sev = raw["severity"]
    if sev not in SEVERITIES:
        raise _Bad(f"severity must be one of {', '.join(SEVERITIES)}", (*path, "severity"))
    point_at = raw.get("point_at")
    if point_at is not None and point_at not in _POINT_AT:
        raise _Bad("point_at must be one of " + ", ".join(_POINT_AT), (*path, "point_at"))
    suggest = raw.get("suggest_alternative", False)
    if not isinstance(suggest, bool):
        raise _Bad("suggest_alternative is true or false", (*path, "suggest_alternative"))
    when = _compile(raw["when"], (*path, "when"))
    satisfied = (
        _compile(raw["satisfied_by"], (*path, "satisfied_by")) if "satisfied_by" in raw else None
    )
    line, col = parsed.position(path)
    return SafetyRule(
        id=rid,
        severity=sev,
        when=when,
        satisfied_by=satisfied,
        point_at=point_at,
        suggest_alternative=suggest,
        message=_text_field(raw, "message", path),
        caution=_text_field(raw, "caution", path),
        source=_text_field(raw, "source", path),
        origin=Span(file, line, col),
    )


def parse_rules(text: str, path: str) -> tuple[list[SafetyRule], list[Finding]]:
    """Read one rule file's text.

    Args:
        text: the file's text.
        path: the file as shown in findings.

    Returns:
        The well-formed rules in file order, and a ``bad-safety-rule``
        finding (with position) for every malformed one.
    """

    def bad(message: str, at: KeyPath, *, key: bool = False) -> Finding:
        line, col = parsed.key_position(at) if key else parsed.position(at)
        return Finding(BAD_RULE, Severity.ERROR, message, Span(path, line, col))

    try:
        parsed = parse_yaml(text)
    except YamlProblem as p:
        return [], [Finding(BAD_RULE, Severity.ERROR, p.message, Span(path, p.line, p.col))]
    data = parsed.data
    if not isinstance(data, dict) or set(data) != {"rules"} or not isinstance(data["rules"], list):
        return [], [
            bad("a safety-rules file is a mapping with one key, 'rules', holding a list", ())
        ]
    rules: list[SafetyRule] = []
    findings: list[Finding] = []
    seen: dict[str, SafetyRule] = {}
    for i, raw in enumerate(data["rules"]):
        try:
            r = _rule(raw, ("rules", i), parsed, path)
        except _Bad as b:
            findings.append(bad(b.message, b.path, key=b.at_key))
            continue
        if r.id in seen:
            findings.append(
                bad(
                    f"rule id {r.id!r} is defined twice in this file (first at line"
                    f" {seen[r.id].origin.line})",
                    ("rules", i, "id"),
                )
            )
            continue
        seen[r.id] = r
        rules.append(r)
    return rules, findings


@functools.cache
def builtin_rules() -> RuleSet:
    """The rules shipped with sitegen."""
    text = resources.files("sitegen").joinpath("data/safety-rules.yaml").read_text(encoding="utf-8")
    rules, findings = parse_rules(text, BUILTIN_PATH)
    return RuleSet(tuple(rules), tuple(findings))


@functools.lru_cache(maxsize=8)
def load_rules(lab: Source | None = None) -> RuleSet:
    """The built-in rules merged with a lab's own rule file.

    A lab rule with a built-in id replaces it in place; new ids follow the
    built-in rules in the lab file's order.
    """
    base = builtin_rules()
    if lab is None:
        return base
    lab_rules, findings = parse_rules(lab.text, lab.path)
    by_id = {r.id: r for r in lab_rules}
    merged = [by_id.pop(r.id, r) for r in base.rules]
    merged.extend(r for r in lab_rules if r.id in by_id)
    return RuleSet(tuple(merged), (*base.findings, *findings))


# --- evaluating -----------------------------------------------------------


def _where(rule: SafetyRule, witnesses: Witnesses) -> KeyPath:
    if rule.point_at is not None:
        head = _POINT_AT[rule.point_at]
        for w in witnesses:
            if w and w[0] == head:
                return w
    return witnesses[0] if witnesses else ()


def _message(rule: SafetyRule, record: Any) -> str:
    if not rule.suggest_alternative:
        return rule.message
    alt = getattr(record, "alternative", None)
    if alt:
        return f"{rule.message} The record names an alternative: {alt}."
    return f"{rule.message} No alternative is named; record one in 'alternative' if there is one."


def evaluate(
    record: Any, reagents: Mapping[str, Any], rules: RuleSet | None = None
) -> list[Triggered]:
    """The rules that fire on one method record.

    Args:
        record: a :class:`~sitegen.model.MethodRecord`.
        reagents: reagent id -> :class:`~sitegen.model.Reagent` (ids the
            method lists but that have no record are skipped).
        rules: the rule set; the built-in rules by default.

    Returns:
        The triggered rules in rule order.
    """
    rules = rules or builtin_rules()
    out: list[Triggered] = []
    for rule in rules.rules:
        witnesses = rule.when.test(record, reagents)
        if witnesses is None:
            continue
        satisfied = (
            rule.satisfied_by is not None and rule.satisfied_by.test(record, reagents) is not None
        )
        out.append(
            Triggered(
                rule=rule,
                message=_message(rule, record),
                caution=rule.caution,
                severity=rule.severity,
                source=rule.source,
                where=_where(rule, witnesses),
                satisfied=satisfied,
            )
        )
    return out
