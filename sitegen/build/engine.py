"""The build engine: the stages of :mod:`sitegen.build.run`, cached by
content and spread over worker processes.

What is computed, and when:

1. *Whole-build key.* The digest of every file under the source folder,
   the theme, the code, the settings and the build date. When the cache
   holds a finished build under that key and the output folder still
   holds exactly that build (its manifest), nothing else happens: no
   record is parsed and no plotting or YAML library is imported.
2. *Load.* Each record file is validated once per content: ``(digest ->
   Loaded)`` entries skip YAML and pydantic for unchanged files.
3. *Analyse* (worker pool). Keyed by the method record's text and the
   texts of every reagent and indicator record it names, directly or
   through those records.
4. *Check.* Every rule, every time, over the whole collection: rules with
   collection scope look across records, and the rules are cheap next to
   the chemistry.
5. *Render* (worker pool). A method's own files are keyed by its analysis
   key, its findings, the records it names (other methods included: a
   successor, a standardisation), the theme, site.yaml, the glossary and
   the render options. Shared pages (home, reagents, quality...) are
   rendered every time.
6. *Links.* Every page's ids and links are extracted once per content;
   the check itself runs over those summaries.
7. *Write.* Only when the file set differs from the output's manifest;
   unchanged files are hard-linked from the previous output into the
   staged folder (:func:`sitegen.build.write.write_site`).

Output never depends on ``jobs``: every stage's results are gathered by
method id, in sorted order.
"""

from __future__ import annotations

__all__ = ["MANIFEST", "build"]

import contextlib
import dataclasses
import hashlib
import json
import math
import os
import re
import sys
import time
from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, TextIO

from ..check.registry import Settings
from ..errors import Finding, Severity, Span
from .cache import (
    FORMAT,
    Cache,
    code_digest,
    default_cache_dir,
    digest_bytes,
    dumps,
    key_of,
    loads,
    tree_digest,
)
from .run import BuildReport, CheckResult, default_theme
from .write import check_output_dir

if TYPE_CHECKING:
    # (the render package imports jinja2 and markdown-it: not on the no-change path)
    from ..render.links import PageLinks

#: The output folder's manifest: every file's sha256 and size, and the
#: digest of the whole set. A build whose file set has the same digest
#: does not rewrite the folder.
MANIFEST = ".sitegen-manifest.json"

#: Strings in a record that may name another record (the id grammar of
#: the record format).
_ID_LIKE = re.compile(r"[a-z0-9][a-z0-9-]*\Z")

#: Below this many methods to compute, a worker pool costs more than it
#: saves (each worker imports numpy, jinja2 and matplotlib again).
_POOL_MIN = 4


# ----------------------------------------------------------------------------
# Progress


class _Progress:
    """One updating status line on a terminal; silent otherwise (logs and
    pipes get only the final summary, which the CLI prints)."""

    def __init__(self, stream: TextIO | None) -> None:
        self.stream = stream if stream is not None and _isatty(stream) else None
        self._last = 0.0
        self._shown = False

    def update(self, stage: str, done: int, total: int) -> None:
        if self.stream is None:
            return
        now = time.monotonic()
        if done < total and now - self._last < 0.1:
            return
        self._last = now
        self.stream.write(f"\r\x1b[K{stage}: {done}/{total}")
        self.stream.flush()
        self._shown = True

    def done(self) -> None:
        if self.stream is not None and self._shown:
            self.stream.write("\r\x1b[K")
            self.stream.flush()
            self._shown = False


def _isatty(stream: TextIO) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError):
        return False


# ----------------------------------------------------------------------------
# Snapshot of a finished build (the no-change path)


@dataclass
class SourcesOnly:
    """What a report of a cached build carries instead of a loaded
    collection: the sources that findings point into (for the caret
    printer), without the record types."""

    root: Path
    sources: dict[str, Any] = field(default_factory=dict)
    methods: dict[str, Any] = field(default_factory=dict)


@dataclass(frozen=True)
class _Snapshot:
    """The cached outcome of one whole build."""

    written: bool
    findings: tuple[Finding, ...]
    sources: dict[str, Any]
    method_ids: tuple[str, ...]
    excluded: tuple[tuple[str, str], ...]
    manifest: dict[str, tuple[str, int]]
    digest: str


def _manifest_digest(manifest: Mapping[str, tuple[str, int]]) -> str:
    return key_of(sorted(manifest.items()))


def _read_manifest(out: Path) -> dict[str, Any] | None:
    try:
        data = json.loads((out / MANIFEST).read_text("utf-8"))
    except (OSError, ValueError):
        return None
    return data if isinstance(data, dict) else None


def _output_holds(out: Path, manifest: Mapping[str, tuple[str, int]], digest: str,
                  recorded: dict[str, Any] | None = None) -> bool:
    """Whether ``out`` holds the file set of ``manifest``: its recorded
    digest matches and every file is there with its size (a cheap guard
    against hand-deleted or truncated files). ``recorded``: the output's
    manifest, when already read."""
    if recorded is None:
        recorded = _read_manifest(out)
    if recorded is None or recorded.get("digest") != digest:
        return False
    root = os.fspath(out)
    for rel, (_sha, size) in manifest.items():
        try:
            if os.stat(os.path.join(root, rel)).st_size != size:
                return False
        except OSError:
            return False
    return True


def _manifest_bytes(manifest: Mapping[str, tuple[str, int]], digest: str) -> bytes:
    body = {
        "digest": digest,
        "files": {rel: [sha, size] for rel, (sha, size) in sorted(manifest.items())},
    }
    # one file per line: readable and diffable, and quick to write
    return (json.dumps(body, sort_keys=True, separators=(",", ":"))
            .replace('],"', '],\n"') + "\n").encode("utf-8")


def _size_is(root: Path, rel: str, size: Any) -> bool:
    """Whether ``root/rel`` exists with ``size`` bytes (a cheap guard against
    a file changed or truncated by hand since its manifest was written)."""
    try:
        return os.stat(os.path.join(root, rel)).st_size == size
    except OSError:
        return False


class _Reuse(Mapping[str, str]):
    """Path -> the current output's file holding exactly the new bytes
    (its manifest entry and size agree), looked up only for the files the
    write actually has to make."""

    def __init__(self, out: Path, old_files: Mapping[str, Any],
                 manifest: Mapping[str, tuple[str, int]]) -> None:
        self._root = os.fspath(out)
        self._old = old_files
        self._manifest = manifest

    def __getitem__(self, rel: str) -> str:
        entry = self._manifest.get(rel)
        if entry is None or self._old.get(rel) != [entry[0], entry[1]]:
            raise KeyError(rel)
        p = os.path.join(self._root, rel)
        try:
            if os.stat(p).st_size == entry[1]:
                return p
        except OSError:
            pass
        raise KeyError(rel)

    def __contains__(self, rel: object) -> bool:
        try:
            self[rel]  # type: ignore[index]
        except KeyError:
            return False
        return True

    def __iter__(self) -> Iterator[str]:
        return (rel for rel in self._manifest if rel in self)

    def __len__(self) -> int:
        return sum(1 for _ in self)


