"""The statement parser against the format spec's grammar (the contract in
docs/spec: "Statements" and "Precise rules → Lexing and grammar"; syntax
rules of the format itself, so common practice, no source)."""
from __future__ import annotations

from fractions import Fraction

import pytest
from hypothesis import given, settings, strategies as st

from compiler.errors import DocumentError
from compiler.statements import clause_nodes as cn, expr_nodes as en, nodes as n, words
from compiler.statements.parser import parse_block
from support import SPEC_DECLARATIONS, parse, parse_problem, parse_problems


def one(text: str, first_line: int = 1):
    (statement,) = parse(text, first_line)
    return statement


def show(e) -> str:
    """Fully parenthesised form, so the tree's shape is visible in one string."""
    if isinstance(e, en.Num):
        return str(e.value)
    if isinstance(e, en.Name):
        return e.id
    if isinstance(e, en.Call):
        return f"{e.func}({', '.join(show(a) for a in e.args)})"
    if isinstance(e, en.Unary):
        return f"({e.op}{show(e.operand)})"
    return f"({show(e.left)} {e.op} {show(e.right)})"


def expr(text: str) -> str:
    return show(one(f"let v = {text}").expr)


# ---------------------------------------------------------------- expressions


@pytest.mark.parametrize("source, tree", [
    ("-x^2", "(-(x ^ 2))"),
    ("-x^2*y", "((-(x ^ 2)) * y)"),
    ("N/2*e4", "((N / 2) * e4)"),
    ("a - b - c", "((a - b) - c)"),
    ("a/b/c", "((a / b) / c)"),
    ("a + b*c", "(a + (b * c))"),
    ("a*-b", "(a * (-b))"),
    ("2**3", "(2 ^ 3)"),
    ("x^-1", "(x ^ -1)"),
    ("x^(-1)", "(x ^ -1)"),
    ("x^((2))", "(x ^ 2)"),
    ("x^0", "(x ^ 0)"),
    ("(x^2)^3", "((x ^ 2) ^ 3)"),
    ("(a + b)^2", "((a + b) ^ 2)"),
    ("p1(T)^2*e(TS)", "((p1(T) ^ 2) * e(TS))"),
    ("ch(S(NW))", "ch(S(NW))"),
    ("ch(wedge(V, 2)) + part(X, 4)", "(ch(wedge(V, 2)) + part(X, 4))"),
    ("1/48", "(1 / 48)"),
    ("+a", "(+a)"),
    ("x^1000", "(x ^ 1000)"),
    ("x^-1000", "(x ^ -1000)"),
    ("123456789012345678901234567890", "123456789012345678901234567890"),
])
def test_precedence_and_associativity(source, tree):
    assert expr(source) == tree


@pytest.mark.parametrize("word", ["L", "S", "p", "c", "e", "N", "E", "I", "pi", "Q", "sqrt",
                                  "p1", "degree", "trivial", "over", "of", "modulo", "for", "in"])
def test_bare_identifiers_are_always_names(word):
    e = one(f"let v = {word} + 1").expr
    assert e.left == en.Name(word, 1, 9)


def test_builtin_in_call_position_is_a_call():
    e = one("let v = L(T) + S(NW) + p(B) + c12(V) + Ahat(T)").expr
    calls = []
    while isinstance(e, en.Binary):
        calls.append(e.right)
        e = e.left
    calls.append(e)
    assert sorted(c.func for c in calls) == ["Ahat", "L", "S", "c12", "p"]
    assert all(isinstance(c, en.Call) for c in calls)


def test_integers_are_exact_fractions():
    num = one("let v = 99999999999999999999").expr
    assert num.value == Fraction(99999999999999999999) and isinstance(num.value, Fraction)


