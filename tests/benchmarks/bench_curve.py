"""Speed of the vectorised titration curve against a pointwise brentq solution.

Not collected by pytest (the file name does not start with ``test_``); the
benchmark runner calls :func:`compare_curve_speed`. Run it alone with
``python tests/benchmarks/bench_curve.py``.

Both solvers work on the same model (sitegen.chem.curve). Each timing is the
best of several runs after one warm-up call, so neither the lazy scipy import
nor first-call caches are counted; the ratio is what matters, not the
absolute times, which depend on the machine and its load. The two solvers'
runs are interleaved in rounds (one pointwise run, then a batch of
vectorised runs), so that both bests come from the same stretch of time
on a shared machine rather than from two different ones.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

try:
    import sitegen  # noqa: F401
except ImportError:  # run from a checkout without installing
    sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from sitegen.chem.curve import (
    Couple,
    Titration,
    curve_pointwise_brentq,
    equivalence_volume_mL,
    titration_curve,
)

__all__ = ["SETUPS", "compare_curve_speed"]

# Formal/standard potentials from Skoog, Fundamentals of Analytical Chemistry,
# appendix 5 (from memory); amounts as in a 50 mL aliquot of ~0.05 M iron(II).
SETUPS: dict[str, Titration] = {
    "Ce4+ / Fe2+ (symmetric)": Titration(
        Couple(0.68, 1, label="Fe3+/Fe2+"),
        Couple(1.44, 1, label="Ce4+/Ce3+"),
        "red",
        2.5,
        50.0,
        0.1,
    ),
    "MnO4- / Fe2+ (proton-dependent)": Titration(
        Couple(0.771, 1, label="Fe3+/Fe2+"),
        Couple(1.507, 5, m=8, label="MnO4-/Mn2+"),
        "red",
        2.5,
        50.0,
        0.02,
    ),
    "Cr2O7^2- / Fe2+ (asymmetric)": Titration(
        Couple(0.771, 1, label="Fe3+/Fe2+"),
        Couple(1.33, 6, a=1, b=2, m=14, label="Cr2O7^2-/Cr3+"),
        "red",
        2.5,
        50.0,
        0.1 / 6,
    ),
}


def _seconds(fn: Callable[[], object]) -> float:
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


def _best_interleaved(
    slow: Callable[[], object], fast: Callable[[], object], rounds: int, fast_per_round: int
) -> tuple[float, float]:
    """Best times of ``slow`` and ``fast``, run alternately: each round runs
    ``slow`` once and ``fast`` ``fast_per_round`` times."""
    slow(), fast()  # warm-up: lazy imports, allocator
    best_slow = best_fast = float("inf")
    for _ in range(rounds):
        best_slow = min(best_slow, _seconds(slow))
        for _ in range(fast_per_round):
            best_fast = min(best_fast, _seconds(fast))
    return best_slow, best_fast


def compare_curve_speed(
    n_points: int = 1000, repeats: int = 150, pointwise_repeats: int = 5
) -> dict[str, object]:
    """Time the vectorised curve against the pointwise brentq reference.

    Args:
        n_points: volumes per curve, evenly spaced from 0 to 300 % of Veq.
        repeats: runs of the vectorised solver per setup (best is kept),
            spread evenly over the pointwise runs.
        pointwise_repeats: runs of the pointwise solver per setup (best is kept).

    Returns:
        A dict with ``n_points``; ``vectorised_s`` and ``pointwise_s``, the sums of
        the per-setup best times, s; ``speedup`` (their ratio); ``min_speedup`` over
        the setups; ``max_abs_diff_V`` over all setups and points; and
        ``per_setup``, a list of dicts with ``setup``, ``vectorised_s``,
        ``pointwise_s``, ``speedup`` and ``max_abs_diff_V``.
    """
    rows = []
    for name, t in SETUPS.items():
        V = np.linspace(0.0, 3.0 * equivalence_volume_mL(t), n_points)
        fast = titration_curve(t, V).E_V
        ref = curve_pointwise_brentq(t, V)
        tp, tv = _best_interleaved(
            lambda t=t, V=V: curve_pointwise_brentq(t, V),
            lambda t=t, V=V: titration_curve(t, V),
            rounds=pointwise_repeats,
            fast_per_round=max(1, repeats // pointwise_repeats),
        )
        rows.append(
            {
                "setup": name,
                "vectorised_s": tv,
                "pointwise_s": tp,
                "speedup": tp / tv,
                "max_abs_diff_V": float(np.nanmax(np.abs(fast - ref))),
            }
        )
    tv_sum = sum(r["vectorised_s"] for r in rows)
    tp_sum = sum(r["pointwise_s"] for r in rows)
    return {
        "n_points": n_points,
        "vectorised_s": tv_sum,
        "pointwise_s": tp_sum,
        "speedup": tp_sum / tv_sum,
        "min_speedup": min(r["speedup"] for r in rows),
        "max_abs_diff_V": max(r["max_abs_diff_V"] for r in rows),
        "per_setup": rows,
    }


if __name__ == "__main__":
    res = compare_curve_speed()
    for r in res["per_setup"]:  # type: ignore[union-attr]
        sys.stdout.write(
            f"{r['setup']:34s} vectorised {r['vectorised_s'] * 1e3:7.3f} ms  "
            f"pointwise {r['pointwise_s'] * 1e3:8.1f} ms  x{r['speedup']:6.0f}  "
            f"max |dE| {r['max_abs_diff_V']:.1e} V\n"
        )
    sys.stdout.write(
        f"{'all':34s} vectorised {res['vectorised_s'] * 1e3:7.3f} ms  "
        f"pointwise {res['pointwise_s'] * 1e3:8.1f} ms  x{res['speedup']:6.0f}\n"
    )
