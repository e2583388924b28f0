"""Fibers and fiber integration: surfaces, sphere bundles (general fibers: ``general_fibers``).

A fiber owns one group of classes in the graded ring (its own block of the
monomial order, so fiber classes come first).  Declaring it installs its
relations as eager rewrite rules; integrating reads off the coefficient of
each top-degree fiber monomial and multiplies by that monomial's integral.
For a sphere bundle of a bundle split into planes the same integral is
recomputed by localization at the two poles, so a wrong normalisation or a
split that does not match shows up as a failed check, not as a wrong answer.
"""
from __future__ import annotations

from dataclasses import dataclass, field, replace
from fractions import Fraction
from typing import Sequence

from .graded import AlgebraError, Element, Ring
from .lazysympy import sympy


class FiberError(ValueError):
    """A fiber that cannot be declared or integrated over as written; ``at`` is
    the index of the integral the problem is about, when there is one."""

    def __init__(self, message: str, at: int | None = None):
        super().__init__(message)
        self.at = at


@dataclass(frozen=True)
class CrossCheck:
    """An automatic check made while integrating (the engine gives it a status)."""

    what: str
    ok: bool
    detail: str = ""


Pairs = tuple  # a monomial as ((generator key, exponent), ...)


@dataclass(frozen=True)
class Fiber:
    """What integration needs: the group, dimension and top-degree integrals."""

    name: str
    ring: Ring
    group: int
    dimension: int
    integrals: dict = field(default_factory=dict)   # standard top monomial pairs -> Element

    def class_keys(self) -> set[str]:
        return {g.key for g in self.ring.generators(self.group)}

    def fiber_degree(self, pairs: Pairs) -> int:
        return sum(self.ring.generator_info(k).degree * e for k, e in pairs)

    def extra_checks(self, x: Element, result: Element) -> list[CrossCheck]:
        return []


def integrate(x: Element, fiber: Fiber) -> tuple[Element, list[CrossCheck]]:
    """∫_F x and the automatic checks (degree, fiber classes gone, localization).

    Components of lower fiber degree integrate to zero; a top-degree fiber
    monomial contributes its coefficient times its integral.
    """
    ring = fiber.ring
    result = ring.zero()
    for pairs, coefficient in x.by_group(fiber.group):
        degree = fiber.fiber_degree(pairs)
        if degree < fiber.dimension:
            continue
        if degree > fiber.dimension:
            raise FiberError(f"{_mono_text(pairs)} has degree {degree} on the "
                             f"{fiber.dimension}-dimensional fiber {fiber.name}; a relation "
                             f"should have removed it")
        value = fiber.integrals.get(tuple(pairs))
        if value is None:
            raise FiberError(f"no integral over {fiber.name} is known for {_mono_text(pairs)}")
        result = result + coefficient * value
    expected = sorted({d - fiber.dimension for d in x.degrees() if d >= fiber.dimension})
    got = result.degrees()
    checks = [
        CrossCheck(f"degree of the integral over {fiber.name} is deg - {fiber.dimension}",
                   set(got) <= set(expected),
                   f"integrand degrees {x.degrees()}, result degrees {got}"),
    ]
    left = sorted(result.generator_keys() & fiber.class_keys())
    checks.append(CrossCheck(f"no class of {fiber.name} is left", not left,
                             f"left: {', '.join(left)}" if left else ""))
    checks.extend(fiber.extra_checks(x, result))
    return result, checks


def _mono_text(pairs: Pairs) -> str:
    return "*".join(k if e == 1 else f"{k}^{e}" for k, e in pairs) or "1"


def single_generator(element: Element) -> str | None:
    """The key of an element that is exactly one generator, else None."""
    pairs = element.as_monomial()
    if pairs is None or len(pairs) != 1 or pairs[0][1] != 1:
        return None
    return pairs[0][0]


# -- surfaces -------------------------------------------------------------------

def surface_fiber(name: str, ring: Ring, group: int, genus, tangent_euler: Element) -> Fiber:
    """A closed oriented surface of genus g: e(TS)^2 = 0, ∫ e(TS) = 2 - 2g (Gauss–Bonnet).

    The engine registers e(TS) (through the bundle TS) in the fiber's group.
    """
    genus = sympy.Integer(genus) if isinstance(genus, int) else genus  # a symbol: sympy reads its assumptions
    if genus.is_integer is False or genus.is_negative:
        raise FiberError(f"the genus of {name} must be a nonnegative integer, not {genus}")
    key = single_generator(tangent_euler)
    if key is None:
        raise FiberError(f"the tangent Euler class of {name} must be a single class, "
                         f"not {tangent_euler.to_text()}")
    info = ring.generator_info(key)
    if info.degree != 2 or info.group != group:
        raise FiberError(f"{info.key} must be a degree-2 class of the fiber {name}")
    ring.add_rule(tangent_euler * tangent_euler, ring.zero())
    ring.vanish_above(group, 2)
    euler_characteristic = ring.scalar(2 - 2 * genus)
    return Fiber(name, ring, group, 2, {((key, 1),): euler_characteristic})


