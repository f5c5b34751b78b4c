"""A content-hash cache that survives between builds.

Every entry is addressed by a sha256 key computed from *everything* the
entry was made from (record texts, the code, the theme...), never by a
name or a time, so an entry can be stale only if its key is wrong: a
changed input gives a different key, and the old entry is simply never
asked for again.

Two stores live under one folder:

* ``entries/``: pickled values (a loaded record, an analysis, the list of
  a method's rendered files) under a key;
* ``blobs/``: file contents under their own sha256, so a file rendered
  once is stored once however many builds name it.

Every write goes to a temporary file in the same folder and is moved in
place with :func:`os.replace`, so a reader sees the old entry or the new
one, never half of one; a killed build leaves at worst a stray temporary
file. A damaged entry (unreadable pickle, blob whose digest does not
match) reads as a miss.

The pickles are trusted: the cache folder must be the user's own, like
any bytecode cache. It is never inside the output folder, which a build
replaces wholesale.
"""

from __future__ import annotations

__all__ = [
    "FORMAT",
    "Cache",
    "by_signature",
    "code_digest",
    "default_cache_dir",
    "digest_bytes",
    "dumps",
    "file_digest",
    "file_signature",
    "key_of",
    "loads",
    "tree_digest",
]

import contextlib
import functools
import hashlib
import io
import os
import pickle
import tempfile
import time
import types
from collections.abc import Callable
from pathlib import Path
from typing import Any

#: Bumped when the layout or the meaning of entries changes.
FORMAT = "sitegen-cache-1"

_PACKAGE = Path(__file__).resolve().parents[1]


class LocalFunctionCalled(RuntimeError):
    """A function restored from the cache was called; see :func:`dumps`."""


def _local_function(qualname: str) -> types.FunctionType:
    def unavailable(*args: Any, **kwargs: Any) -> Any:
        raise LocalFunctionCalled(
            f"{qualname} was computed before the value was cached and cannot be called again"
        )

    unavailable.__qualname__ = qualname
    return unavailable  # type: ignore[return-value]


class _Pickler(pickle.Pickler):
    def reducer_override(self, obj: Any) -> Any:
        # Values may hold closures (a compiled condition that already did
        # its work, say); those cannot be pickled by reference. They are
        # replaced by a stub that raises if anyone calls it, so every other
        # field still round-trips exactly.
        if isinstance(obj, types.FunctionType) and "<locals>" in obj.__qualname__:
            return _local_function, (obj.__qualname__,)
        return NotImplemented


def dumps(value: Any) -> bytes:
    """Pickle ``value`` (local functions become call-raising stubs)."""
    buf = io.BytesIO()
    _Pickler(buf, protocol=pickle.HIGHEST_PROTOCOL).dump(value)
    return buf.getvalue()


def loads(data: bytes) -> Any:
    """The value of :func:`dumps` bytes."""
    return pickle.loads(data)


def digest_bytes(data: bytes) -> str:
    """sha256 hex digest of ``data``."""
    return hashlib.sha256(data).hexdigest()


def key_of(*parts: object) -> str:
    """A key from parts: the digest of their ``repr`` (a tuple's repr
    quotes and escapes every string, so ``("ab", "c")`` and ``("a", "bc")``
    differ); bytes parts are hashed as they are, each with its length."""
    h = hashlib.sha256()
    if any(isinstance(p, bytes) for p in parts):
        for part in parts:
            b = part if isinstance(part, bytes) else repr(part).encode("utf-8")
            h.update(str(len(b)).encode("ascii") + b":")
            h.update(b)
    else:
        h.update(repr(parts).encode("utf-8"))
    return h.hexdigest()


def tree_digest(folder: Path, skip_hidden: bool = True,
                known: dict[str, tuple[Any, Any]] | None = None) -> str:
    """Digest of every file under ``folder``: relative paths and contents.

    A missing folder has a digest too (of nothing), so that creating it
    later changes the digest. ``known``: see :func:`file_digest`.
    """
    h = hashlib.sha256()
    if folder.is_dir():
        for rel, path in _files_under(os.fspath(folder), skip_hidden):
            size, digest = file_digest(path, known)
            h.update(f"{rel}\0{size}\0{digest}\0".encode())
    return h.hexdigest()


