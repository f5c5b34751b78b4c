"""The jinja2 environment of a theme, cached per theme folder.

Autoescaping is on and undefined names raise (StrictUndefined), so a
template typo fails the build instead of printing an empty string, and
record text is always escaped unless a view-model marks it as HTML that
this package produced (:class:`markupsafe.Markup`).
"""

from __future__ import annotations

__all__ = ["DEFAULT_THEME", "environment", "theme_layers"]

from functools import lru_cache
from pathlib import Path

from jinja2 import ChoiceLoader, Environment, FileSystemLoader, StrictUndefined

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


@lru_cache(maxsize=8)
def _environment(theme_dir: str) -> Environment:
    loaders = [FileSystemLoader(str(p / "templates")) for p in theme_layers(Path(theme_dir))]
    return Environment(
        loader=ChoiceLoader(loaders),
        autoescape=True,
        undefined=StrictUndefined,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
    )


def environment(theme_dir: Path) -> Environment:
    """The environment for ``theme_dir`` (holding ``templates/``)."""
    return _environment(str(Path(theme_dir).resolve()))
