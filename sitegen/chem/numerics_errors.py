"""Errors raised by the numerical electrochemistry modules.

They carry the numbers that explain the failure (a residual, a bracket, a
reason), never a file position: the stage that called the chemistry attaches
positions on the way up.
"""

from sitegen.chem.errors import ChemError

__all__ = ["CurveUndefined", "NoRoot", "NumericsError"]


class NumericsError(ChemError):
    """Base class of the numerical electrochemistry errors (a :class:`ChemError`)."""


class NoRoot(NumericsError):
    """A monotone equation had no root inside the searched bracket.

    Attributes:
        residual: residual at the best point found (units of the equation).
        bracket: the (low, high) interval that was searched.
    """

    def __init__(self, residual: float, bracket: tuple[float, float]) -> None:
        self.residual = float(residual)
        self.bracket = (float(bracket[0]), float(bracket[1]))
        super().__init__(
            f"no root in [{self.bracket[0]:.6g}, {self.bracket[1]:.6g}]; "
            f"best residual {self.residual:.3g}"
        )


class CurveUndefined(NumericsError):
    """The titration model cannot define a potential where one was asked for.

    Attributes:
        reason: why, in words (e.g. the couple that would set the potential is
            not electrochemically reversible).
    """

    def __init__(self, reason: str) -> None:
        self.reason = reason
        super().__init__(reason)
