"""HTML rendering: view-models, templates, plots and exports.

The stage is pure: :func:`sitegen.render.site.render_site` maps a loaded
collection, its analyses and findings to ``{relative path: bytes}``; the
build writes the files.
"""

from __future__ import annotations

__all__ = ["RenderOptions", "render_method_files", "render_shared", "render_site"]

from .site import RenderOptions, render_method_files, render_shared, render_site
