"""Rules about hazard classifications and the data-driven safety rules.

The safety rules themselves are data (``sitegen/data/safety-rules.yaml``
plus the lab's ``SOURCE/safety-rules.yaml``); one registered checker rule,
``safety-rule``, runs them all, and each finding carries the id of the
data rule that fired (e.g. ``permanganate-chloride-medium``).
"""

from __future__ import annotations

__all__ = ["rule_set"]

import re
from collections.abc import Iterator
from typing import Any

from ...errors import Finding, Severity
from ...hazards import ghs
from ...hazards.rules_engine import RuleSet, evaluate, load_rules
from ...model import Status
from ..registry import Context, rule

_PICTOGRAM = re.compile(r"^GHS0[1-9]$")

# A pictogram that takes the place of another on a label, so the other
# is not "missing" (UN GHS Rev. 10, 1.4.10.5.3.1, from memory): the skull
# replaces the exclamation mark for acute toxicity, corrosion replaces it
# for skin and eye irritation, the health hazard replaces it for skin
# sensitisation and irritation when present for respiratory sensitisation.
_PRECEDENCE = {"GHS07": ("GHS06", "GHS05", "GHS08")}


def rule_set(ctx: Context) -> RuleSet:
    """The safety rules in force for the checked collection."""
    return load_rules(getattr(ctx.collection, "safety_rules_source", None))


def _reagent_records(ctx: Context) -> dict[str, Any]:
    return {rid: loaded.record for rid, loaded in ctx.collection.reagents.items()}


def _code_problem(code: str, kind: str) -> tuple[str, Severity] | None:
    """What is wrong with a code in the ``kind`` list ('H' or 'P'), if
    anything."""
    known, other = (ghs.known_h, ghs.known_p) if kind == "H" else (ghs.known_p, ghs.known_h)
    what = "GHS or EUH hazard statement" if kind == "H" else "GHS precautionary statement"
    if known(code):
        return None
    if other(code):
        other_what = "precautionary" if kind == "H" else "hazard"
        return f"{code!r} is a {other_what} statement, not a {what}: move it", Severity.ERROR
    parts = ghs.normalise(code).split("+")
    if len(parts) > 1 and all(known(p) for p in parts):
        # Suppliers sometimes print their own combinations; the parts are
        # right, so the label still says the right thing.
        return (
            f"{code!r} is not a standard combination; write it as its parts"
            f" ({', '.join(parts)}) or use a combination from the table",
            Severity.WARNING,
        )
    return f"{code!r} is not a {what} in the table", Severity.ERROR


@rule("unknown-hazard-code", scope="reagent")
def unknown_hazard_code(ctx: Context, loaded) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Every hazard statement (H or EUH code) and precautionary statement
    (P code) a reagent lists must be in the GHS table, and in the right
    list. A non-standard combination of known codes is a warning."""
    h = loaded.record.hazards
    if h is None:
        return
    for key, kind, codes in (
        ("hazard_statements", "H", h.hazard_statements),
        ("precautionary_statements", "P", h.precautionary_statements),
    ):
        for i, code in enumerate(codes):
            problem = _code_problem(code, kind)
            if problem is not None:
                msg, sev = problem
                yield ctx.finding("unknown-hazard-code", loaded, ("hazards", key, i), msg, sev)


@rule("withdrawn-hazard-code", scope="reagent")
def withdrawn_hazard_code(ctx: Context, loaded) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """A precautionary statement withdrawn in a later GHS revision (as
    printed on older safety data sheets) should be replaced by its current
    wording from an up-to-date safety data sheet (a warning)."""
    h = loaded.record.hazards
    if h is None:
        return
    for i, code in enumerate(h.precautionary_statements):
        if ghs.is_withdrawn(code):
            yield ctx.finding(
                "withdrawn-hazard-code",
                loaded,
                ("hazards", "precautionary_statements", i),
                f"{code!r} was withdrawn in a later GHS revision; take the current statement"
                " from an up-to-date safety data sheet",
                Severity.WARNING,
            )


@rule("unknown-pictogram", scope="reagent")
def unknown_pictogram(ctx: Context, loaded) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Pictograms are written GHS01 to GHS09."""
    h = loaded.record.hazards
    if h is None:
        return
    for i, code in enumerate(h.pictograms):
        if not _PICTOGRAM.match(ghs.normalise(code)):
            yield ctx.finding(
                "unknown-pictogram",
                loaded,
                ("hazards", "pictograms", i),
                f"{code!r} is not a GHS pictogram; use GHS01 (exploding bomb) to GHS09"
                " (environment)",
            )


