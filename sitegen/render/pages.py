"""View-models: records, analyses and findings -> plain dicts for templates.

Templates never compute. Everything a page shows is decided here: which
methods are listed where, every number (formatted by :mod:`.fmt`), every
relative link (from the page's depth), the typeset chemistry
(:mod:`.chemtext`) and the rendered Markdown (:mod:`.text`). Values that
hold HTML produced by this package are :class:`markupsafe.Markup`; every
other string is escaped by the template engine.

Any part of an :class:`~sitegen.analyse.Analysis` may be None (a method
whose chemistry failed still gets its page, with its findings), so every
builder here copes with missing pieces and shows :data:`fmt.MISSING`.
"""

from __future__ import annotations

__all__ = [
    "SAFETY_PRECEDENCE",
    "Page",
    "archive_page",
    "bench_page",
    "glossary_page",
    "hazard_block",
    "home_page",
    "indicator_page",
    "indicators_index_page",
    "method_findings",
    "method_page",
    "published_methods",
    "quality_page",
    "reagent_page",
    "reagents_index_page",
    "rules_page",
    "site_context",
]

import json
from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from markupsafe import Markup

from ..errors import Finding, Severity, sort_findings
from . import fmt
from .chemtext import reaction_html, species_html
from .text import glossary_anchor, markdown_html

if TYPE_CHECKING:
    from .plots import DrawingStore

#: shown with every hazard block, on every reagent page and bench sheet
SAFETY_PRECEDENCE = (
    "Local regulations, the laboratory's safety officer and the supplier's safety data"
    " sheet take precedence over this page."
)
SDS_GOVERNS = (
    "The supplier's safety data sheet for the product in use governs; this summary does"
    " not replace it."
)

_STATUS_LABEL = {"approved": "Approved", "draft": "Draft", "retired": "Retired"}
_SIGNAL_RANK = {"none": 0, "Warning": 1, "Danger": 2}
_ROLE_LABEL = {
    "titrant": "titrant",
    "primary-standard": "primary standard",
    "indicator": "indicator",
    "reductant": "reductant",
    "oxidant": "oxidant",
    "acid": "acid",
    "base": "base",
    "buffer": "buffer",
    "excess-reagent": "reagent added in excess",
    "auxiliary": "auxiliary reagent",
    "preventive": "preventive solution",
    "solvent": "solvent",
    "catalyst": "catalyst",
    "masking": "masking agent",
}


@dataclass(frozen=True)
class Page:
    """A page to render: output path, template name and its context."""

    path: str
    template: str
    context: dict[str, Any]


# ----------------------------------------------------------------------------
# Links and site settings


def root_of(path: str) -> str:
    """The relative prefix from a page back to the site root
    (``methods/x/index.html`` -> ``../../``)."""
    return "../" * path.count("/")


def method_path(mid: str, name: str = "index.html") -> str:
    return f"methods/{mid}/{name}"


def reagent_path(rid: str) -> str:
    return f"reagents/{rid}/index.html"


def indicator_path(iid: str) -> str:
    return f"indicators/{iid}/index.html"


def site_context(collection: Any, options: Any, path: str, title: str) -> dict[str, Any]:
    """What the base layout needs on every page."""
    site = collection.site.record if collection.site is not None else None
    root = root_of(path)
    nav = [
        ("Methods", "index.html"),
        ("Reagents", "reagents/index.html"),
        ("Indicators", "indicators/index.html"),
        ("Glossary", "glossary.html"),
        ("Archive", "archive.html"),
        ("Quality", "quality.html"),
        ("Rules", "rules.html"),
    ]
    return {
        "title": title,
        "root": root,
        "css": root + "static/site.css",
        "lab_name": site.lab_name if site else "Laboratory methods",
        "contact": site.contact if site else "",
        "base_path": site.base_path if site else "/",
        "site_reference": site.reference_electrode if site else "SHE",
        "language": site.language if site else "en",
        "build_date": fmt.date(options.build_date),
        "generator_version": options.generator_version,
        "nav": [
            {"label": label, "href": root + href, "current": href == path} for label, href in nav
        ],
        "scripts": [],
        "record_footer": None,
    }


class _Published(Mapping[str, Any]):
    """The loaded methods minus the excluded ones, iterated in id order.

    A view, not a copy: a method's own pages only look ids up in it, and
    copying (and sorting) every method for each page would make a site's
    render time grow with the square of its size."""

    def __init__(self, methods: Mapping[str, Any], excluded: frozenset[str]) -> None:
        self._methods = methods
        self._excluded = excluded

    def __getitem__(self, mid: str) -> Any:
        if mid in self._excluded:
            raise KeyError(mid)
        return self._methods[mid]

    def __contains__(self, mid: object) -> bool:
        return mid in self._methods and mid not in self._excluded

    def __iter__(self) -> Iterator[str]:
        return iter(sorted(k for k in self._methods if k not in self._excluded))

    def __len__(self) -> int:
        return sum(1 for k in self._methods if k not in self._excluded)


