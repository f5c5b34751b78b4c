"""Exact equilibrium curve E(V) of a redox titration.

Model
-----
Each couple is written as a reduction ``a Ox + m H+ + n e- = b Red (+ water)``
with a formal potential ``E0`` (V vs SHE, in the stated medium) and obeys

    E = E0 + (RT/nF) ln([Ox]^a [H+]^m / [Red]^b).

Concentrations are in mol/L; volumes in mL, so mmol/mL = mol/L.

For each titrant volume V the flask volume is V0 + V (additive volumes) and
three sets of equations hold at once:

* Nernst for both couples at the single solution potential E;
* mass balance per couple in Red-equivalents, ``T = (b/a)[Ox] + [Red]``
  (total Cr for Cr2O7^2-/2Cr^3+, total I for I3-/3I-), each diluted by V0 + V;
* electron balance: electrons lost by the reductant = electrons gained by the
  oxidant.

[H+] is held constant: the acid medium is taken to be in large excess over the
protons the reaction consumes or releases (activity coefficients are folded
into the formal potentials).

For an asymmetric couple (a != b) dilution alone moves E, since
[Ox]^a/[Red]^b scales as (V0 + V)^(b - a); with much of the other form present
(``analyte_partner_mol_per_L``) the first drops can shift E against the
direction of the titration. That is the model's chemistry, not noise.

How it is solved
----------------
Let y be the fraction of a couple's Red-equivalents present as Red. At a given
E, with r = b/a and c = r K T^(r-1), K = ([Ox]^a/[Red]^b)^(1/a) from Nernst,
the mass balance reads ``c y^r + y = 1``: closed form for r = 1 and r = 2,
a monotone Newton iteration in ln y otherwise (convex in ln y, so Newton from
the right never overshoots).

The electron balance is rewritten so that only the *remaining unreacted*
amounts appear: P(E) = electron capacity of the oxidant still present as Ox,
N(E) = that of the reductant still present as Red, and a constant
C = +-((1 - f) Ne_analyte - Ne_titrant)/(V0 + V) computed from the inputs.
Then ``P - N + C = 0`` and we solve

    phi(E) = ln(P + max(C, 0)) - ln(N + max(-C, 0)) = 0,

which is monotone increasing in E and free of the catastrophic cancellation
that the plain balance suffers once one form is 10^-40 of the other. Where
the limiting couple is still more than half unconverted (the start of the
curve) the balance is written with *its* minority form instead, against
D = w T -+ C formed from positive terms, so E(0) stays exact even for
initial_fraction = 1e-9.

All points are solved at once by a bracketed, safeguarded Newton iteration
in E (no Python loop over points). The start is the one-couple solution on
the side where phi >= 0 (before equivalence) or phi <= 0 (after), where phi
is convex or concave respectively, so Newton converges monotonically; within
0.1 % of equivalence the start is polished on the two-minority model. A
Newton step below 1e-7 V ends a point (quadratic convergence leaves ~1e-12
V), so a typical 1000-point curve needs a single pass; when every point's
first step is that small, the bracket bookkeeping of the safeguarded
passes is skipped altogether. At a thousand points each numpy call costs
about as much as its arithmetic, so the solver is written to make few.

Initial state
-------------
At V = 0 a fraction ``initial_fraction`` (default 1e-6) of the analyte is
taken to be present in its other form (e.g. a trace of Fe3+ from air
oxidation). This makes E(0) finite and well defined; it also means that the
stoichiometric point, where the titrant's electrons equal the electrons the
flask can still exchange, lies at (1 - f) Veq. ``equivalence_volume_mL``
stays the nominal Veq from the analyte amount.

Irreversible couples
--------------------
A couple flagged ``reversible=False`` (e.g. S4O6^2-/S2O3^2-) still takes part
in the equilibrium, but a Pt electrode does not respond to it. Where only that
couple could set E (past the stoichiometric point for a titrant, up to and
including it for an analyte) the curve is NaN and ``Curve.note`` says why.
"""

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from sitegen.chem.constants import T_STANDARD, F, R
from sitegen.chem.numerics_errors import CurveUndefined, NoRoot

__all__ = [
    "Couple",
    "Curve",
    "Speciation",
    "Titration",
    "curve_pointwise_brentq",
    "equivalence_volume_mL",
    "potential_at",
    "potential_break_V",
    "speciation",
    "stoichiometric_volume_mL",
    "titration_curve",
    "volume_at_potential",
]

_Arr = NDArray[np.float64]
_Pair = tuple[_Arr, _Arr]
_Quad = tuple[_Arr, _Arr, _Arr, _Arr]

_LN2 = math.log(2.0)
_LN4 = math.log(4.0)
# Largest/smallest natural logs we let a fraction take: exp(-745) underflows.
_LN_FLOOR = -740.0
_EPS = float(np.finfo(float).eps)
_MAX_ITER = 200
_E_TOL = 1e-13  # V; far below any measurable potential difference
# A Newton step this small leaves an error of about (phi''/2phi') step^2
# <= (6 F/RT / 2) (1e-7 V)^2 ~ 1e-12 V, so the point needs no further pass.
_NEWTON_DONE = 1e-7


