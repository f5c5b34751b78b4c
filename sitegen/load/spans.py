"""YAML text -> plain data plus a map from key path to position.

PyYAML's composer gives every node a start mark; we walk the node tree
ourselves so that each value's position is kept, duplicate keys are
caught (PyYAML silently keeps the last one) and aliases are refused
(an anchor/alias "bomb" can expand a small file into gigabytes).

Speed: where PyYAML was built with libyaml, its C parser supplies the
events (scanning and parsing are most of the time) and the same Python
composer builds the nodes, so positions and checks are the same. A
document the C parser refuses, or whose checks fail, is parsed again by
the pure-Python parser, so every message and position a user sees comes
from one parser (tests/load/test_spans.py holds the two to the same
results).
"""

from __future__ import annotations

__all__ = ["KeyPath", "Parsed", "YamlProblem", "parse_yaml"]

from dataclasses import dataclass, field

import yaml
from yaml.composer import Composer
from yaml.constructor import SafeConstructor
from yaml.events import AliasEvent
from yaml.nodes import MappingNode, Node, ScalarNode, SequenceNode
from yaml.parser import Parser
from yaml.reader import Reader
from yaml.resolver import Resolver
from yaml.scanner import Scanner

KeyPath = tuple[str | int, ...]


@dataclass(frozen=True)
class YamlProblem(Exception):
    """A problem in the YAML itself: rule id, message, 1-based position."""

    rule: str
    message: str
    line: int
    col: int


@dataclass
class Parsed:
    """The document as plain data, with positions.

    Attributes:
        data: dicts, lists and scalars.
        values: key path -> (line, col) of the value node.
        keys: key path -> (line, col) of the mapping key (for unknown keys).
    """

    data: object
    values: dict[KeyPath, tuple[int, int]] = field(default_factory=dict)
    keys: dict[KeyPath, tuple[int, int]] = field(default_factory=dict)

    def position(self, path: KeyPath) -> tuple[int, int]:
        """Best position for a key path: the value, else the key, else the
        nearest enclosing value."""
        for p in (path[:i] for i in range(len(path), -1, -1)):
            if p in self.values:
                return self.values[p]
        return (1, 1)

    def key_position(self, path: KeyPath) -> tuple[int, int]:
        return self.keys.get(path) or self.position(path)


class _NoAliasComposer(Composer):
    def compose_node(self, parent: Node | None, index: object) -> Node:  # type: ignore[override]
        if self.check_event(AliasEvent):
            event = self.peek_event()
            mark = event.start_mark
            raise YamlProblem(
                "yaml-alias",
                "YAML aliases (*name) are not allowed in records; write the value out",
                mark.line + 1,
                mark.column + 1,
            )
        return super().compose_node(parent, index)  # type: ignore[no-any-return]


class _Loader(Reader, Scanner, Parser, _NoAliasComposer, SafeConstructor, Resolver):
    def __init__(self, stream: str) -> None:
        Reader.__init__(self, stream)
        Scanner.__init__(self)
        Parser.__init__(self)
        _NoAliasComposer.__init__(self)
        SafeConstructor.__init__(self)
        Resolver.__init__(self)


_FastLoader: type | None = None
if getattr(yaml, "__with_libyaml__", False):
    from yaml._yaml import CParser

    class _CLoader(_NoAliasComposer, CParser, SafeConstructor, Resolver):  # type: ignore[misc]
        # the Python composer first in the MRO: CParser's own composer
        # would resolve aliases silently
        def __init__(self, stream: str) -> None:
            CParser.__init__(self, stream)
            _NoAliasComposer.__init__(self)
            SafeConstructor.__init__(self)
            Resolver.__init__(self)

    _FastLoader = _CLoader


# Dates stay dates, but YAML 1.1's "yes/no/on/off" booleans are a trap in
# free text; keep the resolver's defaults otherwise.
_MAX_DEPTH = 40


def parse_yaml(text: str) -> Parsed:
    """Parse one YAML document into plain data with positions.

    Raises:
        YamlProblem: malformed YAML, duplicate keys, aliases, more than one
            document, non-string keys or nesting deeper than is sane.
    """
    # the pure-Python reader's character check, which libyaml's differs from
    if _FastLoader is not None and not Reader.NON_PRINTABLE.search(text):
        try:
            return _parse_with(_FastLoader, text)
        except (yaml.YAMLError, YamlProblem):
            pass  # said again below, by the parser whose messages we keep
    return _parse_with(_Loader, text)


