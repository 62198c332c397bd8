"""Reading YAML safely: size, depth, alias, tag and numeral limits, every refusal one line.

A shop's order or measured-values file is a page of plain YAML; anything a shop
file never needs (anchors, merge keys, explicit tags, octal or base-60 numbers,
control characters) is refused at its place, never read as something else.
"""

from __future__ import annotations

import re
from functools import lru_cache

from .errors import InputError, join_path
from .fileio import read_limited

MAX_YAML_BYTES = 1_000_000
MAX_YAML_DEPTH = 32


# A count as a shop writes it: decimal digits, no leading zero.  YAML 1.1 also
# reads 060 as octal 48, 0x3C and 0b111100 as 60, 6_0 as 60 and 1:30 as 90.
_DECIMAL = re.compile(r"[-+]?(?:0|[1-9][0-9]*)")


class OddNumeral:
    """A number YAML 1.1 would read other than as a shop means it (``060``, ``0x3C``,
    ``6_0``, ``1:30``); kept as its text so the loader can refuse it at its path."""

    __slots__ = ("text",)

    def __init__(self, text: str):
        self.text = text

    def __hash__(self):
        return hash(("OddNumeral", self.text))

    def __eq__(self, other):
        return isinstance(other, OddNumeral) and other.text == self.text

    def __repr__(self):
        return self.text

    def reason(self) -> str:
        t = self.text.strip()
        body = t.lstrip("+-")
        if ":" in t:
            return (f"{t} would be read as a base-60 number; write the decimal value, "
                    f"or quote it ('{t}') if it is text")
        if body[:2].lower() in ("0x", "0b"):
            base = "hexadecimal" if body[1] in "xX" else "binary"
            try:
                decimal = f" ({int(t.replace('_', ''), 0)})"
            except ValueError:
                decimal = ""
            return f"{t} is a {base} number; write counts in decimal{decimal}"
        if "_" in t:
            return f"{t}: digit separators (_) are not read; write {t.replace('_', '')}"
        plain = body.lstrip("0") or "0"
        return (f"{t} has a leading zero, which YAML reads as an octal number; write {plain} for a count, "
                f"or quote it ('{t}') if it is text")


class _Refused(Exception):
    """A YAML feature a shop file never needs, with where it is (and the field, when known)."""

    def __init__(self, problem: str, mark, path: str = ""):
        super().__init__(problem)
        self.problem, self.mark, self.path = problem, mark, path


#: The explicit tags a shop file may carry: the plain scalars, which say only how to read the text.
#: Any other (``!!set``, ``!!omap``, ``!!binary``, ``!!python/...``, a local ``!tag``) changes what
#: the value is behind the text's back: a set's order follows the hash seed, for one.
_PLAIN_SCALAR_TAGS = frozenset({None, "!"} | {f"tag:yaml.org,2002:{t}" for t in ("str", "int", "float", "bool",
                                                                                 "null")})


def _tag_name(tag: str) -> str:
    return "!!" + tag[len("tag:yaml.org,2002:"):] if tag.startswith("tag:yaml.org,2002:") else tag


@lru_cache(maxsize=None)
def _yaml_loader_class(max_depth: int):
    import yaml

    class LimitedSafeLoader(yaml.SafeLoader):
        """Safe loader that also refuses anchors, aliases, merge keys, deep
        nesting, repeated keys and numbers a shop does not write that way.

        Anchors and aliases are refused outright: shop files never need them
        and they are how an "alias bomb" grows a few hundred bytes into gigabytes.
        """

        _depth = 0
        _path: list = []

        def compose_node(self, parent, index):
            event = self.peek_event()
            if getattr(event, "tag", None) not in _PLAIN_SCALAR_TAGS:
                is_scalar = isinstance(event, yaml.ScalarEvent)
                where = self._path + ([index.value] if isinstance(index, yaml.ScalarNode)
                                      else [index] if isinstance(index, int) else [])
                raise _Refused(f"the YAML tag {_tag_name(event.tag)[:40]} is not accepted; write the plain "
                               + ("value" if is_scalar else "list or mapping") + " without a tag",
                               event.start_mark, join_path(*where))
            if (isinstance(event, yaml.ScalarEvent) and event.tag not in (None, "!", "tag:yaml.org,2002:str")
                    and self.resolve(yaml.ScalarNode, event.value, (True, False)) != event.tag):
                # !!float on 'A' (or !!int on '1.5'): the tag promises what the text is not.
                where = self._path + ([index.value] if isinstance(index, yaml.ScalarNode)
                                      else [index] if isinstance(index, int) else [])
                raise _Refused(f"the YAML tag {_tag_name(event.tag)} does not fit {event.value[:40]!r}; "
                               "write the plain value without a tag", event.start_mark, join_path(*where))
            if isinstance(event, yaml.AliasEvent):
                raise _Refused(f"anchors and aliases (*{event.anchor}) are not accepted; write the value out in full",
                               event.start_mark)
            if getattr(event, "anchor", None) is not None:
                raise _Refused(f"anchors and aliases (&{event.anchor}) are not accepted; write the value out in full",
                               event.start_mark)
            self._depth += 1
            # The path of the node being composed, so a refusal names its field.
            self._path = self._path + ([index.value] if isinstance(index, yaml.ScalarNode)
                                       else [index] if isinstance(index, int) else [])
            try:
                if self._depth > max_depth:
                    raise _Refused(f"nested deeper than {max_depth} levels", event.start_mark)
                return super().compose_node(parent, index)
            finally:
                self._depth -= 1
                if isinstance(index, (yaml.ScalarNode, int)) and not isinstance(index, bool):
                    self._path = self._path[:-1]

        def construct_mapping(self, node, deep=False):
            seen = set()
            for key_node, _ in node.value:
                if key_node.tag == "tag:yaml.org,2002:merge":
                    raise _Refused("merge keys (<<) are not accepted; write the fields out in full",
                                   key_node.start_mark)
                key = self.construct_object(key_node, deep=True)
                try:
                    hashable = key in seen
                except TypeError:
                    raise _Refused("a YAML mapping key must be plain text", key_node.start_mark) from None
                if hashable:
                    raise _Refused(f"key {key!r} appears twice", key_node.start_mark)
                seen.add(key)
            return super().construct_mapping(node, deep=deep)

        def construct_yaml_int(self, node):
            text = self.construct_scalar(node)
            return int(text) if _DECIMAL.fullmatch(text) else OddNumeral(text)

        def construct_yaml_float(self, node):
            text = self.construct_scalar(node)
            if "_" in text or ":" in text:
                return OddNumeral(text)
            return super().construct_yaml_float(node)

    LimitedSafeLoader.add_constructor("tag:yaml.org,2002:int", LimitedSafeLoader.construct_yaml_int)
    LimitedSafeLoader.add_constructor("tag:yaml.org,2002:float", LimitedSafeLoader.construct_yaml_float)
    return LimitedSafeLoader


