"""General fibers: classes, relations, and integrals given on any top-degree monomials.

The author gives the integral of whichever top-degree monomials are natural
(the point class of a Hirzebruch surface, ``x^2`` of CP^2).  Each one, put
in normal form, is a linear equation in the integrals of the standard
top-degree monomials (the ones integration reads); the equations must fix
all of those integrals and agree with each other.  An integral that
contradicts the ones before it, or a set that leaves one undetermined, is an
error that names the monomials concerned.
"""
from __future__ import annotations

from dataclasses import replace
from typing import Sequence

from .fibers import Fiber, FiberError, Pairs
from .graded import AlgebraError, Element, Ring


def declare_fiber_classes(ring: Ring, group: int, classes: Sequence[tuple[str, int]],
                          dimension: int, name: str) -> dict[str, Element]:
    """Register a general fiber's classes (before its relations can be parsed)."""
    if dimension <= 0:
        raise FiberError(f"the dimension of {name} must be positive, not {dimension}")
    out = {}
    for key, degree in classes:
        if not 0 < degree <= dimension:
            raise FiberError(f"class {key} of {name} has degree {degree}; it must lie "
                             f"between 1 and the dimension {dimension}")
        if degree % 2:
            raise FiberError(f"class {key} of {name} has odd degree {degree}; odd fiber "
                             f"classes are not supported")
        if key in out:
            raise FiberError(f"class {key} of {name} is declared twice")
        try:
            out[key] = ring.generator(key, degree, group=group)
        except AlgebraError as err:
            raise FiberError(str(err)) from None
    if not out:
        raise FiberError(f"the fiber {name} declares no class")
    return out


def general_fiber(name: str, ring: Ring, group: int, dimension: int,
                  relations: Sequence[Element],
                  integrals: Sequence[tuple[Element, Element]]) -> Fiber:
    """A fiber given by classes (already declared), relations and top integrals.

    The relations become rewrite rules (a Gröbner basis, fiber classes
    first); monomials of fiber degree above the dimension vanish unless a
    relation rewrites them.  ``integrals`` must be built before the
    relations are installed (they are read as written).
    """
    written = [_written(ring, group, name, i, monomial, value)
               for i, (monomial, value) in enumerate(integrals)]
    _install(ring, group, name, dimension, relations)
    fiber = Fiber(name, ring, group, dimension, {})
    standard = _top_standard_monomials(ring, group, dimension)
    seen: set[Pairs] = set()
    echelon = _Echelon(ring, len(standard))
    for i, (pairs, value) in enumerate(written):
        degree = fiber.fiber_degree(pairs)
        if degree != dimension:
            raise FiberError(f"the integral of {_pairs_text(ring, pairs)} over {name} is given, "
                             f"but it has degree {degree}, not the fiber's dimension {dimension}", i)
        canonical = tuple(sorted(pairs))
        if canonical in seen:
            raise FiberError(f"the integral of {_pairs_text(ring, pairs)} over {name} is given twice", i)
        seen.add(canonical)
        rest, implied = echelon.reduce(_row(ring, group, pairs, standard))
        if any(not c.is_zero for c in rest):
            echelon.add(rest, value - implied)
        elif implied != value:
            raise FiberError(
                f"inconsistent integrals over {name}: {_pairs_text(ring, pairs)} is given "
                f"{value.to_text()}, but the integrals before it (with the relations) give "
                f"{implied.to_text()}", i)
    return replace(fiber, integrals=_solve(ring, name, standard, echelon))


def _written(ring: Ring, group: int, name: str, i: int, monomial: Element, value: Element):
    """An integral as written: (monomial pairs, class-free value)."""
    pairs = monomial.as_monomial()
    if not pairs:
        raise FiberError(f"an integral over {name} must be of a monomial in its classes, "
                         f"not of {monomial.to_text()}", i)
    pairs = tuple(pairs)
    foreign = [k for k, _ in pairs if ring.generator_info(k).group != group]
    if foreign:
        raise FiberError(f"{', '.join(foreign)} is not a class of the fiber {name}", i)
    if not value.is_class_free():
        raise FiberError(f"the integral of {_pairs_text(ring, pairs)} over {name} must be "
                         f"a number, not {value.to_text()}", i)
    return pairs, value


def _install(ring: Ring, group: int, name: str, dimension: int, relations) -> None:
    for relation in relations:
        if relation.is_zero:
            continue
        lead, coefficient = relation.leading_term()
        if not any(ring.generator_info(k).group == group for k, _ in lead.monomials()[0]):
            raise FiberError(f"the relation {relation.to_text()} = 0 of {name} does not "
                             f"involve the fiber's classes")
        try:
            ring.add_rule(lead, lead - relation / coefficient)
        except AlgebraError as err:
            raise FiberError(f"relation {relation.to_text()} = 0 of {name}: {err}") from None
    ring.vanish_above(group, dimension)


