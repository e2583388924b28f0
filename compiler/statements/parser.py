"""Logical lines → statement nodes: recursive descent, Pratt for expressions.

Each statement word has one method, found through ``_STATEMENTS``.  A bad
statement yields exactly one problem (at the offending token) and parsing
goes on with the next line, so the author sees every bad line at once.
Nothing here evaluates anything: document text only ever becomes the frozen
dataclasses of ``nodes``.
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Optional

from compiler.errors import DocumentError, Location, Problem
from compiler.statements import nodes as n
from compiler.statements.lexer import LogicalLine, Token, logical_lines

MAX_EXPONENT = 1000
#: Deep enough for any formula, shallow enough never to hit Python's stack.
MAX_NESTING = 60

ASSUMPTIONS = ("integer", "positive", "nonnegative", "real", "nonzero")
BOUND_OPS = ("<", "<=", ">", ">=")
CHECK_OPS = ("==", "!=", "<", "<=", ">", ">=")
_FLIP = {"<": ">", "<=": ">=", ">": "<", ">=": "<="}
BUNDLE_KINDS = ("real", "complex", "line")
BODY_WORDS = ("class", "relation", "integral")

#: Binding powers: ``^`` above unary minus above ``* /`` above ``+ -``.
_INFIX = {"+": 10, "-": 10, "*": 20, "/": 20, "^": 40, "**": 40}
_UNARY = 30

_TWO_ARGUMENTS = frozenset({"wedge", "sym", "part"})


def arity(func: str) -> int:
    return 2 if func in _TWO_ARGUMENTS else 1


def parse_block(text: str, first_line: int, path: str,
                offsets: tuple[int, ...] = ()) -> list[n.Statement]:
    """Parse one derive block whose first line is line ``first_line`` of ``path``.

    ``offsets[i]`` is how many characters the Markdown container (a list
    item, a block quote) cut from the front of the block's line ``i``, so
    columns stay file columns.

    Raises ``DocumentError`` listing one problem per bad statement.
    """
    statements: list[n.Statement] = []
    problems: list[Problem] = []
    body: Optional[_FiberBody] = None

    def close_body():
        nonlocal body
        if body is not None and body.header is not None:
            statements.append(body.build())
        body = None

    for logical in logical_lines(text, first_line, offsets):
        if logical.blank:
            close_body()
            continue
        parser = _Parser(logical, path)
        if logical.indented:
            if body is None:
                problems.append(parser.problem(
                    logical.tokens[0], "unexpected indentation: only the body lines of a "
                    "'fiber F: dimension n' are indented"))
            elif body.header is not None:
                try:
                    body.add(parser.body_line(), logical)
                except DocumentError as exc:
                    problems.append(exc.problems[0])
            continue
        close_body()
        try:
            result = parser.statement()
        except DocumentError as exc:
            problems.append(exc.problems[0])
            first = logical.tokens[0]
            if first.kind == "name" and first.text == "fiber":
                body = _FiberBody(None)  # its body lines belong to the failed header
            continue
        if isinstance(result, _GeneralHeader):
            body = _FiberBody(result)
        else:
            statements.append(result)
    close_body()
    if problems:
        raise DocumentError.of(problems)
    return statements


@dataclass(frozen=True)
class _GeneralHeader:
    """``fiber F: dimension n``, waiting for its indented body."""

    name: str
    dimension: int
    span: dict


@dataclass
class _FiberBody:
    header: Optional[_GeneralHeader]
    classes: list = field(default_factory=list)
    relations: list = field(default_factory=list)
    integrals: list = field(default_factory=list)
    end_line: int = 0
    sources: list = field(default_factory=list)

    def add(self, parsed: tuple[str, list], logical: LogicalLine) -> None:
        kind, items = parsed
        getattr(self, kind).extend(items)
        self.end_line = logical.end_line
        self.sources.append("  " + logical.source)

    def build(self) -> n.GeneralFiber:
        span = dict(self.header.span)
        span["end_line"] = max(span["end_line"], self.end_line)
        span["source"] = "\n".join([span["source"], *self.sources])
        return n.GeneralFiber(self.header.name, self.header.dimension, tuple(self.classes),
                              tuple(self.relations), tuple(self.integrals), **span)


def _did_you_mean(word: str, choices) -> str:
    close = difflib.get_close_matches(word, sorted(choices), n=1)
    return f"; did you mean '{close[0]}'?" if close else ""


class _Parser:
    """Parses the tokens of one logical line."""

    def __init__(self, logical: LogicalLine, path: str):
        self.tokens = logical.tokens
        self.path = path
        self.pos = 0
        self.depth = 0
        last = self.tokens[-1]
        self.end = Token("end", "", last.line, last.end_column, last.end_column)
        first = self.tokens[0]
        self.span = dict(line=first.line, column=first.column,
                         end_line=logical.end_line, source=logical.source)

    # ------------------------------------------------------------ plumbing

    def problem(self, token: Token, message: str) -> Problem:
        return Problem(Location(self.path, token.line, token.column), message)

    def fail(self, token: Token, message: str):
        raise DocumentError(Location(self.path, token.line, token.column), message)

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

    def expected(self, what: str):
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
        if (previous is not None and _ends_operand(previous) and _starts_operand(token)):
            hint = " (there is no implicit multiplication; write '*')"
        self.fail(token, f"unexpected {self.describe(token)}{hint}")

    def name(self, what: str = "a name") -> Token:
        token = self.peek()
        if token.kind != "name":
            self.expected(what)
        if token.text in n.STATEMENT_WORDS:
            self.fail(token, f"'{token.text}' is a statement word and cannot be a name")
        return self.next()

    def name_list(self, what: str) -> list[Token]:
        names = [self.name(what)]
        while self.accept(","):
            names.append(self.name(what))
        self.no_duplicates(names)
        return names

    def no_duplicates(self, names: list[Token]) -> None:
        seen = set()
        for token in names:
            if token.text in seen:
                self.fail(token, f"'{token.text}' appears twice")
            seen.add(token.text)

    def outputs(self, count: Optional[int] = None, what: str = "") -> tuple[str, ...]:
        arrow = self.expect("->")
        names = self.name_list("an output name")
        if count is not None and len(names) != count:
            self.fail(arrow, f"{what} needs {count} output name{'s' if count != 1 else ''}, "
                             f"found {len(names)}")
        return tuple(t.text for t in names)

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

    def positive_integer(self, what: str) -> int:
        token = self.peek()
        value = self.integer(what)
        if value <= 0:
            self.fail(token, f"{what} must be positive, not {value}")
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

    # ------------------------------------------------------------ expressions

    def expr(self, rbp: int = 0) -> n.Expr:
        """Pratt loop: operators bind while their power exceeds ``rbp``."""
        self.depth += 1
        if self.depth > MAX_NESTING:
            self.fail(self.peek(), f"expression nested more than {MAX_NESTING} deep")
        left = self.prefix()
        while True:
            token = self.peek()
            power = _INFIX.get(token.text) if token.kind == "op" else None
            if power is None or power <= rbp:
                break
            self.next()
            if power == _INFIX["^"]:
                left = n.Binary("^", left, self.exponent(), token.line, token.column)
                if self.at("^") or self.at("**"):
                    self.fail(self.peek(), "an exponent must be an integer literal; "
                                           "use parentheses, as in (x^2)^3")
            else:
                left = n.Binary(token.text, left, self.expr(power), token.line, token.column)
        self.depth -= 1
        return left

    def prefix(self) -> n.Expr:
        token = self.peek()
        if token.kind == "int":
            self.next()
            return n.Num(Fraction(token.value), token.line, token.column)
        if token.kind == "name":
            return self.name_or_call()
        if self.accept("("):
            inner = self.expr()
            self.expect(")")
            return inner
        if self.at("-") or self.at("+"):
            self.next()
            return n.Unary(token.text, self.expr(_UNARY), token.line, token.column)
        if self.at("["):
            self.fail(token, "square brackets are not used in expressions; use parentheses")
        self.expected("an expression")

    def name_or_call(self) -> n.Expr:
        token = self.name()
        if not self.at("("):
            return n.Name(token.text, token.line, token.column)
        if not n.is_builtin_function(token.text):
            self.fail(token, f"'{token.text}' is not a built-in function"
                      + _did_you_mean(token.text, n.BUILTIN_FUNCTIONS))
        self.next()
        args = [self.expr()]
        while self.accept(","):
            args.append(self.expr())
        self.expect(")")
        wanted = arity(token.text)
        if len(args) != wanted:
            self.fail(token, f"{token.text}() takes {wanted} argument"
                             f"{'s' if wanted != 1 else ''}, found {len(args)}")
        return n.Call(token.text, tuple(args), token.line, token.column)

    def exponent(self) -> n.Num:
        """An integer literal, optionally signed or in parentheses: ``x^-1``."""
        start = self.peek()
        depth = 0
        while self.accept("("):
            depth += 1
            if depth > MAX_NESTING:
                self.fail(start, f"expression nested more than {MAX_NESTING} deep")
        sign = self.sign()
        if self.peek().kind != "int" or any(
                not (self.peek(1 + i).kind == "op" and self.peek(1 + i).text == ")")
                for i in range(depth)):
            self.fail(start, "an exponent must be an integer literal such as 2 or -1"
                             " (use sqrt(x) for a square root)")
        value = sign * self.next().value
        self.pos += depth
        if abs(value) > MAX_EXPONENT:
            self.fail(start, f"exponent {value} is too large (at most {MAX_EXPONENT} in size)")
        return n.Num(Fraction(value), start.line, start.column)

    def equation(self, bare: bool) -> n.Equation:
        """``lhs = rhs``; with ``bare``, a lone expression (it vanishes)."""
        start = self.peek()
        lhs = self.expr()
        if self.at("="):
            self.next()
            return n.Equation(lhs, self.expr(), start.line, start.column)
        if not bare:
            self.expected("'='")
        return n.Equation(lhs, None, start.line, start.column)

    def equations(self, bare: bool) -> tuple[n.Equation, ...]:
        items = [self.equation(bare)]
        while self.accept(","):
            items.append(self.equation(bare))
        return tuple(items)

    def expr_list(self) -> tuple[n.Expr, ...]:
        items = [self.expr()]
        while self.accept(","):
            items.append(self.expr())
        return tuple(items)

    # ------------------------------------------------------------ shared pieces

    def for_clauses(self) -> tuple[n.ForClause, ...]:
        """``for N = 2..8, z = 1`` (or nothing)."""
        if not self.at_word("for"):
            return ()
        self.next()
        clauses = [self.for_clause()]
        while self.accept(","):
            clauses.append(self.for_clause())
        self.no_duplicates([_name_token(c) for c in clauses])
        return tuple(clauses)

    def for_clause(self) -> n.ForClause:
        target = self.name("a symbol")
        self.expect("=")
        start = self.peek()
        value = self.expr()
        if not self.at(".."):
            return n.ForClause(target.text, value, None, target.line, target.column)
        low = _integer_literal(value)
        if low is None:
            self.fail(start, "a 'for' range runs over integers, such as N = 2..8")
        dots = self.next()
        high_token = self.peek()
        high = self.integer("an integer")
        if self.at("/"):
            self.fail(high_token, "a 'for' range runs over integers, such as N = 2..8")
        if high < low:
            self.fail(dots, f"the range {low}..{high} is empty")
        return n.ForClause(target.text, None, (low, high), target.line, target.column)

    def interval_open(self) -> n.Interval:
        """``(a, b)`` after ``in``: an open interval."""
        start = self.expect("(")
        low = self.rational()
        self.expect(",")
        high = self.rational()
        self.expect(")")
        if not low < high:
            self.fail(start, f"the interval ({low}, {high}) is empty")
        return n.Interval(low, high, False, start.line, start.column)

    def interval_closed(self) -> n.Interval:
        """``a..b``: a closed interval with rational end points."""
        start = self.peek()
        low = self.rational()
        self.expect("..")
        high = self.rational()
        if not low < high:
            self.fail(start, f"the interval {low}..{high} is empty")
        return n.Interval(low, high, True, start.line, start.column)

    # ------------------------------------------------------------ statements

    def lexing_problems(self) -> None:
        """The first bad character or literal of the line, if any."""
        for token in self.tokens:
            if token.kind == "error":
                self.fail(token, token.text)

    def statement(self):
        self.lexing_problems()
        word = self.peek()
        if word.kind != "name":
            self.fail(word, f"a statement starts with a word such as 'let' or 'check', "
                            f"found {self.describe(word)}")
        method = _STATEMENTS.get(word.text)
        if method is None:
            self.fail(word, _unknown_statement(word.text, self.peek(1)))
        self.next()
        result = method(self)
        self.expect_end()
        return result

    def symbol_stmt(self) -> n.SymbolDecl:
        names = self.name_list("a symbol name")
        declared = {t.text for t in names}
        assumptions: list[str] = []
        bounds: list[n.Bound] = []
        if self.accept(":"):
            while True:
                self.symbol_item(declared, assumptions, bounds)
                if not self.accept(","):
                    break
        return n.SymbolDecl(tuple(t.text for t in names), tuple(assumptions),
                            tuple(bounds), **self.span)

    def symbol_item(self, declared, assumptions: list, bounds: list) -> None:
        """An assumption word, ``g >= 2``, ``2 <= g`` or ``0 < x < 1``."""
        start = self.peek()
        if start.kind == "name" and self.peek(1).text not in BOUND_OPS + ("=", "==", "!="):
            if start.text not in ASSUMPTIONS:
                self.fail(start, f"unknown assumption '{start.text}' (allowed: "
                                 f"{', '.join(ASSUMPTIONS)})" + _did_you_mean(start.text, ASSUMPTIONS))
            self.next()
            if start.text not in assumptions:
                assumptions.append(start.text)
            return
        if start.kind == "name":
            symbol = self.bound_symbol(declared)
            op = self.bound_op()
            bounds.append(n.Bound(symbol, op, self.rational(), start.line, start.column))
            return
        value = self.rational("an assumption or a bound such as g >= 2")
        op = self.bound_op()
        symbol = self.bound_symbol(declared)
        bounds.append(n.Bound(symbol, _FLIP[op], value, start.line, start.column))
        if self.peek().kind == "op" and self.peek().text in BOUND_OPS + ("=", "==", "!="):
            second_token = self.peek()
            second = self.bound_op()
            if (second in ("<", "<=")) != (op in ("<", "<=")):
                self.fail(second_token, "a chained bound runs one way, as in 0 < x < 1")
            bounds.append(n.Bound(symbol, second, self.rational(), start.line, start.column))

    def bound_symbol(self, declared) -> str:
        token = self.name("a symbol")
        if token.text not in declared:
            self.fail(token, f"a bound on '{token.text}', which this statement does not declare")
        return token.text

    def bound_op(self) -> str:
        token = self.peek()
        if token.kind != "op" or token.text not in BOUND_OPS:
            self.fail(token, f"a bound compares with <, <=, > or >=, found {self.describe(token)}")
        return self.next().text

    def convention_stmt(self) -> n.ConventionDecl:
        name = self.name("a convention name")
        self.expect("=")
        return n.ConventionDecl(name.text, self.rational(), **self.span)

    def bundle_stmt(self) -> n.BundleDecl:
        names = self.name_list("a bundle name")
        self.expect(":")
        kind: Optional[Token] = None
        rank: Optional[int] = None
        rank_token: Optional[Token] = None
        while True:
            token = self.peek()
            if self.at_word("rank"):
                if rank_token is not None:
                    self.fail(token, "'rank' given twice")
                rank_token = self.next()
                rank = self.positive_integer("the rank")
            elif token.kind == "name" and token.text in BUNDLE_KINDS:
                if kind is not None:
                    self.fail(token, "the bundle kind is given twice")
                kind = self.next()
            elif token.kind == "name":
                self.fail(token, f"unknown bundle kind '{token.text}' (allowed: real, complex, "
                                 "line)" + _did_you_mean(token.text, BUNDLE_KINDS))
            else:
                self.expected("real, complex, line or 'rank N'")
            if not self.accept(","):
                break
        if kind is None:
            self.fail(self.tokens[0], "say what kind of bundle: real, complex or line")
        if kind.text == "line":
            if rank not in (None, 1):
                self.fail(rank_token, "a line bundle has rank 1")
            rank = None
        elif rank is None:
            self.fail(kind, f"a {kind.text} bundle needs its rank, as in '{kind.text}, rank 4'")
        return n.BundleDecl(tuple(t.text for t in names), kind.text, rank, **self.span)

    def split_stmt(self) -> n.SplitDecl:
        bundle = self.name("the bundle to split")
        self.expect("=")
        parts = [self.split_part()]
        while self.accept("+"):
            parts.append(self.split_part())
        return n.SplitDecl(bundle.text, tuple(parts), **self.span)

    def split_part(self) -> n.SplitPart:
        token = self.name("a bundle name or trivial(k)")
        if token.text == "trivial" and self.accept("("):
            rank = self.positive_integer("the rank of trivial(k)")
            self.expect(")")
            return n.SplitPart(None, rank, token.line, token.column)
        return n.SplitPart(token.text, None, token.line, token.column)

    def fiber_stmt(self):
        name = self.name("a fiber name")
        self.expect(":")
        kind = self.peek()
        if kind.kind == "name" and kind.text in _FIBER_KINDS:
            self.next()
            return _FIBER_KINDS[kind.text](self, name.text)
        if kind.kind == "name":
            self.fail(kind, f"unknown fiber kind '{kind.text}' (allowed: 'surface, genus g, "
                            "tangent T', 'sphere of B, angular e', 'dimension n')"
                      + _did_you_mean(kind.text, _FIBER_KINDS))
        self.expected("surface, sphere or dimension")

    def fiber_surface(self, name: str) -> n.SurfaceFiber:
        options = self.fiber_options({"genus": self.genus, "tangent": self.name})
        return n.SurfaceFiber(name, options["genus"], options["tangent"].text, **self.span)

    def fiber_sphere(self, name: str) -> n.SphereFiber:
        self.expect_word("of")
        bundle = self.name("a real bundle of odd rank")
        options = self.fiber_options({"angular": self.name})
        return n.SphereFiber(name, bundle.text, options["angular"].text, **self.span)

    def fiber_dimension(self, name: str) -> _GeneralHeader:
        return _GeneralHeader(name, self.positive_integer("the fiber dimension"), self.span)

    def fiber_options(self, readers: dict) -> dict:
        """``, word value`` pairs in any order, each required exactly once."""
        values = {}
        while self.accept(","):
            token = self.peek()
            if token.kind != "name" or token.text not in readers:
                self.expected(" or ".join(f"'{w}'" for w in readers))
            if token.text in values:
                self.fail(token, f"'{token.text}' given twice")
            self.next()
            values[token.text] = readers[token.text]()
        missing = [w for w in readers if w not in values]
        if missing:
            self.expected(f"', {missing[0]} ...'")
        return values

    def genus(self) -> n.Expr:
        token = self.peek()
        if token.kind == "int":
            self.next()
            return n.Num(Fraction(token.value), token.line, token.column)
        name = self.name("the genus (a symbol or a nonnegative integer)")
        return n.Name(name.text, name.line, name.column)

    def body_line(self) -> tuple[str, list]:
        """One indented line of a general fiber: class, relation or integral."""
        self.lexing_problems()
        word = self.peek()
        reader = _BODY.get(word.text) if word.kind == "name" else None
        if reader is None:
            self.fail(word, "a fiber body line starts with class, relation or integral, found "
                            f"{self.describe(word)}" + (_did_you_mean(word.text, BODY_WORDS)
                                                        if word.kind == "name" else ""))
        self.next()
        result = reader(self)
        self.expect_end()
        return result

    def body_class(self) -> tuple[str, list]:
        names = self.name_list("a class name")
        self.expect(":")
        degree = self.positive_integer("the degree")
        return "classes", [n.FiberClass(t.text, degree, t.line, t.column) for t in names]

    def body_relation(self) -> tuple[str, list]:
        return "relations", list(self.equations(bare=True))

    def body_integral(self) -> tuple[str, list]:
        return "integrals", list(self.equations(bare=False))

    def let_stmt(self) -> n.Let:
        let = self.tokens[0]
        rebind = False
        if self.at("!"):
            bang = self.next()
            if bang.column != let.end_column:
                self.fail(bang, "write 'let!' without a space")
            rebind = True
        name = self.name("the name to bind")
        self.expect("=")
        return n.Let(name.text, self.expr(), rebind, **self.span)

    def substitute_stmt(self) -> n.Substitute:
        target = self.expr()
        self.expect(":")
        pairs = self.equations(bare=False)
        return n.Substitute(target, pairs, self.outputs(1, "substitute"), **self.span)

    def reduce_stmt(self) -> n.Reduce:
        target = self.expr()
        self.expect_word("modulo")
        relations = self.equations(bare=True)
        return n.Reduce(target, relations, self.outputs(1, "reduce"), **self.span)

    def integrate_stmt(self) -> n.Integrate:
        target = self.expr()
        self.expect_word("over")
        fiber = self.name("a fiber name")
        return n.Integrate(target, fiber.text, fiber.line, fiber.column,
                           self.outputs(1, "integrate"), **self.span)

    def coefficients_stmt(self) -> n.Coefficients:
        target = self.expr()
        self.expect_word("of")
        monomials = self.expr_list()
        outputs = self.outputs(len(monomials), f"coefficients of {len(monomials)} "
                                               f"monomial{'s' if len(monomials) != 1 else ''}")
        return n.Coefficients(target, monomials, outputs, **self.span)

    def extremize_stmt(self) -> n.Extremize:
        mode = self.tokens[0].text
        target = self.expr()
        self.expect_word("over")
        variables = [self.variable()]
        while self.accept(","):
            variables.append(self.variable())
        self.no_duplicates([_name_token(v) for v in variables])
        arrow = self.expect("->")
        count = len(variables)
        if self.at("("):
            paren = self.next()
            if count == 1:
                self.fail(paren, "with one variable write '-> x0, f0', without parentheses")
            point = self.name_list("an output name")
            self.expect(")")
        else:
            point = [self.name("an output name")]
            if count > 1:
                self.fail(point[0], f"with {count} variables write the point in parentheses: "
                                    f"-> ({', '.join(f'{v.name}0' for v in variables)}), f0")
        if len(point) != count:
            self.fail(arrow, f"{count} variables need {count} point coordinates, found {len(point)}")
        self.expect(",")
        value = self.name("a name for the extremal value")
        self.no_duplicates(point + [value])
        return n.Extremize(mode, target, tuple(variables), tuple(t.text for t in point),
                           value.text, **self.span)

    def variable(self) -> n.Variable:
        token = self.name("a variable")
        interval = None
        if self.at_word("in"):
            self.next()
            interval = self.interval_open()
        return n.Variable(token.text, interval, token.line, token.column)

    def check_stmt(self) -> n.Check:
        lhs = self.expr()
        op = self.peek()
        if op.kind == "op" and op.text == "=":
            self.fail(op, "use '==' to claim equality")
        if op.kind != "op" or op.text not in CHECK_OPS:
            self.expected("a comparison (== != < <= > >=)")
        self.next()
        rhs = self.expr()
        return n.Check(lhs, op.text, rhs, self.for_clauses(), **self.span)

    def show_stmt(self) -> n.Show:
        return n.Show(self.expr_list(), **self.span)

    def table_stmt(self) -> n.Table:
        exprs = self.expr_list()
        return n.Table(exprs, self.for_clauses(), **self.span)

    def plot_stmt(self) -> n.Plot:
        exprs = self.expr_list()
        self.expect_word("over")
        variable = self.name("the plot variable")
        self.expect_word("in")
        interval = self.interval_closed()
        return n.Plot(exprs, variable.text, interval, self.for_clauses(), **self.span)


def _name_token(node) -> Token:
    """A name token again, from a node that kept the name and its position."""
    return Token("name", node.name, node.line, node.column, node.column + len(node.name))


def _integer_literal(expr: n.Expr) -> Optional[int]:
    """The value of ``3`` or ``-3`` written as a literal, else None."""
    sign = 1
    if isinstance(expr, n.Unary):
        sign, expr = (-1 if expr.op == "-" else 1), expr.operand
    if isinstance(expr, n.Num) and expr.value.denominator == 1:
        return sign * expr.value.numerator
    return None


def _ends_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text in (")", "]"))


def _starts_operand(token: Token) -> bool:
    return token.kind in ("name", "int") or (token.kind == "op" and token.text == "(")


def _unknown_statement(word: str, after: Token) -> str:
    if word in BODY_WORDS:
        return f"'{word}' belongs in the indented body of a 'fiber F: dimension n'"
    message = f"unknown statement '{word}'"
    if after.kind == "op" and after.text == "=":
        return message + f"; did you mean 'let {word} = ...'?"
    return message + _did_you_mean(word, n.STATEMENT_WORDS)


_STATEMENTS = {
    "symbol": _Parser.symbol_stmt,
    "convention": _Parser.convention_stmt,
    "bundle": _Parser.bundle_stmt,
    "split": _Parser.split_stmt,
    "fiber": _Parser.fiber_stmt,
    "let": _Parser.let_stmt,
    "substitute": _Parser.substitute_stmt,
    "reduce": _Parser.reduce_stmt,
    "integrate": _Parser.integrate_stmt,
    "coefficients": _Parser.coefficients_stmt,
    "maximize": _Parser.extremize_stmt,
    "minimize": _Parser.extremize_stmt,
    "extremize": _Parser.extremize_stmt,
    "check": _Parser.check_stmt,
    "show": _Parser.show_stmt,
    "table": _Parser.table_stmt,
    "plot": _Parser.plot_stmt,
}
_FIBER_KINDS = {
    "surface": _Parser.fiber_surface,
    "sphere": _Parser.fiber_sphere,
    "dimension": _Parser.fiber_dimension,
}

_BODY = {
    "class": _Parser.body_class,
    "relation": _Parser.body_relation,
    "integral": _Parser.body_integral,
}
