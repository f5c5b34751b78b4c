"""Rules about references between records."""

from __future__ import annotations

__all__: list[str] = []

from collections.abc import Iterator

from ...errors import Finding
from ..registry import Context, rule


@rule("missing-reagent")
def missing_reagent(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Every reagent a method lists, and its titrant and excess reagent,
    must have a reagent record under reagents/."""
    rec = loaded.record
    reagents = ctx.collection.reagents
    # a reagent file that exists but failed to load has its own findings
    broken = ctx.collection.unloadable.get("reagents", set())
    for i, use in enumerate(rec.reagents):
        if use.ref not in reagents and use.ref not in broken:
            yield ctx.finding(
                "missing-reagent",
                loaded,
                ("reagents", i, "ref"),
                f"reagent {use.ref!r} has no record (expected reagents/{use.ref}.yaml)",
            )
    for key in ("titrant", "excess_reagent"):
        ref = getattr(rec.titration, key)
        if ref is not None and ref not in reagents and ref not in broken:
            yield ctx.finding(
                "missing-reagent",
                loaded,
                ("titration", key),
                f"{key.replace('_', ' ')} {ref!r} has no reagent record",
            )
    listed = {u.ref for u in rec.reagents}
    if rec.titration.titrant not in listed:
        yield ctx.finding(
            "missing-reagent",
            loaded,
            ("titration", "titrant"),
            f"titrant {rec.titration.titrant!r} is not among the method's reagents",
        )


@rule("missing-indicator")
def missing_indicator(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """A method's indicator must have an indicator record under indicators/."""
    ref = loaded.record.titration.indicator
    broken = ctx.collection.unloadable.get("indicators", set())
    if ref is not None and ref not in ctx.collection.indicators and ref not in broken:
        yield ctx.finding(
            "missing-indicator",
            loaded,
            ("titration", "indicator"),
            f"indicator {ref!r} has no record (expected indicators/{ref}.yaml)",
        )


@rule("missing-successor")
def missing_link(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """``successor`` and ``supersedes`` must name existing method records."""
    rec = loaded.record
    methods = ctx.collection.methods
    if rec.successor is not None and rec.successor not in methods:
        yield ctx.finding(
            "missing-successor",
            loaded,
            ("successor",),
            f"successor {rec.successor!r} does not exist",
        )
    for i, old in enumerate(rec.supersedes):
        if old not in methods:
            yield ctx.finding(
                "missing-successor",
                loaded,
                ("supersedes", i),
                f"superseded method {old!r} does not exist",
            )
