"""The ``symbol`` rule: names, assumption words, bounds and relations.

``symbol g: integer, g >= 2`` bounds a symbol by a rational literal (a
``Bound``); ``symbol Nf: integer, Nc < Nf < 3*Nc`` relates it to symbols
declared earlier (``Relation``s, whose sides are linear with rational
coefficients).  Items are comma-separated; a chain runs one way.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Optional

from compiler.statements import clause_nodes as cn, expr_nodes as en, nodes as n
from compiler.statements.core import Cursor, did_you_mean
from compiler.statements.expr_parser import expr
from compiler.statements.lexer import Token
from compiler.statements.tree import Ident, walk

ASSUMPTIONS = ("integer", "positive", "nonnegative", "real", "nonzero")
BOUND_OPS = ("<", "<=", ">", ">=")
_FLIP = {"<": ">", "<=": ">=", ">": "<", ">=": "<="}
_COMPARISONS = BOUND_OPS + ("=", "==", "!=")
#: After a name, these make it the start of a comparison, not an assumption word.
_OPERAND_OPS = _COMPARISONS + ("+", "-", "*", "/", "^", "**", "(")


def symbol_rule(c: Cursor) -> n.SymbolDecl:
    names = c.name_list("a symbol name")
    assumptions: list[str] = []
    bounds: list[cn.Bound] = []
    relations: list[cn.Relation] = []
    if c.accept(":"):
        while True:
            after = c.peek(1)
            if c.peek().kind == "name" and not (after.kind == "op" and after.text in _OPERAND_OPS):
                _assumption(c, assumptions)
            else:
                _comparison(c, set(names), bounds, relations)
            if not c.accept(","):
                break
    return n.SymbolDecl(tuple(names), tuple(assumptions), tuple(bounds), **c.span,
                        relations=tuple(relations))


def _assumption(c: Cursor, assumptions: list[str]) -> None:
    word = c.next()
    if word.text not in ASSUMPTIONS:
        c.fail(word, f"unknown assumption '{word.text}' (allowed: {', '.join(ASSUMPTIONS)})"
               + did_you_mean(word.text, ASSUMPTIONS))
    if word.text not in assumptions:
        assumptions.append(word.text)


def _comparison(c: Cursor, declared: set, bounds: list, relations: list) -> None:
    """``g >= 2``, ``0 < x < 1``, ``Nf > Nc``, ``Nc < Nf < 3*Nc``."""
    first = c.peek()
    sides = [(first, expr(c))]
    ops: list[tuple[Token, str]] = []
    while not ops or (c.peek().kind == "op" and c.peek().text in _COMPARISONS):
        token = c.peek()
        if token.kind != "op" or token.text not in BOUND_OPS:
            c.fail(token, f"a bound compares with <, <=, > or >=, found {c.describe(token)}")
        if ops and (token.text in ("<", "<=")) != (ops[0][1] in ("<", "<=")):
            c.fail(token, "a chained bound runs one way, as in 0 < x < 1")
        ops.append((c.next(), token.text))
        sides.append((c.peek(), expr(c)))
    for index, (_, op) in enumerate(ops):
        (left_token, left), (right_token, right) = sides[index], sides[index + 1]
        bound = _as_bound(c, left, op, right_token, right, declared) or \
            _as_bound(c, right, _FLIP[op], left_token, left, declared)
        if bound is not None:
            bounds.append(cn.Bound(bound[0], bound[1], bound[2], first.line, first.column))
            continue
        _require_linear(c, left)
        _require_linear(c, right)
        if not any(name in declared for side in (left, right) for name in _symbols(side)):
            stray = next(iter(_symbols(left) or _symbols(right)), None)
            if stray is None:
                c.fail(left_token, "a bound needs a symbol, as in g >= 2")
            c.fail(stray, f"a bound on '{stray}', which this statement does not declare")
        relations.append(cn.Relation(left, op, right, left_token.line, left_token.column))


def _own_symbol(side: en.Expr, declared: set) -> Optional[Ident]:
    return side.id if isinstance(side, en.Name) and side.id in declared else None


def _as_bound(c: Cursor, side: en.Expr, op: str, other_token: Token, other: en.Expr,
              declared: set) -> Optional[tuple]:
    """``(symbol, op, value)`` when ``side`` is a symbol of this statement and
    ``other`` a rational literal (``2``, ``-3``, ``1/2``), else None."""
    symbol = _own_symbol(side, declared)
    if symbol is None:
        return None
    value = _rational_literal(c, other)
    if value is None:
        if not _symbols(other):
            c.fail(other_token, "expected a rational number such as 2, -3 or 1/2, found "
                                f"{c.describe(other_token)}")
        return None
    return symbol, op, value


def _rational_literal(c: Cursor, side: en.Expr) -> Optional[Fraction]:
    """``[+-] int [/ int]`` as written, else None (division by zero fails)."""
    sign = 1
    if isinstance(side, en.Unary):
        sign, side = (-1 if side.op == "-" else 1), side.operand
    if isinstance(side, en.Binary) and side.op == "/" and isinstance(side.right, en.Num):
        numerator = side.left
        if isinstance(numerator, en.Unary) and isinstance(numerator.operand, en.Num):
            sign, numerator = sign * (-1 if numerator.op == "-" else 1), numerator.operand
        if not isinstance(numerator, en.Num):
            return None
        if side.right.value == 0:
            c.fail(side, "division by zero")
        return sign * numerator.value / side.right.value
    if isinstance(side, en.Num):
        return sign * side.value
    return None


def _symbols(side: en.Expr) -> list[Ident]:
    return [item for item, _ in walk(side) if isinstance(item, Ident)]


def _require_linear(c: Cursor, side: en.Expr) -> None:
    """A side of a relation: sums of rational multiples of symbols."""
    for node, _ in walk(side):
        if isinstance(node, en.Call):
            c.fail(node, f"a relation between symbols is linear: '{node.func}(...)' "
                         "cannot appear in it")
        if not isinstance(node, en.Binary):
            continue
        if node.op == "/":
            divisor = _rational_literal(c, node.right)
            if divisor is None:
                c.fail(node, "a relation between symbols divides only by a number, as in Nc/2")
            if divisor == 0:
                c.fail(node, "division by zero")
        if node.op == "^" or (node.op == "*" and _symbols(node.left) and _symbols(node.right)):
            c.fail(node, "a relation between symbols is linear: rational multiples of "
                         "symbols, added (such as 3*Nc or Nc/2 + 1)")