def published_methods(collection: Any, options: Any) -> Mapping[str, Any]:
    """Methods that get pages: every loaded method not excluded under
    --keep-going, iterated in id order (a view of ``collection.methods``)."""
    return _Published(collection.methods, frozenset(mid for mid, _ in options.excluded))


def _glossary_hrefs(collection: Any, root: str) -> dict[str, str]:
    return {t: f"{root}glossary.html#{glossary_anchor(t)}" for t in sorted(collection.glossary)}


def _text(x: Any) -> str:
    """A caution or PPE item as text, whatever small shape it comes in."""
    if isinstance(x, str):
        return x
    if isinstance(x, tuple | list) and x:
        return str(x[-1])
    return str(getattr(x, "text", getattr(x, "message", x)))


def _ghs_statement(code: str) -> str:
    try:
        from ..hazards.ghs import statement

        return statement(code)
    except (ImportError, KeyError, OSError):
        return "wording: see the supplier's safety data sheet"


def _ghs_pictogram(code: str) -> str:
    try:
        from ..hazards.ghs import pictogram_name

        return pictogram_name(code)
    except (ImportError, KeyError, OSError):
        return code


def _code_key(code: str) -> Any:
    try:
        from ..hazards.ghs import code_sort_key

        return code_sort_key(code)
    except (ImportError, ValueError, KeyError):
        return (9, (), code)


# ----------------------------------------------------------------------------
# Hazards


def _signal_class(word: str | None) -> str:
    return {"Danger": "danger", "Warning": "warning"}.get(word or "", "none")


def hazard_block(
    summary: Any, record: Any, reagents: Mapping[str, Any], root: str
) -> dict[str, Any]:
    """The hazard block of a method page or bench sheet.

    Uses the method's hazard summary when the analysis has one; otherwise
    it is assembled from the reagent records, so a page never loses its
    hazards because a later stage failed.
    """
    pictos: list[tuple[str, str]]
    if summary is not None:
        signal = summary.signal_word
        h = [(str(c), str(t)) for c, t in summary.hazard_statements]
        p = [(str(c), str(t)) for c, t in summary.precautionary]
        pictos = [(str(c), str(n)) for c, n in summary.pictograms]
        ppe = [_text(x) for x in summary.ppe]
        cautions = [_text(x) for x in summary.cautions]
        derived = True
    else:
        signal = "none"
        hs: set[str] = set()
        ps: set[str] = set()
        pics: set[str] = set()
        ppe_set: dict[str, None] = {}
        for use in record.reagents:
            loaded = reagents.get(use.ref)
            hz = loaded.record.hazards if loaded is not None else None
            if hz is None:
                continue
            if _SIGNAL_RANK.get(hz.signal_word, 0) > _SIGNAL_RANK.get(signal, 0):
                signal = hz.signal_word
            hs.update(hz.hazard_statements)
            ps.update(hz.precautionary_statements)
            pics.update(hz.pictograms)
            for item in hz.ppe:
                ppe_set.setdefault(item, None)
        h = [(c, _ghs_statement(c)) for c in sorted(hs, key=_code_key)]
        p = [(c, _ghs_statement(c)) for c in sorted(ps, key=_code_key)]
        pictos = [(c, _ghs_pictogram(c)) for c in sorted(pics)]
        ppe = list(ppe_set)
        cautions = []
        derived = False
    own = [str(s) for s in record.safety]
    extra = [c for c in cautions if c not in own]
    signal_text = "No signal word" if signal in (None, "", "none") else str(signal)
    return {
        "signal": signal_text,
        "signal_class": _signal_class(signal),
        "pictograms": [
            {"code": c, "name": n, "src": f"{root}static/ghs/{c}.svg", "alt": f"{c}: {n}"}
            for c, n in pictos
        ],
        "hazard_statements": [{"code": c, "text": t} for c, t in h],
        "precautionary": [{"code": c, "text": t} for c, t in p],
        "ppe": ppe,
        "cautions": own + extra,
        "precedence": SAFETY_PRECEDENCE,
        "from_records": not derived,
    }


# ----------------------------------------------------------------------------
# Findings


def method_findings(findings: Iterable[Finding], loaded: Any, analysis: Any) -> list[Finding]:
    """The findings that belong to one method: those located in its record
    file plus the analysis' own, without duplicates, in the one sorted
    order."""
    path = loaded.source.path
    own = {f for f in findings if f.span.path == path}
    if analysis is not None:
        own.update(analysis.findings)
    return sort_findings(own)


def _method_rules() -> list[Any]:
    try:
        from ..check import rules as _rules  # noqa: F401  (registers the rules)
        from ..check.registry import RULES
    except ImportError:
        return []
    return [RULES[k] for k in RULES]


