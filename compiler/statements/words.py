"""The reserved vocabulary: statement words and built-in function names.

Kept apart from the syntax tree so that the lexer, the rule tables and the
front matter reader (which refuses a statement word as a convention name)
share one list without depending on the nodes.
"""
from __future__ import annotations

import re

#: Words that begin a statement; they cannot be used as names.
STATEMENT_WORDS = frozenset({
    "symbol", "convention", "bundle", "split", "fiber", "let", "substitute",
    "reduce", "integrate", "coefficients", "maximize", "minimize",
    "extremize", "check", "show", "table", "plot", "define", "use", "factorize", "matter",
})

#: Built-in functions; a name is a function only in call position.
BUILTIN_FUNCTIONS = frozenset({
    "p", "c", "e", "Ahat", "L", "td", "ch", "S", "dual", "wedge", "sym",
    "part", "degree", "sqrt", "trivial", "sum", "prod", "leading", "series", "tr", "pf",
})

#: Trade names of representations, read as such in ``ch(G, ...)`` and
#: ``tr(G, ..., k)``; ``spinor`` also as ``spinor+`` and ``spinor-``.
REPRESENTATION_WORDS = frozenset({
    "trivial", "fundamental", "antifundamental", "adjoint", "vector", "spinor",
    "antisymmetric", "symmetric",
})

_INDEXED_CLASS = re.compile(r"(?:[pc]|ch)[1-9][0-9]*")


def is_builtin_function(name: str) -> bool:
    """True for ``p``, ``ch``, ... and the indexed classes ``p1``, ``c12``, ``ch3``."""
    return name in BUILTIN_FUNCTIONS or _INDEXED_CLASS.fullmatch(name) is not None
