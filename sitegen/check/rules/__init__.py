"""Rule modules, imported in this one order (the order rules run in)."""

from . import (
    calculation,  # noqa: F401
    chemistry,  # noqa: F401
    document,  # noqa: F401  (registers rules)
    hazards,  # noqa: F401  (registers rules)
    links,  # noqa: F401  (registers rules)
)
