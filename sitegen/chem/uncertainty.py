"""Measurement uncertainty by the GUM law of propagation (uncorrelated inputs).

For y = f(x_1, ..., x_N) with uncorrelated inputs the combined standard
uncertainty is u_c(y)^2 = sum_i (c_i u(x_i))^2 with sensitivity coefficients
c_i = df/dx_i (JCGM 100:2008, *Evaluation of measurement data - Guide to the
expression of uncertainty in measurement*, eq. (10)). Here c_i comes from a
central finite difference with a step that is a small fraction of u(x_i), so
it is the local slope over the range the input actually varies.
U = k u_c is the expanded uncertainty (k = 2 for about 95 % coverage,
JCGM 100:2008 section 6.3; EURACHEM/CITAC Guide CG4, 3rd ed. (2012), ch. 9).

Distribution conversions follow EURACHEM/CITAC Guide CG4, 3rd ed. (2012),
section 8.1 and appendix E.1 (section numbers from memory): a
rectangular distribution of half-width a has
u = a/sqrt(3), a triangular one u = a/sqrt(6).
"""

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

__all__ = [
    "Budget",
    "Contribution",
    "Quantity",
    "propagate",
    "relative_budget",
    "root_sum_square",
    "u_from_expanded",
    "u_rectangular",
    "u_triangular",
]


@dataclass(frozen=True)
class Quantity:
    """An input quantity with its standard uncertainty.

    Attributes:
        name: identifier, unique within a budget (the key passed to ``f``).
        value: best estimate, in ``unit``.
        u: standard uncertainty, in ``unit`` (>= 0).
        unit: unit text, e.g. ``"mL"``.
        source: where the value and its uncertainty come from.
    """

    name: str
    value: float
    u: float
    unit: str = ""
    source: str = ""

    def __post_init__(self) -> None:
        if not (math.isfinite(self.value) and math.isfinite(self.u)):
            raise ValueError(f"{self.name}: value and u must be finite")
        if self.u < 0:
            raise ValueError(f"{self.name}: standard uncertainty must be >= 0, got {self.u!r}")


@dataclass(frozen=True)
class Contribution:
    """One line of an uncertainty budget.

    Attributes:
        name, value, u, unit: copied from the input quantity.
        sensitivity: c_i = df/dx_i, result unit per input unit.
        contribution: |c_i| u(x_i), in result units.
        share: (c_i u(x_i))^2 / u_c^2, fraction of the combined variance.
    """

    name: str
    value: float
    u: float
    unit: str
    sensitivity: float
    contribution: float
    share: float


@dataclass(frozen=True)
class Budget:
    """A result with its combined and expanded uncertainty.

    Attributes:
        value: y = f(x), in ``unit``.
        u_c: combined standard uncertainty, in ``unit``.
        k: coverage factor.
        U: expanded uncertainty k u_c, in ``unit``.
        unit: unit of the result.
        contributions: one line per input, in input order.
    """

    value: float
    u_c: float
    k: float
    U: float
    unit: str
    contributions: tuple[Contribution, ...]

    @property
    def u_rel(self) -> float:
        """u_c / |value| (dimensionless); inf if the value is 0."""
        return self.u_c / abs(self.value) if self.value != 0 else math.inf


def u_rectangular(half_width: float) -> float:
    """Standard uncertainty of a rectangular distribution +-a: a/sqrt(3).

    EURACHEM/CITAC CG4, section 8.1 and appendix E.1.
    """
    if half_width < 0:
        raise ValueError(f"half-width must be >= 0, got {half_width!r}")
    return half_width / math.sqrt(3.0)


def u_triangular(half_width: float) -> float:
    """Standard uncertainty of a triangular distribution +-a: a/sqrt(6).

    EURACHEM/CITAC CG4, section 8.1 and appendix E.1.
    """
    if half_width < 0:
        raise ValueError(f"half-width must be >= 0, got {half_width!r}")
    return half_width / math.sqrt(6.0)


