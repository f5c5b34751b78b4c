"""Named rule sets as data: which rules run and how strictly.

``strict`` is what CI runs (every rule; warnings fail); ``default`` runs
every rule with warnings reported but not failing; ``draft`` is for a
method owner still writing a record: document-control rules that only
matter at approval are left out.
"""

from __future__ import annotations

__all__ = ["PROFILES", "profile_rules"]

from .registry import RULES

PROFILES: dict[str, dict[str, object]] = {
    "default": {"strict": False, "exclude": ()},
    "strict": {"strict": True, "exclude": ()},
    "draft": {
        "strict": False,
        "exclude": ("review-overdue", "approval-missing", "missing-classification"),
    },
}


def profile_rules(name: str) -> tuple[list[str], bool]:
    """(enabled rule ids, strict) of a named profile.

    Raises:
        KeyError: unknown profile; the message lists the known ones.
    """
    if name not in PROFILES:
        raise KeyError(f"unknown profile {name!r}; known: {', '.join(PROFILES)}")
    p = PROFILES[name]
    exclude = set(p["exclude"])  # type: ignore[call-overload]
    return [r for r in RULES if r not in exclude], bool(p["strict"])