def _parse_with(loader_class: type, text: str) -> Parsed:
    try:
        loader = loader_class(text)
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        pos = getattr(exc, "position", None)
        line, col = (mark.line + 1, mark.column + 1) if mark else _offset_pos(text, pos)
        raise YamlProblem("yaml-syntax", f"malformed YAML: {_reason(exc)}", line, col) from None
    try:
        try:
            node = loader.get_single_node()
        except yaml.composer.ComposerError as exc:
            mark = exc.problem_mark or exc.context_mark
            raise YamlProblem(
                "yaml-syntax",
                "a record file holds exactly one YAML document",
                (mark.line + 1) if mark else 1,
                (mark.column + 1) if mark else 1,
            ) from None
        except yaml.MarkedYAMLError as exc:
            mark = exc.problem_mark or exc.context_mark
            msg = (exc.problem or exc.context or "malformed YAML").strip()
            raise YamlProblem(
                "yaml-syntax",
                f"malformed YAML: {msg}",
                (mark.line + 1) if mark else 1,
                (mark.column + 1) if mark else 1,
            ) from None
        except yaml.YAMLError as exc:
            pos = getattr(exc, "position", None)
            line, col = _offset_pos(text, pos)
            raise YamlProblem("yaml-syntax", f"malformed YAML: {_reason(exc)}", line, col) from None
    finally:
        loader.dispose()
    if node is None:
        raise YamlProblem("yaml-empty", "file is empty; a record is a YAML mapping", 1, 1)
    parsed = Parsed(data=None)
    parsed.data = _walk(node, (), parsed, loader, 0)
    return parsed


def _offset_pos(text: str, offset: int | None) -> tuple[int, int]:
    if offset is None:
        return (1, 1)
    before = text[:offset]
    return (before.count("\n") + 1, offset - (before.rfind("\n") + 1) + 1)


def _reason(exc: Exception) -> str:
    if isinstance(exc, yaml.reader.ReaderError):
        ch = exc.character if isinstance(exc.character, str) else chr(exc.character)
        return f"control character U+{ord(ch):04X} is not allowed in YAML text"
    return str(getattr(exc, "problem", None) or exc).strip()


#: Tags a record may use: the plain scalars. Anything else (!!binary,
#: !!python/..., custom tags) is refused rather than silently converted.
_ALLOWED_TAGS = frozenset(
    f"tag:yaml.org,2002:{t}" for t in ("str", "int", "float", "bool", "null", "timestamp")
)


def _pos(node: Node) -> tuple[int, int]:
    return (node.start_mark.line + 1, node.start_mark.column + 1)


def _walk(node: Node, path: KeyPath, out: Parsed, loader: SafeConstructor, depth: int) -> object:
    if depth > _MAX_DEPTH:
        line, col = _pos(node)
        raise YamlProblem("yaml-too-deep", f"nesting deeper than {_MAX_DEPTH} levels", line, col)
    out.values[path] = _pos(node)
    if isinstance(node, MappingNode):
        result: dict[str, object] = {}
        for key_node, value_node in node.value:
            if not isinstance(key_node, ScalarNode):
                line, col = _pos(key_node)
                raise YamlProblem("yaml-key", "mapping keys must be plain words", line, col)
            key = key_node.value
            if key == "<<":
                line, col = _pos(key_node)
                raise YamlProblem(
                    "yaml-alias", "YAML merge keys (<<) are not allowed in records", line, col
                )
            if key in result:
                line, col = _pos(key_node)
                first = out.keys[(*path, key)]
                raise YamlProblem(
                    "duplicate-key",
                    f"key {key!r} appears twice (first at line {first[0]}); the second would"
                    " silently replace the first",
                    line,
                    col,
                )
            out.keys[(*path, key)] = _pos(key_node)
            result[key] = _walk(value_node, (*path, key), out, loader, depth + 1)
        return result
    if isinstance(node, SequenceNode):
        return [_walk(v, (*path, i), out, loader, depth + 1) for i, v in enumerate(node.value)]
    assert isinstance(node, ScalarNode)
    if node.tag not in _ALLOWED_TAGS:
        line, col = _pos(node)
        raise YamlProblem(
            "yaml-tag",
            f"YAML tag {node.tag!r} is not allowed in records; write plain text",
            line,
            col,
        )
    try:
        value = loader.construct_object(node, deep=True)
    except yaml.constructor.ConstructorError as exc:
        line, col = _pos(node)
        raise YamlProblem("bad-value", f"bad value: {exc.problem}", line, col) from None
    except (ValueError, OverflowError) as exc:
        # e.g. 2026-02-30 (no such day) or an integer too long to convert
        line, col = _pos(node)
        where = ".".join(str(p) for p in path) or "value"
        if node.tag.endswith("timestamp"):
            why = f"{node.value!r} is not a valid date or time ({exc})"
        else:
            why = f"a number of {len(node.value)} characters is not a sensible value"
        raise YamlProblem("bad-value", f"{where}: {why}", line, col) from None
    return value