@dataclass(frozen=True)
class Couple:
    """A redox couple written as ``a Ox + m H+ + n e- = b Red (+ water)``.

    Attributes:
        E0: formal reduction potential, V vs SHE, in the stated medium.
        n: electrons in the half-reaction as written.
        a: stoichiometric coefficient of Ox.
        b: stoichiometric coefficient of Red.
        m: H+ on the Ox side (negative if H+ appears on the Red side).
        reversible: False if the couple gives no Nernstian response at a Pt
            electrode (e.g. S4O6^2-/S2O3^2-).
        label: free text for messages, e.g. ``"Fe3+/Fe2+"``.
    """

    E0: float
    n: int
    a: float = 1.0
    b: float = 1.0
    m: float = 0.0
    reversible: bool = True
    label: str = ""

    def __post_init__(self) -> None:
        if not (self.n > 0 and self.a > 0 and self.b > 0):
            raise ValueError(
                f"couple {self.label or self.E0!r}: n, a, b must be positive, "
                f"got n={self.n!r}, a={self.a!r}, b={self.b!r}"
            )
        if not all(math.isfinite(x) for x in (self.E0, self.m)):
            raise ValueError(f"couple {self.label!r}: E0 and m must be finite")

    @property
    def ratio(self) -> float:
        """b/a: Red-equivalents per Ox."""
        return self.b / self.a


@dataclass(frozen=True)
class Titration:
    """A direct redox titration.

    Attributes:
        analyte: the couple of the species in the flask.
        titrant: the couple of the species in the burette.
        analyte_form: ``'red'``: a reductant (the analyte couple's Red) is
            titrated with the titrant's Ox; ``'ox'``: an oxidant (the analyte
            couple's Ox) is titrated with the titrant's Red.
        analyte_mmol: amount of the analyte species as written in its couple
            (of Red for ``'red'``, of Ox for ``'ox'``), mmol.
        V0_mL: initial volume in the flask, mL.
        titrant_mol_per_L: concentration of the titrant species as written in
            its couple (Ox for ``'red'``, Red for ``'ox'``), mol/L.
        H_mol_per_L: [H+], mol/L, assumed constant (medium in large excess).
        T_K: temperature, K.
        initial_fraction: fraction of the analyte present in its other form at
            V = 0 (e.g. from air oxidation), 0 < f < 1; keeps E(0) finite.
        analyte_partner_mol_per_L: concentration in the initial volume V0 of
            the *other* form of the analyte couple, present from the start and
            not titrated (e.g. the excess I- in an iodometric flask where
            liberated I3- is titrated with thiosulfate), mol/L. It does not
            change Veq, but it sets the potential of asymmetric couples.
    """

    analyte: Couple
    titrant: Couple
    analyte_form: Literal["red", "ox"]
    analyte_mmol: float
    V0_mL: float
    titrant_mol_per_L: float
    H_mol_per_L: float = 1.0
    T_K: float = T_STANDARD
    initial_fraction: float = 1e-6
    analyte_partner_mol_per_L: float = 0.0

    def __post_init__(self) -> None:
        if self.analyte_form not in ("red", "ox"):
            raise ValueError(f"analyte_form must be 'red' or 'ox', got {self.analyte_form!r}")
        positive = {
            "analyte_mmol": self.analyte_mmol,
            "V0_mL": self.V0_mL,
            "titrant_mol_per_L": self.titrant_mol_per_L,
            "H_mol_per_L": self.H_mol_per_L,
            "T_K": self.T_K,
        }
        for name, value in positive.items():
            if not (math.isfinite(value) and value > 0):
                raise ValueError(f"{name} must be positive and finite, got {value!r}")
        if not 0.0 < self.initial_fraction < 1.0:
            raise ValueError(f"initial_fraction must lie in (0, 1), got {self.initial_fraction!r}")
        if not (
            math.isfinite(self.analyte_partner_mol_per_L) and self.analyte_partner_mol_per_L >= 0
        ):
            raise ValueError(
                f"analyte_partner_mol_per_L must be >= 0, got {self.analyte_partner_mol_per_L!r}"
            )


@dataclass(frozen=True, eq=False)
class Curve:
    """A computed titration curve (arrays are read-only).

    Attributes:
        volumes_mL: titrant volumes, mL.
        E_V: potential vs SHE, V; NaN where the model cannot define it.
        fraction: titrated fraction V/Veq.
        equivalence_volume_mL: nominal Veq, mL.
        equivalence_potential_V: E at the stoichiometric point (1 - f) Veq, V,
            or None if either couple is irreversible.
        note: why part of the curve is not shown, or None.
    """

    volumes_mL: NDArray[np.float64]
    E_V: NDArray[np.float64]
    fraction: NDArray[np.float64]
    equivalence_volume_mL: float
    equivalence_potential_V: float | None
    note: str | None


@dataclass(frozen=True, eq=False)
class Speciation:
    """Equilibrium concentrations at each volume (no reversibility masking).

    Attributes:
        volumes_mL: titrant volumes, mL.
        E_V: equilibrium potential vs SHE, V.
        analyte_ox, analyte_red, titrant_ox, titrant_red: concentrations of the
            species as written in the couples, mol/L.
        ln_analyte_ox, ln_analyte_red, ln_titrant_ox, ln_titrant_red: their
            natural logs (accurate even where the value underflows); -inf for
            a couple with no material yet (the titrant at V = 0).
    """

    volumes_mL: NDArray[np.float64]
    E_V: NDArray[np.float64]
    analyte_ox: NDArray[np.float64]
    analyte_red: NDArray[np.float64]
    titrant_ox: NDArray[np.float64]
    titrant_red: NDArray[np.float64]
    ln_analyte_ox: NDArray[np.float64]
    ln_analyte_red: NDArray[np.float64]
    ln_titrant_ox: NDArray[np.float64]
    ln_titrant_red: NDArray[np.float64]


# ---------------------------------------------------------------- stoichiometry


def _analyte_electrons_mmol(t: Titration) -> float:
    """Electrons the analyte can exchange when fully converted, mmol."""
    per = t.analyte.b if t.analyte_form == "red" else t.analyte.a
    return t.analyte_mmol * t.analyte.n / per


