"""Rules that prove a method's numbers hold together: factor, worked
result, titrant volume, sharpness of the end point, indicator, and the
titrant concentration across standardisation and use.

Thresholds live in :class:`~sitegen.check.registry.Settings`; the values
there are common practice, as stated beside each.
"""

from __future__ import annotations

__all__: list[str] = []

from collections.abc import Iterator
from fractions import Fraction
from typing import Any

from ...errors import Finding, Severity
from ...model import CalculationKind, Status, TitrationMode
from ..registry import Context, rule


def _frac(f: Fraction) -> str:
    return str(f.numerator) if f.denominator == 1 else f"{f.numerator}/{f.denominator}"


@rule("factor-mismatch")
def factor_mismatch(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """The stoichiometric factor the method states (mol analyte per mol
    titrant; for back titrations per mol excess reagent, and the excess
    factor per mol titrant) must equal the factor derived from the chain of
    balanced reactions."""
    if analysis is None:
        return
    pairs = (
        ("factor", analysis.factor_stated, analysis.factor_derived),
        ("excess_factor", analysis.excess_factor_stated, analysis.excess_factor_derived),
    )
    for key, stated, derived in pairs:
        if stated is None or derived is None or stated == derived:
            continue
        yield ctx.finding(
            "factor-mismatch",
            loaded,
            ("calculation", key),
            f"{key.replace('_', ' ')} is stated as {_frac(stated)} but the reactions give"
            f" {_frac(derived)} (= {float(derived):.6g})",
        )


@rule("worked-result-mismatch")
def worked_result_mismatch(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """The worked example, recomputed from its inputs with the derived
    factor and IUPAC molar masses, must round to the stated result at the
    decimals the result is written with."""
    if analysis is None or analysis.result is None:
        return
    r = analysis.result
    if r.stated is None or r.agrees:
        return
    yield ctx.finding(
        "worked-result-mismatch",
        loaded,
        ("calculation", "worked_example", "result"),
        f"the worked example recomputes to {r.value:.{r.decimals + 2}f} {r.unit}, which does not"
        f" round to the stated {r.stated_text} (tolerance ±{0.5 * 10.0**-r.decimals:g} {r.unit})",
    )


@rule("burette-range")
def burette_range(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """The expected titrant volume, and the worked example's, must lie in
    the sensible part of the burette (common practice: 20-90 % of its
    capacity; the band is a site setting): less reads too imprecisely,
    more risks a refill mid-titration. Outside the band is a warning; more
    than the burette holds, or less than half the band's lower limit, is an
    error."""
    rec = loaded.record
    lo, hi = ctx.settings.burette_band
    cap = rec.titration.burette.value
    for path, vol in (
        (("titration", "expected_volume"), rec.titration.expected_volume.value),
        (
            ("calculation", "worked_example", "titrant_volume"),
            rec.calculation.worked_example.titrant_volume.value,
        ),
    ):
        if vol > cap:
            yield ctx.finding(
                "burette-range",
                loaded,
                path,
                f"{vol:g} mL does not fit a {cap:g} mL burette",
            )
        elif not lo * cap <= vol <= hi * cap:
            yield ctx.finding(
                "burette-range",
                loaded,
                path,
                f"{vol:g} mL is {100 * vol / cap:.0f} % of the {cap:g} mL burette; keep it within"
                f" {100 * lo:.0f}-{100 * hi:.0f} % (adjust the sample size or the titrant"
                " concentration)",
                Severity.WARNING if vol >= lo * cap * 0.5 else Severity.ERROR,
            )


@rule("weak-equilibrium")
def weak_equilibrium(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """The titration reaction must go to completion: log10 K at least the
    site minimum (common practice: about 8 for a 0.1 % end-point error with
    one electron on each side)."""
    if analysis is None or analysis.log10_K is None:
        return
    if analysis.log10_K < ctx.settings.min_log10_k:
        yield ctx.finding(
            "weak-equilibrium",
            loaded,
            ("couples", "titrant", "formal_potential"),
            f"log10 K of the titration reaction is {analysis.log10_K:.1f}, below"
            f" {ctx.settings.min_log10_k:g}; the reaction is not complete enough for a sharp"
            " end point",
        )


@rule("small-break")
def small_break(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """The potential break between 99.9 % and 100.1 % of titration must be
    large enough to see (common practice: at least 0.2 V for a visual
    indicator)."""
    if analysis is None or analysis.curve is None or analysis.curve.break_V is None:
        return
    brk = abs(analysis.curve.break_V)
    if brk < ctx.settings.min_break_V:
        yield ctx.finding(
            "small-break",
            loaded,
            ("couples", "titrant", "formal_potential"),
            f"the potential changes by only {1000 * brk:.0f} mV between 99.9 % and 100.1 % of"
            f" titration; at least {1000 * ctx.settings.min_break_V:.0f} mV is needed",
            Severity.WARNING,
        )


@rule("indicator-error")
def indicator_error(ctx: Context, loaded: Any, analysis: Any) -> Iterator[Finding]:
    """A redox indicator must change colour on the break: its transition
    potential must give a titration error below the site limit (common
    practice: 0.1 %)."""
    if analysis is None or analysis.indicator is None:
        return
    ind = analysis.indicator
    if ind.transition_V is None:
        return
    limit = ctx.settings.max_indicator_error_percent
    if ind.error_percent is None:
        if analysis.curve is not None and ind.note:
            yield ctx.finding(
                "indicator-error", loaded, ("titration", "indicator"), f"{ind.name}: {ind.note}"
            )
        return
    if abs(ind.error_percent) > limit:
        yield ctx.finding(
            "indicator-error",
            loaded,
            ("titration", "indicator"),
            f"{ind.name} changes colour at {ind.transition_V:.3f} V vs SHE, which gives a"
            f" titration error of {ind.error_percent:+.2f} % (limit ±{limit:g} %); choose an"
            " indicator whose transition lies on the break",
        )


@rule("standardisation-mismatch", scope="collection")
def standardisation_mismatch(ctx: Context) -> Iterator[Finding]:
    """A titrant's concentration must agree across its reagent record, the
    standardisation method's worked result, and every method that uses it
    (within the site tolerance; common practice 0.5 %)."""
    col = ctx.collection
    tol = ctx.settings.concentration_tolerance
    for rid, reagent in col.reagents.items():
        rec = reagent.record
        nominal = rec.concentration.value if rec.concentration is not None else None
        if rec.standardised_by is not None:
            std = col.methods.get(rec.standardised_by)
            if std is None:
                yield ctx.finding(
                    "standardisation-mismatch",
                    reagent,
                    ("standardised_by",),
                    f"standardisation method {rec.standardised_by!r} does not exist",
                )
            else:
                an = ctx.analyses.get(std.record.id)
                if std.record.calculation.kind is not CalculationKind.TITRANT_CONCENTRATION:
                    yield ctx.finding(
                        "standardisation-mismatch",
                        reagent,
                        ("standardised_by",),
                        f"{std.record.id!r} does not compute a titrant concentration",
                    )
                elif (
                    nominal is not None
                    and an is not None
                    and an.result is not None
                    and abs(an.result.value - nominal) > tol * nominal
                ):
                    yield ctx.finding(
                        "standardisation-mismatch",
                        reagent,
                        ("concentration",),
                        f"{rid} is {nominal:g} mol/L here but its standardisation"
                        f" {std.record.id!r} finds {an.result.value:.5g} mol/L",
                    )
        if nominal is None:
            continue
        for m in col.methods.values():
            t = m.record.titration
            if t.titrant != rid or m.record.titration.mode is TitrationMode.STANDARDISATION:
                continue
            if m.record.status is Status.RETIRED:
                continue
            c = t.titrant_concentration.value
            if abs(c - nominal) > tol * nominal:
                yield ctx.finding(
                    "standardisation-mismatch",
                    m,
                    ("titration", "titrant_concentration"),
                    f"this method assumes {c:g} mol/L of {rid}, but the reagent record gives"
                    f" {nominal:g} mol/L",
                )
