"""A source folder: site settings, reagents, indicators, glossary and
method records, each loaded with positions.

Layout (``docs/record-format.md``)::

    SOURCE/site.yaml           site settings
    SOURCE/glossary.yaml       optional: term -> definition
    SOURCE/safety-rules.yaml   optional: the lab's own safety rules
    SOURCE/records/*.yaml      method records (id = file name)
    SOURCE/reagents/*.yaml     reagent records
    SOURCE/indicators/*.yaml   indicator records
"""

from __future__ import annotations

__all__ = [
    "KINDS",
    "Collection",
    "Reader",
    "Validated",
    "add_records",
    "find_root",
    "load_collection",
    "load_paths",
    "read_records",
    "start_collection",
]

import os
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import Finding, Severity, Span
from ..model import Indicator, MethodRecord, Reagent, SiteConfig
from .records import Loaded, load_text
from .source import Source, SourceProblem, read_source
from .spans import YamlProblem, parse_yaml

KINDS: dict[str, type[Any]] = {
    "records": MethodRecord,
    "reagents": Reagent,
    "indicators": Indicator,
}


@dataclass
class Collection:
    """Everything loaded from one source folder.

    Attributes:
        root: the source folder.
        site: site settings (None if site.yaml failed to load).
        methods / reagents / indicators: id -> Loaded, sorted by id.
        glossary: term -> definition.
        sources: every file read, by shown path (for the caret printer).
        findings: problems found while loading.
    """

    root: Path
    site: Loaded | None = None
    methods: dict[str, Loaded] = field(default_factory=dict)
    reagents: dict[str, Loaded] = field(default_factory=dict)
    indicators: dict[str, Loaded] = field(default_factory=dict)
    glossary: dict[str, str] = field(default_factory=dict)
    glossary_source: Source | None = None
    safety_rules_source: Source | None = None
    sources: dict[str, Source] = field(default_factory=dict)
    findings: list[Finding] = field(default_factory=list)
    #: kind folder -> file stems that exist but did not load (their own
    #: findings say why; references to them are not "missing")
    unloadable: dict[str, set[str]] = field(default_factory=dict)
    #: when only some method files were named: their shown paths; findings
    #: in other method records are then not reported
    selected: set[str] | None = None


def find_root(path: Path) -> Path | None:
    """The source folder holding ``path``: the nearest folder, from ``path``
    upward, that has a site.yaml."""
    p = path.resolve()
    for candidate in (p, *p.parents) if p.is_dir() else p.parents:
        if (candidate / "site.yaml").is_file():
            return candidate
    return None


def _shown(path: Path, cwd: Path) -> str:
    try:
        return str(path.resolve().relative_to(cwd))
    except ValueError:
        return str(path)


class _Shower:
    """Shown paths of many files: each folder is resolved once, and a file
    only when it is a symbolic link (the shown path is the resolved one,
    relative to ``cwd`` when inside it). Plain strings: a collection has
    thousands of files."""

    def __init__(self, cwd: Path) -> None:
        self.cwd = os.fspath(cwd)
        self._folders: dict[str, str] = {}

    def real(self, path: Path, is_link: bool) -> str:
        if is_link:
            return os.path.realpath(path)
        parent = os.path.dirname(os.fspath(path))
        folder = self._folders.get(parent)
        if folder is None:
            folder = self._folders[parent] = os.path.realpath(parent)
        return os.path.join(folder, path.name)

    def shown(self, path: Path, real: str) -> str:
        if real.startswith(self.cwd + os.sep):
            return real[len(self.cwd) + 1 :]
        return str(path)


#: Reads one file: (path, shown path) -> its source or why it cannot be read.
Reader = Callable[[Path, str], "Source | SourceProblem"]


def _read(path: Path, cwd: Path, col: Collection, shown: str | None = None,
          read: Reader = read_source) -> Source | None:
    shown = shown if shown is not None else _shown(path, cwd)
    src = read(path, shown)
    if isinstance(src, SourceProblem):
        col.findings.append(
            Finding(src.rule, Severity.ERROR, src.message, Span(shown, src.line, src.col))
        )
        return None
    col.sources[src.path] = src
    return src


def _files(folder: Path) -> list[tuple[Path, bool]]:
    """(path, is a symbolic link) of the record files in ``folder``, sorted."""
    if not folder.is_dir():
        return []
    found = []
    with os.scandir(folder) as it:
        for e in it:
            if e.name.endswith((".yaml", ".yml")) and e.is_file():
                found.append((e.name, e.is_symlink()))
    # sorted by name as strings: comparing Path objects costs ten times more
    return [(folder / name, is_link) for name, is_link in sorted(found)]


#: One validated file: (the loaded record or None, its findings), as
#: :func:`sitegen.load.records.load_text` returns it.
Validated = tuple[Loaded | None, list[Finding]]


def start_collection(
    root: Path, cwd: Path, validate: Callable[[type[Any], Source], Validated] = load_text
) -> Collection:
    """A collection holding the site settings, the glossary and the
    lab's safety-rules source, but no records yet (``validate`` checks
    site.yaml)."""
    col = Collection(root=root)
    src = _read(root / "site.yaml", cwd, col)
    if src is not None:
        loaded, findings = validate(SiteConfig, src)
        col.site = loaded
        col.findings.extend(findings)
    _load_glossary(root, cwd, col)
    sr = root / "safety-rules.yaml"
    if sr.is_file():
        col.safety_rules_source = _read(sr, cwd, col)
    return col


