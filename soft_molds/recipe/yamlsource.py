"""Read recipe text safely into a tree of located values.

This layer only turns bytes into a :class:`Node` tree where every value remembers its
1-based source line; what the values must be is the validation layer's business. It
refuses, with one :class:`~soft_molds.errors.Problem` per issue: unsafe or unknown tags,
duplicate and non-text keys, runaway anchor/alias expansion, several documents in one
file, and files that are too big, not UTF-8 or not files at all.

Scalars keep the YAML 1.1 implicit typing of the safe resolver (yaml.org/type/int.html,
float.html, bool.html, null.html), except that dates and the ``=`` value key stay text:
a recipe has no use for ``datetime`` values and they would not survive hashing as text.
"""

from __future__ import annotations

import codecs
import os
import stat
from dataclasses import dataclass

import yaml
from yaml.composer import ComposerError
from yaml.nodes import MappingNode, ScalarNode, SequenceNode
from yaml.reader import ReaderError

from soft_molds.errors import Problem, RecipeError

MAX_RECIPE_BYTES: int = 256 * 1024
MAX_EXPANDED_NODES: int = 20_000

_STD = "tag:yaml.org,2002:"
_SCALAR_TAGS = {_STD + t for t in ("str", "int", "float", "bool", "null")}
_MERGE_TAG = _STD + "merge"
_ALLOWED_TAGS = "no tag, or one of !!str !!int !!float !!bool !!null !!seq !!map"
_DROPPED_RESOLVERS = {_STD + "timestamp", _STD + "value"}


@dataclass(frozen=True)
class Node:
    """A YAML value with its 1-based source line.

    ``value`` is ``dict[str, Node]``, ``list[Node]`` or a typed scalar (str, int, float,
    bool, None). ``key_line`` is set on a mapping entry's value: the line of its key,
    which is where a message about that field should point.
    """

    value: object
    line: int
    key_line: int | None = None

    def plain(self) -> object:
        """The same data as plain dicts, lists and scalars (no line information)."""
        if isinstance(self.value, dict):
            return {k: v.plain() for k, v in self.value.items()}
        if isinstance(self.value, list):
            return [v.plain() for v in self.value]
        return self.value


class _AliasRef(yaml.Node):
    """Stands where an alias was written, so its own line survives composition."""

    id = "alias"

    def __init__(self, anchor: str, target: yaml.Node, start_mark, end_mark):
        super().__init__(target.tag, target, start_mark, end_mark)
        self.anchor = anchor


class _Loader(yaml.SafeLoader):
    """Safe loader that keeps alias positions and never builds Python objects itself."""

    yaml_implicit_resolvers = {
        first: [(tag, rx) for tag, rx in resolvers if tag not in _DROPPED_RESOLVERS]
        for first, resolvers in yaml.SafeLoader.yaml_implicit_resolvers.items()
    }

    def compose_node(self, parent, index):
        event = self.peek_event()
        if isinstance(event, yaml.AliasEvent):
            self.get_event()
            if event.anchor not in self.anchors:
                raise ComposerError(
                    None, None, f"alias '*{event.anchor}' has no anchor before it",
                    event.start_mark)
            return _AliasRef(event.anchor, self.anchors[event.anchor],
                             event.start_mark, event.end_mark)
        if event.anchor is not None and event.anchor in self.anchors:
            first = self.anchors[event.anchor].start_mark.line + 1
            raise ComposerError(
                None, None, f"anchor '&{event.anchor}' is defined twice (first at line {first})",
                event.start_mark)
        return super().compose_node(parent, index)


class _TooBig(Exception):
    def __init__(self, problem: Problem):
        self.problem = problem


def _line(ynode: yaml.Node) -> int:
    return ynode.start_mark.line + 1


def _deref(ynode: yaml.Node) -> yaml.Node:
    while isinstance(ynode, _AliasRef):
        ynode = ynode.value
    return ynode


def _show_tag(tag: str) -> str:
    return "!!" + tag[len(_STD):] if tag.startswith(_STD) else tag


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


