"""Average oxidation numbers per element, by the usual textbook rules.

Rules, applied per adduct part (the charge belongs to the first part; water
of crystallisation and other later parts are neutral), in priority order:

1. A part made of one element: charge / number of atoms (O2, Fe: 0;
   I3-: -1/3; O2^2-: -1).
2. F is -1. Alkali metals are +1, alkaline-earth metals +2.
3. H is +1, except -1 when every other element of the part is a metal or
   boron (metal hydrides: NaH, CaH2, LiAlH4, NaBH4).
4. O is -2, except in the presence of F (OF2: O takes the balance).
5. Cl, Br, I are -1 unless O or a more electronegative halogen is present
   (F > Cl > Br > I), in which case they take the balance (ICl: Cl -1).
6. One remaining element takes the balance of the charge.
7. Peroxides and superoxides. If, with O at -2, nothing is left to take the
   balance and the charge does not add up (H2O2, Na2O2, KO2), O takes the
   balance instead. If the one remaining element would exceed its group
   maximum (e.g. S above +6 in S2O8^2-, H2SO5; Cr above +6 in CrO5), that
   element is set to its maximum and O takes the balance - giving the
   correct *average* for peroxo species (O in S2O8^2- = -7/4).
8. Two or more unknown elements: the part is split into common polyatomic
   ions of known internal oxidation states (NH4+ N -3, SO4^2- S +6, NO3-
   N +5, CN- C +2/N -3, ...; table ``_IONS``), tried in table order with as
   many copies as fit, until at most one unknown remains. Failing that, a
   few metals with a single common state (Al +3, Zn +2, Ag +1, ...) are
   fixed. If still undecidable, :class:`CannotBalance` is raised.

Group maxima and fixed states are textbook knowledge (common practice),
e.g. Greenwood & Earnshaw, Chemistry of the Elements, 2nd ed. (from memory).
"""

from __future__ import annotations

__all__ = ["RedoxChanges", "oxidation_numbers", "redox_changes"]

from collections import Counter
from fractions import Fraction
from functools import lru_cache
from itertools import pairwise
from typing import TypedDict

from sitegen.chem.errors import CannotBalance
from sitegen.chem.formula import Species, parse_species
from sitegen.chem.reaction import Reaction

_ALKALI = frozenset({"Li", "Na", "K", "Rb", "Cs", "Fr"})
_ALKALINE_EARTH = frozenset({"Be", "Mg", "Ca", "Sr", "Ba", "Ra"})
# Non-metals and metalloids; the hydride rule treats B like a metal (NaBH4).
_NONMETALS = frozenset(
    "H He B C N O F Ne Si P S Cl Ar As Se Br Kr Te I Xe At Rn Og Ts".split()  # noqa: SIM905
)
# Halogens in decreasing electronegativity (Pauling scale; common practice).
_HALOGENS = ("F", "Cl", "Br", "I")

# Highest common oxidation state = group number (common practice, from
# memory); used only to detect peroxo oxygen.
_MAX_STATE = {
    "B": 3, "C": 4, "N": 5, "Si": 4, "P": 5, "S": 6, "Cl": 7, "Ti": 4, "V": 5,
    "Cr": 6, "Mn": 7, "Fe": 6, "Co": 4, "Ni": 4, "Cu": 3, "Zn": 2, "Ge": 4,
    "As": 5, "Se": 6, "Br": 7, "Mo": 6, "Ru": 8, "Sn": 4, "Sb": 5, "Te": 6,
    "I": 7, "Xe": 8, "Ce": 4, "W": 6, "Os": 8, "Pb": 4, "Bi": 5, "U": 6,
}  # fmt: skip