def _files_under(root: str, skip_hidden: bool) -> list[tuple[str, str]]:
    """(relative POSIX path, path) of every regular file under ``root``
    (following links, as pathlib's rglob did), sorted by relative path;
    no __pycache__ or .pyc, and no hidden names when ``skip_hidden``."""
    out: list[tuple[str, str]] = []
    seen: set[str] = set()
    for folder, dirs, names in os.walk(root, followlinks=True):
        real = os.path.realpath(folder)
        if real in seen:  # a link back to a folder already walked
            dirs[:] = []
            continue
        seen.add(real)
        rel_dir = os.path.relpath(folder, root).replace(os.sep, "/")
        keep = [d for d in dirs if d != "__pycache__" and not (skip_hidden and d.startswith("."))]
        dirs[:] = keep
        for name in names:
            if name.endswith(".pyc") or (skip_hidden and name.startswith(".")):
                continue
            path = os.path.join(folder, name)
            if not os.path.isfile(path):
                continue
            out.append((name if rel_dir == "." else f"{rel_dir}/{name}", path))
    return sorted(out)


def file_signature(st: os.stat_result) -> tuple[int, int, int, int] | None:
    """What a file's metadata says about its contents, or None while the
    file may still be changing within one clock tick (modified less than
    two seconds ago: two writes in one tick can leave the same metadata)."""
    now = time.time_ns()
    if now - max(st.st_mtime_ns, st.st_ctime_ns) < 2_000_000_000:
        return None
    return (st.st_size, st.st_mtime_ns, st.st_ctime_ns, st.st_ino)


def by_signature(known: dict[str, tuple[Any, Any]] | None, key: str, path: str | Path,
                 compute: Callable[[], Any], keep: Callable[[Any], bool] = bool) -> Any:
    """``compute()``, or what it gave for ``key`` when ``path``'s metadata
    has not changed since (:func:`file_signature`). ``known``: a dict kept
    by a long-lived process (None: always compute); ``keep``: which results
    may be kept."""
    if known is None:
        return compute()
    try:
        sig = file_signature(os.stat(path))
    except OSError:
        sig = None
    hit = known.get(key)
    if sig is not None and hit is not None and hit[0] == sig:
        return hit[1]
    value = compute()
    if sig is not None and keep(value):
        known[key] = (sig, value)
    return value


def file_digest(path: str, known: dict[str, tuple[Any, Any]] | None = None) -> tuple[int, str]:
    """(size, sha256) of a file; ``known``: see :func:`by_signature`."""

    def compute() -> tuple[int, str]:
        with open(path, "rb") as fh:
            data = fh.read()
        return len(data), digest_bytes(data)

    return by_signature(known, path, path, compute)  # type: ignore[no-any-return]


@functools.cache
def code_digest(version: str) -> str:
    """Digest of the generator: its version and every file of the
    installed ``sitegen`` package (sources and package data), so that any
    code change invalidates every entry.

    Cached per process: the package does not change under a running build.
    """
    return key_of(FORMAT, version, tree_digest(_PACKAGE))


def default_cache_dir(source: Path, out: Path) -> Path:
    """Where the cache lives unless told: ``.sitegen-cache/`` beside the
    source folder (in its parent), or under the current folder when that
    place is inside the output folder (which every build replaces)."""
    beside = source.resolve().parent / ".sitegen-cache"
    if beside.is_relative_to(out.resolve()):
        return Path.cwd().resolve() / ".sitegen-cache"
    return beside


