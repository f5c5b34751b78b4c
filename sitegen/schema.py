"""The published record format as JSON Schema (``sitegen schema``)."""

from __future__ import annotations

__all__ = ["schema_json", "schemas"]

import json
from typing import Any

from .model import Indicator, MethodRecord, Reagent, SiteConfig

_KINDS = {
    "method": (MethodRecord, "records/<id>.yaml"),
    "reagent": (Reagent, "reagents/<id>.yaml"),
    "indicator": (Indicator, "indicators/<id>.yaml"),
    "site": (SiteConfig, "site.yaml"),
}


def schemas() -> dict[str, dict[str, Any]]:
    """One JSON Schema (draft 2020-12) per record kind."""
    out: dict[str, dict[str, Any]] = {}
    for kind, (model, where) in _KINDS.items():
        s = model.model_json_schema(mode="validation")
        s["$schema"] = "https://json-schema.org/draft/2020-12/schema"
        s["$comment"] = f"sitegen {kind} record, written as YAML in {where}"
        out[kind] = s
    return out


def schema_json(kind: str = "all") -> str:
    """The schema(s) as deterministic JSON text."""
    all_ = schemas()
    data: Any = all_ if kind == "all" else all_[kind]
    return json.dumps(data, indent=2, sort_keys=True, ensure_ascii=False) + "\n"
