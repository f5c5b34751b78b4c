"""The GHS code table: hazard (H, EUH) and precautionary (P) statements,
pictograms and the signal words each hazard statement is assigned with.

The data is ``sitegen/data/ghs.yaml``; its header says where the wording
comes from and how sure it is. The table is read once per process.

Codes are compared in one normal form (:func:`normalise`): upper case, no
spaces, so ``"p305 + p351 + p338"`` and ``"P305+P351+P338"`` are the same
code.
"""

from __future__ import annotations

__all__ = [
    "SIGNAL_RANK",
    "GhsTable",
    "HazardCode",
    "code_sort_key",
    "combined_text",
    "is_withdrawn",
    "known_h",
    "known_p",
    "normalise",
    "pictogram_name",
    "signal_for_h",
    "signal_options",
    "statement",
    "table",
]

import functools
import re
from dataclasses import dataclass
from importlib import resources

import yaml

#: Signal words by strength; a label carries the strongest that applies
#: (UN GHS Rev. 10, 1.4.10.5.2 (a): "Danger" takes precedence, from memory).
SIGNAL_RANK: dict[str, int] = {"none": 0, "Warning": 1, "Danger": 2}

_PART = re.compile(r"^(EUH|H|P)(\d{3})([A-Za-z]{0,2})$")
_PREFIX = re.compile(r"(?i)(?:^|(?<=\+))(euh|h|p)(?=\d)")


@dataclass(frozen=True)
class HazardCode:
    """One hazard statement.

    Attributes:
        code: e.g. ``H314`` or ``H301+H311``.
        text: its wording.
        signals: the signal words it is assigned with, strongest first
            (``("none",)`` when its categories carry none).
        pictograms: the pictogram codes its categories carry.
        note: a remark on the entry (changed recently, not adopted in CLP).
    """

    code: str
    text: str
    signals: tuple[str, ...]
    pictograms: tuple[str, ...]
    note: str | None = None


@dataclass(frozen=True)
class GhsTable:
    """The whole table, as read from the data file."""

    hazard: dict[str, HazardCode]
    precautionary: dict[str, str]
    pictograms: dict[str, str]
    withdrawn: frozenset[str] = frozenset()


def normalise(code: str) -> str:
    """A code in its normal form: spaces removed and the H/P/EUH prefix of
    each part in upper case. Letters after the number keep their case,
    since CLP's H360Fd and H360FD are different statements."""
    return _PREFIX.sub(lambda m: m.group(0).upper(), re.sub(r"\s+", "", code))


def code_sort_key(code: str) -> tuple[int, tuple[int, ...], str]:
    """Canonical order: H before EUH, then by the numbers of each part, so
    ``H302 < H302+H312 < H314 < EUH014`` and ``P280 < P301+P330+P331``."""
    parts = normalise(code).split("+")
    nums: list[int] = []
    family = 0
    for i, p in enumerate(parts):
        m = _PART.match(p)
        if m is None:
            return (9, (), code)
        if i == 0:
            family = {"H": 0, "P": 0, "EUH": 1}[m.group(1)]
        nums.append(int(m.group(2)))
    return (family, tuple(nums), code)


@functools.cache
def table() -> GhsTable:
    """The GHS table, read once from the package data."""
    text = resources.files("sitegen").joinpath("data/ghs.yaml").read_text(encoding="utf-8")
    # libyaml's parser when PyYAML was built with it: the table is ~30 kB and
    # the pure-Python parser takes ten times as long over it
    raw = yaml.load(text, Loader=getattr(yaml, "CSafeLoader", yaml.SafeLoader))
    hazard = {
        normalise(k): HazardCode(
            code=normalise(k),
            text=v["text"],
            signals=tuple(v["signal"]),
            pictograms=tuple(v.get("pictograms", ())),
            note=v.get("note"),
        )
        for k, v in raw["hazard"].items()
    }
    precautionary: dict[str, str] = {}
    withdrawn: set[str] = set()
    for k, v in raw["precautionary"].items():
        if isinstance(v, dict):
            precautionary[normalise(k)] = v["text"]
            if v.get("withdrawn"):
                withdrawn.add(normalise(k))
        else:
            precautionary[normalise(k)] = v
    return GhsTable(
        hazard=hazard,
        precautionary=precautionary,
        pictograms=dict(raw["pictograms"]),
        withdrawn=frozenset(withdrawn),
    )


def known_h(code: str) -> bool:
    """Whether ``code`` is a hazard statement (H or EUH) in the table."""
    return normalise(code) in table().hazard


def is_withdrawn(code: str) -> bool:
    """Whether ``code`` is a precautionary statement withdrawn in a later
    revision (still known, so older safety data sheets can be read)."""
    return normalise(code) in table().withdrawn


def combined_text(code: str) -> str | None:
    """Wording of a ``+`` combination that is not in the table but whose
    parts all are (the parts' wording joined), else None."""
    parts = normalise(code).split("+")
    if len(parts) < 2:
        return None
    try:
        return " ".join(statement(p) for p in parts)
    except KeyError:
        return None


def known_p(code: str) -> bool:
    """Whether ``code`` is a precautionary statement in the table."""
    return normalise(code) in table().precautionary


def statement(code: str) -> str:
    """The wording of a hazard or precautionary statement.

    Raises:
        KeyError: the code is not in the table (the message names it).
    """
    c = normalise(code)
    t = table()
    if c in t.hazard:
        return t.hazard[c].text
    if c in t.precautionary:
        return t.precautionary[c]
    raise KeyError(f"{code!r} is not a GHS/EUH hazard or precautionary statement in the table")


def pictogram_name(code: str) -> str:
    """The name of a pictogram, e.g. ``GHS05`` -> ``corrosion``.

    Raises:
        KeyError: not one of GHS01..GHS09.
    """
    c = normalise(code)
    try:
        return table().pictograms[c]
    except KeyError:
        raise KeyError(f"{code!r} is not a GHS pictogram (GHS01..GHS09)") from None


def signal_options(code: str) -> tuple[str, ...]:
    """Every signal word the hazard statement is assigned with, strongest
    first, e.g. ``H272`` -> ``("Danger", "Warning")`` (oxidising category 2
    and 3).

    Raises:
        KeyError: not a hazard statement in the table.
    """
    c = normalise(code)
    try:
        return table().hazard[c].signals
    except KeyError:
        raise KeyError(f"{code!r} is not a hazard statement in the table") from None


def signal_for_h(code: str) -> str:
    """The signal word a hazard statement implies on its own: the weakest
    it is ever assigned with (``H314`` -> ``Danger``, ``H302`` ->
    ``Warning``, ``H272`` -> ``Warning`` since category 3 carries Warning,
    ``H412`` -> ``none``). A label with this statement carries at least
    this signal word.

    Raises:
        KeyError: not a hazard statement in the table.
    """
    return min(signal_options(code), key=SIGNAL_RANK.__getitem__)
