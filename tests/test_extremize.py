"""maximize / minimize / extremize: root choice, second-order test, errors."""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra.extremize import ExtremizeError, extremize
from compiler.algebra.region import Region
from compiler.algebra.sampling import SymbolSpec, evaluate

F = Fraction


def declare(name, *assumptions, **bounds):
    ops = {"ge": ">=", "gt": ">", "le": "<=", "lt": "<"}
    return SymbolSpec.declare(name, assumptions, [(ops[k], F(v)) for k, v in bounds.items()])


# -- a-maximization for the (2,0) theory on a genus-g surface -----------------

def trial_a(Nsym, gsym, zsym, epssym):
    """The trial a-function of the 4d theory, derived here from the 6d anomaly.

    I8 = (N-1) I8(1) + (N^3-N)/24 p2(NW), I8(1) = 1/48 [p2(NW) - p2(TW) +
    1/4 (p1(TW) - p1(NW))^2]  (Harvey-Minasian-Moore, "Non-abelian
    tensor-multiplet anomalies", 1998; Intriligator, "Anomaly matching and a
    Hopf-Wess-Zumino term in 6d, N=(2,0) field theories", 2000).
    NW = L1 + L2 + R, TW = T4 + TS; the twist and trial R-symmetry
    c1(L1) = (1+eps) c1(R) - p/(2g-2) e(TS), c1(L2) = (1-eps) c1(R) - q/(2g-2) e(TS),
    p = (1+z)(g-1), q = (1-z)(g-1)  (Bah-Beem-Bobev-Wecht, "Four-dimensional
    SCFTs from M5-branes", 2012).  I6 = Tr R^3/6 c1(R)^3 - Tr R/24 c1(R) p1(T4)
    (common practice, no source) and a = 3/32 (3 Tr R^3 - Tr R)
    (Anselmi-Freedman-Grisaru-Johansen, "Nonperturbative formulas for central
    functions of supersymmetric gauge theories", 1998).
    """
    n1, n2, t, c, P1, P2 = sympy.symbols("n1 n2 t c P1 P2")
    p1N, p2N = n1 ** 2 + n2 ** 2, n1 ** 2 * n2 ** 2
    p1T, p2T = P1 + t ** 2, P2 + P1 * t ** 2
    free = sympy.Rational(1, 48) * (p2N - p2T + sympy.Rational(1, 4) * (p1T - p1N) ** 2)
    I8 = (Nsym - 1) * free + (Nsym ** 3 - Nsym) / 24 * p2N
    p, q = (1 + zsym) * (gsym - 1), (1 - zsym) * (gsym - 1)
    twisted = sympy.expand(I8.subs({n1: (1 + epssym) * c - p / (2 * gsym - 2) * t,
                                    n2: (1 - epssym) * c - q / (2 * gsym - 2) * t},
                                   simultaneous=True))
    # integrate over the surface: e(TS)^2 = 0 and the integral of e(TS) is 2 - 2g
    I6 = sympy.expand(twisted.coeff(t, 1) * (2 - 2 * gsym))
    trr = 6 * I6.coeff(c, 3)
    tr = -24 * I6.coeff(c, 1).coeff(P1, 1)
    return sympy.Rational(3, 32) * (3 * trr - tr)


def amax_setup():
    N = declare("N", "integer", "positive")
    g = declare("g", "integer", ge=2)
    z = declare("z", "real")
    eps = declare("eps")
    return N, g, z, eps, trial_a(N.symbol, g.symbol, z.symbol, eps.symbol)


def test_a_maximization_of_the_n2_twist_gives_the_class_s_value():
    N, g, z, eps, a = amax_setup()
    result = extremize("maximize", a.subs(z.symbol, 1), [(eps.symbol, None)],
                       [N, g, eps], "doc.md:30", name="a")
    # N=2 R-symmetry in N=1 language, R = R_{N=2}/3 + 4/3 I3 with R_{N=2} = 2 J1,
    # I3 = J2, is (1+eps) J1 + (1-eps) J2 at eps = -1/3 (common practice, no source)
    assert result.point == (sympy.Rational(-1, 3),)
    Ns, gs = N.symbol, g.symbol
    # a = (g-1)(8N^3 - 3N - 5)/24 (Gaiotto-Maldacena, "The gravity duals of N=2
    # superconformal field theories", 2009; from memory)
    assert sympy.expand(result.value - (gs - 1) * (8 * Ns ** 3 - 3 * Ns - 5) / 24) == 0
    # Independent count for N = 2: 3g-3 SU(2) vector multiplets and 2g-2 trinions
    # of 8 half-hypermultiplets (Gaiotto, "N=2 dualities", 2009); a = (5 n_v + n_h)/24
    # (Shapere-Tachikawa, "Central charges of N=2 superconformal field theories in
    # four dimensions", 2008).
    n_v, n_h = 3 * (3 * gs - 3), 4 * (2 * gs - 2)
    assert sympy.expand(result.value.subs(Ns, 2) - (5 * n_v + n_h) / sympy.Integer(24)) == 0
    assert result.settled == "symbolic"
    assert "kept eps = -1/3" in result.account and "< 0" in result.account


