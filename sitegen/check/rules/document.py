"""Rules about document control: approval, review, revision history and
the supersedes chain."""

from __future__ import annotations

__all__: list[str] = []

from collections.abc import Iterator
from typing import Any

from ...errors import Finding, Severity
from ...model import Status
from ..registry import Context, rule


@rule("approval-missing")
def approval_missing(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """An approved method needs an approval block: who approved it, when,
    and when it is due for review."""
    rec = loaded.record
    if rec.status is Status.APPROVED and rec.approval is None:
        yield ctx.finding(
            "approval-missing",
            loaded,
            ("status",),
            "status is 'approved' but there is no approval block (approved_by, approved_on,"
            " review_due)",
        )


@rule("draft-has-approval")
def draft_has_approval(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """A draft should not carry an approval: approval belongs to an
    approved revision, and a page would show the draft as approved."""
    rec = loaded.record
    if rec.status is Status.DRAFT and rec.approval is not None:
        yield ctx.finding(
            "draft-has-approval",
            loaded,
            ("approval",),
            "a draft carries an approval block; remove it, or set status to 'approved'",
            Severity.WARNING,
        )


@rule("review-overdue")
def review_overdue(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """An approved method whose review date has passed should be reviewed
    (a warning; an error under --strict)."""
    rec = loaded.record
    if rec.status is not Status.APPROVED or rec.approval is None:
        return
    due = rec.approval.review_due
    today = ctx.settings.today
    if due < today:
        days = (today - due).days
        yield ctx.finding(
            "review-overdue",
            loaded,
            ("approval", "review_due"),
            f"review was due on {due.isoformat()}, {days} day{'s' if days != 1 else ''} before"
            f" {today.isoformat()}",
            Severity.WARNING,
        )


@rule("approval-dates")
def approval_dates(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """The approval date must not be in the future, and the review date
    must come after it."""
    a = loaded.record.approval
    if a is None:
        return
    today = ctx.settings.today
    if a.approved_on > today:
        yield ctx.finding(
            "approval-dates",
            loaded,
            ("approval", "approved_on"),
            f"approved_on {a.approved_on.isoformat()} is in the future (today is"
            f" {today.isoformat()})",
        )
    if a.review_due < a.approved_on:
        yield ctx.finding(
            "approval-dates",
            loaded,
            ("approval", "review_due"),
            f"review_due {a.review_due.isoformat()} is before approved_on"
            f" {a.approved_on.isoformat()}",
        )


@rule("retired-needs-successor")
def retired_needs_successor(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """A retired method should name its successor, so readers of the old
    page are sent to the method in use (a warning: some methods are
    retired without replacement)."""
    rec = loaded.record
    if rec.status is Status.RETIRED and rec.successor is None:
        yield ctx.finding(
            "retired-needs-successor",
            loaded,
            ("status",),
            "a retired method should name its successor (or say in 'alternative' why there"
            " is none)",
            Severity.WARNING,
        )


@rule("history-revision")
def history_revision(ctx: Context, loaded, analysis) -> Iterator[Finding]:  # type: ignore[no-untyped-def]
    """Revision history entries go up one revision at a time in date
    order, and the last one is the record's current revision."""
    rec = loaded.record
    hist = rec.history
    if not hist:
        return
    for i in range(1, len(hist)):
        prev, cur = hist[i - 1], hist[i]
        if cur.revision <= prev.revision:
            yield ctx.finding(
                "history-revision",
                loaded,
                ("history", i, "revision"),
                f"history revision {cur.revision} follows revision {prev.revision}; revisions"
                " must increase",
            )
        elif cur.date < prev.date:
            yield ctx.finding(
                "history-revision",
                loaded,
                ("history", i, "date"),
                f"revision {cur.revision} is dated {cur.date.isoformat()}, before revision"
                f" {prev.revision} ({prev.date.isoformat()})",
            )
    last = hist[-1]
    if last.revision != rec.revision:
        yield ctx.finding(
            "history-revision",
            loaded,
            ("history", len(hist) - 1, "revision"),
            f"the last history entry is revision {last.revision}, but the record is revision"
            f" {rec.revision}",
        )


def _edges(methods: dict[str, Any]) -> dict[str, list[tuple[str, tuple[str | int, ...]]]]:
    """newer id -> [(older id, key path in the newer record that says so)];
    ``successor`` links count too, from the successor's side."""
    out: dict[str, list[tuple[str, tuple[str | int, ...]]]] = {m: [] for m in methods}
    for mid in sorted(methods):
        rec = methods[mid].record
        for i, old in enumerate(rec.supersedes):
            if old in methods:
                out[mid].append((old, ("supersedes", i)))
    for mid in sorted(methods):
        succ = methods[mid].record.successor
        if succ in methods and all(o != mid for o, _ in out[succ]):
            out[succ].append((mid, ("successor@" + mid,)))
    return out


def _components(graph: dict[str, list[tuple[str, Any]]]) -> list[list[str]]:
    """Strongly connected components (Tarjan), iteratively so a long chain
    cannot exhaust the recursion limit."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    on_stack: set[str] = set()
    stack: list[str] = []
    comps: list[list[str]] = []
    counter = 0
    for root in sorted(graph):
        if root in index:
            continue
        work = [(root, 0)]
        while work:
            node, i = work.pop()
            if i == 0:
                index[node] = low[node] = counter
                counter += 1
                stack.append(node)
                on_stack.add(node)
            succs = graph[node]
            if i < len(succs):
                work.append((node, i + 1))
                nxt = succs[i][0]
                if nxt not in index:
                    work.append((nxt, 0))
                elif nxt in on_stack:
                    low[node] = min(low[node], index[nxt])
                continue
            if low[node] == index[node]:
                comp = []
                while True:
                    w = stack.pop()
                    on_stack.discard(w)
                    comp.append(w)
                    if w == node:
                        break
                comps.append(sorted(comp))
            if work:
                parent = work[-1][0]
                low[parent] = min(low[parent], low[node])
    return comps


def _cycle_from(
    start: str, members: set[str], graph: dict[str, list[tuple[str, Any]]]
) -> list[str]:
    """One cycle through ``start`` inside its component (breadth-first, so
    the shortest one, with ties broken by id)."""
    prev: dict[str, str] = {}
    queue = [start]
    while queue:
        node = queue.pop(0)
        for nxt, _ in sorted(graph[node]):
            if nxt not in members:
                continue
            if nxt == start:
                path = [node]
                while path[-1] != start:
                    path.append(prev[path[-1]])
                return [*reversed(path), start]
            if nxt not in prev:
                prev[nxt] = node
                queue.append(nxt)
    return [start, start]


@rule("supersedes-cycle", scope="collection")
def supersedes_cycle(ctx: Context) -> Iterator[Finding]:
    """Supersedes and successor links must not form a cycle (a method
    cannot, through a chain, supersede itself). Each cycle is reported
    once, at the method with the smallest id."""
    methods = ctx.collection.methods
    graph = _edges(methods)
    for comp in _components(graph):
        start = comp[0]
        if len(comp) == 1 and all(o != start for o, _ in graph[start]):
            continue
        cycle = _cycle_from(start, set(comp), graph)
        nxt = cycle[1]
        path = next(p for o, p in sorted(graph[start]) if o == nxt)
        loaded = methods[start]
        if isinstance(path[0], str) and path[0].startswith("successor@"):
            loaded, path = methods[path[0].split("@", 1)[1]], ("successor",)
        yield ctx.finding(
            "supersedes-cycle",
            loaded,
            path,
            "supersedes links form a cycle: "
            + " -> ".join(cycle)
            + " (read 'a -> b' as 'a supersedes b')",
        )
