"""Tests for sitegen.render.exports."""

import csv
import io
import json

import numpy as np

from sitegen.analyse import CurveInfo
from sitegen.errors import Finding, Severity, Span
from sitegen.render.exports import curve_csv, method_json


def _curve(ref="SCE"):
    v = np.array([0.0, 10.0, 20.0, 30.0])
    e = np.array([0.5, 0.68, np.nan, 1.4])
    return CurveInfo(v, e, e - 0.241, ref, "x", 20.0, None, None, None, "gap", 1.0, "a")


def test_csv_header_and_empty_fields_for_undefined():
    rows = list(csv.reader(io.StringIO(curve_csv(_curve()).decode())))
    assert rows[0] == ["titrant_mL", "E_V_vs_SHE", "E_V_vs_SCE"]
    assert all(len(r) == 3 for r in rows)
    assert rows[3] == ["20.0000", "", ""]
    assert float(rows[2][1]) - float(rows[2][2]) == __import__("pytest").approx(0.241)


def test_csv_she_has_two_columns():
    rows = list(csv.reader(io.StringIO(curve_csv(_curve("SHE")).decode())))
    assert rows[0] == ["titrant_mL", "E_V_vs_SHE"]


def test_method_json_fields(demo):
    col, analyses = demo
    lo = col.methods["iron-ii-ceric"]
    a = analyses["iron-ii-ceric"]
    f = Finding("x-rule", Severity.WARNING, "msg", Span(lo.source.path, 3, 4))
    data = json.loads(method_json(lo, a, [f]))
    for key in (
        "equivalence_volume_mL",
        "equivalence_potential_V_vs_SHE",
        "log10_K",
        "factor",
        "indicator_error_percent",
        "result",
        "expanded_uncertainty",
        "findings",
        "id",
        "revision",
        "fingerprint",
        "reference_electrode",
        "curve_note",
    ):
        assert key in data
    assert data["fingerprint"] == lo.source.fingerprint and len(data["fingerprint"]) == 12
    assert data["factor"] == float(a.result.factor)
    assert data["result"]["unit"] == "g/L"
    assert abs(data["result"]["value"] - a.result.value) < 1e-9
    assert data["findings"] == [
        {
            "file": lo.source.path,
            "line": 3,
            "column": 4,
            "rule": "x-rule",
            "severity": "warning",
            "message": "msg",
        }
    ]


def test_method_json_without_analysis_is_nulls(demo):
    col, _ = demo
    data = json.loads(method_json(col.methods["iron-ii-ceric"], None, []))
    assert data["result"] is None and data["indicator_error_percent"] is None
    assert data["expanded_uncertainty"] is None


def test_indicator_error_null_for_non_redox(demo):
    col, analyses = demo
    for mid, a in analyses.items():
        data = json.loads(method_json(col.methods[mid], a, []))
        if a.indicator is None or a.indicator.kind != "redox":
            assert data["indicator_error_percent"] is None


def test_json_is_deterministic(demo):
    col, analyses = demo
    lo = col.methods["iron-ii-ceric"]
    assert method_json(lo, analyses["iron-ii-ceric"], []) == method_json(
        lo, analyses["iron-ii-ceric"], []
    )
