"""One small rule per statement word: ``RULES[word](cursor) -> node``.

Each rule runs after its statement word has been read and returns the node;
the driver in ``parser`` checks that the line ends there.  Adding a statement
is adding a rule here (and its node, and its entry in ``names.RULES``).
"""
from __future__ import annotations

from fractions import Fraction
from typing import Optional, Union

from compiler.statements import clause_nodes as cn, expr_nodes as en, nodes as n, words
from compiler.statements.core import Cursor, did_you_mean
from compiler.statements.expr_parser import equations, expr, expr_list
from compiler.statements.fibers import fiber_rule
from compiler.statements.gauge import factorize_rule, gauge_rule
from compiler.statements.matter import matter_rule
from compiler.statements.lexer import Token
from compiler.statements.tree import Ident
from compiler.statements.symbols import symbol_rule

CHECK_OPS = ("==", "!=", "<", "<=", ">", ">=")
BUNDLE_KINDS = ("real", "complex", "line")
#: Ranks of physical bundles are small; a huge one would run away in the
#: declaration (one class per unit of rank).
MAX_RANK = 64


def _convention(c: Cursor) -> n.ConventionDecl:
    name = c.name("a convention name")
    c.expect("=")
    return n.ConventionDecl(name, c.rational(), **c.span)


def _bundle(c: Cursor) -> n.BundleDecl:
    names = c.name_list("a bundle name")
    c.expect(":")
    if c.at_word("gauge"):
        return gauge_rule(c, names)
    kind: Optional[Token] = None
    rank: Union[int, Ident, None] = None
    rank_token: Optional[Token] = None
    while True:
        token = c.peek()
        if c.at_word("rank"):
            if rank_token is not None:
                c.fail(token, "'rank' given twice")
            rank_token = c.next()
            rank = (c.name("the rank symbol") if c.peek().kind == "name"
                    else c.positive_integer("the rank", MAX_RANK))
        elif token.kind == "name" and token.text in BUNDLE_KINDS:
            if kind is not None:
                c.fail(token, "the bundle kind is given twice")
            kind = c.next()
        elif token.kind == "name":
            c.fail(token, f"unknown bundle kind '{token.text}' (allowed: real, complex, "
                          "line, gauge)" + did_you_mean(token.text, BUNDLE_KINDS + ("gauge",)))
        else:
            c.expected("real, complex, line or 'rank N'")
        if not c.accept(","):
            break
    if kind is None:
        c.fail(c.tokens[0], "say what kind of bundle: real, complex or line")
    if kind.text == "line":
        if rank not in (None, 1):
            c.fail(rank_token, "a line bundle has rank 1")
        rank = None
    elif rank is None:
        c.fail(kind, f"a {kind.text} bundle needs its rank, as in '{kind.text}, rank 4'")
    return n.BundleDecl(tuple(names), kind.text, rank, **c.span)


def _split(c: Cursor) -> n.SplitDecl:
    bundle = c.name("the bundle to split")
    c.expect("=")
    parts = [_split_part(c)]
    while c.accept("+"):
        parts.append(_split_part(c))
    return n.SplitDecl(bundle, tuple(parts), **c.span)


def _split_part(c: Cursor) -> cn.SplitPart:
    name = c.name("a bundle name or trivial(k)")
    if name == "trivial" and c.accept("("):
        rank = c.positive_integer("the rank of trivial(k)", MAX_RANK)
        c.expect(")")
        return cn.SplitPart(None, rank, name.line, name.column)
    return cn.SplitPart(name, None, name.line, name.column)


def _bang(c: Cursor) -> bool:
    """``let!`` / ``define!``: the ``!`` glued to the word rebinds."""
    word = c.tokens[0]
    if not c.at("!"):
        return False
    bang = c.next()
    if bang.column != word.end_column:
        c.fail(bang, f"write '{word.text}!' without a space")
    return True


def _let(c: Cursor) -> n.Let:
    rebind = _bang(c)
    name = c.name("the name to bind")
    c.expect("=")
    return n.Let(name, expr(c), rebind, **c.span)


