"""Read YAML without its surprises, keeping the line and column of every key.

PyYAML's safe loader still follows YAML 1.1, where ``no`` is false, ``1e-3`` is a
string, ``2026-03-10`` is a date and a repeated key silently replaces the first.
Here the document is only *composed* by PyYAML (safe, no tags executed) and the
node tree is turned into Python values by our own rules:

- quoted scalars are strings;
- plain ``true``/``false`` are booleans and plain ``null``/``~``/empty are None;
- plain numbers follow YAML 1.2 (``1e-3`` is a float, ``0x1F`` and ``1_000`` are strings);
- everything else — ``yes``, ``no``, ``on``, dates, times — stays a string, and the
  field that wants a date or a confirmation parses it deliberately;
- a duplicate key, an alias (``*name``), a merge key (``<<``) or a tag is an error.

Every value's location is recorded by its key path so that later validation can
say ``machine.yaml:12:5: nameplate.windings[0].material: …``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import yaml

from .errors import InputError, Problem

__all__ = ["Document", "KeyPath", "load_yaml", "format_key_path", "MAX_FILE_BYTES"]

KeyPath = tuple[str | int, ...]

#: A job file is typed by hand; anything larger is a mistake or an attack.
MAX_FILE_BYTES = 2 * 1024 * 1024
MAX_DEPTH = 40

_INT_RE = re.compile(r"^[-+]?[0-9]+$")
_FLOAT_RE = re.compile(r"^[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?$")


def format_key_path(path: KeyPath) -> str:
    text = ""
    for part in path:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += ("." if text else "") + str(part)
    return text


@dataclass
class Document:
    """A parsed YAML file: its data and where each key path sits in the text."""

    path: Path
    display_name: str
    data: Any
    marks: dict[KeyPath, tuple[int, int]] = field(default_factory=dict)

    def where(self, path: KeyPath) -> tuple[int, int]:
        """Line and column (1-based) of ``path``, or of its nearest located parent."""
        probe = tuple(path)
        while probe:
            if probe in self.marks:
                return self.marks[probe]
            probe = probe[:-1]
        return self.marks.get((), (1, 1))

    def problem(self, path: KeyPath, message: str) -> Problem:
        line, column = self.where(path)
        return Problem(self.display_name, line, column, format_key_path(path), message)


class _Composer(yaml.SafeLoader):
    """Only composes nodes; construction is ours."""


def _scalar(node: yaml.ScalarNode) -> Any:
    value = node.value
    if node.style in ("'", '"', "|", ">"):
        return value
    if node.tag not in ("tag:yaml.org,2002:str", "tag:yaml.org,2002:int",
                        "tag:yaml.org,2002:float", "tag:yaml.org,2002:bool",
                        "tag:yaml.org,2002:null", "tag:yaml.org,2002:timestamp",
                        "tag:yaml.org,2002:value", "tag:yaml.org,2002:merge"):
        raise _NodeError(node, f"YAML tag {node.tag!r} is not allowed; write a plain value")
    if value in ("", "~", "null", "Null", "NULL"):
        return None
    if value in ("true", "True", "TRUE"):
        return True
    if value in ("false", "False", "FALSE"):
        return False
    if _INT_RE.match(value):
        return int(value)
    if _FLOAT_RE.match(value):
        return float(value)
    if value in (".nan", ".NaN", ".NAN", ".inf", ".Inf", ".INF", "-.inf", "-.Inf", "-.INF",
                 "+.inf"):
        raise _NodeError(node, f"'{value}' is not a finite number; write the measured value")
    return value


class _NodeError(Exception):
    def __init__(self, node: yaml.Node, message: str):
        self.node = node
        self.message = message


def _build(node: yaml.Node, path: KeyPath, marks: dict[KeyPath, tuple[int, int]],
           problems: list[tuple[yaml.Node, KeyPath, str]], depth: int,
           tagged: frozenset[tuple[int, int]] = frozenset()) -> Any:
    if depth > MAX_DEPTH:
        raise _NodeError(node, f"nesting deeper than {MAX_DEPTH} levels is not supported")
    if (node.start_mark.line, node.start_mark.column) in tagged:
        # Written by hand: a quoted or block scalar ('!!str "x"', '!x |') resolves to the
        # string tag and '!!map {}' to the mapping tag, so the node's tag alone cannot tell.
        raise _NodeError(node, f"YAML tag {node.tag!r} is not allowed; write a plain value")
    if isinstance(node, yaml.ScalarNode):
        return _scalar(node)
    if not isinstance(node, yaml.ScalarNode) and node.tag not in _PLAIN_TAGS[type(node)]:
        raise _NodeError(node, f"YAML tag {node.tag!r} is not allowed; write a plain value")
    if isinstance(node, yaml.SequenceNode):
        items = []
        for index, child in enumerate(node.value):
            marks[(*path, index)] = (child.start_mark.line + 1, child.start_mark.column + 1)
            try:
                items.append(_build(child, (*path, index), marks, problems, depth + 1,
                                    tagged))
            except _NodeError as error:
                problems.append((error.node, (*path, index), error.message))
                items.append(None)
        return items
    if isinstance(node, yaml.MappingNode):
        mapping: dict[str, Any] = {}
        first_seen: dict[str, int] = {}
        for key_node, value_node in node.value:
            if key_node.tag == "tag:yaml.org,2002:merge":
                problems.append((key_node, path, "merge keys ('<<') are not supported; "
                                 "write the fields out"))
                continue
            if not isinstance(key_node, yaml.ScalarNode):
                problems.append((key_node, path, "a key must be a plain name; write each "
                                 "entry as name: value"))
                continue
            key = str(key_node.value)
            key_path = (*path, key)
            if (key_node.start_mark.line, key_node.start_mark.column) in tagged:
                problems.append((key_node, key_path, f"YAML tag {key_node.tag!r} is not "
                                 "allowed; write a plain value"))
                continue
            if key in first_seen:
                problems.append((key_node, key_path,
                                 f"duplicate key '{key}' (first given on line "
                                 f"{first_seen[key]}); keep one of them"))
                continue
            first_seen[key] = key_node.start_mark.line + 1
            marks[key_path] = (key_node.start_mark.line + 1, key_node.start_mark.column + 1)
            try:
                mapping[key] = _build(value_node, key_path, marks, problems, depth + 1,
                                      tagged)
            except _NodeError as error:
                problems.append((error.node, key_path, error.message))
                mapping[key] = None
        return mapping
    raise _NodeError(node, "unsupported YAML node")  # pragma: no cover


# A tag on a list or mapping is as foreign to a job file as one on a scalar; scalars are
# checked in _scalar, where the implicit tags of plain values are known.
_PLAIN_TAGS: dict[type, tuple[str, ...]] = {
    yaml.SequenceNode: ("tag:yaml.org,2002:seq",),
    yaml.MappingNode: ("tag:yaml.org,2002:map",),
}


_LIBYAML = bool(getattr(yaml, "__with_libyaml__", False))


def _shared_node(root: yaml.Node) -> yaml.Node | None:
    """The first node reached twice: a composed alias shares the anchored node."""
    seen: set[int] = set()
    stack = [root]
    while stack:
        node = stack.pop()
        if id(node) in seen:
            return node
        seen.add(id(node))
        if isinstance(node, yaml.SequenceNode):
            stack.extend(node.value)
        elif isinstance(node, yaml.MappingNode):
            for key, value in node.value:
                stack.extend((key, value))
    return None


class _NoAliasComposer(_Composer):
    def compose_node(self, parent, index):  # PyYAML's own signature, untyped
        if self.check_event(yaml.AliasEvent):
            event = self.peek_event()
            raise yaml.MarkedYAMLError(
                None, None,
                "aliases ('*name') are not supported in job files; repeat the value instead",
                event.start_mark,
            )
        return super().compose_node(parent, index)


def _check_depth(text: str) -> None:
    """Refuse nesting deeper than MAX_DEPTH from the event stream, which does not recurse."""
    depth = 0
    for event in yaml.parse(text, Loader=yaml.SafeLoader):
        if isinstance(event, yaml.CollectionStartEvent):
            depth += 1
            if depth > MAX_DEPTH + 1:
                raise yaml.MarkedYAMLError(
                    None, None, f"nesting deeper than {MAX_DEPTH} levels is not supported",
                    event.start_mark)  # type: ignore[arg-type]  # the stubs' C and Python Marks
        elif isinstance(event, yaml.CollectionEndEvent):
            depth -= 1


# What to do about PyYAML's commonest complaints, in the words of someone editing the file.
_SYNTAX_HINTS: tuple[tuple[str, str], ...] = (
    ("expected <block end>", "; indent this line like the keys beside it"),
    ("did not find expected key", "; indent this line like the keys beside it"),
    ("mapping values are not allowed",
     "; a value that holds ': ' must be quoted, or a key is indented too far"),
    ("expected a single document", "; a job file holds one document: remove the '---' line"),
    ("found unexpected end of stream", "; close the quote or bracket that is still open"),
    ("expected ',' or '}'", "; close the '{' with '}' on the same entry"),
    ("expected ',' or ']'", "; close the '[' with ']' on the same entry"),
    ("could not find expected ':'", "; write each entry as key: value"),
    ("exceeded max", f"; nesting deeper than {MAX_DEPTH} levels is not supported"),
)


def _tag_marks(text: str) -> frozenset[tuple[int, int]]:
    """Where a node with a tag written in ``text`` starts (its anchor, when it has one)."""
    if "!" not in text:  # no tag can be written without one: most files are not scanned
        return frozenset()
    found: set[tuple[int, int]] = set()
    previous = None
    for token in yaml.scan(text, Loader=yaml.CSafeLoader if _LIBYAML else yaml.SafeLoader):
        if isinstance(token, yaml.TagToken):
            found.add((token.start_mark.line, token.start_mark.column))
            if isinstance(previous, yaml.AnchorToken):
                found.add((previous.start_mark.line, previous.start_mark.column))
        previous = token
    return frozenset(found)


def load_yaml(path: Path, display_name: str | None = None,
              max_bytes: int = MAX_FILE_BYTES) -> Document:
    """Parse ``path``; raise :class:`InputError` listing every problem found."""
    name = display_name or str(path)
    try:
        size = path.stat().st_size  # before reading: a huge file is refused unread
        raw = path.read_bytes() if size <= max_bytes else b""
    except FileNotFoundError:
        raise InputError.single(name, "file not found") from None
    except OSError as error:
        raise InputError.single(name, f"cannot be read: {error.strerror}") from None
    if size > max_bytes:
        raise InputError.single(
            name, f"file is {size} bytes; the limit is {max_bytes} bytes for a YAML file: "
                  "split it (one file per visit) and keep bulk data in captures"
        )
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        raise InputError.single(name, "the file is saved as UTF-16; save it as UTF-8")
    if raw.startswith(b"\xef\xbb\xbf"):
        raw = raw[3:]  # a UTF-8 byte order mark is harmless; editors on some systems add it
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        column = error.start - (raw.rfind(b"\n", 0, error.start) + 1) + 1
        raise InputError.single(
            name,
            f"byte 0x{raw[error.start]:02x} is not valid UTF-8; save the file as UTF-8",
            line, column,
        ) from None
    for number, line_text in enumerate(text.splitlines() if "\t" in text else (), start=1):
        indent = line_text[: len(line_text) - len(line_text.lstrip(" \t"))]
        if "\t" in indent:
            raise InputError.single(
                name, "a tab is used for indentation; indent with spaces", number,
                indent.index("\t") + 1,
            )
    # libyaml composes about ten times faster; the pure-Python composer is the fallback
    # where PyYAML was built without it. Either way aliases are refused below.
    loader = yaml.CSafeLoader(text) if _LIBYAML else _NoAliasComposer(text)
    try:
        if not _LIBYAML:
            _check_depth(text)  # the Python composer recurses once per level
        node = loader.get_single_node()
    except yaml.MarkedYAMLError as error:
        mark = error.problem_mark or error.context_mark
        line, column = (mark.line + 1, mark.column + 1) if mark else (1, 1)
        message = (error.problem or str(error)).strip()
        if error.context and "alias" not in message:
            message = f"{error.context.strip()}: {message}"
            started = error.context_mark
            if (started is not None and mark is not None and started.line != mark.line
                    and ("flow" in error.context or "quoted" in error.context)):
                message += f" (it starts on line {started.line + 1})"
        message += next((hint for clue, hint in _SYNTAX_HINTS if clue in message), "")
        raise InputError.single(name, f"not valid YAML: {message}", line, column) from None
    except yaml.YAMLError as error:
        raise InputError.single(name, f"not valid YAML: {error}") from None
    finally:
        loader.dispose()
    if node is not None and _shared_node(node) is not None:
        # Only on this error path: scan again to point at the alias itself, not its anchor.
        token = next(t for t in yaml.scan(text, Loader=yaml.SafeLoader)
                     if isinstance(t, yaml.AliasToken))
        raise InputError.single(
            name, "not valid YAML: aliases ('*name') are not supported in job files; repeat "
                  "the value instead", token.start_mark.line + 1, token.start_mark.column + 1)
    marks: dict[KeyPath, tuple[int, int]] = {(): (1, 1)}
    problems: list[tuple[yaml.Node, KeyPath, str]] = []
    data = None if node is None else _build(node, (), marks, problems, 0, _tag_marks(text))
    if problems:
        raise InputError([
            Problem(name, n.start_mark.line + 1, n.start_mark.column + 1,
                    format_key_path(p), message)
            for n, p, message in problems
        ])
    return Document(path=path, display_name=name, data=data, marks=marks)