def _check_rows(findings: Sequence[Finding]) -> list[dict[str, Any]]:
    """One row per method rule (pass, warn or fail), then any finding whose
    rule is not a registered method rule (load and analysis findings)."""
    by_rule: dict[str, list[Finding]] = {}
    for f in findings:
        by_rule.setdefault(f.rule, []).append(f)
    rows: list[dict[str, Any]] = []
    known: set[str] = set()
    for info in _method_rules():
        if info.scope != "method":
            continue
        known.add(info.id)
        rows.append(_check_row(info.id, by_rule.get(info.id, [])))
    for rid in sorted(set(by_rule) - known):
        rows.append(_check_row(rid, by_rule[rid]))
    # problems first: a technician looks for what failed, not for the passes
    rank = {"fail": 0, "warn": 1, "pass": 2}
    return sorted(rows, key=lambda r: rank[r["status"]])


def _check_row(rid: str, found: Sequence[Finding]) -> dict[str, Any]:
    if any(f.severity is Severity.ERROR for f in found):
        status = "fail"
    elif found:
        status = "warn"
    else:
        status = "pass"
    return {
        "rule": rid,
        "status": status,
        "label": {"fail": "Fail", "warn": "Warning", "pass": "Pass"}[status],
        "messages": [f"line {f.span.line}: {f.message}" for f in found],
    }


# ----------------------------------------------------------------------------
# Method page


def _reference(record: Any, analysis: Any) -> str:
    if analysis is not None and analysis.curve is not None:
        return str(analysis.curve.reference)
    return str(record.conditions.reference_electrode or "SHE")


def _reagent_rows(record: Any, collection: Any, root: str) -> list[dict[str, Any]]:
    rows = []
    for use in record.reagents:
        loaded = collection.reagents.get(use.ref)
        rec = loaded.record if loaded is not None else None
        rows.append(
            {
                "name": rec.name if rec else use.ref,
                "formula": Markup(species_html(rec.formula)) if rec else "",
                "role": _ROLE_LABEL.get(use.role.value, use.role.value),
                "amount": use.amount or "",
                "note": use.note or "",
                "href": root + reagent_path(use.ref) if rec else None,
            }
        )
    return rows


def _reaction_rows(record: Any, analysis: Any) -> list[dict[str, Any]]:
    infos = list(analysis.reactions) if analysis is not None else []
    rows = []
    if infos:
        for r in infos:
            rows.append(
                {
                    "role": "titration reaction" if r.role == "titration" else "preceding reaction",
                    "html": Markup(reaction_html(r.written)),
                    "balanced": "balanced" if r.balanced else "does not balance",
                    "ok": r.balanced,
                }
            )
        return rows
    texts = [("preceding reaction", t) for t in record.reactions.preceding]
    texts.append(("titration reaction", record.reactions.titration))
    return [
        {"role": role, "html": Markup(reaction_html(t)), "balanced": "not checked", "ok": False}
        for role, t in texts
    ]


def _couple_rows(record: Any, analysis: Any, ref: str) -> list[dict[str, Any]]:
    rows = []
    for role in ("titrand", "titrant"):
        c = getattr(record.couples, role)
        info = analysis.couple(role) if analysis is not None else None
        rows.append(
            {
                "role": role,
                "html": Markup(reaction_html(c.half_reaction)),
                "n": str(info.n) if info is not None and info.n is not None else fmt.MISSING,
                "E0_SHE": fmt.potential(c.formal_potential.value),
                "E0_ref": fmt.potential(info.E0_vs_ref_V) if info is not None else fmt.MISSING,
                "medium": c.medium,
                "source": c.source,
                "reversible": "yes" if c.reversible else "no (the electrode does not respond)",
            }
        )
    return rows


def _curve_block(
    record: Any, analysis: Any, ref: str, mid: str, drawings: DrawingStore | None = None
) -> dict[str, Any] | None:
    if analysis is None or analysis.curve is None:
        return None
    from .plots import curve_key, curve_svg

    cv = analysis.curve
    ind = analysis.indicator
    rows = [
        ("Equivalence volume", fmt.volume(cv.equivalence_volume_mL), "mL"),
        (
            "Equivalence potential",
            fmt.potential(cv.equivalence_potential_V),
            "V vs SHE",
        ),
        ("Equivalence potential", fmt.potential(cv.equivalence_potential_ref_V), f"V vs {ref}"),
        ("log10 K of the titration reaction", fmt.fixed(analysis.log10_K, 1), ""),
        ("Potential break, 99.9 % to 100.1 %", fmt.fixed(cv.break_V, 3), "V"),
    ]
    if ind is not None:
        if ind.range_ref_V is not None:
            lo, hi = ind.range_ref_V
            rows.append(
                (
                    f"Transition range of {ind.name}",
                    f"{fmt.potential(lo)} to {fmt.potential(hi)}",
                    f"V vs {ref}",
                )
            )
        rows.append(
            (
                "Titration error at the indicator's transition",
                fmt.percent(ind.error_percent, 3) if ind.error_percent is not None else fmt.MISSING,
                "%" if ind.error_percent is not None else "",
            )
        )
    return {
        "svg": Markup(curve_svg(cv, ind, record.title, prefix=f"curve-{mid}", drawings=drawings)),
        "key": curve_key(cv, ind),
        "note": cv.note,
        "assumption": cv.assumption,
        "indicator_note": ind.note if ind is not None else None,
        "rows": [{"label": a, "value": b, "unit": c} for a, b, c in rows],
        "reference_name": cv.reference_name,
    }