def test_expression_positions():
    e = one("let v = 1/48*(p2(NW) - x^2)", first_line=7).expr
    # the "*" at column 13 of file line 7
    assert (e.op, e.line, e.column) == ("*", 7, 13)
    assert (e.left.left.line, e.left.left.column) == (7, 9)
    minus = e.right
    assert (minus.op, minus.column) == ("-", 22)
    assert minus.left == en.Call("p2", (en.Name("NW", 7, 18),), 7, 15)
    power = minus.right
    assert power.right == en.Num(Fraction(2), 7, 26)


# ---------------------------------------------------------------- lines


def test_statement_positions_and_first_line_offset():
    a, b = parse("""
        let a = 1
           # a comment line
        let b = 2   # trailing
    """, first_line=40)
    assert (a.line, a.column, a.end_line, a.source) == (40, 1, 40, "let a = 1")
    assert (b.line, b.column, b.end_line, b.source) == (42, 1, 42, "let b = 2")


def test_backslash_continuation():
    s = one("""
        substitute I8: c1(L1) = c1(R), \\
                       c1(L2) = -c1(R)  -> I8tw   # comment
    """, first_line=3)
    assert (s.line, s.end_line) == (3, 4)
    assert s.source == "substitute I8: c1(L1) = c1(R), c1(L2) = -c1(R)  -> I8tw"
    assert [p.lhs.line for p in s.pairs] == [3, 4]
    assert s.pairs[1].lhs.column == 16
    assert s.outputs == ("I8tw",)


def test_open_bracket_continuation():
    s = one("""
        let y = (1 +   # first half
            2)
    """)
    assert (s.end_line, s.source) == (2, "let y = (1 + 2)")
    assert show(s.expr) == "(1 + 2)"
    assert (s.expr.right.line, s.expr.right.column) == (2, 5)


def test_unclosed_bracket_stops_at_the_next_statement_word():
    found = parse_problems("""
        let a = (1 + 2
        let b = 3 3
    """)
    assert [f[1:] for f in found] == [
        (1, 9, "'(' is never closed"),
        (2, 11, "unexpected '3' (there is no implicit multiplication; write '*')"),
    ]


def test_backslash_before_blank_line_ends_the_statement():
    a, b = parse("let a = 1 \\\n\nlet b = 2")
    assert (a.source, a.end_line, b.line) == ("let a = 1", 1, 3)
    assert parse_problem("let a = 1 + \\\n\nlet b = 2") == (
        1, 12, "expected an expression, found end of line")


def test_indented_line_outside_fiber_body_is_an_error():
    assert parse_problem("let a = 1\n  let b = 2") == (
        2, 3, "unexpected indentation: only the body lines of a fiber ('dimension n', "
              "'fixed points' or 'spindle') or of 'matter' are indented")


# ---------------------------------------------------------------- fibers


def test_general_fiber_body():
    f = one("""
        fiber F: dimension 4
          class x: 2
          # a comment does not end the body
          class y, z: 2
          relation x^2 = 0, x*y
          integral x*y = 1, x*z = -1
    """, first_line=10)
    assert isinstance(f, n.GeneralFiber)
    assert (f.name, f.dimension, f.line, f.end_line) == ("F", 4, 10, 15)
    assert f.classes == (cn.FiberClass("x", 2, 11, 9), cn.FiberClass("y", 2, 13, 9),
                         cn.FiberClass("z", 2, 13, 12))
    assert [(show(r.lhs), r.rhs and show(r.rhs)) for r in f.relations] == [
        ("(x ^ 2)", "0"), ("(x * y)", None)]
    assert [(show(i.lhs), show(i.rhs)) for i in f.integrals] == [("(x * y)", "1"),
                                                                 ("(x * z)", "(-1)")]
    assert f.source == ("fiber F: dimension 4\n  class x: 2\n  class y, z: 2\n"
                        "  relation x^2 = 0, x*y\n  integral x*y = 1, x*z = -1")


