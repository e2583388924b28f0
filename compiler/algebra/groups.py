"""Gauge groups and their representations by trade name or Dynkin labels.

A group is a family (SU, SO, Sp with a rank that may be symbolic, or one of
G2, F4, E6, E7, E8); its representations are direct sums of irreducibles
given by Dynkin labels (Bourbaki numbering of the nodes).  The names of the
trade (fundamental, adjoint, vector, spinors, antisymmetric and symmetric
powers) are a table of small functions from the group to labels.  Dimension,
index and dual Coxeter number come from the weights module, not a table.
Sp(n) has rank n (Sp(1) = SU(2)); its fundamental has dimension 2n.
"""
from __future__ import annotations

import difflib
from dataclasses import dataclass
from fractions import Fraction

from compiler.algebra.weights import GroupError, RootSystem, casimir, root_system
from compiler.algebra import weights

CLASSICAL = ("SU", "SO", "Sp")
_EXCEPTIONAL = {"G2": ("G", 2), "F4": ("F", 4), "E6": ("E", 6), "E7": ("E", 7), "E8": ("E", 8)}
# nodes of the smallest representation and of its conjugate, exceptional groups
_SMALLEST = {"G2": (0, 0), "F4": (3, 3), "E6": (0, 5), "E7": (6, 6), "E8": (7, 7)}


@dataclass(frozen=True)
class Group:
    """A simple compact group: family SU, SO, Sp, G2, F4, E6, E7, E8; n is None for a symbolic rank."""

    family: str
    n: int | None = None

    def __str__(self) -> str:
        if self.family in _EXCEPTIONAL:
            return self.family
        return f"{self.family}({'N' if self.n is None else self.n})"

    @property
    def series(self) -> tuple[str, int]:
        """(Cartan series letter, rank)."""
        if self.family in _EXCEPTIONAL:
            return _EXCEPTIONAL[self.family]
        return {"SU": ("A", self.n - 1), "Sp": ("C", self.n),
                "SO": ("B", self.n // 2) if self.n % 2 else ("D", self.n // 2)}[self.family]

    @property
    def roots(self) -> RootSystem:
        return root_system(*self.series)

    @property
    def base(self) -> str:
        """The representation whose traces are the basis invariants."""
        return {"SU": "fundamental", "SO": "vector", "Sp": "fundamental"}.get(self.family, "adjoint")


@dataclass(frozen=True)
class Rep:
    """A representation as a direct sum of irreducibles, each given by Dynkin labels."""

    summands: tuple[tuple[int, ...], ...]


@dataclass(frozen=True)
class Normalisation:
    """How the base trace relates to the others, for F^2.

    tr_rho F^2 = index(rho) * tr_norm F^2 where tr_norm = Tr_adj / (2 h^vee) is the
    trace with long roots of length squared 2 (index 1 for the fundamental of SU(n));
    Tr_adj F^2 = adjoint_ratio * tr_base F^2.
    """

    base: str
    base_index: Fraction
    adjoint_ratio: Fraction | tuple[Fraction, ...]
    dual_coxeter: int | tuple[Fraction, ...]


def _integer_rank(family: str, n) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, Fraction)) or Fraction(n).denominator != 1:
        raise GroupError(f"the rank of {family}(n) must be an integer, got {n}; write {family}(5), for example")
    return int(n)


_LOWEST = {"SU": (2, "SU(2)"), "SO": (5, "SO(5)"), "Sp": (1, "Sp(1)")}
_SMALL_SO = {3: "SO(3) is not covered: use SU(2) (the vector is its symmetric 2)",
             4: "SO(4) is not simple: use two SU(2) factors"}


def group(family: str, n=None) -> Group:
    """The group named `family` (SU, SO, Sp with rank n, None for symbolic; or G2 ... E8)."""
    if family in _EXCEPTIONAL:
        if n is not None:
            raise GroupError(f"{family} has no rank argument; write {family}")
        return Group(family)
    if family in ("G", "F", "E"):
        if n is None:
            raise GroupError(f"exceptional groups have fixed rank; use one of {', '.join(_EXCEPTIONAL)}")
        return group(f"{family}{_integer_rank(family, n)}")
    if family not in CLASSICAL:
        return _unknown(family)
    if n is None:
        return Group(family)
    rank = _integer_rank(family, n)
    if family == "SO" and rank in _SMALL_SO:
        raise GroupError(_SMALL_SO[rank])
    lowest, example = _LOWEST[family]
    if rank < lowest:
        raise GroupError(f"{family}({rank}) is not a simple group here; the smallest is {example}")
    return Group(family, rank)


def _unknown(name: str):
    known = list(CLASSICAL) + list(_EXCEPTIONAL)
    close = [k for k in known if k.lower() == name.lower()] or difflib.get_close_matches(name, known, n=1)
    hint = f"did you mean {close[0]}?" if close else f"known groups: {', '.join(known)}"
    raise GroupError(f"unknown group '{name}'; {hint}")


# ---------------------------------------------------------------- representations by name

def omega(rank: int, *nodes: int) -> tuple[int, ...]:
    labels = [0] * rank
    for node in nodes:
        labels[node] += 1
    return tuple(labels)


