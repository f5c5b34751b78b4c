"""Write a whole site atomically.

The new site is staged in a sibling folder and swapped in with renames
only when every file is written, so a failed, interrupted or killed build
leaves the previous site exactly as it was. A marker file tells our own
output folders from a user's folder, which is never deleted.
"""

from __future__ import annotations

__all__ = [
    "MARKER",
    "OutputRefused",
    "check_output_dir",
    "prepare_spare",
    "spare_dir",
    "write_site",
]

import os
import shutil
from collections.abc import Collection, Mapping
from pathlib import Path

#: Written into every output folder; its presence means "a previous build
#: wrote this folder and may replace it".
MARKER = ".sitegen-output"
_MARKER_TEXT = b"This folder is written by sitegen build; it is replaced on every build.\n"


class OutputRefused(Exception):
    """The output folder may not be written (the message says why)."""


def check_output_dir(out: Path, source: Path) -> None:
    """Refuse an output folder that is the source folder, contains it, or
    holds files a previous build did not write.

    Raises:
        OutputRefused: with a plain explanation.
    """
    o, s = out.resolve(), source.resolve()
    if o == s:
        raise OutputRefused(f"output folder {out} is the source folder; choose another")
    if s.is_relative_to(o):
        raise OutputRefused(f"output folder {out} contains the source folder {source}")
    if o.exists():
        if not o.is_dir():
            raise OutputRefused(f"output path {out} exists and is not a folder")
        entries = [p for p in o.iterdir() if p.name != ".gitkeep"]
        if entries and not (o / MARKER).is_file():
            raise OutputRefused(
                f"output folder {out} holds files that sitegen did not write (no {MARKER} marker);"
                " refusing to replace them - empty it or choose another folder"
            )


_RENAME_EXCHANGE = 2
_AT_FDCWD = -100


def _exchange(a: Path, b: Path) -> bool:
    """Atomically swap two folders (Linux renameat2 RENAME_EXCHANGE).

    Returns False where the call is not available; the caller then falls
    back to two renames, which leave a short window with no output folder.
    """
    import ctypes  # only here: importing it costs more than a small rebuild's swap

    try:
        # the C library the interpreter is linked with (dlopen of NULL)
        fn = ctypes.CDLL(None, use_errno=True).renameat2
    except (OSError, AttributeError, TypeError):
        return False
    fn.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    rc = fn(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE)
    return rc == 0


def _write_file(path: Path, data: bytes) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "wb") as fh:
        fh.write(data)


def _target(root: str, rel: str) -> str:
    """``root/rel`` for a relative POSIX path that stays inside ``root``
    (checked on the text: the staged folder holds no links to follow).

    Raises:
        OutputRefused: ``rel`` is absolute, empty or climbs out.
    """
    parts = rel.split("/")
    if not rel or rel.startswith("/") or "\\" in rel or any(p in ("", ".", "..") for p in parts):
        raise OutputRefused(f"refusing to write outside the output folder: {rel}")
    return os.path.join(root, *parts)


def _hold(path: str | Path) -> None:
    """Test hook: ``SITEGEN_TEST_WRITE_DELAY`` seconds between files, so a
    test can kill a build in the middle of writing."""
    delay = os.environ.get("SITEGEN_TEST_WRITE_DELAY")
    if delay:
        import time

        time.sleep(float(delay))


#: Inside a spare folder while it is being turned into the next site: a
#: spare holding it was left half-changed (a killed build) and is discarded.
_DIRTY = ".sitegen-staging"


def spare_dir(out: Path) -> Path:
    """The folder beside ``out`` that holds the site before the current one
    (see :func:`write_site`)."""
    out = out.resolve()
    return out.parent / f".{out.name}.spare"


def prepare_spare(out: Path) -> bool:
    """Make the spare folder now, as hard links to the current site, if
    there is none: the next build then replaces only the files that differ
    instead of staging every file (a long-lived caller does this while
    idle). Safe because no build ever writes into a file in place. True if
    a spare was made."""
    out = out.resolve()
    spare = spare_dir(out)
    if os.path.lexists(spare) or not (out / MARKER).is_file():
        return False
    tmp = out.parent / f".{out.name}.spare-{os.getpid()}"
    if tmp.exists():
        shutil.rmtree(tmp)
    root, dest = os.fspath(out), os.fspath(tmp)
    try:
        for folder, _dirs, names in os.walk(root):
            target = os.path.join(dest, os.path.relpath(folder, root))
            os.makedirs(target, exist_ok=True)
            for name in names:
                os.link(os.path.join(folder, name), os.path.join(target, name))
        os.replace(tmp, spare)
    except OSError:
        shutil.rmtree(tmp, ignore_errors=True)
        return False
    return True


def _usable_spare(spare: Path) -> bool:
    """A spare written by us (marker) and not left half-changed."""
    return (spare / MARKER).is_file() and not os.path.lexists(spare / _DIRTY)


