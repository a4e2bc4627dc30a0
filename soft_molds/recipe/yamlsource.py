"""Read YAML text safely into a tree of located values: recipes and every file they name.

This layer only turns bytes into a :class:`Node` tree where every value remembers its
1-based source line; what the values must be is the validation layer's business. The same
guarded reader serves a recipe and a grades table a recipe names (``material.table_file``).
It refuses, with one :class:`~soft_molds.errors.Problem` per issue: unsafe or unknown tags,
duplicate and non-text keys, runaway anchor/alias expansion, nesting deeper than
``MAX_DEPTH``, several documents in one file, and files that are too big (checked before a
byte is read), not UTF-8 or not regular files (a directory, FIFO or device is never read).

Scalars keep the YAML 1.1 implicit typing of the safe resolver (yaml.org/type/int.html,
float.html, bool.html, null.html), with these deliberate changes:

- dates and the ``=`` value key stay text: a recipe has no use for ``datetime`` values and
  they would not survive hashing as text;
- base-60 numbers (``1:00``, which YAML 1.1 reads as 60) and leading-zero octal integers
  (``010``, read as 8) are refused: nobody types a length that way on purpose;
- exponent forms without a dot or an exponent sign (``1e3``, ``2.5e-3``; YAML 1.1 reads
  them as text, YAML 1.2 as numbers) are read as numbers;
- a number written beyond the range of a double (``1e400``; about 1.8e308) or so small it
  would silently become 0 (``1e-400``) is refused rather than read as infinity or zero.
"""

from __future__ import annotations

import codecs
import math
import os
import re
import stat
from dataclasses import dataclass

import yaml
from yaml.composer import ComposerError
from yaml.nodes import MappingNode, ScalarNode, SequenceNode
from yaml.reader import ReaderError

from soft_molds.errors import Problem, RecipeError

#: Largest recipe or grades file read (bytes); recipes are a few kB.
MAX_RECIPE_BYTES: int = 256 * 1024
#: Most values a document may expand to (aliases counted at every use).
MAX_EXPANDED_NODES: int = 20_000
#: Deepest nesting of lists and mappings (aliases included). A recipe needs 7 levels (a
#: ``variants`` entry holding a list); 32 leaves room and stays far from Python's recursion
#: limit, which the composer would otherwise hit near 300 levels.
MAX_DEPTH: int = 32

_STD = "tag:yaml.org,2002:"
_SCALAR_TAGS = {_STD + t for t in ("str", "int", "float", "bool", "null")}
_MERGE_TAG = _STD + "merge"
_ALLOWED_TAGS = "no tag, or one of !!str !!int !!float !!bool !!null !!seq !!map"
_DROPPED_RESOLVERS = {_STD + "timestamp", _STD + "value"}
# YAML 1.2 core-schema float forms that YAML 1.1 leaves as text (no dot or unsigned exponent).
_EXPONENT_RE = re.compile(r"^[-+]?(?:[0-9][0-9_]*(?:\.[0-9_]*)?|\.[0-9][0-9_]*)[eE][-+]?[0-9]+$")
_OCTAL_RE = re.compile(r"^[-+]?0[0-7_]+$")


@dataclass(frozen=True)
class FileProblem(Problem):
    """A problem located in another file than the one being reported on (a grades table
    a recipe names): it prints with its own file name and line."""

    file: str = ""

    def format(self, source: str = "recipe") -> str:
        return super().format(self.file or source)


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


class _TooDeep(Exception):
    def __init__(self, line: int):
        self.line = line


class _Loader(yaml.SafeLoader):
    """Safe loader that keeps alias positions, bounds nesting and never builds Python
    objects itself."""

    yaml_implicit_resolvers = {
        first: [(tag, rx) for tag, rx in resolvers if tag not in _DROPPED_RESOLVERS]
        for first, resolvers in yaml.SafeLoader.yaml_implicit_resolvers.items()
    }
    depth = 0

    def compose_node(self, parent, index):
        event = self.peek_event()
        # The composer recurses once per level: refuse deep nesting with its line before
        # Python's recursion limit is reached (10 000 "[" would otherwise crash it).
        opens = isinstance(event, (yaml.SequenceStartEvent, yaml.MappingStartEvent))
        if opens and self.depth >= MAX_DEPTH:
            raise _TooDeep(event.start_mark.line + 1)
        self.depth += 1
        try:
            return self._compose_node(parent, index, event)
        finally:
            self.depth -= 1

    def _compose_node(self, parent, index, event):
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