# ----------------------------------------------------------------------------
# Dependencies between records


def _strings(data: Any) -> Iterator[str]:
    """Every string value of a parsed YAML document."""
    stack = [data]
    while stack:
        x = stack.pop()
        if isinstance(x, str):
            yield x
        elif isinstance(x, dict):
            stack.extend(x.values())
        elif isinstance(x, list | tuple):
            stack.extend(x)


def _named(loaded: Any) -> set[str]:
    if isinstance(loaded, _LazyLoaded):
        return set(loaded.card.named)
    data = getattr(getattr(loaded, "parsed", None), "data", None)
    return {s.strip() for s in _strings(data) if _ID_LIKE.match(s.strip())}


#: Top-level fields of a method record that only its own files show (the
#: shared pages and the collection-wide rules never read them): an edit
#: there leaves a method's "facts" digest unchanged.
_OWN_ONLY = frozenset({"procedure"})


@dataclass(frozen=True)
class _Card:
    """What a build needs of a method record whose text it has seen
    before, kept so that the record is not read back from the cache: the
    id it declares, the strings in it that may name other records, the
    loader's findings and a digest of every field but :data:`_OWN_ONLY`."""

    rid: str
    named: frozenset[str]
    findings: tuple[Finding, ...]
    facts: str


def _card_of(loaded: Any, findings: Sequence[Finding]) -> _Card:
    data = loaded.parsed.data
    kept = {k: v for k, v in data.items() if k not in _OWN_ONLY} if isinstance(data, dict) else data
    return _Card(
        rid=loaded.record.id,
        named=frozenset(_named(loaded)),
        findings=tuple(findings),
        facts=key_of(json.dumps(kept, sort_keys=True, default=repr)),
    )


class _LazyLoaded:
    """A method record as the collection holds it when its text is
    unchanged: the source and the card at once, the validated record (read
    back from the cache, or validated again if the cache lost it) only when
    something asks for it."""

    __slots__ = ("_cache", "_full", "_key", "card", "source")

    def __init__(self, cache: Cache, key: str, source: Any, card: _Card) -> None:
        self._cache = cache
        self._key = key
        self.source = source
        self.card = card
        self._full: Any = None

    @property
    def record_id(self) -> str:
        return self.card.rid

    def full(self) -> Any:
        if self._full is None:
            hit = _loaded_hit(self._cache, self._key, self.source)
            if hit is None:
                from ..load.records import load_text
                from ..model import MethodRecord

                hit = load_text(MethodRecord, self.source)
                self._cache.put("loaded", self._key, hit)
            if hit[0] is None:  # pragma: no cover - the card says it loaded
                raise RuntimeError(f"{self.source.path} no longer loads")
            self._full = hit[0]
        return self._full

    def __getattr__(self, name: str) -> Any:
        # record, parsed, span(): everything else is the real Loaded's
        return getattr(self.full(), name)

    def __reduce__(self) -> Any:
        return (_same, (self.full(),))


def _same(x: Any) -> Any:
    return x


class _Analyses(Mapping[str, Any]):
    """Method id -> analysis, read back from the cache only when asked for
    (the check and render stages need few of them when little changed).
    Iterates in id order; ``pop`` forgets a method."""

    def __init__(self, cache: Cache, recompute: Any) -> None:
        self._cache = cache
        self._recompute = recompute
        self._keys: dict[str, str] = {}
        self._values: dict[str, Any] = {}

    def add_cached(self, mid: str, key: str) -> None:
        self._keys[mid] = key

    def add(self, mid: str, value: Any) -> None:
        self._keys[mid] = ""
        self._values[mid] = value

    def pop(self, mid: str, default: Any = None) -> Any:
        if mid not in self._keys:
            return default
        value = self[mid]
        del self._keys[mid]
        self._values.pop(mid, None)
        return value

    def __getitem__(self, mid: str) -> Any:
        if mid in self._values:
            return self._values[mid]
        key = self._keys[mid]
        value = self._cache.get("analysis", key)
        if value is None:
            # the entry was there when the stage looked but cannot be read
            # back now (damaged or removed): compute (and store) it again
            value = self._recompute(mid, key)
        self._values[mid] = value
        return value

    def __iter__(self) -> Iterator[str]:
        return iter(sorted(self._keys))

    def __len__(self) -> int:
        return len(self._keys)

    def __contains__(self, mid: object) -> bool:
        return mid in self._keys


class _Deps:
    """Which records a method names, directly or through the reagent and
    indicator records it names.

    A string that looks like an id is recorded with what it names now
    (nothing, a reagent, an indicator, a method), so adding or removing a
    record under that id changes the key as well as editing it.
    """

    def __init__(self, collection: Any, memo: dict[Any, Any] | None = None) -> None:
        self.col = collection
        self._named: dict[tuple[str, str], set[str]] = {}
        # a long-lived process keeps each method's answer by its text and
        # the id sets and shared records it was computed against
        self._memo = memo
        self._tables = ""
        #: memo keys this object looked up or added, and whether it added any
        self._used: set[Any] = set()
        self.added = False
        if memo is not None:
            self._tables = key_of(
                sorted(collection.methods),
                sorted((k, lo.source.path, lo.source.digest)
                       for k, lo in collection.reagents.items()),
                sorted((k, lo.source.path, lo.source.digest)
                       for k, lo in collection.indicators.items()),
            )
            if memo.get("tables") != self._tables:
                # answers against other tables are never asked for again
                memo.clear()
                memo["tables"] = self._tables

    def of(self, mid: str) -> tuple[set[str], set[str], str, str]:
        """One method's :meth:`closure` (names reached, methods among
        them), a digest of its :meth:`record_parts` and a digest of which
        of the names are method ids now."""
        src = self.col.methods[mid].source
        k = ("deps", mid, src.path, src.digest, self._tables)
        if self._memo is not None and k in self._memo:
            self._used.add(k)
            return self._memo[k]  # type: ignore[no-any-return]
        names, methods = self.closure(mid)
        value = (names, methods, key_of(self.record_parts(names)),
                 key_of([(n, n in self.col.methods) for n in sorted(names)]))
        if self._memo is not None:
            self._memo[k] = value
            self._used.add(k)
            self.added = True
        return value

    def used_memo(self) -> dict[Any, Any]:
        """The memo cut down to the answers this object gave."""
        memo = self._memo or {}
        return {"tables": self._tables, **{k: memo[k] for k in self._used}}

    def _names_of(self, kind: str, rid: str, loaded: Any) -> set[str]:
        k = (kind, rid)
        if k not in self._named:
            self._named[k] = _named(loaded)
        return self._named[k]

    def closure(self, mid: str) -> tuple[set[str], set[str]]:
        """(every id-like string reached, method ids among them)."""
        col = self.col
        seen: set[str] = set()
        todo = sorted(self._names_of("method", mid, col.methods[mid]))
        while todo:
            s = todo.pop()
            if s in seen:
                continue
            seen.add(s)
            for kind, table in (("reagent", col.reagents), ("indicator", col.indicators)):
                if s in table:
                    todo.extend(self._names_of(kind, s, table[s]) - seen)
        seen.discard(mid)
        return seen, {s for s in seen if s in col.methods}

    def record_parts(self, names: Iterable[str]) -> list[tuple[str, str, str]]:
        """(id, kind, digest-or-'absent') for reagents and indicators."""
        col = self.col
        parts = []
        for s in sorted(names):
            for kind, table in (("reagent", col.reagents), ("indicator", col.indicators)):
                lo = table.get(s)
                parts.append((s, kind, lo.source.path + ":" + lo.source.digest if lo else "absent"))
        return parts


