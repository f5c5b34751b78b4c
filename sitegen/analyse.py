"""Record -> Analysis: every piece of chemistry a method needs, computed once.

The checker and the renderer both read the :class:`Analysis`, so a page
and the checker can never disagree. Chemistry errors raised by
:mod:`sitegen.chem` are turned into findings here, at the record position
the chemistry text came from (:func:`located`).
"""

from __future__ import annotations

__all__ = [
    "Analysis",
    "CoupleInfo",
    "CurveInfo",
    "IndicatorInfo",
    "ReactionInfo",
    "ResultInfo",
    "analyse_method",
]

import math
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

import numpy as np

from .chem.errors import ChemError, FormulaError, Unbalanced, UnknownElement
from .errors import Finding, Severity, Span
from .model import CalculationKind, MethodRecord, TitrationMode

#: species that take part in acid/base and solvent bookkeeping, never the
#: redox chain
_SOLVENT = frozenset({"H+", "H2O", "OH-", "e-"})


@dataclass(frozen=True)
class ReactionInfo:
    """One reaction of the method.

    Attributes:
        role: ``titration`` or ``preceding``.
        written: the text as the record writes it.
        canonical: the canonical spelling, or None if it did not parse.
        balanced: atoms and charge balance.
        electrons: electrons transferred (None if unknown).
    """

    role: str
    written: str
    canonical: str | None
    balanced: bool
    electrons: int | None


@dataclass(frozen=True)
class CoupleInfo:
    """A redox couple as used by the curve and the pages."""

    role: str
    written: str
    canonical: str | None
    n: int | None
    E0_V: float
    E0_vs_ref_V: float
    medium: str
    source: str
    reversible: bool
    ox: str | None
    red: str | None
    a: float = 1.0
    b: float = 1.0
    m: float = 0.0


@dataclass(frozen=True)
class CurveInfo:
    """The recomputed titration curve and the quantities read from it.

    Potentials are in volts; ``*_ref`` values are against the method's
    reference electrode.
    """

    volumes_mL: np.ndarray
    E_vs_SHE: np.ndarray
    E_vs_ref: np.ndarray
    reference: str
    reference_name: str
    equivalence_volume_mL: float
    equivalence_potential_V: float | None
    equivalence_potential_ref_V: float | None
    break_V: float | None
    note: str | None
    titrand_mmol: float
    assumption: str


@dataclass(frozen=True)
class IndicatorInfo:
    """How the method's indicator fits the curve."""

    id: str
    name: str
    kind: str
    transition_V: float | None
    range_V: tuple[float, float] | None
    range_ref_V: tuple[float, float] | None
    error_percent: float | None
    on_break: bool | None
    note: str | None


@dataclass(frozen=True)
class ResultInfo:
    """The worked example, recomputed.

    Attributes:
        value: recomputed result in ``unit``.
        stated: the stated result's value in ``unit``.
        decimals: decimals of the stated result (its rounding).
        agrees: the recomputed value rounds to the stated one.
        formula: the result formula in plain text.
        inputs: (symbol, description, value, unit) rows.
        factor: the factor used (mol analyte per mol titrant, or per mol
            excess reagent for back titrations).
        excess_factor: back titrations: mol excess reagent per mol titrant.
        molar_mass: g/mol of the analyte formula (or primary standard).
    """

    kind: str
    value: float
    unit: str
    stated_text: str
    stated: float | None
    decimals: int
    agrees: bool
    formula: str
    inputs: tuple[tuple[str, str, float, str], ...]
    factor: Fraction
    excess_factor: Fraction | None
    molar_mass: float
    molar_mass_u: float
    scale: float
    purity: float


@dataclass(frozen=True)
class Analysis:
    """Everything computed for one method; immutable and picklable."""

    method_id: str
    reactions: tuple[ReactionInfo, ...] = ()
    couples: tuple[CoupleInfo, ...] = ()
    log10_K: float | None = None
    cell_potential_V: float | None = None
    electrons: int | None = None
    factor_derived: Fraction | None = None
    factor_stated: Fraction | None = None
    excess_factor_derived: Fraction | None = None
    excess_factor_stated: Fraction | None = None
    curve: CurveInfo | None = None
    indicator: IndicatorInfo | None = None
    result: ResultInfo | None = None
    budget: Any = None
    hazards: Any = None
    findings: tuple[Finding, ...] = field(default=())

    def couple(self, role: str) -> CoupleInfo | None:
        return next((c for c in self.couples if c.role == role), None)


