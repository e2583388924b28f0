"""Anomaly polynomials of fields and supermultiplets from their index densities.

In d dimensions a field contributes the degree-(d+2) part of its density
(Alvarez-Gaumé and Witten, "Gravitational anomalies", Nucl. Phys. B234,
1984): a Weyl fermion of chirality s in a bundle X gives s Â(T) ch(X), a
Weyl gravitino s Â(T)(ch(T) - 1) ch(X), a self-dual form -s L(T)/8.  A
supermultiplet is the sum of its fermions (and forms), each with its
R-symmetry charge: the chiral multiplet of R-charge r has a fermion of
charge r - 1, a vector multiplet a gaugino of charge 1 (4d N=1, 2d (0,2));
a 6d (1,0) vector multiplet has a gaugino doublet of SU(2)_R of the other
chirality, a tensor multiplet a self-dual form and a doublet fermion, a
hypermultiplet one Weyl fermion (Ohmori, Shimizu, Tachikawa and Yonekura,
"Anomaly polynomial of general 6d SCFTs", PTEP 2014); the gravity multiplet
a gravitino doublet and an anti-self-dual form (Green, Schwarz and West,
"Anomaly-free chiral theories in six dimensions", Nucl. Phys. B254, 1985).  The chirality "+"
is that of the 4d chiral multiplet's fermion, of the 6d hypermultiplet's
and of the 2d (0,2) chiral multiplet's (right-moving) fermion.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Callable

from .element import Element
from .errors import AlgebraError


@dataclass(frozen=True)
class Background:
    """The classes a density is built from: Â(T), ch(T), L(T), and the R-symmetry
    as a line bundle's c1 (`r_line`) or an SU(2) bundle's fundamental ch (`r_doublet`)."""

    ahat: Element
    ch_tangent: Element
    l_genus: Element
    r_line: Element | None = None
    r_doublet: Element | None = None


def exp_charge(c1: Element, charge: Element) -> Element:
    """ch of L^q: exp(q c1(L)) up to the truncation."""
    ring = c1.ring
    x = c1 * charge
    total, term = ring.one(), ring.one()
    for k in range(1, ring.truncate // 2 + 1):
        term = term * x / k
        total = total + term
    return total


def _r_line(bg: Background, charge) -> Element:
    return bg.ahat.ring.one() if bg.r_line is None else exp_charge(bg.r_line, charge)


def _doublet(bg: Background) -> Element:
    return bg.ahat.ring.scalar(2) if bg.r_doublet is None else bg.r_doublet


def _weyl(sign):
    return lambda bg, x, r: bg.ahat * x * sign


def _gravitino(sign):
    return lambda bg, x, r: bg.ahat * (bg.ch_tangent - 1) * x * sign


def _selfdual(sign):
    def density(bg, x, r):
        if x != bg.ahat.ring.one():
            raise AlgebraError("a self-dual form sits in no representation and has no charges")
        return bg.l_genus * Fraction(-sign, 8)
    return density


def _tensor(bg, x, r):
    return _selfdual(1)(bg, x, r) + bg.ahat * _doublet(bg) / 2


def _gravity(bg, x, r):
    """The 6d (1,0) gravity multiplet: a gravitino doublet of the gaugino's chirality and
    a two-form of the opposite duality to the tensor multiplet's."""
    return -_gravitino(1)(bg, x, r) * _doublet(bg) / 2 + _selfdual(-1)(bg, x, r)


Density = Callable[[Background, Element, Element], Element]

#: Any even dimension: the fields themselves.
FIELDS: dict[str, Density] = {
    "weyl+": _weyl(1), "weyl-": _weyl(-1),
    "gravitino+": _gravitino(1), "gravitino-": _gravitino(-1),
    "selfdual+": _selfdual(1), "selfdual-": _selfdual(-1),
}

#: Supermultiplets by dimension; r is the multiplet's R-charge (0 if none is given).
MULTIPLETS: dict[int, dict[str, Density]] = {
    2: {"chiral": lambda bg, x, r: bg.ahat * x * _r_line(bg, r - 1),
        "fermi": lambda bg, x, r: -bg.ahat * x * _r_line(bg, r),
        "vector": lambda bg, x, r: -bg.ahat * x * _r_line(bg, 1)},
    4: {"chiral": lambda bg, x, r: bg.ahat * x * _r_line(bg, r - 1),
        "vector": lambda bg, x, r: bg.ahat * x * _r_line(bg, 1)},
    6: {"hyper": lambda bg, x, r: bg.ahat * x,
        "vector": lambda bg, x, r: -bg.ahat * x * _doublet(bg) / 2,
        "tensor": _tensor,
        "tensor20": lambda bg, x, r: _tensor(bg, x, r) + bg.ahat,
        "gravity": _gravity},
}

#: Which R-symmetry bundle each dimension's multiplets use.
R_SYMMETRY = {2: "line", 4: "line", 6: "doublet"}


def kinds(dimension: int) -> list[str]:
    return sorted(FIELDS) + sorted(MULTIPLETS.get(dimension, {}))


def density(kind: str, dimension: int) -> Density:
    table = {**FIELDS, **MULTIPLETS.get(dimension, {})}
    if kind not in table:
        raise AlgebraError(f"no field '{kind}' in {dimension} dimensions; the kinds are "
                           + ", ".join(kinds(dimension)))
    return table[kind]


def contribution(kind: str, dimension: int, bg: Background, x: Element, r: Element,
                 count: Element) -> Element:
    """count times the degree-(d+2) part of the density."""
    return density(kind, dimension)(bg, x, r).part(dimension + 2) * count


def uses_r_charge(kind: str) -> bool:
    return kind not in FIELDS

