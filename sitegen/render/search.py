"""The offline search index, built at build time.

One document per published method that is not retired: title, analyte,
matrix, reagent names and formulas, and the procedure's plain words. The
index is written twice: as ``search-index.json`` and as
``search-index.js`` (assigning ``window.SITEGEN_SEARCH``), because
browsers refuse ``fetch()`` of local files under ``file://`` but do load
a ``<script src>``.
"""

from __future__ import annotations

__all__ = ["procedure_words", "search_document", "search_documents", "search_files"]

import json
from collections.abc import Sequence
from typing import Any

from .text import markdown_text


def search_document(mid: str, loaded: Any, collection: Any) -> dict[str, Any] | None:
    """One method's document (None for a retired method, which is not
    indexed); its URL is relative to the site root."""
    rec = loaded.record
    if rec.status.value == "retired":
        return None
    names, formulas = [], []
    for use in rec.reagents:
        r = collection.reagents.get(use.ref)
        if r is not None:
            names.append(r.record.name)
            formulas.append(r.record.formula)
    return {
        "id": mid,
        "url": f"methods/{mid}/index.html",
        "title": rec.title,
        "status": rec.status.value,
        "analyte": rec.scope.analyte,
        "matrix": rec.scope.matrix,
        "reagents": " ; ".join(names),
        "formulas": " ".join(formulas),
        "text": procedure_words(rec),
    }


def search_documents(collection: Any, published: dict[str, Any]) -> list[dict[str, Any]]:
    """The documents of the published methods, sorted by id."""
    docs = (search_document(mid, lo, collection) for mid, lo in sorted(published.items()))
    return [d for d in docs if d is not None]


def procedure_words(record: Any) -> str:
    """The plain words of a method record's procedure, as indexed."""
    return markdown_text(record.procedure)


def search_files(
    collection: Any, published: dict[str, Any],
    documents: Sequence[dict[str, Any] | None] | None = None,
) -> dict[str, bytes]:
    """``search-index.json`` and ``search-index.js``. ``documents``: the
    methods' :func:`search_document` values in id order, where already
    known (a build keeps each with the method's pages); None entries are
    left out."""
    if documents is None:
        docs = search_documents(collection, published)
    else:
        docs = [d for d in documents if d is not None]
    payload = {"version": 1, "documents": docs}
    text = json.dumps(payload, sort_keys=True, ensure_ascii=False, separators=(",", ":"))
    # "</" would end an inline script; the JS file is loaded by src, but a
    # theme could inline it, so keep it safe either way
    js_text = text.replace("</", "<\\/")
    return {
        "search-index.json": (text + "\n").encode("utf-8"),
        "search-index.js": f"window.SITEGEN_SEARCH = {js_text};\n".encode(),
    }
