"""Names and order: the static pass between parsing and evaluation.

Before any algebra runs, every statement is walked in document order to make
sure each name is declared on an earlier line, bound once (``let!`` aside)
and used as the right kind of thing.  These are the problems that make a
document impossible to compile (exit 2, no output files), so they are found
all at once and reported together, before the first computation.
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass
from typing import Iterator, Optional

from .errors import DocumentError, Location, Problem
from .statements import expr_nodes as en, nodes as n, words
from .statements.core import did_you_mean
from .statements.tree import Ident, children_of, iter_child_nodes

#: "Did you mean" is searched for this many problems, then no more.
MAX_SUGGESTIONS = 20
#: Conventions every document has, with their defaults.
BUILTIN_CONVENTIONS = {"angular_integral": 2}


@dataclass(frozen=True)
class Declared:
    """What a name stands for and where it was first bound."""

    name: str
    kind: str  # symbol, convention, bundle, gauge, fiber, class, value, function
    line: int
    column: int
    arity: Optional[int] = None  # of a function
    origin: str = ""  # the used document that declared it ("" for this one)
    via: int = 0  # the line of the 'use' that brought it in

    def where(self) -> str:
        if self.origin:
            return f"at line {self.line} of {self.origin} (used at line {self.via})"
        return f"at line {self.line}" if self.line else "as a built-in convention"


class NameTable:
    """Names in force while walking the document in order."""

    def __init__(self, path: str):
        self.path = path
        self.names: dict[str, Declared] = {}
        self.problems: list[Problem] = []
        #: Built-in and front-matter conventions that one ``convention``
        #: statement may restate (to give the default the document assumes).
        self.restatable: set[str] = set()

    def problem(self, line: int, column: int, message: str) -> None:
        self.problems.append(Problem(Location(self.path, line, column), message))

    def suggest(self, name: str) -> str:
        """A close name in force, for the first few problems only: each
        search costs time in the number of names."""
        if len(self.problems) >= MAX_SUGGESTIONS:
            return ""
        close = difflib.get_close_matches(name, list(self.names), n=1)
        return f" (did you mean '{close[0]}'?)" if close else ""

    def declare(self, name: str, kind: str, line: int, column: int,
                rebind: bool = False, arity: Optional[int] = None) -> None:
        if kind == "convention" and name in self.restatable:
            self.restatable.discard(name)  # a built-in or front-matter default restated
            return
        old = self.names.get(name)
        word = "define" if kind == "function" else "let"
        if rebind:
            if old is None:
                self.problem(line, column, f"{word}! rebinds '{name}', but it is not bound yet; "
                                           f"use {word}")
                return
            if old.kind != kind:
                where = f"declared {old.where()}" if old.line else "built in"
                self.problem(line, column, f"{word}! cannot rebind the {old.kind} '{name}' ({where})")
                return
        elif old is not None:
            hint = {"value": "; use let! to rebind it on purpose",
                    "function": "; use define! to redefine it on purpose"}.get(old.kind, "")
            self.problem(line, column, f"'{name}' is already bound {old.where()}{hint}")
            return
        self.names[name] = Declared(name, kind, line, column, arity)

    def local(self, name: Ident, bound: frozenset) -> None:
        """A name bound inside an expression (a sum index, a parameter):
        it may not hide a declared name or an enclosing local one."""
        old = self.names.get(name)
        if old is not None:
            self.problem(name.line, name.column,
                         f"the local name '{name}' would hide the {old.kind} '{name}' "
                         f"declared {old.where()}; choose another name")
        elif name in bound:
            self.problem(name.line, name.column, f"the local name '{name}' is already in use here")

    def call(self, name: Ident, count: int) -> None:
        """A call of a function the document defines."""
        found = self.names.get(name)
        if found is None:
            known = words.BUILTIN_FUNCTIONS | {d.name for d in self.names.values()
                                                if d.kind == "function"}
            self.problem(name.line, name.column,
                         f"'{name}' is not a built-in function or a function defined earlier"
                         + did_you_mean(name, known))
        elif found.kind != "function":
            self.problem(name.line, name.column, f"'{name}' is a {found.kind} "
                                                 f"(line {found.line}), not a built-in "
                                                 "function or a function defined earlier")
        elif count != found.arity:
            self.problem(name.line, name.column,
                         f"{name}() takes {found.arity} argument{'s' if found.arity != 1 else ''}"
                         f" (defined {found.where()}), found {count}")

    def use(self, name: str, line: int, column: int, kinds: tuple[str, ...] | None = None,
            role: str = "") -> None:
        found = self.names.get(name)
        if found is None:
            self.problem(line, column, f"unknown name '{name}'{self.suggest(name)}")
        elif kinds is not None and found.kind not in kinds:
            what = role or " or ".join(kinds)
            self.problem(line, column,
                         f"'{name}' is a {found.kind} (line {found.line}), but a {what} is needed here")


def _idents(statement, field: str, local: Optional[str] = None) -> Iterator[tuple[Ident, object]]:
    """The names one field of a statement reads, each with its parent node;
    names local to the field (sum indices, the parameters in field ``local``)
    are left out."""
    for item, parent, bound in _scoped(statement, field, local):
        if isinstance(item, Ident) and item not in bound and not _binds(item, parent):
            yield item, parent


def _binds(item: Ident, parent) -> bool:
    return isinstance(parent, en.Sum) and item is parent.index


def _scoped(statement, field: str, local: Optional[str] = None):
    """``walk`` that knows which names are local where: each Ident with its
    parent and the local names in force (a sum's index in its body only).
    Iterative, like ``walk``, for deep left-leaning sums."""
    bound = frozenset(getattr(statement, local)) if local else frozenset()
    stack = [(item, None, bound) for item in reversed(list(children_of(getattr(statement, field))))]
    while stack:
        item, parent, bound = stack.pop()
        yield item, parent, bound
        if isinstance(item, Ident):
            continue
        inner = bound | {item.index} if isinstance(item, en.Sum) else bound
        for child in reversed(list(iter_child_nodes(item))):
            stack.append((child, item, inner if isinstance(item, en.Sum) and child is item.body
                          else bound))


@dataclass(frozen=True)
class Use:
    """The names in field ``field`` are read.  A name written on its own (a
    fiber after ``over``, a ``for`` target) must be one of ``kinds``; a name
    inside an expression must be one of ``expr_kinds`` (None: any kind but a
    function); a called name must be a function defined earlier; the names
    in field ``local`` (a definition's parameters) are local to this one."""

    field: str
    kinds: Optional[tuple[str, ...]] = None
    role: str = ""
    expr_kinds: Optional[tuple[str, ...]] = None
    local: Optional[str] = None

    def __call__(self, table: "NameTable", statement) -> None:
        for name, parent, bound in _scoped(statement, self.field, self.local):
            if isinstance(name, Ident):
                _ROLES[_role(name, parent, bound)](self, table, name, parent, bound)

    def standalone(self, table, name, parent, bound) -> None:
        table.use(name, name.line, name.column, self.kinds, self.role)

    def in_expression(self, table, name, parent, bound) -> None:
        found = table.names.get(name)
        if found is not None and found.kind == "function":
            table.problem(name.line, name.column, f"'{name}' is a function: call it with "
                                                  f"its arguments, as in {name}(...)")
        else:
            table.use(name, name.line, name.column, self.expr_kinds)


def _role(name: Ident, parent, bound: frozenset) -> str:
    """What a name does where it stands: binds an index, calls, is expanded in, is read."""
    if _binds(name, parent):
        return "index"
    if isinstance(parent, en.Apply) and name is parent.func:
        return "local call" if name in bound else "call"
    if name in bound:
        return "local"
    if isinstance(parent, en.Expansion) and name is parent.variable:
        return "expansion variable"
    return "expression" if isinstance(parent, en.Name) else "standalone"


_ROLES = {
    "index": lambda use, table, name, parent, bound: table.local(name, bound),
    "call": lambda use, table, name, parent, bound: table.call(name, len(parent.args)),
    "local call": lambda use, table, name, parent, bound: table.problem(
        name.line, name.column, f"'{name}' is a local name, not a function"),
    "local": lambda use, table, name, parent, bound: None,
    "expansion variable": lambda use, table, name, parent, bound: table.use(
        name, name.line, name.column, ("symbol",), "declared symbol to expand in"),
    "expression": Use.in_expression,
    "standalone": Use.standalone,
}


@dataclass(frozen=True)
class Bind:
    """The names in field ``field`` are bound as ``kind``; a problem points
    at the node that binds them (the statement, or a piece such as a fiber
    body's ``class`` line).  A function's arity is the length of field
    ``arity``."""

    field: str
    kind: str
    arity: Optional[str] = None

    def __call__(self, table: "NameTable", statement) -> None:
        count = len(getattr(statement, self.arity)) if self.arity else None
        for name, parent in _idents(statement, self.field):
            site = parent or statement
            table.declare(name, self.kind, site.line, site.column,
                          rebind=getattr(statement, "rebind", False), arity=count)


def _parameters(table: "NameTable", s: n.Define) -> None:
    for name in s.params:
        table.local(name, frozenset())


def _use_document(table: "NameTable", s: n.UseDecl) -> None:
    """Bring in what a used document declares, at the ``use`` line; the same
    declaration arriving twice (two documents using a third) is one."""
    if s.module is None:
        table.problem(s.line, s.column, f"'{s.path}' was not loaded")
        return
    for d in s.module.exports:
        old = table.names.get(d.name)
        if old is not None and (old.origin, old.line) == (d.origin, d.line):
            continue
        if old is not None:
            table.problem(s.line, s.column, f"'{d.name}' from line {d.line} of {d.origin} clashes "
                                            f"with '{d.name}' bound {old.where()}")
            continue
        table.names[d.name] = Declared(d.name, d.kind, d.line, d.column, d.arity,
                                       d.origin, s.line)


def _not_into_itself(table: "NameTable", s: n.SplitDecl) -> None:
    for part in s.parts:
        if part.name == s.bundle:
            table.problem(part.line, part.column, f"'{s.bundle}' cannot be split into itself")


_OUT = (Bind("outputs", "value"),)
_FOR = Use("clauses", ("symbol",), "symbol to substitute")

#: What each statement reads and binds: callables ``(table, statement)``
#: applied in order; the ``Use`` and ``Bind`` entries also give ``references``
#: and ``bound_names``.  The one table of statement kinds: the engine's
#: handlers must cover exactly its keys.
RULES: dict[type, tuple] = {
    n.SymbolDecl: (Bind("names", "symbol"),
                   Use("relations", expr_kinds=("symbol",))),
    n.ConventionDecl: (Bind("name", "convention"),),
    n.BundleDecl: (Use("rank", ("symbol",), "declared integer symbol for the rank"),
                   Bind("names", "bundle")),
    n.GaugeDecl: (Use("rank_name", ("symbol",), "integer symbol for the rank"),
                  Use("index", ("convention",), "convention for the trace index"),
                  Use("curvature", ("convention",), "convention for the curvature factor"),
                  Bind("names", "gauge")),
    n.Factorize: (Use("target"), *_OUT),
    n.MatterDecl: (Use("tangent", ("bundle",), "tangent bundle"),
                   Use("r_symmetry", ("bundle", "gauge"), "R-symmetry bundle"),
                   Use("fields", ("bundle", "gauge"), "bundle"), Bind("name", "value")),
    n.SplitDecl: (Use("bundle", ("bundle",)), Use("parts", ("bundle",)), _not_into_itself),
    n.SurfaceFiber: (Use("genus"), Bind("name", "fiber"), Bind("tangent", "bundle")),
    n.SphereFiber: (Use("bundle", ("bundle",)), Bind("name", "fiber"), Bind("angular", "class")),
    n.GeneralFiber: (Bind("name", "fiber"), Bind("classes", "class"),
                     Use("relations"), Use("integrals")),
    n.FixedPointFiber: (Bind("name", "fiber"), Bind("parameters", "class"), Use("identified"),
                        Use("points"), Bind("tangent", "bundle"), Bind("lines", "bundle"),
                        Use("line_values"), Use("model", ("fiber",), "general fiber"),
                        Use("line_models", ("class",), "class of the model fiber")),
    n.Let: (Use("expr"), Bind("name", "value")),
    n.Define: (_parameters, Use("body", local="params"), Bind("name", "function", "params")),
    n.UseDecl: (_use_document,),
    n.Substitute: (Use("target"), Use("pairs"), *_OUT),
    n.Reduce: (Use("target"), Use("relations"), *_OUT),
    n.Integrate: (Use("target"), Use("fiber", ("fiber",)), *_OUT),
    n.Coefficients: (Use("target"), Use("monomials"), *_OUT),
    n.Extremize: (Use("target"), Use("variables", ("symbol",), "declared symbol to vary"),
                  Bind("point", "value"), Bind("value", "value")),
    n.Check: (Use("lhs"), Use("rhs"), _FOR),
    n.Show: (Use("exprs"),),
    n.Table: (Use("exprs"), _FOR),
    n.Plot: (Use("exprs"), _FOR, Use("variable", ("symbol",), "symbol to plot over")),
}


def references(statement) -> list[Ident]:
    """Every name a statement reads, in order: the inputs of its result."""
    found = [name for entry in RULES[type(statement)] if isinstance(entry, Use)
             for name, _ in _idents(statement, entry.field, entry.local)]
    return list(dict.fromkeys(found))


def bound_names(statement) -> list[Ident]:
    """Every name a statement binds (so a failed one can mark them missing)."""
    return [name for entry in RULES[type(statement)] if isinstance(entry, Bind)
            for name, _ in _idents(statement, entry.field)]


def resolve(path: str, statements, front_conventions, prose_refs) -> dict[str, Declared]:
    """Check names and order over the whole document; return the final table.

    ``front_conventions`` are (name, line, column) triples from the front
    matter; ``prose_refs`` are (name, line, column) for every ``@{NAME}``.
    Raises one ``DocumentError`` listing every problem.
    """
    table = NameTable(path)
    for name in BUILTIN_CONVENTIONS:
        table.names[name] = Declared(name, "convention", 0, 0)
    for name, line, column in front_conventions:
        table.names[name] = Declared(name, "convention", line, column)
    table.restatable = set(table.names)
    for s in statements:
        for rule in RULES[type(s)]:
            rule(table, s)
    for name, line, column in prose_refs:
        found = table.names.get(name)
        if found is None:
            table.problem(line, column, f"@{{{name}}}: unknown name '{name}'{table.suggest(name)}")
        elif found.kind in ("bundle", "fiber", "gauge"):
            table.problem(line, column, f"@{{{name}}}: '{name}' is a {found.kind}, which has no value to show")
    if table.problems:
        raise DocumentError.of(sorted(table.problems, key=lambda p: (p.location.line, p.location.column)))
    return table.names