class _Builder:
    """Walks composed YAML nodes into :class:`Node`, counting every expanded value."""

    def __init__(self, loader: _Loader):
        self.loader = loader
        self.problems: list[Problem] = []
        self.count = 0
        self.active: set[int] = set()  # containers on the walk path (recursive aliases)
        self.alias_stack: list[tuple[int, str]] = []  # (line, path) of aliases in use
        self.reported: set[tuple[int, str]] = set()  # aliased content is walked repeatedly

    def report(self, ynode: yaml.Node, path: str, message: str, value=None, allowed=""):
        if (id(ynode), message) not in self.reported:
            self.reported.add((id(ynode), message))
            self.problems.append(Problem(path, message, _line(ynode), value, allowed))

    def build(self, ynode: yaml.Node, path: str, key_line: int | None = None) -> Node:
        self.count += 1
        if self.count > MAX_EXPANDED_NODES:
            # Stop at once: an alias bomb ("billion laughs", a well-known expansion
            # attack pattern; common practice) must cost bounded time and memory.
            if self.alias_stack:
                line, where = self.alias_stack[0]
                text = f"anchors/aliases expand beyond {MAX_EXPANDED_NODES} nodes"
            else:
                line, where = _line(ynode), path
                text = f"recipe has more than {MAX_EXPANDED_NODES} values"
            raise _TooBig(Problem(where, text, line))
        line = _line(ynode)
        if isinstance(ynode, _AliasRef):
            target = ynode.value
            if id(target) in self.active:
                self.report(ynode, path, f"alias '*{ynode.anchor}' is used inside its own "
                            "anchor (recursive alias)")
                return Node(None, line, key_line)
            self.alias_stack.append((line, path))
            try:
                inner = self.build(target, path, key_line)
            finally:
                self.alias_stack.pop()
            return Node(inner.value, line, key_line)
        if isinstance(ynode, ScalarNode) and ynode.tag in _SCALAR_TAGS:
            return Node(self.scalar(ynode, path), line, key_line)
        container = (isinstance(ynode, SequenceNode) and ynode.tag == _STD + "seq") or (
            isinstance(ynode, MappingNode) and ynode.tag == _STD + "map")
        if container:
            # Containers on the current walk path are "active" so that an alias back
            # into one of them is caught at its first use, not one expansion later.
            self.active.add(id(ynode))
            try:
                if isinstance(ynode, SequenceNode):
                    value: object = [self.build(v, f"{path}[{i}]")
                                     for i, v in enumerate(ynode.value)]
                else:
                    value = self.mapping(ynode, path)
            finally:
                self.active.discard(id(ynode))
            return Node(value, line, key_line)
        self.report(ynode, path, f"tag '{_show_tag(ynode.tag)}' is not allowed",
                    allowed=_ALLOWED_TAGS)
        return Node(None, line, key_line)

    def scalar(self, ynode: ScalarNode, path: str) -> object:
        try:
            return self.loader.yaml_constructors[ynode.tag](self.loader, ynode)
        except (yaml.YAMLError, ValueError, KeyError, TypeError):
            self.report(ynode, path, f"cannot read this as {_show_tag(ynode.tag)}",
                        value=ynode.value)
            return None

    def mapping(self, ynode: MappingNode, path: str) -> dict[str, Node]:
        merged: dict[str, Node] = {}
        own: dict[str, Node] = {}
        first_line: dict[str, int] = {}
        for knode, vnode in ynode.value:
            is_merge = isinstance(_deref(knode), ScalarNode) and _deref(knode).tag == _MERGE_TAG
            key = "<<" if is_merge else self.key(knode, path)
            if key is None:
                continue
            if key in first_line:
                self.report(knode, _join(path, key),
                            f"duplicate key '{key}' (first at line {first_line[key]})")
                continue
            first_line[key] = _line(knode)
            if is_merge:
                # YAML 1.1 merge key (yaml.org/type/merge.html): explicit keys win, and
                # earlier mappings in a merged list win over later ones.
                for source in self.merge_sources(vnode, path):
                    for k, v in source.items():
                        merged.setdefault(k, v)
                continue
            own[key] = self.build(vnode, _join(path, key), _line(knode))
        return {**merged, **own}

    def key(self, knode: yaml.Node, path: str) -> str | None:
        target = _deref(knode)
        if isinstance(target, ScalarNode):
            if target.tag == _STD + "str":
                return target.value
            if target.tag in _SCALAR_TAGS:
                self.report(knode, path, "mapping key must be text",
                            value=self.scalar(target, path),
                            allowed="a text key (quote keys such as 'on', 'no', '1')")
                return None
            self.report(knode, path, f"tag '{_show_tag(target.tag)}' is not allowed",
                        allowed=_ALLOWED_TAGS)
            return None
        kind = "a list" if isinstance(target, SequenceNode) else "a mapping"
        self.report(knode, path, "mapping key must be text", value=kind)
        return None

    def merge_sources(self, vnode: yaml.Node, path: str) -> list[dict[str, Node]]:
        before = len(self.problems)
        built = self.build(vnode, path)
        if len(self.problems) > before:  # already explained (bad tag, recursive alias)
            return []
        if isinstance(built.value, dict):
            return [built.value]
        if isinstance(built.value, list) and all(isinstance(n.value, dict) for n in built.value):
            return [n.value for n in built.value]
        self.report(vnode, path, "merge key '<<' needs a mapping or a list of mappings")
        return []