def test_blank_line_ends_fiber_body():
    assert parse_problem("""
        fiber F: dimension 2
          class x: 2

          integral x = 1
    """) == (4, 3, "unexpected indentation: only the body lines of a fiber ('dimension n', "
                   "'fixed points' or 'spindle') or of 'matter' are indented")


def test_fiber_body_is_followed_by_statements():
    f, let = parse("""
        fiber F: dimension 2
          class x: 2
          integral x = 1
        let a = x
    """)
    assert f.end_line == 3 and len(f.integrals) == 1
    assert let.line == 4


def test_body_after_surface_fiber_is_an_error():
    assert parse_problem("fiber S: surface, genus 2, tangent T\n  class x: 2")[:2] == (2, 3)


def test_failed_fiber_header_hides_its_body():
    assert parse_problems("fiber F: dimension 0\n  class x: 2\n  bogus\nlet a = 1") == [
        ("doc.md", 1, 20, "the fiber dimension must be positive, not 0")]


@pytest.mark.parametrize("text, where", [
    ("fiber F: dimension 2\n  clas x: 2", (2, 3)),
    ("fiber F: dimension 2\n  class x 2", (2, 11)),
    ("fiber F: dimension 2\n  class x: 0", (2, 12)),
    ("fiber F: dimension 2\n  integral x", (2, 13)),
])
def test_fiber_body_errors(text, where):
    assert parse_problem(text)[:2] == where


def test_each_bad_body_line_is_reported():
    found = parse_problems("fiber F: dimension 2\n  clas x: 2\n  class y: -2")
    assert [f[1:3] for f in found] == [(2, 3), (3, 12)]
    assert "did you mean 'class'" in found[0][3]


def test_class_at_top_level_explains_itself():
    assert parse_problem("class x: 2")[2] == "'class' belongs in the indented body of a fiber"


# ---------------------------------------------------------------- statement forms


def test_symbol_forms():
    s = one("symbol N, k: integer, positive")
    assert (s.names, s.assumptions, s.bounds) == (("N", "k"), ("integer", "positive"), ())
    s = one("symbol g: integer, g >= 2")
    assert s.bounds == (cn.Bound("g", ">=", Fraction(2), 1, 20),)
    s = one("symbol x: 0 < x < 1")
    assert s.bounds == (cn.Bound("x", ">", Fraction(0), 1, 11),
                        cn.Bound("x", "<", Fraction(1), 1, 11))
    s = one("symbol x: 1 >= x > -1/2")
    assert [(b.op, b.value) for b in s.bounds] == [("<=", 1), (">", Fraction(-1, 2))]
    s = one("symbol z: real, 2 <= z")
    assert s.bounds == (cn.Bound("z", ">=", Fraction(2), 1, 17),)
    s = one("symbol eps")
    assert (s.names, s.assumptions, s.bounds, s.kind) == (("eps",), (), (), "symbol")
    s = one("symbol p, S, L, N")
    assert s.names == ("p", "S", "L", "N")


def test_convention():
    c = one("convention angular_integral = -3/2")
    assert (c.name, c.value, c.kind) == ("angular_integral", Fraction(-3, 2), "convention")


def test_bundle_forms():
    b = one("bundle T4: real, rank 4")
    assert (b.names, b.bundle_kind, b.rank) == (("T4",), "real", 4)
    b = one("bundle L1, L2: line")
    assert (b.names, b.bundle_kind, b.rank) == (("L1", "L2"), "line", None)
    b = one("bundle V: complex, rank 3")
    assert (b.bundle_kind, b.rank) == ("complex", 3)
    b = one("bundle L: rank 5, real")
    assert (b.names, b.bundle_kind, b.rank) == (("L",), "real", 5)


def test_split():
    s = one("split NW = L1 + L2 + trivial(1)")
    assert s.bundle == "NW"
    assert s.parts == (cn.SplitPart("L1", None, 1, 12), cn.SplitPart("L2", None, 1, 17),
                       cn.SplitPart(None, 1, 1, 22))
    assert one("split T6 = T4 + TS").parts[1].name == "TS"


