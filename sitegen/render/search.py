"""The offline search index, built at build time.

One document per published method that is not retired: title, analyte,
matrix, reagent names and formulas, and the procedure's plain words. The
index is written twice: as ``search-index.json`` and as
``search-index.js`` (assigning ``window.SITEGEN_SEARCH``), because
browsers refuse ``fetch()`` of local files under ``file://`` but do load
a ``<script src>``.
"""

from __future__ import annotations

__all__ = ["procedure_words", "search_documents", "search_files"]

import json
from collections.abc import Mapping
from typing import Any

from .text import markdown_text


def search_documents(
    collection: Any, published: dict[str, Any], texts: Mapping[str, str] | None = None
) -> list[dict[str, Any]]:
    """The documents, sorted by id; URLs are relative to the site root.

    ``texts`` may hold :func:`procedure_words` of some methods, computed
    earlier (a build keeps them with each method's cached pages).
    """
    docs = []
    for mid, loaded in sorted(published.items()):
        rec = loaded.record
        if rec.status.value == "retired":
            continue
        names, formulas = [], []
        for use in rec.reagents:
            r = collection.reagents.get(use.ref)
            if r is not None:
                names.append(r.record.name)
                formulas.append(r.record.formula)
        docs.append(
            {
                "id": mid,
                "url": f"methods/{mid}/index.html",
                "title": rec.title,
                "status": rec.status.value,
                "analyte": rec.scope.analyte,
                "matrix": rec.scope.matrix,
                "reagents": " ; ".join(names),
                "formulas": " ".join(formulas),
                "text": texts[mid] if texts and mid in texts else procedure_words(rec),
            }
        )
    return docs


def procedure_words(record: Any) -> str:
    """The plain words of a method record's procedure, as indexed."""
    return markdown_text(record.procedure)


def search_files(
    collection: Any, published: dict[str, Any], texts: Mapping[str, str] | None = None
) -> dict[str, bytes]:
    """``search-index.json`` and ``search-index.js``."""
    payload = {"version": 1, "documents": search_documents(collection, published, texts)}
    text = json.dumps(payload, sort_keys=True, ensure_ascii=False, separators=(",", ":"))
    # "</" would end an inline script; the JS file is loaded by src, but a
    # theme could inline it, so keep it safe either way
    js_text = text.replace("</", "<\\/")
    return {
        "search-index.json": (text + "\n").encode("utf-8"),
        "search-index.js": f"window.SITEGEN_SEARCH = {js_text};\n".encode(),
    }
