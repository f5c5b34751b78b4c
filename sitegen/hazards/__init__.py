"""GHS hazard data, per-method hazard summaries and chemistry-aware safety
rules.

The GHS table and the built-in safety rules are package data
(``sitegen/data/ghs.yaml``, ``sitegen/data/safety-rules.yaml``). This
package reads them; the checker rules that use it live in
:mod:`sitegen.check.rules.hazards`.
"""

from __future__ import annotations

__all__ = [
    "HazardSummary",
    "ReagentHazards",
    "RuleSet",
    "SafetyRule",
    "Triggered",
    "evaluate",
    "method_hazards",
]

from .rules_engine import RuleSet, SafetyRule, Triggered, evaluate
from .summary import HazardSummary, ReagentHazards, method_hazards
