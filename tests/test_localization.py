"""Fibers given by fixed points of a circle or torus action, integrated by localization."""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra.fibers import FiberError, surface_fiber
from compiler.algebra.general_fibers import declare_fiber_classes, general_fiber
from compiler.algebra.fibers import integrate as integrate_by_relations
from compiler.algebra.graded import Ring
from compiler.algebra.fixed_points import (consistency_checks, localized_fiber,
                                           tangent_restrictions)
from compiler.algebra.localization import FixedPoint, integrate

n = sympy.Symbol("n", integer=True, positive=True)
n1 = sympy.Symbol("n1", integer=True, positive=True)
n2 = sympy.Symbol("n2", integer=True, positive=True)

FIBER = 1   # the fiber's group of classes


def gen(ring, key, degree=2, group=0):
    return ring.generator(key, degree, group=group)


def build(points, classes, parameters=("eps",), dimension=None, symbols=(), truncate=12,
          identify=None):
    """A ring, the fiber D with the tangent Euler class "e" and ``classes``
    ({key: {point: restriction maker}}, each maker taking the ring)."""
    ring = Ring(list(symbols), truncate)
    for key in parameters:
        gen(ring, key)
    dimension = dimension or 2 * len(points[0].weights)
    restrictions = {"e": tangent_restrictions("D", ring, parameters, points, "e")}
    gen(ring, "e", dimension, FIBER)
    for key, values in classes.items():
        gen(ring, key, 2, FIBER)
        restrictions[key] = {p: make(ring) for p, make in values.items()}
    fiber = localized_fiber("D", ring, FIBER, dimension, parameters, points, restrictions,
                            {k: v(ring) for k, v in (identify or {}).items()})
    return ring, fiber


def assert_checks_pass(checks):
    for c in checks:
        assert c.ok, (c.what, c.detail)


def moment(mu, key="eps"):
    return lambda ring: ring.scalar(mu) * ring.gen(key)


# -- the two-sphere ---------------------------------------------------------------

SPHERE = (FixedPoint("N", (1,)), FixedPoint("S", (-1,)))


@pytest.mark.parametrize("degree", [-2, 0, 1, 3])
def test_sphere(degree):
    # ∫_{S^2} 1 = 0, ∫ e(TS^2) = 2 (Gauss-Bonnet), ∫ c1(O(n)) = n, all by localization
    # at the poles (Atiyah and Bott, "The moment map and equivariant cohomology",
    # Topology 23, 1984; Berline and Vergne 1982).  O(n) has moment values n and 0 at
    # the poles (common practice, no source).
    ring, fiber = build(SPHERE, {"L": {"N": moment(degree), "S": moment(0)}})
    assert_checks_pass(consistency_checks(fiber))
    for x, expected in ((ring.one(), 0), (ring.gen("e"), 2), (ring.gen("L"), degree)):
        result, checks = integrate(x, fiber)
        assert result == ring.scalar(expected)
        assert_checks_pass(checks)


def test_sphere_equivariant_square_identified_with_a_base_class():
    # ∫ c1^T(L)^2 = (μ_N^2 - μ_S^2) eps for weights ±1 (Atiyah and Bott 1984); with
    # eps = c1(J) the integral over the sphere bundle is n^2 c1(J) (common practice,
    # no source).
    ring, fiber = build(SPHERE, {"L": {"N": moment(3), "S": moment(0)}},
                        identify={"eps": lambda r: gen(r, "c1(J)")})
    result, checks = integrate(ring.gen("L") ** 2 + ring.gen("e") * ring.gen("L"), fiber)
    # e*L: (eps * 3eps)/eps + (-eps * 0)/(-eps) = 3 eps
    assert result == 12 * ring.gen("c1(J)")
    assert_checks_pass(checks)


def test_sphere_with_same_sign_weights_leaves_a_pole():
    # Weights +1 and +1 cannot come from a circle action on S^2: ∫ 1 = 2/eps.
    ring, fiber = build((FixedPoint("N", (1,)), FixedPoint("S", (1,))), {})
    result, checks = integrate(ring.one(), fiber)
    pole = checks[0]
    assert not pole.ok and "N:" in pole.detail and "S:" in pole.detail
    vanishing = [c for c in consistency_checks(fiber) if c.what.startswith("∫ 1")]
    assert len(vanishing) == 1 and not vanishing[0].ok