_Loader.add_implicit_resolver(_STD + "float", _EXPONENT_RE, list("-+0123456789."))


class _TooBig(Exception):
    def __init__(self, problem: Problem):
        self.problem = problem


def _float_as_written(text: str, value: float) -> bool:
    """False when the text names a finite number that a double cannot hold: it overflowed
    to infinity or underflowed to zero (``.inf`` and ``.nan`` are written on purpose)."""
    if not math.isfinite(value):
        return text.lstrip("+-").lower() in (".inf", ".nan")
    if value == 0.0:
        mantissa = re.split(r"[eE]", text, maxsplit=1)[0]
        return re.search(r"[1-9]", mantissa) is None
    return True


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

    def __init__(self, loader: _Loader, what: str):
        self.loader = loader
        self.what = what
        self.problems: list[Problem] = []
        self.count = 0
        self.active: set[int] = set()  # containers on the walk path (recursive aliases)
        self.alias_stack: list[tuple[int, str]] = []  # (line, path) of aliases in use
        self.reported: set[tuple[int, str]] = set()  # aliased content is walked repeatedly

    def report(self, ynode: yaml.Node, path: str, message: str, value=None, allowed=""):
        if (id(ynode), message) not in self.reported:
            self.reported.add((id(ynode), message))
            self.problems.append(Problem(path, message, _line(ynode), value, allowed))

    def build(self, ynode: yaml.Node, path: str, key_line: int | None = None,
              depth: int = 0) -> Node:
        self.count += 1
        if self.count > MAX_EXPANDED_NODES:
            # Stop at once: an alias bomb ("billion laughs", a well-known expansion
            # attack pattern; common practice) must cost bounded time and memory.
            if self.alias_stack:
                line, where = self.alias_stack[0]
                text = f"anchors/aliases expand beyond {MAX_EXPANDED_NODES} nodes"
            else:
                line, where = _line(ynode), path
                text = f"{self.what} has more than {MAX_EXPANDED_NODES} values"
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
                inner = self.build(target, path, key_line, depth)
            finally:
                self.alias_stack.pop()
            return Node(inner.value, line, key_line)
        if isinstance(ynode, ScalarNode) and ynode.tag in _SCALAR_TAGS:
            return Node(self.scalar(ynode, path, checked=True), line, key_line)
        container = (isinstance(ynode, SequenceNode) and ynode.tag == _STD + "seq") or (
            isinstance(ynode, MappingNode) and ynode.tag == _STD + "map")
        if container:
            if depth >= MAX_DEPTH:  # only reachable through aliases nesting each other
                at, at_path = self.alias_stack[0] if self.alias_stack else (line, path)
                raise _TooBig(Problem(at_path, f"{self.what} nests more than {MAX_DEPTH} "
                                      "levels deep (through aliases)", at,
                                      allowed=f"at most {MAX_DEPTH} levels of lists and "
                                      "mappings"))
            # Containers on the current walk path are "active" so that an alias back
            # into one of them is caught at its first use, not one expansion later.
            self.active.add(id(ynode))
            try:
                if isinstance(ynode, SequenceNode):
                    value: object = [self.build(v, f"{path}[{i}]", None, depth + 1)
                                     for i, v in enumerate(ynode.value)]
                else:
                    value = self.mapping(ynode, path, depth)
            finally:
                self.active.discard(id(ynode))
            return Node(value, line, key_line)
        self.report(ynode, path, f"tag '{_show_tag(ynode.tag)}' is not allowed",
                    allowed=_ALLOWED_TAGS)
        return Node(None, line, key_line)

    def scalar(self, ynode: ScalarNode, path: str, checked: bool = False) -> object:
        """The scalar's value; with ``checked``, YAML 1.1 number forms that mislead (base
        60, leading-zero octal) and numbers beyond a double's range are refused."""
        text = ynode.value
        numeric = ynode.tag in (_STD + "int", _STD + "float")
        if checked and numeric and ":" in text:
            shown = self.scalar(ynode, path)
            self.report(ynode, path, "is a base-60 number in YAML 1.1 (it would read as "
                        f"{shown}); base-60 numbers are not accepted", text,
                        f"a decimal number; quote it ('{text}') if it is text")
            return None
        if checked and ynode.tag == _STD + "int" and _OCTAL_RE.match(text):
            shown = self.scalar(ynode, path)
            self.report(ynode, path, "is an octal number in YAML 1.1 (a leading 0; it would "
                        f"read as {shown}); leading zeros are not accepted", text,
                        f"a decimal number without leading zeros; quote it ('{text}') if it "
                        "is text")
            return None
        try:
            value = self.loader.yaml_constructors[ynode.tag](self.loader, ynode)
        except (yaml.YAMLError, ValueError, KeyError, TypeError):
            self.report(ynode, path, f"cannot read this as {_show_tag(ynode.tag)}",
                        value=text)
            return None
        if checked and isinstance(value, float) and not _float_as_written(text, value):
            self.report(ynode, path, "is beyond the range of numbers (it would read as "
                        f"{value!r})", text,
                        "a magnitude between about 2.2e-308 and 1.8e308, or 0")
            return None
        return value

    def mapping(self, ynode: MappingNode, path: str, depth: int) -> dict[str, Node]:
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
                for source in self.merge_sources(vnode, path, depth):
                    for k, v in source.items():
                        merged.setdefault(k, v)
                continue
            own[key] = self.build(vnode, _join(path, key), _line(knode), depth + 1)
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

    def merge_sources(self, vnode: yaml.Node, path: str, depth: int
                      ) -> list[dict[str, Node]]:
        before = len(self.problems)
        built = self.build(vnode, path, None, depth)
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
    return parse_yaml_text(text, source, "recipe")


