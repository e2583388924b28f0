"""A document's symbols as one region: declarations, bounds and the relations between them.

``symbol Nf: integer, Nc < Nf < 3*Nc`` relates Nf to the earlier Nc.  Each
side of a relation is linear (the parser made sure), so it is read here
node by node into a sympy expression of plain symbols, and the whole list
of declarations goes to ``algebra.region.build_region``.  The region then
serves sampling, the sign oracle of checks, extremization and the test that
a ``for`` point lies inside it.
"""
from __future__ import annotations

import operator
from dataclasses import dataclass, field

from ..algebra.lazysympy import sympy
from ..algebra.region import Region, build_region
from ..algebra.sampling import SymbolSpec
from ..errors import DocumentError, Location
from ..statements import clause_nodes as cn, expr_nodes as en, nodes as n

_LINEAR = {"+": operator.add, "-": operator.sub, "*": operator.mul, "/": operator.truediv}


def linear_form(node) -> sympy.Expr:
    """One side of a relation as a sympy expression (its symbols plain, by name)."""
    if isinstance(node, en.Num):
        return sympy.Rational(node.value.numerator, node.value.denominator)
    if isinstance(node, en.Name):
        return sympy.Symbol(str(node.id))
    if isinstance(node, en.Unary):
        side = linear_form(node.operand)
        return -side if node.op == "-" else side
    if isinstance(node, en.Binary) and node.op in _LINEAR:
        return _LINEAR[node.op](linear_form(node.left), linear_form(node.right))
    raise DocumentError(Location("", node.line, node.column),
                        "a relation between symbols is linear in them")


@dataclass(frozen=True)
class DeclaredSymbol:
    """A declared symbol as the ring, the scope and the checks key it: equal
    by name, so nothing needs sympy until an edge (radicals, solving,
    series, sampling) asks for ``sympy()``, the Symbol with the declared
    assumptions."""

    name: str
    spec: SymbolSpec = field(compare=False, repr=False)

    def __str__(self) -> str:
        return self.name

    def sympy(self):
        return self.spec.symbol


def _latest(names, relation: cn.Relation) -> str:
    """The name of the declaration a relation belongs to: the last one of
    the statement's names that it mentions."""
    mentioned = linear_form(relation.lhs).free_symbols | linear_form(relation.rhs).free_symbols
    own = [name for name in names if sympy.Symbol(name) in mentioned]
    return own[-1] if own else names[-1]


def document_region(path: str, statements) -> Region:
    """The region of every ``symbol`` statement, in order; a declaration or
    relation no point satisfies (or that is not linear) is a located error."""
    entries, sites = [], []
    for s in (s for s in statements if isinstance(s, n.SymbolDecl)):
        for name in s.names:
            bounds = [(b.op, b.value) for b in s.bounds if b.name == name]
            mine = [r for r in s.relations if _latest(s.names, r) == name]
            try:
                relations = [(linear_form(r.lhs), r.op, linear_form(r.rhs)) for r in mine]
            except DocumentError as exc:
                raise DocumentError(Location(path, exc.location.line, exc.location.column),
                                    exc.message) from None
            entries.append((str(name), s.assumptions, bounds, relations))
            sites.append((s, mine))
    try:
        if not any(relations for *_, relations in entries):  # no sympy needed
            return Region(tuple(SymbolSpec.declare(name, assumptions, bounds)
                                for name, assumptions, bounds, _ in entries))
        return build_region(entries)
    except ValueError as exc:
        raise _located(path, entries, sites, exc) from None


def _located(path: str, entries, sites, exc: ValueError) -> DocumentError:
    """Where the first declaration that cannot be added to the region is
    written: at the relation the message quotes, else at the statement."""
    for k in range(1, len(entries) + 1):
        try:
            build_region(entries[:k])
        except ValueError as first:
            statement, relations = sites[k - 1]
            message = str(first)
            for node, (lhs, op, rhs) in zip(relations, entries[k - 1][3]):
                if message.startswith(f"{sympy.sstr(lhs)} {op} {sympy.sstr(rhs)}"):
                    return DocumentError(Location(path, node.line, node.column), message)
            return DocumentError(Location(path, statement.line, statement.column), message)
    return DocumentError(Location(path, 1, 1), str(exc))
