"""The token cursor every parsing rule reads from, and the Pratt expression parser.

A ``Cursor`` walks the tokens of one logical line; rule functions (the
statement table in ``rules``, the fiber tables in ``fibers``) take it and
return nodes.  A rule that meets something wrong calls ``fail``, which
raises a ``DocumentError`` at the offending token: one problem per statement.
"""
from __future__ import annotations

import difflib
from fractions import Fraction
from typing import NoReturn, Optional

from compiler.errors import DocumentError, Location
from compiler.statements import nodes as n, words
from compiler.statements.lexer import LogicalLine, Token
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


def did_you_mean(word: str, choices) -> str:
    close = difflib.get_close_matches(word, sorted(choices), n=1)
    return f"; did you mean '{close[0]}'?" if close else ""


class Cursor:
    """The tokens of one logical line and the position reached in them."""

    def __init__(self, logical: LogicalLine, path: str):
        self.tokens = logical.tokens
        self.path = path
        self.pos = 0
        self.depth = 0
        last = self.tokens[-1]
        self.end = Token("end", "", last.line, last.end_column, last.end_column)
        first = self.tokens[0]
        #: The position fields every statement node carries.
        self.span = dict(line=first.line, column=first.column,
                         end_line=logical.end_line, source=logical.source)

    def fail(self, at, message: str) -> NoReturn:
        """Stop this statement with a problem at ``at``: a token, an
        ``Ident`` or a node (anything with ``line`` and ``column``)."""
        raise DocumentError(Location(self.path, at.line, at.column), message)

    def peek(self, offset: int = 0) -> Token:
        index = self.pos + offset
        return self.tokens[index] if index < len(self.tokens) else self.end

    def next(self) -> Token:
        token = self.peek()
        self.pos += 1
        return token

    def at(self, text: str) -> bool:
        token = self.peek()
        return token.kind == "op" and token.text == text

    def at_word(self, word: str) -> bool:
        token = self.peek()
        return token.kind == "name" and token.text == word

    def accept(self, text: str) -> bool:
        if self.at(text):
            self.pos += 1
            return True
        return False

    @staticmethod
    def describe(token: Token) -> str:
        return "end of line" if token.kind == "end" else f"'{token.text}'"

    def expected(self, what: str) -> NoReturn:
        token = self.peek()
        self.fail(token, f"expected {what}, found {self.describe(token)}")

    def expect(self, text: str) -> Token:
        if not self.at(text):
            self.expected(f"'{text}'")
        return self.next()

    def expect_word(self, word: str) -> Token:
        if not self.at_word(word):
            self.expected(f"'{word}'")
        return self.next()

    def expect_end(self) -> None:
        token = self.peek()
        if token.kind == "end":
            return
        previous = self.tokens[self.pos - 1] if self.pos else None
        hint = ""
        if previous is not None and _ends_operand(previous) and _starts_operand(token):
            hint = " (there is no implicit multiplication; write '*')"
        self.fail(token, f"unexpected {self.describe(token)}{hint}")

    def lexing_problems(self) -> None:
        """The first bad character or literal of the line, if any."""
        for token in self.tokens:
            if token.kind == "error":
                self.fail(token, token.text)

    # ------------------------------------------------------------ names and numbers

    def name(self, what: str = "a name") -> Ident:
        token = self.peek()
        if token.kind != "name":
            self.expected(what)
        if token.text in words.STATEMENT_WORDS:
            self.fail(token, f"'{token.text}' is a statement word and cannot be a name")
        self.next()
        return Ident(token.text, token.line, token.column)

    def name_list(self, what: str) -> list[Ident]:
        names = [self.name(what)]
        while self.accept(","):
            names.append(self.name(what))
        self.no_duplicates(names)
        return names

    def no_duplicates(self, names: list[Ident]) -> None:
        seen = set()
        for name in names:
            if name in seen:
                self.fail(name, f"'{name}' appears twice")
            seen.add(name)

    def outputs(self, count: Optional[int] = None, what: str = "") -> tuple[Ident, ...]:
        arrow = self.expect("->")
        names = self.name_list("an output name")
        if count is not None and len(names) != count:
            self.fail(arrow, f"{what} needs {count} output name{'s' if count != 1 else ''}, "
                             f"found {len(names)}")
        return tuple(names)

    def sign(self) -> int:
        if self.accept("-"):
            return -1
        self.accept("+")
        return 1

    def integer(self, what: str) -> int:
        sign = self.sign()
        if self.peek().kind != "int":
            self.expected(what)
        return sign * self.next().value

    def positive_integer(self, what: str, limit: Optional[int] = None) -> int:
        """A positive integer literal; with ``limit``, at most that (the
        digits are checked before any work depends on the value)."""
        token = self.peek()
        value = self.integer(what)
        if value <= 0:
            self.fail(token, f"{what} must be positive, not {value}")
        if limit is not None and value > limit:
            self.fail(token, f"{what} is at most {limit}, not {value}")
        return value

    def rational(self, what: str = "a rational number such as 2, -3 or 1/2") -> Fraction:
        sign = self.sign()
        if self.peek().kind != "int":
            self.expected(what)
        numerator = self.next().value
        denominator = 1
        if self.at("/"):
            slash = self.next()
            if self.peek().kind != "int":
                self.expected(what)
            denominator = self.next().value
            if denominator == 0:
                self.fail(slash, "division by zero")
        return sign * Fraction(numerator, denominator)