# -- the projective plane ------------------------------------------------------------

def cp2_points(lam):
    """Fixed points p_i of CP^2 under t.[z] = [t^{λ_i} z_i]: weights λ_j - λ_i (j ≠ i)."""
    return tuple(FixedPoint(f"p{i}", tuple(tuple(a - b for a, b in zip(lam[j], lam[i]))
                                           for j in range(3) if j != i)) for i in range(3))


CIRCLE_LAMBDA = ((0,), (1,), (3,))
TORUS_LAMBDA = ((0, 0), (1, 0), (0, 1))


@pytest.mark.parametrize("lam,params", [(CIRCLE_LAMBDA, ("eps",)),
                                        (TORUS_LAMBDA, ("eps1", "eps2"))])
def test_projective_plane(lam, params):
    # ∫_{CP^2} H^2 = 1, ∫ c1(T)^2 = 9, χ = ∫ e(T) = 3 (Atiyah and Bott, Topology 23,
    # 1984, and Berline and Vergne 1982, for the localization formula; the numbers
    # are common practice, no source).  H|_{p_i} = -λ_i.
    points = cp2_points(lam)
    ring = Ring([], 12)
    for key in params:
        gen(ring, key)
    h = {p.name: -sum((ring.scalar(c) * ring.gen(k) for c, k in zip(lam[i], params)),
                      ring.zero()) for i, p in enumerate(points)}
    restrictions = {"H": h, "e": tangent_restrictions("CP2", ring, params, points, "e"),
                    "c1": tangent_restrictions("CP2", ring, params, points, "c", 1)}
    gen(ring, "H", 2, FIBER), gen(ring, "e", 4, FIBER), gen(ring, "c1", 2, FIBER)
    fiber = localized_fiber("CP2", ring, FIBER, 4, params, points, restrictions)
    assert_checks_pass(consistency_checks(fiber))
    for x, expected in ((ring.gen("H") ** 2, 1), (ring.gen("c1") ** 2, 9),
                        (ring.gen("e"), 3), (ring.gen("H"), 0), (ring.one(), 0)):
        result, checks = integrate(x, fiber)
        assert result == ring.scalar(expected)
        assert_checks_pass(checks)


def cp2_hyperplane(h_at_p2: int):
    """CP^2 with the equivariant hyperplane class H: H|_{p0} = 0, H|_{p1} = -eps1 and
    H|_{p2} = h_at_p2 * eps2 (-1 is the consistent value).  Returns (ring, eps1, eps2, fiber)."""
    points = cp2_points(TORUS_LAMBDA)
    ring = Ring([], 12)
    e1, e2 = gen(ring, "eps1"), gen(ring, "eps2")
    gen(ring, "H", 2, FIBER)
    fiber = localized_fiber("CP2", ring, FIBER, 4, ("eps1", "eps2"), points,
                            {"H": {"p0": ring.zero(), "p1": -e1, "p2": h_at_p2 * e2}})
    return ring, e1, e2, fiber


def test_projective_plane_cubic_against_the_equivariant_relation():
    # H_T(CP^2) = Q[H, eps1, eps2] / (H (H - eps1)(H - eps2)) with H|_{p_i} = -λ_i, so
    # H^3 = (eps1 + eps2) H^2 - eps1 eps2 H and ∫ H^3 = eps1 + eps2 (Atiyah and Bott
    # 1984, the equivariant cohomology of projective space): a polynomial, reached
    # only after dividing by the weights eps2 - eps1.
    ring, e1, e2, fiber = cp2_hyperplane(h_at_p2=-1)
    result, checks = integrate(ring.gen("H") ** 3, fiber)
    assert result == -(e1 + e2)
    assert_checks_pass(checks)


def test_projective_plane_with_inconsistent_moment_values():
    # A line bundle's restrictions must make ∫ H below the top degree vanish; H|_{p2}
    # with the wrong sign leaves the pole 2/(eps2 - eps1) (Atiyah and Bott 1984).
    ring, e1, e2, fiber = cp2_hyperplane(h_at_p2=1)
    failed = [c for c in consistency_checks(fiber) if not c.ok]
    assert [c.what for c in failed] == ["∫ H over CP2 vanishes (below its dimension)"]
    assert "p2: (eps2)" in failed[0].detail
    assert not integrate(ring.gen("H"), fiber)[1][0].ok


