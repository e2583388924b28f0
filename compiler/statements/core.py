"""The token cursor every parsing rule reads from.

A ``Cursor`` walks the tokens of one logical line; rule functions (the
statement table in ``rules``, the fiber tables in ``fibers``, the expression
parser in ``expr_parser``) take it and return nodes.  A rule that meets
something wrong calls ``fail``, which raises a ``DocumentError`` at the
offending token: one problem per statement.
"""
from __future__ import annotations

import difflib
from fractions import Fraction
from typing import NoReturn, Optional

from compiler.errors import DocumentError, Location
from compiler.statements import words
from compiler.statements.lexer import LogicalLine, Token
from compiler.statements.tree import Ident


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

    def options(self, readers: dict) -> dict:
        """``, word value`` pairs in any order, each at most once: word -> what
        ``readers[word](cursor)`` read."""
        values = {}
        while self.accept(","):
            token = self.peek()
            if token.kind != "name" or token.text not in readers:
                self.expected(" or ".join(f"'{w}'" for w in readers))
            if token.text in values:
                self.fail(token, f"'{token.text}' is given twice")
            self.next()
            values[token.text] = readers[token.text](self)
        return values

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

    def even_dimension(self, what: str, limit: int, odd: str) -> int:
        """A positive even integer literal up to ``limit``; ``odd`` says why,
        formatted with the odd value found."""
        token = self.peek()
        value = self.positive_integer(what, limit)
        if value % 2:
            self.fail(token, odd.format(value))
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


def _ends_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text in (")", "]"))


def _starts_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text == "(")