def _fail(problem: Problem, source: str) -> RecipeError:
    return RecipeError([problem], source)


def parse_recipe_text(text: str, source: str = "recipe") -> Node:
    """Parse one YAML document of recipe text into a located :class:`Node` tree.

    ``source`` labels the text in error messages. Raises :class:`RecipeError` listing
    every problem found; the top-level type is not checked here.
    """
    size = len(text.encode("utf-8", "surrogatepass"))
    if size > MAX_RECIPE_BYTES:
        raise _fail(Problem("", f"recipe text is {size} bytes",
                            allowed=f"at most {MAX_RECIPE_BYTES} bytes"), source)
    body = text.removeprefix("\ufeff")
    # Checked before parsing: PyYAML refuses a tab that precedes no token, so a file of
    # blank lines with tabs would otherwise read as a syntax error rather than empty.
    if all(not ln.strip() or ln.lstrip().startswith("#") for ln in body.splitlines()):
        raise _fail(Problem("", "recipe is empty"), source)
    loader = None
    try:
        loader = _Loader(body)  # the reader vets every character here already
        loader.get_event()  # stream start
        root = None if loader.check_event(yaml.StreamEndEvent) else loader.compose_document()
        if not loader.check_event(yaml.StreamEndEvent):
            second = loader.get_event().start_mark.line + 1
            raise _fail(Problem("", f"recipe holds more than one YAML document (the second "
                                f"starts at line {second})", second,
                                allowed="a single document"), source)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        where = f" (column {mark.column + 1})" if mark else ""
        raise _fail(Problem("", f"YAML syntax error: {exc.problem or exc.context}{where}",
                            mark.line + 1 if mark else None), source) from None
    except ReaderError as exc:
        line = body.count("\n", 0, exc.position) + 1
        raise _fail(Problem("", f"recipe holds a character YAML does not accept "
                            f"(#x{exc.character:04x})", line), source) from None
    except RecursionError:
        raise _fail(Problem("", "recipe nests too deeply"), source) from None
    finally:
        if loader is not None:
            loader.dispose()
    if root is None or (root.tag == _STD + "null" and root.value == ""):
        raise _fail(Problem("", "recipe is empty"), source)
    builder = _Builder(loader)
    try:
        node = builder.build(root, "")
    except _TooBig as big:
        raise RecipeError([*builder.problems, big.problem], source) from None
    except RecursionError:  # a chain of aliases, each nesting the previous one
        raise _fail(Problem("", "recipe nests too deeply (through aliases)"), source) from None
    if builder.problems:
        raise RecipeError(builder.problems, source)
    return node


def read_recipe_file(path: str | os.PathLike) -> tuple[Node, str]:
    """Read and parse a recipe file; returns ``(root node, source label)``.

    The label is the path as given. The size is checked before any byte is read, and at
    most ``MAX_RECIPE_BYTES + 1`` bytes are ever read (a file may grow meanwhile).
    """
    label = os.fsdecode(path)
    try:
        info = os.stat(path)
    except (FileNotFoundError, NotADirectoryError):
        raise _fail(Problem("", "recipe file not found", value=label), label) from None
    except OSError as exc:
        raise _fail(Problem("", f"recipe file cannot be opened: {exc.strerror}",
                            value=label), label) from None
    if stat.S_ISDIR(info.st_mode):
        raise _fail(Problem("", "recipe path is a directory, not a file", value=label), label)
    if not stat.S_ISREG(info.st_mode):
        raise _fail(Problem("", "recipe path is not a regular file", value=label), label)
    limit = f"at most {MAX_RECIPE_BYTES} bytes"
    if info.st_size > MAX_RECIPE_BYTES:
        raise _fail(Problem("", f"recipe file is {info.st_size} bytes", allowed=limit), label)
    try:
        with open(path, "rb") as fh:
            data = fh.read(MAX_RECIPE_BYTES + 1)
    except OSError as exc:
        raise _fail(Problem("", f"recipe file cannot be read: {exc.strerror}",
                            value=label), label) from None
    if len(data) > MAX_RECIPE_BYTES:
        raise _fail(Problem("", f"recipe file is more than {MAX_RECIPE_BYTES} bytes",
                            allowed=limit), label)
    skip = len(codecs.BOM_UTF8) if data.startswith(codecs.BOM_UTF8) else 0
    try:
        text = data[skip:].decode("utf-8")
    except UnicodeDecodeError as exc:
        offset = exc.start + skip
        raise _fail(Problem("", f"recipe file is not valid UTF-8: byte 0x{data[offset]:02x} "
                            f"at offset {offset}", data.count(b"\n", 0, offset) + 1,
                            allowed="UTF-8 text"), label) from None
    return parse_recipe_text(text, label), label