def test_surface_and_sphere_fibers():
    f = one("fiber Sigma: surface, genus g, tangent TS")
    assert (f.name, f.genus, f.tangent, f.kind) == ("Sigma", en.Name("g", 1, 29), "TS", "fiber")
    f = one("fiber C: surface, tangent TC, genus 0")
    assert (f.genus, f.tangent) == (en.Num(Fraction(0), 1, 37), "TC")
    f = one("fiber S4: sphere of NW, angular e4")
    assert (f.name, f.bundle, f.angular) == ("S4", "NW", "e4")


def test_let_and_rebind():
    a, b = parse("let I8 = x\nlet! I8 = 2*x")
    assert (a.name, a.rebind, b.rebind, b.kind) == ("I8", False, True, "let")
    assert b.source == "let! I8 = 2*x"


def test_substitute_reduce_integrate():
    s = one("substitute I8: c1(L1) = x, N = 3 -> J")
    assert show(s.target) == "I8" and [show(p.lhs) for p in s.pairs] == ["c1(L1)", "N"]
    assert s.outputs == ("J",) and s.kind == "substitute"
    r = one("reduce X*2 modulo c1(L1) + c1(L2) = 0, c1(L1)^2 -> Xr")
    assert show(r.target) == "(X * 2)"
    assert [(show(q.lhs), q.rhs and show(q.rhs)) for q in r.relations] == [
        ("(c1(L1) + c1(L2))", "0"), ("(c1(L1) ^ 2)", None)]
    i = one("integrate e4^3 over S4 -> m")
    assert (show(i.target), i.fiber, i.fiber_line, i.fiber_column, i.outputs) == (
        "(e4 ^ 3)", "S4", 1, 21, ("m",))


def test_coefficients():
    c = one("coefficients I6 of c1(R)^3, c1(R)*p1(T4) -> kRRR, kR")
    assert [show(m) for m in c.monomials] == ["(c1(R) ^ 3)", "(c1(R) * p1(T4))"]
    assert c.outputs == ("kRRR", "kR")


def test_extremize_forms():
    m = one("maximize a over eps -> eps_star, a_star")
    assert (m.mode, m.kind, m.point, m.value) == ("maximize", "maximize", ("eps_star",), "a_star")
    assert m.outputs == ("eps_star", "a_star")
    assert m.variables == (cn.Variable("eps", None, 1, 17),)
    m = one("minimize f over x in (-1, 1/2) -> x0, f0")
    assert m.variables[0].interval == cn.Interval(Fraction(-1), Fraction(1, 2), False, 1, 22)
    m = one("extremize f over x, y in (0, 1) -> (x0, y0), f0")
    assert [v.name for v in m.variables] == ["x", "y"]
    assert (m.variables[0].interval, m.variables[1].interval.high) == (None, 1)
    assert (m.point, m.value) == (("x0", "y0"), "f0")


def test_check_forms():
    c = one("check degree(I6) == 6")
    assert (show(c.lhs), c.op, show(c.rhs), c.clauses) == ("degree(I6)", "==", "6", ())
    for op in ("==", "!=", "<", "<=", ">", ">="):
        assert one(f"check k {op} 0").op == op
    c = one("check k > 0 for N = 2..8, z = 1/2, g = -3..-1")
    assert c.clauses == (
        cn.ForClause("N", None, (2, 8), 1, 17),
        cn.ForClause("z", en.Binary("/", en.Num(Fraction(1), 1, 31), en.Num(Fraction(2), 1, 33),
                                  1, 32), None, 1, 27),
        cn.ForClause("g", None, (-3, -1), 1, 36),
    )


