"""Machine-readable exports of a method: ``curve.csv`` and ``method.json``.

Both are deterministic: fixed decimals in the CSV, JSON with sorted keys,
floats rounded to ten significant digits by :func:`fmt.data_float`, and
no timestamps.
"""

from __future__ import annotations

__all__ = ["curve_csv", "method_json"]

import json
from collections.abc import Sequence
from typing import Any

from ..errors import Finding, finding_to_json
from . import fmt


def curve_csv(curve: Any) -> bytes:
    """The curve as CSV: ``titrant_mL,E_V_vs_SHE`` and, when the method's
    reference electrode is not SHE, ``E_V_vs_<REF>``. Undefined potentials
    are empty fields, so every row has the same columns and parses."""
    ref = str(curve.reference)
    extra = ref != "SHE"
    ref_col = "E_V_vs_" + ref.replace("/", "_").replace("-", "_")
    head = ["titrant_mL", "E_V_vs_SHE"] + ([ref_col] if extra else [])
    lines = [",".join(head)]
    for v, e, er in zip(curve.volumes_mL, curve.E_vs_SHE, curve.E_vs_ref, strict=True):
        row = [fmt.csv_number(float(v), 4), fmt.csv_number(float(e), 6)]
        if extra:
            row.append(fmt.csv_number(float(er), 6))
        lines.append(",".join(row))
    return ("\n".join(lines) + "\n").encode("utf-8")


def _fraction_float(q: Any) -> float | None:
    return None if q is None else fmt.data_float(float(q))


def method_json(loaded: Any, analysis: Any, findings: Sequence[Finding]) -> bytes:
    """The method's computed values and findings as JSON."""
    rec = loaded.record
    cv = analysis.curve if analysis is not None else None
    ind = analysis.indicator if analysis is not None else None
    res = analysis.result if analysis is not None else None
    bud = analysis.budget if analysis is not None else None
    factor = None
    if res is not None:
        factor = res.factor
    elif analysis is not None:
        factor = (
            analysis.factor_derived
            if analysis.factor_derived is not None
            else analysis.factor_stated
        )
    data: dict[str, Any] = {
        "id": rec.id,
        "title": rec.title,
        "revision": rec.revision,
        "status": rec.status.value,
        "fingerprint": loaded.source.fingerprint,
        "reference_electrode": cv.reference
        if cv is not None
        else (rec.conditions.reference_electrode or "SHE"),
        "equivalence_volume_mL": fmt.data_float(cv.equivalence_volume_mL) if cv else None,
        "equivalence_potential_V_vs_SHE": fmt.data_float(cv.equivalence_potential_V)
        if cv
        else None,
        "equivalence_potential_V_vs_ref": fmt.data_float(cv.equivalence_potential_ref_V)
        if cv
        else None,
        "break_V": fmt.data_float(cv.break_V) if cv else None,
        "curve_note": cv.note if cv else None,
        "log10_K": fmt.data_float(analysis.log10_K) if analysis is not None else None,
        "factor": _fraction_float(factor),
        "factor_stated": _fraction_float(analysis.factor_stated) if analysis is not None else None,
        "factor_derived": _fraction_float(analysis.factor_derived)
        if analysis is not None
        else None,
        # only a redox indicator has a transition potential and so an error
        "indicator_error_percent": fmt.data_float(ind.error_percent)
        if ind is not None and ind.kind == "redox"
        else None,
        "result": {"value": fmt.data_float(res.value), "unit": res.unit} if res else None,
        "stated_result": rec.calculation.worked_example.result,
        "expanded_uncertainty": {"value": fmt.data_float(bud.U), "unit": str(bud.unit), "k": 2}
        if bud is not None
        else None,
        "findings": [finding_to_json(f) for f in findings],
    }
    if bud is not None and bud.k != 2:
        data["expanded_uncertainty"]["k"] = fmt.data_float(bud.k)
    text = json.dumps(data, sort_keys=True, indent=2, ensure_ascii=False, allow_nan=False)
    return (text + "\n").encode("utf-8")