def _stated_factor(record: Any, analysis: Any) -> Fraction | None:
    if analysis is not None and analysis.factor_stated is not None:
        return Fraction(analysis.factor_stated)
    return None


def _calc_block(record: Any, analysis: Any) -> dict[str, Any]:
    calc = record.calculation
    res = analysis.result if analysis is not None else None
    block: dict[str, Any] = {
        "reports": calc.reports,
        "unit": calc.unit,
        "kind": calc.kind.value,
        "stated": calc.worked_example.result,
        "factor_stated": fmt.fraction(_stated_factor(record, analysis))
        if analysis is not None and analysis.factor_stated is not None
        else (calc.factor or fmt.MISSING),
        "factor_derived": fmt.fraction(analysis.factor_derived)
        if analysis is not None and analysis.factor_derived is not None
        else fmt.MISSING,
        "factor_agrees": analysis is not None
        and analysis.factor_derived is not None
        and analysis.factor_stated is not None
        and analysis.factor_derived == analysis.factor_stated,
        "result": None,
        "budget": None,
        "calculator": None,
    }
    if res is None:
        return block
    block["result"] = {
        "formula": res.formula,
        "inputs": [
            {"symbol": s, "what": d, "value": fmt.general(v), "unit": u}
            for s, d, v, u in res.inputs
        ],
        "recomputed": fmt.fixed(res.value, res.decimals),
        "recomputed_full": fmt.sig(res.value, 6),
        "agrees": res.agrees,
        "molar_mass": fmt.plus_minus(res.molar_mass, res.molar_mass_u),
    }
    bud = analysis.budget
    if bud is not None:
        block["budget"] = {
            "rows": [
                {
                    "name": str(c.name),
                    "value": fmt.general(c.value),
                    "u": fmt.sig(c.u, 2),
                    "unit": str(c.unit),
                    "sensitivity": fmt.sig(c.sensitivity, 3),
                    "contribution": fmt.sig(c.contribution, 2),
                    "share": fmt.fixed(100.0 * c.share if c.share <= 1.0 else c.share, 1),
                }
                for c in bud.contributions
            ],
            "value": fmt.sig(bud.value, 6),
            "u_c": fmt.sig(bud.u_c, 2),
            "k": fmt.sig(bud.k, 2) if bud.k != int(bud.k) else str(int(bud.k)),
            "U": fmt.sig(bud.U, 2),
            "unit": str(bud.unit),
            "result": fmt.plus_minus(bud.value, bud.U),
        }
    block["calculator"] = _calculator(record, res)
    return block


def _calculator(record: Any, res: Any) -> dict[str, Any]:
    """Fields and constants of the in-page calculator; the JSON island
    carries the same factor, molar mass, unit scale and rounding the build
    used, so the page computes what the build computed."""
    we = record.calculation.worked_example
    kind = res.kind
    conc = (we.titrant_concentration or record.titration.titrant_concentration).value
    fields = [
        ("v_start", "Burette reading at start", "mL", 0.0, "0.01"),
        ("v_end", "Burette reading at end point", "mL", we.titrant_volume.value, "0.01"),
        ("v_blank", "Blank titre", "mL", we.blank_volume.value, "0.01"),
    ]
    if kind.endswith("titrant-concentration"):
        fields.append(("sample", "Mass of primary standard", "g", we.sample.value, "0.0001"))
    else:
        fields.append(("conc", "Titrant concentration", "mol/L", conc, "0.0001"))
        if kind.endswith("mass-fraction"):
            fields.append(("sample", "Sample mass", "g", we.sample.value, "0.0001"))
        else:
            fields.append(("sample", "Aliquot volume", "mL", we.sample.value, "0.01"))
    if kind.startswith("back-"):
        xv = we.excess_volume or record.titration.excess_volume
        xc = record.titration.excess_concentration
        fields.append(
            (
                "excess_volume",
                "Volume of excess reagent added",
                "mL",
                xv.value if xv else 0.0,
                "0.01",
            )
        )
        fields.append(
            (
                "excess_conc",
                "Concentration of excess reagent",
                "mol/L",
                xc.value if xc else 0.0,
                "0.0001",
            )
        )
    data = {
        "kind": kind,
        "factor": fmt.data_float(float(res.factor), 15),
        "excess_factor": fmt.data_float(float(res.excess_factor), 15)
        if res.excess_factor is not None
        else None,
        "molar_mass": fmt.data_float(res.molar_mass, 15),
        "scale": fmt.data_float(res.scale, 15),
        "purity": fmt.data_float(res.purity, 15),
        "decimals": res.decimals,
        "unit": res.unit,
    }
    return {
        "fields": [
            {
                "name": n,
                "id": f"calc-{n}",
                "label": label,
                "unit": unit,
                "worked": fmt.csv_number(value, 6).rstrip("0").rstrip(".") or "0",
                "step": step,
            }
            for n, label, unit, value, step in fields
        ],
        # </ cannot occur in this JSON (numbers and fixed words), but escape
        # anyway: the island sits inside a <script> element
        "json": Markup(json.dumps(data, sort_keys=True).replace("</", "<\\/")),
        "unit": res.unit,
        "worked_result": fmt.fixed(res.value, res.decimals),
    }