def test_show_table_plot():
    s = one("show I6, ch(V)")
    assert [show(e) for e in s.exprs] == ["I6", "ch(V)"]
    t = one("table a_star, c_star for N = 2..5, g = 2..4, z = 1")
    assert [c.name for c in t.clauses] == ["N", "g", "z"] and t.clauses[0].range == (2, 5)
    assert one("table a").clauses == ()
    p = one("plot a, b over z in 1/2..3 for N = 4, g = 3")
    assert (p.variable, p.interval) == ("z", cn.Interval(Fraction(1, 2), Fraction(3), True, 1, 21))
    assert [c.name for c in p.clauses] == ["N", "g"]
    assert one("plot a over z in -1..1").clauses == ()


def test_every_statement_word_has_a_form():
    block = """
        symbol x
        convention k = 2
        bundle B: real, rank 3
        split B = trivial(3)
        fiber S: sphere of B, angular e2
        let a = x
        substitute a: x = 1 -> b
        reduce a modulo x -> c
        integrate a over S -> d
        coefficients a of x -> f
        maximize a over x -> x1, g
        minimize a over x -> x2, h
        extremize a over x -> x3, i
        check a == a
        show a
        table a
        plot a over x in 0..1
        define f(y) = y + 1
        use "common.md"
        factorize a into 4, 8 -> u, v
        matter I: dimension 4, tangent B
          weyl+ 2 in V, (G, adjoint) charges L: 1/2
    """
    kinds = [s.kind for s in parse(block)]
    assert set(kinds) == words.STATEMENT_WORDS
    assert len(kinds) == len(words.STATEMENT_WORDS)


# ---------------------------------------------------------------- errors


