"""Names and order: the static pass between parsing and evaluation.

Before any algebra runs, every statement is walked in document order to make
sure each name is declared on an earlier line, bound once (``let!`` aside)
and used as the right kind of thing.  These are the problems that make a
document impossible to compile (exit 2, no output files), so they are found
all at once and reported together, before the first computation.
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass, fields, is_dataclass

from .errors import DocumentError, Location, Problem
from .statements import nodes as n

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
        close = difflib.get_close_matches(name, list(self.names), n=1)
        return f" (did you mean '{close[0]}'?)" if close else ""

    def declare(self, name: str, kind: str, line: int, column: int,
                rebind: bool = False) -> None:
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


def _names_in(obj):
    """Every ``Name`` node inside a syntax tree, in order (without recursion:
    a sum of a thousand terms is a tree a thousand deep)."""
    stack = [obj]
    while stack:
        item = stack.pop()
        if isinstance(item, n.Name):
            yield item
        elif isinstance(item, tuple):
            stack.extend(reversed(item))
        elif is_dataclass(item):
            stack.extend(reversed([getattr(item, f.name) for f in fields(item)]))


def references(statement) -> list[str]:
    """Every name a statement reads, in order: the inputs of its result."""
    found = [name.id for name in _names_in(statement)]
    if isinstance(statement, n.Integrate):
        found.append(statement.fiber)
    if isinstance(statement, n.Extremize):
        found += [v.name for v in statement.variables]
    if isinstance(statement, n.SplitDecl):
        found += [statement.bundle] + [p.name for p in statement.parts if p.name]
    if isinstance(statement, n.SphereFiber):
        found.append(statement.bundle)
    if isinstance(statement, n.Plot):
        found.append(statement.variable)
    found += [c.name for c in getattr(statement, "clauses", ())]
    return list(dict.fromkeys(found))


def bound_names(statement) -> list[str]:
    """Every name a statement binds (so a failed one can mark them missing)."""
    if isinstance(statement, (n.SymbolDecl, n.BundleDecl)):
        return list(statement.names)
    if isinstance(statement, (n.ConventionDecl, n.Let)):
        return [statement.name]
    if isinstance(statement, n.SurfaceFiber):
        return [statement.name, statement.tangent]
    if isinstance(statement, n.SphereFiber):
        return [statement.name, statement.angular]
    if isinstance(statement, n.GeneralFiber):
        return [statement.name] + [c.name for c in statement.classes]
    return list(getattr(statement, "outputs", ()))


def _use_all(table: NameTable, obj) -> None:
    for name in _names_in(obj):
        table.use(name.id, name.line, name.column)


# One function per statement kind: what it uses, then what it binds.

def _symbol(t: NameTable, s: n.SymbolDecl) -> None:
    for name in s.names:
        t.declare(name, "symbol", s.line, s.column)
    for b in s.bounds:
        if b.name not in s.names:
            t.problem(b.line, b.column, f"the bound on '{b.name}' must belong to a symbol declared in this statement")


def _convention(t: NameTable, s: n.ConventionDecl) -> None:
    if s.name in t.restatable:
        t.restatable.discard(s.name)  # a built-in or front-matter convention given its default here
        return
    t.declare(s.name, "convention", s.line, s.column)


def _bundle(t: NameTable, s: n.BundleDecl) -> None:
    for name in s.names:
        t.declare(name, "bundle", s.line, s.column)


def _split(t: NameTable, s: n.SplitDecl) -> None:
    t.use(s.bundle, s.line, s.column, ("bundle",))
    for part in s.parts:
        if part.name is not None:
            t.use(part.name, part.line, part.column, ("bundle",))
            if part.name == s.bundle:
                t.problem(part.line, part.column, f"'{s.bundle}' cannot be split into itself")


def _surface(t: NameTable, s: n.SurfaceFiber) -> None:
    _use_all(t, s.genus)
    t.declare(s.name, "fiber", s.line, s.column)
    t.declare(s.tangent, "bundle", s.line, s.column)


def _sphere(t: NameTable, s: n.SphereFiber) -> None:
    t.use(s.bundle, s.line, s.column, ("bundle",))
    t.declare(s.name, "fiber", s.line, s.column)
    t.declare(s.angular, "class", s.line, s.column)


def _general(t: NameTable, s: n.GeneralFiber) -> None:
    t.declare(s.name, "fiber", s.line, s.column)
    for c in s.classes:
        t.declare(c.name, "class", c.line, c.column)
    _use_all(t, s.relations)
    _use_all(t, s.integrals)


def _let(t: NameTable, s: n.Let) -> None:
    _use_all(t, s.expr)
    t.declare(s.name, "value", s.line, s.column, rebind=s.rebind)


def _operation(t: NameTable, s) -> None:
    for field_name in ("target", "pairs", "relations", "monomials"):
        if hasattr(s, field_name):
            _use_all(t, getattr(s, field_name))
    if isinstance(s, n.Integrate):
        t.use(s.fiber, s.fiber_line, s.fiber_column, ("fiber",))
    for out in s.outputs:
        t.declare(out, "value", s.line, s.column)


def _extremize(t: NameTable, s: n.Extremize) -> None:
    _use_all(t, s.target)
    for v in s.variables:
        t.use(v.name, v.line, v.column, ("symbol",), role="declared symbol to vary")
    for out in s.outputs:
        t.declare(out, "value", s.line, s.column)


def _clauses(t: NameTable, clauses) -> None:
    for c in clauses:
        t.use(c.name, c.line, c.column, ("symbol",), role="symbol to substitute")
        if c.value is not None:
            _use_all(t, c.value)


def _check(t: NameTable, s: n.Check) -> None:
    _use_all(t, (s.lhs, s.rhs))
    _clauses(t, s.clauses)


def _show(t: NameTable, s) -> None:
    _use_all(t, s.exprs)
    _clauses(t, getattr(s, "clauses", ()))


def _plot(t: NameTable, s: n.Plot) -> None:
    _show(t, s)
    t.use(s.variable, s.line, s.column, ("symbol",), role="symbol to plot over")


RULES = {
    n.SymbolDecl: _symbol, n.ConventionDecl: _convention, n.BundleDecl: _bundle,
    n.SplitDecl: _split, n.SurfaceFiber: _surface, n.SphereFiber: _sphere,
    n.GeneralFiber: _general, n.Let: _let, n.Substitute: _operation,
    n.Reduce: _operation, n.Integrate: _operation, n.Coefficients: _operation,
    n.Extremize: _extremize, n.Check: _check, n.Show: _show, n.Table: _show,
    n.Plot: _plot,
}


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
        RULES[type(s)](table, s)
    for name, line, column in prose_refs:
        found = table.names.get(name)
        if found is None:
            table.problem(line, column, f"@{{{name}}}: unknown name '{name}'{table.suggest(name)}")
        elif found.kind in ("bundle", "fiber"):
            table.problem(line, column, f"@{{{name}}}: '{name}' is a {found.kind}, which has no value to show")
    if table.problems:
        raise DocumentError.of(sorted(table.problems, key=lambda p: (p.location.line, p.location.column)))
    return table.names