def parse_yaml_text(text: str, source: str, what: str) -> Node:
    """Parse one YAML document into a located :class:`Node` tree with every limit of this
    module; ``what`` names the document in messages ("recipe", "grades table")."""
    size = len(text.encode("utf-8", "surrogatepass"))
    if size > MAX_RECIPE_BYTES:
        raise _fail(Problem("", f"{what} text is {size} bytes",
                            allowed=f"at most {MAX_RECIPE_BYTES} bytes"), source)
    body = text.removeprefix("\ufeff")
    # Checked before parsing: PyYAML refuses a tab that precedes no token, so a file of
    # blank lines with tabs would otherwise read as a syntax error rather than empty.
    if all(not ln.strip() or ln.lstrip().startswith("#") for ln in body.splitlines()):
        raise _fail(Problem("", f"{what} is empty"), source)
    loader = None
    try:
        loader = _Loader(body)  # the reader vets every character here already
        loader.get_event()  # stream start
        root = None if loader.check_event(yaml.StreamEndEvent) else loader.compose_document()
        if not loader.check_event(yaml.StreamEndEvent):
            second = loader.get_event().start_mark.line + 1
            raise _fail(Problem("", f"{what} holds more than one YAML document (the second "
                                f"starts at line {second})", second,
                                allowed="a single document"), source)
    except yaml.MarkedYAMLError as exc:
        raise _fail(_syntax_problem(exc, body), source) from None
    except ReaderError as exc:
        line = body.count("\n", 0, exc.position) + 1
        raise _fail(Problem("", f"{what} holds a character YAML does not accept "
                            f"(#x{exc.character:04x})", line), source) from None
    except _TooDeep as deep:
        raise _fail(Problem("", f"{what} nests more than {MAX_DEPTH} levels deep", deep.line,
                            allowed=f"at most {MAX_DEPTH} levels of lists and mappings"),
                    source) from None
    except RecursionError:  # not expected with MAX_DEPTH; kept as the last guard
        raise _fail(Problem("", f"{what} nests too deeply"), source) from None
    finally:
        if loader is not None:
            loader.dispose()
    if root is None or (root.tag == _STD + "null" and root.value == ""):
        raise _fail(Problem("", f"{what} is empty"), source)
    builder = _Builder(loader, what)
    try:
        node = builder.build(root, "")
    except _TooBig as big:
        raise RecipeError([*builder.problems, big.problem], source) from None
    if builder.problems:
        raise RecipeError(builder.problems, source)
    return node


def _syntax_problem(exc: yaml.MarkedYAMLError, body: str) -> Problem:
    mark = exc.problem_mark or exc.context_mark
    if mark is None:
        return Problem("", f"YAML syntax error: {exc.problem or exc.context}")
    column = f"column {mark.column + 1}"
    if "'\\t'" in (exc.problem or ""):
        # PyYAML's own words ("found character '\t' that cannot start any token") do not
        # say what to do; YAML forbids tabs for indentation (YAML 1.1 spec, 4.2.2).
        lines = body.splitlines()
        text = lines[mark.line] if mark.line < len(lines) else ""
        if not text[:mark.column].strip():
            return Problem("", f"YAML syntax error: a tab in the indentation ({column}); "
                           "indent with spaces", mark.line + 1)
        return Problem("", f"YAML syntax error: a tab character ({column}); YAML separates "
                       "with spaces here", mark.line + 1)
    return Problem("", f"YAML syntax error: {exc.problem or exc.context} ({column})",
                   mark.line + 1)