def test_a_maximization_for_general_twist_matches_the_large_n_result():
    N, g, z, eps, a = amax_setup()
    result = extremize("maximize", a, [(eps.symbol, None)], [N, g, z, eps], "doc.md:40",
                       name="a")
    Ns, gs, zs = N.symbol, g.symbol, z.symbol
    # a = (1-g) N^3 (1 - 9z^2 - (1+3z^2)^(3/2)) / (48 z^2) + O(N^2)
    # (Bah-Beem-Bobev-Wecht, "Four-dimensional SCFTs from M5-branes", 2012; from memory)
    leading = sympy.limit(result.value / Ns ** 3, Ns, sympy.oo)
    expected = (1 - gs) * (1 - 9 * zs ** 2 - (1 + 3 * zs ** 2) ** sympy.Rational(3, 2)) / (48 * zs ** 2)
    assert sympy.simplify(leading - expected) == 0
    # at z = 1 the general root is the N=2 one
    for point in Region((N, g)).sample(5, "check"):
        at = {**point, zs: 1}
        assert abs(evaluate(result.point[0], at) + sympy.Rational(1, 3)) < 1e-40


# -- hand-checkable functions (common practice, no source) ---------------------

def test_simple_maximum_and_minimum():
    x = declare("x")
    X = x.symbol
    r = extremize("maximize", 3 - (X - 1) ** 2, [(X, None)], [x], "s")
    assert (r.point, r.value, r.settled) == ((1,), 3, "symbolic")
    r = extremize("minimize", X ** 3 - 3 * X, [(X, None)], [x], "s")
    assert (r.point, r.value) == ((1,), -2)
    assert "critical points x = -1; x = 1" in r.account


def test_no_maximum_is_an_error():
    x = declare("x")
    X = x.symbol
    with pytest.raises(ExtremizeError, match="no critical point of f has a negative-definite"):
        extremize("maximize", X ** 2 + 1, [(X, None)], [x], "s")
    with pytest.raises(ExtremizeError, match="has no critical point"):
        extremize("maximize", 2 * X + 1, [(X, None)], [x], "s")


def test_two_maxima_ask_for_a_range_and_a_range_settles_it():
    x = declare("x")
    X = x.symbol
    f = -X ** 4 / 4 + X ** 2 / 2      # maxima at x = -1 and x = 1, minimum at 0
    with pytest.raises(ExtremizeError, match=r"2 critical points .* give a range, e\.g\. "
                                             r"`maximize f over x in \(-1, 1\) -> \.\.\.`"):
        extremize("maximize", f, [(X, None)], [x], "s")
    r = extremize("maximize", f, [(X, (F(0), F(3)))], [x], "s")
    assert r.point == (1,) and r.value == sympy.Rational(1, 4)
    r = extremize("maximize", f, [(X, (F(-3), F(0)))], [x], "s")
    assert r.point == (-1,)


def test_branch_depending_on_a_parameter_sign():
    # f = k^2 x - x^3/3: the maximum is x = |k|, i.e. a different root for k < 0.
    x, k = declare("x"), declare("k")
    X, K = x.symbol, k.symbol
    f = K ** 2 * X - X ** 3 / 3
    with pytest.raises(ExtremizeError, match="different sample points pick different roots"):
        extremize("maximize", f, [(X, None)], [x, k], "s")
    kp = declare("k", "positive")
    r = extremize("maximize", f.subs(K, kp.symbol), [(X, None)], [x, kp], "s")
    assert r.point == (kp.symbol,) and r.settled == "symbolic"
    kb = declare("k", gt=-5, lt=-1)
    r = extremize("maximize", f.subs(K, kb.symbol), [(X, None)], [x, kb], "s")
    assert r.point == (-kb.symbol,)


