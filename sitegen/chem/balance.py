"""Balancing redox equations by the half-reaction method, in exact rationals.

Method (``balance``):

1. The skeleton's species are split into *fixed* species (their side is
   given) and *medium* species whose amounts and sides are free: H2O and
   H+ in acidic medium, H2O and OH- in basic medium. With ``medium=None``
   no species may be added, and the H+, OH- and H2O that are written are
   free while building half-reactions but must end on their written side.
   With a medium given, written H+, OH- and H2O are dropped and replaced by
   the medium's species.
2. Half-reactions are found algebraically: for every subset S of the fixed
   species, the null space of the composition + charge matrix of
   S + medium species + e- is computed. S gives a half-reaction when that
   null space is one-dimensional, every member of S has a non-zero
   coefficient on its written side, and e- has a non-zero coefficient. This
   is the textbook procedure (balance atoms other than O and H, then O with
   H2O, H with H+ or OH-, charge with e-) done as linear algebra; it finds
   the couples by itself, including spectator-free comproportionation
   (IO3-/I- -> I2) and disproportionation (Cl2 -> Cl- + ClO3-).
3. One reduction and one oxidation half that together contain every fixed
   species are combined with multipliers that equalise the electrons (LCM
   of the n's); species on both sides cancel; coefficients are reduced to
   the lowest whole numbers. If different pairs give different equations,
   the result is ambiguous and :class:`CannotBalance` is raised.
   Using halves is what picks the chemically right answer when the plain
   atom + charge null space has dimension > 1 (MnO4- + H2O2: the O2 comes
   from the peroxide).
4. If no pair of halves covers the skeleton (e.g. a reaction without
   electron transfer), the null space of the whole skeleton + medium must
   be one-dimensional with consistent signs; otherwise CannotBalance.

Every result is checked with :func:`check_balanced` before it is returned.
"""

from __future__ import annotations

__all__ = ["Balanced", "HalfReaction", "balance", "half_reaction", "nullspace"]

import contextlib
import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from itertools import combinations
from typing import Literal

from sitegen.chem.errors import CannotBalance
from sitegen.chem.formula import Species, parse_species
from sitegen.chem.oxidation import oxidation_numbers, redox_changes
from sitegen.chem.reaction import Reaction, Term, check_balanced, parse_reaction

Medium = Literal["acidic", "basic"]

_H = parse_species("H+")
_OH = parse_species("OH-")
_H2O = parse_species("H2O")
_E = parse_species("e-")
_MEDIUM_SPECIES = (_H, _OH, _H2O)
_FREE: dict[str, tuple[Species, ...]] = {"acidic": (_H, _H2O), "basic": (_OH, _H2O)}
# Bigger skeletons make 2^k subsets; no analytical redox equation needs more.
_MAX_FIXED = 10


@dataclass(frozen=True)
class HalfReaction:
    """One balanced half-reaction, written in the direction it runs."""

    reaction: Reaction
    """Balanced half-reaction with arrow ``'='``."""
    n: int
    """Electrons transferred in ``reaction`` as written (> 0)."""
    kind: Literal["oxidation", "reduction"]
    """'reduction' when e- is on the left, 'oxidation' when on the right."""


@dataclass(frozen=True)
class Balanced:
    """A balanced equation and how it was built."""

    equation: Reaction
    """Lowest whole-number coefficients, species cancelled across sides."""
    halves: tuple[HalfReaction, ...]
    """Reduction and oxidation halves used (empty if none were needed)."""
    electrons: Fraction
    """Electrons transferred per equation as written (an integer except when
    a mixed-valence species such as I3- makes it fractional)."""
    medium: str | None
    """'acidic', 'basic' or None."""


def nullspace(rows: list[list[Fraction]], ncols: int) -> list[list[Fraction]]:
    """Basis of the right null space of a rational matrix (exact RREF).

    Args:
        rows: Matrix rows, each of length ``ncols``.
        ncols: Number of columns.

    Returns:
        Basis vectors (lists of Fractions); empty if only the zero vector.
    """
    m = [list(r) for r in rows]
    pivots: list[int] = []
    r = 0
    for c in range(ncols):
        piv = next((i for i in range(r, len(m)) if m[i][c] != 0), None)
        if piv is None:
            continue
        m[r], m[piv] = m[piv], m[r]
        inv = 1 / m[r][c]
        m[r] = [x * inv for x in m[r]]
        for i in range(len(m)):
            if i != r and m[i][c] != 0:
                f = m[i][c]
                m[i] = [a - f * b for a, b in zip(m[i], m[r], strict=True)]
        pivots.append(c)
        r += 1
        if r == len(m):
            break
    free = [c for c in range(ncols) if c not in pivots]
    basis = []
    for fc in free:
        v = [Fraction(0)] * ncols
        v[fc] = Fraction(1)
        for i, pc in enumerate(pivots):
            v[pc] = -m[i][fc]
        basis.append(v)
    return basis