def _standardisation(
    record: Any, collection: Any, published: Mapping[str, Any], root: str
) -> dict[str, Any]:
    tid = record.titration.titrant
    loaded = collection.reagents.get(tid)
    out: dict[str, Any] = {
        "titrant": loaded.record.name if loaded else tid,
        "href": root + reagent_path(tid) if loaded else None,
        "method": None,
        "method_href": None,
        "status": "",
        "ok": False,
    }
    if loaded is None:
        out["status"] = "the titrant has no reagent record"
        return out
    rec = loaded.record
    if rec.primary_standard:
        out["status"] = "primary standard: used as weighed, no standardisation"
        out["ok"] = True
        return out
    sid = rec.standardised_by
    if sid is None:
        out["status"] = "no standardisation method is named for this titrant"
        return out
    out["method"] = sid
    m = published.get(sid)
    if m is None:
        out["status"] = "its standardisation method is not published in this collection"
        return out
    out["method"] = m.record.title
    out["method_href"] = root + method_path(sid)
    status = m.record.status.value
    out["ok"] = status == "approved"
    out["status"] = {
        "approved": "standardisation method approved",
        "draft": "standardisation method is a DRAFT, not approved",
        "retired": "standardisation method is RETIRED",
    }[status]
    return out


def method_page(
    mid: str,
    collection: Any,
    analysis: Any,
    findings: Sequence[Finding],
    options: Any,
    drawings: DrawingStore | None = None,
) -> Page:
    """The method page ``methods/<id>/index.html``; ``drawings``: see
    :func:`sitegen.render.plots.curve_svg`."""
    path = method_path(mid)
    loaded = collection.methods[mid]
    rec = loaded.record
    ctx = site_context(collection, options, path, rec.title)
    root = ctx["root"]
    published = published_methods(collection, options)
    ref = _reference(rec, analysis)
    ctx.update(_method_head(mid, collection, analysis, options, published, root))
    ctx["hazards"] = hazard_block(
        analysis.hazards if analysis is not None else None, rec, collection.reagents, root
    )
    ctx["scope"] = {
        "analyte": rec.scope.analyte,
        "species": Markup(species_html(rec.scope.analyte_species)),
        "matrix": rec.scope.matrix,
        "working_range": rec.scope.working_range,
        "purpose": rec.scope.purpose,
        "mode": rec.titration.mode.value,
    }
    ctx["reagents"] = _reagent_rows(rec, collection, root)
    ctx["reactions"] = _reaction_rows(rec, analysis)
    ctx["couples"] = _couple_rows(rec, analysis, ref)
    ctx["reference"] = ref
    ctx["conditions"] = {
        "medium": rec.conditions.medium,
        "hydrogen_ion": fmt.sig(rec.conditions.hydrogen_ion.value, 3),
        "temperature": fmt.fixed(rec.conditions.temperature.value - 273.15, 1)
        if rec.conditions.temperature.value > 200
        else fmt.fixed(rec.conditions.temperature.value, 1),
        "electrons": str(analysis.electrons)
        if analysis is not None and analysis.electrons is not None
        else fmt.MISSING,
    }
    ctx["curve"] = _curve_block(rec, analysis, ref, mid, drawings)
    ctx["exports"] = {"csv": "curve.csv" if ctx["curve"] else None, "json": "method.json"}
    ctx["procedure"] = Markup(markdown_html(rec.procedure, _glossary_hrefs(collection, root)))
    ctx["calc"] = _calc_block(rec, analysis)
    hz = ctx["hazards"]
    ctx["checklist"] = {
        "ppe": hz["ppe"],
        "prepare": [
            {"name": r["name"], "amount": r["amount"], "role": r["role"]} for r in ctx["reagents"]
        ],
        "standardisation": _standardisation(rec, collection, published, root),
    }
    checks = _check_rows(findings)
    ctx["checks"] = [c for c in checks if c["status"] != "pass"]
    ctx["passed"] = [c["rule"] for c in checks if c["status"] == "pass"]
    ctx["findings_count"] = len(findings)
    ctx["history"] = [
        {"revision": h.revision, "date": fmt.date(h.date), "change": h.change}
        for h in sorted(rec.history, key=lambda h: -h.revision)
    ]
    ctx["alternative"] = rec.alternative
    ctx["bench_href"] = "bench.html"
    ctx["scripts"] = [root + "static/calc.js"]
    return Page(path, "method.html", ctx)


