"""Read YAML text into plain data plus the line of every key, catching YAML 1.1 traps.

PyYAML follows YAML 1.1: ``1e3`` is a string, ``010`` is octal 8, ``5:30`` is 330 and
``on``/``off`` are booleans. Keys are taken as written (so a key ``on`` stays the text "on"),
and numbers that YAML 1.1 would misread are reported instead of silently accepted.
"""

from __future__ import annotations

__all__ = ["DOCUMENT", "YamlSource", "read_yaml"]

import re
from dataclasses import dataclass
from typing import Any

import yaml
from yaml.nodes import MappingNode, Node, ScalarNode, SequenceNode

from detailer.errors import ProjectError, ProjectErrors, format_key_path

#: Key path shown for errors about the whole file.
DOCUMENT = "(document)"

Path = tuple[str | int, ...]

_INT_TAG = "tag:yaml.org,2002:int"
_FLOAT_TAG = "tag:yaml.org,2002:float"
_MERGE_TAG = "tag:yaml.org,2002:merge"
_OCTAL = re.compile(r"^[-+]?0[0-7_]+$")
_MAX_DEPTH = 40
#: Most values (keys, items, scalars) a file may expand to. A 2000-strip floor is about 50 000;
#: anchors and aliases repeated inside each other ("billion laughs") expand exponentially.
MAX_VALUES = 500_000


@dataclass(frozen=True, slots=True)
class YamlSource:
    """Plain data read from a YAML file, with the 1-based line of each key or list item."""

    data: Any
    lines: dict[Path, int]  # path -> line of the key (mapping entry) or of the item (list)


def read_yaml(text: str, file: str) -> YamlSource:
    """Parse ``text`` (one YAML document) with the safe loader. Raises ProjectError."""
    try:
        root = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.YAMLError as exc:
        raise _syntax_error(exc, file, text) from None
    except RecursionError:
        # PyYAML composes nested collections recursively: thousands of '[' exhaust the stack.
        raise ProjectError(
            file,
            "nested too deeply (brackets or indentation thousands of levels deep)",
            line=1,
            key_path=DOCUMENT,
            fix="this is not a project file: check that the right file was given",
        ) from None
    if root is None:
        raise ProjectError(
            file,
            "the file is empty",
            line=1,
            key_path=DOCUMENT,
            fix="start with project:, materials: and strips: blocks (see sample_projects/)",
        )
    reader = _Reader(file)
    try:
        data = reader.walk(root, (), 0)
    except _Stop as stop:
        raise stop.error from None
    if reader.errors:
        raise ProjectErrors(reader.errors)
    return YamlSource(data=data, lines=reader.lines)


def _syntax_error(exc: yaml.YAMLError, file: str, text: str) -> ProjectError:
    mark = getattr(exc, "problem_mark", None) or getattr(exc, "context_mark", None)
    problem = getattr(exc, "problem", None) or str(exc).splitlines()[0]
    line = mark.line + 1 if mark is not None else 1
    column = f" (column {mark.column + 1})" if mark is not None else ""
    fix = "check the indentation, colons and quotes on this line or the one before"
    if isinstance(exc, yaml.reader.ReaderError):
        # A control character (NUL, ...): no mark, only the offset into the text.
        line = text.count("\n", 0, max(0, exc.position)) + 1
        column = ""
        problem = f"control character {_char_code(exc.character)} in the text"
        fix = "remove it; if the file is not a text file, give the project YAML instead"
    elif "'\\t'" in problem or "\t" in problem:
        fix = "indent with spaces, not tabs"
    elif "stream end" in problem or "end of stream" in problem:
        fix = (
            "the file ends inside an unclosed quote or bracket: close it "
            "(or the file was cut short: save or copy it again)"
        )
    elif "another document" in problem:
        fix = "keep one YAML document per file: remove the second '---' and what follows"
    return ProjectError(
        file, f"not valid YAML: {problem}{column}", line=line, key_path=DOCUMENT, fix=fix
    )


def _char_code(character: object) -> str:
    if isinstance(character, str) and len(character) == 1:
        return f"U+{ord(character):04X}"
    if isinstance(character, int):
        return f"U+{character:04X}"
    return repr(character)


class _Stop(Exception):
    """Raised inside the walk to give up on the file at once (one error is enough)."""

    def __init__(self, error: ProjectError) -> None:
        super().__init__(str(error))
        self.error = error


