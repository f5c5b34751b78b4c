"""Physical constants used by the electrochemistry modules (SI units).

Values are the exact SI defining constants and derived exact values of
CODATA 2018: E. Tiesinga, P. J. Mohr, D. B. Newell, B. N. Taylor,
"CODATA recommended values of the fundamental physical constants: 2018",
Rev. Mod. Phys. 93, 025010 (2021). Since the 2019 SI redefinition N_A and e
are exact, so F = N_A e and R = N_A k are exact (R is written to the digits
CODATA gives).
"""

import math

__all__ = ["F", "LN10", "R", "T_STANDARD"]

F: float = 96485.33212
"""Faraday constant, C/mol (CODATA 2018, exact: N_A * e)."""

R: float = 8.314462618
"""Molar gas constant, J/(mol K) (CODATA 2018, exact: N_A * k, truncated as listed)."""

T_STANDARD: float = 298.15
"""Standard thermodynamic temperature for tabulated potentials, K (25 degC, IUPAC)."""

LN10: float = math.log(10.0)
"""Natural log of 10, to turn RT/F into the per-decade Nernst slope."""
