"""Quantities with units, as method owners write them ("25.00 mL").

pint does the parsing and the conversion; this module only adds what a
record needs on top: the text as written (for the page), the number of
decimals written (a worked example's stated rounding) and a check of the
dimension each field expects.
"""

from __future__ import annotations

__all__ = [
    "DIMENSIONS",
    "Measure",
    "UnitError",
    "convert",
    "known",
    "parse_measure",
    "prime",
    "registry",
    "use_cache_folder",
]

import contextlib
import functools
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any

#: Where pint may keep its parsed unit definitions between processes
#: (see :func:`use_cache_folder`); None: parse them in every process.
_CACHE_FOLDER: list[Path | None] = [None]


def use_cache_folder(folder: Path | None) -> None:
    """Let the unit registry keep its parsed definitions under ``folder``
    (pint's own disk cache): building the registry then takes a few tens
    of milliseconds instead of a few hundred. Takes effect only before the
    registry is first used."""
    _CACHE_FOLDER[0] = folder


@functools.cache
def registry() -> Any:
    """The process's one pint registry (quantities from different
    registries cannot be combined), built on first use: importing pint and
    parsing its definitions is most of the cost of reading a record, and a
    build that reuses every record needs neither."""
    import pint

    kwargs: dict[str, Any] = {"autoconvert_offset_to_baseunit": True}
    ureg = None
    if _CACHE_FOLDER[0] is not None:
        try:
            ureg = pint.UnitRegistry(cache_folder=_CACHE_FOLDER[0], **kwargs)
        except Exception:  # an unwritable or damaged cache: parse afresh
            ureg = None
    if ureg is None:
        ureg = pint.UnitRegistry(**kwargs)
    for name, definition in (
        ("percent", "percent = 0.01 = %"),
        ("permille", "permille = 0.001 = ‰"),
        ("ppm", "ppm = 1e-6"),
    ):
        if name not in ureg:  # newer pint releases define some of these already
            ureg.define(definition)
    return ureg


def __getattr__(name: str) -> Any:
    # ``from sitegen.units import ureg`` builds the registry when asked
    if name == "ureg":
        return registry()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


#: Field kinds and the base unit values are normalised to. The key is the
#: word used in schema descriptions and messages.
DIMENSIONS: dict[str, str] = {
    "volume": "mL",
    "mass": "g",
    "concentration": "mol/L",
    "potential": "V",
    "temperature": "K",
    "molar_mass": "g/mol",
    "mass_fraction": "percent",
    "mass_concentration": "mg/L",
    "dimensionless": "",
}

_NUMBER = re.compile(r"^\s*([+-]?(?:\d+(?:\.(\d*))?|\.(\d+))(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")


class UnitError(ValueError):
    """A quantity that cannot be read or has the wrong dimension."""


@dataclass(frozen=True)
class Measure:
    """A number with a unit, as written in a record.

    Attributes:
        text: the quantity as written, e.g. ``"25.00 mL"``.
        value: the magnitude converted to the kind's base unit (see
            :data:`DIMENSIONS`), e.g. 25.0 for mL.
        unit: that base unit.
        decimals: decimals written in the number (``"25.00 mL"`` -> 2),
            used as the stated rounding of a result.
        kind: the field kind (``"volume"``, ...).
    """

    text: str
    value: float
    unit: str
    decimals: int
    kind: str

    def __str__(self) -> str:
        return self.text


#: What has been read and converted in this process (and, through
#: :func:`known` and :func:`prime`, in earlier ones): (function name,
#: arguments) -> the result, or the message of the UnitError raised.
_MEMO: dict[tuple[Any, ...], Any] = {}


def known() -> dict[tuple[Any, ...], Any]:
    """Every quantity read and every conversion made so far, for a caller
    that keeps them between processes (see :func:`prime`)."""
    return dict(_MEMO)