def _row(ring: Ring, group: int, pairs: Pairs, standard: list[Pairs]) -> list[Element]:
    """The normal form of a top-degree monomial as coefficients of the standard ones."""
    monomial = ring.one()
    for key, exp in pairs:
        monomial = monomial * _generator(ring, key) ** exp
    row = [ring.zero()] * len(standard)
    for fiber_pairs, coefficient in monomial.by_group(group):
        if tuple(fiber_pairs) in standard:
            row[standard.index(tuple(fiber_pairs))] = coefficient
    return row


class _Echelon:
    """The integrals given so far as linear equations in the standard ones,
    in reduced row echelon form: rows ``(pivot, coefficients, value)`` of
    class-free ring elements, sorted by pivot."""

    def __init__(self, ring: Ring, width: int):
        self.ring, self.width, self.rows = ring, width, []

    def reduce(self, row: list):
        """(what the equations leave of ``row``, the value they give the part they cover)."""
        value = self.ring.zero()
        for pivot, coefficients, given in self.rows:
            c = row[pivot]
            if not c.is_zero:
                row = [a - c * b for a, b in zip(row, coefficients)]
                value = value + c * given
        return row, value

    def add(self, rest: list, value: Element) -> None:
        """A new equation, already reduced by the others."""
        pivot = next(j for j, c in enumerate(rest) if not c.is_zero)
        lead = rest[pivot]
        rest, value = [c / lead for c in rest], value / lead
        for k, (p, coefficients, given) in enumerate(self.rows):
            c = coefficients[pivot]
            if not c.is_zero:
                self.rows[k] = (p, [a - c * b for a, b in zip(coefficients, rest)], given - c * value)
        self.rows = sorted(self.rows + [(pivot, rest, value)], key=lambda r: r[0])

    def undetermined(self) -> list[int]:
        """The columns of the null space's basis vectors (one per free column,
        in order) with a nonzero entry, in that order."""
        pivots = {p: coefficients for p, coefficients, _ in self.rows}
        out = []
        for free in (j for j in range(self.width) if j not in pivots):
            out += [j for j in range(self.width)
                    if j == free or (j in pivots and not pivots[j][free].is_zero)]
        return out


def _solve(ring: Ring, name: str, standard: list[Pairs], echelon: _Echelon) -> dict:
    """The integral of every standard top monomial, or the error naming the undetermined ones."""
    undetermined = [standard[j] for j in echelon.undetermined()]
    if undetermined:
        shown = list(dict.fromkeys(_pairs_text(ring, p) for p in undetermined))
        missing = len(standard) - len(echelon.rows)
        if missing == len(shown):
            raise FiberError(f"the fiber {name} needs the integral of " + ", ".join(shown))
        raise FiberError(f"the fiber {name} needs the integral of {missing} more top-degree "
                         f"monomial{'s' if missing > 1 else ''}: the integrals given leave "
                         + ", ".join(shown) + " undetermined")
    return {standard[p]: value for p, _, value in echelon.rows}


def _pairs_text(ring: Ring, pairs: Pairs) -> str:
    return "*".join(k + ("" if e == 1 else f"^{e}")
                    for k, e in pairs) or "1"


def _generator(ring: Ring, key: str) -> Element:
    """The registered generator ``key`` as an element."""
    g = ring.generator_info(key)
    return ring.generator(key, g.degree, group=g.group)


def _top_standard_monomials(ring: Ring, group: int, dimension: int) -> list[Pairs]:
    """Monomials in the group's classes of degree exactly ``dimension`` in normal form."""
    gens = ring.generators(group)
    found: list[Pairs] = []

    def walk(i: int, remaining: int, chosen: list):
        if remaining == 0:
            pairs = tuple((k, e) for k, e in chosen if e)
            if ring.is_normal_monomial(pairs):
                found.append(pairs)
            return
        if i == len(gens):
            return
        g = gens[i]
        for e in range(remaining // g.degree, -1, -1):
            walk(i + 1, remaining - e * g.degree, chosen + [(g.key, e)])

    walk(0, dimension, [])
    return _in_ring_order(ring, found)


def _in_ring_order(ring: Ring, found: list[Pairs]) -> list[Pairs]:
    """The monomials as the ring prints them (its factor order), deduplicated."""
    out = []
    for pairs in found:
        element = ring.monomial(pairs)
        canonical = tuple(element.monomials()[0])
        if canonical not in out:
            out.append(canonical)
    return out
