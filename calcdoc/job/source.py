"""Safe YAML reading that keeps the line and column of every key and value (the only place PyYAML is used).

Only plain data is built (no object construction, PyYAML's safe resolver); the file size, the
nesting depth and the number of nodes after alias expansion are bounded, so a crafted file (an
"alias bomb" or a recursive anchor) is refused with a message instead of exhausting memory.
"""
from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass
from typing import Any, NoReturn

from ..errors import JobError, Problem

MAX_BYTES = 1_000_000
MAX_NODES = 100_000
MAX_DEPTH = 40
MAX_ITEMS = 1_000        # entries of one list or mapping
MAX_SCALAR = 20_000      # characters of one value or key (the readers cap texts lower still)


@dataclass
class Node:
    """A YAML value with where it stands in the file.

    ``value`` is a dict of str → Node for a mapping, a list of Node for a sequence, or a plain
    Python scalar (str, int, float, bool, None, date). ``key_line``/``key_col`` locate the key that
    introduced this value (0 at the top), ``line``/``col`` the value itself (1-based).
    """

    value: Any
    line: int
    col: int
    path: str
    key_line: int = 0
    key_col: int = 0
    kind: str = "scalar"   # scalar, map or seq
    tag: str = ""
    span: tuple[int, int] = (0, 0)   # character offsets of the value in the text
    key_start: int = -1              # character offset of the key that introduced it
    flow: bool = False               # written in flow style ({...} or [...])

    @property
    def where(self) -> tuple[int, int]:
        """Line and column of the key that introduced the value, else of the value."""
        return (self.key_line, self.key_col) if self.key_line else (self.line, self.col)


def decode(data: bytes, name: str) -> str:
    """The job file's text; refuse files that are too big or not UTF-8."""
    if len(data) > MAX_BYTES:
        raise JobError([Problem(name, 0, 0, "", f"the file is larger than {MAX_BYTES:,} bytes",
                                f"a job file is at most {MAX_BYTES:,} bytes; split the work into several jobs")])
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        col = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        raise JobError([Problem(name, line, col, "", f"byte 0x{data[exc.start]:02x} is not valid UTF-8",
                                "save the job file as UTF-8 text")]) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return text


def load(text: str, name: str) -> Node:
    """Parse YAML text into a :class:`Node` tree (top level must be a mapping)."""
    import yaml

    try:
        try:   # libyaml where installed (~10x faster); anything it finds is looked at again in Python, whose
            _check_depth(text, name, fast=True)      # places and words the messages are written against
            _check_expansion(text, name, fast=True)
        except (yaml.YAMLError, JobError):
            _check_depth(text, name)
            _check_expansion(text, name)
        root = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as exc:
        raise JobError([_syntax_problem(exc, name)]) from None
    except yaml.reader.ReaderError as exc:   # a control character YAML does not allow in its text
        pos = exc.position
        line = text.count("\n", 0, pos) + 1
        col = pos - (text.rfind("\n", 0, pos) + 1) + 1
        char = exc.character if isinstance(exc.character, str) else chr(exc.character)
        raise JobError([Problem(name, line, col, "", f"the file holds the control character U+{ord(char):04X}, "
                                "which YAML does not allow",
                                "remove it; save the job file as plain UTF-8 text")]) from None
    except yaml.YAMLError as exc:
        raise JobError([Problem(name, 0, 0, "", f"YAML error: {exc}", "write the job file as YAML")]) from None
    except RecursionError:  # a backstop: _check_depth refuses deep nesting before the composer recurses
        raise JobError([Problem(name, 0, 0, "", "values are nested too deeply to read",
                                "a job file is a few levels deep (legs → end → pressure)")]) from None
    if root is None:
        raise JobError([Problem(name, 1, 1, "", "the file is empty",
                                "start from one of the example jobs (calcdoc new writes a starter job)")])
    builder = _Builder(name)
    tree = builder.build(root, "", 0)
    if tree.kind != "map":
        raise JobError([Problem(name, tree.line, tree.col, "", f"the top level is a {_KIND_NAMES[tree.kind]}, not a mapping of keys",
                                "a job file is a mapping of keys such as calcdoc:, calc:, gas:, start:, legs:")])
    return tree