class _Reader:
    def __init__(self, file: str) -> None:
        self.file = file
        self.lines: dict[Path, int] = {(): 1}
        self.errors: list[ProjectError] = []
        self._constructor = yaml.SafeLoader("")
        self._values = 0

    def _located(self, node: Node, path: Path, message: str, fix: str) -> ProjectError:
        return ProjectError(
            self.file,
            message,
            line=node.start_mark.line + 1,
            key_path=format_key_path(path) or DOCUMENT,
            fix=fix,
        )

    def _error(self, node: Node, path: Path, message: str, fix: str) -> None:
        self.errors.append(self._located(node, path, message, fix))

    def _stop(self, node: Node, path: Path, message: str, fix: str) -> _Stop:
        return _Stop(self._located(node, path, message, fix))

    def walk(self, node: Node, path: Path, depth: int) -> Any:
        # Aliases are the same node again: a recursive anchor never ends, a nested one explodes.
        self._values += 1
        if self._values > MAX_VALUES:
            raise self._stop(
                node,
                (),
                f"the file expands to more than {MAX_VALUES} values "
                "(anchors '&' and aliases '*' repeated inside each other)",
                "write the values out, or put shared strip values in the defaults: block",
            )
        if depth > _MAX_DEPTH:
            raise self._stop(
                node,
                path[:4],
                f"nested more than {_MAX_DEPTH} levels deep",
                "remove the recursive anchor/alias (an alias '*' inside its own anchor '&')",
            )
        if isinstance(node, MappingNode):
            return self._mapping(node, path, depth)
        if isinstance(node, SequenceNode):
            out = []
            for i, item in enumerate(node.value):
                self.lines[(*path, i)] = item.start_mark.line + 1
                out.append(self.walk(item, (*path, i), depth + 1))
            return out
        assert isinstance(node, ScalarNode)
        return self._scalar(node, path)

    def _mapping(self, node: MappingNode, path: Path, depth: int) -> dict[str, Any]:
        out: dict[str, Any] = {}
        for key_node, value_node in node.value:
            if key_node.tag == _MERGE_TAG:
                self._error(
                    key_node,
                    path,
                    "YAML merge keys (<<) are not supported",
                    "put shared strip values in the defaults: block instead",
                )
                continue
            if not isinstance(key_node, ScalarNode):
                self._error(key_node, path, "a key must be a plain name", "write key: value")
                continue
            key = str(key_node.value)
            if key in out:
                self._error(
                    key_node,
                    (*path, key),
                    "duplicate key (YAML would silently keep only the last one)",
                    "delete one of the two entries",
                )
                continue
            self.lines[(*path, key)] = key_node.start_mark.line + 1
            out[key] = self.walk(value_node, (*path, key), depth + 1)
        return out

    def _scalar(self, node: ScalarNode, path: Path) -> Any:
        try:
            value = self._constructor.construct_object(node, deep=True)
        except Exception as exc:  # noqa: BLE001 - PyYAML's constructors raise assorted types
            # on a value that does not fit its tag, e.g. '!!int' with nothing (IndexError).
            tag = node.tag.replace("tag:yaml.org,2002:", "!!")
            reason = getattr(exc, "problem", None) or ""
            if not reason and isinstance(exc, (ValueError, OverflowError)):
                reason = str(exc).splitlines()[0] if str(exc) else ""
            self._error(
                node,
                path,
                f"cannot read {node.value!r} as {tag}" + (f" ({reason})" if reason else ""),
                "correct the value, or quote it (and drop any !! tag) if it is text",
            )
            return None
        if node.style is None and node.tag in (_INT_TAG, _FLOAT_TAG):
            text = node.value
            if ":" in text:
                self._error(
                    node,
                    path,
                    f"{text} is read by YAML 1.1 as a base-60 number ({value})",
                    "write a plain number, or quote it if it is text",
                )
            elif node.tag == _INT_TAG and _OCTAL.match(text):
                self._error(
                    node,
                    path,
                    f"{text} is read by YAML 1.1 as an octal number ({value})",
                    f"write it without the leading zero: {text.lstrip('+-0_') or '0'}",
                )
            elif node.tag == _INT_TAG and text.lstrip("+-")[:2].lower() in ("0x", "0b"):
                self._error(node, path, f"{text} is not a decimal number", "write it in decimal")
        return value