# ----------------------------------------------------------------------------
# Positions


class _Collector:
    def __init__(self, loaded: Any) -> None:
        self.loaded = loaded
        self.findings: list[Finding] = []

    def add(
        self, rule: str, path: tuple[str | int, ...], message: str, index: int | None = None
    ) -> None:
        self.findings.append(Finding(rule, Severity.ERROR, message, self.span(path, index)))

    def span(self, path: tuple[str | int, ...], index: int | None = None) -> Span:
        span: Span = self.loaded.span(*path)
        if index is None:
            return span
        line = self.loaded.source.line(span.line) or ""
        col = span.col
        # a quoted scalar starts one column before its text
        if col - 1 < len(line) and line[col - 1] in "\"'":
            col += 1
        return Span(span.path, span.line, col + index)


@contextmanager
def located(out: _Collector, path: tuple[str | int, ...], what: str) -> Iterator[None]:
    """Turn a chemistry error raised inside the block into a finding at
    ``path`` (and at the character the chemistry core names)."""
    try:
        yield
    except Unbalanced as exc:
        out.add("reaction-unbalanced", path, f"{what} does not balance: {exc}")
    except (FormulaError, UnknownElement) as exc:
        index = getattr(exc, "index", None)
        out.add("bad-formula", path, f"{what}: {exc}", index)
    except ChemError as exc:
        out.add("chemistry-undecided", path, f"{what}: {exc}")


# ----------------------------------------------------------------------------
# Helpers


def parse_fraction(text: str | None) -> Fraction | None:
    """'1/6', '0.5' or '6' as an exact fraction; None for None."""
    if text is None:
        return None
    return Fraction(str(text).strip()).limit_denominator(10_000)


def _net(reaction: Any) -> dict[str, Fraction]:
    """Species -> net coefficient (products positive)."""
    out: dict[str, Fraction] = {}
    for t in reaction.left:
        k = t.species.canonical
        out[k] = out.get(k, Fraction(0)) - Fraction(t.coeff)
    for t in reaction.right:
        k = t.species.canonical
        out[k] = out.get(k, Fraction(0)) + Fraction(t.coeff)
    return {k: v for k, v in out.items() if v != 0}


def _couple_parts(reaction: Any) -> tuple[str, str, Fraction, Fraction, Fraction, int] | None:
    """(ox, red, a, b, m, n) of a half-reaction written as a reduction
    a Ox + m H+ + n e- = b Red (+ H2O); None when a side has more than one
    redox species (the curve model needs one on each side)."""
    net = _net(reaction)
    n = -net.get("e-", Fraction(0))
    if n <= 0 or n.denominator != 1:
        return None
    left = [(k, -v) for k, v in net.items() if v < 0 and k not in _SOLVENT]
    right = [(k, v) for k, v in net.items() if v > 0 and k not in _SOLVENT]
    if len(left) != 1 or len(right) != 1:
        return None
    m = -net.get("H+", Fraction(0))
    return left[0][0], right[0][0], left[0][1], right[0][1], m, int(n)


def _analyte_conversion(species: Any, formula: Any) -> Fraction:
    """mol of ``formula`` per mol of ``species``, by the first element that
    is in both and is neither H nor O (Fe^2+ -> Fe2O3 gives 1/2)."""
    sc, fc = species.composition, formula.composition
    if species.without_state() == formula.without_state():
        return Fraction(1)
    for el in sorted(sc):
        if el in {"H", "O"}:
            continue
        if el in fc:
            return Fraction(sc[el], fc[el])
    for el in sorted(sc):
        if el in fc:
            return Fraction(sc[el], fc[el])
    return Fraction(1)


# ----------------------------------------------------------------------------
# The analysis


