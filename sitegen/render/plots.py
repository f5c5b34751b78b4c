"""Titration curves as inline SVG; the only module that imports matplotlib.

matplotlib is imported on the first :func:`curve_svg` call, so a build
that renders no curve (everything cached) never pays for the import. The
SVG is byte-reproducible: fixed figure size and margins, fixed
``svg.hashsalt``, no date or creator metadata, text kept as text.

Speed. A build draws one curve per method, and most of a fresh
matplotlib figure's cost is building the figure, measuring text for an
automatic layout and placing a legend. So each process keeps one canvas
whose artists are updated in place (every property the picture depends
on is set again on every call, so nothing carries over from the previous
curve: tests/render/test_plots.py compares it byte for byte with a fresh
canvas), the margins are fixed, and the key is HTML beside the figure
(:func:`curve_key`), where it is also text a screen reader can read.
"""

from __future__ import annotations

__all__ = ["PALETTE", "DrawingStore", "curve_key", "curve_svg", "drawing_key"]

import html
import io
import re
from dataclasses import dataclass
from functools import cache
from typing import Any, Protocol

from . import fmt

#: Okabe & Ito (2008) colour-blind-safe palette; each series also differs
#: by line style or marker so the plot reads in greyscale print.
PALETTE = {
    "curve": "#0072B2",  # blue, solid
    "equivalence": "#D55E00",  # vermillion, dashed + marker
    "band": "#E69F00",  # orange, hatched band
    "band_hatch": "#8C6400",  # darker orange for the hatch lines
}

#: Figure size (inches at 72 dpi: the SVG's user units are points) and the
#: axes rectangle as fractions of it; wide enough on the left for a
#: signed tick label such as -0.25 plus the axis name.
_SIZE = (6.4, 4.0)
_MARGINS = {"left": 0.125, "right": 0.975, "bottom": 0.125, "top": 0.97}

_RC = {
    "svg.hashsalt": "sitegen",
    "svg.fonttype": "none",
    "font.family": "sans-serif",
    "font.size": 10,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "path.simplify": False,
}

_ID = re.compile(r'\bid="([^"]+)"')


def _prefix_ids(svg: str, prefix: str) -> str:
    """Make every id unique on the page: matplotlib names clip paths and
    glyphs the same in every figure, and two plots on one page (or an id
    clashing with the page's own) would cross-reference each other."""
    ids = sorted(set(_ID.findall(svg)), key=len, reverse=True)
    for old in ids:
        new = f"{prefix}-{old}"
        svg = svg.replace(f'id="{old}"', f'id="{new}"')
        svg = svg.replace(f"url(#{old})", f"url(#{new})")
        svg = svg.replace(f'href="#{old}"', f'href="#{new}"')
    return svg


def _describe(curve: Any, indicator: Any, title: str) -> str:
    ref = curve.reference
    parts = [
        f"Titration curve of {title}: potential in volts against the {curve.reference_name}"
        f" ({ref}) as titrant is added, from {fmt.volume(float(curve.volumes_mL[0]))} to"
        f" {fmt.volume(float(curve.volumes_mL[-1]))} mL.",
        f"Equivalence point at {fmt.volume(curve.equivalence_volume_mL)} mL",
    ]
    if curve.equivalence_potential_ref_V is not None:
        parts[-1] += f", {fmt.potential(curve.equivalence_potential_ref_V)} V vs {ref}."
    else:
        parts[-1] += "."
    band = _band(indicator)
    if band is not None:
        lo, hi = band
        parts.append(
            f"Shaded band: transition range of {indicator.name},"
            f" {fmt.potential(lo)} to {fmt.potential(hi)} V vs {ref}."
        )
    if curve.note:
        parts.append(f"Part of the curve is undefined: {curve.note}")
    return " ".join(parts)


def _band(indicator: Any) -> tuple[float, float] | None:
    if indicator is not None and indicator.range_ref_V is not None:
        lo, hi = indicator.range_ref_V
        return float(lo), float(hi)
    return None


def curve_key(curve: Any, indicator: Any) -> list[dict[str, str]]:
    """The figure's key, in drawing order: one entry per series shown.

    Returns:
        ``{"label", "swatch", "colour"}`` dicts (a band also has
        ``hatch``); ``swatch`` is one of ``line``, ``dashed``, ``marker``,
        ``band`` (the template draws a small sample of each).
    """
    key = [{"label": "computed potential", "swatch": "line", "colour": PALETTE["curve"]}]
    key.append({
        "label": f"equivalence volume, {fmt.volume(curve.equivalence_volume_mL)} mL",
        "swatch": "dashed",
        "colour": PALETTE["equivalence"],
    })
    if curve.equivalence_potential_ref_V is not None:
        key.append({"label": "equivalence point", "swatch": "marker",
                    "colour": PALETTE["equivalence"]})
    if _band(indicator) is not None:
        key.append({"label": f"{indicator.name}: transition range", "swatch": "band",
                    "colour": PALETTE["band"], "hatch": PALETTE["band_hatch"]})
    return key


@dataclass
class _Canvas:
    """One figure and the artists a curve is drawn with."""

    fig: Any
    ax: Any
    fill: Any
    hatch: Any
    line: Any
    veq: Any
    point: Any