def _method_head(
    mid: str,
    collection: Any,
    analysis: Any,
    options: Any,
    published: Mapping[str, Any],
    root: str,
) -> dict[str, Any]:
    """Title block, banners and record footer shared by the method page
    and the bench sheet."""
    loaded = collection.methods[mid]
    rec = loaded.record
    status = rec.status.value
    ap = rec.approval
    overdue = ap is not None and status == "approved" and ap.review_due < options.build_date
    successor = None
    if rec.successor:
        s = published.get(rec.successor)
        successor = {
            "title": s.record.title if s else rec.successor,
            "href": root + method_path(rec.successor) if s else None,
        }
    return {
        "method": {
            "id": mid,
            "title": rec.title,
            "status": status,
            "status_label": _STATUS_LABEL[status],
            "revision": rec.revision,
            "approved_by": ap.approved_by if ap else None,
            "approved_on": fmt.date(ap.approved_on) if ap else None,
            "review_due": fmt.date(ap.review_due) if ap else None,
        },
        "banners": {
            "overdue": overdue,
            "draft": status == "draft",
            "retired": status == "retired",
            "successor": successor,
        },
        "record_footer": {
            "revision": rec.revision,
            "fingerprint": loaded.source.fingerprint,
            # the file within the source folder, wherever the build ran from
            "source": "records/" + loaded.source.path.replace("\\", "/").rsplit("/", 1)[-1],
        },
    }


def bench_page(mid: str, collection: Any, analysis: Any, options: Any) -> Page:
    """The printable bench sheet ``methods/<id>/bench.html``."""
    path = method_path(mid, "bench.html")
    loaded = collection.methods[mid]
    rec = loaded.record
    ctx = site_context(collection, options, path, f"Bench sheet: {rec.title}")
    root = ctx["root"]
    published = published_methods(collection, options)
    ctx.update(_method_head(mid, collection, analysis, options, published, root))
    ctx["hazards"] = hazard_block(
        analysis.hazards if analysis is not None else None, rec, collection.reagents, root
    )
    sample_is_mass = rec.titration.sample.unit == "g"
    back = rec.titration.mode.value == "back"
    ctx["bench"] = {
        "sample_label": "Sample mass / g" if sample_is_mass else "Aliquot volume / mL",
        "nominal_sample": fmt.sig(rec.titration.sample.value, 4) + " " + rec.titration.sample.unit,
        "titrant": ctx["method"]["title"],
        "titrant_name": (
            collection.reagents[rec.titration.titrant].record.name
            if rec.titration.titrant in collection.reagents
            else rec.titration.titrant
        ),
        "titrant_conc": fmt.sig(rec.titration.titrant_concentration.value, 4),
        "result_unit": rec.calculation.unit,
        "reports": rec.calculation.reports,
        "formula": analysis.result.formula
        if analysis is not None and analysis.result is not None
        else None,
        "replicates": [1, 2, 3],
        "back": back,
    }
    ctx["method_href"] = "index.html"
    return Page(path, "bench.html", ctx)


# ----------------------------------------------------------------------------
# Shared pages


def _method_item(mid: str, loaded: Any, collection: Any, root: str, options: Any) -> dict[str, Any]:
    rec = loaded.record
    tl = collection.reagents.get(rec.titration.titrant)
    ap = rec.approval
    return {
        "id": mid,
        "title": rec.title,
        "href": root + method_path(mid),
        "analyte": rec.scope.analyte,
        "matrix": rec.scope.matrix,
        "titrant": tl.record.name if tl else rec.titration.titrant,
        "revision": rec.revision,
        "review_due": fmt.date(ap.review_due) if ap else None,
        "overdue": ap is not None and ap.review_due < options.build_date,
        "status_label": _STATUS_LABEL[rec.status.value],
    }


def _fold(s: str) -> str:
    return s.casefold()


def home_page(collection: Any, options: Any) -> Page:
    """``index.html``: approved methods by analyte, drafts apart, search."""
    path = "index.html"
    ctx = site_context(collection, options, path, "Methods")
    root = ctx["root"]
    published = published_methods(collection, options)
    approved = [
        _method_item(k, v, collection, root, options)
        for k, v in published.items()
        if v.record.status.value == "approved"
    ]
    drafts = [
        _method_item(k, v, collection, root, options)
        for k, v in published.items()
        if v.record.status.value == "draft"
    ]
    groups: dict[str, list[dict[str, Any]]] = {}
    for item in sorted(approved, key=lambda i: (_fold(i["analyte"]), _fold(i["title"]), i["id"])):
        groups.setdefault(item["analyte"], []).append(item)
    ctx["groups"] = [{"analyte": a, "methods": ms} for a, ms in groups.items()]
    ctx["drafts"] = sorted(drafts, key=lambda i: (_fold(i["title"]), i["id"]))
    ctx["filters"] = [
        {"name": key, "label": label, "options": sorted({i[key] for i in approved}, key=_fold)}
        for key, label in (("analyte", "Analyte"), ("matrix", "Matrix"), ("titrant", "Titrant"))
    ]
    ctx["retired_count"] = sum(1 for v in published.values() if v.record.status.value == "retired")
    ctx["scripts"] = [
        root + "search-index.js",
        root + "static/search.js",
        root + "static/filter.js",
    ]
    return Page(path, "index.html", ctx)