def _titrant_electrons_per_mmol(t: Titration) -> float:
    """Electrons exchanged per mmol of titrant species, mmol/mmol."""
    per = t.titrant.a if t.analyte_form == "red" else t.titrant.b
    return t.titrant.n / per


def equivalence_volume_mL(t: Titration) -> float:
    """Return the nominal equivalence volume from the electron count, mL.

    Veq = analyte electrons / (titrant electrons per mmol x titrant mol/L).
    """
    return _analyte_electrons_mmol(t) / (_titrant_electrons_per_mmol(t) * t.titrant_mol_per_L)


def stoichiometric_volume_mL(t: Titration) -> float:
    """Return (1 - initial_fraction) Veq, where titrant electrons match the flask's, mL."""
    return (1.0 - t.initial_fraction) * equivalence_volume_mL(t)


# ---------------------------------------------------------------- the system


@dataclass(frozen=True, eq=False)
class _System:
    """The electron balance ``phi(E) = 0`` at each volume, in log form.

    ``p`` is the couple whose remaining Ox is counted (titrant for 'red',
    analyte for 'ox'); ``q`` the couple whose remaining Red is counted. For
    each, ``ln c = alpha * E + beta`` (beta per volume, through the dilution
    of asymmetric couples) and ``base = ln(n/b) + ln T`` (-inf where absent).
    """

    p: Couple
    q: Couple
    lnT_p: NDArray[np.float64]  # ln total Red-equivalents, mol/L (0 where absent)
    lnT_q: NDArray[np.float64]
    beta_p: NDArray[np.float64]
    beta_q: NDArray[np.float64]
    base_p: NDArray[np.float64]
    base_q: NDArray[np.float64]
    C: NDArray[np.float64]  # mol/L of electrons
    lnC_pos: NDArray[np.float64]
    lnC_neg: NDArray[np.float64]
    lnD_q: NDArray[np.float64]  # ln(w_q T_q - C), formed from positive terms only
    lnD_p: NDArray[np.float64]  # ln(w_p T_p + C)
    gap_q: NDArray[np.float64]  # ln(C+ / (w_q T_q)): the share of q still unreacted
    gap_p: NDArray[np.float64]  # ln(C- / (w_p T_p)): the share of p in excess
    # mode 0 (neither): the balance in the minority forms; mode 1 or 2: in the
    # near-complete form of the limiting couple (see _phi)
    mode1: NDArray[np.bool_]
    mode2: NDArray[np.bool_]
    any_mode: bool  # False lets _phi take the shorter mode-0 path
    lnH: float
    f_RT: float  # F/(R T), 1/V

    def subset(self, idx: NDArray[np.intp]) -> "_System":
        return _System(
            p=self.p,
            q=self.q,
            lnT_p=self.lnT_p[idx],
            lnT_q=self.lnT_q[idx],
            beta_p=self.beta_p[idx],
            beta_q=self.beta_q[idx],
            base_p=self.base_p[idx],
            base_q=self.base_q[idx],
            C=self.C[idx],
            lnC_pos=self.lnC_pos[idx],
            lnC_neg=self.lnC_neg[idx],
            lnD_q=self.lnD_q[idx],
            lnD_p=self.lnD_p[idx],
            gap_q=self.gap_q[idx],
            gap_p=self.gap_p[idx],
            mode1=self.mode1[idx],
            mode2=self.mode2[idx],
            any_mode=bool(self.mode1[idx].any() or self.mode2[idx].any()),
            lnH=self.lnH,
            f_RT=self.f_RT,
        )


def _lae(x: NDArray[np.float64], y: NDArray[np.float64]) -> NDArray[np.float64]:
    """ln(e^x + e^y); np.logaddexp is ~8x slower than these SIMD ufuncs.

    Either argument may be -inf (not both).
    """
    out: _Arr = np.maximum(x, y) + np.log1p(np.exp(-np.abs(x - y)))
    return out


def _softplus(x: NDArray[np.float64]) -> NDArray[np.float64]:
    """ln(1 + e^x), overflow-free."""
    out: _Arr = np.maximum(x, 0.0) + np.log1p(np.exp(-np.abs(x)))
    return out


def _alpha(cp: Couple, f_RT: float) -> float:
    """d ln c / dE for a couple, 1/V."""
    return cp.n * f_RT / cp.a


def _beta(cp: Couple, lnT: NDArray[np.float64], lnH: float, f_RT: float) -> NDArray[np.float64]:
    """ln c - alpha E: the potential-independent part of ln c."""
    r = cp.ratio
    const = math.log(r) - _alpha(cp, f_RT) * cp.E0 - cp.m * lnH / cp.a
    return const + (r - 1.0) * lnT if r != 1.0 else np.full(lnT.shape, const)