# -- Hirzebruch surfaces --------------------------------------------------------------

def hirzebruch(ring, k):
    """F_k as a toric surface with rays (1,0), (0,1), (-1,k), (0,-1): at each of the
    four fixed points the tangent weights are the dual basis of its cone, and the
    divisor D_i restricts to the dual vector of ray i (common practice, no source)."""
    t1, t2 = ring.gen("t1"), ring.gen("t2")
    points = (FixedPoint("P12", ((1, 0), (0, 1))),
              FixedPoint("P23", ((k, 1), (-1, 0))),
              FixedPoint("P34", ((-1, 0), (-k, -1))),
              FixedPoint("P41", ((0, -1), (1, 0))))
    zero = ring.zero()
    d1 = {"P12": t1, "P23": zero, "P34": zero, "P41": t1}
    d2 = {"P12": t2, "P23": k * t1 + t2, "P34": zero, "P41": zero}
    return points, d1, d2


@pytest.mark.parametrize("k", [0, 1, 2, 3, n])
def test_hirzebruch_surface_against_classes_and_relations(k):
    # F_k with fiber class x and section y: x^2 = 0, y^2 = -k x y, ∫ x y = 1
    # (Griffiths and Harris, Principles of Algebraic Geometry, 1978, ch. 4 §3,
    # from memory); c1(T) = 2y + (k+2)x, so ∫ c1^2 = 8 and χ = 4.
    ring = Ring([n], 12)
    gen(ring, "t1"), gen(ring, "t2")
    points, d1, d2 = hirzebruch(ring, k)
    gen(ring, "x", 2, FIBER), gen(ring, "y", 2, FIBER), gen(ring, "e", 4, FIBER)
    restrictions = {"x": d1, "y": d2,
                    "e": tangent_restrictions("F", ring, ("t1", "t2"), points, "e")}
    fiber = localized_fiber("F", ring, FIBER, 4, ("t1", "t2"), points, restrictions)
    assert_checks_pass(consistency_checks(fiber))

    other = Ring([n], 12)
    cls = declare_fiber_classes(other, 1, [("x", 2), ("y", 2)], 4, "F")
    x, y = cls["x"], cls["y"]
    relations = [x * x, y * y + k * x * y]
    by_relations = general_fiber("F", other, 1, 4, relations, [(x * y, other.one())])

    X, Y = ring.gen("x"), ring.gen("y")
    c1, c1_other = 2 * Y + (k + 2) * X, 2 * y + (k + 2) * x
    for mine, theirs in ((X * X, x * x), (X * Y, x * y), (Y * Y, y * y), (c1 ** 2, c1_other ** 2),
                         (3 * X * Y - Y * Y, 3 * x * y - y * y)):
        expected, _ = integrate_by_relations(theirs, by_relations)
        result, checks = integrate(mine, fiber)
        assert_checks_pass(checks)
        assert result == ring.scalar(expected.to_scalar())
    assert integrate(c1 ** 2, fiber)[0] == ring.scalar(8)
    assert integrate(ring.gen("e"), fiber)[0] == ring.scalar(4)


# -- the spindle -------------------------------------------------------------------

def spindle(a=n1, b=n2, mu_north=None):
    """WCP^1[n1, n2] rotated with weight 1/n1 at the pole of order n1 and -1/n2 at
    the other; O(1) restricts to 1/(n1 n2) and 0 (from the homogeneous coordinates)."""
    points = (FixedPoint("N", (1 / sympy.sympify(a),), a),
              FixedPoint("S", (-1 / sympy.sympify(b),), b))
    mu = mu_north if mu_north is not None else 1 / (sympy.sympify(a) * b)
    return build(points, {"O1": {"N": moment(mu), "S": moment(0)}}, symbols=(n1, n2))