class UnreadableFile(RecipeError):
    """A file could not be read at all (missing, not a regular file, too big, an I/O
    error): its one problem has no line in that file."""


def read_recipe_file(path: str | os.PathLike) -> tuple[Node, str]:
    """Read and parse a recipe file; returns ``(root node, source label)``.

    The label is the path as given. See :func:`read_yaml_file` for the guards.
    """
    return read_yaml_file(path, "recipe")


def read_yaml_file(path: str | os.PathLike, what: str) -> tuple[Node, str]:
    """Read and parse any YAML file a recipe stands for or names; ``(root node, label)``.

    Only a regular file is read (a directory, FIFO, socket or device is refused before it
    is opened, and again on the opened descriptor, so a swapped path cannot slip through);
    the size is checked before any byte is read and at most ``MAX_RECIPE_BYTES + 1`` bytes
    are ever read (a file may grow meanwhile). Raises :class:`UnreadableFile` when the file
    cannot be read and :class:`RecipeError` for problems in its text.
    """
    text, label = read_text_file(path, what)
    return parse_yaml_text(text, label, what), label


_KINDS = ((stat.S_ISFIFO, "a named pipe (FIFO)"), (stat.S_ISCHR, "a character device"),
          (stat.S_ISBLK, "a block device"), (stat.S_ISSOCK, "a socket"))


def _not_regular(mode: int, what: str, label: str) -> UnreadableFile | None:
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return _unreadable(f"{what} path is a directory, not a file", label)
    kind = next((name for test, name in _KINDS if test(mode)), "a special file")
    return _unreadable(f"{what} path is {kind}, not a regular file", label)


def _unreadable(message: str, label: str, allowed: str = "") -> UnreadableFile:
    value = None if allowed else label
    return UnreadableFile([Problem("", message, None, value, allowed)], label)


def read_text_file(path: str | os.PathLike, what: str) -> tuple[str, str]:
    """The UTF-8 text of a regular file of at most ``MAX_RECIPE_BYTES`` (a leading BOM
    dropped) and its label (the path as given); see :func:`read_yaml_file`."""
    label = os.fsdecode(path)
    limit = f"at most {MAX_RECIPE_BYTES} bytes"
    try:
        refused = _not_regular(os.stat(path).st_mode, what, label)
        if refused is not None:  # never open a FIFO (blocks) or a device (endless)
            raise refused
        # O_NONBLOCK: should the path become a FIFO after the stat, opening it cannot hang.
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0)
                     | getattr(os, "O_BINARY", 0))
    except (FileNotFoundError, NotADirectoryError):
        raise _unreadable(f"{what} file not found", label) from None
    except OSError as exc:
        raise _unreadable(f"{what} file cannot be opened: {exc.strerror}", label) from None
    try:
        with os.fdopen(fd, "rb") as fh:
            info = os.fstat(fh.fileno())
            refused = _not_regular(info.st_mode, what, label)
            if refused is not None:
                raise refused
            if info.st_size > MAX_RECIPE_BYTES:
                raise _unreadable(f"{what} file is {info.st_size} bytes", label, limit)
            data = fh.read(MAX_RECIPE_BYTES + 1)
    except OSError as exc:
        raise _unreadable(f"{what} file cannot be read: {exc.strerror}", label) from None
    if len(data) > MAX_RECIPE_BYTES:
        raise _unreadable(f"{what} file is more than {MAX_RECIPE_BYTES} bytes", label, limit)
    skip = len(codecs.BOM_UTF8) if data.startswith(codecs.BOM_UTF8) else 0
    try:
        return data[skip:].decode("utf-8"), label
    except UnicodeDecodeError as exc:
        offset = exc.start + skip
        raise _fail(Problem("", f"{what} file is not valid UTF-8: byte 0x{data[offset]:02x} "
                            f"at offset {offset}", data.count(b"\n", 0, offset) + 1,
                            allowed="UTF-8 text"), label) from None
