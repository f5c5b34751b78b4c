"""The build date.

Pages and review-deadline checks use one date. When the environment sets
``SOURCE_DATE_EPOCH`` (the reproducible-builds convention: a decimal
integer count of seconds since 1970-01-01T00:00:00Z, written like the
output of ``date +%s``) that date is used, in UTC, so a rebuild of the
same sources on another day gives the same bytes. Otherwise it is today.
"""

from __future__ import annotations

__all__ = ["ClockError", "build_date"]

import datetime as _dt
import os
import re
from collections.abc import Mapping

_VAR = "SOURCE_DATE_EPOCH"
_DIGITS = re.compile(r"[0-9]+")


class ClockError(ValueError):
    """``SOURCE_DATE_EPOCH`` is set but is not a usable timestamp."""


def build_date(environ: Mapping[str, str] | None = None) -> _dt.date:
    """The date the build is for.

    Args:
        environ: the environment to read (``os.environ`` by default).

    Returns:
        The UTC date of ``SOURCE_DATE_EPOCH`` when set and non-empty, else
        the local date today.

    Raises:
        ClockError: the variable holds anything but decimal digits, or a
            time outside the years 1970-9999.
    """
    env = os.environ if environ is None else environ
    raw = env.get(_VAR)
    # An empty value is how CI systems often leave a variable "unset".
    if raw is None or raw == "":
        return _dt.date.today()
    # The convention forbids normalising the value, so " 1700000000" and
    # "1.7e9" are errors rather than guesses.
    if not _DIGITS.fullmatch(raw):
        raise ClockError(
            f"{_VAR}={raw!r} is not a whole number of seconds since 1970-01-01 UTC"
            " (expected digits only, e.g. the output of `date +%s`)"
        )
    try:
        moment = _dt.datetime.fromtimestamp(int(raw), tz=_dt.UTC)
    except (OverflowError, OSError, ValueError):
        raise ClockError(f"{_VAR}={raw} is too large to be a date (after the year 9999)") from None
    return moment.date()