def test_spindle_euler_characteristic_and_degree():
    # χ(WCP^1[n1,n2]) = 1/n1 + 1/n2 and deg O(1) = 1/(n1 n2) (common practice, no
    # source; also Ferrero, Gauntlett, Martelli and Sparks, "M5-branes wrapped on a
    # spindle", 2021, for the spindle data).
    ring, fiber = spindle()
    assert_checks_pass(consistency_checks(fiber))
    chi, checks = integrate(ring.gen("e"), fiber)
    assert chi == ring.scalar(1 / n1 + 1 / n2)
    assert_checks_pass(checks)
    degree, checks = integrate(ring.gen("O1"), fiber)
    assert degree == ring.scalar(1 / (n1 * n2))
    assert_checks_pass(checks)


def test_spindle_smooth_limit_is_the_sphere():
    # n1 = n2 = 1 is the round sphere: χ = 2, deg O(1) = 1 (common practice, no source).
    ring, fiber = spindle(1, 1)
    assert integrate(ring.gen("e"), fiber)[0] == ring.scalar(2)
    assert integrate(ring.gen("O1"), fiber)[0] == ring.scalar(1)


def test_spindle_fractional_degree_fails_integrality():
    # deg 1/(2 n1 n2) is not integral up to the orders; the check names the class.
    ring, fiber = spindle(3, 5, mu_north=Fraction(1, 30))
    failed = [c for c in consistency_checks(fiber) if not c.ok]
    assert len(failed) == 1 and "O1" in failed[0].what and "1/30" in failed[0].detail


def test_tangent_weight_not_integral_up_to_the_order():
    # At a smooth point a circle acts with integer weights (common practice, no source).
    ring, fiber = build((FixedPoint("N", (Fraction(1, 2),)), FixedPoint("S", (Fraction(-1, 2),))),
                        {})
    failed = [c for c in consistency_checks(fiber) if not c.ok]
    assert [c.what for c in failed] == ["tangent weights at N are integral up to its order 1",
                                        "tangent weights at S are integral up to its order 1"]


# -- bad input: located errors naming the point -----------------------------------------

@pytest.mark.parametrize("points,message", [
    ((FixedPoint("N", (0,)), FixedPoint("S", (-1,))), "tangent weight at fixed point N"),
    ((FixedPoint("N", (1,), 0), FixedPoint("S", (-1,))), "order of fixed point N"),
    ((FixedPoint("N", (1,)), FixedPoint("S", (-1,), Fraction(1, 2))), "order of fixed point S"),
    ((FixedPoint("N", (1,)), FixedPoint("S", (-1,), -2)), "order of fixed point S"),
    ((FixedPoint("N", (1,)), FixedPoint("S", (-1,), sympy.Symbol("m"))), "order of fixed point S"),
    ((FixedPoint("N", (1, 2)), FixedPoint("S", (-1,))), "2 tangent weights"),
    ((FixedPoint("N", ((1, 2),)), FixedPoint("S", (-1,))), "2 components"),
    ((FixedPoint("N", (1,)), FixedPoint("N", (-1,))), "fixed point N of D is declared twice"),
    ((FixedPoint("N", (n1 - n2,)), FixedPoint("S", (-1,))), "not provably nonzero"),
])
def test_bad_fixed_point_data(points, message):
    with pytest.raises(FiberError, match=message):
        build(points, {}, dimension=2, symbols=(n1, n2))


def test_missing_and_misdegreed_restrictions():
    with pytest.raises(FiberError, match="restriction of L to fixed point S of D is missing"):
        build(SPHERE, {"L": {"N": moment(1)}})
    with pytest.raises(FiberError, match="restriction of L to fixed point N of D has degree"):
        build(SPHERE, {"L": {"N": lambda r: r.gen("eps") ** 2, "S": moment(0)}})
    with pytest.raises(FiberError, match="dimension of D must be a positive even number"):
        build(SPHERE, {}, dimension=3)


def test_integrand_with_a_class_without_restrictions():
    ring, fiber = build(SPHERE, {})
    gen(ring, "stray", 2, FIBER)
    with pytest.raises(FiberError, match="no restriction .* stray"):
        integrate(ring.gen("stray"), fiber)


# -- agreement with the genus-0 surface ---------------------------------------------------