# Common polyatomic ions: (composition, charge, internal oxidation states).
# Standard textbook assignments (common practice).
_IONS: tuple[tuple[dict[str, int], int, dict[str, Fraction]], ...] = tuple(
    (comp, q, {k: Fraction(v) for k, v in states.items()})
    for comp, q, states in (
        ({"N": 1, "H": 4}, 1, {"N": -3, "H": 1}),
        ({"S": 1, "O": 4}, -2, {"S": 6, "O": -2}),
        ({"N": 1, "O": 3}, -1, {"N": 5, "O": -2}),
        ({"N": 1, "O": 2}, -1, {"N": 3, "O": -2}),
        ({"P": 1, "O": 4}, -3, {"P": 5, "O": -2}),
        ({"C": 2, "O": 4}, -2, {"C": 3, "O": -2}),
        ({"C": 1, "O": 3}, -2, {"C": 4, "O": -2}),
        ({"S": 1, "C": 1, "N": 1}, -1, {"S": -2, "C": 4, "N": -3}),
        ({"C": 1, "N": 1}, -1, {"C": 2, "N": -3}),
        ({"Cl": 1, "O": 4}, -1, {"Cl": 7, "O": -2}),
        ({"Cl": 1, "O": 3}, -1, {"Cl": 5, "O": -2}),
        ({"Br": 1, "O": 3}, -1, {"Br": 5, "O": -2}),
        ({"I": 1, "O": 3}, -1, {"I": 5, "O": -2}),
        ({"I": 1, "O": 4}, -1, {"I": 7, "O": -2}),
        ({"Cr": 2, "O": 7}, -2, {"Cr": 6, "O": -2}),
        ({"Cr": 1, "O": 4}, -2, {"Cr": 6, "O": -2}),
        ({"Mn": 1, "O": 4}, -1, {"Mn": 7, "O": -2}),
        ({"S": 2, "O": 3}, -2, {"S": 2, "O": -2}),
        ({"S": 1, "O": 3}, -2, {"S": 4, "O": -2}),
        ({"As": 1, "O": 4}, -3, {"As": 5, "O": -2}),
        ({"C": 2, "H": 3, "O": 2}, -1, {"C": 0, "H": 1, "O": -2}),
    )
)

# Metals with one common oxidation state (common practice).
_COMMON_FIXED = {"Al": 3, "Zn": 2, "Cd": 2, "Ag": 1, "Sc": 3, "Ga": 3, "Y": 3, "La": 3}


class RedoxChanges(TypedDict):
    """Result of :func:`redox_changes` (a plain dict at run time)."""

    oxidised: dict[str, Fraction]
    """Element -> electrons lost, mol per mol of reaction as written."""
    reduced: dict[str, Fraction]
    """Element -> electrons gained."""
    electrons: Fraction
    """Electrons transferred (the larger of lost and gained)."""


class _Undecidable(Exception):
    pass


def _fixed_states(comp: dict[str, int]) -> dict[str, Fraction]:
    fixed: dict[str, Fraction] = {}
    others_metallic = all(s not in _NONMETALS or s == "B" for s in comp if s != "H")
    for sym in comp:
        if sym == "F":
            fixed[sym] = Fraction(-1)
        elif sym in _ALKALI:
            fixed[sym] = Fraction(1)
        elif sym in _ALKALINE_EARTH:
            fixed[sym] = Fraction(2)
        elif sym == "H":
            fixed[sym] = Fraction(-1) if others_metallic else Fraction(1)
        elif sym == "O" and "F" not in comp:
            fixed[sym] = Fraction(-2)
        elif sym in _HALOGENS:
            stronger = _HALOGENS[: _HALOGENS.index(sym)]
            if "O" not in comp and not any(h in comp for h in stronger):
                fixed[sym] = Fraction(-1)
    # A metal hydride's H is -1 only if the "metals" are not all boron-free
    # nonsense like a lone H; single-element parts never get here.
    return fixed


def _solve_with(
    comp: dict[str, int], charge: Fraction, fixed: dict[str, Fraction], nested: bool = False
) -> dict[str, Fraction] | None:
    """Solve when at most one element is unknown; None if more remain.

    ``nested``: ``comp`` is what is left after peeling off ions. Then a
    mismatch with every state fixed means the split was wrong (None), not a
    peroxide.
    """
    unknown = [s for s in comp if s not in fixed]
    residual = charge - sum((comp[s] * v for s, v in fixed.items() if s in comp), Fraction(0))
    if not unknown:
        if residual == 0:
            return {s: fixed[s] for s in comp}
        if nested:
            return None
        if "O" in comp and fixed.get("O") == -2:
            out = {s: fixed[s] for s in comp}
            rest = sum((comp[s] * v for s, v in fixed.items() if s != "O"), Fraction(0))
            out["O"] = (charge - rest) / comp["O"]
            return out
        raise _Undecidable("the fixed oxidation states do not add up to the charge")
    if len(unknown) > 1:
        return None
    x = unknown[0]
    out = {s: fixed[s] for s in comp if s != x}
    value = residual / comp[x]
    cap = _MAX_STATE.get(x)
    if cap is not None and value > cap and out.get("O") == -2:
        # Peroxo oxygen: the element sits at its maximum, O takes the rest.
        out[x] = Fraction(cap)
        rest = sum((comp[s] * v for s, v in out.items() if s != "O"), Fraction(0))
        out["O"] = (charge - rest) / comp["O"]
        return out
    out[x] = value
    return out