def analyse_method(
    loaded: Any,
    reagents: Mapping[str, Any],
    indicators: Mapping[str, Any],
    reference: str | None = None,
    safety_rules: Any = None,
) -> Analysis:
    """Compute the chemistry of one loaded method record.

    Args:
        loaded: the method (``Loaded`` with a :class:`MethodRecord`).
        reagents: id -> ``Loaded`` reagent records.
        indicators: id -> ``Loaded`` indicator records.
        reference: the site's reference electrode key, used when the record's
            ``conditions.reference_electrode`` is not given (then SHE).
        safety_rules: the safety rule set (built-in plus the lab's own, from
            :func:`sitegen.hazards.rules_engine.load_rules`); built-in only
            when None.
    """
    from .chem import electrodes, nernst
    from .chem.formula import molar_mass, parse_species
    from .chem.reaction import balance_delta, parse_reaction

    rec: MethodRecord = loaded.record
    out = _Collector(loaded)
    ref_key = rec.conditions.reference_electrode or reference or "SHE"
    T = rec.conditions.temperature.value

    # -- reactions ----------------------------------------------------------
    reactions: list[ReactionInfo] = []
    parsed_reactions: list[Any] = []
    titration_rx = None
    entries: list[tuple[str, tuple[str | int, ...], str]] = [
        ("preceding", ("reactions", "preceding", i), text)
        for i, text in enumerate(rec.reactions.preceding)
    ]
    entries.append(("titration", ("reactions", "titration"), rec.reactions.titration))
    for role, path, text in entries:
        rx = None
        balanced = False
        with located(out, path, f"{role} reaction"):
            rx = parse_reaction(text)
            atoms, charge = balance_delta(rx)
            bad = {k: v for k, v in atoms.items() if v != 0}
            if bad or charge != 0:
                raise Unbalanced(bad, Fraction(charge))
            balanced = True
        reactions.append(
            ReactionInfo(
                role=role,
                written=text,
                canonical=rx.canonical if rx is not None else None,
                balanced=balanced,
                electrons=None,
            )
        )
        if rx is not None:
            parsed_reactions.append(rx)
            if role == "titration":
                titration_rx = rx

    # -- couples -----------------------------------------------------------
    couples: list[CoupleInfo] = []
    parts: dict[str, tuple[str, str, Fraction, Fraction, Fraction, int]] = {}
    couple_rx: dict[str, Any] = {}
    for role in ("titrand", "titrant"):
        c = getattr(rec.couples, role)
        path: tuple[str | int, ...] = ("couples", role, "half_reaction")
        hr = None
        n: int | None = None
        with located(out, path, f"{role} half-reaction"):
            hr = parse_reaction(c.half_reaction)
            atoms, charge = balance_delta(hr)
            bad = {k: v for k, v in atoms.items() if v != 0}
            if bad or charge != 0:
                raise Unbalanced(bad, Fraction(charge))
            p = _couple_parts(hr)
            if p is None:
                out.add(
                    "couple-form",
                    path,
                    "write the couple as a reduction with one oxidised and one reduced species:"
                    " a Ox + m H+ + n e- = b Red (+ water)",
                )
            else:
                parts[role] = p
                couple_rx[role] = hr
                n = p[5]
                if c.n is not None and c.n != n:
                    out.add(
                        "couple-n-mismatch",
                        ("couples", role, "n"),
                        f"n is stated as {c.n} but the half-reaction transfers {n}"
                        f" electron{'s' if n != 1 else ''}",
                    )
        p = parts.get(role)
        couples.append(
            CoupleInfo(
                role=role,
                written=c.half_reaction,
                canonical=hr.canonical if hr is not None else None,
                n=n,
                E0_V=c.formal_potential.value,
                E0_vs_ref_V=electrodes.vs_reference(c.formal_potential.value, ref_key),
                medium=c.medium,
                source=c.source,
                reversible=c.reversible,
                ox=p[0] if p else None,
                red=p[1] if p else None,
                a=float(p[2]) if p else 1.0,
                b=float(p[3]) if p else 1.0,
                m=float(p[4]) if p else 0.0,
            )
        )

    # -- the titration reaction against the couples --------------------------
    titrant_species: str | None = None
    titrand_species: str | None = None
    titrant_is_oxidant: bool | None = None
    couples_agree = False
    electrons: int | None = None
    log_k: float | None = None
    e_cell: float | None = None
    titration_balanced = bool(reactions) and reactions[-1].balanced
    if titration_rx is not None and titration_balanced and len(parts) == 2:
        net = _net(titration_rx)
        ta, td = parts["titrant"], parts["titrand"]
        consumed = {k for k, v in net.items() if v < 0}
        if ta[0] in consumed:
            titrant_species, titrant_is_oxidant = ta[0], True
        elif ta[1] in consumed:
            titrant_species, titrant_is_oxidant = ta[1], False
        if td[1] in consumed:
            titrand_species = td[1]
        elif td[0] in consumed:
            titrand_species = td[0]
        if titrant_species is None or titrand_species is None:
            out.add(
                "titration-couples-mismatch",
                ("reactions", "titration"),
                "the titration reaction must consume one species of the titrant couple and one"
                " of the titrand couple",
            )
        elif titrant_is_oxidant == (titrand_species == td[0]):
            out.add(
                "titration-couples-mismatch",
                ("reactions", "titration"),
                "the titration reaction must pair an oxidant with a reductant: "
                f"{titrant_species} and {titrand_species} are on the same side of their couples",
            )
        else:
            # net = alpha * (titrant half) + beta * (titrand half), with the
            # electrons cancelling; each half is a reduction, so the
            # reductant's half enters with a negative multiplier.
            vt, vd = _net(couple_rx["titrant"]), _net(couple_rx["titrand"])
            alpha = net[titrant_species] / vt[titrant_species]
            beta = net[titrand_species] / vd[titrand_species]
            combo: dict[str, Fraction] = {}
            for vec, k in ((vt, alpha), (vd, beta)):
                for s, v in vec.items():
                    combo[s] = combo.get(s, Fraction(0)) + k * v
            combo = {k: v for k, v in combo.items() if v != 0}
            if combo != net:
                diff = sorted(set(combo) ^ set(net) | {k for k in net if combo.get(k) != net[k]})
                detail = [d for d in diff if d != "e-"]
                why = f"they disagree on {', '.join(detail)}" if detail else ""
                if "e-" in diff:
                    why = "; ".join(
                        x for x in (why, "the electrons of the two halves do not cancel") if x
                    )
                out.add(
                    "titration-couples-mismatch",
                    ("reactions", "titration"),
                    f"the titration reaction is not the sum of the two half-reactions ({why})",
                )
            else:
                couples_agree = True
                electrons = int(abs(alpha) * ta[5])
                # Conditional potentials at the record's [H+]: a couple with
                # m protons on its oxidised side shifts by (m/n)*slope*log[H+].
                slope = nernst.nernst_slope(T)
                log_h = math.log10(rec.conditions.hydrogen_ion.value)

                def conditional(role: str) -> float:
                    p = parts[role]
                    e0 = getattr(rec.couples, role).formal_potential.value
                    return e0 + slope * float(p[4]) / p[5] * log_h

                e_ox = conditional("titrant" if titrant_is_oxidant else "titrand")
                e_red = conditional("titrand" if titrant_is_oxidant else "titrant")
                e_cell = nernst.cell_potential(e_ox, e_red)
                log_k = nernst.log10_K(electrons, e_ox, e_red, T)

    # -- factor ---------------------------------------------------------------
    calc = rec.calculation
    factor_stated = excess_stated = None
    try:
        factor_stated = parse_fraction(calc.factor)
        excess_stated = parse_fraction(calc.excess_factor)
    except (ValueError, ZeroDivisionError):
        out.add("bad-value", ("calculation", "factor"), f"factor {calc.factor!r} is not a number")
    factor_derived = excess_derived = None
    analyte_species = analyte_formula = None
    with located(out, ("scope", "analyte_species"), "analyte species"):
        analyte_species = parse_species(rec.scope.analyte_species)
    with located(out, ("calculation", "analyte_formula"), "analyte formula"):
        analyte_formula = parse_species(calc.analyte_formula)
    if (
        titrant_species is not None
        and analyte_species is not None
        and analyte_formula is not None
        and all(r.balanced for r in reactions)
        # a titration reaction that disagrees with its couples gives no
        # trustworthy factor; its own finding says why
        and couples_agree
    ):
        from .chem import chain

        conv = _analyte_conversion(analyte_species, analyte_formula)
        with located(out, ("reactions",), "stoichiometric chain"):
            if rec.titration.mode is TitrationMode.BACK:
                excess_species = _excess_species(rec, reagents)
                if excess_species is None:
                    out.add(
                        "missing-field",
                        ("titration", "excess_reagent"),
                        "a back titration names its excess reagent, and that reagent's record"
                        " names the species it supplies",
                    )
                else:
                    fa, fe = chain.back_titration_ratio(
                        parsed_reactions,
                        analyte_species,
                        parse_species(excess_species),
                        parse_species(titrant_species),
                    )
                    factor_derived, excess_derived = fa * conv, fe
            else:
                factor_derived = (
                    chain.mole_ratio(
                        parsed_reactions, analyte_species, parse_species(titrant_species)
                    )
                    * conv
                )

    # -- worked result ---------------------------------------------------------
    result = None
    mm: tuple[float, float] | None = None
    if analyte_formula is not None:
        with located(out, ("calculation", "analyte_formula"), "analyte formula"):
            mm = molar_mass(analyte_formula)
    factor_used = factor_derived if factor_derived is not None else factor_stated
    excess_used = excess_derived if excess_derived is not None else excess_stated
    if mm is not None and factor_used is not None:
        result = _worked_result(rec, reagents, factor_used, excess_used, mm, out)

    # -- curve -------------------------------------------------------------------
    curve = model = None
    if (
        titration_rx is not None
        and titrant_species is not None
        and titrand_species is not None
        and len(parts) == 2
        and electrons is not None
    ):
        curve, model = _curve(
            rec, titration_rx, parts, titrant_species, titrand_species, ref_key, out
        )

    indicator = _indicator(rec, indicators, curve, model, ref_key, T)

    budget = None
    if result is not None:
        budget = _budget(rec, result, reagents, indicator)

    from .hazards.summary import method_hazards

    hazards = method_hazards(rec, {k: v.record for k, v in reagents.items()}, rules=safety_rules)

    return Analysis(
        method_id=rec.id,
        reactions=tuple(reactions),
        couples=tuple(couples),
        log10_K=log_k,
        cell_potential_V=e_cell,
        electrons=electrons,
        factor_derived=factor_derived,
        factor_stated=factor_stated,
        excess_factor_derived=excess_derived,
        excess_factor_stated=excess_stated,
        curve=curve,
        indicator=indicator,
        result=result,
        budget=budget,
        hazards=hazards,
        findings=tuple(out.findings),
    )


