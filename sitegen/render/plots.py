"""Titration curves as inline SVG; the only module that imports matplotlib.

matplotlib is imported inside :func:`curve_svg`, so a build that renders
no curve (everything cached) never pays for the import. The SVG is
byte-reproducible: fixed figure size, fixed ``svg.hashsalt``, no date or
creator metadata, text kept as text.
"""

from __future__ import annotations

__all__ = ["PALETTE", "curve_svg"]

import html
import re
from typing import Any

from . import fmt

#: Okabe & Ito (2008) colour-blind-safe palette; each series also differs
#: by line style or marker so the plot reads in greyscale print.
PALETTE = {
    "curve": "#0072B2",  # blue, solid
    "equivalence": "#D55E00",  # vermillion, dashed + marker
    "band": "#E69F00",  # orange, hatched band
    "band_hatch": "#8C6400",  # darker orange for the hatch lines
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
    if indicator is not None and indicator.range_ref_V is not None:
        lo, hi = indicator.range_ref_V
        parts.append(
            f"Shaded band: transition range of {indicator.name},"
            f" {fmt.potential(lo)} to {fmt.potential(hi)} V vs {ref}."
        )
    if curve.note:
        parts.append(f"Part of the curve is undefined: {curve.note}")
    return " ".join(parts)


def curve_svg(curve: Any, indicator: Any, title: str, prefix: str = "curve") -> str:
    """The titration curve as an inline ``<svg>`` element.

    Args:
        curve: a :class:`sitegen.analyse.CurveInfo`.
        indicator: a :class:`sitegen.analyse.IndicatorInfo` or None; a
            redox indicator's transition range is shaded.
        title: the method title (used in the accessible title).
        prefix: prefix for every element id (unique per page).

    Returns:
        SVG markup without XML prolog or DOCTYPE, with ``role="img"`` and
        ``<title>``/``<desc>`` referenced by ``aria-labelledby``.
    """
    import io

    import matplotlib

    matplotlib.use("Agg", force=True)
    import numpy as np
    from matplotlib import pyplot as plt

    ref = curve.reference
    with plt.rc_context(
        {
            "svg.hashsalt": "sitegen",
            "svg.fonttype": "none",
            "font.family": "sans-serif",
            "font.size": 10,
            "axes.spines.top": False,
            "axes.spines.right": False,
            "path.simplify": False,
        }
    ):
        fig, ax = plt.subplots(figsize=(6.4, 4.0), dpi=72)
        try:
            v = np.asarray(curve.volumes_mL, dtype=float)
            e = np.asarray(curve.E_vs_ref, dtype=float)
            if indicator is not None and indicator.range_ref_V is not None:
                lo, hi = indicator.range_ref_V
                # a light fill plus a darker hatch on top: the band stays
                # visible in greyscale print, where a pale fill disappears
                ax.axhspan(lo, hi, facecolor=PALETTE["band"], alpha=0.3, linewidth=0.0)
                ax.axhspan(
                    lo,
                    hi,
                    facecolor="none",
                    hatch="///",
                    hatchcolor=PALETTE["band_hatch"],
                    edgecolor="none",
                    linewidth=0.0,
                    label=f"{indicator.name}: transition range",
                )
            # NaN points stay NaN: matplotlib leaves a gap there, which is
            # what an undefined potential should look like.
            ax.plot(v, e, color=PALETTE["curve"], linewidth=2.0, linestyle="-", label="computed potential")
            veq = curve.equivalence_volume_mL
            ax.axvline(
                veq,
                color=PALETTE["equivalence"],
                linestyle="--",
                linewidth=1.2,
                label=f"equivalence volume, {fmt.volume(veq)} mL",
            )
            if curve.equivalence_potential_ref_V is not None:
                ax.plot(
                    [veq],
                    [curve.equivalence_potential_ref_V],
                    marker="D",
                    markersize=7,
                    color=PALETTE["equivalence"],
                    linestyle="none",
                    label="equivalence point",
                )
            ax.set_xlabel("titrant added / mL")
            ax.set_ylabel(f"E / V vs {ref}")
            ax.set_xlim(float(v[0]), float(v[-1]))
            ax.grid(True, color="#BBBBBB", linewidth=0.5, linestyle=":")
            ax.legend(loc="best", frameon=False, fontsize=9)
            fig.tight_layout()
            buf = io.StringIO()
            fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "sitegen"})
        finally:
            plt.close(fig)
    svg = buf.getvalue()
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