def _new_canvas() -> _Canvas:
    import matplotlib

    matplotlib.use("Agg", force=True)
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    with matplotlib.rc_context(_RC):
        # not pyplot: no figure manager, nothing global to close
        fig = Figure(figsize=_SIZE, dpi=72)
        FigureCanvasSVG(fig)
        ax = fig.add_subplot()
        fig.subplots_adjust(**_MARGINS)
        # a light fill plus a darker hatch on top: the band stays visible in
        # greyscale print, where a pale fill disappears
        fill = ax.axhspan(0.0, 1.0, facecolor=PALETTE["band"], alpha=0.3, linewidth=0.0)
        hatch = ax.axhspan(0.0, 1.0, facecolor="none", hatch="///",
                           hatchcolor=PALETTE["band_hatch"], edgecolor="none", linewidth=0.0)
        (line,) = ax.plot([0.0, 1.0], [0.0, 1.0], color=PALETTE["curve"], linewidth=2.0,
                          linestyle="-")
        veq = ax.axvline(0.5, color=PALETTE["equivalence"], linestyle="--", linewidth=1.2)
        (point,) = ax.plot([0.5], [0.5], marker="D", markersize=7,
                           color=PALETTE["equivalence"], linestyle="none")
        ax.grid(True, color="#BBBBBB", linewidth=0.5, linestyle=":")
        ax.set_xlabel("titrant added / mL")
    return _Canvas(fig, ax, fill, hatch, line, veq, point)


@cache
def _canvas() -> _Canvas:
    # one per process; curve_svg sets every property it draws
    return _new_canvas()


def _draw(c: _Canvas, curve: Any, indicator: Any) -> str:
    import matplotlib
    import numpy as np

    with matplotlib.rc_context(_RC):
        v = np.asarray(curve.volumes_mL, dtype=float)
        e = np.asarray(curve.E_vs_ref, dtype=float)
        band = _band(indicator)
        for patch in (c.fill, c.hatch):
            patch.set_visible(band is not None)
            if band is not None:
                patch.set_y(band[0])
                patch.set_height(band[1] - band[0])
        # NaN points stay NaN: matplotlib leaves a gap there, which is what
        # an undefined potential should look like.
        c.line.set_data(v, e)
        veq = float(curve.equivalence_volume_mL)
        c.veq.set_xdata([veq, veq])
        epot = curve.equivalence_potential_ref_V
        c.point.set_visible(epot is not None)
        c.point.set_data([veq], [float(epot) if epot is not None else 0.0])
        c.ax.set_ylabel(f"E / V vs {curve.reference}")
        # the y range from what is shown (the band included), as a fresh
        # axes autoscales it; x is the volume range of the curve
        c.ax.relim(visible_only=True)
        c.ax.set_autoscaley_on(True)
        c.ax.autoscale_view(scalex=False)
        c.ax.set_xlim(float(v[0]), float(v[-1]))
        buf = io.StringIO()
        c.fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "sitegen"})
    return buf.getvalue()


class DrawingStore(Protocol):
    """Where drawings are kept by :func:`drawing_key` (a dict will do)."""

    def get(self, key: str) -> str | None: ...

    def __setitem__(self, key: str, value: str) -> None: ...


def drawing_key(curve: Any, indicator: Any) -> str:
    """A digest of everything :func:`curve_svg` draws (the points, the
    equivalence point, the reference and the indicator band): two curves
    with the same key give the same drawing, whatever their titles."""
    import hashlib

    import numpy as np

    h = hashlib.sha256()
    for arr in (curve.volumes_mL, curve.E_vs_ref):
        h.update(np.ascontiguousarray(np.asarray(arr, dtype=float)).tobytes())
        h.update(b"|")
    epot = curve.equivalence_potential_ref_V
    h.update(repr((float(curve.equivalence_volume_mL),
                   float(epot) if epot is not None else None,
                   str(curve.reference), _band(indicator))).encode())
    return h.hexdigest()


def curve_svg(curve: Any, indicator: Any, title: str, prefix: str = "curve",
              drawings: DrawingStore | None = None) -> str:
    """The titration curve as an inline ``<svg>`` element.

    Args:
        curve: a :class:`sitegen.analyse.CurveInfo`.
        indicator: a :class:`sitegen.analyse.IndicatorInfo` or None; a
            redox indicator's transition range is shaded.
        title: the method title (used in the accessible title).
        prefix: prefix for every element id (unique per page).

    Returns:
        SVG markup without XML prolog or DOCTYPE, with ``role="img"`` and
        ``<title>``/``<desc>`` referenced by ``aria-labelledby``. The key
        to its lines is :func:`curve_key`.

    ``drawings``: matplotlib's output by :func:`drawing_key`, reused when
    present and filled when not (a build keeps it between runs, so that a
    record whose text changed but whose curve did not needs no plotting
    library at all).
    """
    if drawings is None:
        return _finish(_draw(_canvas(), curve, indicator), curve, indicator, title, prefix)
    key = drawing_key(curve, indicator)
    raw = drawings.get(key)
    if raw is None:
        raw = drawings[key] = _draw(_canvas(), curve, indicator)
    return _finish(raw, curve, indicator, title, prefix)


def _finish(svg: str, curve: Any, indicator: Any, title: str, prefix: str) -> str:
    svg = svg[svg.index("<svg") :]
    svg = re.sub(r"<metadata>.*?</metadata>\s*", "", svg, flags=re.S)
    svg = _prefix_ids(svg, prefix)
    # scale with the page: keep viewBox, drop the fixed point size
    head_end = svg.index(">")
    head = svg[:head_end]
    head = re.sub(r'\s(width|height)="[^"]*"', "", head)
    tid, did = f"{prefix}-title", f"{prefix}-desc"
    head += f' role="img" aria-labelledby="{tid} {did}" class="curve"'
    accessible = (
        f'<title id="{tid}">{html.escape("Titration curve: " + title)}</title>'
        f'<desc id="{did}">{html.escape(_describe(curve, indicator, title))}</desc>'
    )
    return head + ">" + accessible + svg[head_end + 1 :]
