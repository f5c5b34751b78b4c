"""The hazard summary of one method: what its page shows under "Safety".

:func:`method_hazards` joins the GHS classifications of the reagents a
method uses with the method's own cautions and those of the safety rules
that fire on it. It is pure: records in, a frozen value out.
"""

from __future__ import annotations

__all__ = ["HazardSummary", "ReagentHazards", "method_hazards"]

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Any

from . import ghs
from .rules_engine import RuleSet, Triggered, evaluate

#: Text shown for a code the table does not know (the checker reports it
#: as ``unknown-hazard-code``; the page must still render).
UNKNOWN_TEXT = "(not in the GHS statement table; see the safety data sheet)"


@dataclass(frozen=True)
class ReagentHazards:
    """One reagent's classification, as listed on the page.

    Attributes:
        id: reagent id.
        name: reagent name.
        signal_word: "Danger", "Warning", "none", or None when the reagent
            has no hazards block (not classified in the records).
        hazard_statements / precautionary: (code, text), canonical order.
        pictograms: (code, name), canonical order.
        ppe: protective equipment named by the reagent record.
        storage / waste: the record's texts, if any.
        incompatibilities: what it must be kept from.
        source: where the classification comes from.
    """

    id: str
    name: str
    signal_word: str | None
    hazard_statements: tuple[tuple[str, str], ...] = ()
    precautionary: tuple[tuple[str, str], ...] = ()
    pictograms: tuple[tuple[str, str], ...] = ()
    ppe: tuple[str, ...] = ()
    storage: str | None = None
    waste: str | None = None
    incompatibilities: tuple[str, ...] = ()
    source: str | None = None


@dataclass(frozen=True)
class HazardSummary:
    """Everything a method page shows about hazards.

    Attributes:
        signal_word: the strongest of the reagents' signal words
            (Danger > Warning > none).
        hazard_statements: union of the reagents' H/EUH statements as
            (code, text), H before EUH, by number.
        precautionary: union of the P statements as (code, text).
        pictograms: union as (code, name), GHS01..GHS09 order.
        ppe: union of the reagents' protective equipment, first-seen order
            made stable by sorting case-insensitively.
        cautions: the method's own safety list, then the caution of every
            safety rule that fired, without repeats.
        per_reagent: each reagent's classification, in the method's order.
        triggered: the safety rules that fired (with their sources).
        unclassified: ids of listed reagents without a hazards block.
    """

    signal_word: str
    hazard_statements: tuple[tuple[str, str], ...]
    precautionary: tuple[tuple[str, str], ...]
    pictograms: tuple[tuple[str, str], ...]
    ppe: tuple[str, ...]
    cautions: tuple[str, ...]
    per_reagent: tuple[ReagentHazards, ...]
    triggered: tuple[Triggered, ...] = ()
    unclassified: tuple[str, ...] = ()


def _text(code: str) -> str:
    try:
        return ghs.statement(code)
    except KeyError:
        # a non-standard combination of known parts still reads correctly
        return ghs.combined_text(code) or UNKNOWN_TEXT


def _pictogram(code: str) -> str:
    try:
        return ghs.pictogram_name(code)
    except KeyError:
        return "unknown pictogram"


def _codes(codes: Iterable[str]) -> tuple[tuple[str, str], ...]:
    unique = {ghs.normalise(c) for c in codes}
    return tuple((c, _text(c)) for c in sorted(unique, key=ghs.code_sort_key))


def _pictograms(codes: Iterable[str]) -> tuple[tuple[str, str], ...]:
    unique = {ghs.normalise(c) for c in codes}
    return tuple((c, _pictogram(c)) for c in sorted(unique))


def _unique(items: Iterable[str]) -> tuple[str, ...]:
    seen: dict[str, str] = {}
    for item in items:
        key = " ".join(item.split()).casefold()
        seen.setdefault(key, " ".join(item.split()))
    return tuple(seen.values())


def _reagent(reagent: Any) -> ReagentHazards:
    h = reagent.hazards
    if h is None:
        return ReagentHazards(id=reagent.id, name=reagent.name, signal_word=None)
    return ReagentHazards(
        id=reagent.id,
        name=reagent.name,
        signal_word=h.signal_word,
        hazard_statements=_codes(h.hazard_statements),
        precautionary=_codes(h.precautionary_statements),
        pictograms=_pictograms(h.pictograms),
        ppe=tuple(h.ppe),
        storage=h.storage,
        waste=h.waste,
        incompatibilities=tuple(h.incompatibilities),
        source=h.source,
    )


def method_hazards(
    record: Any, reagents: Mapping[str, Any], *, rules: RuleSet | None = None
) -> HazardSummary:
    """The hazard summary of one method.

    Args:
        record: a :class:`~sitegen.model.MethodRecord`.
        reagents: reagent id -> :class:`~sitegen.model.Reagent`; ids the
            method lists without a record are left out (the checker
            reports them as ``missing-reagent``).
        rules: safety rules to apply (built-in rules by default; pass
            :func:`~sitegen.hazards.rules_engine.load_rules` of the lab's
            file to include its rules).

    Returns:
        The summary; its signal word is the strongest of the reagents'.
    """
    used: list[Any] = []
    for use in record.reagents:
        r = reagents.get(use.ref)
        if r is not None and all(u.id != r.id for u in used):
            used.append(r)
    per = tuple(_reagent(r) for r in used)
    classified = [r.hazards for r in used if r.hazards is not None]
    signal = max(
        (h.signal_word for h in classified), key=ghs.SIGNAL_RANK.__getitem__, default="none"
    )
    triggered = tuple(evaluate(record, reagents, rules))
    return HazardSummary(
        signal_word=signal,
        hazard_statements=_codes(c for h in classified for c in h.hazard_statements),
        precautionary=_codes(c for h in classified for c in h.precautionary_statements),
        pictograms=_pictograms(c for h in classified for c in h.pictograms),
        ppe=tuple(sorted(_unique(p for h in classified for p in h.ppe), key=str.casefold)),
        cautions=_unique([*record.safety, *(t.caution for t in triggered)]),
        per_reagent=per,
        triggered=triggered,
        unclassified=tuple(r.id for r in used if r.hazards is None),
    )