# ---------------------------------------------------------------- expressions


def expr(c: Cursor, rbp: int = 0) -> n.Expr:
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
            left = n.Binary("^", left, _exponent(c), token.line, token.column)
            if c.at("^") or c.at("**"):
                c.fail(c.peek(), "an exponent must be an integer literal; "
                                 "use parentheses, as in (x^2)^3")
        else:
            left = n.Binary(token.text, left, expr(c, power), token.line, token.column)
    c.depth -= 1
    return left


def _prefix(c: Cursor) -> n.Expr:
    token = c.peek()
    if token.kind == "int":
        c.next()
        return n.Num(Fraction(token.value), token.line, token.column)
    if token.kind == "name":
        return _name_or_call(c)
    if c.accept("("):
        inner = expr(c)
        c.expect(")")
        return inner
    if c.at("-") or c.at("+"):
        c.next()
        return n.Unary(token.text, expr(c, _UNARY), token.line, token.column)
    if c.at("["):
        c.fail(token, "square brackets are not used in expressions; use parentheses")
    if token.kind == "string":
        c.fail(token, "strings are not allowed in expressions (only 'use' takes one)")
    c.expected("an expression")


def _name_or_call(c: Cursor) -> n.Expr:
    token = c.peek()
    chiral = _chiral_spinor(c, token)
    if chiral:
        c.pos += 3
        args = (expr(c),)
        c.expect(")")
        return n.Call(chiral, args, token.line, token.column)
    name = c.name()
    if not c.at("("):
        return n.Name(name, name.line, name.column)
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
        return n.Apply(name, tuple(args), token.line, token.column)
    wanted = arity(name)
    if len(args) not in wanted:
        counts = " or ".join(map(str, wanted))
        c.fail(token, f"{name}() takes {counts} argument"
                      f"{'s' if wanted != (1,) else ''}, found {len(args)}")
    return n.Call(str(name), tuple(args), token.line, token.column)


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


def representation(c: Cursor) -> n.RepSpec:
    """``adjoint``, ``spinor+``, ``antisymmetric(3)`` or Dynkin labels ``[1, 0, 2]``."""
    start = c.peek()
    if c.accept("["):
        labels = [_small(c, "a Dynkin label")]
        while c.accept(","):
            labels.append(_small(c, "a Dynkin label"))
        c.expect("]")
        return n.RepSpec("", None, tuple(labels), start.line, start.column)
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
    return n.RepSpec(word, power, (), start.line, start.column)


def _small(c: Cursor, what: str) -> int:
    token = c.peek()
    value = c.integer(what)
    if not 0 <= value <= MAX_LABEL:
        c.fail(token, f"{what} must be from 0 to {MAX_LABEL}, not {value}")
    return value


#: Most terms a ``series`` may ask for.
MAX_SERIES_TERMS = 20


def _sum(c: Cursor, word: Ident) -> n.Sum:
    """``sum(body, k = low..high)`` (or ``prod``), after the ``(``."""
    body = expr(c)
    c.expect(",")
    index = c.name("the index of the range, as in k = 1..N")
    c.expect("=")
    low = expr(c)
    c.expect("..")
    high = expr(c)
    return n.Sum(str(word), body, index, low, high, word.line, word.column)


def _expansion(c: Cursor, word: Ident) -> n.Expansion:
    """``leading(f, N)``, ``series(f, N, 3)``; ``N = 0`` expands at a point."""
    target = expr(c)
    c.expect(",")
    variable = c.name("the symbol to expand in")
    point = c.rational() if c.accept("=") else None
    terms = 1
    if word == "series":
        c.expect(",")
        terms = c.positive_integer("the number of terms", MAX_SERIES_TERMS)
    return n.Expansion(str(word), target, variable, point, terms, word.line, word.column)


#: Built-ins with a syntax of their own inside the parentheses.
SPECIAL_FORMS = {"sum": _sum, "prod": _sum, "leading": _expansion, "series": _expansion}


def _exponent(c: Cursor) -> n.Num:
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
    return n.Num(Fraction(value), start.line, start.column)


def equation(c: Cursor, bare: bool) -> n.Equation:
    """``lhs = rhs``; with ``bare``, a lone expression (it vanishes)."""
    start = c.peek()
    lhs = expr(c)
    if c.at("="):
        c.next()
        return n.Equation(lhs, expr(c), start.line, start.column)
    if not bare:
        c.expected("'='")
    return n.Equation(lhs, None, start.line, start.column)


def equations(c: Cursor, bare: bool) -> tuple[n.Equation, ...]:
    items = [equation(c, bare)]
    while c.accept(","):
        items.append(equation(c, bare))
    return tuple(items)


def expr_list(c: Cursor) -> tuple[n.Expr, ...]:
    items = [expr(c)]
    while c.accept(","):
        items.append(expr(c))
    return tuple(items)


def _ends_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text in (")", "]"))


def _starts_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text == "(")