def archive_page(collection: Any, options: Any) -> Page:
    """``archive.html``: retired methods with their successors."""
    path = "archive.html"
    ctx = site_context(collection, options, path, "Archive of retired methods")
    root = ctx["root"]
    published = published_methods(collection, options)
    items = []
    for mid, loaded in published.items():
        rec = loaded.record
        if rec.status.value != "retired":
            continue
        item = _method_item(mid, loaded, collection, root, options)
        s = published.get(rec.successor) if rec.successor else None
        item["successor"] = (
            {"title": s.record.title, "href": root + method_path(rec.successor)}
            if s is not None
            else ({"title": rec.successor, "href": None} if rec.successor else None)
        )
        items.append(item)
    ctx["methods"] = sorted(items, key=lambda i: (_fold(i["title"]), i["id"]))
    return Page(path, "archive.html", ctx)


def reagent_uses(collection: Any, options: Any) -> dict[str, list[tuple[str, Any]]]:
    """Reagent id -> (method id, use) of every published method naming it,
    in one pass over the methods (the reagent pages list them)."""
    out: dict[str, list[tuple[str, Any]]] = {}
    for mid, loaded in published_methods(collection, options).items():
        for use in loaded.record.reagents:
            out.setdefault(use.ref, []).append((mid, use))
    return out


def _uses(collection: Any, root: str, found: Sequence[tuple[str, Any]]) -> list[dict[str, Any]]:
    rows = []
    for mid, use in found:
        rec = collection.methods[mid].record
        rows.append(
            {
                "title": rec.title,
                "href": root + method_path(mid),
                "role": _ROLE_LABEL.get(use.role.value, use.role.value),
                "status_label": _STATUS_LABEL[rec.status.value],
                "amount": use.amount or "",
            }
        )
    return sorted(rows, key=lambda r: (_fold(r["title"]), r["role"]))


def reagent_page(
    rid: str,
    collection: Any,
    options: Any,
    uses: Mapping[str, Sequence[tuple[str, Any]]] | None = None,
) -> Page:
    """``reagents/<id>/index.html``; ``uses``: :func:`reagent_uses`, when
    the caller renders several reagent pages."""
    path = reagent_path(rid)
    rec = collection.reagents[rid].record
    ctx = site_context(collection, options, path, rec.name)
    root = ctx["root"]
    mm = fmt.MISSING
    try:
        from ..chem.formula import molar_mass

        value, u = molar_mass(rec.formula)
        mm = fmt.plus_minus(value, u)
    except Exception:  # a bad formula has its own finding; the page says so
        mm = fmt.MISSING
    hz = rec.hazards
    hazards = None
    if hz is not None:
        hazards = {
            "signal": "No signal word" if hz.signal_word == "none" else hz.signal_word,
            "signal_class": _signal_class(hz.signal_word),
            "pictograms": [
                {
                    "code": c,
                    "name": _ghs_pictogram(c),
                    "src": f"{root}static/ghs/{c}.svg",
                    "alt": f"{c}: {_ghs_pictogram(c)}",
                }
                for c in sorted(hz.pictograms)
            ],
            "hazard_statements": [
                {"code": c, "text": _ghs_statement(c)}
                for c in sorted(hz.hazard_statements, key=_code_key)
            ],
            "precautionary": [
                {"code": c, "text": _ghs_statement(c)}
                for c in sorted(hz.precautionary_statements, key=_code_key)
            ],
            "ppe": list(hz.ppe),
            "storage": hz.storage,
            "incompatibilities": list(hz.incompatibilities),
            "waste": hz.waste,
            "source": hz.source,
        }
    ctx["reagent"] = {
        "id": rid,
        "name": rec.name,
        "formula": Markup(species_html(rec.formula)),
        "molar_mass": mm,
        "molar_mass_source": rec.molar_mass_source,
        "supplies": Markup(species_html(rec.supplies)) if rec.supplies else None,
        "grade": rec.grade,
        "purity": fmt.sig(rec.purity.value, 4) if rec.purity is not None else None,
        "primary_standard": rec.primary_standard,
        "concentration": fmt.sig(rec.concentration.value, 4) if rec.concentration else None,
        "notes": Markup(markdown_html(rec.notes)) if rec.notes else None,
    }
    ctx["hazards"] = hazards
    ctx["sds"] = SDS_GOVERNS
    ctx["precedence"] = SAFETY_PRECEDENCE
    if uses is None:
        uses = reagent_uses(collection, options)
    ctx["uses"] = _uses(collection, root, uses.get(rid, ()))
    published = published_methods(collection, options)
    sid = rec.standardised_by
    ctx["standardised_by"] = (
        {
            "title": published[sid].record.title if sid in published else sid,
            "href": root + method_path(sid) if sid in published else None,
        }
        if sid
        else None
    )
    return Page(path, "reagent.html", ctx)


