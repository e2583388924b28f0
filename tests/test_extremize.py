"""maximize / minimize / extremize: root choice, second-order test, errors."""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra import cells
from compiler.algebra.extremize import ExtremizeError, extremize
from compiler.algebra.region import Region, build_region
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


def test_messages_write_powers_with_a_caret():
    # f = -(x^2 - k^3)^2 has maxima at x = -k^(3/2) and x = k^(3/2) (common practice, no source)
    x, k = declare("x"), declare("k", "positive")
    X, K = x.symbol, k.symbol
    with pytest.raises(ExtremizeError) as caught:
        extremize("maximize", -(X ** 2 - K ** 3) ** 2, [(X, None)], [x, k], "s")
    message = str(caught.value)
    assert "x = -k^(3/2); x = k^(3/2)" in message and "**" not in message
    with pytest.raises(ValueError, match=r"x\^2 < y in the declaration of y is not linear"):
        build_region([("x", [], [], []), ("y", [], [], [(sympy.Symbol("x") ** 2, "<", sympy.Symbol("y"))])])


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


# -- relations between symbols (issue 12) ---------------------------------------

def test_a_relation_between_parameters_settles_the_root():
    # f = (Nf - Nc)^2 x - x^3/3 has its maximum at x = |Nf - Nc| (hand-checkable,
    # common practice, no source): the relation Nf > Nc makes that Nf - Nc, proven.
    Nc_, Nf_ = sympy.symbols("Nc Nf")
    region = build_region([("Nc", ["integer"], [(">=", F(2))], []),
                           ("Nf", ["integer"], [], [(Nf_, ">", Nc_)]), ("x", [], [], [])])
    Nc, Nf, X = region.symbols
    f = (Nf - Nc) ** 2 * X - X ** 3 / 3
    r = extremize("maximize", f, [(X, None)], region.specs, "s", relations=region.relations)
    assert r.point == (Nf - Nc,) and r.settled == "symbolic"
    assert sympy.expand(r.value - sympy.Rational(2, 3) * (Nf - Nc) ** 3) == 0
    # without the relation Nf = Nc is possible, where the Hessian is degenerate
    with pytest.raises(ExtremizeError):
        extremize("maximize", f, [(X, None)], region.specs, "s")


def test_a_relation_naming_the_variable_restricts_its_domain():
    # -x^4/4 + x^2/2 has maxima at x = -1 and x = 1 (hand-checkable); x > k with
    # -1/2 < k < 1/2 leaves only x = 1, for every k.
    k_, x_ = sympy.symbols("k x")
    region = build_region([("k", [], [(">", F(-1, 2)), ("<", F(1, 2))], []),
                           ("x", [], [], [(x_, ">", k_)])])
    k, X = region.symbols
    f = -X ** 4 / 4 + X ** 2 / 2 + 0 * k
    r = extremize("maximize", f, [(X, None)], region.specs, "s", relations=region.relations)
    assert r.point == (1,) and r.settled == "symbolic"


# -- the bench cases (bench/cases/*.md) -----------------------------------------

def weighted(count, N):
    """The trial a of the bench cases: fields of multiplicities N, N + 1, ...
    and R-charges r1, ..., with the last charge fixed by the sum being 2."""
    rs = [declare(f"r{i + 1}") for i in range(count)]
    R = [r.symbol for r in rs]

    def term(n, r):
        return n * (3 * (r - 1) ** 3 - (r - 1))
    a = sympy.Rational(3, 32) * (sum(term(N + i, v) for i, v in enumerate(R))
                                 + term(N + count, 2 - sum(R)))
    return rs, R, a


def test_weighted_two_variable_maximum_is_a_critical_point_and_a_maximum():
    # A mathematical check, not a published value: the answer must make the
    # gradient vanish identically in N and the Hessian negative definite for
    # every N >= 2 (proven here by factoring the minors).
    N = declare("N", "integer", ge=2)
    rs, R, a = weighted(2, N.symbol)
    r = extremize("maximize", a, [(v, None) for v in R], [N] + rs, "weighted-two-variable.md:11",
                  name="a")
    at = dict(zip(R, r.point))
    assert all(sympy.expand(sympy.diff(a, v).xreplace(at)) == 0 for v in R)
    # by hand: the second derivative of n(3u^3 - u) is 18 n u, and u = r - 1 = -1/3
    Ns = N.symbol
    hand = sympy.Matrix([[-9 * (Ns + 1) / 8, -9 * (Ns + 2) / 16],
                         [-9 * (Ns + 2) / 16, -9 * (2 * Ns + 3) / 16]])
    assert sympy.expand(sympy.hessian(a, R).xreplace(at) - hand) == sympy.zeros(2, 2)
    # det = 81 (3N^2 + 6N + 2)/256 > 0 and the first minor < 0: negative definite
    assert sympy.expand(hand.det() - sympy.Rational(81, 256) * (3 * Ns ** 2 + 6 * Ns + 2)) == 0
    assert r.point == (sympy.Rational(2, 3), sympy.Rational(2, 3))
    assert sympy.expand(r.value - a.xreplace(at)) == 0
    # the other critical points, roots of a cubic in r2, are ruled out for every N
    # by checking one N in each interval where they can change (cells.py)
    assert r.settled == "symbolic" and "degree 3 in r2" in r.account
    assert "no maximum for any N" in r.account