def _first_odd_numeral(node, path=()):
    """(path, numeral) of the first :class:`OddNumeral` in document order, or None."""
    if isinstance(node, OddNumeral):
        return path, node
    if isinstance(node, dict):
        for k, v in node.items():
            if isinstance(k, OddNumeral):
                return path + (k.text,), k
            found = _first_odd_numeral(v, path + (k,))
            if found:
                return found
    elif isinstance(node, list):
        for i, v in enumerate(node):
            found = _first_odd_numeral(v, path + (i,))
            if found:
                return found
    return None


def read_yaml_file(path, *, max_bytes: int = MAX_YAML_BYTES, max_depth: int = MAX_YAML_DEPTH):
    """Read a YAML document with size, depth, alias and type limits.

    Returns the loaded document (usually a dict).  Every refusal is an
    :class:`InputError` naming the file: missing, unreadable, too large, not
    UTF-8 text, not YAML, or using features a shop file never needs.
    """
    return parse_yaml_bytes(read_limited(path, max_bytes), str(path), max_bytes=max_bytes, max_depth=max_depth)


def parse_yaml_bytes(raw: bytes, label: str, *, max_bytes: int = MAX_YAML_BYTES,
                     max_depth: int = MAX_YAML_DEPTH):
    """Parse YAML from bytes with the limits of :func:`read_yaml_file`."""
    import yaml

    if len(raw) > max_bytes:
        raise InputError(label, f"file is larger than {max_bytes // 1000} kB; not a shop file")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(label, "is not UTF-8 text (binary file?)") from None
    if "\x00" in text:
        raise InputError(label, "contains NUL characters (binary file?)")
    try:
        doc = yaml.load(text, Loader=_yaml_loader_class(max_depth))  # noqa: S506 - SafeLoader subclass
    except _Refused as exc:
        if exc.path:
            at = f" (line {exc.mark.line + 1}, column {exc.mark.column + 1})" if exc.mark else ""
            raise InputError(exc.path, f"{exc.problem}{at}") from None
        where = f"line {exc.mark.line + 1}, column {exc.mark.column + 1}: " if exc.mark else ""
        raise InputError(label, f"{where}{exc.problem}") from None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        where = f" at line {mark.line + 1}, column {mark.column + 1}" if mark else ""
        problem = exc.problem or exc.context or "not valid YAML"
        raise InputError(label, f"not valid YAML{where}: {problem}") from None
    except yaml.reader.ReaderError as exc:
        before = text[: exc.position]
        where = f" at line {before.count(chr(10)) + 1}, column {len(before) - before.rfind(chr(10))}"
        char = f"U+{exc.character:04X}" if isinstance(exc.character, int) else repr(exc.character)
        raise InputError(label, f"not valid YAML{where}: control character {char} is not allowed; "
                                "expected plain text") from None
    except yaml.YAMLError as exc:
        raise InputError(label, f"not valid YAML: {exc}") from None
    except RecursionError:
        raise InputError(label, "nested too deeply") from None
    odd = _first_odd_numeral(doc)
    if odd:
        where, numeral = odd
        raise InputError(join_path(*where) or label, numeral.reason())
    return doc