def _define(c: Cursor) -> n.Define:
    rebind = _bang(c)
    name = c.name("the name of the function")
    if words.is_builtin_function(name):
        c.fail(name, f"'{name}' is a built-in function and cannot be redefined")
    c.expect("(")
    params = c.name_list("a parameter name")
    c.expect(")")
    c.expect("=")
    return n.Define(name, tuple(params), expr(c), rebind, **c.span)


def _use(c: Cursor) -> n.UseDecl:
    library = c.at_word("library")
    if library:
        c.next()
    token = c.peek()
    if token.kind != "string":
        c.expected('a document path in double quotes, as in use "common.md"')
    c.next()
    if not token.text.endswith(".md"):
        c.fail(token, f"'{token.text}' is not a Markdown document (a path ending in .md)")
    return n.UseDecl(token.text, library, **c.span)


def _substitute(c: Cursor) -> n.Substitute:
    target = expr(c)
    c.expect(":")
    pairs = equations(c, bare=False)
    return n.Substitute(target, pairs, c.outputs(1, "substitute"), **c.span)


def _reduce(c: Cursor) -> n.Reduce:
    target = expr(c)
    c.expect_word("modulo")
    relations = equations(c, bare=True)
    return n.Reduce(target, relations, c.outputs(1, "reduce"), **c.span)


def _integrate(c: Cursor) -> n.Integrate:
    target = expr(c)
    c.expect_word("over")
    fiber = c.name("a fiber name")
    return n.Integrate(target, fiber, c.outputs(1, "integrate"), **c.span)


def _coefficients(c: Cursor) -> n.Coefficients:
    target = expr(c)
    c.expect_word("of")
    monomials = expr_list(c)
    outputs = c.outputs(len(monomials), f"coefficients of {len(monomials)} "
                                        f"monomial{'s' if len(monomials) != 1 else ''}")
    return n.Coefficients(target, monomials, outputs, **c.span)


def _extremize(c: Cursor) -> n.Extremize:
    mode = c.tokens[0].text
    target = expr(c)
    c.expect_word("over")
    variables = [_variable(c)]
    while c.accept(","):
        variables.append(_variable(c))
    c.no_duplicates([v.name for v in variables])
    arrow = c.expect("->")
    count = len(variables)
    if c.at("("):
        paren = c.next()
        if count == 1:
            c.fail(paren, "with one variable write '-> x0, f0', without parentheses")
        point = c.name_list("an output name")
        c.expect(")")
    else:
        point = [c.name("an output name")]
        if count > 1:
            first = c.tokens[c.pos - 1]
            c.fail(first, f"with {count} variables write the point in parentheses: "
                          f"-> ({', '.join(f'{v.name}0' for v in variables)}), f0")
    if len(point) != count:
        c.fail(arrow, f"{count} variables need {count} point coordinates, found {len(point)}")
    c.expect(",")
    value = c.name("a name for the extremal value")
    c.no_duplicates(point + [value])
    return n.Extremize(mode, target, tuple(variables), tuple(point), value, **c.span)


def _variable(c: Cursor) -> cn.Variable:
    name = c.name("a variable")
    interval = None
    if c.at_word("in"):
        c.next()
        interval = _interval_open(c)
    return cn.Variable(name, interval, name.line, name.column)


def _check(c: Cursor) -> n.Check:
    lhs = expr(c)
    op = c.peek()
    if op.kind == "op" and op.text == "=":
        c.fail(op, "use '==' to claim equality")
    if op.kind != "op" or op.text not in CHECK_OPS:
        c.expected("a comparison (== != < <= > >=)")
    c.next()
    rhs = expr(c)
    return n.Check(lhs, op.text, rhs, _for_clauses(c), **c.span)


#: The forms ``show X as FORM`` accepts.
SHOW_FORMS = ("expanded", "factored")


