"""Fibers given by the fixed points of a circle or torus action, integrated by localization.

A fiber of real dimension 2k is described by its isolated fixed points: at
each, the k weights of the tangent representation (linear forms in the
equivariant parameters, one parameter per circle) and the order of the
orbifold group there (1 for a smooth point).  An equivariant class is known
by its restrictions to the fixed points; the integral is the localization
formula of Atiyah and Bott (Topology 23, 1984) and Berline and Vergne (1982),
with the orbifold order dividing each contribution:

    ∫_F X = Σ_p X|_p / (d_p · e_p),   e_p = product of the tangent weights at p.

The sum is a rational function of the parameters; it is put over the
common denominator and divided exactly by each linear form of it, so a
leftover pole (inconsistent data) is reported, never silently dropped.  The
parameters must be formal generators without relations; identifying a
parameter with c1 of a base line bundle is a substitution made after the
division (``identify``).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from functools import reduce
from math import lcm

import sympy

from .fibers import CrossCheck, Fiber, FiberError
from .graded import AlgebraError, Element, Ring


@dataclass(frozen=True)
class FixedPoint:
    """An isolated fixed point: its name, its tangent weights and its orbifold order.

    A weight is a tuple of coefficients, one per equivariant parameter; with
    one parameter a bare number may stand for the 1-tuple.  Coefficients and
    the order are ints, Fractions, sympy expressions in the document's
    symbols, or class-free elements.
    """

    name: str
    weights: tuple
    order: object = 1


@dataclass(frozen=True)
class LocalizedFiber(Fiber):
    """A fiber integrated by localization (``integrals`` stays empty: every
    degree of fiber class can integrate to a nonzero polynomial in the
    parameters)."""

    parameters: tuple = ()      # generator keys of the equivariant parameters
    points: tuple = ()          # FixedPoint with sympy coefficients and order
    restrictions: dict = field(default_factory=dict)   # class key -> Elements, one per point
    identify: dict = field(default_factory=dict)       # parameter key -> Element it stands for

    def weight(self, point: FixedPoint, i: int) -> Element:
        """The i-th tangent weight at ``point`` as a degree-2 element."""
        return _linear(self.ring, self.parameters, point.weights[i])

    def restrict(self, x: Element, index: int) -> Element:
        """X restricted to the fixed point ``points[index]``."""
        unknown = sorted(x.generator_keys() & self.class_keys() - set(self.restrictions))
        if unknown:
            raise FiberError(f"no restriction to the fixed points of {self.name} is known "
                             f"for {', '.join(unknown)}")
        return x.substitute({k: v[index] for k, v in self.restrictions.items()})

    def localize(self, values) -> tuple[Element, list[str]]:
        """Σ_p values[p] / (d_p e_p) as a polynomial in the parameters, and its poles.

        Each pole is described as text; the polynomial part is returned either way.
        """
        forms, scale = _denominators(self)
        common: dict = {}
        for point_forms in forms:
            for form in set(point_forms):
                common[form] = max(common.get(form, 0), point_forms.count(form))
        extra = sum(common.values()) - self.dimension // 2
        top = max((d for v in values for d in v.degrees()), default=0)
        if top + 2 * extra > self.ring.truncate:
            raise FiberError(f"localization over {self.name} needs degree {top + 2 * extra}, "
                             f"above truncate {self.ring.truncate}")
        numerator = self.ring.zero()
        for value, point_forms, s in zip(values, forms, scale):
            cofactor = self.ring.one()
            for form, m in common.items():
                cofactor = cofactor * _linear(self.ring, self.parameters, form) ** (
                    m - point_forms.count(form))
            numerator = numerator + value * cofactor / s
        poles = []
        remaining = [form for form, m in common.items() for _ in range(m)]
        while remaining:
            form = remaining.pop()
            numerator, remainder = _divide(self.ring, self.parameters, numerator, form)
            if not remainder.is_zero:
                rest = [form] + remaining
                poles.append(f"({remainder.to_text()}) / ("
                             + "*".join(f"({_linear(self.ring, self.parameters, f).to_text()})"
                                        for f in rest) + ")")
        return numerator, poles

    def contributions(self, values) -> str:
        """Each fixed point's term, for the report of a failed check."""
        return "; ".join(f"{p.name}: ({v.to_text()}) / ({p.order} * "
                         + "*".join(f"({self.weight(p, i).to_text()})"
                                    for i in range(len(p.weights))) + ")"
                         for p, v in zip(self.points, values))


