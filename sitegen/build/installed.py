"""Installed versions of distributions, read from their ``.dist-info``
folder names (``{name}-{version}.dist-info``, the installed-package
layout of PEP 376 and PEP 427), with :mod:`importlib.metadata` as the
fallback.

Importing :mod:`importlib.metadata` pulls in the email package and takes
about 30 ms, more than every other step of a build that changed nothing;
the folder names tell the same version for the usual installs.
"""

from __future__ import annotations

__all__ = ["installed_version"]

import functools
import os
import re
import sys

_SUFFIX = ".dist-info"


def _normalise(name: str) -> str:
    # the file-name form of a distribution name (PEP 503 and PEP 427)
    return re.sub(r"[-_.]+", "_", name).lower()


@functools.cache
def _listing(folder: str) -> tuple[str, ...]:
    try:
        return tuple(os.listdir(folder))
    except OSError:
        return ()


@functools.cache
def installed_version(name: str) -> str | None:
    """The version of the installed distribution ``name`` that Python
    would import (the first on ``sys.path``), or None if it is not
    installed."""
    want = _normalise(name)
    for entry in sys.path:
        found = [
            version
            for dist, _, version in (
                f[: -len(_SUFFIX)].rpartition("-")
                for f in _listing(entry or ".") if f.endswith(_SUFFIX)
            )
            if _normalise(dist) == want
        ]
        if len(found) == 1:
            return found[0]
        if found:  # two versions side by side: let the standard library decide
            break
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version(name)
    except PackageNotFoundError:
        return None