def _build(t: Titration, V: NDArray[np.float64]) -> _System:
    # Everything is formed in logs of positive sums: amounts (mmol) over the
    # total volume, so dilution is one subtraction of ln(V0 + V).
    an, ti = t.analyte, t.titrant
    A = t.analyte_mmol
    partner = t.analyte_partner_mol_per_L * t.V0_mL  # mmol, diluted like the rest
    f = t.initial_fraction
    Vtot = t.V0_mL + V
    e_per_mL = _titrant_electrons_per_mmol(t) * t.titrant_mol_per_L  # mmol e- per mL
    Ne_A = _analyte_electrons_mmol(t)
    e_V = e_per_mL * V  # mmol e- added
    with np.errstate(divide="ignore", invalid="ignore"):
        ln_Vtot = np.log(Vtot)
        ln_V = np.log(V)  # -inf at V = 0: no titrant yet
        if t.analyte_form == "red":
            p, q, sign = ti, an, 1.0
            lnT_q = math.log(A + an.ratio * partner) - ln_Vtot
            lnT_p = math.log(ti.ratio * t.titrant_mol_per_L) + ln_V - ln_Vtot
            # w T - C and w T + C written as sums of positive terms, exact
            # even when C ~ w T (the start of the curve)
            lnD_q = np.log(an.n / an.b * (f * A + an.ratio * partner) + e_V) - ln_Vtot
            lnD_p = math.log((1.0 - f) * Ne_A) - ln_Vtot
        else:
            p, q, sign = an, ti, -1.0
            lnT_p = math.log(an.ratio * A + partner) - ln_Vtot
            lnT_q = math.log(t.titrant_mol_per_L) + ln_V - ln_Vtot
            lnD_p = np.log(f * Ne_A + an.n / an.b * partner + e_V) - ln_Vtot
            lnD_q = math.log((1.0 - f) * Ne_A) - ln_Vtot
        C = (sign * (1.0 - f) * Ne_A - sign * e_V) / Vtot
        ln_absC = np.log(np.abs(C))
        lnC_pos = np.where(C > 0, ln_absC, -np.inf)
        lnC_neg = np.where(C < 0, ln_absC, -np.inf)
        base_p = math.log(p.n / p.b) + lnT_p  # -inf where the couple is absent
        base_q = math.log(q.n / q.b) + lnT_q
        # Where the limiting couple is more than half converted (the start of
        # the curve), write the balance with its *minority* form instead:
        # N = C + P becomes w_q T_q (1 - y_q) + P = D_q, and P = -C + N becomes
        # w_p T_p y_p + N = D_p. Otherwise ln y ~ -1e-9 drowns in ln T.
        gap_q = lnC_pos - base_q
        gap_p = lnC_neg - base_p
        mode1 = gap_q > -_LN2
        mode2 = gap_p > -_LN2
    # The titrant's couple is absent at V = 0 (ln T = -inf); there ln T
    # only feeds beta, so 0 will do. The analyte's is present throughout.
    if t.analyte_form == "red":
        lnT_p = np.where(np.isfinite(lnT_p), lnT_p, 0.0)
    else:
        lnT_q = np.where(np.isfinite(lnT_q), lnT_q, 0.0)
    lnH = math.log(t.H_mol_per_L)
    f_RT = F / (R * t.T_K)
    return _System(
        p=p,
        q=q,
        lnT_p=lnT_p,
        lnT_q=lnT_q,
        beta_p=_beta(p, lnT_p, lnH, f_RT),
        beta_q=_beta(q, lnT_q, lnH, f_RT),
        base_p=base_p,
        base_q=base_q,
        C=C,
        lnC_pos=lnC_pos,
        lnC_neg=lnC_neg,
        lnD_q=lnD_q,
        lnD_p=lnD_p,
        gap_q=gap_q,
        gap_p=gap_p,
        mode1=mode1,
        mode2=mode2,
        any_mode=bool(mode1.any() or mode2.any()),
        lnH=lnH,
        f_RT=f_RT,
    )


def _ln_c(cp: Couple, E: _Arr, lnT: _Arr, lnH: float, f_RT: float) -> _Arr:
    """ln c of the per-couple mass balance ``c y^r + y = 1`` at potential E."""
    r = cp.ratio
    lnK = (cp.n * f_RT * (E - cp.E0) - cp.m * lnH) / cp.a
    return math.log(r) + lnK + (r - 1.0) * lnT


def _fractions(lnc: _Arr, r: float) -> _Pair:
    """Solve ``c y^r + y = 1`` for (ln y, ln(1 - y)), vectorised, in log space."""
    if r == 1.0:
        # ln y = -softplus(ln c) = min(-ln c, 0) - ln(1 + e^-|ln c|), one
        # negation shared by both terms
        neg = -lnc
        lny = np.minimum(neg, 0.0) - np.log1p(np.exp(np.minimum(lnc, neg)))
        return lny, lnc + lny
    if r == 2.0:
        # y = 2 / (1 + sqrt(1 + 4c)), every step as a log-sum so nothing overflows.
        lny = _LN2 - _softplus(0.5 * _softplus(_LN4 + lnc))
        return lny, lnc + 2.0 * lny
    # h(z) = ln(e^z + c e^{rz}) is convex and increasing in z = ln y, and
    # h(z0) >= 0 at z0 = min(0, -ln c / r), so Newton from z0 decreases
    # monotonically onto the root without overshooting.
    z = np.minimum(0.0, -lnc / r)
    for _ in range(_MAX_ITER):
        h = _lae(z, lnc + r * z)
        sigma = np.exp(z - h)
        step = h / (sigma + r * (1.0 - sigma))
        z = z - step
        if not np.any(np.abs(step) > 1e-15 * (1.0 + np.abs(z))):
            break
    return z, lnc + r * z


def _state(cp: Couple, lnc: _Arr, alpha: float) -> _Quad:
    """ln y, ln(1 - y) and their E-derivatives (1/V) for one couple."""
    r = cp.ratio
    lny, ln1my = _fractions(lnc, r)
    y, omy = np.exp(lny), np.exp(ln1my)
    if r == 1.0:
        return lny, ln1my, -alpha * omy, alpha * y
    denom = y + r * omy
    return lny, ln1my, -alpha * omy / denom, alpha * y / denom