def test_degenerate_hessian_is_an_error():
    x = declare("x")
    X = x.symbol
    with pytest.raises(ExtremizeError, match="degenerate"):
        extremize("maximize", -X ** 4, [(X, None)], [x], "s")
    with pytest.raises(ExtremizeError, match="does not depend on"):
        extremize("maximize", sympy.Integer(3) + 0 * X, [(X, None)], [x], "s")


def test_complex_critical_points_are_an_error():
    x = declare("x")
    X = x.symbol
    with pytest.raises(ExtremizeError, match="every critical point of f is complex"):
        extremize("extremize", X ** 3 + X, [(X, None)], [x], "s")


def test_two_variable_extremize_saddle_and_minimum():
    x, y = declare("x"), declare("y")
    X, Y = x.symbol, y.symbol
    # saddle of x^2 - y^2 + x y + x: Hessian [[2, 1], [1, -2]], det -5
    r = extremize("extremize", X ** 2 - Y ** 2 + X * Y + X, [(X, None), (Y, None)], [x, y], "s")
    sol = sympy.solve([2 * X + Y + 1, X - 2 * Y], [X, Y])
    assert r.point == (sol[X], sol[Y])
    with pytest.raises(ExtremizeError, match="positive-definite"):
        extremize("minimize", X ** 2 - Y ** 2 + X * Y + X, [(X, None), (Y, None)], [x, y], "s")
    r = extremize("minimize", X ** 2 + Y ** 2 - X * Y + X, [(X, None), (Y, None)], [x, y], "s")
    assert r.point == (sympy.Rational(-2, 3), sympy.Rational(-1, 3))
    assert r.value == sympy.Rational(-1, 3)
    assert "positive definite" in r.account


def test_family_of_critical_points_is_degenerate():
    x, y = declare("x"), declare("y")
    X, Y = x.symbol, y.symbol
    with pytest.raises(ExtremizeError, match="continuous family"):
        extremize("maximize", -(X + Y) ** 2, [(X, None), (Y, None)], [x, y], "s")


def test_sampled_decision_skips_points_where_the_function_vanishes():
    # The real root of -x^3 - x - N (Cardano's formula goes through complex
    # numbers, so sympy cannot sign it); the factor N - 1 kills f at N = 1.
    x, N = declare("x"), declare("N", "integer", "positive")
    X, Ns = x.symbol, N.symbol
    f = (Ns - 1) * (-X ** 4 / 4 - X ** 2 / 2 - Ns * X)
    r = extremize("maximize", f, [(X, None)], [x, N], "doc.md:7")
    assert r.settled == "sampled" and r.samples == 24
    assert "skipped" in r.account and "N = 1" in r.account
    for n in (2, 3, 7):
        root = evaluate(r.point[0], {Ns: n})
        assert abs(sympy.im(root)) < 1e-40
        assert abs(sympy.re(root) ** 3 + sympy.re(root) + n) < 1e-40
    again = extremize("maximize", f, [(X, None)], [x, N], "doc.md:7")
    assert again == r


def test_declared_domain_of_the_variable_counts():
    x = declare("x", "positive")
    X = x.symbol
    r = extremize("minimize", X + 1 / X, [(X, None)], [x], "s")
    assert r.point == (1,) and r.value == 2
    xn = declare("x", lt=0)
    Xn = xn.symbol
    r = extremize("maximize", Xn + 1 / Xn, [(Xn, None)], [xn], "s")
    assert r.point == (-1,) and r.value == -2


def test_not_a_rational_function_is_rejected():
    x = declare("x")
    X = x.symbol
    with pytest.raises(ExtremizeError, match="not a rational function"):
        extremize("maximize", -sympy.sqrt(X ** 2 + 1), [(X, None)], [x], "s")


def test_small_integer_domain_is_checked_exhaustively():
    # N in 1..5: every value is a sample; N = 1 is skipped because f vanishes there.
    x, N = declare("x"), declare("N", "integer", ge=1, le=5)
    X, Ns = x.symbol, N.symbol
    r = extremize("maximize", (Ns - 1) * (-X ** 4 / 4 - X ** 2 / 2 - Ns * X),
                  [(X, None)], [x, N], "doc.md:9")
    assert r.settled == "sampled" and r.samples == 4