def _matrix(cols: list[Species]) -> list[list[Fraction]]:
    elements = sorted({s for sp in cols for s in sp.composition})
    rows = [[Fraction(sp.composition.get(e, 0)) for sp in cols] for e in elements]
    rows.append([Fraction(sp.charge) for sp in cols])
    return rows


def _integers(v: list[Fraction]) -> list[int]:
    """Scale a rational vector to coprime integers."""
    lcm = 1
    for x in v:
        lcm = lcm * x.denominator // math.gcd(lcm, x.denominator)
    ints = [int(x * lcm) for x in v]
    g = 0
    for k in ints:
        g = math.gcd(g, k)
    return [k // g for k in ints] if g else ints


def _names(species: list[Species] | tuple[Species, ...]) -> tuple[str, ...]:
    return tuple(s.canonical for s in species)


def _reaction_from(
    coeffs: dict[Species, int | Fraction], order: list[Species], arrow: Literal["->", "="]
) -> Reaction:
    left = tuple(Term(Fraction(coeffs[s]), s) for s in order if coeffs.get(s, 0) > 0)
    right = tuple(Term(Fraction(-coeffs[s]), s) for s in order if coeffs.get(s, 0) < 0)
    return Reaction(left, right, arrow)


@dataclass(frozen=True)
class _Half:
    members: frozenset[Species]
    coeffs: tuple[tuple[Species, int], ...]  # signed: + reactant, - product
    n: int
    kind: Literal["oxidation", "reduction"]


def _find_halves(fixed: list[tuple[Species, int]], free: tuple[Species, ...]) -> list[_Half]:
    halves = []
    for size in range(1, len(fixed) + 1):
        for subset in combinations(fixed, size):
            cols = [s for s, _ in subset] + list(free) + [_E]
            rows = _matrix(cols)
            basis = nullspace(rows, len(cols))
            if len(basis) > 1 and _redox_oxygen(subset):
                # O itself changes oxidation state (peroxide, O2): as in the
                # textbook method, the couple's own O atoms balance each
                # other and H2O/OH- may not supply them. This removes the
                # non-redox direction 2 H2O2 -> O2 + 2 H2O.
                rows.append(
                    [Fraction(s.composition.get("O", 0)) for s, _ in subset]
                    + [Fraction(0)] * (len(free) + 1)
                )
                basis = nullspace(rows, len(cols))
            if len(basis) != 1:
                continue
            v = basis[0]
            if any(v[i] == 0 for i in range(size)) or v[-1] == 0:
                continue
            if v[0] * subset[0][1] < 0:
                v = [-x for x in v]
            if any(v[i] * side <= 0 for i, (_, side) in enumerate(subset)):
                continue
            ints = _integers(v)
            e = ints[-1]
            coeffs = tuple((sp, c) for sp, c in zip(cols[:-1], ints[:-1], strict=True) if c)
            if not _pure(coeffs, e):
                continue
            halves.append(
                _Half(
                    frozenset(s for s, _ in subset),
                    coeffs,
                    abs(e),
                    "reduction" if e > 0 else "oxidation",
                )
            )
    return halves


def _pure(coeffs: tuple[tuple[Species, int], ...], e: int) -> bool:
    """A half may only move electrons one way: in a reduction half no element
    is oxidised, in an oxidation half none is reduced. This rules out
    algebraic "halves" such as MnO4- -> Mn^2+ + 2 O2 + 3 e-, which balance
    but oxidise the oxide O while reducing Mn."""
    change: dict[str, Fraction] = {}
    for sp, c in coeffs:
        try:
            states = oxidation_numbers(sp)
        except CannotBalance:
            return True  # cannot judge; let the other checks decide
        for sym, v in states.items():
            # c > 0: reactant. Products minus reactants of n * ON.
            change[sym] = change.get(sym, Fraction(0)) - c * sp.composition[sym] * v
    if e > 0:  # reduction: electrons consumed, no element may go up
        return all(d <= 0 for d in change.values())
    return all(d >= 0 for d in change.values())


def _redox_oxygen(subset: tuple[tuple[Species, int], ...]) -> bool:
    """True when some member holds O in a state other than -2."""
    for sp, _ in subset:
        if "O" in sp.composition:
            try:
                if oxidation_numbers(sp)["O"] != -2:
                    return True
            except CannotBalance:
                continue
    return False


def _half_reaction_obj(h: _Half, order: list[Species]) -> HalfReaction:
    coeffs: dict[Species, int | Fraction] = dict(h.coeffs)
    coeffs[_E] = h.n if h.kind == "reduction" else -h.n
    r = _reaction_from(coeffs, [*order, _E], "=")
    check_balanced(r)
    return HalfReaction(r, h.n, h.kind)


def _check_signs(
    total: dict[Species, int], fixed: list[tuple[Species, int]], required: list[tuple[Species, int]]
) -> bool:
    for sp, side in fixed:
        if total.get(sp, 0) * side <= 0:
            return False
    return all(total.get(sp, 0) * side >= 0 for sp, side in required)


def _combine(red: _Half, ox: _Half) -> tuple[dict[Species, int], Fraction]:
    lcm = red.n * ox.n // math.gcd(red.n, ox.n)
    total: dict[Species, int] = {}
    for h in (red, ox):
        k = lcm // h.n
        for sp, c in h.coeffs:
            total[sp] = total.get(sp, 0) + k * c
    g = 0
    for c in total.values():
        g = math.gcd(g, c)
    total = {sp: c // g for sp, c in total.items() if c}
    return total, Fraction(lcm, g)


@lru_cache(maxsize=2048)
def _balance_text(text: str, medium: str | None) -> Balanced:
    skeleton = parse_reaction(text)
    return _balance(skeleton, medium)


def _balance(skeleton: Reaction, medium: str | None) -> Balanced:
    if medium not in (None, "acidic", "basic"):
        raise ValueError(f"medium must be 'acidic', 'basic' or None, not {medium!r}")
    if skeleton.is_half:
        raise CannotBalance(
            "the skeleton contains electrons; use half_reaction()", _names(skeleton.species())
        )
    sides: dict[Species, int] = {}
    order: list[Species] = []
    for side, terms in ((1, skeleton.left), (-1, skeleton.right)):
        for t in terms:
            sp = t.species
            if sp in sides and sides[sp] != side:
                if sp in _MEDIUM_SPECIES and medium is not None:
                    continue
                raise CannotBalance(f"{sp} is written on both sides", (sp.canonical,))
            if sp not in sides:
                sides[sp] = side
                order.append(sp)
    if medium is None:
        written_medium = [(sp, sides[sp]) for sp in order if sp in _MEDIUM_SPECIES]
        fixed = [(sp, sides[sp]) for sp in order if sp not in _MEDIUM_SPECIES]
        free = tuple(sp for sp, _ in written_medium)
        out_order = order
        if not fixed:
            # Only H+, OH- and H2O are written (neutralisation): all fixed.
            fixed, written_medium, free = written_medium, [], ()
    else:
        written_medium = []
        fixed = [(sp, sides[sp]) for sp in order if sp not in _MEDIUM_SPECIES]
        free = _FREE[medium]
        out_order = [sp for sp, _ in fixed] + list(free)
    names = _names(order)
    if not fixed:
        raise CannotBalance("nothing to balance", names)
    if len(fixed) > _MAX_FIXED:
        raise CannotBalance(f"more than {_MAX_FIXED} species", names)

    halves = _find_halves(fixed, free)
    reds = [h for h in halves if h.kind == "reduction"]
    oxs = [h for h in halves if h.kind == "oxidation"]
    everything = frozenset(sp for sp, _ in fixed)
    results: dict[
        tuple[tuple[str, int], ...], tuple[dict[Species, int], Fraction, _Half, _Half]
    ] = {}
    for red in reds:
        for ox in oxs:
            if red.members | ox.members != everything:
                continue
            total, electrons = _combine(red, ox)
            if not _check_signs(total, fixed, written_medium):
                continue
            key = tuple(sorted((sp.canonical, c) for sp, c in total.items()))
            results.setdefault(key, (total, electrons, red, ox))
    if len(results) > 1:
        raise CannotBalance("more than one way to pair the half-reactions", names)
    if results:
        ((total, electrons, red, ox),) = results.values()
        eq = _reaction_from(dict(total), out_order, "->")
        check_balanced(eq)  # never return an unbalanced result
        # The electrons moved by the equation, counted atom by atom (this
        # knows that I3- is I2·I-, which the halves' average states do not).
        moved = redox_changes(eq)["electrons"]
        if moved.denominator == 1 or electrons.denominator != 1:
            electrons = moved
        half_order = [sp for sp, _ in fixed] + [sp for sp in free if sp not in dict(fixed)]
        halves_out = (_half_reaction_obj(red, half_order), _half_reaction_obj(ox, half_order))
        return Balanced(eq, halves_out, electrons, medium)

    # No electron-transfer pair: plain null space of skeleton + medium.
    cols = [sp for sp, _ in fixed] + list(free)
    basis = nullspace(_matrix(cols), len(cols))
    if not basis:
        raise CannotBalance("no balanced equation exists with these species", names)
    if len(basis) > 1:
        raise CannotBalance(
            f"{len(basis)} independent balanced equations; add or remove species", names
        )
    v = basis[0]
    if v[0] * fixed[0][1] < 0:
        v = [-x for x in v]
    ints = _integers(v)
    total = {sp: c for sp, c in zip(cols, ints, strict=True) if c}
    if not _check_signs(total, fixed, written_medium):
        raise CannotBalance(
            "the only balanced equation puts a species on the wrong side or without a coefficient",
            names,
        )
    eq = _reaction_from(dict(total), out_order, "->")
    check_balanced(eq)
    electrons = Fraction(0)
    with contextlib.suppress(CannotBalance):  # undecidable states: report 0
        electrons = redox_changes(eq)["electrons"]
    return Balanced(eq, (), electrons, medium)


def balance(skeleton: Reaction | str, medium: Medium | None = None) -> Balanced:
    """Balance a skeleton equation.

    Args:
        skeleton: e.g. ``"MnO4- + Fe^2+ -> Mn^2+ + Fe^3+"`` or a Reaction.
        medium: 'acidic' (may add H+ and H2O), 'basic' (OH- and H2O) or
            None (use only the written species).

    Returns:
        :class:`Balanced` with the equation in lowest whole numbers.

    Raises:
        CannotBalance: no unique balanced equation.
        FormulaError, UnknownElement: the skeleton text does not parse.
    """
    text = skeleton.canonical if isinstance(skeleton, Reaction) else skeleton
    return _balance_text(text, medium)


def half_reaction(
    ox: str | Species, red: str | Species | None = None, medium: Medium | None = "acidic"
) -> HalfReaction:
    """Balance one couple written as a reduction, ``ox = red``.

    Args:
        ox: Oxidised form (e.g. ``"MnO4-"``), or a whole couple text
            ``"MnO4- = Mn^2+"`` when ``red`` is None.
        red: Reduced form (e.g. ``"Mn^2+"``).
        medium: 'acidic', 'basic' or None (no H+/OH-/H2O added).

    Returns:
        The reduction half-reaction, e.g. ``MnO4- + 8 H+ + 5 e- = Mn^2+ +
        4 H2O`` with ``n == 5``.

    Raises:
        CannotBalance: the couple does not balance uniquely or is not a
            reduction.
    """
    if red is None:
        if not isinstance(ox, str):
            raise TypeError("give both forms, or one 'ox = red' text")
        couple = parse_reaction(ox)
        if len(couple.left) != 1 or len(couple.right) != 1:
            raise CannotBalance("a couple has one species on each side", _names(couple.species()))
        ox_sp, red_sp = couple.left[0].species, couple.right[0].species
    else:
        ox_sp = parse_species(ox) if isinstance(ox, str) else ox.without_state()
        red_sp = parse_species(red) if isinstance(red, str) else red.without_state()
    return _half_cached(ox_sp.without_state(), red_sp.without_state(), medium)


@lru_cache(maxsize=1024)
def _half_cached(ox: Species, red: Species, medium: str | None) -> HalfReaction:
    names = (ox.canonical, red.canonical)
    if medium not in (None, "acidic", "basic"):
        raise ValueError(f"medium must be 'acidic', 'basic' or None, not {medium!r}")
    if ox == red:
        raise CannotBalance("the two forms of a couple must differ", names)
    free = tuple(s for s in (() if medium is None else _FREE[medium]) if s not in (ox, red))
    fixed = [(ox, 1), (red, -1)]
    halves = [h for h in _find_halves(fixed, free) if h.members == frozenset((ox, red))]
    if not halves:
        raise CannotBalance(
            "the couple does not balance with "
            + (
                "H+ and H2O"
                if medium == "acidic"
                else "OH- and H2O"
                if medium == "basic"
                else "no added species"
            ),
            names,
        )
    h = halves[0]
    if h.kind != "reduction":
        raise CannotBalance(
            "electrons come out on the right: this couple is written as an oxidation", names
        )
    return _half_reaction_obj(h, [ox, red, *free])
