"""The Pratt parser for expressions, reading from a ``Cursor``.

Operators by binding power, function calls with their argument counts,
representations inside ``ch``/``tr``, and the special forms ``sum``, ``prod``,
``leading`` and ``series``; it builds ``expr_nodes``.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Optional

from compiler.statements import expr_nodes as en, words
from compiler.statements.core import Cursor, did_you_mean
from compiler.statements.lexer import Token
from compiler.statements.tree import Ident

MAX_EXPONENT = 1000
#: Deep enough for any formula, shallow enough never to hit Python's stack.
MAX_NESTING = 60

#: Binding powers: ``^`` above unary minus above ``* /`` above ``+ -``.
_INFIX = {"+": 10, "-": 10, "*": 20, "/": 20, "^": 40, "**": 40}
_UNARY = 30

#: Argument counts other than one.
_ARITY = {"wedge": (2,), "sym": (2,), "part": (2,), "ch": (1, 2), "tr": (2, 3)}
#: Functions whose second argument may be a representation (``RepSpec``).
_REPRESENTATION_ARGUMENT = frozenset({"ch", "tr"})
#: Largest Dynkin label or power written in a representation.
MAX_LABEL = 1000


def arity(func: str) -> tuple[int, ...]:
    return _ARITY.get(func, (1,))


def expr(c: Cursor, rbp: int = 0) -> en.Expr:
    """Pratt loop: operators bind while their power exceeds ``rbp``."""
    c.depth += 1
    if c.depth > MAX_NESTING:
        c.fail(c.peek(), f"expression nested more than {MAX_NESTING} deep")
    left = _prefix(c)
    while True:
        token = c.peek()
        power = _INFIX.get(token.text) if token.kind == "op" else None
        if power is None or power <= rbp:
            break
        c.next()
        if power == _INFIX["^"]:
            left = en.Binary("^", left, _exponent(c), token.line, token.column)
            if c.at("^") or c.at("**"):
                c.fail(c.peek(), "an exponent must be an integer literal; "
                                 "use parentheses, as in (x^2)^3")
        else:
            left = en.Binary(token.text, left, expr(c, power), token.line, token.column)
    c.depth -= 1
    return left


def literal(c: Cursor) -> en.Num:
    """The integer literal at the cursor, as a ``Num``."""
    token = c.next()
    return en.Num(Fraction(token.value), token.line, token.column)


def _prefix(c: Cursor) -> en.Expr:
    token = c.peek()
    if token.kind == "int":
        return literal(c)
    if token.kind == "name":
        return _name_or_call(c)
    if c.accept("("):
        inner = expr(c)
        c.expect(")")
        return inner
    if c.at("-") or c.at("+"):
        c.next()
        return en.Unary(token.text, expr(c, _UNARY), token.line, token.column)
    if c.at("["):
        c.fail(token, "square brackets are not used in expressions; use parentheses")
    if token.kind == "string":
        c.fail(token, "strings are not allowed in expressions (only 'use' takes one)")
    c.expected("an expression")


def _name_or_call(c: Cursor) -> en.Expr:
    token = c.peek()
    chiral = _chiral_spinor(c, token)
    if chiral:
        c.pos += 3
        args = (expr(c),)
        c.expect(")")
        return en.Call(chiral, args, token.line, token.column)
    name = c.name()
    if not c.at("("):
        return en.Name(name, name.line, name.column)
    form = SPECIAL_FORMS.get(name)
    if form is not None:
        c.next()
        node = form(c, name)
        c.expect(")")
        return node
    c.next()
    args = [expr(c)]
    while c.accept(","):
        if name in _REPRESENTATION_ARGUMENT and len(args) == 1 and _at_representation(c, name):
            args.append(representation(c))
        else:
            args.append(expr(c))
    c.expect(")")
    if not words.is_builtin_function(name):
        # A function the document defines: the name pass checks that it
        # exists and takes this many arguments.
        return en.Apply(name, tuple(args), token.line, token.column)
    wanted = arity(name)
    if len(args) not in wanted:
        counts = " or ".join(map(str, wanted))
        c.fail(token, f"{name}() takes {counts} argument"
                      f"{'s' if wanted != (1,) else ''}, found {len(args)}")
    return en.Call(str(name), tuple(args), token.line, token.column)


def _chiral_spinor(c: Cursor, name: Token) -> Optional[str]:
    """``S+(`` or ``S-(`` written without spaces: the chiral spinor bundles."""
    sign, paren = c.peek(1), c.peek(2)
    if name.text == "S" and sign.kind == "op" and sign.text in "+-" and paren.text == "(" \
            and sign.column == name.end_column and paren.column == sign.end_column:
        return "S" + sign.text
    return None


def _at_representation(c: Cursor, func: str) -> bool:
    """The second argument of ch(G, rep), and of tr(G, rep, k) when a third follows."""
    token, after = c.peek(), c.peek(1)
    if c.at("[") or func == "ch":
        return True
    return token.kind == "name" and (token.text in words.REPRESENTATION_WORDS or after.text == ",")


def representation(c: Cursor) -> en.RepSpec:
    """``adjoint``, ``spinor+``, ``antisymmetric(3)`` or Dynkin labels ``[1, 0, 2]``."""
    start = c.peek()
    if c.accept("["):
        labels = [_small(c, "a Dynkin label")]
        while c.accept(","):
            labels.append(_small(c, "a Dynkin label"))
        c.expect("]")
        return en.RepSpec("", None, tuple(labels), start.line, start.column)
    if start.kind != "name" or start.text not in words.REPRESENTATION_WORDS:
        c.fail(start, "expected a representation: "
               + ", ".join(sorted(words.REPRESENTATION_WORDS)) + " or Dynkin labels such as [1, 0]"
               + (did_you_mean(start.text, words.REPRESENTATION_WORDS) if start.kind == "name" else ""))
    word = c.next().text
    sign = c.peek()
    if word == "spinor" and sign.kind == "op" and sign.text in "+-" and sign.column == start.end_column:
        c.next()
        word += sign.text
    power = None
    if c.accept("("):
        power = _small(c, "a power")
        c.expect(")")
    return en.RepSpec(word, power, (), start.line, start.column)


def _small(c: Cursor, what: str) -> int:
    token = c.peek()
    value = c.integer(what)
    if not 0 <= value <= MAX_LABEL:
        c.fail(token, f"{what} must be from 0 to {MAX_LABEL}, not {value}")
    return value


#: Most terms a ``series`` may ask for.
MAX_SERIES_TERMS = 20


def _sum(c: Cursor, word: Ident) -> en.Sum:
    """``sum(body, k = low..high)`` (or ``prod``), after the ``(``."""
    body = expr(c)
    c.expect(",")
    index = c.name("the index of the range, as in k = 1..N")
    c.expect("=")
    low = expr(c)
    c.expect("..")
    high = expr(c)
    return en.Sum(str(word), body, index, low, high, word.line, word.column)


def _expansion(c: Cursor, word: Ident) -> en.Expansion:
    """``leading(f, N)``, ``series(f, N, 3)``; ``N = 0`` expands at a point."""
    target = expr(c)
    c.expect(",")
    variable = c.name("the symbol to expand in")
    point = c.rational() if c.accept("=") else None
    terms = 1
    if word == "series":
        c.expect(",")
        terms = c.positive_integer("the number of terms", MAX_SERIES_TERMS)
    return en.Expansion(str(word), target, variable, point, terms, word.line, word.column)


#: Built-ins with a syntax of their own inside the parentheses.
SPECIAL_FORMS = {"sum": _sum, "prod": _sum, "leading": _expansion, "series": _expansion}


def _exponent(c: Cursor) -> en.Num:
    """An integer literal, optionally signed or in parentheses: ``x^-1``."""
    start = c.peek()
    depth = 0
    while c.accept("("):
        depth += 1
        if depth > MAX_NESTING:
            c.fail(start, f"expression nested more than {MAX_NESTING} deep")
    sign = c.sign()
    if c.peek().kind != "int" or any(
            not (c.peek(1 + i).kind == "op" and c.peek(1 + i).text == ")")
            for i in range(depth)):
        c.fail(start, "an exponent must be an integer literal such as 2 or -1"
                      " (use sqrt(x) for a square root)")
    value = sign * c.next().value
    c.pos += depth
    if abs(value) > MAX_EXPONENT:
        c.fail(start, f"exponent {value} is too large (at most {MAX_EXPONENT} in size)")
    return en.Num(Fraction(value), start.line, start.column)


def equation(c: Cursor, bare: bool) -> en.Equation:
    """``lhs = rhs``; with ``bare``, a lone expression (it vanishes)."""
    start = c.peek()
    lhs = expr(c)
    if c.at("="):
        c.next()
        return en.Equation(lhs, expr(c), start.line, start.column)
    if not bare:
        c.expected("'='")
    return en.Equation(lhs, None, start.line, start.column)


def equations(c: Cursor, bare: bool) -> tuple[en.Equation, ...]:
    items = [equation(c, bare)]
    while c.accept(","):
        items.append(equation(c, bare))
    return tuple(items)


def expr_list(c: Cursor) -> tuple[en.Expr, ...]:
    items = [expr(c)]
    while c.accept(","):
        items.append(expr(c))
    return tuple(items)