@pytest.mark.parametrize("text, line, column, message", [
    ("lett x = 1", 1, 1, "unknown statement 'lett'; did you mean 'let'?"),
    ("chek a == b", 1, 1, "unknown statement 'chek'; did you mean 'check'?"),
    ("foo bar", 1, 1, "unknown statement 'foo'"),
    ("x = 2", 1, 1, "unknown statement 'x'; did you mean 'let x = ...'?"),
    ("(x)", 1, 1, "a statement starts with a word such as 'let' or 'check', found '('"),
    ("let y = 0.5", 1, 9, "decimals are not allowed: write 1/2"),
    ("let y = 2 * .25", 1, 13, "decimals are not allowed: write 1/4"),
    ("convention k = 1.5", 1, 16, "decimals are not allowed: write 3/2"),
    ("let y = 1e5", 1, 9, "scientific notation is not allowed: write an exact integer or fraction"),
    ("let y = 2x", 1, 9, "a number runs into a name: '2x' (there is no implicit multiplication;"
                         " write 2*x)"),
    ("let y = 2 x", 1, 11, "unexpected 'x' (there is no implicit multiplication; write '*')"),
    ("let y = (a)(b)", 1, 12, "unexpected '(' (there is no implicit multiplication; write '*')"),
    ("let y = x^1001", 1, 11, "exponent 1001 is too large (at most 1000 in size)"),
    ("let y = x^-1001", 1, 11, "exponent -1001 is too large (at most 1000 in size)"),
    ("let y = x^(1/2)", 1, 11, "an exponent must be an integer literal such as 2 or -1"
                               " (use sqrt(x) for a square root)"),
    ("let y = x^n", 1, 11, "an exponent must be an integer literal such as 2 or -1"
                           " (use sqrt(x) for a square root)"),
    ("let y = x^2^3", 1, 12, "an exponent must be an integer literal; use parentheses,"
                             " as in (x^2)^3"),
    ("let y = p1(T, U)", 1, 9, "p1() takes 1 argument, found 2"),
    ("let y = part(X)", 1, 9, "part() takes 2 arguments, found 1"),
    ("let y = ", 1, 8, "expected an expression, found end of line"),
    ("let y = 1 +", 1, 12, "expected an expression, found end of line"),
    ("let let = 2", 1, 5, "'let' is a statement word and cannot be a name"),
    ("let y = check + 1", 1, 9, "'check' is a statement word and cannot be a name"),
    ("let ! y = 1", 1, 5, "write 'let!' without a space"),
    ("let y == 1", 1, 7, "expected '=', found '=='"),
    ("let y = 1 = 2", 1, 11, "unexpected '='"),
    ("let y = (1 + 2", 1, 9, "'(' is never closed"),
    ("let y = 1 + 2)", 1, 14, "unexpected ')'"),
    ("let y = x\\ + 1", 1, 10, "'\\' continues a line only at its very end"),
    ("let y = α", 1, 9, "unexpected character 'α'"),
    ("let y = {x}", 1, 9, "unexpected character '{'"),
    ("symbol x: negative", 1, 11, "unknown assumption 'negative' (allowed: integer, positive, "
                                  "nonnegative, real, nonzero); did you mean 'nonnegative'?"),
    ("symbol x: y > 0", 1, 11, "a bound on 'y', which this statement does not declare"),
    ("symbol x: 0 < x > 1", 1, 17, "a chained bound runs one way, as in 0 < x < 1"),
    ("symbol x: x == 0", 1, 13, "a bound compares with <, <=, > or >=, found '=='"),
    # (``x > y`` is a relation since symbols may be related; a nonlinear side is refused)
    ("symbol x: x > y^2", 1, 16, "a relation between symbols is linear: rational multiples of "
                                 "symbols, added (such as 3*Nc or Nc/2 + 1)"),
    ("symbol x: x > 2*3", 1, 15, "expected a rational number such as 2, -3 or 1/2, found '2'"),
    ("symbol x: x > 1/0", 1, 16, "division by zero"),
    ("symbol x, x", 1, 11, "'x' appears twice"),
    ("bundle B: real", 1, 11, "a real bundle needs its rank, as in 'real, rank 4'"),
    ("bundle B: cmplex, rank 2", 1, 11, "unknown bundle kind 'cmplex' (allowed: real, complex, "
                                        "line, gauge); did you mean 'complex'?"),
    ("bundle B: real, rank 0", 1, 22, "the rank must be positive, not 0"),
    ("bundle B: line, rank 2", 1, 17, "a line bundle has rank 1"),
    ("bundle B: rank 2", 1, 1, "say what kind of bundle: real, complex or line"),
    ("split B = L1 + trivial(0)", 1, 24, "the rank of trivial(k) must be positive, not 0"),
    ("split B = L1 + 3", 1, 16, "expected a bundle name or trivial(k), found '3'"),
    ("fiber F: torus", 1, 10, "unknown fiber kind 'torus' (allowed: 'surface, genus g, "
                              "tangent T', 'sphere of B, angular e', 'dimension n', 'fixed "
                              "points, dimension n, rotation t', 'spindle a, b, rotation t')"),
    ("fiber S: surface, genus g", 1, 26, "expected ', tangent ...', found end of line"),
    ("fiber S: surface, genus g, genus h, tangent T", 1, 28, "'genus' is given twice"),
    ("fiber S: sphere NW, angular e", 1, 17, "expected 'of', found 'NW'"),
    ("coefficients X of a, b -> k", 1, 24,
     "coefficients of 2 monomials needs 2 output names, found 1"),
    ("integrate X over F -> a, b", 1, 20, "integrate needs 1 output name, found 2"),
    ("integrate X over F", 1, 19, "expected '->', found end of line"),
    ("integrate X -> Y", 1, 13, "expected 'over', found '->'"),
    ("reduce X -> Y", 1, 10, "expected 'modulo', found '->'"),
    ("substitute X: a -> Y", 1, 17, "expected '=', found '->'"),
    ("substitute X: a = b -> let", 1, 24, "'let' is a statement word and cannot be a name"),
    ("extremize f over x, y -> x0, f0", 1, 26,
     "with 2 variables write the point in parentheses: -> (x0, y0), f0"),
    ("maximize f over x -> (x0), f0", 1, 22,
     "with one variable write '-> x0, f0', without parentheses"),
    ("extremize f over x, y -> (x0), f0", 1, 23, "2 variables need 2 point coordinates, found 1"),
    ("maximize f over x -> x0", 1, 24, "expected ',', found end of line"),
    ("maximize f over x, x -> (a, b), c", 1, 20, "'x' appears twice"),
    ("maximize f over x -> x, x", 1, 25, "'x' appears twice"),
    ("maximize f over x in (1, 0) -> a, b", 1, 22, "the interval (1, 0) is empty"),
    ("maximize f over x in [0, 1] -> a, b", 1, 22, "expected '(', found '['"),
    ("check a = b", 1, 9, "use '==' to claim equality"),
    ("check a", 1, 8, "expected a comparison (== != < <= > >=), found end of line"),
    ("check a == b for N = 8..2", 1, 23, "the range 8..2 is empty"),
    ("check a == b for N = 1/2..3", 1, 22, "a 'for' range runs over integers, such as N = 2..8"),
    ("check a == b for N = 1..5/2", 1, 25, "a 'for' range runs over integers, such as N = 2..8"),
    ("check a == b for N = 2..8, N = 3", 1, 28, "'N' appears twice"),
    ("table a for 3 = 1", 1, 13, "expected a symbol, found '3'"),
    ("plot a over z in 3..1", 1, 18, "the interval 3..1 is empty"),
    ("plot a over z", 1, 14, "expected 'in', found end of line"),
    ("show", 1, 5, "expected an expression, found end of line"),
    ("let y = [1]", 1, 9, "square brackets are not used in expressions; use parentheses"),
])
def test_errors_at_the_offending_token(text, line, column, message):
    assert parse_problem(text) == (line, column, message)