def u_from_expanded(U: float, k: float = 2.0) -> float:
    """Standard uncertainty from a certificate's expanded uncertainty U at coverage k."""
    if U < 0 or k <= 0:
        raise ValueError(f"need U >= 0 and k > 0, got U={U!r}, k={k!r}")
    return U / k


def root_sum_square(*u: float) -> float:
    """sqrt(sum u_i^2): combine independent standard uncertainties of one quantity."""
    return math.sqrt(math.fsum(x * x for x in u))


def _check_names(inputs: Sequence[Quantity]) -> None:
    names = [q.name for q in inputs]
    dup = sorted({n for n in names if names.count(n) > 1})
    if dup:
        raise ValueError(f"duplicate input names: {', '.join(dup)}")


def _budget(value: float, lines: list[tuple[Quantity, float]], k: float, unit: str) -> Budget:
    var = [(c * q.u) ** 2 for q, c in lines]
    total = math.fsum(var)
    u_c = math.sqrt(total)
    contributions = tuple(
        Contribution(
            name=q.name,
            value=q.value,
            u=q.u,
            unit=q.unit,
            sensitivity=c,
            contribution=abs(c) * q.u,
            share=(v / total) if total > 0 else 0.0,
        )
        for (q, c), v in zip(lines, var, strict=True)
    )
    return Budget(value=value, u_c=u_c, k=k, U=k * u_c, unit=unit, contributions=contributions)


def propagate(
    f: Callable[[Mapping[str, float]], float],
    inputs: Sequence[Quantity],
    k: float = 2.0,
    unit: str = "",
    step: float = 1e-2,
) -> Budget:
    """Propagate uncorrelated standard uncertainties through ``f`` (GUM eq. 10).

    Args:
        f: the measurement model, called with ``{name: value}``.
        inputs: the input quantities (names unique).
        k: coverage factor for U.
        unit: unit of the result.
        step: finite-difference step as a fraction of each u(x_i); inputs with
            u = 0 get a step of 1e-8 |x| (their contribution is 0 anyway).

    Returns:
        The budget, contributions in input order.

    Raises:
        ValueError: for duplicate names, k <= 0 or a non-finite model value.
    """
    if k <= 0:
        raise ValueError(f"coverage factor must be positive, got {k!r}")
    _check_names(inputs)
    x = {q.name: q.value for q in inputs}
    y = float(f(x))
    if not math.isfinite(y):
        raise ValueError(f"model value is not finite at the input estimates: {y!r}")
    lines = []
    for q in inputs:
        h = step * q.u if q.u > 0 else 1e-8 * max(abs(q.value), 1.0)
        up, down = dict(x), dict(x)
        up[q.name] = q.value + h
        down[q.name] = q.value - h
        c = (float(f(up)) - float(f(down))) / (2.0 * h)
        lines.append((q, c))
    return _budget(y, lines, k, unit)


def relative_budget(
    inputs: Sequence[Quantity],
    exponents: Sequence[float],
    factor: float = 1.0,
    k: float = 2.0,
    unit: str = "",
) -> Budget:
    """Budget of a pure product y = factor * prod x_i^p_i, using relative uncertainties.

    (u_c/y)^2 = sum (p_i u_i/x_i)^2 (EURACHEM/CITAC CG4, 3rd ed., section 8.2.6,
    rule 2; from memory); the sensitivity of each input is p_i y / x_i.

    Raises:
        ValueError: for mismatched lengths, duplicate names or a zero input.
    """
    if len(inputs) != len(exponents):
        raise ValueError(f"{len(inputs)} inputs but {len(exponents)} exponents")
    _check_names(inputs)
    if any(q.value == 0 for q in inputs):
        raise ValueError("relative uncertainties need non-zero inputs")
    y = factor * math.prod(q.value**p for q, p in zip(inputs, exponents, strict=True))
    lines = [(q, p * y / q.value) for q, p in zip(inputs, exponents, strict=True)]
    return _budget(y, lines, k, unit)
