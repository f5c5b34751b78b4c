"""Tests for sitegen.render.plots."""

import re

import numpy as np
import pytest

from sitegen.analyse import CurveInfo, IndicatorInfo
from sitegen.render import plots
from sitegen.render.plots import curve_key, curve_svg


def _curve(note=None, nan=False):
    v = np.linspace(0.0, 40.0, 81)
    veq = 20.0
    e = np.where(
        v < veq,
        0.68 + 0.0592 * np.log10(np.clip(v, 0.1, None) / np.clip(veq - v, 0.1, None)),
        1.44 + 0.0592 * np.log10(np.clip(v - veq, 0.1, None) / veq),
    )
    if nan:
        e = e.copy()
        e[(v > veq) & (v < veq + 8)] = np.nan
    return CurveInfo(
        volumes_mL=v,
        E_vs_SHE=e,
        E_vs_ref=e - 0.241,
        reference="SCE",
        reference_name="saturated calomel electrode",
        equivalence_volume_mL=veq,
        equivalence_potential_V=1.06,
        equivalence_potential_ref_V=0.819,
        break_V=0.4,
        note=note,
        titrand_mmol=2.0,
        assumption="test",
    )


IND = IndicatorInfo(
    "ferroin", "Ferroin", "redox", 1.147, (1.088, 1.206), (0.847, 0.965), 0.01, True, None
)


def test_byte_identical_across_calls():
    a = curve_svg(_curve(), IND, "Iron", prefix="p")
    b = curve_svg(_curve(), IND, "Iron", prefix="p")
    assert a == b


def test_inline_ready_and_accessible():
    svg = curve_svg(_curve(), IND, "Iron <test>", prefix="m1")
    assert svg.startswith("<svg") and "<?xml" not in svg and "DOCTYPE" not in svg
    assert 'role="img"' in svg and 'aria-labelledby="m1-title m1-desc"' in svg
    assert '<title id="m1-title">Titration curve: Iron &lt;test&gt;</title>' in svg
    assert 'id="m1-desc"' in svg
    assert "E / V vs SCE" in svg
    assert "Ferroin" in svg  # the band is described
    for i in re.findall(r'\bid="([^"]+)"', svg):
        assert i.startswith("m1-"), i
    for ref in re.findall(r"url\(#([^)]+)\)", svg):
        assert ref.startswith("m1-")


def test_prefix_makes_ids_differ():
    a = curve_svg(_curve(), None, "Iron", prefix="a")
    b = curve_svg(_curve(), None, "Iron", prefix="b")
    assert set(re.findall(r'\bid="([^"]+)"', a)).isdisjoint(re.findall(r'\bid="([^"]+)"', b))


def _moves(svg):
    m = re.search(r'<path d="([^"]+)"[^>]*stroke: #0072b2', svg, re.S)
    assert m, "curve path not found"
    return m.group(1).count("M")


def test_nan_region_is_a_gap_and_described():
    full = curve_svg(_curve(), None, "T", prefix="x")
    gap = curve_svg(_curve(note="electrode does not respond", nan=True), None, "T", prefix="x")
    assert "undefined" in gap and "electrode does not respond" in gap
    # the curve is one path; a gap starts a new subpath (a second moveto)
    assert _moves(full) == 1
    assert _moves(gap) == 2
    assert "nan" not in gap.lower().replace("nanometre", "")


@pytest.mark.parametrize("ref", ["SHE", "Ag/AgCl-sat"])
def test_axis_names_reference(ref):
    c = _curve()
    c = CurveInfo(**{**c.__dict__, "reference": ref})
    assert f"E / V vs {ref}" in curve_svg(c, None, "T")


def _fresh(curve, ind, title, prefix):
    """The same picture drawn on a new canvas, with nothing drawn before."""
    return plots._finish(plots._draw(plots._new_canvas(), curve, ind), curve, ind, title, prefix)


def _variants():
    c = _curve()
    return [
        ("band", c, IND),
        ("no indicator", c, None),
        ("gap", _curve(note="no response", nan=True), IND),
        (
            "no equivalence potential",
            CurveInfo(**{**c.__dict__, "equivalence_potential_ref_V": None}),
            None,
        ),
        (
            "other range",
            CurveInfo(
                **{
                    **c.__dict__,
                    "volumes_mL": c.volumes_mL * 2.5,
                    "E_vs_ref": c.E_vs_ref - 0.9,
                    "reference": "Ag/AgCl-sat",
                }
            ),
            IND,
        ),
    ]


def test_reused_canvas_draws_what_a_fresh_one_draws_in_any_order():
    # The build reuses one canvas per process; what it draws must not
    # depend on the curves drawn before, or output would depend on --jobs.
    cases = _variants()
    fresh = {name: _fresh(c, i, "T", "p") for name, c, i in cases}
    for order in (cases, cases[::-1], cases[1::2] + cases[::2]):
        for name, c, i in order:
            assert curve_svg(c, i, "T", prefix="p") == fresh[name], name


def test_shown_parts_follow_the_data():
    c = _curve()
    with_band = curve_svg(c, IND, "T", prefix="p")
    curve_svg(_curve(nan=True), None, "T", prefix="p")  # something else in between
    without = curve_svg(c, None, "T", prefix="p")
    assert "<pattern" in with_band and "<pattern" not in without
    none_pt = CurveInfo(**{**c.__dict__, "equivalence_potential_ref_V": None})
    # the diamond marker is drawn only with a potential to put it at
    assert without.count("<use") > curve_svg(none_pt, None, "T", prefix="p").count("<use")


def test_key_lists_what_is_drawn():
    key = curve_key(_curve(), IND)
    assert [k["swatch"] for k in key] == ["line", "dashed", "marker", "band"]
    assert key[1]["label"] == "equivalence volume, 20.00 mL"
    assert key[3]["label"] == "Ferroin: transition range"
    assert key[0]["colour"] == plots.PALETTE["curve"]
    c = CurveInfo(**{**_curve().__dict__, "equivalence_potential_ref_V": None})
    assert [k["swatch"] for k in curve_key(c, None)] == ["line", "dashed"]


def test_kept_drawings_give_the_same_figure_and_differ_when_the_curve_does():
    import dataclasses

    store: dict[str, str] = {}
    plain = curve_svg(_curve(), IND, "Iron", prefix="p")
    first = curve_svg(_curve(), IND, "Iron", prefix="p", drawings=store)
    assert first == plain and len(store) == 1
    # the title and prefix are not drawn by matplotlib: same drawing reused
    again = curve_svg(_curve(), IND, "Other title", prefix="q", drawings=store)
    assert len(store) == 1
    assert again == curve_svg(_curve(), IND, "Other title", prefix="q")
    # anything drawn changes the key: the points, the band, the reference
    shifted = dataclasses.replace(_curve(), E_vs_ref=_curve().E_vs_ref + 0.001)
    other_ref = dataclasses.replace(_curve(), reference="Ag/AgCl")
    keys = {
        plots.drawing_key(c, i)
        for c, i in [(_curve(), IND), (shifted, IND), (_curve(), None), (other_ref, IND)]
    }
    assert len(keys) == 4
    assert curve_svg(shifted, IND, "Iron", prefix="p", drawings=store) == curve_svg(
        shifted, IND, "Iron", prefix="p"
    )
    assert len(store) == 2