def _phi(s: _System, E: _Arr) -> _Quad:
    """Residual phi(E), its derivative, and the two log sides (for the stop test).

    mode 0: ln(P + C+) - ln(N + C-); mode 1: ln(P + w_q T_q (1 - y_q)) - ln D_q;
    mode 2: ln D_p - ln(w_p T_p y_p + N). All increase with E.
    """
    ap, aq = _alpha(s.p, s.f_RT), _alpha(s.q, s.f_RT)
    lny_p, ln1my_p, dlny_p, dln1my_p = _state(s.p, ap * E + s.beta_p, ap)
    lny_q, ln1my_q, dlny_q, dln1my_q = _state(s.q, aq * E + s.beta_q, aq)
    lnP = s.base_p + ln1my_p
    lnN = s.base_q + lny_q
    if not s.any_mode:
        left = _lae(lnP, s.lnC_pos)
        right = _lae(lnN, s.lnC_neg)
        dphi = np.exp(lnP - left) * dln1my_p - np.exp(lnN - right) * dlny_q
        return left - right, dphi, left, right
    m1, m2 = s.mode1, s.mode2
    left = _lae(lnP, np.where(m1, s.base_q + ln1my_q, s.lnC_pos))
    right = _lae(lnN, np.where(m2, s.base_p + lny_p, s.lnC_neg))
    # the shares of the two terms of each side sum to 1
    w_left, w_right = np.exp(lnP - left), np.exp(lnN - right)
    d_left = w_left * dln1my_p + np.where(m1, (1.0 - w_left) * dln1my_q, 0.0)
    d_right = w_right * dlny_q + np.where(m2, (1.0 - w_right) * dlny_p, 0.0)
    left = np.where(m2, s.lnD_p, left)
    right = np.where(m1, s.lnD_q, right)
    d_left = np.where(m2, 0.0, d_left)
    d_right = np.where(m1, 0.0, d_right)
    return left - right, d_left - d_right, left, right


def _start(s: _System) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """Starting potentials and initial brackets (lo, hi) for the Newton solve.

    Before the stoichiometric point (C > 0) the reductant alone with N = C gives
    E1, where phi >= 0; after it (C < 0) the oxidant alone with P = -C gives E2,
    where phi <= 0. Given the fractions, E follows from ln c = alpha E + beta.
    """
    pos = s.C > 0
    neg = s.C < 0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        # reductant-side couple q: y = C / (w T), 1 - y = D_q / (w T)
        lny = np.minimum(s.gap_q, 0.0)
        ln1my = np.maximum(np.minimum(s.lnD_q - s.base_q, 0.0), _LN_FLOOR)
        E1 = (ln1my - s.q.ratio * lny - s.beta_q) / _alpha(s.q, s.f_RT)
        # oxidant-side couple p: 1 - y = -C / (w T), y = D_p / (w T)
        ln1my = np.minimum(s.gap_p, 0.0)
        lny = np.maximum(np.minimum(s.lnD_p - s.base_p, 0.0), _LN_FLOOR)
        E2 = (ln1my - s.p.ratio * lny - s.beta_p) / _alpha(s.p, s.f_RT)
    hi = np.where(pos & np.isfinite(E1), E1, np.inf)
    lo = np.where(neg & np.isfinite(E2), E2, -np.inf)
    # Close to the stoichiometric point both reacting species are minorities:
    # 1 - y_p ~ c_p and y_q ~ c_q^(-1/r_q), and P = N is linear in E. That
    # estimate beats E1/E2 there; elsewhere it lies beyond them and is not used.
    ap, aq = _alpha(s.p, s.f_RT), _alpha(s.q, s.f_RT)
    rq = s.q.ratio
    with np.errstate(invalid="ignore"):
        E3 = (s.base_q - s.beta_q / rq - s.base_p - s.beta_p) / (ap + aq / rq)
    E = np.where(pos, np.fmin(E1, E3), np.fmax(E2, E3))
    ok = np.isfinite(E)
    if not ok.all():
        E = np.where(ok, E, 0.5 * (s.p.E0 + s.q.E0))
    # Within 0.1 % of the stoichiometric point (where C is still comparable to
    # the minorities) polish the start on the two-minority model
    # ln P ~ Lp + ap E, ln N ~ Lq - bq E, in which phi is cheap: it spares
    # the exact solver extra passes over the few points right at equivalence.
    with np.errstate(invalid="ignore"):
        near = np.flatnonzero(np.fmax(s.gap_q, s.gap_p) < _LN_NEAR)
    bq = aq / rq
    if near.size <= _FEW:
        for i in near.tolist():
            u = _polish_one(
                float(s.base_p[i] + s.beta_p[i]), float(s.base_q[i] - s.beta_q[i] / rq),
                float(s.lnC_pos[i]), float(s.lnC_neg[i]), float(E[i]), ap, bq,
            )
            if math.isfinite(u):
                E[i] = min(max(u, lo[i]), hi[i])
    else:
        Lp = s.base_p[near] + s.beta_p[near]
        Lq = s.base_q[near] - s.beta_q[near] / rq
        Cp, Cn = s.lnC_pos[near], s.lnC_neg[near]
        u = E[near]
        for _ in range(_POLISH_STEPS):
            lnP, lnN = Lp + ap * u, Lq - bq * u
            left, right = _lae(lnP, Cp), _lae(lnN, Cn)
            du = (left - right) / (ap * np.exp(lnP - left) + bq * np.exp(lnN - right))
            u = u - np.clip(du, -_POLISH_CAP, _POLISH_CAP)
        u = np.clip(u, lo[near], hi[near])
        E[near] = np.where(np.isfinite(u), u, E[near])
    return E, lo, hi