def test_smooth_sphere_agrees_with_the_genus_zero_surface():
    # N = 4 SYM has I6 = (N^2/2) c1(F1) c1(F2) c1(F3) at large N (common practice, no
    # source); on S^2 with c1(F_i) = (2/3) c1(R) + c1(L), deg L = 2/3, the surface fiber
    # (∫ e(TS) = 2, e(TS)^2 = 0, c1(L) = e(TS)/3) and localization with the rotation
    # parameter set to epsilon*c1(R) must agree at epsilon = 0 (common practice, no source).
    N, epsilon = sympy.symbols("N epsilon", positive=True)
    ring = Ring([N, epsilon], 12)
    c1r = gen(ring, "c1(R)")
    eps = gen(ring, "eps", 2, 3)
    gen(ring, "L", 2, FIBER)
    third = Fraction(1, 3)
    sphere = localized_fiber("S2", ring, FIBER, 2, ("eps",), SPHERE,
                             {"L": {"N": third * eps, "S": -third * eps}},
                             {"eps": ring.symbol(epsilon) * c1r})
    e_ts = gen(ring, "e(TS)", 2, 2)
    surface = surface_fiber("Sigma", ring, 2, 0, e_ts)
    nn = ring.symbol(N)

    def i6(line):
        return nn ** 2 / 2 * (Fraction(2, 3) * c1r + line) ** 3

    by_localization, checks = integrate(i6(ring.gen("L")), sphere)
    assert_checks_pass(checks)
    by_surface, _ = integrate_by_relations(i6(third * e_ts), surface)
    assert by_localization.substitute({epsilon: 0}) == by_surface
    assert by_surface == Fraction(4, 9) * nn ** 2 * c1r ** 2
    # and the rotation mixing enters at second order: (N^2/2)(8/9 + 2 epsilon^2/27)
    assert by_localization == nn ** 2 / 2 * (Fraction(8, 9) + Fraction(2, 27) * ring.symbol(
        epsilon) ** 2) * c1r ** 2


def test_zero_rotation_check_is_made_and_can_fail():
    # Restrictions of one class to the poles differ only by multiples of the
    # parameters (common practice, no source): c1(B) at N and 0 at S cannot be.
    ring, fiber = build(SPHERE, {"L": {"N": moment(2), "S": moment(0)}})
    _, checks = integrate(ring.gen("L") * ring.gen("e"), fiber)
    names = [c.what for c in checks]
    assert "at zero rotation, localization over D agrees with the genus-0 surface fiber" in names
    # ∫ L would leave the pole c1(B)/eps; ∫ L e does not, and the check catches it.
    ring, fiber = build(SPHERE, {"L": {"N": lambda r: gen(r, "c1(B)"), "S": moment(0)}})
    _, checks = integrate(ring.gen("L") * ring.gen("e"), fiber)
    failed = [c for c in checks if not c.ok]
    assert [c.what for c in failed] == ["L has the same base part at every fixed point of D"]
    assert "N: c1(B)" in failed[0].detail


def test_spindle_zero_rotation_check():
    # χ ω times deg O(1) ω vanishes without rotation; with it, the equivariant product
    # integrates to (1/n1)(1/(n1 n2)) eps (by localization, Atiyah and Bott 1984).
    ring, fiber = spindle()
    result, checks = integrate(ring.gen("e") * ring.gen("O1"), fiber)
    assert result == ring.scalar(1 / (n1 ** 2 * n2)) * ring.gen("eps")
    assert "agrees with the spindle's ordinary cohomology" in checks[-1].what
    assert_checks_pass(checks)


def test_undecided_integrality_fails_and_a_decided_one_passes():
    # Equal moment values -1/(3 n) at both poles give deg L = (n1 - n2)/(3 n1 n2):
    # integral up to the orders only when 3 divides n1 - n2 (common practice, no source).
    k = sympy.Symbol("k", integer=True, positive=True)

    def checks_for(a, b):
        points = (FixedPoint("N", (1 / a,), a), FixedPoint("S", (-1 / b,), b))
        ring, fiber = build(points, {"L": {"N": moment(-1 / (3 * a)), "S": moment(-1 / (3 * b))}},
                            symbols=(n1, n2, k))
        return [c for c in consistency_checks(fiber) if "degree of L" in c.what]

    undecided, = checks_for(n1, n2)
    assert not undecided.ok and "not decided" in undecided.detail
    decided, = checks_for(n2 + 3 * k, n2)
    assert decided.ok and "product k" in decided.detail