def _split_ions(
    comp: dict[str, int],
    charge: Fraction,
    fixed: dict[str, Fraction],
    depth: int,
    whole: dict[str, int] | None = None,
) -> dict[str, Fraction] | None:
    """Peel off known polyatomic ions until one unknown remains.

    Returns total oxidation number per element (sum over atoms) divided back
    into averages, or None.
    """
    whole = comp if whole is None else whole
    direct = _solve_with(comp, charge, fixed, nested=depth > 0)
    if direct is not None:
        return direct
    if depth > 4:
        return None
    unknown = {s for s in comp if s not in fixed}
    for ion, q, states in _IONS:
        if not (set(ion) & unknown):
            continue
        if "N" in ion and "C" in ion and whole.get("C") != whole.get("N"):
            # CN-/SCN- only when every C is bound in them (cyanides,
            # thiocyanates), not in organic N compounds such as urea.
            continue
        most = min(comp.get(s, 0) // n for s, n in ion.items())
        for k in range(most, 0, -1):
            rest = Counter(comp)
            for s, n in ion.items():
                rest[s] -= k * n
            rest_comp = {s: n for s, n in rest.items() if n > 0}
            rest_charge = charge - k * q
            if not rest_comp:
                if rest_charge != 0:
                    continue
                return dict(states)
            # Inside the ion the states are fixed by the table; outside, the
            # usual rules still hold for the remainder.
            sub = _split_ions(
                rest_comp,
                rest_charge,
                {s: v for s, v in fixed.items() if s in rest_comp},
                depth + 1,
                whole,
            )
            if sub is None:
                continue
            total: dict[str, Fraction] = {}
            for s in comp:
                t = Fraction(0)
                if s in ion:
                    t += k * ion[s] * states[s]
                if s in rest_comp:
                    t += rest_comp[s] * sub[s]
                total[s] = t / comp[s]
            return total
    return None


def _part_states(comp: dict[str, int], charge: int) -> dict[str, Fraction]:
    if len(comp) == 1:
        ((sym, n),) = comp.items()
        return {sym: Fraction(charge, n)}
    fixed = _fixed_states(comp)
    q = Fraction(charge)
    out = _split_ions(comp, q, fixed, 0)
    if out is not None:
        return out
    more = dict(fixed)
    more.update({s: Fraction(v) for s, v in _COMMON_FIXED.items() if s in comp and s not in fixed})
    out = _split_ions(comp, q, more, 0)
    if out is not None:
        return out
    raise _Undecidable(
        "more than one element without a fixed oxidation state: "
        + ", ".join(sorted(s for s in comp if s not in more))
    )


@lru_cache(maxsize=4096)
def _oxidation_numbers(species: Species) -> tuple[tuple[str, Fraction], ...]:
    totals: dict[str, Fraction] = {}
    atoms: Counter[str] = Counter()
    for i, (mult, part) in enumerate(species.parts):
        comp = dict(part)
        try:
            states = _part_states(comp, species.charge if i == 0 else 0)
        except _Undecidable as e:
            raise CannotBalance(
                f"oxidation numbers undecidable: {e}", (species.canonical,)
            ) from None
        for sym, n in comp.items():
            totals[sym] = totals.get(sym, Fraction(0)) + mult * n * states[sym]
            atoms[sym] += mult * n
    return tuple((s, Fraction(totals[s]) / atoms[s]) for s in sorted(atoms))


def oxidation_numbers(species: Species | str) -> dict[str, Fraction]:
    """Average oxidation number of each element in ``species``.

    Args:
        species: A :class:`Species` or its text.

    Returns:
        Element symbol -> average oxidation number (exact). The electron
        returns an empty dict.

    Raises:
        CannotBalance: the rules cannot decide (names the species).
    """
    if isinstance(species, str):
        species = parse_species(species)
    return dict(_oxidation_numbers(species.without_state()))


def _min_flow(left: dict[Fraction, Fraction], right: dict[Fraction, Fraction]) -> Fraction | None:
    """Least total oxidation-number change that turns one distribution of an
    element's atoms over states into the other (1-D transport distance:
    the integral of the difference of the cumulative amounts). None when
    the amounts of atoms differ (unbalanced reaction)."""
    if sum(left.values(), Fraction(0)) != sum(right.values(), Fraction(0)):
        return None
    states = sorted(set(left) | set(right))
    flow = Fraction(0)
    below = Fraction(0)  # reactant minus product atoms at states <= current
    for a, b in pairwise(states):
        below += left.get(a, Fraction(0)) - right.get(a, Fraction(0))
        flow += abs(below) * (b - a)
    return flow


#: Species whose atoms of one element sit in known, different states, where
#: the average would misstate the electrons moved: trihalide ions are a
#: dihalogen bound to a halide ion (X2·X-), so I3- holds two I at 0 and one
#: at -1 (Greenwood & Earnshaw, Chemistry of the Elements, 2nd ed., the
#: polyhalide ions; from memory). With them IO3- + 8 I- -> 3 I3- moves
#: 5 electrons, as IO3- + 5 I- -> 3 I2 does, not 16/3.
_KNOWN_STATES: dict[str, dict[str, tuple[tuple[Fraction, int], ...]]] = {
    "I3-": {"I": ((Fraction(0), 2), (Fraction(-1), 1))},
    "Br3-": {"Br": ((Fraction(0), 2), (Fraction(-1), 1))},
}


def _atom_states(sp: Species) -> dict[str, tuple[tuple[Fraction, int], ...]]:
    """Element -> ((oxidation number, atom count), ...) for one species."""
    known = _KNOWN_STATES.get(sp.without_state().canonical)
    if known is not None:
        return known
    comp = sp.composition
    return {sym: ((v, comp[sym]),) for sym, v in oxidation_numbers(sp).items()}


def redox_changes(reaction: Reaction) -> RedoxChanges:
    """Which elements are oxidised and reduced in ``reaction``, and how much.

    Each species' atoms of an element are taken at that species' average
    oxidation number. For every element the atoms must move from the
    reactant states to the product states; the least total movement
    (1-D transport distance) splits into an upward part (oxidation) and a
    downward part (reduction) whose difference is the net change. This
    counts comproportionation (IO3- + 5 I- -> 3 I2: 5 e-) and
    disproportionation, which a net sum per element would miss. If an
    element's atoms do not balance, its net change is used.

    Returns:
        ``{"oxidised": {element: electrons lost}, "reduced": {element:
        electrons gained}, "electrons": n}`` in mol per mol of reaction as
        written, exact. For a half-reaction ``n`` is the number of e-
        written; for a full reaction it is the electrons lost (= gained).
    """
    dist: dict[str, tuple[dict[Fraction, Fraction], dict[Fraction, Fraction]]] = {}
    for side, terms in ((0, reaction.left), (1, reaction.right)):
        for t in terms:
            if t.species.is_electron:
                continue
            for sym, states in _atom_states(t.species).items():
                pair = dist.setdefault(sym, ({}, {}))
                for v, n in states:
                    pair[side][v] = pair[side].get(v, Fraction(0)) + t.coeff * n
    oxidised: dict[str, Fraction] = {}
    reduced: dict[str, Fraction] = {}
    for sym in sorted(dist):
        left, right = dist[sym]
        net = sum((v * a for v, a in right.items()), Fraction(0)) - sum(
            (v * a for v, a in left.items()), Fraction(0)
        )
        flow = _min_flow(left, right)
        if flow is None:
            flow = abs(net)
        up, down = (flow + net) / 2, (flow - net) / 2
        if up:
            oxidised[sym] = up
        if down:
            reduced[sym] = down
    lost = sum(oxidised.values(), Fraction(0))
    gained = sum(reduced.values(), Fraction(0))
    electrons = abs(reaction.electrons) if reaction.is_half else max(lost, gained)
    return {"oxidised": oxidised, "reduced": reduced, "electrons": electrons}