def _antisymmetric(g: Group, k: int) -> tuple[tuple[int, ...], ...]:
    series, r = g.series
    if not 1 <= k <= r:
        dual = f"; wedge^{k} is dual to wedge^{g.n - k}" if g.family != "Sp" and k < g.n else ""
        raise GroupError(f"antisymmetric {k} of {g} is not named here: use 1 <= k <= {r}{dual}")
    if series == "B" and k == r:
        return (omega(r, r - 1, r - 1),)
    if series == "D" and k == r - 1:
        return (omega(r, r - 2, r - 1),)
    if series == "D" and k == r:
        return (omega(r, r - 2, r - 2), omega(r, r - 1, r - 1))
    return (omega(r, k - 1),)


def _spinor(chirality: str):
    def build(g: Group, k) -> tuple[tuple[int, ...], ...]:
        if g.family != "SO":
            raise GroupError(f"{g} has no spinor representation; spinors belong to SO(n)")
        series, r = g.series
        if series == "B":
            if chirality:
                raise GroupError(f"{g} has no chiral spinors (n is odd); use spinor")
            return (omega(r, r - 1),)
        halves = {"+": (omega(r, r - 1),), "-": (omega(r, r - 2),)}
        return halves.get(chirality, halves["-"] + halves["+"])
    return build


def _fundamental(g: Group, k) -> tuple[tuple[int, ...], ...]:
    return (omega(g.series[1], _SMALLEST.get(g.family, (0, 0))[0]),)


def _antifundamental(g: Group, k) -> tuple[tuple[int, ...], ...]:
    series, r = g.series
    return (omega(r, r - 1 if series == "A" else _SMALLEST.get(g.family, (0, 0))[1]),)


def _vector(g: Group, k) -> tuple[tuple[int, ...], ...]:
    if g.family != "SO":
        raise GroupError(f"{g} has no vector representation; use fundamental")
    return _fundamental(g, k)


def _symmetric(g: Group, k: int) -> tuple[tuple[int, ...], ...]:
    if k < 1:
        raise GroupError(f"symmetric {k}: the power must be at least 1")
    return (tuple(k * x for x in omega(g.series[1], 0)),)


def _classical_only(word: str, build):
    def checked(g: Group, k):
        if g.family not in CLASSICAL:
            raise GroupError(f"{word} powers are named for SU, SO and Sp only; give Dynkin labels for {g}")
        return build(g, k)
    return checked


NAMES = {
    "trivial": lambda g, k: ((0,) * g.series[1],),
    "fundamental": _fundamental,
    "antifundamental": _antifundamental,
    "adjoint": lambda g, k: (g.roots.highest_root(),),
    "vector": _vector,
    "spinor": _spinor(""),
    "spinor+": _spinor("+"),
    "spinor-": _spinor("-"),
    "antisymmetric": _classical_only("antisymmetric", _antisymmetric),
    "symmetric": _classical_only("symmetric", _symmetric),
}


def representation(g: Group, spec, power: int | None = None) -> Rep:
    """A representation of a numeric-rank group by trade name (with `power` for the
    antisymmetric and symmetric powers, default 2) or by a sequence of Dynkin labels."""
    if g.n is None and g.family in CLASSICAL:
        raise GroupError(f"{g} has a symbolic rank: use symbolic_traces, or give a numeric rank "
                         f"for Dynkin labels")
    rank = g.series[1]
    if power is not None and spec not in ("antisymmetric", "symmetric"):
        raise GroupError(f"a power goes with antisymmetric or symmetric, not with {spec}")
    if isinstance(spec, str):
        if spec not in NAMES:
            close = difflib.get_close_matches(spec, list(NAMES), n=1)
            hint = f"did you mean {close[0]}?" if close else f"known names: {', '.join(NAMES)}"
            raise GroupError(f"unknown representation '{spec}' of {g}; {hint} (or give {rank} Dynkin labels)")
        return Rep(NAMES[spec](g, 2 if power is None else power))
    labels = tuple(spec)
    if len(labels) != rank or not all(type(x) is int and x >= 0 for x in labels):
        raise GroupError(f"{g} has rank {rank}: give {rank} non-negative integer Dynkin labels, "
                         f"got {list(labels)}")
    return Rep((labels,))


def dimension(g: Group, rep: Rep) -> int:
    return sum(weights.dimension(g.roots, labels) for labels in rep.summands)


def index(g: Group, rep: Rep) -> Fraction:
    """Dynkin index with long roots of length squared 2: 1 for the fundamental of SU(n), 2 h^vee for the adjoint."""
    rs = g.roots
    adjoint = weights.dimension(rs, rs.highest_root())
    return sum((weights.dimension(rs, labels) * casimir(rs, labels) / adjoint for labels in rep.summands),
               Fraction(0))


def quadratic_casimir(g: Group, labels) -> Fraction:
    """(lambda, lambda + 2 rho) of an irreducible representation, long roots of length squared 2."""
    return casimir(g.roots, tuple(labels))


def dual_coxeter(g: Group) -> int:
    """Half the index of the adjoint."""
    value = index(g, representation(g, "adjoint")) / 2
    if value.denominator != 1:
        raise ArithmeticError(f"dual Coxeter number of {g} is not an integer: {value}")
    return int(value)


def casimir_degrees(g: Group) -> tuple[int, ...]:
    """Degrees of the independent Casimir invariants: the exponents plus one."""
    return tuple(e + 1 for e in g.roots.exponents())


def normalisation(g: Group) -> Normalisation:
    base = index(g, representation(g, g.base))
    return Normalisation(g.base, base, index(g, representation(g, "adjoint")) / base, dual_coxeter(g))