#: The start is polished within 0.1 % of the stoichiometric point.
_LN_NEAR = math.log(1e-3)
#: Newton steps of the start's polish near the stoichiometric point, and
#: the largest step each may take, V.
_POLISH_STEPS = 2
_POLISH_CAP = 0.05
#: Up to this many points the polish runs on Python floats: a numpy call
#: costs about a microsecond whatever its size, and a curve of evenly
#: spaced volumes has only one or two points this close to equivalence.
_FEW = 16


def _polish_one(Lp: float, Lq: float, Cp: float, Cn: float, u: float,
                ap: float, bq: float) -> float:
    """The start's polish of one point (the loop above, on floats)."""

    def lae(x: float, y: float) -> float:
        m = max(x, y)
        return m if m == -math.inf else m + math.log1p(math.exp(-abs(x - y)))

    for _ in range(_POLISH_STEPS):
        lnP, lnN = Lp + ap * u, Lq - bq * u
        left, right = lae(lnP, Cp), lae(lnN, Cn)
        try:
            du = (left - right) / (ap * math.exp(lnP - left) + bq * math.exp(lnN - right))
        except (ZeroDivisionError, OverflowError):
            return math.nan
        if math.isnan(du):
            return math.nan
        u -= min(max(du, -_POLISH_CAP), _POLISH_CAP)
    return u


def _newton_pass(
    sub: _System, Ea: _Arr, la: _Arr, ha: _Arr, at_Ea: _Quad | None = None
) -> tuple[_Arr, _Arr, _Arr, NDArray[np.bool_], _Arr]:
    """One safeguarded Newton pass: new E, bracket, and which points are done.

    ``at_Ea`` is ``_phi(sub, Ea)`` if the caller has it already."""
    phi, dphi, left, right = _phi(sub, Ea) if at_Ea is None else at_Ea
    la = np.where(phi < 0, Ea, la)  # Ea lies inside the bracket already
    ha = np.where(phi > 0, Ea, ha)
    # phi is at the rounding level of its two log terms: nothing more to
    # gain (flat stretches, e.g. at V = 0, cannot do better than this).
    converged = np.abs(phi) <= 8.0 * _EPS * (1.0 + np.abs(left) + np.abs(right))
    En = Ea - np.clip(phi / dphi, -1.0, 1.0)
    bad = ~((En > la) & (En < ha))  # also catches NaN
    if bad.any():
        both = np.isfinite(la) & np.isfinite(ha)
        fallback = np.where(
            both,
            0.5 * (la + ha),
            np.where(np.isfinite(la), np.maximum(Ea, la) + 1.0, np.minimum(Ea, ha) - 1.0),
        )
        En = np.where(bad, fallback, En)
        step_done = np.abs(En - Ea) <= np.where(bad, _E_TOL, _NEWTON_DONE)
    else:
        step_done = np.abs(En - Ea) <= _NEWTON_DONE
    En = np.where(converged, Ea, En)
    done = converged | step_done | (ha - la <= _E_TOL)
    return En, la, ha, done, phi


def _solve(s: _System) -> NDArray[np.float64]:
    """Solve phi(E) = 0 at all points at once by safeguarded Newton."""
    E, lo, hi = _start(s)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        # The start is usually within 1e-12 V already, so first a plain
        # Newton step on every point, kept inside the start's bracket (which
        # holds the root): if every step is a small one, every point is done
        # and the bookkeeping of the safeguarded passes is not needed.
        at_E = _phi(s, E)
        phi, dphi = at_E[0], at_E[1]
        step = phi / dphi
        if np.all((np.abs(step) <= _NEWTON_DONE) & (dphi > 0)):
            return np.minimum(np.maximum(E - step, lo), hi)
        # first pass on every point without index bookkeeping
        E, lo, hi, done, phi = _newton_pass(s, E, lo, hi, at_E)
        if done.all():
            return E
        idx = np.flatnonzero(~done)
        for _ in range(_MAX_ITER):
            # Later passes touch only the points still moving: a handful near
            # equivalence, not the whole curve.
            En, la, ha, done, phi = _newton_pass(s.subset(idx), E[idx], lo[idx], hi[idx])
            E[idx], lo[idx], hi[idx] = En, la, ha
            if done.all():
                return E
            idx = idx[~done]
    worst = int(idx[0])
    raise NoRoot(float(phi[0]), (float(lo[worst]), float(hi[worst])))


def _volumes(volumes_mL: ArrayLike) -> NDArray[np.float64]:
    V = np.array(volumes_mL, dtype=float, ndmin=1)
    if V.ndim != 1:
        raise ValueError(f"volumes must be one-dimensional, got shape {V.shape}")
    if not np.all(np.isfinite(V)) or np.any(V < 0):
        raise ValueError("volumes must be finite and >= 0 mL")
    return V


def _equilibrium_E(t: Titration, V: NDArray[np.float64]) -> NDArray[np.float64]:
    """Equilibrium potential at each volume, ignoring electrode reversibility."""
    return _solve(_build(t, V))


def _undefined(t: Titration, V: NDArray[np.float64]) -> tuple[NDArray[np.bool_], str | None]:
    """Mask of volumes where no Nernstian potential is defined, and the reason."""
    V_st = stoichiometric_volume_mL(t)
    mask = np.zeros(V.shape, dtype=bool)
    notes = []
    if not t.titrant.reversible:
        mask |= V >= V_st
        notes.append(
            "past the equivalence point the potential is set by the "
            f"{t.titrant.label or 'titrant'} couple, which is not electrochemically "
            "reversible; no Nernstian branch is computed"
        )
    if not t.analyte.reversible:
        mask |= V <= V_st
        notes.append(
            "up to the equivalence point the potential is set by the "
            f"{t.analyte.label or 'analyte'} couple, which is not electrochemically "
            "reversible; no Nernstian branch is computed"
        )
    return mask, ("; ".join(notes) if notes else None)


