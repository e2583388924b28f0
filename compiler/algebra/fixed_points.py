"""Declaring a fiber by fixed-point data: validation, tangent classes, checks of the data.

Problems that make the data meaningless (a vanishing weight, an order that
is not a positive integer, the wrong number of weights, a missing
restriction) are ``FiberError``s naming the fixed point.  Data that are
well formed but inconsistent (weights not integral up to the order, moment
values that leave poles, degrees not integral up to the orders) are failed
checks from ``consistency_checks``, each naming what is wrong.
"""
from __future__ import annotations

from fractions import Fraction
from functools import reduce
from math import lcm

from .fibers import CrossCheck, Fiber, FiberError, integrate as integrate_model
from .graded import Element, Ring
from .lazysympy import is_sympy, sympy
from .localization import FixedPoint, LocalizedFiber, is_integer, linear_form, nonzero


def localized_fiber(name: str, ring: Ring, group: int, dimension: int, parameters,
                    points, restrictions: dict, identify: dict | None = None) -> LocalizedFiber:
    """Check the fixed-point data and build the fiber.

    ``restrictions`` maps each fiber class key (a generator already registered
    in ``group``) to {point name: its restriction}, a polynomial in the
    parameters and base classes of the class's degree.  Problems are
    FiberErrors naming the fixed point.
    """
    if isinstance(dimension, bool) or not isinstance(dimension, int) or dimension <= 0 \
            or dimension % 2:
        raise FiberError(f"the dimension of {name} must be a positive even number, not "
                         f"{dimension}")
    parameters = tuple(parameters)
    if not parameters:
        raise FiberError(f"{name} needs at least one equivariant parameter")
    for key in parameters:
        info = ring.generator_info(key)
        if info.degree != 2 or info.group == group:
            raise FiberError(f"the equivariant parameter {info.key} must be a degree-2 class "
                             f"outside the fiber {name}")
    points = tuple(checked_point(name, p, len(parameters), dimension // 2) for p in points)
    if not points:
        raise FiberError(f"{name} needs at least one fixed point")
    names = [p.name for p in points]
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        raise FiberError(f"fixed point {twice[0]} of {name} is declared twice")
    table = {key: _checked_restrictions(ring, name, group, names, key, values)
             for key, values in restrictions.items()}
    identify = dict(identify or {})
    for key, value in identify.items():
        if key not in parameters:
            raise FiberError(f"{key} is not an equivariant parameter of {name}")
        if value.degrees() not in ([2], []):
            raise FiberError(f"the parameter {key} of {name} can only stand for a degree-2 "
                             f"class, not {value.to_text()}")
    return LocalizedFiber(name, ring, group, dimension, {}, parameters=parameters,
                          points=points, restrictions=table, identify=identify)


def checked_order(fiber: str, label: str, order):
    """The orbifold order of a fixed point, provably a positive integer."""
    where = f"the order of fixed point {label} of {fiber}"
    order = _scalar(order, where)
    positive = order > 0 if isinstance(order, Fraction) else order.is_positive
    if is_integer(order) is not True or positive is not True:
        raise FiberError(f"{where} must be a positive integer, not {_text(order)}")
    return order


def checked_point(fiber: str, point: FixedPoint, rank: int, k: int) -> FixedPoint:
    """The point with exact weights (``rank`` components each, ``k`` of them,
    none zero) and a positive integer order."""
    where = f"fixed point {point.name} of {fiber}"
    order = checked_order(fiber, point.name, point.order)
    weights = tuple(_weight(w, rank, where) for w in point.weights)
    if len(weights) != k:
        raise FiberError(f"{where} has {len(weights)} tangent weights; a fiber of dimension "
                         f"{2 * k} needs {k}")
    for w in weights:
        if not any(nonzero(c) for c in w):
            raise FiberError(f"a tangent weight at {where} is zero (or not provably nonzero): "
                             f"{_form_text(w)}; fixed points must be isolated")
    return FixedPoint(point.name, weights, order)


def _weight(w, rank: int, where: str) -> tuple:
    coefficients = tuple(w) if isinstance(w, (tuple, list)) else (w,)
    if len(coefficients) != rank:
        raise FiberError(f"a tangent weight at {where} has {len(coefficients)} components; "
                         f"there are {rank} equivariant parameters")
    return tuple(_scalar(c, f"a tangent weight at {where}") for c in coefficients)


def _checked_restrictions(ring, fiber, group, names, key, values) -> tuple:
    """The restrictions of class ``key`` in point order: one per point, each
    of the class's degree and free of the fiber's classes."""
    info = ring.generator_info(key)
    if info.group != group:
        raise FiberError(f"{info.key} is not a class of the fiber {fiber}")
    extra = sorted(set(values) - set(names))
    if extra:
        raise FiberError(f"{extra[0]} is not a fixed point of {fiber}")
    missing = [n for n in names if n not in values]
    if missing:
        raise FiberError(f"the restriction of {info.key} to fixed point {missing[0]} of "
                         f"{fiber} is missing")
    out = []
    for n in names:
        value = values[n]
        inside = sorted(k for k in value.generator_keys()
                        if ring.generator_info(k).group == group)
        if inside:
            raise FiberError(f"the restriction of {info.key} to {n} contains the fiber class "
                             f"{inside[0]}")
        if value.degrees() not in ([info.degree], []):
            raise FiberError(f"the restriction of {info.key} to fixed point {n} of {fiber} "
                             f"has degree {value.degrees()}, not {info.degree}")
        out.append(value)
    return tuple(out)


# -- tangent classes -----------------------------------------------------------------

def _elementary(values: list[Element], i: int, one: Element) -> Element:
    """The i-th elementary symmetric polynomial of ``values``."""
    e = [one] + [one * 0] * i
    for v in values:
        for j in range(i, 0, -1):
            e[j] = e[j] + v * e[j - 1]
    return e[i]


TANGENT = {
    "e": lambda ws, i, one: reduce(lambda a, b: a * b, ws, one),
    "c": lambda ws, i, one: _elementary(ws, i, one),
    "p": lambda ws, i, one: _elementary([w * w for w in ws], i, one),
}


def tangent_restrictions(fiber_name: str, ring: Ring, parameters, points, kind: str,
                         index: int = 0) -> dict:
    """{point name: restriction} of e(T), c_i(T) or p_i(T) of the fiber, from the weights.

    T is complex at each fixed point with the given weights, so c(T)|_p = Π(1 + w)
    and p(T)|_p = Π(1 + w²) (common practice, no source).
    """
    if kind not in TANGENT:
        raise FiberError(f"no tangent class {kind!r}; known: {', '.join(TANGENT)}")
    out = {}
    for p in points:
        p = checked_point(fiber_name, p, len(tuple(parameters)), len(p.weights))
        ws = [linear_form(ring, tuple(parameters), w) for w in p.weights]
        out[p.name] = TANGENT[kind](ws, index, ring.one())
    return out


def consistency_checks(fiber: LocalizedFiber) -> list[CrossCheck]:
    """Checks of the data themselves, each naming what is wrong.

    - at a point of order d the circle acts on the orbifold chart through at
      most a d-fold cover, so d times each tangent weight is integral;
    - ∫ c_j(T) = 0 for j < k (no pole), and likewise ∫ c^j = 0 for each
      degree-2 class c, j < k: the weights' relation to the degrees;
    - ∫ c^k of each degree-2 class, times the lcm of the orders, is an integer.

    A condition that cannot be decided for every value of the symbols fails
    (the detail says so): the data should be written so that it is decided.
    """
    ring, k = fiber.ring, fiber.dimension // 2
    checks = []
    for p in fiber.points:
        bad = [c for w in p.weights for c in w if is_integer(p.order * c) is not True]
        checks.append(CrossCheck(
            f"tangent weights at {p.name} are integral up to its order {fiber.text(p.order)}",
            not bad, f"order * weight is not provably an integer for the component(s) "
                     f"{', '.join(map(fiber.text, bad))}" if bad else ""))
    tangent = [TANGENT["c"]([fiber.weight(p, i) for i in range(k)], j, ring.one())
               for p in fiber.points for j in range(k)]
    for j in range(k):
        values = tangent[j::k]
        checks.append(_vanishing(fiber, values, f"c{j}(T)" if j else "1"))
    lcm_orders = _lcm([p.order for p in fiber.points])
    for key, values in fiber.restrictions.items():
        info = ring.generator_info(key)
        if info.degree != 2:
            continue
        for j in range(1, k):
            checks.append(_vanishing(fiber, [v ** j for v in values], _power_text(info.key, j)))
        top, poles = fiber.localize([v ** k for v in values])
        if poles:
            continue
        degree = _constant(top)
        scaled = degree * lcm_orders
        integral = scaled.rational()
        integral = is_integer(integral if integral is not None else sympy.cancel(scaled.to_scalar()))
        checks.append(CrossCheck(
            f"the degree of {_power_text(info.key, k)} over {fiber.name} is integral up to the orders",
            integral is True,
            f"degree {fiber.text(degree)}, lcm of the orders {fiber.text(lcm_orders)}, "
            f"product {fiber.text(scaled)}"
            + ("" if integral is not None else " (not decided for all values of "
                                               "the symbols)")))
    return checks


def model_agreement(fiber: LocalizedFiber, model: Fiber, classes: dict) -> CrossCheck:
    """∫_model m against the localization of the same product, for every
    monomial m of the model's top degree (so its relations are tested too).

    ``classes`` maps each model class key to a class key of ``fiber`` whose
    restrictions stand for it.  The localization's part of degree 0 in the
    parameters is the ordinary integral (Atiyah and Bott, Topology 23, 1984),
    so the two must agree on every monomial; the first that does not is named.
    """
    ring = fiber.ring
    unmapped = sorted(model.class_keys() - set(classes))
    if unmapped:
        raise FiberError(f"no line of {fiber.name} stands for the class "
                         f"{ring.generator_info(unmapped[0]).key} of {model.name}")
    shown = []
    for pairs in _top_monomials(ring, sorted(classes), model.dimension):
        text = ring.monomial_text(pairs)
        shown.append(text)
        product = reduce(lambda a, b: a * b, (ring.gen(k) ** e for k, e in pairs), ring.one())
        expected = _constant(integrate_model(product, model)[0])
        values = [reduce(lambda a, b: a * b, (fiber.restrictions[classes[k]][i] ** e
                                              for k, e in pairs), ring.one())
                  for i in range(len(fiber.points))]
        total, poles = fiber.localize(values)
        found = _constant(total)
        if poles or found != expected:
            return CrossCheck(f"localization over {fiber.name} agrees with {model.name}", False,
                              f"on {text}: ∫ over {model.name} = {fiber.text(expected)}, by "
                              + (f"localization poles {' + '.join(poles)}" if poles else
                                 f"localization {fiber.text(found)}"))
    return CrossCheck(f"localization over {fiber.name} agrees with {model.name} on "
                      + ", ".join(shown), True)


def _top_monomials(ring: Ring, keys: list, dimension: int) -> list:
    """Every monomial in ``keys`` of degree ``dimension``, as (key, exponent) pairs."""
    if not keys:
        return [()] if dimension == 0 else []
    degree = ring.generator_info(keys[0]).degree
    return [(((keys[0], e),) if e else ()) + rest
            for e in range(dimension // degree, -1, -1)
            for rest in _top_monomials(ring, keys[1:], dimension - e * degree)]


def _constant(x: Element) -> Element:
    """The part of ``x`` free of every class (degree 0)."""
    return x.coefficient([])


def _vanishing(fiber: LocalizedFiber, values, what: str) -> CrossCheck:
    total, poles = fiber.localize(values)
    ok = not poles and total.is_zero
    parts = ([] if total.is_zero else [total.to_text()]) + poles
    detail = "" if ok else (f"∫ {what} = {' + '.join(parts)}; by fixed point: "
                            + fiber.contributions(values))
    return CrossCheck(f"∫ {what} over {fiber.name} vanishes (below its dimension)", ok, detail)


def _scalar(value, what: str):
    """A number as a Fraction, a rational function of the symbols as a sympy
    expression (its sign and integrality then come from the assumptions)."""
    if isinstance(value, Element):
        if not value.is_class_free():
            raise FiberError(f"{what} must be a number, not {value.to_text()}")
        number = value.rational()
        return number if number is not None else value.to_scalar()
    if isinstance(value, bool):
        raise FiberError(f"{what} must be a number, not {value!r}")
    if isinstance(value, (int, Fraction)):
        return Fraction(value)
    if is_sympy(value) and isinstance(value, sympy.Expr) and not value.has(sympy.Float):
        return Fraction(int(value.p), int(value.q)) if value.is_Rational else value
    raise FiberError(f"{what} must be an exact number, not {value!r}")


def _lcm(orders):
    """lcm of numeric orders; with symbolic orders the product of the distinct
    ones (a multiple of the lcm, so the integrality check is weaker there)."""
    if all(isinstance(o, Fraction) for o in orders):
        return Fraction(lcm(*(o.numerator for o in orders)))
    return sympy.Mul(*set(orders))


def _power_text(text: str, j: int) -> str:
    return text if j == 1 else f"{text}^{j}"


def _form_text(form: tuple) -> str:
    return "(" + ", ".join(map(_text, form)) + ")"


def _text(value) -> str:
    """For messages about data that never reached the ring: powers as ^."""
    return str(value).replace("**", "^")