def _excess_species(rec: MethodRecord, reagents: Mapping[str, Any]) -> str | None:
    ref = rec.titration.excess_reagent
    if ref is None or ref not in reagents:
        return None
    sup: str | None = reagents[ref].record.supplies
    return sup


def _worked_result(
    rec: MethodRecord,
    reagents: Mapping[str, Any],
    factor: Fraction,
    excess_factor: Fraction | None,
    mm: tuple[float, float],
    out: _Collector,
) -> ResultInfo | None:
    from .calc import FORMULAS, result_value
    from .units import convert

    calc = rec.calculation
    we = calc.worked_example
    c = (we.titrant_concentration or rec.titration.titrant_concentration).value
    x: dict[str, float] = {
        "V": we.titrant_volume.value,
        "V_blank": we.blank_volume.value,
        "c": c,
        "f": float(factor),
        "M": mm[0],
    }
    inputs: list[tuple[str, str, float, str]] = [
        ("V", "titrant volume", x["V"], "mL"),
        ("V_blank", "blank volume", x["V_blank"], "mL"),
        ("c", "titrant concentration", c, "mol/L"),
        ("f", "stoichiometric factor", x["f"], ""),
        ("M", f"molar mass of {calc.analyte_formula}", mm[0], "g/mol"),
    ]
    purity = 1.0
    kind = calc.kind.value
    back = rec.titration.mode is TitrationMode.BACK
    sample = we.sample
    sample_path = ("calculation", "worked_example", "sample")
    if calc.kind is CalculationKind.TITRANT_CONCENTRATION:
        if sample.unit != "g":
            out.add(
                "bad-unit",
                sample_path,
                "a standardisation weighs its primary standard: give the sample as a mass",
            )
            return None
        std = next((u.ref for u in rec.reagents if u.role.value == "primary-standard"), None)
        if std and std in reagents and reagents[std].record.purity is not None:
            purity = reagents[std].record.purity.value / 100.0
        x["m"], x["P"] = sample.value, purity
        inputs += [
            ("m", "mass of primary standard", sample.value, "g"),
            ("P", "purity of primary standard", purity, ""),
        ]
        base = "mol/L"
    else:
        if back:
            xc = rec.titration.excess_concentration
            xv = we.excess_volume or rec.titration.excess_volume
            if xc is None or xv is None or excess_factor is None:
                out.add(
                    "missing-field",
                    ("titration", "mode"),
                    "a back titration needs"
                    " excess_concentration, excess_volume and an excess factor",
                )
                return None
            x["c_x"], x["V_x"], x["f_x"] = xc.value, xv.value, float(excess_factor)
            inputs += [
                ("c_x", "excess reagent concentration", xc.value, "mol/L"),
                ("V_x", "excess reagent volume", xv.value, "mL"),
                ("f_x", "mol excess reagent per mol titrant", float(excess_factor), ""),
            ]
            kind = "back-" + kind
        if calc.kind is CalculationKind.MASS_FRACTION:
            if sample.unit != "g":
                out.add("bad-unit", sample_path, "a mass fraction needs the sample as a mass")
                return None
            x["m"] = sample.value
            inputs.append(("m", "sample mass", sample.value, "g"))
            base = ""
        else:
            if sample.unit != "mL":
                out.add(
                    "bad-unit",
                    sample_path,
                    "a mass concentration needs the sample as an aliquot volume",
                )
                return None
            x["V_s"] = sample.value
            inputs.append(("V_s", "aliquot volume", sample.value, "mL"))
            base = "mg/mL"
    try:
        scale = convert(1.0, base, calc.unit)
    except Exception:
        out.add(
            "bad-unit",
            ("calculation", "unit"),
            f"unit {calc.unit!r} cannot express this result (a {base or 'mass fraction'} quantity)",
        )
        return None
    try:
        value = result_value(kind, x, scale)
    except ZeroDivisionError:
        out.add(
            "bad-value",
            ("calculation", "worked_example"),
            "the worked example divides by zero (sample size or net titrant volume)",
        )
        return None
    stated: float | None = None
    decimals = 0
    number, _, stated_unit = we.result.strip().partition(" ")
    try:
        stated = convert(float(number), stated_unit.strip() or calc.unit, calc.unit)
        decimals = len(number.split(".")[1]) if "." in number else 0
    except Exception:
        out.add(
            "bad-value",
            ("calculation", "worked_example", "result"),
            f"the stated result {we.result!r} is not a number with a unit like {calc.unit!r}",
        )
    # "within its stated rounding": the recomputed value must round to the
    # stated one, i.e. lie within half a unit of its last written decimal.
    agrees = stated is not None and abs(value - stated) <= 0.5 * 10.0**-decimals * (1 + 1e-9)
    return ResultInfo(
        kind=kind,
        value=value,
        unit=calc.unit,
        stated_text=we.result,
        stated=stated,
        decimals=decimals,
        agrees=agrees,
        formula=FORMULAS[kind],
        inputs=tuple(inputs),
        factor=factor,
        excess_factor=excess_factor if back else None,
        molar_mass=mm[0],
        molar_mass_u=mm[1],
        scale=scale,
        purity=purity,
    )


