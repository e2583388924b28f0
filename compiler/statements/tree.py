"""Positioned identifiers and the one generic walk over the syntax tree.

Every identifier an author writes (a declared name, an output after ``->``,
a variable, a name in an expression) is an ``Ident``: its text plus where it
stands.  Passes that care about names (the name pass, cache keys, error
locations) find them all with ``walk`` instead of knowing each statement's
fields, the way Python's ``ast.walk`` serves every pass over its trees.
"""
from __future__ import annotations

from dataclasses import fields, is_dataclass
from typing import Iterator, Optional


class Ident(str):
    """An identifier's text with its 1-based file ``line`` and ``column``.

    It is a ``str``: it compares and hashes as its text, so code that reads
    names as strings needs no change, and it is immutable like one.
    """

    line: int
    column: int

    def __new__(cls, text: str, line: int, column: int) -> "Ident":
        self = super().__new__(cls, text)
        self.__dict__.update(line=line, column=column)
        return self

    def __setattr__(self, name, value):
        raise AttributeError("an Ident is immutable")

    def __delattr__(self, name):
        raise AttributeError("an Ident is immutable")

    def __reduce__(self):
        return (Ident, (str(self), self.line, self.column))


def iter_child_nodes(node) -> Iterator:
    """The direct children of a node in field order: nodes and ``Ident``s,
    with tuples of them flattened.  Numbers and operator text are not
    children."""
    for f in fields(node):
        yield from children_of(getattr(node, f.name))


def children_of(value) -> Iterator:
    """The nodes and ``Ident``s of a field's value, tuples flattened."""
    if isinstance(value, tuple):
        for item in value:
            yield from children_of(item)
    elif isinstance(value, Ident) or is_dataclass(value):
        yield value


def walk(root) -> Iterator[tuple[object, Optional[object]]]:
    """Every node and ``Ident`` in ``root`` (a node, an ``Ident`` or a tuple
    of them), in source order, each with its parent node (None at the top).

    Iterative, because a sum of a thousand terms is a tree a thousand deep.
    """
    stack = [(item, None) for item in reversed(list(children_of(root)))]
    while stack:
        item, parent = stack.pop()
        yield item, parent
        if not isinstance(item, Ident):
            stack.extend((child, item) for child in reversed(list(iter_child_nodes(item))))
