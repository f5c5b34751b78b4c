"""Write a whole site atomically.

The new site is staged in a sibling folder and swapped in with renames
only when every file is written, so a failed, interrupted or killed build
leaves the previous site exactly as it was. A marker file tells our own
output folders from a user's folder, which is never deleted.
"""

from __future__ import annotations

__all__ = ["MARKER", "OutputRefused", "check_output_dir", "write_site"]

import ctypes
import ctypes.util
import os
import shutil
from collections.abc import Mapping
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
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6", use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError):
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


def write_site(
    out: Path, files: Mapping[str, bytes], reuse: Mapping[str, str | Path] | None = None
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
    """
    out = out.resolve()
    parent = out.parent
    parent.mkdir(parents=True, exist_ok=True)
    staging = parent / f".{out.name}.staging-{os.getpid()}"
    old = parent / f".{out.name}.old-{os.getpid()}"
    for leftover in (staging, old):
        if leftover.exists():
            shutil.rmtree(leftover)
    staging.mkdir()
    try:
        written: list[Path] = []
        reuse = reuse or {}
        root = os.fspath(staging)
        made: set[str] = {root}
        for rel in sorted(files):
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
            written.append(Path(target))
        _write_file(staging / MARKER, _MARKER_TEXT)
        written.append(staging / MARKER)
        if (out / ".gitkeep").exists():
            _write_file(staging / ".gitkeep", b"")
            written.append(staging / ".gitkeep")
        for d in written:
            # fsync so that a crash after the swap cannot expose empty files
            # (hard-linked files are the previous site's, already on disk)
            with open(d, "rb") as fh:
                os.fsync(fh.fileno())
        if out.exists():
            if _exchange(staging, out):
                # staging now holds the previous site
                os.replace(staging, old)
            else:
                os.replace(out, old)
                os.replace(staging, out)
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