_KIND_NAMES = {"scalar": "single value", "map": "mapping", "seq": "list"}

#: The only tags a job file may carry (explicitly or as resolved by YAML): plain data.
_PLAIN_TAGS = frozenset("tag:yaml.org,2002:" + t for t in ("str", "int", "float", "bool", "null", "timestamp",
                                                            "seq", "map"))
_CONTEXT_AT_FAULT = ("while scanning a simple key", "while parsing a flow mapping", "while parsing a flow sequence",
                     "while scanning a quoted scalar")


def _syntax_problem(exc: Any, name: str) -> Problem:
    """A YAML syntax error as a Problem at the place to fix, in words an engineer can act on.

    PyYAML gives the place it noticed the error (problem mark) and the construct it was reading
    (context mark). For an unclosed bracket or quote and a key without its colon, the construct's
    start is where the fix goes; for a bad indent, the place noticed is.
    """
    problem = exc.problem or "invalid YAML"
    mark = exc.problem_mark
    ctx = exc.context_mark
    at_context = bool(ctx and exc.context in _CONTEXT_AT_FAULT)
    if at_context or mark is None:
        mark = ctx or mark
    line, col = (mark.line + 1, mark.column + 1) if mark else (0, 0)
    what = problem
    if exc.context:
        what = f"{exc.context}, {problem}"
    if at_context and exc.problem_mark is not None and exc.problem_mark.line != ctx.line:
        what += f" (noticed at line {exc.problem_mark.line + 1}, column {exc.problem_mark.column + 1})"
    valid = "check indentation (spaces, not tabs), colons after keys and matching quotes and brackets"
    if "'\\t'" in problem or "\t" in problem:
        what = "a tab character where YAML expects spaces"
        valid = "indent with spaces only (YAML does not allow tabs for indentation)"
    elif exc.context == "while scanning a simple key":
        valid = "a key needs a colon and a space after it, for example 'temperature: 20 degC'"
    elif exc.context in ("while parsing a flow mapping", "while parsing a flow sequence"):
        valid = "close the '{' with '}' (or the '[' with ']') on the same item, and separate entries with commas"
    elif "expected a single document" in what:
        valid = "a job file holds one job; remove the '---' line and what follows, or split the file"
    return Problem(name, line, col, "", f"YAML syntax error: {what}", valid)


def _loader(fast: bool) -> Any:
    """PyYAML's safe loader: libyaml's (C) when ``fast`` and installed, else the pure-Python one, whose
    line, column and error wording every message of ours is written against."""
    import yaml

    return getattr(yaml, "CSafeLoader", yaml.SafeLoader) if fast else yaml.SafeLoader


def _check_depth(text: str, name: str, fast: bool = False) -> None:
    """Refuse nesting deeper than MAX_DEPTH from the token stream (no recursion), with its place. ``fast``: scan
    with libyaml where PyYAML was built with it."""
    import yaml

    depth = 0
    opens = (yaml.BlockMappingStartToken, yaml.BlockSequenceStartToken, yaml.FlowMappingStartToken,
             yaml.FlowSequenceStartToken)
    closes = (yaml.BlockEndToken, yaml.FlowMappingEndToken, yaml.FlowSequenceEndToken)
    for tok in yaml.scan(text, Loader=_loader(fast)):
        if isinstance(tok, opens):
            depth += 1
            if depth > MAX_DEPTH:
                m = tok.start_mark
                raise JobError([Problem(name, m.line + 1, m.column + 1, "",
                                        f"values are nested more than {MAX_DEPTH} levels deep",
                                        "a job file is a few levels deep (legs → end → pressure)")])
        elif isinstance(tok, closes):
            depth -= 1