# ----------------------------------------------------------------------------
# Worker side. A worker process holds the collection it was forked with
# (ProcessPoolExecutor's initializer); each task names methods by id, so
# only ids, analyses and file digests cross the process boundary.


@dataclass(frozen=True)
class _WorkerState:
    collection: Any
    cache_root: Path
    #: the safety rule set (built-in plus the lab's own), compiled once
    safety_rules: Any = None
    #: the generator's code digest (part of every cache key)
    code: str = ""


_STATE: list[_WorkerState] = []  # one entry inside a worker process


def _init_worker(state: _WorkerState) -> None:
    import gc

    gc.enable()  # forked from a main process that runs without it
    _STATE[:] = [state]


def _analyse_many(state: _WorkerState, items: Sequence[tuple[str, str]]) -> list[tuple[str, Any]]:
    from ..analyse import analyse_method

    col = state.collection
    cache = Cache(state.cache_root)
    out = []
    for mid, key in items:
        analysis = analyse_method(
            col.methods[mid],
            col.reagents,
            col.indicators,
            reference=col.site.record.reference_electrode if col.site else None,
            safety_rules=state.safety_rules,
        )
        cache.put("analysis", key, analysis)
        out.append((mid, analysis))
    return out


@dataclass(frozen=True)
class _Rendered:
    """A method's rendered files as the cache keeps them: path -> (sha256,
    size), and the link summary of each HTML page."""

    files: dict[str, tuple[str, int]]
    links: dict[str, PageLinks]
    #: the method's search-index document (None: not indexed), kept so that
    #: the index is assembled without reading unchanged records
    search_doc: dict[str, Any] | None = None
    #: per HTML page, digests of its ids and of its links (what the link
    #: check compares with the last good check)
    link_keys: dict[str, tuple[str, str]] = field(default_factory=dict)


def _render_many(
    state: _WorkerState, items: Sequence[tuple[str, str, Any, list[Finding]]], options: Any
) -> list[tuple[str, _Rendered]]:
    col = state.collection
    cache = Cache(state.cache_root)
    return [
        (mid, _render_entry(cache, state.code, col, mid, key, analysis, own, options))
        for mid, key, analysis, own in items
    ]


class _Drawings:
    """The curve drawings of earlier builds, by drawing key (see
    :func:`sitegen.render.plots.curve_svg`): a record whose text changed
    but whose curve did not is rendered without importing matplotlib."""

    def __init__(self, cache: Cache, code: str) -> None:
        self.cache = cache
        # the drawing key covers what is drawn; the code (how it is drawn)
        # and the plotting library's version are in the prefix
        self._prefix = key_of("drawing", code, _plot_library_version())

    def get(self, key: str) -> str | None:
        value = self.cache.get("drawing", key_of(self._prefix, key))
        return value if isinstance(value, str) else None

    def __setitem__(self, key: str, value: str) -> None:
        self.cache.put("drawing", key_of(self._prefix, key), value)


def _plot_library_version() -> str:
    return _library_version("matplotlib")


def _library_version(name: str) -> str:
    # read from the installed metadata: importing the library to ask would
    # cost what the entries it keys save
    from .installed import installed_version

    return installed_version(name) or "unknown"


def _render_entry(cache: Cache, code: str, collection: Any, mid: str, key: str,
                  analysis: Any, own: list[Finding], options: Any,
                  force: bool = False) -> _Rendered:
    """Render one method's files, store them in the cache (``force``:
    rewrite blobs already there) and keep their entry under ``key``."""
    from ..render.links import page_links
    from ..render.search import search_document
    from ..render.site import render_method_files

    # (a forced render, which repairs a damaged cache, draws afresh)
    files = render_method_files(mid, collection, analysis, own, options,
                                None if force else _Drawings(cache, code))
    meta: dict[str, tuple[str, int]] = {}
    links = {}
    for rel, data in sorted(files.items()):
        meta[rel] = (cache.put_blob(data, force=force), len(data))
        if rel.endswith(".html"):
            links[rel] = page_links(data)
    entry = _Rendered(meta, links, search_document(mid, collection.methods[mid], collection),
                      _link_keys(links))
    cache.put("render", key, entry)
    return entry


def _pool_call(func: Any, payload: bytes) -> bytes:
    # arguments and results travel as cache pickles: they may hold local
    # functions, which the standard pickler refuses (see cache.dumps)
    return dumps(func(_STATE[0], *loads(payload)))


# ----------------------------------------------------------------------------
# Running tasks in-process or in a pool


def _freeze_heap() -> None:
    """Move every object alive now out of the garbage collector's reach
    before forking workers: a worker's collections would otherwise walk
    (and, by touching them, copy) the whole inherited collection again and
    again, which made the per-method work grow with the collection's size
    (the gc module's documented remedy for forked workers)."""
    import gc

    gc.collect()
    gc.freeze()