def _show(c: Cursor) -> n.Show:
    """``show X`` in the display form; ``as expanded``, ``as factored`` or
    ``collected in N`` ask for another."""
    exprs = expr_list(c)
    if c.at_word("collected"):
        c.next()
        c.expect_word("in")
        return n.Show(exprs, "collected", c.name("the symbol to collect in"), **c.span)
    if c.at_word("as"):
        c.next()
        form = c.peek()
        if form.kind != "name" or form.text not in SHOW_FORMS:
            c.expected("'expanded' or 'factored'")
        c.next()
        return n.Show(exprs, form.text, **c.span)
    return n.Show(exprs, **c.span)


def _table(c: Cursor) -> n.Table:
    exprs = expr_list(c)
    return n.Table(exprs, _for_clauses(c), **c.span)


def _plot(c: Cursor) -> n.Plot:
    exprs = expr_list(c)
    c.expect_word("over")
    variable = c.name("the plot variable")
    c.expect_word("in")
    interval = _interval_closed(c)
    return n.Plot(exprs, variable, interval, _for_clauses(c), **c.span)


# ---------------------------------------------------------------- shared pieces


def _for_clauses(c: Cursor) -> tuple[cn.ForClause, ...]:
    """``for N = 2..8, z = 1`` (or nothing)."""
    if not c.at_word("for"):
        return ()
    c.next()
    clauses = [_for_clause(c)]
    while c.accept(","):
        clauses.append(_for_clause(c))
    c.no_duplicates([clause.name for clause in clauses])
    return tuple(clauses)


def _for_clause(c: Cursor) -> cn.ForClause:
    target = c.name("a symbol")
    c.expect("=")
    start = c.peek()
    value = expr(c)
    if not c.at(".."):
        return cn.ForClause(target, value, None, target.line, target.column)
    low = _integer_literal(value)
    if low is None:
        c.fail(start, "a 'for' range runs over integers, such as N = 2..8")
    dots = c.next()
    high_token = c.peek()
    high = c.integer("an integer")
    if c.at("/"):
        c.fail(high_token, "a 'for' range runs over integers, such as N = 2..8")
    if high < low:
        c.fail(dots, f"the range {low}..{high} is empty")
    return cn.ForClause(target, None, (low, high), target.line, target.column)


def _integer_literal(expression: en.Expr) -> Optional[int]:
    """The value of ``3`` or ``-3`` written as a literal, else None."""
    sign = 1
    if isinstance(expression, en.Unary):
        sign, expression = (-1 if expression.op == "-" else 1), expression.operand
    if isinstance(expression, en.Num) and expression.value.denominator == 1:
        return sign * expression.value.numerator
    return None


def _interval_open(c: Cursor) -> cn.Interval:
    """``(a, b)`` after ``in``: an open interval."""
    start = c.expect("(")
    low = c.rational()
    c.expect(",")
    high = c.rational()
    c.expect(")")
    if not low < high:
        c.fail(start, f"the interval ({low}, {high}) is empty")
    return cn.Interval(low, high, False, start.line, start.column)


def _interval_closed(c: Cursor) -> cn.Interval:
    """``a..b``: a closed interval with rational end points."""
    start = c.peek()
    low: Fraction = c.rational()
    c.expect("..")
    high = c.rational()
    if not low < high:
        c.fail(start, f"the interval {low}..{high} is empty")
    return cn.Interval(low, high, True, start.line, start.column)


RULES = {
    "symbol": symbol_rule,
    "convention": _convention,
    "bundle": _bundle,
    "split": _split,
    "fiber": fiber_rule,
    "let": _let,
    "define": _define,
    "use": _use,
    "substitute": _substitute,
    "reduce": _reduce,
    "integrate": _integrate,
    "coefficients": _coefficients,
    "maximize": _extremize,
    "minimize": _extremize,
    "extremize": _extremize,
    "check": _check,
    "show": _show,
    "table": _table,
    "plot": _plot,
    "factorize": factorize_rule,
    "matter": matter_rule,
}