@pytest.mark.parametrize("text, column, start", [
    ("let y = __import__('os')", 9, "names must start with a letter"),
    ("let y = x.attr", 10, "'.' is not allowed here"),
    ("let y = lambda q: q", 16, "unexpected 'q'"),
    ("let y = [i for i in x]", 9, "square brackets are not used"),
    ("let y = 'abc'", 9, "strings are not allowed"),
    ('let y = "abc"', 9, "strings are not allowed"),
    ("let y = 1; let z = 2", 10, "';' is not allowed"),
    ("let y = x.__class__", 10, "'.' is not allowed here"),
    ("__import__('os').system('ls')", 1, "names must start with a letter"),
    ("let y = eval('1')", 14, "strings are not allowed"),
    ("let y = sqrt(x) if x else y", 17, "unexpected 'if'"),
])
def test_injection_attempts_are_clean_document_errors(text, column, start):
    line, col, message = parse_problem(text)
    assert (line, col) == (1, column) and message.startswith(start)


def test_inner_underscores_make_an_ordinary_name():
    assert one("let y = a__b__").expr == en.Name("a__b__", 1, 9)


def test_one_problem_per_bad_statement_and_parsing_goes_on():
    found = parse_problems("""
        let a = 0.5 + 0.25
        let b = 1
        lett c = 2
        let d = p1(x, y) + g(y)
    """, first_line=20)
    assert [(line, col) for _, line, col, _ in found] == [(20, 9), (22, 1), (23, 9)]
    assert all(path == "doc.md" for path, *_ in found)


# ---------------------------------------------------------------- robustness