def prime(entries: dict[tuple[Any, ...], Any]) -> None:
    """Take results of earlier processes (from :func:`known`, made with the
    same code and pint release): a process whose quantities are all known
    then never imports pint."""
    for k, v in entries.items():
        _MEMO.setdefault(k, v)


def _memo(name: str) -> Any:
    def wrap(func: Any) -> Any:
        @functools.wraps(func)
        def memoised(*args: Any) -> Any:
            k = (name, *args)
            try:
                hit = _MEMO[k]
            except (KeyError, TypeError):
                try:
                    hit = func(*args)
                except UnitError as exc:
                    hit = _Failed(str(exc))
                with contextlib.suppress(TypeError):  # unhashable arguments: not kept
                    _MEMO[k] = hit
            if isinstance(hit, _Failed):
                raise UnitError(hit.message)
            return hit

        return memoised

    return wrap


@dataclass(frozen=True)
class _Failed:
    message: str


def convert(value: float, unit: str, to: str) -> float:
    """``value`` in ``unit`` expressed in ``to`` (pint's conversion; ``%``
    is read as percent).

    Raises:
        UnitError: either unit is unknown, or they measure different things.
    """
    return float(_convert(float(value), unit, to))


@_memo("convert")
def _convert(value: float, unit: str, to: str) -> float:
    import pint

    ureg = registry()
    try:
        a = ureg.Unit(unit.replace("%", "percent"))
        b = ureg.Unit(to.replace("%", "percent"))
        return float(ureg.Quantity(value, a).to(b).magnitude)
    except (pint.errors.PintError, AttributeError, TypeError, ValueError) as exc:
        raise UnitError(f"cannot express {unit!r} in {to!r}") from exc


@_memo("measure")
def parse_measure(text: str | int | float, kind: str) -> Measure:
    """Read ``"25.00 mL"`` as a :class:`Measure` of the given kind.

    Raises:
        UnitError: the text is not a number followed by a unit of the
            dimension that ``kind`` needs.
    """
    if kind not in DIMENSIONS:
        raise KeyError(kind)
    base = DIMENSIONS[kind]
    raw = str(text).strip()
    m = _NUMBER.match(raw)
    if not m:
        raise UnitError(f"{raw!r} is not a number followed by a unit (e.g. '25.00 mL')")
    number, dec_a, dec_b, unit_text = m.group(1), m.group(2), m.group(3), m.group(4)
    mantissa = number.split("e")[0].split("E")[0]
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    del dec_a, dec_b
    unit_text = unit_text.replace("°C", "degC").replace("µ", "u").replace("μ", "u")
    if unit_text in {"M"}:
        unit_text = "mol/L"
    if unit_text == "" and base not in {"", "percent"}:
        raise UnitError(f"{raw!r} has no unit; write it with one, e.g. '{number} {base}'")
    import pint

    ureg = registry()
    try:
        unit = ureg.Unit(unit_text) if unit_text else ureg.dimensionless
        q = ureg.Quantity(float(number), unit)
        value = float(q.to(base).magnitude) if base else float(q.to("").magnitude)
    except (pint.errors.PintError, AttributeError, TypeError, ValueError) as exc:
        want = f"a {kind.replace('_', ' ')} unit such as '{base}'" if base else "no unit"
        raise UnitError(f"{raw!r}: unit {unit_text!r} is not {want}") from exc
    if value < 0 and kind in _NON_NEGATIVE:
        raise UnitError(f"{raw!r}: a {kind.replace('_', ' ')} cannot be negative")
    if kind == "temperature" and value <= 0:
        raise UnitError(f"{raw!r} is at or below absolute zero")
    return Measure(text=raw, value=value, unit=base, decimals=decimals, kind=kind)


#: Kinds that are physically never negative (potentials can be).
_NON_NEGATIVE = frozenset(
    {"volume", "mass", "concentration", "molar_mass", "mass_fraction", "mass_concentration"}
)
