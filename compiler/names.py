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
from .statements import nodes as n
from .statements.tree import Ident, walk

#: "Did you mean" is searched for this many problems, then no more.
MAX_SUGGESTIONS = 20
#: Conventions every document has, with their defaults.
BUILTIN_CONVENTIONS = {"angular_integral": 2}


@dataclass(frozen=True)
class Declared:
    """What a name stands for and where it was first bound."""

    name: str
    kind: str  # symbol, convention, bundle, fiber, class, value
    line: int
    column: int


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
                rebind: bool = False) -> None:
        if kind == "convention" and name in self.restatable:
            self.restatable.discard(name)  # a built-in or front-matter default restated
            return
        old = self.names.get(name)
        if rebind:
            if old is None:
                self.problem(line, column, f"let! rebinds '{name}', but it is not bound yet; use let")
            elif old.kind != "value":
                where = f"declared at line {old.line}" if old.line else "built in"
                self.problem(line, column, f"let! cannot rebind the {old.kind} '{name}' ({where})")
            return
        if old is not None:
            hint = "; use let! to rebind it on purpose" if old.kind == "value" else ""
            where = f"at line {old.line}" if old.line else "as a built-in convention"
            self.problem(line, column, f"'{name}' is already bound {where}{hint}")
            return
        self.names[name] = Declared(name, kind, line, column)

    def use(self, name: str, line: int, column: int, kinds: tuple[str, ...] | None = None,
            role: str = "") -> None:
        found = self.names.get(name)
        if found is None:
            self.problem(line, column, f"unknown name '{name}'{self.suggest(name)}")
        elif kinds is not None and found.kind not in kinds:
            what = role or " or ".join(kinds)
            self.problem(line, column,
                         f"'{name}' is a {found.kind} (line {found.line}), but a {what} is needed here")


def _idents(statement, field: str) -> Iterator[tuple[Ident, object]]:
    """The identifiers in one field of a statement, each with its parent node."""
    for item, parent in walk(getattr(statement, field)):
        if isinstance(item, Ident):
            yield item, parent


@dataclass(frozen=True)
class Use:
    """The names in field ``field`` are read.  A name written on its own (a
    fiber after ``over``, a ``for`` target) must be one of ``kinds``; a name
    inside an expression must be one of ``expr_kinds`` (None: any kind)."""

    field: str
    kinds: Optional[tuple[str, ...]] = None
    role: str = ""
    expr_kinds: Optional[tuple[str, ...]] = None

    def __call__(self, table: "NameTable", statement) -> None:
        for name, parent in _idents(statement, self.field):
            in_expression = isinstance(parent, n.Name)
            table.use(name, name.line, name.column,
                      self.expr_kinds if in_expression else self.kinds,
                      "" if in_expression else self.role)


@dataclass(frozen=True)
class Bind:
    """The names in field ``field`` are bound as ``kind``; a problem points
    at the node that binds them (the statement, or a piece such as a fiber
    body's ``class`` line)."""

    field: str
    kind: str

    def __call__(self, table: "NameTable", statement) -> None:
        for name, parent in _idents(statement, self.field):
            site = parent or statement
            table.declare(name, self.kind, site.line, site.column,
                          rebind=getattr(statement, "rebind", False))


def _not_into_itself(table: "NameTable", s: n.SplitDecl) -> None:
    for part in s.parts:
        if part.name == s.bundle:
            table.problem(part.line, part.column, f"'{s.bundle}' cannot be split into itself")


def _relations_not_evaluated(table: "NameTable", s: n.SymbolDecl) -> None:
    # The parser reads relations between symbols; until sampling and the
    # sign oracle honour them, a document using one must not pass silently.
    for r in s.relations:
        table.problem(r.line, r.column, "relations between symbols (such as Nf > Nc) are "
                                        "not evaluated yet; bound each symbol by numbers")


_OUT = (Bind("outputs", "value"),)
_FOR = Use("clauses", ("symbol",), "symbol to substitute")

#: What each statement reads and binds: callables ``(table, statement)``
#: applied in order; the ``Use`` and ``Bind`` entries also give ``references``
#: and ``bound_names``.  The one table of statement kinds: the engine's
#: handlers must cover exactly its keys.
RULES: dict[type, tuple] = {
    n.SymbolDecl: (Bind("names", "symbol"),
                   Use("relations", expr_kinds=("symbol",)), _relations_not_evaluated),
    n.ConventionDecl: (Bind("name", "convention"),),
    n.BundleDecl: (Bind("names", "bundle"),),
    n.SplitDecl: (Use("bundle", ("bundle",)), Use("parts", ("bundle",)), _not_into_itself),
    n.SurfaceFiber: (Use("genus"), Bind("name", "fiber"), Bind("tangent", "bundle")),
    n.SphereFiber: (Use("bundle", ("bundle",)), Bind("name", "fiber"), Bind("angular", "class")),
    n.GeneralFiber: (Bind("name", "fiber"), Bind("classes", "class"),
                     Use("relations"), Use("integrals")),
    n.FixedPointFiber: (Bind("name", "fiber"), Bind("parameters", "class"), Use("identified"),
                        Use("points"), Bind("tangent", "bundle"), Bind("lines", "bundle"),
                        Use("line_values")),
    n.Let: (Use("expr"), Bind("name", "value")),
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
             for name, _ in _idents(statement, entry.field)]
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
        elif found.kind in ("bundle", "fiber"):
            table.problem(line, column, f"@{{{name}}}: '{name}' is a {found.kind}, which has no value to show")
    if table.problems:
        raise DocumentError.of(sorted(table.problems, key=lambda p: (p.location.line, p.location.column)))
    return table.names
