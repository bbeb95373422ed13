"""Safe YAML loading with line numbers, for files people write (knowledge, set profiles).

Only plain data is built: mappings, sequences, strings, numbers, booleans and null. Tags
that would construct objects are rejected, aliases are refused (they let a small file expand
without bound), nesting depth and file size are capped. Every mapping comes back as a
:class:`LineDict` that knows the line of each key, so errors can name ``file:line``.
PyYAML's C parser is used where it is installed.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any, NoReturn

import yaml

from faultwise.core.errors import FaultwiseError

try:  # the C parser is about ten times faster
    from yaml import CSafeLoader as _BaseLoader
except ImportError:  # pragma: no cover - depends on the PyYAML build
    from yaml import SafeLoader as _BaseLoader  # type: ignore[assignment]

MAX_BYTES = 4 * 1024 * 1024
MAX_DEPTH = 40


class LineDict(dict):
    """A dict that remembers the 1-based line of itself and of each key."""

    line: int = 0
    key_lines: dict

    def line_of(self, key: object) -> int:
        return getattr(self, "key_lines", {}).get(key, self.line)


class LineList(list):
    """A list that remembers its own line and the line of each item."""

    line: int = 0
    item_lines: list

    def line_of(self, index: int) -> int:
        lines = getattr(self, "item_lines", [])
        return lines[index] if 0 <= index < len(lines) else self.line


def line_of(container: object, key: object) -> int | None:
    """Line of ``key`` inside a loaded mapping or sequence, or None when unknown."""
    if isinstance(container, (LineDict, LineList)):
        return container.line_of(key) or None
    return None


class _Loader(_BaseLoader):
    """Safe loader: plain data only, no aliases, bounded depth, line numbers kept."""

    def __init__(self, stream: str | bytes, source: str) -> None:
        super().__init__(stream)
        self._source = source
        self._text = stream if isinstance(stream, str) else None
        self._depth = 0

    def construct_object(self, node: yaml.Node, deep: bool = False) -> Any:
        if node in self.constructed_objects:
            raise FaultwiseError("YAML aliases (*name) are not accepted", file=self._source,
                                 line=self._first_alias_line() or node.start_mark.line + 1,
                                 hint="write the value out in full")
        self._depth += 1
        try:
            if self._depth > MAX_DEPTH:
                raise FaultwiseError(f"nesting deeper than {MAX_DEPTH} levels", file=self._source,
                                     line=node.start_mark.line + 1, hint="flatten the file")
            return super().construct_object(node, deep=True)
        finally:
            self._depth -= 1

    def _first_alias_line(self) -> int | None:
        """Line of the first alias (*name) in the text, where a value is reused.

        The composer (in C for CSafeLoader) hands back the anchored node itself for an
        alias, so the node knows only the anchor's line; the parser's events carry the
        alias's own. So the text is parsed again, only on this refusal, up to the first
        AliasEvent. Construction runs in document order, so that is the reuse refused
        (a merge key can construct a later one first; the line is still an alias's).
        """
        if self._text is None:
            return None
        try:
            for event in yaml.parse(self._text, Loader=_BaseLoader):
                if isinstance(event, yaml.AliasEvent):
                    return event.start_mark.line + 1
        except yaml.YAMLError:
            return None
        return None

    def construct_line_mapping(self, node: yaml.Node) -> LineDict:
        if not isinstance(node, yaml.MappingNode):  # pragma: no cover - guarded by the tag
            raise FaultwiseError("expected a mapping", file=self._source,
                                 line=node.start_mark.line + 1)
        self.flatten_mapping(node)
        out = LineDict()
        out.line = node.start_mark.line + 1
        out.key_lines = {}
        for key_node, value_node in node.value:
            key = self.construct_object(key_node, deep=True)
            if not isinstance(key, (str, int, float, bool)) and key is not None:
                raise FaultwiseError("a mapping key must be plain text", file=self._source,
                                     line=key_node.start_mark.line + 1)
            if key in out:
                raise FaultwiseError(f"key '{key}' appears twice", file=self._source,
                                     line=key_node.start_mark.line + 1, key=str(key),
                                     hint="keep one of them")
            out[key] = self.construct_object(value_node, deep=True)
            out.key_lines[key] = key_node.start_mark.line + 1
        return out

    def construct_line_sequence(self, node: yaml.SequenceNode) -> LineList:
        out = LineList(self.construct_object(child, deep=True) for child in node.value)
        out.line = node.start_mark.line + 1
        out.item_lines = [child.start_mark.line + 1 for child in node.value]
        return out

    def construct_unknown(self, node: yaml.Node) -> NoReturn:
        raise FaultwiseError(f"the YAML tag '{node.tag}' is not accepted", file=self._source,
                             line=node.start_mark.line + 1,
                             hint="write plain values only (no !tags)")


_Loader.add_constructor("tag:yaml.org,2002:map", _Loader.construct_line_mapping)
_Loader.add_constructor("tag:yaml.org,2002:seq", _Loader.construct_line_sequence)
_Loader.add_constructor("tag:yaml.org,2002:set", _Loader.construct_unknown)
_Loader.add_constructor("tag:yaml.org,2002:omap", _Loader.construct_unknown)
_Loader.add_constructor("tag:yaml.org,2002:pairs", _Loader.construct_unknown)
_Loader.add_constructor("tag:yaml.org,2002:binary", _Loader.construct_unknown)
_Loader.add_constructor(None, _Loader.construct_unknown)


def _timestamp_as_text(loader: _Loader, node: yaml.ScalarNode) -> str:
    return loader.construct_scalar(node)


# Dates stay text (a profile or graph never needs a datetime object).
_Loader.add_constructor("tag:yaml.org,2002:timestamp", _timestamp_as_text)


def load_yaml_text(text: str, source: str = "<text>") -> Any:
    """Parse YAML text into plain data with line numbers; raise FaultwiseError located."""
    if len(text) > MAX_BYTES:
        raise FaultwiseError(f"file larger than {MAX_BYTES // (1024 * 1024)} MB", file=source,
                             hint="split it or check that it is the right file")
    loader = _Loader(text, source)
    try:
        return loader.get_single_data()
    except FaultwiseError:
        raise
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark is not None else None
        what = exc.problem or exc.context or "YAML syntax error"
        raise FaultwiseError(f"YAML syntax error: {what}", file=source, line=line,
                             hint="fix the indentation or quoting at that line") from None
    except yaml.YAMLError as exc:
        raise FaultwiseError(f"YAML error: {exc}", file=source) from None
    except RecursionError:
        raise FaultwiseError("nesting too deep", file=source, hint="flatten the file") from None
    finally:
        loader.dispose()


def load_yaml_file(path: str | Path) -> Any:
    """Read and parse one YAML file people wrote; every problem is a located FaultwiseError."""
    path = Path(path)
    source = str(path)
    try:
        size = path.stat().st_size
    except FileNotFoundError:
        raise FaultwiseError("file not found", file=source, hint="check the path") from None
    except OSError as exc:
        raise FaultwiseError(f"cannot read the file ({exc.strerror})", file=source) from None
    if not path.is_file():
        raise FaultwiseError("not a file", file=source, hint="name a YAML file")
    if size > MAX_BYTES:
        raise FaultwiseError(f"file larger than {MAX_BYTES // (1024 * 1024)} MB", file=source,
                             hint="split it or check that it is the right file")
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise FaultwiseError(f"cannot read the file ({exc.strerror})", file=source) from None
    if b"\x00" in raw:
        raise FaultwiseError("binary data, not YAML text", file=source,
                             hint="check that it is the right file")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise FaultwiseError("not UTF-8 text", file=source, line=line,
                             hint="save the file as UTF-8") from None
    return load_yaml_text(text, source)