def _readonly(x: NDArray[np.float64]) -> NDArray[np.float64]:
    x.setflags(write=False)
    return x


def titration_curve(t: Titration, volumes_mL: ArrayLike) -> Curve:
    """Compute the exact equilibrium titration curve.

    Args:
        t: the titration.
        volumes_mL: titrant volumes, mL (any order, >= 0).

    Returns:
        The curve; E is NaN where an irreversible couple alone would set it.

    Raises:
        ValueError: for negative or non-finite volumes.
        NoRoot: if the solver fails to converge (not expected for valid input).
    """
    V = _volumes(volumes_mL)
    # The stoichiometric point rides along as one extra volume in the same solve.
    E_all = _equilibrium_E(t, np.append(V, stoichiometric_volume_mL(t)))
    mask, note = _undefined(t, V)
    E = np.where(mask, np.nan, E_all[:-1])
    Veq = equivalence_volume_mL(t)
    E_eq: float | None = None
    if t.analyte.reversible and t.titrant.reversible:
        E_eq = float(E_all[-1])
    return Curve(
        volumes_mL=_readonly(V.copy()),
        E_V=_readonly(E),
        fraction=_readonly(V / Veq),
        equivalence_volume_mL=Veq,
        equivalence_potential_V=E_eq,
        note=note,
    )


def speciation(t: Titration, volumes_mL: ArrayLike) -> Speciation:
    """Return the equilibrium concentrations of all four species at each volume.

    No masking for irreversible couples: this is the chemical equilibrium.
    """
    V = _volumes(volumes_mL)
    s = _build(t, V)
    E = _solve(s)
    out = {}
    for tag, cp, lnT, base in (("p", s.p, s.lnT_p, s.base_p), ("q", s.q, s.lnT_q, s.base_q)):
        has = np.isfinite(base)
        lny, ln1my = _fractions(_ln_c(cp, E, lnT, s.lnH, s.f_RT), cp.ratio)
        ln_red = np.where(has, lnT + lny, -np.inf)
        ln_ox = np.where(has, lnT + ln1my - math.log(cp.ratio), -np.inf)
        out[tag] = (ln_ox, ln_red)
    an, ti = (out["q"], out["p"]) if t.analyte_form == "red" else (out["p"], out["q"])
    return Speciation(
        volumes_mL=_readonly(V.copy()),
        E_V=_readonly(E),
        analyte_ox=_readonly(np.exp(an[0])),
        analyte_red=_readonly(np.exp(an[1])),
        titrant_ox=_readonly(np.exp(ti[0])),
        titrant_red=_readonly(np.exp(ti[1])),
        ln_analyte_ox=_readonly(an[0]),
        ln_analyte_red=_readonly(an[1]),
        ln_titrant_ox=_readonly(ti[0]),
        ln_titrant_red=_readonly(ti[1]),
    )


def potential_at(t: Titration, V_mL: float) -> float:
    """Return E vs SHE at one titrant volume, V.

    Raises:
        CurveUndefined: where an irreversible couple alone would set E.
    """
    V = _volumes([V_mL])
    mask, note = _undefined(t, V)
    if mask[0]:
        raise CurveUndefined(f"at {V_mL:g} mL: {note}")
    return float(_equilibrium_E(t, V)[0])


def _rising(t: Titration) -> bool:
    # Adding an oxidant raises E; adding a reductant lowers it.
    return t.analyte_form == "red"


def volume_at_potential(t: Titration, E_V: float) -> float:
    """Return the titrant volume at which the equilibrium potential equals E_V, mL.

    The exact inverse of the curve: successive vectorised grids narrow the
    bracket on the monotone E(V) by a factor 64 per round down to rounding.

    Raises:
        NoRoot: if E_V is not reached for 0 <= V <= 2**31 Veq.
        CurveUndefined: if the volume found lies where the curve is undefined.
    """
    sgn = 1.0 if _rising(t) else -1.0
    Veq = equivalence_volume_mL(t)

    def g(V: NDArray[np.float64]) -> NDArray[np.float64]:
        return sgn * (_equilibrium_E(t, V) - E_V)

    lo, hi = 0.0, 2.0 * Veq
    g0 = float(g(np.array([lo]))[0])
    if g0 > 0:
        raise NoRoot(g0, (lo, hi))
    if g0 == 0:
        return 0.0
    for _ in range(30):
        if float(g(np.array([hi]))[0]) >= 0:
            break
        lo, hi = hi, hi * 2.0
    else:
        raise NoRoot(float(g(np.array([hi]))[0]), (0.0, hi))
    grid_n = 64
    for _ in range(12):
        grid = np.linspace(lo, hi, grid_n + 1)
        gv = g(grid)
        k = int(np.argmax(gv >= 0))  # first grid point at or past the target
        k = min(max(k, 1), grid_n)
        lo, hi = float(grid[k - 1]), float(grid[k])
        g_lo, g_hi = float(gv[k - 1]), float(gv[k])
        if hi - lo <= 4 * _EPS * max(hi, 1.0):
            break
    V_found = lo if g_hi == g_lo else lo + (hi - lo) * (-g_lo) / (g_hi - g_lo)
    mask, note = _undefined(t, np.array([V_found]))
    if mask[0]:
        raise CurveUndefined(f"E = {E_V:g} V falls at {V_found:g} mL: {note}")
    return float(V_found)


def potential_break_V(t: Titration, lo: float = 0.999, hi: float = 1.001) -> float:
    """Return |E(hi Veq) - E(lo Veq)|, the potential jump around equivalence, V.

    The sign is dropped so that a rising ('red' analyte) and a falling ('ox'
    analyte) curve report the same size of jump.

    Raises:
        CurveUndefined: if either end lies where the curve is undefined.
    """
    Veq = equivalence_volume_mL(t)
    return abs(potential_at(t, hi * Veq) - potential_at(t, lo * Veq))