# -- sphere bundles ---------------------------------------------------------------

@dataclass(frozen=True)
class SphereFiber(Fiber):
    """The sphere bundle S^{2n} of a real rank-(2n+1) bundle B.

    The global angular class e has degree 2n, ∫ e = A and satisfies the
    Bott–Cattaneo relation e^2 = (A/2)^2 p_n(B).  ``planes`` are the Euler
    classes of the oriented planes when B = L_1 + ... + L_n + trivial(1).
    """

    bundle: str = ""
    angular: str = ""
    angular_integral: Fraction = Fraction(2)
    top_pontryagin: Element | None = None
    planes: tuple = ()

    def with_planes(self, planes: Sequence[Element]) -> "SphereFiber":
        """The same fiber once B has been split into planes (enables localization)."""
        planes = tuple(planes)
        if len(planes) != self.dimension // 2:
            raise FiberError(f"{self.bundle} of rank {self.dimension + 1} splits into "
                             f"{self.dimension // 2} planes, not {len(planes)}")
        for p in planes:
            if p.degrees() != [2]:
                raise FiberError(f"the Euler class of a plane has degree 2, not {p.degrees()}")
        return replace(self, planes=planes)

    def pole_values(self) -> tuple[Element, Element]:
        """The angular class restricted to the north and south poles: ±(A/2) ∏ e(L_i)."""
        product = self.ring.one()
        for p in self.planes:
            product = product * p
        half = self.ring.scalar(self.angular_integral / 2)
        return half * product, -(half * product)

    def extra_checks(self, x: Element, result: Element) -> list[CrossCheck]:
        if not self.planes:
            return []
        ring = self.ring
        euler = ring.one()
        for p in self.planes:
            euler = euler * p
        north, south = self.pole_values()
        checks = []
        # Bott–Cattaneo at each pole: (±(A/2)P)^2 = (A/2)^2 p_n(B).
        rhs = ring.scalar((self.angular_integral / 2) ** 2) * self.top_pontryagin
        for pole, value in (("north", north), ("south", south)):
            ok = value * value == rhs
            checks.append(CrossCheck(
                f"Bott–Cattaneo relation holds at the {pole} pole of {self.name}", ok,
                f"{self.angular}^2 restricts to {(value * value).to_text()}; "
                f"(A/2)^2*p{self.dimension // 2}({self.bundle}) = {rhs.to_text()}"))
        # Localization (Atiyah–Bott; Berline–Vergne): ∫ X = X|N / e(T_N) + X|S / e(T_S)
        # with e(T_N) = P = -e(T_S); multiplied through by P to stay polynomial.
        at_north = x.substitute({self.angular: north})
        at_south = x.substitute({self.angular: south})
        difference, expected = at_north - at_south, euler * result
        ok = difference == expected
        # Both sides are printed only when they disagree: on a wide integrand
        # they are long, and an agreement says all there is to say.
        checks.append(CrossCheck(
            f"localization at the poles of {self.name} agrees with the direct integral", ok,
            "X|N - X|S = e(T_N) * integral" if ok else
            f"X|N - X|S = {difference.to_text()}; e(T_N) * integral = {expected.to_text()}"))
        return checks


def sphere_fiber(name: str, ring: Ring, group: int, bundle: str, rank: int,
                 top_pontryagin: Element | None, angular: str,
                 angular_integral: Fraction = Fraction(2), *,
                 planes: Sequence[Element] = ()) -> SphereFiber:
    """Declare the sphere bundle of ``bundle`` and its angular class ``angular``.

    ``top_pontryagin`` is p_n(B) as an element (in B's split parts if split).
    """
    if rank % 2 == 0:
        raise FiberError("sphere bundles of even-rank bundles are not supported yet "
                         f"({bundle} has rank {rank})")
    if rank < 3:
        raise FiberError(f"the sphere bundle of {bundle} (rank {rank}) needs rank 3 or more")
    angular_integral = Fraction(angular_integral)
    if angular_integral == 0:
        raise FiberError("the angular integral must not be zero")
    n = rank // 2
    if top_pontryagin is None or top_pontryagin.degrees() not in ([4 * n], []):
        raise FiberError(f"p{n}({bundle}) must be an element of degree {4 * n}")
    try:
        e = ring.generator(angular, 2 * n, group=group)
    except AlgebraError as err:
        raise FiberError(str(err)) from None
    ring.add_rule(e * e, ring.scalar((angular_integral / 2) ** 2) * top_pontryagin)
    ring.vanish_above(group, 2 * n)
    fiber = SphereFiber(name, ring, group, 2 * n, {((angular, 1),): ring.scalar(angular_integral)},
                        bundle=bundle, angular=angular, angular_integral=angular_integral,
                        top_pontryagin=top_pontryagin)
    return fiber.with_planes(planes) if planes else fiber