class _Runner:
    """Runs per-method tasks: in this process for ``jobs == 1`` (or few
    tasks), else in a process pool created on first use and shared by the
    analyse and render stages."""

    def __init__(self, jobs: int, state: _WorkerState, progress: _Progress) -> None:
        self.jobs = max(1, jobs)
        self.state = state
        self.progress = progress
        self._pool: Any = None

    def _executor(self) -> Any:
        if self._pool is None:
            import multiprocessing as mp
            from concurrent.futures import ProcessPoolExecutor

            # fork hands the collection to the workers without pickling it;
            # elsewhere it is pickled once per worker
            methods = mp.get_all_start_methods()
            ctx = mp.get_context("fork" if "fork" in methods else None)
            _freeze_heap()
            self._pool = ProcessPoolExecutor(
                max_workers=self.jobs, mp_context=ctx, initializer=_init_worker,
                initargs=(self.state,),
            )
        return self._pool

    def map(self, stage: str, func: Any, items: list[Any], *extra: Any) -> dict[str, Any]:
        """``func(state, chunk, *extra)`` over chunks of ``items``; results
        (id, value) gathered into a dict sorted by id."""
        total = len(items)
        results: dict[str, Any] = {}
        if self.jobs == 1 or total < _POOL_MIN:
            step = max(1, min(16, total))
            with _collector(True):
                for i in range(0, total, step):
                    for mid, value in func(self.state, items[i : i + step], *extra):
                        results[mid] = value
                    self.progress.update(stage, len(results), total)
            return dict(sorted(results.items()))
        # Several chunks per worker balance the load; a chunk of a few
        # methods keeps the pickling of arguments and results small.
        size = max(1, min(32, math.ceil(total / (self.jobs * 4))))
        pool = self._executor()
        futures = [
            pool.submit(_pool_call, func, dumps((items[i : i + size], *extra)))
            for i in range(0, total, size)
        ]
        from concurrent.futures import as_completed

        for fut in as_completed(futures):
            for mid, value in loads(fut.result()):
                results[mid] = value
            self.progress.update(stage, len(results), total)
        return dict(sorted(results.items()))

    def close(self) -> None:
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None
            # a long-lived process (sitegen serve) builds again and again
            import gc

            gc.unfreeze()


# ----------------------------------------------------------------------------
# Load, with a per-file cache


def _load_many(items: Sequence[tuple[str, Any, str]], cache_root: Path) -> bytes:
    """Validate records in a worker: (folder, Source, key) -> results."""
    from ..load import collection as lc
    from ..load.records import load_text

    cache = Cache(cache_root)
    out = []
    for folder, src, key in items:
        value = load_text(lc.KINDS[folder], src)
        cache.put("loaded", key, value)
        out.append((key, value))
    return dumps(out)


def _load(root: Path, cwd: Path, cache: Cache, code: str, jobs: int) -> Any:
    """The collection, as :func:`sitegen.load.collection.load_collection`
    assembles it, with each record validated at most once per content (and
    the records not in the cache validated by ``jobs`` processes)."""
    from ..load import collection as lc
    from ..load.records import load_text

    def validate(model: Any, src: Any) -> Any:
        key = _loaded_key(code, model, src)
        hit = _loaded_hit(cache, key, src)
        if hit is None:
            hit = load_text(model, src)
            cache.put("loaded", key, hit)
        return hit

    col = lc.start_collection(root, cwd, validate)
    # read everything first, so that the records the cache lacks can be
    # validated in parallel; the collection is then assembled in order
    known = cache.files_known()
    items = lc.read_records(col, cwd, read=_reader(known) if known is not None else lc.read_source)
    results: dict[str, Any] = {}
    keys: list[str] = []
    misses: list[tuple[str, Any, str]] = []
    cardless: list[str] = []  # loaded keys of method records without a card
    for folder, _path, src in items:
        key = _loaded_key(code, lc.KINDS[folder], src)
        keys.append(key)
        if folder == "records":
            # (a card is kept under its record's loaded key)
            card = cache.get("card", key)
            if isinstance(card, _Card):
                results[key] = (_LazyLoaded(cache, key, src, card), list(card.findings))
                continue
            cardless.append(key)
        hit = _loaded_hit(cache, key, src)
        if hit is not None:
            results[key] = hit
        else:
            misses.append((folder, src, key))
    if len(misses) >= 4 * _POOL_MIN and jobs > 1:
        import multiprocessing as mp
        from concurrent.futures import ProcessPoolExecutor

        methods = mp.get_all_start_methods()
        ctx = mp.get_context("fork" if "fork" in methods else None)
        size = max(1, min(64, math.ceil(len(misses) / (jobs * 4))))
        with ProcessPoolExecutor(max_workers=jobs, mp_context=ctx,
                                 initializer=_enable_collector) as pool:
            futures = [
                pool.submit(_load_many, misses[i : i + size], cache.root)
                for i in range(0, len(misses), size)
            ]
            for fut in futures:
                results.update(loads(fut.result()))
    else:
        with _collector(True):
            for folder, src, key in misses:
                results[key] = load_text(lc.KINDS[folder], src)
                cache.put("loaded", key, results[key])
    for key in cardless:
        loaded, findings = results[key]
        if loaded is not None:
            cache.put("card", key, _card_of(loaded, findings))
    lc.add_records(col, items, [results[k] for k in keys])
    return col


def _reader(known: dict[str, tuple[Any, Any]]) -> Any:
    """:func:`sitegen.load.source.read_source` for a long-lived process: a
    file whose metadata has not changed since it was last read is not read
    again (:func:`sitegen.build.cache.by_signature`)."""
    from ..build.cache import by_signature
    from ..load.source import Source, read_source

    def read(path: Path, shown: str) -> Any:
        return by_signature(known, "source\0" + os.fspath(path) + "\0" + shown, path,
                            lambda: read_source(path, shown),
                            keep=lambda src: isinstance(src, Source))

    return read


def _enable_collector() -> None:
    import gc

    gc.enable()


def _loaded_key(code: str, model: Any, src: Any) -> str:
    return key_of("loaded", code, model.__name__, src.path, src.digest)


def _loaded_hit(cache: Cache, key: str, src: Any) -> Any:
    hit = cache.get("loaded", key)
    # the Source inside a cached Loaded must be this very text
    if hit is not None and (hit[0] is None or hit[0].source == src):
        return hit
    return None


# ----------------------------------------------------------------------------
# Links


def _link_keys(links: Mapping[str, PageLinks]) -> dict[str, tuple[str, str]]:
    return {rel: (key_of(s[0]), key_of(s[1])) for rel, s in links.items()}


