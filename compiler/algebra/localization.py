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
division (``identify``).  Declaring such a fiber and checking its data is
``fixed_points``.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

from .errors import AlgebraError
from .fibers import CrossCheck, Fiber, FiberError
from .graded import Element, Ring
from .lazysympy import sympy


@dataclass(frozen=True)
class FixedPoint:
    """An isolated fixed point: its name, its tangent weights and its orbifold order.

    A weight is a tuple of coefficients, one per equivariant parameter; with
    one parameter a bare number may stand for the 1-tuple.  Coefficients and
    the order are ints, Fractions, sympy expressions in the document's
    symbols, or class-free elements; ``fixed_points.checked_point`` makes
    each a Fraction, or a sympy expression when it holds symbols.
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
    points: tuple = ()          # checked FixedPoints (Fraction or sympy numbers)
    restrictions: dict = field(default_factory=dict)   # class key -> Elements, one per point
    identify: dict = field(default_factory=dict)       # parameter key -> Element it stands for

    def weight(self, point: FixedPoint, i: int) -> Element:
        """The i-th tangent weight at ``point`` as a degree-2 element."""
        return linear_form(self.ring, self.parameters, point.weights[i])

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
            for form in point_forms:
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
                cofactor = cofactor * linear_form(self.ring, self.parameters, form) ** (
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
                             + "*".join(f"({linear_form(self.ring, self.parameters, f).to_text()})"
                                        for f in rest) + ")")
        return numerator, poles

    def text(self, value) -> str:
        """A number or rational function of the symbols, printed as values are."""
        return (value if isinstance(value, Element) else self.ring.scalar(value)).to_text()

    def contributions(self, values) -> str:
        """Each fixed point's term, for the report of a failed check."""
        return "; ".join(f"{p.name}: ({v.to_text()}) / ({self.text(p.order)} * "
                         + "*".join(f"({self.weight(p, i).to_text()})"
                                    for i in range(len(p.weights))) + ")"
                         for p, v in zip(self.points, values))


# -- integration -----------------------------------------------------------------

def integrate(x: Element, fiber: LocalizedFiber) -> tuple[Element, list[CrossCheck]]:
    """∫_F X by localization, then the identification of the parameters.

    Checked: no pole is left in the parameters, the degree drops by dim F,
    and no fiber class is left.
    """
    values = [fiber.restrict(x, i) for i in range(len(fiber.points))]
    total, poles = fiber.localize(values)
    params = ", ".join(fiber.ring.generator_info(k).key for k in fiber.parameters)
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
    if fiber.dimension == 2 and not poles:
        checks.append(_without_rotation(x, fiber, total))
    return result, checks


def _without_rotation(x: Element, fiber: LocalizedFiber, total: Element) -> CrossCheck:
    """A sphere or spindle with the rotation switched off, integrated the way a
    genus-0 surface fiber is: each class is its base part plus (∫ class) ω with
    ω^2 = 0 and ∫ ω = 1 (so e(T) = χ ω).  It must match localization at zero
    parameters; for a smooth sphere this is the surface fiber's computation.
    """
    ring = fiber.ring
    off = {k: ring.zero() for k in fiber.parameters}
    omega = fiber.parameters[0]      # free again once the parameters are off
    mapping = dict(off)
    for key, values in fiber.restrictions.items():
        base = [v.substitute(off) for v in values]
        if any(b != base[0] for b in base):
            return CrossCheck(f"{ring.generator_info(key).key} has the same base part at "
                              f"every fixed point of {fiber.name}", False,
                              "; ".join(f"{p.name}: {b.to_text()}"
                                        for p, b in zip(fiber.points, base)))
        integral, _ = fiber.localize(list(values))
        mapping[key] = base[0] + integral.substitute(off) * ring.gen(omega)
    plain = _powers(ring, x.substitute(mapping), omega).get(1, ring.zero())
    expected = total.substitute(off)
    smooth = all(p.order == 1 for p in fiber.points)
    what = "the genus-0 surface fiber" if smooth else "the spindle's ordinary cohomology"
    return CrossCheck(f"at zero rotation, localization over {fiber.name} agrees with {what}",
                      plain == expected,
                      f"localization {expected.to_text()}, direct {plain.to_text()}")


# -- arithmetic of linear forms ----------------------------------------------------

def _denominators(fiber: LocalizedFiber) -> tuple[list, list]:
    """Per point: its weights as forms normalised to a leading 1, and the
    scalar d_p Π(pivot coefficients) left over."""
    forms, scale = [], []
    for p in fiber.points:
        s = p.order
        point_forms = []
        for w in p.weights:
            pivot = next(c for c in w if nonzero(c))
            point_forms.append(tuple(cancel(c / pivot) for c in w))
            s = s * pivot
        forms.append(point_forms)
        scale.append(fiber.ring.scalar(cancel(s)))
    return forms, scale


def _divide(ring: Ring, parameters: tuple, x: Element, form: tuple) -> tuple[Element, Element]:
    """x = (v + b) q + r with v the form's pivot parameter (coefficient 1): (q, r)."""
    j = next(i for i, c in enumerate(form) if c == 1)
    v = parameters[j]
    b = linear_form(ring, parameters, tuple(0 if i == j else c for i, c in enumerate(form)))
    powers = _powers(ring, x, v)
    quotient, q = ring.zero(), ring.zero()
    for n in range(max(powers, default=0), 0, -1):
        q = powers.get(n, ring.zero()) - b * q
        quotient = quotient + q * ring.gen(v) ** (n - 1)
    return quotient, powers.get(0, ring.zero()) - b * q


def _powers(ring: Ring, x: Element, v: str) -> dict[int, Element]:
    """x = Σ_n x_n v^n with each x_n free of the generator v: {n: x_n}."""
    powers: dict[int, Element] = {}
    for pairs in x.monomials():
        exponents = dict(pairs)
        n = exponents.pop(v, 0)
        term = x.coefficient(pairs)
        for key, e in exponents.items():
            term = term * ring.gen(key) ** e
        powers[n] = powers.get(n, ring.zero()) + term
    return powers


# -- numbers of the data: Fractions, or sympy expressions when they hold symbols ----

def nonzero(c) -> bool:
    """Provably nonzero (for a symbolic value, by sympy's assumptions)."""
    return c != 0 if isinstance(c, Fraction) else c.is_zero is False


def is_integer(c):
    """True, False, or None (a symbolic value not decided by the assumptions)."""
    return c.denominator == 1 if isinstance(c, Fraction) else c.is_integer


def cancel(c):
    return c if isinstance(c, Fraction) else sympy.cancel(c)


def linear_form(ring: Ring, parameters: tuple, form: tuple) -> Element:
    total = ring.zero()
    for key, c in zip(parameters, form):
        if c != 0:
            total = total + ring.scalar(c) * ring.gen(key)
    return total