@rule("signal-word-mismatch", scope="reagent")
def signal_word_mismatch(ctx: Context, loaded) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """The signal word must agree with the hazard statements: a statement
    that always carries Danger needs Danger, and Warning or Danger needs a
    statement that carries it. 'none' is only right when no statement
    carries a signal word."""
    h = loaded.record.hazards
    if h is None:
        return
    codes = [ghs.normalise(c) for c in h.hazard_statements if ghs.known_h(c)]
    if not codes:
        if h.signal_word != "none":
            yield ctx.finding(
                "signal-word-mismatch",
                loaded,
                ("hazards", "signal_word"),
                f"signal word {h.signal_word!r} without any hazard statement; list the"
                " statements from the safety data sheet",
            )
        return
    rank = ghs.SIGNAL_RANK
    declared = rank[h.signal_word]
    need = max(codes, key=lambda c: rank[ghs.signal_for_h(c)])
    if rank[ghs.signal_for_h(need)] > declared:
        yield ctx.finding(
            "signal-word-mismatch",
            loaded,
            ("hazards", "signal_word"),
            f"signal word {h.signal_word!r}, but {need} ({ghs.statement(need)}) always carries"
            f" {ghs.signal_for_h(need)!r}",
        )
        return
    strongest = max(rank[ghs.signal_options(c)[0]] for c in codes)
    if declared > strongest:
        allowed = next(w for w, r in rank.items() if r == strongest)
        yield ctx.finding(
            "signal-word-mismatch",
            loaded,
            ("hazards", "signal_word"),
            f"signal word {h.signal_word!r}, but none of {', '.join(codes)} carries it"
            f" (at most {allowed!r})",
        )


@rule("pictogram-mismatch", scope="reagent")
def pictogram_mismatch(ctx: Context, loaded) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """A hazard statement whose every category carries a pictogram needs
    that pictogram in the list (a warning: the safety data sheet is the
    authority)."""
    h = loaded.record.hazards
    if h is None:
        return
    present = {ghs.normalise(p) for p in h.pictograms}
    missing: dict[str, list[str]] = {}
    for code in h.hazard_statements:
        if not ghs.known_h(code):
            continue
        entry = ghs.table().hazard[ghs.normalise(code)]
        # Only statements with a single, unconditional pictogram set; H221
        # category 2 for one carries none.
        if not entry.pictograms or len(entry.signals) > 1:
            continue
        for p in entry.pictograms:
            if p in present or any(q in present for q in _PRECEDENCE.get(p, ())):
                continue
            missing.setdefault(p, []).append(entry.code)
    for p, codes in sorted(missing.items()):
        yield ctx.finding(
            "pictogram-mismatch",
            loaded,
            ("hazards", "pictograms"),
            f"{', '.join(codes)} carries pictogram {p} ({ghs.pictogram_name(p)}), which is not"
            " listed",
            Severity.WARNING,
        )


@rule("missing-classification")
def missing_classification(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Every reagent an approved method uses must have a hazards block
    (its GHS classification), so the page can show the method's hazards."""
    rec = loaded.record
    if rec.status is not Status.APPROVED:
        return
    for i, use in enumerate(rec.reagents):
        r = ctx.collection.reagents.get(use.ref)
        if r is not None and r.record.hazards is None:
            yield ctx.finding(
                "missing-classification",
                loaded,
                ("reagents", i, "ref"),
                f"reagent {use.ref!r} has no hazards block; an approved method needs the GHS"
                f" classification of every reagent (add it to {r.source.path})",
            )


@rule("safety-rule")
def safety_rule(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Chemistry-aware safety rules from data (built in, plus the lab's
    safety-rules.yaml): each finding names the rule that fired, e.g.
    permanganate-chloride-medium. Rules of severity caution-only only add
    a caution to the page."""
    rules = rule_set(ctx)
    for t in evaluate(loaded.record, _reagent_records(ctx), rules):
        if not t.reports:
            continue
        sev = Severity.ERROR if t.severity == "error" else Severity.WARNING
        yield ctx.finding(t.rule.id, loaded, t.where, f"{t.message} (source: {t.source})", sev)


@rule("bad-safety-rule", scope="collection")
def bad_safety_rule(ctx: Context) -> Iterator[Finding]:
    """The lab's safety-rules.yaml must be well formed: each rule has an
    id, a severity, a condition in the rule language, a message, a page
    caution and a source."""
    yield from rule_set(ctx).findings