def _broken_links(
    cache: Cache, out: Path, pages: Mapping[str, bytes], entries: Iterable[_Rendered]
) -> list[tuple[str, str, str]]:
    """Broken links of the new site (``pages``: files held as bytes;
    ``entries``: files kept with their link summaries), checking again only
    the pages that changed since the last good check into ``out`` (all of
    them when a file appeared or went, or any page's ids changed: those
    decide every other page's links)."""
    from ..render.links import check_summaries, page_links

    summaries: dict[str, PageLinks] = {}
    keys: dict[str, tuple[str, str]] = {}
    names: list[str] = list(pages)
    for rel, data in pages.items():
        if rel.endswith(".html"):
            summaries[rel] = page_links(data)
            keys.update(_link_keys({rel: summaries[rel]}))
    for entry in entries:
        names.extend(entry.files)
        summaries.update(entry.links)
        keys.update(entry.link_keys)
    names.sort()
    names_key = key_of(names)
    ids_key = key_of(sorted((p, k[0]) for p, k in keys.items()))
    page_keys = {p: k[1] for p, k in keys.items()}
    state_key = key_of("links", str(out.resolve()))
    prev = cache.get("links", state_key)
    if (
        isinstance(prev, dict)
        and prev.get("names") == names_key
        and prev.get("ids") == ids_key
        and isinstance(prev.get("pages"), dict)
    ):
        old = prev["pages"]
        todo = [p for p, k in page_keys.items() if old.get(p) != k]
    else:
        todo = list(summaries)
    broken = check_summaries(summaries, names, todo)
    if not broken:
        cache.put("links", state_key, {"names": names_key, "ids": ids_key, "pages": page_keys})
    return broken


# ----------------------------------------------------------------------------
# Write


class _BlobDamaged(FileNotFoundError):
    """A cached file is missing or does not match its digest."""

    def __init__(self, rel: str) -> None:
        super().__init__(f"the cached copy of {rel} is missing or damaged")
        self.rel = rel


class _LazyFiles(Mapping[str, bytes]):
    """Path -> bytes for :func:`write_site`, reading method files from the
    cache only when they are written (the site is never all in memory)."""

    def __init__(self, cache: Cache, shared: Mapping[str, bytes],
                 manifest: Mapping[str, tuple[str, int]]) -> None:
        self.cache = cache
        self.shared = shared
        self.manifest = manifest

    def __getitem__(self, rel: str) -> bytes:
        if rel in self.shared:
            return self.shared[rel]
        sha, _ = self.manifest[rel]
        data = self.cache.get_blob(sha)
        if data is None:
            raise _BlobDamaged(rel)
        return data

    def __iter__(self) -> Iterator[str]:
        return iter(self.manifest)

    def __len__(self) -> int:
        return len(self.manifest)


def _publish(out: Path, cache: Cache, shared: Mapping[str, bytes],
             manifest: dict[str, tuple[str, int]], digest: str) -> bool:
    """Write the site unless ``out`` already holds it; True if written."""
    from .write import spare_dir, write_site

    previous = _read_manifest(out) or {}
    if previous.get("digest") == digest and _output_holds(out, manifest, digest, previous):
        return False
    old_files = previous.get("files")
    reuse = _Reuse(out, old_files if isinstance(old_files, dict) else {}, manifest)
    # the spare folder holds the site before the current one: the files it
    # holds with the new bytes stay, the others are replaced (write_site
    # discards a spare that a killed build left half-changed)
    spare_root = spare_dir(out)
    listed = (_read_manifest(spare_root) or {}).get("files")
    spare: dict[str, bool] = {}
    if isinstance(listed, dict):
        spare = {
            rel: isinstance(entry, list) and tuple(entry) == manifest.get(rel)
            and _size_is(spare_root, rel, entry[1])
            for rel, entry in listed.items()
        }
        spare[MANIFEST] = False
    files = dict(manifest)
    files[MANIFEST] = (digest_bytes(b""), 0)  # placeholder, replaced below
    lazy = _LazyFiles(cache, {**shared, MANIFEST: _manifest_bytes(manifest, digest)}, files)
    write_site(out, lazy, reuse=reuse, spare=spare)
    return True


# ----------------------------------------------------------------------------
# The build


def _version() -> str:
    from .run import _version as v

    return v()


def _shown(path: Path, cwd: Path) -> str:
    try:
        return str(path.resolve().relative_to(cwd))
    except ValueError:
        return str(path.resolve())


def _record_paths(collection: Any) -> dict[str, str]:
    """Shown path -> method id of every method record file read, loaded
    or not (a record that fails to load is a failing method too)."""
    folder = (Path(collection.root) / "records").resolve()
    out = {}
    for shown in collection.sources:
        p = Path(shown)
        try:
            if p.resolve().parent == folder:
                out[shown] = p.stem
        except OSError:
            continue
    out.update({lo.source.path: mid for mid, lo in collection.methods.items()})
    return out


def _group_by_path(findings: Iterable[Finding]) -> dict[str, list[Finding]]:
    out: dict[str, list[Finding]] = {}
    for f in findings:
        out.setdefault(f.span.path, []).append(f)
    return out


def build(
    source: Path,
    out: Path,
    settings: Settings | None = None,
    keep_going: bool = False,
    theme: Path | None = None,
    jobs: int | None = None,
    progress: TextIO | None = None,
    cache_dir: Path | None = None,
    enabled: Iterable[str] | None = None,
    memo: dict[tuple[str, str], Any] | None = None,
    warm: bool = False,
) -> BuildReport:
    """Build the site from ``source`` into ``out``, reusing every result
    whose inputs have not changed.

    Args:
        source: the source folder (holds site.yaml).
        out: the output folder; replaced atomically, and only when the new
            site differs from what it holds.
        settings: checker settings (the default: :class:`Settings`).
        keep_going: publish the methods that pass; the failing ones are
            left out and listed on the quality page.
        theme: a theme folder (default: the shipped theme).
        jobs: worker processes for the per-method work (default: the
            number of CPUs; 1 runs everything in this process).
        progress: a stream for a one-line progress display, used only when
            it is a terminal.
        cache_dir: the cache folder (default: ``$SITEGEN_CACHE``, else
            ``.sitegen-cache/`` beside the source folder).
        enabled: rule ids to run (default: all).
        memo: kept between builds by a long-lived caller (see
            :class:`sitegen.build.cache.Cache`).
        warm: run every stage even when the whole build is unchanged (to
            fill ``memo``; the output is still rewritten only if it differs).

    Returns:
        The report; ``written`` is True when the output holds the new site.

    Raises:
        OutputRefused: ``out`` may not be written, or the cache folder
            would be inside it.
        FileNotFoundError: ``source`` has no site.yaml.
    """
    from .write import OutputRefused

    settings = settings or Settings()
    source, out = Path(source), Path(out)
    check_output_dir(out, source)
    if not (source / "site.yaml").is_file():
        raise FileNotFoundError(f"{source}: no site.yaml; is this a source folder?")
    theme_dir = Path(theme) if theme is not None else default_theme()
    env_cache = os.environ.get("SITEGEN_CACHE")
    cache_root = Path(cache_dir or env_cache or default_cache_dir(source, out)).resolve()
    if cache_root.is_relative_to(out.resolve()):
        raise OutputRefused(f"cache folder {cache_root} is inside the output folder {out}")
    cache = Cache(cache_root, memo)
    try:
        with _collector(False):
            return _build(source, out, settings, keep_going, theme_dir, jobs, progress,
                          enabled, cache, cache_root, warm)
    finally:
        cache.forget_unused()


