"""The jinja2 environment of a theme, cached per theme folder.

Autoescaping is on and undefined names raise (StrictUndefined), so a
template typo fails the build instead of printing an empty string, and
record text is always escaped unless a view-model marks it as HTML that
this package produced (:class:`markupsafe.Markup`).
"""

from __future__ import annotations

__all__ = ["DEFAULT_THEME", "environment", "theme_layers", "use_bytecode_folder"]

import hashlib
import os
from functools import lru_cache
from pathlib import Path

import jinja2
from jinja2 import (
    ChoiceLoader,
    Environment,
    FileSystemBytecodeCache,
    FileSystemLoader,
    StrictUndefined,
)
from jinja2.bccache import Bucket

#: The theme shipped with sitegen (the project's theme/ folder). A lab's
#: own theme only needs the templates and static files it changes; the
#: rest come from here.
DEFAULT_THEME = Path(__file__).resolve().parents[2] / "theme"


def theme_layers(theme_dir: Path) -> list[Path]:
    """The lab's theme first, then the default theme (once)."""
    layers = [Path(theme_dir).resolve()]
    if DEFAULT_THEME.is_dir() and DEFAULT_THEME.resolve() != layers[0]:
        layers.append(DEFAULT_THEME.resolve())
    return layers


#: The environment's settings; they shape the compiled templates, so the
#: bytecode folder is keyed on them too.
_SETTINGS: dict[str, object] = {
    "autoescape": True,
    "keep_trailing_newline": True,
    "trim_blocks": True,
    "lstrip_blocks": True,
}

#: Where compiled templates are kept between processes (see
#: :func:`use_bytecode_folder`); None: compile them in every process.
_BYTECODE_FOLDER: list[Path | None] = [None]


def use_bytecode_folder(folder: Path | None) -> None:
    """Keep the templates' compiled code under ``folder`` (jinja2's own
    bytecode cache) so that a process need not compile every template
    again: that is a few tens of milliseconds of every small rebuild.

    jinja2 checks each entry against its template's source before use
    and writes entries atomically; the folder below ``folder`` is named
    after the jinja2 version and the settings above, which the cache's
    own check does not cover."""
    _BYTECODE_FOLDER[0] = folder


class _BytecodeFolder(FileSystemBytecodeCache):
    """jinja2's folder cache, treating any unreadable entry as missing
    (jinja2 itself lets a few kinds of damage raise) and a folder that
    cannot be written, or was deleted under a long-lived process, as a
    cache that keeps nothing."""

    def load_bytecode(self, bucket: Bucket) -> None:
        try:
            super().load_bytecode(bucket)
        except Exception:
            bucket.reset()

    def dump_bytecode(self, bucket: Bucket) -> None:
        try:
            os.makedirs(self.directory, exist_ok=True)
            super().dump_bytecode(bucket)
        except OSError:
            pass


@lru_cache(maxsize=8)
def _bytecode_cache(folder: str) -> FileSystemBytecodeCache:
    tag = hashlib.sha256(repr((jinja2.__version__, sorted(_SETTINGS.items()))).encode())
    return _BytecodeFolder(str(Path(folder) / tag.hexdigest()[:16]))


@lru_cache(maxsize=8)
def _environment(theme_dir: str) -> Environment:
    loaders = [FileSystemLoader(str(p / "templates")) for p in theme_layers(Path(theme_dir))]
    return Environment(
        loader=ChoiceLoader(loaders),
        undefined=StrictUndefined,
        **_SETTINGS,  # type: ignore[arg-type]
    )


def environment(theme_dir: Path) -> Environment:
    """The environment for ``theme_dir`` (holding ``templates/``)."""
    env = _environment(str(Path(theme_dir).resolve()))
    folder = _BYTECODE_FOLDER[0]
    env.bytecode_cache = None if folder is None else _bytecode_cache(str(folder))
    return env
