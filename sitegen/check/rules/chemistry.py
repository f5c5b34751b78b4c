"""Rules that report what the chemistry core found while analysing a
method: formulas, balance of reactions and half-reactions, couples.

The analysis stage does the chemistry once; each rule here surfaces the
findings of its own id, so rules can be enabled, disabled and listed like
any other.
"""

from __future__ import annotations

__all__: list[str] = []

from collections.abc import Callable, Iterator
from typing import Any

from ...errors import Finding
from ..registry import Context, rule


def _surface(rule_id: str) -> Callable[[Context, Any, Any], Iterator[Finding]]:
    def run(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
        if analysis is None:
            return
        yield from (f for f in analysis.findings if f.rule == rule_id)

    return run


_DOCS = {
    "bad-formula": "Every species, reaction and half-reaction must be written in the species"
    " notation (elements, counts, charges with a caret such as Fe^3+); unknown elements and"
    " impossible formulas are errors.",
    "reaction-unbalanced": "Every reaction and half-reaction must balance in atoms and in"
    " charge; the finding names the element or the charge that is off, and by how much.",
    "couple-form": "A couple is written as a reduction with one oxidised and one reduced"
    " species: a Ox + m H+ + n e- = b Red (+ water).",
    "couple-n-mismatch": "A couple's stated n must equal the electrons its half-reaction"
    " transfers.",
    "titration-couples-mismatch": "The titration reaction must be the electron-balanced sum of"
    " the titrant's and the titrand's half-reactions.",
    "chemistry-undecided": "The chemistry core could not decide a question the method needs"
    " answered (for example a stoichiometric chain with no path from analyte to titrant).",
    "curve-failed": "The exact titration curve must be computable from the couples and the"
    " method's amounts.",
}

for _id, _doc in _DOCS.items():
    _fn = _surface(_id)
    _fn.__doc__ = _doc
    _fn.__name__ = _id.replace("-", "_")
    rule(_id)(_fn)


@rule("reagent-formula", scope="reagent")
def reagent_formula(ctx: Context, loaded: Any) -> Iterator[Finding]:
    """A reagent's formula and the species it supplies must be written in
    the species notation, with known elements, so its molar mass can be
    computed from the IUPAC atomic weights."""
    from ...chem.errors import ChemError
    from ...chem.formula import molar_mass, parse_species

    rec = loaded.record
    for key in ("formula", "supplies"):
        text = getattr(rec, key)
        if text is None:
            continue
        try:
            sp = parse_species(text)
            if key == "formula":
                molar_mass(sp)
        except ChemError as exc:
            yield ctx.finding("reagent-formula", loaded, (key,), f"{key} {text!r}: {exc}")