ZERO_VOLUME_ASSUMPTION = (
    "At zero titrant volume the titrand is assumed to hold one part in a million of its"
    " other oxidation state (air oxidation or impurity), which makes the starting"
    " potential finite; [H+] is taken as constant (the acid is in large excess)."
)


def _curve(
    rec: MethodRecord,
    titration_rx: Any,
    parts: Mapping[str, tuple[str, str, Fraction, Fraction, Fraction, int]],
    titrant_species: str,
    titrand_species: str,
    ref_key: str,
    out: _Collector,
) -> tuple[CurveInfo | None, Any]:
    from .chem import curve as cv
    from .chem import electrodes

    net = _net(titration_rx)
    ratio = float(-net[titrand_species] / -net[titrant_species])  # mol titrand per mol titrant
    we = rec.calculation.worked_example
    c_t = (we.titrant_concentration or rec.titration.titrant_concentration).value
    mmol_titrand = (we.titrant_volume.value - we.blank_volume.value) * c_t * ratio
    if mmol_titrand <= 0:
        return None, None
    ta, td = parts["titrant"], parts["titrand"]
    tc, dc = rec.couples.titrant, rec.couples.titrand
    titrant = cv.Couple(
        E0=tc.formal_potential.value,
        n=ta[5],
        a=float(ta[2]),
        b=float(ta[3]),
        m=float(ta[4]),
        reversible=tc.reversible,
        label=tc.half_reaction,
    )
    titrand = cv.Couple(
        E0=dc.formal_potential.value,
        n=td[5],
        a=float(td[2]),
        b=float(td[3]),
        m=float(td[4]),
        reversible=dc.reversible,
        label=dc.half_reaction,
    )
    form = "red" if titrand_species == td[1] else "ox"
    partner = rec.titration.partner_concentration
    t = cv.Titration(
        analyte=titrand,
        titrant=titrant,
        analyte_form=form,  # type: ignore[arg-type]
        analyte_mmol=mmol_titrand,
        V0_mL=rec.titration.initial_volume.value,
        titrant_mol_per_L=c_t,
        H_mol_per_L=rec.conditions.hydrogen_ion.value,
        T_K=rec.conditions.temperature.value,
        analyte_partner_mol_per_L=partner.value if partner is not None else 0.0,
    )
    try:
        veq = cv.equivalence_volume_mL(t)
        grid = np.sort(
            np.concatenate(
                [
                    np.linspace(0.0, 2.0 * veq, 401),
                    veq * np.linspace(0.98, 1.02, 81),
                ]
            )
        )
        # each volume once (np.unique would do, but it imports numpy.ma)
        grid = grid[np.concatenate(([True], grid[1:] != grid[:-1]))]
        c = cv.titration_curve(t, grid)
        brk: float | None
        try:
            brk = float(cv.potential_break_V(t))
            if not math.isfinite(brk):
                brk = None
        except Exception:
            brk = None
    except Exception as exc:  # the numerics report why they failed
        out.add("curve-failed", ("couples",), f"the titration curve could not be computed: {exc}")
        return None, None
    e_ref = c.E_V - electrodes.REFERENCE_ELECTRODES[ref_key].offset_V
    eq = c.equivalence_potential_V
    info = CurveInfo(
        volumes_mL=np.asarray(c.volumes_mL, dtype=float),
        E_vs_SHE=np.asarray(c.E_V, dtype=float),
        E_vs_ref=np.asarray(e_ref, dtype=float),
        reference=ref_key,
        reference_name=electrodes.REFERENCE_ELECTRODES[ref_key].name,
        equivalence_volume_mL=float(veq),
        equivalence_potential_V=None if eq is None or not math.isfinite(eq) else float(eq),
        equivalence_potential_ref_V=None
        if eq is None or not math.isfinite(eq)
        else float(electrodes.vs_reference(float(eq), ref_key)),
        break_V=brk,
        note=c.note,
        titrand_mmol=mmol_titrand,
        assumption=ZERO_VOLUME_ASSUMPTION,
    )
    return info, t