@contextlib.contextmanager
def _collector(on: bool) -> Iterator[None]:
    """Run the block with Python's cyclic garbage collector on or off.

    The build's main process is off: it reads thousands of cached objects
    and keeps nearly all of them to the end, and the collector, woken by
    every few hundred allocations, walked that growing heap again and
    again (about half of an incremental build's time). Work that makes
    garbage in bulk (a method's chemistry and pages, in this process or a
    worker) runs with it on.
    """
    import gc

    was = gc.isenabled()
    if on:
        gc.enable()
    else:
        gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()
        else:
            gc.disable()


def _build(source: Path, out: Path, settings: Settings, keep_going: bool, theme_dir: Path,
           jobs: int | None, progress: TextIO | None, enabled: Iterable[str] | None,
           cache: Cache, cache_root: Path, warm: bool = False) -> BuildReport:
    from ..clock import build_date

    cwd = Path.cwd().resolve()
    version = _version()
    code = code_digest(version)
    date = build_date()
    enabled_t = tuple(enabled) if enabled is not None else None
    jobs = jobs or os.cpu_count() or 1
    ticker = _Progress(progress)
    times: dict[str, float] = {}

    # -- 1. the whole build, by one key --------------------------------------
    t0 = time.perf_counter()
    known = cache.files_known()
    theme_digest = tree_digest(theme_dir, known=known)
    build_key = key_of(
        FORMAT, "build", code, tree_digest(source, known=known), _shown(source, cwd), theme_digest,
        repr(settings), keep_going, enabled_t, date.isoformat(),
    )
    snap = cache.get("build", build_key)
    times["scan"] = time.perf_counter() - t0
    if not warm and isinstance(snap, _Snapshot) and (
        not snap.written
        or _output_holds(out, snap.manifest, snap.digest)
        or _restore(out, cache, snap)
    ):
        col = SourcesOnly(root=source, sources=dict(snap.sources),
                          methods=dict.fromkeys(snap.method_ids))
        result = CheckResult(col, {}, list(snap.findings))  # type: ignore[arg-type]
        _log_stages(times)
        return BuildReport(
            check=result, written=snap.written, out=out, methods_built=0,
            methods_cached=len(snap.method_ids) - len(snap.excluded) if snap.written else 0,
            excluded=list(snap.excluded), stage_seconds=times,
            files=len(snap.manifest) if snap.written else 0,
        )

    # -- 2. load -----------------------------------------------------------------
    t0 = time.perf_counter()
    from .. import units

    units.use_cache_folder(cache_root / "units")
    from ..render.env import use_bytecode_folder

    use_bytecode_folder(cache_root / "templates")
    # the quantities and conversions earlier builds made, so that a build
    # whose records hold only known ones never imports pint
    units_key = key_of("units", code, _library_version("pint"))
    remembered = cache.get("units", units_key)
    if isinstance(remembered, dict):
        units.prime(remembered)
    units_before = len(remembered) if isinstance(remembered, dict) else 0
    collection = _load(source, cwd, cache, code, jobs)
    times["load"] = time.perf_counter() - t0

    from ..hazards.rules_engine import load_rules

    rules = load_rules(collection.safety_rules_source)
    runner = _Runner(jobs, _WorkerState(collection, cache_root, rules, code), ticker)
    try:
        report, manifest, digest = _build_loaded(
            collection, out, cache, code, settings, keep_going, theme_dir, theme_digest,
            enabled_t, date, version, runner, times,
        )
    finally:
        runner.close()
        ticker.done()
    if len(units.known()) > units_before:
        cache.put("units", units_key, units.known())
    # The outcome is a function of the key's inputs, failures included, so
    # an unchanged rerun of a failing build answers at once too.
    _remember(cache, build_key, report, collection, manifest, digest)
    _log_stages(times)
    return report


def _log_stages(times: Mapping[str, float]) -> None:
    """Append the stage times as one JSON line to ``$SITEGEN_STAGE_LOG``
    when set (the benchmark reads it; the CLI prints only the total)."""
    target = os.environ.get("SITEGEN_STAGE_LOG")
    if target:
        with open(target, "a", encoding="utf-8") as fh:
            fh.write(json.dumps(dict(times), sort_keys=True) + "\n")


def _restore(out: Path, cache: Cache, snap: _Snapshot) -> bool:
    """Rewrite a cached build's files when the output lost them; False if
    the cache lost them too (then the build runs again)."""
    if not all(cache.has_blob(sha) for sha, _ in snap.manifest.values()):
        return False
    try:
        _publish(out, cache, {}, dict(snap.manifest), snap.digest)
    except _BlobDamaged:
        return False
    return True


def _remember(cache: Cache, build_key: str, report: BuildReport, collection: Any,
              manifest: dict[str, tuple[str, int]], digest: str) -> None:
    findings = tuple(report.check.findings)
    paths = {f.span.path for f in findings}
    sources = {p: s for p, s in collection.sources.items() if p in paths}
    snap = _Snapshot(
        written=report.written,
        findings=findings,
        sources=sources,
        method_ids=tuple(sorted(set(collection.methods) | {m for m, _ in report.excluded})),
        excluded=tuple(report.excluded),
        manifest=dict(manifest),
        digest=digest,
    )
    cache.put("build", build_key, snap)


@dataclass
class _Checked:
    """The check stage's outcome: every finding, and per method the
    findings its analysis made (for the method's own list)."""

    findings: list[Finding]
    analysis_findings: dict[str, tuple[Finding, ...]]


