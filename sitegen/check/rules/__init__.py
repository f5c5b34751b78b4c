"""Rule modules, imported in this one order (the order rules run in)."""

from . import links  # noqa: F401  (registers rules)