_TOKENS = [
    "symbol", "convention", "bundle", "split", "fiber", "let", "let!", "substitute", "reduce",
    "integrate", "coefficients", "maximize", "minimize", "extremize", "check", "show", "table",
    "plot", "over", "of", "modulo", "for", "in", "rank", "real", "complex", "line", "surface",
    "sphere", "dimension", "genus", "tangent", "angular", "class", "relation", "integral",
    "integer", "positive", "trivial", "p1", "c2", "e", "ch", "S", "wedge", "part", "x", "N",
    "0", "1", "2", "1000", "1001", "0.5", "(", ")", "[", "]", ",", ":", "=", "==", "!=", "<",
    "<=", ">", ">=", "+", "-", "*", "/", "^", "**", "..", "->", "!", "\\", "#", "\n", "\n  ",
    "\n\n", "_x", ".", ";", "'", "@",
]


def _parses_or_reports(text: str) -> None:
    try:
        statements = parse_block(text, 1, "doc.md")
    except DocumentError as exc:
        assert exc.problems
        for p in exc.problems:
            assert p.location.path == "doc.md" and p.location.line >= 1
            assert p.location.column >= 1 and p.message
        return
    assert all(s.kind in words.STATEMENT_WORDS for s in statements)


@settings(max_examples=400, deadline=None)
@given(st.text(alphabet=st.characters(min_codepoint=1, max_codepoint=0x2FF), max_size=200))
def test_random_text_only_parses_or_reports(text):
    _parses_or_reports(text)


@settings(max_examples=600, deadline=None)
@given(st.lists(st.sampled_from(_TOKENS), max_size=40), st.lists(st.sampled_from([" ", ""])))
def test_random_token_soup_only_parses_or_reports(tokens, gaps):
    text = "".join(tok + (gaps[i % len(gaps)] if gaps else " ") for i, tok in enumerate(tokens))
    _parses_or_reports(text)


@pytest.mark.parametrize("text", ["let y = " + "(" * 500 + "1" + ")" * 500,
                                  "let y = " + "-" * 2000 + "1",
                                  "let y = x^" + "(" * 500 + "1" + ")" * 500,
                                  "let y = " + "9" * 5000])
def test_pathological_nesting_and_length_are_document_errors(text):
    with pytest.raises(DocumentError):
        parse_block(text, 1, "doc.md")


def test_the_spec_examples_parse():
    # Verbatim from the format spec's Declarations, Definitions, Operations,
    # Fibers, Checks and Display examples.
    block = SPEC_DECLARATIONS + r"""let I8_free = 1/48*(p2(NW) - p2(T6) + 1/4*(p1(T6) - p1(NW))^2)
let I8 = (N - 1)*I8_free + (N^3 - N)/24*p2(NW)
substitute I8: c1(L1) = (1 + eps)*c1(R) - p/(2*g - 2)*e(TS), \
               c1(L2) = (1 - eps)*c1(R) - q/(2*g - 2)*e(TS)  -> I8tw
reduce X modulo c1(L1) + c1(L2) = 0 -> Xr
integrate I8tw over Sigma -> I6
coefficients I6 of c1(R)^3, c1(R)*p1(T4) -> kRRR, kR
maximize a over eps -> eps_star, a_star
minimize f over x -> x0, f0
extremize f over x, y -> (x0, y0), f0
fiber S4: sphere of NW, angular e4
fiber F: dimension 2
  class x: 2
  relation x^2 = 0
  integral x = 1
check I8 == (N - 1)*I8_free + (N^3 - N)/24*p2(NW)
check a_star == (g - 1)*(8*N^3 - 3*N - 5)/24 for z = 1
check degree(I6) == 6
check k > 0 for N = 2..8
show I6                      # render a value (every let is already shown)
table a_star, c_star for N = 2..5, g = 2..4, z = 1
plot a_star over z in 1/2..3 for N = 4, g = 3
maximize a over eps in (-1, 1) -> eps_star, a_star
integrate e4^3 over S4 -> m
"""
    statements = parse_block(block.strip("\n"), 1, "doc.md")
    assert len(statements) == 33
    assert [s.line for s in statements][:16] == list(range(1, 17))
    assert statements[15].end_line == 17
    assert isinstance(statements[23], n.GeneralFiber) and statements[23].end_line == 28