def _check_stage(collection: Any, analyses: Mapping[str, Any], settings: Settings,
                 enabled: tuple[str, ...] | None, cache: Cache, code: str,
                 analysis_keys: Mapping[str, str],
                 closures: Mapping[str, tuple[set[str], set[str], str]]) -> _Checked:
    """:func:`sitegen.build.run.run_checks`, with each method's rule
    findings kept by everything they can depend on (the analysis key
    covers the record and the records it names; the ids it names and
    whether they exist; the settings and the rule set), and the
    collection-wide rules' findings kept by every method's facts digest,
    every analysis' digest and every reagent and indicator record."""
    from ..check.registry import Context
    from ..check.run import as_strict, rules_by_scope
    from ..errors import sort_findings
    from .run import site_settings

    settings = site_settings(collection, settings)
    ids, scoped = rules_by_scope(enabled)
    ctx = Context(collection=collection, analyses=analyses, settings=settings)
    site = collection.site.source if collection.site is not None else None
    sr = collection.safety_rules_source
    rules_key = key_of(
        "rules", code, repr(settings), tuple(ids),
        (site.path, site.digest) if site is not None else None,
        (sr.path, sr.digest) if sr is not None else None,
    )
    findings: list[Finding] = list(collection.findings)
    by_method: dict[str, tuple[Finding, ...]] = {}
    digests: dict[str, str] = {}
    for mid in sorted(collection.methods):
        _names, methods, presence = closures[mid]
        ck = key_of(
            "checks", rules_key, analysis_keys[mid],
            [(m, analysis_keys.get(m)) for m in sorted(methods)], presence,
        )
        hit = cache.get("checks", ck)
        if not (isinstance(hit, tuple) and len(hit) == 3):
            loaded, an = collection.methods[mid], analyses.get(mid)
            found: list[Finding] = []
            for info in scoped.get("method", []):
                found.extend(info.func(ctx, loaded, an))
            hit = (tuple(found), tuple(an.findings) if an is not None else (),
                   _value_digest(an))
            cache.put("checks", ck, hit)
        findings.extend(hit[0])
        by_method[mid], digests[mid] = hit[1], hit[2]
    for scope, table in (("reagent", collection.reagents), ("indicator", collection.indicators)):
        for info in scoped.get(scope, []):
            for loaded in table.values():
                findings.extend(info.func(ctx, loaded))
    if scoped.get("collection"):
        findings.extend(_collection_rules(ctx, scoped["collection"], cache, rules_key, digests))
    return _Checked(sort_findings(set(as_strict(findings, settings))), by_method)


def _value_digest(value: Any) -> str:
    """A digest of a value that does not depend on how it was made: the
    same analysis computed in a worker or here, in any process, gives the
    same digest (a pickle would not: its bytes changed after a round trip
    for most demo analyses, as shared references are kept)."""
    parts: list[bytes] = []
    _feed(parts, value)
    return hashlib.sha256(b"".join(parts)).hexdigest()


def _feed(out: list[bytes], x: Any) -> None:
    t = type(x)
    if t is float or t is int or t is str or t is bool or x is None:
        out.append(f"{t.__name__}:{x!r};".encode())
    elif t is tuple or t is list:
        out.append(b"[%d" % len(x))
        for item in x:
            _feed(out, item)
        out.append(b"]")
    elif t is dict:
        out.append(b"<%d" % len(x))
        for k in sorted(x, key=repr):
            _feed(out, k)
            _feed(out, x[k])
        out.append(b">")
    elif t is set or t is frozenset:
        out.append(b"{%d" % len(x))
        for item in sorted(x, key=repr):
            _feed(out, item)
        out.append(b"}")
    elif t is bytes:
        out.append(b"b%d:" % len(x) + x)
    elif hasattr(t, "__dataclass_fields__"):
        out.append(t.__qualname__.encode() + b"(")
        for name in t.__dataclass_fields__:
            out.append(name.encode() + b"=")
            _feed(out, getattr(x, name))
        out.append(b")")
    elif hasattr(x, "tobytes") and hasattr(x, "dtype"):  # a numpy array or scalar
        out.append(f"a:{x.dtype}:{getattr(x, 'shape', ())}:".encode() + x.tobytes())
    elif callable(x) and not isinstance(x, type):
        # a compiled condition kept with the hazard summary: made from data
        # fed already, and its code is in the code digest
        out.append(f"fn:{getattr(x, '__qualname__', t.__name__)};".encode())
    else:  # enums, fractions and other plain values: their repr says it all
        out.append(f"{t.__qualname__}:{x!r};".encode())


def _collection_rules(ctx: Any, rules: Sequence[Any], cache: Cache, rules_key: str,
                      analysis_digests: Mapping[str, str]) -> list[Finding]:
    """The collection-wide rules' findings, computed again only when a
    method's facts, an analysis, or a reagent or indicator record changed,
    or a file the kept findings point into did (their positions)."""
    col = ctx.collection
    facts = [(mid, _facts(lo)) for mid, lo in sorted(col.methods.items())]
    shared = [
        (lo.source.path, lo.source.digest)
        for table in (col.reagents, col.indicators) for lo in table.values()
    ]
    key = key_of("collection-checks", rules_key, facts, sorted(analysis_digests.items()),
                 sorted(shared))
    hit = cache.get("collection-checks", key)
    if isinstance(hit, tuple) and len(hit) == 2:
        found, pointed = hit
        if all(
            (src := col.sources.get(path)) is not None and src.digest == digest
            for path, digest in pointed
        ):
            return list(found)
    found = [f for info in rules for f in info.func(ctx)]
    pointed = sorted({(f.span.path, col.sources[f.span.path].digest)
                      for f in found if f.span.path in col.sources})
    if all(f.span.path in col.sources for f in found):
        cache.put("collection-checks", key, (tuple(found), tuple(pointed)))
    return found


def _facts(loaded: Any) -> str:
    if isinstance(loaded, _LazyLoaded):
        return loaded.card.facts
    return _card_of(loaded, ()).facts


