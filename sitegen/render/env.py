"""The jinja2 environment of a theme, cached per theme folder.

Autoescaping is on and undefined names raise (StrictUndefined), so a
template typo fails the build instead of printing an empty string, and
record text is always escaped unless a view-model marks it as HTML that
this package produced (:class:`markupsafe.Markup`).
"""

from __future__ import annotations

__all__ = ["environment"]

from functools import lru_cache
from pathlib import Path

from jinja2 import Environment, FileSystemLoader, StrictUndefined


@lru_cache(maxsize=8)
def _environment(theme_dir: str) -> Environment:
    return Environment(
        loader=FileSystemLoader(str(Path(theme_dir) / "templates")),
        autoescape=True,
        undefined=StrictUndefined,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
    )


def environment(theme_dir: Path) -> Environment:
    """The environment for ``theme_dir`` (holding ``templates/``)."""
    return _environment(str(Path(theme_dir).resolve()))