def read_records(
    col: Collection, cwd: Path, only: Iterable[Path] | None = None, read: Reader = read_source
) -> list[tuple[str, Path, Source]]:
    """Read every record file of the kind folders, in order: (kind folder,
    path, source). A file that cannot be read, or that links out of the
    source folder, becomes a finding and is marked unloadable. ``only``:
    the method record files to read (all by default); ``read``: how a file
    is read (:func:`sitegen.load.source.read_source`)."""
    shower = _Shower(cwd)
    root_real = os.path.realpath(col.root)
    only_set = {os.fspath(p.resolve()) for p in only} if only is not None else None
    out: list[tuple[str, Path, Source]] = []
    for folder in KINDS:
        failed = col.unloadable.setdefault(folder, set())
        for path, is_link in _files(col.root / folder):
            real = shower.real(path, is_link)
            if folder == "records" and only_set is not None and real not in only_set:
                continue
            if not (real == root_real or real.startswith(root_real + os.sep)):
                col.findings.append(
                    Finding(
                        "outside-source",
                        Severity.ERROR,
                        f"{path.name} is a link to {real}, outside the source folder;"
                        " records must live in the source folder",
                        Span(shower.shown(path, real), 1, 1),
                    )
                )
                failed.add(path.stem)
                continue
            src = _read(path, cwd, col, shower.shown(path, real), read)
            if src is None:
                failed.add(path.stem)
                continue
            out.append((folder, path, src))
    return out


def add_records(
    col: Collection, items: Sequence[tuple[str, Path, Source]], results: Sequence[Validated]
) -> None:
    """Put validated records into the collection, in the order read; a
    record whose id differs from its file name, or repeats one, is
    refused with a finding."""
    tables = {"records": col.methods, "reagents": col.reagents, "indicators": col.indicators}
    for (folder, path, _src), (loaded, findings) in zip(items, results, strict=True):
        target = tables[folder]
        col.findings.extend(findings)
        if loaded is None:
            col.unloadable.setdefault(folder, set()).add(path.stem)
            continue
        rid = getattr(loaded, "record_id", None) or loaded.record.id
        if rid != path.stem:
            col.findings.append(
                Finding(
                    "id-mismatch",
                    Severity.ERROR,
                    f"id {rid!r} differs from the file name {path.stem!r}; they must be equal",
                    loaded.span("id"),
                )
            )
            continue
        if rid in target:
            first = target[rid].source.path
            col.findings.append(
                Finding(
                    "duplicate-id",
                    Severity.ERROR,
                    f"id {rid!r} is already used by {first}",
                    loaded.span("id"),
                )
            )
            continue
        target[rid] = loaded


def load_collection(
    root: Path, only: Iterable[Path] | None = None, cwd: Path | None = None
) -> Collection:
    """Load a source folder.

    Args:
        root: the source folder (holds site.yaml).
        only: when given, only these method record files are loaded as
            methods (reagents and indicators are always loaded, since the
            methods refer to them).
        cwd: paths in findings are shown relative to this folder.
    """
    cwd = (cwd or Path.cwd()).resolve()
    col = start_collection(root, cwd)
    items = read_records(col, cwd, only)
    add_records(col, items, [load_text(KINDS[folder], src) for folder, _p, src in items])
    return col


def load_paths(paths: Sequence[Path], cwd: Path | None = None) -> Collection:
    """Load the collection that the given paths (folders or record files)
    belong to. Paths in different source folders are not supported."""
    cwd = (cwd or Path.cwd()).resolve()
    roots = {find_root(p) for p in paths}
    if None in roots or len(roots) != 1:
        raise FileNotFoundError(
            "no site.yaml found above "
            + ", ".join(str(p) for p in paths)
            + "; point at a source folder (the one holding site.yaml)"
        )
    root = roots.pop()
    assert root is not None
    files: list[Path] = []
    whole = False
    for p in paths:
        if p.is_dir() or p.resolve().parent != (root / "records").resolve():
            # a folder, or a shared record (reagent, indicator, site): every
            # method may depend on it, so check them all
            whole = True
        else:
            files.append(p)
    # Cross-record rules need every record loaded; the caller narrows the
    # findings to the named files (see ``Collection.selected``).
    col = load_collection(root, None, cwd)
    if not whole:
        col.selected = {_shown(f, cwd) for f in files}
    return col


def _load_glossary(root: Path, cwd: Path, col: Collection) -> None:
    path = root / "glossary.yaml"
    if not path.is_file():
        return
    src = _read(path, cwd, col)
    if src is None:
        return
    col.glossary_source = src
    try:
        parsed = parse_yaml(src.text)
    except YamlProblem as p:
        col.findings.append(
            Finding(p.rule, Severity.ERROR, p.message, Span(src.path, p.line, p.col))
        )
        return
    data = parsed.data
    if not isinstance(data, dict) or not all(
        isinstance(k, str) and isinstance(v, str) for k, v in data.items()
    ):
        col.findings.append(
            Finding(
                "bad-glossary",
                Severity.ERROR,
                "glossary.yaml maps each term to its definition (text)",
                Span(src.path, 1, 1),
            )
        )
        return
    col.glossary = dict(sorted(data.items(), key=lambda kv: kv[0].lower()))