def test_weighted_three_variable_maximum_has_no_closed_form_and_says_why():
    # The critical equations have real solutions; at every sample N the only
    # maximum lies on the component cut out by an irreducible polynomial of
    # degree 8 in r3, so the message names it and the point (mathematical check).
    N = declare("N", "integer", ge=2)
    rs, R, a = weighted(3, N.symbol)
    with pytest.raises(ExtremizeError, match=r"the maximum of a is a root of .* a polynomial of "
                                             r"degree 8 in r3, irreducible .* at N = \d+, at "
                                             r"r1 ≈ 0\.\d+, r2 ≈ 0\.\d+, r3 ≈ 0\.\d+") as caught:
        extremize("maximize", a, [(v, None) for v in R], [N] + rs, "weighted-three-variable.md:12",
                  name="a")
    assert caught.value.status == "error"


def test_weighted_three_variable_maximum_at_fixed_n_is_exact():
    # At N = 2 there are no parameters: the maximum is an exact algebraic point
    # (CRootOf); check the gradient vanishes and the Hessian is negative definite
    # to 40 digits (mathematical check, no published value).
    rs, R, a = weighted(3, 2)
    r = extremize("maximize", a, [(v, None) for v in R], rs, "s", name="a")
    assert r.point[-1].has(sympy.CRootOf)
    at = dict(zip(R, r.point))
    for v in R:
        assert abs(sympy.N(sympy.diff(a, v).xreplace(at), 50)) < 1e-40
    minors = [sympy.N(sympy.hessian(a, R)[:k, :k].det().xreplace(at), 50) for k in (1, 2, 3)]
    assert minors[0] < 0 < minors[1] and minors[2] < 0
    assert abs(sympy.N(r.value - a.xreplace(at), 50)) < 1e-40


def test_two_variables_with_a_square_root_and_a_parameter():
    # f = k x - x^3/3 - (y - x)^2: y = x and x^2 = k, an irreducible quadratic;
    # the Hessian [[-2x - 2, 2], [2, -2]] has det 4x, so x = y = sqrt(k) is the
    # maximum for k > 0 (hand-checkable, common practice, no source).
    x, y, k = declare("x"), declare("y"), declare("k", "positive")
    X, Y, K = x.symbol, y.symbol, k.symbol
    r = extremize("maximize", K * X - X ** 3 / 3 - (Y - X) ** 2, [(X, None), (Y, None)],
                  [x, y, k], "s")
    assert r.point == (sympy.sqrt(K), sympy.sqrt(K)) and r.settled == "symbolic"
    assert sympy.expand(r.value - sympy.Rational(2, 3) * K ** sympy.Rational(3, 2)) == 0


# -- proof by cells (one parameter) ------------------------------------------------

def test_cells_test_one_integer_in_every_interval_and_each_critical_value():
    N = declare("N", "integer", ge=2)
    critical = [F(5), (F(72, 10), F(73, 10)), F(-3)]
    points = cells.test_points(N, critical)
    # intervals of N >= 2: [2, 5), {5}, (5, 7.2x), (7.2x, oo)
    assert {F(2), F(5), F(6), F(8)} <= set(points)
    assert all(p.denominator == 1 and p >= 2 for p in points)


def test_cells_for_a_real_parameter():
    x = declare("x", gt=0, lt=1)
    assert cells.test_points(x, [F(1, 2)]) == [F(1, 4), F(1, 2), F(3, 4)]
    assert cells.test_points(x, [(F(1, 3), F(34, 100))]) is None   # irrational cut inside
    assert cells.test_points(x, [(F(3), F(31, 10))]) == [F(1, 2)]  # outside the range


def test_cells_prove_only_what_holds_for_every_parameter_value():
    # f = g(x) - (y - x)^2 with g'(x) = -(x - 1)(x^3 - k): critical points (1, 1)
    # and (c, c) with c^3 = k, an irreducible cubic over Q(k).  The Hessian is
    # negative definite where g'' < 0: g''(1) = k - 1 and g''(c) = -3c^2(c - 1),
    # so (1, 1) is the maximum for k < 1 and (c, c) for k > 1 (hand-checkable).
    x, y = declare("x"), declare("y")
    X, Y = x.symbol, y.symbol
    small = declare("k", gt=0, lt=F(1, 2))
    K = small.symbol
    f = -(X ** 5 / 5 - X ** 4 / 4 - K * X ** 2 / 2 + K * X) - (Y - X) ** 2
    r = extremize("maximize", f, [(X, None), (Y, None)], [x, y, small], "s")
    assert r.point == (1, 1) and r.settled == "symbolic"
    assert "no maximum for any k" in r.account
    # for k > 0 the maximum changes branch at k = 1: no proof, and the samples see both
    wide = declare("k", "positive")
    f = f.xreplace({K: wide.symbol})
    with pytest.raises(ExtremizeError, match="different sample points pick different roots"):
        extremize("maximize", f, [(X, None), (Y, None)], [x, y, wide], "s")