def _indicator(
    rec: MethodRecord,
    indicators: Mapping[str, Any],
    curve: CurveInfo | None,
    model: Any,
    ref_key: str,
    T: float,
) -> IndicatorInfo | None:
    ref = rec.titration.indicator
    if ref is None or ref not in indicators:
        return None
    ind = indicators[ref].record
    if ind.kind != "redox" or ind.transition_potential is None or ind.n is None:
        note = {
            "specific": "a specific indicator reacts with one species, not with the potential;"
            " no transition potential or titration error is computed",
            "self": "the titrant is its own indicator; the end point is its first persistent"
            " colour, and no transition potential is computed",
        }.get(ind.kind, "the indicator record gives no transition potential")
        return IndicatorInfo(ref, ind.name, ind.kind, None, None, None, None, None, note)
    from .chem import curve as cv
    from .chem import electrodes, nernst

    E = ind.transition_potential.value
    half = nernst.nernst_slope(T) / ind.n
    rng = (E - half, E + half)
    rng_ref = (electrodes.vs_reference(rng[0], ref_key), electrodes.vs_reference(rng[1], ref_key))
    err: float | None = None
    on_break: bool | None = None
    note = None
    if curve is not None and model is not None:
        veq = curve.equivalence_volume_mL
        try:
            # exact inverse: the titrant volume at which the potential
            # equals the transition potential
            v_end = cv.volume_at_potential(model, E)
            err = 100.0 * (v_end - veq) / veq
        except Exception:
            note = (
                f"the transition potential ({E:.3f} V vs SHE) is not reached on the part of the"
                " curve the model can define"
            )
        try:
            e_lo = cv.potential_at(model, 0.999 * veq)
            e_hi = cv.potential_at(model, 1.001 * veq)
            a, b = sorted((e_lo, e_hi))
            on_break = a <= E <= b
        except Exception:
            on_break = None
    return IndicatorInfo(ref, ind.name, ind.kind, E, rng, rng_ref, err, on_break, note)


def _budget(
    rec: MethodRecord,
    result: ResultInfo,
    reagents: Mapping[str, Any],
    indicator: IndicatorInfo | None,
) -> Any:
    from .budget import result_budget

    return result_budget(rec, result, reagents)
