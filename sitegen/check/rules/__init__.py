"""Rule modules, imported in this one order (the order rules run in)."""

from . import links  # noqa: F401  (registers rules)
from . import chemistry  # noqa: F401
from . import calculation  # noqa: F401
from . import hazards  # noqa: F401  (registers rules)
from . import document  # noqa: F401  (registers rules)