def _check_expansion(text: str, name: str, fast: bool = False) -> None:
    """Refuse a file whose aliases expand it beyond MAX_NODES values, at the alias that crosses the bound (from
    the event stream, before anything is built): the place to fix is that alias, not the anchor it repeats.
    ``fast``: parse with libyaml where PyYAML was built with it."""
    import yaml

    sizes: dict[str, int] = {}
    stack: list[tuple[str | None, int]] = []   # open collections: (anchor, values so far)
    total = 0

    def add(n: int) -> None:
        if stack:
            anchor, count = stack[-1]
            stack[-1] = (anchor, count + n)

    for ev in yaml.parse(text, Loader=_loader(fast)):
        if isinstance(ev, yaml.AliasEvent):
            n = sizes.get(ev.anchor, 1)
            total += n
            add(n)
            if total > MAX_NODES:
                m = ev.start_mark
                raise JobError([Problem(name, m.line + 1, m.column + 1, "",
                                        f"the alias *{ev.anchor} here expands the file to more than {MAX_NODES:,} "
                                        "values (anchors and aliases repeated many times)",
                                        "write the job out plainly; a job file needs a few hundred values at most")])
        elif isinstance(ev, (yaml.SequenceStartEvent, yaml.MappingStartEvent)):
            total += 1
            stack.append((ev.anchor, 1))
        elif isinstance(ev, (yaml.SequenceEndEvent, yaml.MappingEndEvent)):
            anchor, count = stack.pop()
            if anchor is not None:
                sizes[anchor] = count
            add(count)
        elif isinstance(ev, yaml.ScalarEvent):
            total += 1
            add(1)
            if ev.anchor is not None:
                sizes[ev.anchor] = 1


class _Builder:
    def __init__(self, name: str):
        import yaml

        self.name = name
        self.count = 0
        self.active: set[int] = set()
        self.constructor = yaml.constructor.SafeConstructor()

    def fail(self, node: Any, path: str, found: str, valid: str) -> NoReturn:
        raise JobError([Problem(self.name, node.start_mark.line + 1, node.start_mark.column + 1, path, found, valid)])

    def check_text(self, node: Any, path: str, text: str) -> None:
        """Refuse a value too long to be a job's text, or one holding a lone surrogate (not Unicode text)."""
        if len(text) > MAX_SCALAR:
            self.fail(node, path, f"a value of {len(text):,} characters", f"a value is at most {MAX_SCALAR:,} characters")
        try:
            text.encode("utf-8")
        except UnicodeEncodeError as exc:
            self.fail(node, path, f"the text holds the lone surrogate code point U+{ord(text[exc.start]):04X} "
                      "(written as an escape), which is not a character",
                      "write the character itself, or a pair of escapes that make one character")

    def build(self, node: Any, path: str, depth: int) -> Node:
        import yaml

        self.count += 1
        if self.count > MAX_NODES:
            self.fail(node, path, f"the file expands to more than {MAX_NODES:,} values (anchors and aliases "
                      "repeated many times)", "write the job out plainly; a job file needs a few hundred values at most")
        if depth > MAX_DEPTH:
            self.fail(node, path, f"values are nested more than {MAX_DEPTH} levels deep",
                      "a job file is a few levels deep (legs → end → pressure)")
        line, col = node.start_mark.line + 1, node.start_mark.column + 1
        if node.tag not in _PLAIN_TAGS:
            tag = node.tag.replace("tag:yaml.org,2002:", "!!")
            self.fail(node, path, f"the YAML tag '{tag}' asks for an object to be built; calcdoc reads plain data only",
                      "remove the tag and write plain values (numbers, text, dates, lists and mappings)")
        if id(node) in self.active:
            self.fail(node, path, "an alias refers to the value that contains it (a recursive anchor)",
                      "remove the recursive alias")
        if isinstance(node, yaml.ScalarNode):
            self.check_text(node, path, node.value)
            try:
                value = self.constructor.construct_object(node, deep=True)
            except yaml.constructor.ConstructorError as exc:
                self.fail(node, path, f"cannot read the value: {exc.problem}", "write a plain number, text or date")
            except (ValueError, KeyError, TypeError, AttributeError, OverflowError):
                # a value the explicit tag does not fit ('!!bool x', '!!timestamp x', '!!int 1.5')
                tag = node.tag.replace("tag:yaml.org,2002:", "!!")
                self.fail(node, path, f"cannot read '{_clip(node.value)}' as {tag}",
                          "remove the tag, or write a value of that kind; a plain number, text or date needs no tag")
            if isinstance(value, int) and not isinstance(value, bool):
                try:
                    float(value)
                except OverflowError:
                    self.fail(node, path, f"the number {_clip(node.value)} is beyond the range of floating-point "
                              "numbers (about 1.8e308)", "write a number of a sensible size")
            if isinstance(value, float) and value != value:
                value = node.value  # '.nan' stays text so that validation names it
            return Node(value, line, col, path, tag=node.tag, span=(node.start_mark.index, node.end_mark.index))
        if len(node.value) > MAX_ITEMS:
            self.fail(node, path, f"a {'list' if isinstance(node, yaml.SequenceNode) else 'mapping'} of "
                      f"{len(node.value):,} entries", f"a list or mapping holds at most {MAX_ITEMS:,} entries")
        self.active.add(id(node))
        try:
            if isinstance(node, yaml.SequenceNode):
                items = [self.build(child, f"{path}[{i}]", depth + 1) for i, child in enumerate(node.value)]
                return Node(items, line, col, path, kind="seq", span=(node.start_mark.index, node.end_mark.index),
                            flow=bool(node.flow_style))
            out: dict[str, Node] = {}
            for key_node, value_node in node.value:
                if not isinstance(key_node, yaml.ScalarNode):
                    self.fail(key_node, path, "a key is itself a list or mapping", "keys are plain names")
                if key_node.tag == "tag:yaml.org,2002:merge":
                    self.fail(key_node, path, "merge keys ('<<') are not supported",
                              "write the keys out in full")
                self.check_text(key_node, path, key_node.value)
                key = str(key_node.value)
                sub = f"{path}.{key}" if path else key
                if key in out:
                    self.fail(key_node, sub, f"the key '{key}' appears twice in the same mapping",
                              "give each key once")
                child = self.build(value_node, sub, depth + 1)
                child.key_line, child.key_col = key_node.start_mark.line + 1, key_node.start_mark.column + 1
                child.key_start = key_node.start_mark.index
                out[key] = child
            return Node(out, line, col, path, kind="map", span=(node.start_mark.index, node.end_mark.index),
                        flow=bool(node.flow_style))
        finally:
            self.active.discard(id(node))