def _build_loaded(
    collection: Any,
    out: Path,
    cache: Cache,
    code: str,
    settings: Settings,
    keep_going: bool,
    theme_dir: Path,
    theme_digest: str,
    enabled: tuple[str, ...] | None,
    date: Any,
    version: str,
    runner: _Runner,
    times: dict[str, float],
) -> tuple[BuildReport, dict[str, tuple[str, int]], str]:
    """Stages 3-7 over a loaded collection; returns the report and the
    published file set (empty when nothing was published)."""
    from ..errors import sort_findings

    # -- 3. analyse --------------------------------------------------------------
    t0 = time.perf_counter()
    memo = cache.side_memo("deps")
    saved_as = None
    if memo is None:
        # a one-off process starts from the answers the last build gave (each
        # is keyed by its record's text and the shared tables, so never stale)
        saved_as = key_of("deps", code)
        saved = cache.get("deps", saved_as)
        memo = dict(saved) if isinstance(saved, dict) else {}
    deps = _Deps(collection, memo)
    # the lab's safety rules apply to every method's hazard summary
    sr = collection.safety_rules_source
    safety_key = (sr.path, sr.digest) if sr is not None else None
    analysis_keys: dict[str, str] = {}
    closures: dict[str, tuple[set[str], set[str], str]] = {}
    analyses = _Analyses(cache, lambda mid, key: _analyse_many(runner.state, [(mid, key)])[0][1])
    todo: list[tuple[str, str]] = []
    for mid, loaded in sorted(collection.methods.items()):
        names, methods, parts, presence = deps.of(mid)
        closures[mid] = (names, methods, presence)
        key = key_of("analysis", code, loaded.source.path, loaded.source.digest, parts, safety_key)
        analysis_keys[mid] = key
        if cache.has("analysis", key):
            analyses.add_cached(mid, key)
        else:
            todo.append((mid, key))
    if saved_as is not None:
        kept = deps.used_memo()
        if deps.added or len(kept) != len(memo):
            cache.put("deps", saved_as, kept)
    new = runner.map("analyse", _analyse_many, todo)
    for mid, key in todo:
        cache.remember("analysis", key, new[mid])
        analyses.add(mid, new[mid])
    times["analyse"] = time.perf_counter() - t0

    # -- 4. check ----------------------------------------------------------------
    t0 = time.perf_counter()
    checked = _check_stage(collection, analyses, settings, enabled, cache, code, analysis_keys,
                           closures)
    findings = checked.findings
    times["check"] = time.perf_counter() - t0
    result = CheckResult(collection, analyses, findings)
    report = BuildReport(check=result, out=out, stage_seconds=times)
    errors = result.errors
    if errors and keep_going:
        record_of = _record_paths(collection)
        failing: dict[str, str] = {}
        for f in errors:
            mid = record_of.get(f.span.path)
            if mid is None:
                # an error outside a method record stops publication
                return report, {}, ""
            failing.setdefault(mid, f"{f.rule}: {f.message}")
        report.excluded = sorted(failing.items())
        for mid in failing:
            collection.methods.pop(mid, None)
            analyses.pop(mid, None)
    elif errors:
        return report, {}, ""

    # -- 5. render ---------------------------------------------------------------
    t0 = time.perf_counter()
    from ..render import pages
    from ..render.site import RenderOptions, render_shared

    options = RenderOptions(
        theme_dir=theme_dir, build_date=date, generator_version=version,
        excluded=tuple(report.excluded),
    )
    published = pages.published_methods(collection, options)
    globals_key = key_of(
        # the theme by content (its folder's name does not reach the pages)
        "render-globals", code, theme_digest,
        repr(dataclasses.replace(options, theme_dir=Path("theme"))),
        *(
            (s.path, s.digest) if s is not None else None
            for s in (
                collection.site.source if collection.site is not None else None,
                collection.glossary_source,
                collection.safety_rules_source,
            )
        ),
    )
    findings_at = _group_by_path(findings)
    rendered: dict[str, _Rendered] = {}
    render_keys: dict[str, str] = {}
    own_findings: dict[str, list[Finding]] = {}
    render_todo: list[tuple[str, str, Any, list[Finding]]] = []
    for mid, loaded in published.items():
        # (pages.method_findings, without reading the analysis back)
        own = sort_findings({*findings_at.get(loaded.source.path, []),
                             *checked.analysis_findings.get(mid, ())})
        _names, methods, presence = closures[mid]
        key = key_of(
            "render", globals_key, analysis_keys[mid], repr(own) if own else "",
            [(m, analysis_keys.get(m), m in published) for m in sorted(methods)],
            presence,
        )
        render_keys[mid] = key
        own_findings[mid] = own
        hit = cache.get("render", key)
        # (a blob lost from the cache is found when the write needs it, and
        # that method is rendered again then)
        if isinstance(hit, _Rendered):
            rendered[mid] = hit
        else:
            render_todo.append((mid, key, analyses.get(mid), own))
    new_pages = runner.map("render", _render_many, render_todo, options)
    for mid, key, *_ in render_todo:
        cache.remember("render", key, new_pages[mid])
    rendered.update(new_pages)
    rendered = dict(sorted(rendered.items()))
    built = sorted(m for m, *_ in render_todo)
    # The shared pages read every published method's record except its
    # procedure (the facts digest), the findings and the shared records;
    # the search index is assembled from the documents kept per method.
    from ..render.search import search_files

    shared_key = key_of(
        "shared", globals_key, [(mid, _facts(lo)) for mid, lo in published.items()],
        repr(findings), sorted(checked.analysis_findings.items()),
        sorted((lo.source.path, lo.source.digest)
               for table in (collection.reagents, collection.indicators)
               for lo in table.values()),
    )

    def render_shared_entry(force: bool = False) -> _Rendered:
        from ..render.links import page_links

        files = render_shared(collection, analyses, findings, options, search=False)
        links = {rel: page_links(data) for rel, data in files.items() if rel.endswith(".html")}
        entry = _Rendered(
            {rel: (cache.put_blob(data, force=force), len(data)) for rel, data in files.items()},
            links, None, _link_keys(links),
        )
        cache.put("shared", shared_key, entry)
        return entry

    shared_entry = cache.get("shared", shared_key)
    if not isinstance(shared_entry, _Rendered):
        shared_entry = render_shared_entry()
    extra = search_files(collection, published,
                         [entry.search_doc for entry in rendered.values()])
    times["render"] = time.perf_counter() - t0

    # -- 6. links ----------------------------------------------------------------
    t0 = time.perf_counter()
    broken = _broken_links(cache, out, extra, [shared_entry, *rendered.values()])
    times["links"] = time.perf_counter() - t0
    if broken:
        report.check.findings.extend(
            Finding(
                "broken-link",
                Severity.ERROR,
                f"page {page} links to {href!r}: {reason}",
                Span(str(out / page), 1, 1),
            )
            for page, href, reason in broken
        )
        return report, {}, ""

    # -- 7. write ------------------------------------------------------------------
    t0 = time.perf_counter()
    manifest: dict[str, tuple[str, int]] = dict(shared_entry.files)
    for entry in rendered.values():
        manifest.update(entry.files)
    for rel, data in extra.items():
        manifest[rel] = (digest_bytes(data), len(data))
    manifest = dict(sorted(manifest.items()))
    digest = _manifest_digest(manifest)
    for rel, data in extra.items():
        # kept so that a lost output folder is restored without a build
        cache.put_blob(data, manifest[rel][0])
    owner = {rel: mid for mid, entry in rendered.items() for rel in entry.files}
    owner.update(dict.fromkeys(shared_entry.files, ""))
    repaired: set[str] = set()
    while True:
        try:
            wrote = _publish(out, cache, extra, manifest, digest)
            break
        except _BlobDamaged as exc:
            # Someone damaged the cache (the write is staged, so nothing was
            # published): render those files again, in this process.
            mid = owner.get(exc.rel)
            if mid is None or mid in repaired:
                raise
            repaired.add(mid)
            if mid == "":
                render_shared_entry(force=True)
                continue
            _render_entry(cache, code, collection, mid, render_keys[mid], analyses.get(mid),
                          own_findings[mid], options, force=True)
            built = sorted({*built, mid})
    times["write"] = time.perf_counter() - t0
    report.written = True
    report.files = len(manifest)
    report.methods_built = len(built)
    report.methods_cached = len(rendered) - len(built)
    report.rebuilt = built
    report.output_rewritten = wrote
    return report, manifest, digest


if __name__ == "__main__":  # pragma: no cover
    sys.exit("run `python -m sitegen build`")