# ---------------------------------------------------------------- reference


def curve_pointwise_brentq(
    t: Titration, volumes_mL: Sequence[float] | ArrayLike
) -> NDArray[np.float64]:
    """Deliberately simple reference: the same equations, one point at a time.

    Scalar ``math`` arithmetic, scipy.optimize.brentq for the potential at each
    volume and a nested brentq for the mass balance of an asymmetric couple.
    Used to test :func:`titration_curve` and to time it; it applies the same
    NaN masking for irreversible couples.
    """
    # imported here so ordinary use never loads scipy
    from scipy.optimize import brentq  # type: ignore[import-untyped,unused-ignore]

    V_all = _volumes(volumes_mL)
    f_RT = F / (R * t.T_K)
    lnH = math.log(t.H_mol_per_L)
    f = t.initial_fraction

    def lae(x: float, y: float) -> float:
        # log(exp x + exp y) without overflow
        if x == -math.inf:
            return y
        if y == -math.inf:
            return x
        mx = max(x, y)
        return mx + math.log1p(math.exp(-abs(x - y)))

    def ln_fracs(cp: Couple, E: float, lnT: float) -> tuple[float, float]:
        r = cp.b / cp.a
        lnc = math.log(r) + (cp.n * f_RT * (E - cp.E0) - cp.m * lnH) / cp.a + (r - 1) * lnT
        if r == 1:
            lny = -lae(0.0, lnc)
        else:
            # h(z) >= 0 at min(0, -ln c/r) and <= 0 at min(-ln 2, (-ln 2 - ln c)/r);
            # widened a little so rounding in ln c + r z cannot spoil the signs.
            z_hi = min(0.0, -lnc / r) + 1e-6
            z_lo = min(-_LN2, (-_LN2 - lnc) / r) - 1.0
            lny = brentq(lambda z: lae(z, lnc + r * z), z_lo, z_hi, xtol=1e-15, rtol=4 * _EPS)
        return lny, lnc + r * lny

    def solve_one(V: float) -> float:
        Vtot = t.V0_mL + V
        pmmol = t.analyte_partner_mol_per_L * t.V0_mL
        an, ti = t.analyte, t.titrant
        if t.analyte_form == "red":
            T_an = (t.analyte_mmol + an.b / an.a * pmmol) / Vtot
            T_ti = ti.b / ti.a * t.titrant_mol_per_L * V / Vtot
            Ne_A = t.analyte_mmol * an.n / an.b
            Ne_T = ti.n / ti.a * t.titrant_mol_per_L * V
            C = ((1 - f) * Ne_A - Ne_T) / Vtot
            D_red = (an.n / an.b * (f * t.analyte_mmol + an.b / an.a * pmmol) + Ne_T) / Vtot
            D_ox = (1 - f) * Ne_A / Vtot
            ox_c, ox_T, red_c, red_T = ti, T_ti, an, T_an
        else:
            T_an = (an.b / an.a * t.analyte_mmol + pmmol) / Vtot
            T_ti = t.titrant_mol_per_L * V / Vtot
            Ne_A = t.analyte_mmol * an.n / an.a
            Ne_T = ti.n / ti.b * t.titrant_mol_per_L * V
            C = (Ne_T - (1 - f) * Ne_A) / Vtot
            D_red = (1 - f) * Ne_A / Vtot
            D_ox = (f * Ne_A + an.n / an.b * pmmol + Ne_T) / Vtot
            ox_c, ox_T, red_c, red_T = an, T_an, ti, T_ti
        # electron capacity of each couple in its reactive form, mol/L
        W_ox = ox_c.n / ox_c.b * ox_T
        W_red = red_c.n / red_c.b * red_T
        lnCp = math.log(C) if C > 0 else -math.inf
        lnCn = math.log(-C) if C < 0 else -math.inf
        # Same switch as the vectorised solver: when the limiting couple is more
        # than half converted, balance its minority form against D.
        mode = 1 if (C > 0 and C > 0.5 * W_red) else 2 if (C < 0 and -C > 0.5 * W_ox) else 0

        def phi(E: float) -> float:
            if ox_T > 0:
                lny_o, ln1my_o = ln_fracs(ox_c, E, math.log(ox_T))
                lnP = math.log(W_ox) + ln1my_o
            else:
                lny_o, lnP = -math.inf, -math.inf
            if red_T > 0:
                lny_r, ln1my_r = ln_fracs(red_c, E, math.log(red_T))
                lnN = math.log(W_red) + lny_r
            else:
                ln1my_r, lnN = -math.inf, -math.inf
            if mode == 1:  # W_red (1 - y_red) + P = D_red
                return lae(lnP, math.log(W_red) + ln1my_r) - math.log(D_red)
            if mode == 2:  # W_ox y_ox + N = D_ox
                return math.log(D_ox) - lae(math.log(W_ox) + lny_o, lnN)
            return lae(lnP, lnCp) - lae(lnN, lnCn)

        lo = min(an.E0, ti.E0) - 0.5
        hi = max(an.E0, ti.E0) + 0.5
        while phi(lo) > 0:
            lo -= 1.0
        while phi(hi) < 0:
            hi += 1.0
        return float(brentq(phi, lo, hi, xtol=1e-14, rtol=4 * _EPS, maxiter=500))

    out = np.array([solve_one(float(V)) for V in V_all])
    mask, _ = _undefined(t, V_all)
    out[mask] = np.nan
    return out