def _clip(text: str, most: int = 40) -> str:
    return text if len(text) <= most else text[:most] + "…"


def _scalar(node: Node) -> str:
    v = node.value
    if isinstance(v, (_dt.date, _dt.datetime)):
        return v.isoformat()
    if v is None:
        return "null"
    if isinstance(v, bool):
        return str(v).lower()
    return str(v)


def leaves(tree: Node) -> tuple[tuple[str, str, int], ...]:
    """Every scalar of a job file: (path, value as entered, line); list items are named by their ``name`` or
    ``revision`` where they have one, so that inserting a leg does not renumber the rest."""
    out: list[tuple[str, str, int]] = []

    def walk(node: Node, path: str) -> None:
        if node.kind == "map":
            for k, child in node.value.items():
                walk(child, f"{path}.{k}" if path else k)
        elif node.kind == "seq":
            seen: set[str] = set()
            for i, child in enumerate(node.value):
                tag = str(i)
                if child.kind == "map":
                    for key in ("name", "revision"):
                        if key in child.value and child.value[key].kind == "scalar":
                            tag = _scalar(child.value[key])
                            break
                if tag in seen:
                    tag = str(i)
                seen.add(tag)
                walk(child, f"{path}[{tag}]")
            if not node.value:
                out.append((path, "[]", node.line))
        else:
            out.append((path, _scalar(node), node.where[0]))

    walk(tree, "")
    return tuple(out)


def dump(data: Any, **options: Any) -> str:
    """Plain data written as YAML text (for job files made by the program, e.g. verification cases)."""
    import yaml

    return str(yaml.safe_dump(data, sort_keys=False, allow_unicode=True, **options))