def write_site(
    out: Path,
    files: Mapping[str, bytes],
    reuse: Mapping[str, str | Path] | None = None,
    spare: Mapping[str, bool] | None = None,
) -> None:
    """Stage ``files`` beside ``out`` and swap the staged folder in.

    Callers must have run :func:`check_output_dir` first.

    Args:
        out: the output folder.
        files: relative POSIX path -> bytes.
        reuse: relative path -> a file of the current output known to hold
            exactly ``files[path]``; it is hard-linked into the staged
            folder instead of written (the previous site is never changed
            in place, so sharing its inodes is safe). Falls back to
            writing when the link fails.
        spare: when given, the site is staged in the spare folder
            (:func:`spare_dir`: the site before the current one, kept by
            the last build); it maps every file the spare holds, as the
            build that wrote it listed them, to whether it already holds
            exactly the new bytes. Only the others are removed or written.
            After the swap the spare holds the site that was current, for
            the next build. Without it (or without a usable spare) the site
            is staged from nothing and the previous site deleted.

    A spare is marked while it is changed, so one that a killed build left
    half-changed is never trusted again; the published folder is only ever
    replaced by a rename.
    """
    out = out.resolve()
    parent = out.parent
    parent.mkdir(parents=True, exist_ok=True)
    spare_holds = {rel for rel, same in spare.items() if same} if spare is not None else None
    spare_files = set(spare) if spare is not None else set()
    spare_root = spare_dir(out)
    old = parent / f".{out.name}.old-{os.getpid()}"
    if old.exists():
        shutil.rmtree(old)
    staging = parent / f".{out.name}.staging-{os.getpid()}"
    keep: Collection[str] = ()
    if spare_holds is not None:
        if not os.path.lexists(spare_root):
            staging = spare_root
        elif (
            not os.path.islink(spare_root)
            and spare_root.is_dir()
            and ((spare_root / MARKER).is_file() or not any(spare_root.iterdir()))
        ):
            staging = spare_root
            if _usable_spare(spare_root):
                keep = spare_holds
            else:
                shutil.rmtree(spare_root)  # ours, but half-changed (or empty)
        else:
            spare_holds = None  # not written by us: leave it alone
    if staging != spare_root and staging.exists():
        shutil.rmtree(staging)
    try:
        written: list[str] = []
        root = os.fspath(staging)
        if keep:
            _write_file(staging / _DIRTY, b"")
            _fsync_path(root)
            _remove_listed(root, spare_files - (set(keep) & set(files)))
        else:
            staging.mkdir()
            _write_file(staging / _DIRTY, b"")
        if reuse is None:
            reuse = {}
        made: set[str] = {root}
        for rel in sorted(files):
            if rel in keep:
                continue
            target = _target(root, rel)
            _hold(target)
            folder = os.path.dirname(target)
            if folder not in made:
                os.makedirs(folder, exist_ok=True)
                made.add(folder)
            if rel in reuse:
                try:
                    os.link(reuse[rel], target)
                    continue
                except OSError:
                    pass
            with open(target, "wb") as fh:
                fh.write(files[rel])
            written.append(target)
        if not (staging / MARKER).is_file():
            _write_file(staging / MARKER, _MARKER_TEXT)
            written.append(os.fspath(staging / MARKER))
        gitkeep = staging / ".gitkeep"
        if (out / ".gitkeep").exists() and not gitkeep.exists():
            _write_file(gitkeep, b"")
            written.append(os.fspath(gitkeep))
        elif not (out / ".gitkeep").exists() and gitkeep.exists():
            gitkeep.unlink()
        for d in written:
            # fsync so that a crash after the swap cannot expose empty files
            # (hard-linked and kept files are already on disk)
            _fsync_path(d)
        os.unlink(staging / _DIRTY)
        _fsync_path(root)
        if out.exists():
            if _exchange(staging, out):
                # staging now holds the previous site
                if staging != spare_root:
                    os.replace(staging, old)
            else:
                os.replace(out, old)
                os.replace(staging, out)
                if spare_holds is not None:
                    os.replace(old, spare_root)
        else:
            os.replace(staging, out)
    except BaseException:
        if staging.exists():
            shutil.rmtree(staging, ignore_errors=True)
        if old.exists() and not out.exists():
            os.replace(old, out)
        raise
    if old.exists():
        shutil.rmtree(old, ignore_errors=True)
    if spare_holds is not None and spare_root.is_dir() and not (spare_root / MARKER).is_file():
        # the folder that was current held no site yet (at most .gitkeep)
        shutil.rmtree(spare_root, ignore_errors=True)


def _remove_listed(root: str, rels: Collection[str]) -> None:
    """Delete these files under ``root`` (missing ones are fine), then
    every folder they leave empty."""
    folders: set[str] = set()
    for rel in rels:
        if rel in (MARKER, _DIRTY):
            continue
        path = _target(root, rel)
        try:
            os.unlink(path)
        except FileNotFoundError:
            continue
        folders.add(os.path.dirname(path))
    for folder in sorted(folders, key=len, reverse=True):
        while folder != root and folder.startswith(root + os.sep):
            try:
                os.rmdir(folder)  # only when empty
            except OSError:
                break
            folder = os.path.dirname(folder)


def _fsync_path(path: str) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)