# -- declaration ------------------------------------------------------------------

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
            raise FiberError(f"the equivariant parameter {info.text} must be a degree-2 class "
                             f"outside the fiber {name}")
    points = tuple(_checked_point(name, p, len(parameters), dimension // 2) for p in points)
    if not points:
        raise FiberError(f"{name} needs at least one fixed point")
    names = [p.name for p in points]
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        raise FiberError(f"fixed point {twice[0]} of {name} is declared twice")
    table = {key: _checked_restrictions(ring, name, group, parameters, names, key, values)
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


def _checked_point(fiber: str, point: FixedPoint, rank: int, k: int) -> FixedPoint:
    where = f"fixed point {point.name} of {fiber}"
    order = _scalar(point.order, f"the order of {where}")
    if order.is_integer is not True or order.is_positive is not True:
        raise FiberError(f"the order of {where} must be a positive integer, not {order}")
    weights = tuple(_weight(w, rank, where) for w in point.weights)
    if len(weights) != k:
        raise FiberError(f"{where} has {len(weights)} tangent weights; a fiber of dimension "
                         f"{2 * k} needs {k}")
    for w in weights:
        if not any(c.is_zero is False for c in w):
            raise FiberError(f"a tangent weight at {where} is zero (or not provably nonzero): "
                             f"{_form_text(w)}; fixed points must be isolated")
    return FixedPoint(point.name, weights, order)


def _weight(w, rank: int, where: str) -> tuple:
    coefficients = tuple(w) if isinstance(w, (tuple, list)) else (w,)
    if len(coefficients) != rank:
        raise FiberError(f"a tangent weight at {where} has {len(coefficients)} components; "
                         f"there are {rank} equivariant parameters")
    return tuple(_scalar(c, f"a tangent weight at {where}") for c in coefficients)


def _checked_restrictions(ring, fiber, group, parameters, names, key, values) -> tuple:
    info = ring.generator_info(key)
    if info.group != group:
        raise FiberError(f"{info.text} is not a class of the fiber {fiber}")
    missing = [n for n in names if n not in values]
    if missing:
        raise FiberError(f"the restriction of {info.text} to fixed point {missing[0]} of "
                         f"{fiber} is missing")
    extra = sorted(set(values) - set(names))
    if extra:
        raise FiberError(f"{extra[0]} is not a fixed point of {fiber}")
    out = []
    for n in names:
        value = values[n]
        inside = sorted(k for k in value.generator_keys()
                        if ring.generator_info(k).group == group)
        if inside:
            raise FiberError(f"the restriction of {info.text} to {n} contains the fiber class "
                             f"{inside[0]}")
        if value.degrees() not in ([info.degree], []):
            raise FiberError(f"the restriction of {info.text} to fixed point {n} of {fiber} "
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
        p = _checked_point(fiber_name, p, len(tuple(parameters)), len(p.weights))
        ws = [_linear(ring, tuple(parameters), w) for w in p.weights]
        out[p.name] = TANGENT[kind](ws, index, ring.one())
    return out


# -- integration -----------------------------------------------------------------

def integrate(x: Element, fiber: LocalizedFiber) -> tuple[Element, list[CrossCheck]]:
    """∫_F X by localization, then the identification of the parameters.

    Checked: no pole is left in the parameters, the degree drops by dim F,
    and no fiber class is left.
    """
    values = [fiber.restrict(x, i) for i in range(len(fiber.points))]
    total, poles = fiber.localize(values)
    params = ", ".join(fiber.ring.generator_info(k).text for k in fiber.parameters)
    checks = [CrossCheck(
        f"localization over {fiber.name} leaves no pole in {params}", not poles,
        ("poles: " + " + ".join(poles) + "; by fixed point: " + fiber.contributions(values))
        if poles else "")]
    try:
        result = total.substitute(fiber.identify) if fiber.identify else total
    except AlgebraError as err:
        raise FiberError(str(err)) from None
    expected = {d - fiber.dimension for d in x.degrees() if d >= fiber.dimension}
    checks.append(CrossCheck(
        f"degree of the integral over {fiber.name} is deg - {fiber.dimension}",
        set(result.degrees()) <= expected,
        f"integrand degrees {x.degrees()}, result degrees {result.degrees()}"))
    left = sorted(result.generator_keys() & fiber.class_keys())
    checks.append(CrossCheck(f"no class of {fiber.name} is left", not left,
                             f"left: {', '.join(left)}" if left else ""))
    return result, checks


def consistency_checks(fiber: LocalizedFiber) -> list[CrossCheck]:
    """Checks of the data themselves, each naming what is wrong.

    - at a point of order d the circle acts on the orbifold chart through at
      most a d-fold cover, so d times each tangent weight is integral;
    - ∫ c_j(T) = 0 for j < k (no pole), and likewise ∫ c^j = 0 for each
      degree-2 class c, j < k: the weights' relation to the degrees;
    - ∫ c^k of each degree-2 class, times the lcm of the orders, is an integer.
    """
    ring, k = fiber.ring, fiber.dimension // 2
    checks = []
    for p in fiber.points:
        bad = [c for w in p.weights for c in w if (p.order * c).is_integer is False]
        checks.append(CrossCheck(
            f"tangent weights at {p.name} are integral up to its order {p.order}",
            not bad, f"order * weight is not an integer for the component(s) "
                     f"{', '.join(map(str, bad))}" if bad else ""))
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
            checks.append(_vanishing(fiber, [v ** j for v in values], _power_text(info.text, j)))
        top, poles = fiber.localize([v ** k for v in values])
        if poles:
            continue
        degree = sum((c for pairs, c in top.terms() if not pairs), sympy.Integer(0))
        ok = (degree * lcm_orders).is_integer is not False
        checks.append(CrossCheck(
            f"the degree of {_power_text(info.text, k)} over {fiber.name} is integral up to the orders",
            ok, f"degree {degree}, lcm of the orders {lcm_orders}"))
    return checks


def _vanishing(fiber: LocalizedFiber, values, what: str) -> CrossCheck:
    total, poles = fiber.localize(values)
    ok = not poles and total.is_zero
    parts = ([] if total.is_zero else [total.to_text()]) + poles
    detail = "" if ok else (f"∫ {what} = {' + '.join(parts)}; by fixed point: "
                            + fiber.contributions(values))
    return CrossCheck(f"∫ {what} over {fiber.name} vanishes (below its dimension)", ok, detail)


# -- arithmetic of linear forms ----------------------------------------------------

def _denominators(fiber: LocalizedFiber) -> tuple[list, list]:
    """Per point: its weights as forms normalised to a leading 1, and the
    scalar d_p Π(pivot coefficients) left over."""
    forms, scale = [], []
    for p in fiber.points:
        s = p.order
        point_forms = []
        for w in p.weights:
            pivot = next(c for c in w if c.is_zero is False)
            point_forms.append(tuple(sympy.cancel(c / pivot) for c in w))
            s = s * pivot
        forms.append(point_forms)
        scale.append(fiber.ring.scalar(sympy.cancel(s)))
    return forms, scale


def _divide(ring: Ring, parameters: tuple, x: Element, form: tuple) -> tuple[Element, Element]:
    """x = (v + b) q + r with v the form's pivot parameter (coefficient 1): (q, r)."""
    j = next(i for i, c in enumerate(form) if c == 1)
    v = parameters[j]
    b = _linear(ring, parameters, tuple(0 if i == j else c for i, c in enumerate(form)))
    powers: dict[int, Element] = {}
    for pairs, coefficient in x.terms():
        exponents = dict(pairs)
        n = exponents.pop(v, 0)
        term = ring.scalar(coefficient)
        for key, e in exponents.items():
            term = term * ring.gen(key) ** e
        powers[n] = powers.get(n, ring.zero()) + term
    quotient, q = ring.zero(), ring.zero()
    for n in range(max(powers, default=0), 0, -1):
        q = powers.get(n, ring.zero()) - b * q
        quotient = quotient + q * ring.gen(v) ** (n - 1)
    return quotient, powers.get(0, ring.zero()) - b * q


def _linear(ring: Ring, parameters: tuple, form: tuple) -> Element:
    total = ring.zero()
    for key, c in zip(parameters, form):
        if c != 0:
            total = total + ring.scalar(c) * ring.gen(key)
    return total


def _scalar(value, what: str) -> sympy.Expr:
    """A number or rational function of the symbols as a sympy expression."""
    if isinstance(value, Element):
        if not value.is_class_free():
            raise FiberError(f"{what} must be a number, not {value.to_text()}")
        return value.to_scalar()
    if isinstance(value, bool):
        raise FiberError(f"{what} must be a number, not {value!r}")
    if isinstance(value, int):
        return sympy.Integer(value)
    if isinstance(value, Fraction):
        return sympy.Rational(value.numerator, value.denominator)
    if isinstance(value, sympy.Expr) and not value.has(sympy.Float):
        return value
    raise FiberError(f"{what} must be an exact number, not {value!r}")


def _lcm(orders) -> sympy.Expr:
    """lcm of numeric orders; with symbolic orders the product of the distinct
    ones (a multiple of the lcm, so the integrality check is weaker there)."""
    if all(o.is_Integer for o in orders):
        return sympy.Integer(lcm(*(int(o) for o in orders)))
    return sympy.Mul(*set(orders))


def _power_text(text: str, j: int) -> str:
    return text if j == 1 else f"{text}^{j}"


def _form_text(form: tuple) -> str:
    return "(" + ", ".join(map(str, form)) + ")"