def reagents_index_page(collection: Any, options: Any) -> Page:
    path = "reagents/index.html"
    ctx = site_context(collection, options, path, "Reagents")
    root = ctx["root"]
    ctx["items"] = [
        {
            "name": lo.record.name,
            "formula": Markup(species_html(lo.record.formula)),
            "href": root + reagent_path(rid),
            "signal": (lo.record.hazards.signal_word if lo.record.hazards else "none"),
            "signal_class": _signal_class(
                lo.record.hazards.signal_word if lo.record.hazards else None
            ),
        }
        for rid, lo in sorted(
            collection.reagents.items(), key=lambda kv: (_fold(kv[1].record.name), kv[0])
        )
    ]
    return Page(path, "reagents.html", ctx)


def indicator_page(iid: str, collection: Any, options: Any) -> Page:
    """``indicators/<id>/index.html``."""
    path = indicator_path(iid)
    rec = collection.indicators[iid].record
    ctx = site_context(collection, options, path, rec.name)
    root = ctx["root"]
    ref = ctx["site_reference"]
    e_ref = None
    if rec.transition_potential is not None:
        try:
            from ..chem.electrodes import vs_reference

            e_ref = vs_reference(rec.transition_potential.value, ref)
        except (ImportError, KeyError):
            e_ref = None
    published = published_methods(collection, options)
    ctx["indicator"] = {
        "id": iid,
        "name": rec.name,
        "kind": {
            "redox": "redox indicator",
            "specific": "specific indicator",
            "self": "self-indicating titrant",
        }[rec.kind],
        "E_SHE": fmt.potential(rec.transition_potential.value)
        if rec.transition_potential
        else None,
        "E_ref": fmt.potential(e_ref) if e_ref is not None else None,
        "reference": ref,
        "n": rec.n,
        "medium": rec.medium,
        "colour_oxidised": rec.colour_oxidised,
        "colour_reduced": rec.colour_reduced,
        "source": rec.source,
        "notes": Markup(markdown_html(rec.notes)) if rec.notes else None,
        "reagent": {
            "name": collection.reagents[rec.reagent].record.name,
            "href": root + reagent_path(rec.reagent),
        }
        if rec.reagent and rec.reagent in collection.reagents
        else None,
    }
    ctx["uses"] = sorted(
        (
            {
                "title": lo.record.title,
                "href": root + method_path(mid),
                "status_label": _STATUS_LABEL[lo.record.status.value],
            }
            for mid, lo in published.items()
            if lo.record.titration.indicator == iid
        ),
        key=lambda r: _fold(r["title"]),
    )
    return Page(path, "indicator.html", ctx)


def indicators_index_page(collection: Any, options: Any) -> Page:
    path = "indicators/index.html"
    ctx = site_context(collection, options, path, "Indicators")
    root = ctx["root"]
    ctx["items"] = [
        {
            "name": lo.record.name,
            "kind": lo.record.kind,
            "href": root + indicator_path(iid),
            "E_SHE": fmt.potential(lo.record.transition_potential.value)
            if lo.record.transition_potential
            else None,
        }
        for iid, lo in sorted(
            collection.indicators.items(), key=lambda kv: (_fold(kv[1].record.name), kv[0])
        )
    ]
    return Page(path, "indicators.html", ctx)


def glossary_page(collection: Any, options: Any) -> Page:
    """``glossary.html``: one anchor per term."""
    path = "glossary.html"
    ctx = site_context(collection, options, path, "Glossary")
    ctx["terms"] = [
        {"term": t, "id": glossary_anchor(t), "html": Markup(markdown_html(d))}
        for t, d in sorted(collection.glossary.items(), key=lambda kv: _fold(kv[0]))
    ]
    return Page(path, "glossary.html", ctx)


def rules_page(collection: Any, options: Any) -> Page:
    """``rules.html``: every registered check with its explanation."""
    path = "rules.html"
    ctx = site_context(collection, options, path, "Checks")
    ctx["rules"] = [{"id": r.id, "scope": r.scope, "doc": r.doc} for r in _method_rules()]
    return Page(path, "rules.html", ctx)


def quality_page(
    collection: Any, analyses: Mapping[str, Any], findings: Sequence[Finding], options: Any
) -> Page:
    """``quality.html``: every check, and per method pass/warn/fail counts."""
    path = "quality.html"
    ctx = site_context(collection, options, path, "Quality overview")
    root = ctx["root"]
    rules = _method_rules()
    ctx["rules"] = [{"id": r.id, "scope": r.scope, "doc": r.doc} for r in rules]
    rows = []
    for mid, loaded in published_methods(collection, options).items():
        own = method_findings(findings, loaded, analyses.get(mid))
        checks = _check_rows(own)
        rows.append(
            {
                "title": loaded.record.title,
                "href": root + method_path(mid),
                "status_label": _STATUS_LABEL[loaded.record.status.value],
                "pass": sum(1 for c in checks if c["status"] == "pass"),
                "warn": sum(1 for c in checks if c["status"] == "warn"),
                "fail": sum(1 for c in checks if c["status"] == "fail"),
            }
        )
    ctx["methods"] = rows
    ctx["excluded"] = [{"id": mid, "reason": reason} for mid, reason in sorted(options.excluded)]
    return Page(path, "quality.html", ctx)