class Cache:
    """The cache folder.

    Args:
        root: the folder (created on first write).
        memo: a dict kept by a long-lived process (``sitegen serve``) in
            which entries are also kept as objects, so that the next build
            in that process does not read and unpickle them again. Entries
            are addressed by content, so a kept one is never stale; values
            must not be changed by their users.
    """

    def __init__(self, root: Path, memo: dict[tuple[str, str], Any] | None = None) -> None:
        self.root = Path(root)
        # plain strings: a build asks for thousands of entries and blobs
        self._base = os.fspath(self.root)
        self.memo = memo
        #: (kind, key) of every entry asked for or stored through this object
        self.used: set[tuple[str, str]] = set()

    def __repr__(self) -> str:
        return f"Cache({str(self.root)!r})"

    # -- pickled entries --------------------------------------------------

    def _entry(self, kind: str, key: str) -> str:
        return f"{self._base}/entries/{kind}/{key[:2]}/{key}.pickle"

    def get(self, kind: str, key: str) -> Any | None:
        """The value stored under ``kind``/``key``, or None."""
        if self.memo is not None:
            self.used.add((kind, key))
            if (kind, key) in self.memo:
                return self.memo[(kind, key)]
        try:
            with open(self._entry(kind, key), "rb") as fh:
                data = fh.read()
        except OSError:
            return None
        try:
            value = pickle.loads(data)
        except Exception:
            # A damaged or incompatible entry is a miss; it is overwritten
            # by the next put.
            return None
        if self.memo is not None:
            self.memo[(kind, key)] = value
        return value

    def has(self, kind: str, key: str) -> bool:
        """Whether an entry is stored (not read: :meth:`get` may still find
        it damaged)."""
        if self.memo is not None:
            self.used.add((kind, key))
            if (kind, key) in self.memo:
                return True
        return os.path.isfile(self._entry(kind, key))

    def put(self, kind: str, key: str, value: Any) -> None:
        """Store ``value`` under ``kind``/``key`` atomically."""
        _atomic_write(self._entry(kind, key), dumps(value))
        self.remember(kind, key, value)

    def remember(self, kind: str, key: str, value: Any) -> None:
        """Keep ``value`` in the memo only (it was stored by another
        process, a worker)."""
        if self.memo is not None:
            self.used.add((kind, key))
            self.memo[(kind, key)] = value

    def files_known(self) -> dict[str, tuple[Any, Any]] | None:
        """With a memo: the dict in it where file digests and sources are
        kept by file metadata (see :func:`file_digest`); None without."""
        return self.side_memo("files")

    def side_memo(self, name: str) -> dict[Any, Any] | None:
        """With a memo: a dict in it for values a long-lived process keeps
        by keys of its own (kept whole between builds); None without."""
        if self.memo is None:
            return None
        self.used.add(("side", name))
        known = self.memo.setdefault(("side", name), {})
        return known  # type: ignore[no-any-return]

    def forget_unused(self) -> None:
        """Drop from the memo every entry this object did not touch (the
        memo then holds what the last build used, not every build's)."""
        # (a build answered from its snapshot used nothing else: keep all)
        if self.memo is not None and any(kind not in ("build", "side")
                                         for kind, _ in self.used):
            for k in [k for k in self.memo if k not in self.used]:
                del self.memo[k]

    # -- content-addressed blobs -----------------------------------------

    def _blob(self, digest: str) -> str:
        return f"{self._base}/blobs/{digest[:2]}/{digest}"

    def put_blob(self, data: bytes, digest: str | None = None, force: bool = False) -> str:
        """Store file contents; returns their sha256 digest.

        A blob already stored is kept (same digest, same bytes) unless
        ``force``, which replaces a damaged one.
        """
        digest = digest or digest_bytes(data)
        path = self._blob(digest)
        if force or not os.path.isfile(path):
            _atomic_write(path, data)
        return digest

    def get_blob(self, digest: str) -> bytes | None:
        """The contents stored under ``digest``, checked against it; None
        when missing or damaged."""
        try:
            with open(self._blob(digest), "rb") as fh:
                data = fh.read()
        except OSError:
            return None
        if digest_bytes(data) != digest:
            return None
        return data

    def has_blob(self, digest: str) -> bool:
        """Whether a blob is stored (not verified; :meth:`get_blob` is)."""
        return os.path.isfile(self._blob(digest))


def _atomic_write(path: str, data: bytes) -> None:
    folder = os.path.dirname(path)
    os.makedirs(folder, exist_ok=True)
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=".tmp-", suffix=os.path.splitext(path)[1])
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise
