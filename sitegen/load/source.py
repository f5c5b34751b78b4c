"""Reading a file into a :class:`Source`, and nothing else.

Reading is kept apart from parsing so that tests (and the cache) can hand
text to the parser directly.
"""

from __future__ import annotations

__all__ = ["MAX_BYTES", "Source", "SourceProblem", "read_source"]

import hashlib
from dataclasses import dataclass
from pathlib import Path

#: A method record is a page of text; anything over 1 MiB is a mistake
#: (or an attack) and is refused before it is parsed.
MAX_BYTES = 1024 * 1024


@dataclass(frozen=True)
class Source:
    """One file's text.

    Attributes:
        path: the path as shown in findings.
        text: the decoded UTF-8 text.
        digest: sha256 hex digest of the raw bytes.
    """

    path: str
    text: str
    digest: str

    @property
    def fingerprint(self) -> str:
        """A short content fingerprint shown on pages (first 12 hex digits)."""
        return self.digest[:12]

    def line(self, n: int) -> str | None:
        """The 1-based source line ``n``, or None."""
        lines = self.text.splitlines()
        return lines[n - 1] if 1 <= n <= len(lines) else None


@dataclass(frozen=True)
class SourceProblem:
    """Why a file could not be read as text: rule id, message, position."""

    rule: str
    message: str
    line: int = 1
    col: int = 1


def decode(path: str, raw: bytes) -> Source | SourceProblem:
    """Decode raw bytes as a UTF-8 record, refusing binary and huge input."""
    if len(raw) > MAX_BYTES:
        return SourceProblem(
            "file-too-large",
            f"file is {len(raw):,} bytes; records are limited to {MAX_BYTES:,} bytes",
        )
    if b"\x00" in raw:
        off = raw.index(b"\x00")
        line = raw.count(b"\n", 0, off) + 1
        col = off - (raw.rfind(b"\n", 0, off) + 1) + 1
        return SourceProblem(
            "binary-file", "file holds NUL bytes; it is not a text record", line, col
        )
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        off = exc.start
        line = raw.count(b"\n", 0, off) + 1
        col = off - (raw.rfind(b"\n", 0, off) + 1) + 1
        return SourceProblem(
            "not-utf8",
            f"byte 0x{raw[off]:02x} is not valid UTF-8; save the file as UTF-8",
            line,
            col,
        )
    if text.startswith("\ufeff"):
        text = text[1:]
    return Source(path=path, text=text, digest=hashlib.sha256(raw).hexdigest())


def read_source(path: Path, shown: str | None = None) -> Source | SourceProblem:
    """Read ``path``; ``shown`` is the name used in findings."""
    name = shown or str(path)
    try:
        size = path.stat().st_size
        if size > MAX_BYTES:
            return SourceProblem(
                "file-too-large",
                f"file is {size:,} bytes; records are limited to {MAX_BYTES:,} bytes",
            )
        raw = path.read_bytes()
    except OSError as exc:
        return SourceProblem("unreadable-file", f"cannot read file: {exc.strerror or exc}")
    return decode(name, raw)
