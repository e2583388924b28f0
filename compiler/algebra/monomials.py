"""Class monomials: generator registry, the block monomial order, products with signs.

A monomial is a tuple ``((generator index, exponent), ...)`` sorted by index,
exponents positive.  Order (spec, "Classes, normal form, truncation"): a block
order with the fiber groups first (group 1, 2, ... in that order) and the base
classes (group 0) last; within a block graded (by form degree) reverse
lexicographic, later-declared generators larger.  Odd-degree classes
anticommute, so a product carries a sign and squares of odd classes vanish.
"""
from __future__ import annotations

from dataclasses import dataclass

# A monomial: ((generator index, exponent), ...) sorted by index, exponents > 0.
Mono = tuple


@dataclass(frozen=True)
class Generator:
    """A registered class generator: ``key`` identifies it (in the document
    syntax, so it is also its text), ``group`` 0 is the base."""
    index: int
    key: str
    degree: int
    group: int


class Monomials:
    """The generators of one ring and cached monomial arithmetic over them."""

    def __init__(self):
        self.gens: list[Generator] = []
        self.by_key: dict[str, Generator] = {}
        self._block_pos: list[int] = []      # generator index -> position in its group
        self._group_size: dict[int, int] = {}
        self.group_rank: dict[int, int] = {0: 0}   # group -> position in block order
        self._group_order: list[int] = [0]
        self._deg: dict[Mono, int] = {(): 0}
        self._key: dict[Mono, tuple] = {}
        self._mul: dict[tuple[Mono, Mono], object] = {}

    def add(self, key: str, degree: int, group: int) -> Generator:
        gen = Generator(len(self.gens), key, degree, group)
        self.gens.append(gen)
        self.by_key[key] = gen
        self._block_pos.append(self._group_size.get(group, 0))
        self._group_size[group] = self._group_size.get(group, 0) + 1
        if group not in self.group_rank:
            self._group_order = sorted(set(self._group_order) - {0} | {group}) + [0]
            self.group_rank = {g: i for i, g in enumerate(self._group_order)}
            self._key.clear()
        return gen

    def degree(self, m: Mono) -> int:
        d = self._deg.get(m)
        if d is None:
            gens = self.gens
            d = sum(e * gens[i].degree for i, e in m)
            self._deg[m] = d
        return d

    def group_degree(self, m: Mono, group: int) -> int:
        return sum(e * self.gens[i].degree for i, e in m if self.gens[i].group == group)

    def has_odd(self, m: Mono) -> bool:
        return any(self.gens[i].degree % 2 for i, _ in m)

    def key(self, m: Mono) -> tuple:
        """Sort key: ascending key = descending monomial order."""
        k = self._key.get(m)
        if k is None:
            blocks: dict[int, list] = {}
            for i, e in m:
                blocks.setdefault(self.gens[i].group, []).append((i, e))
            parts = []
            for grp in self._group_order:
                items = blocks.get(grp)
                if not items:
                    parts.append((0,))
                    continue
                vec = [0] * (self._block_pos[items[-1][0]] + 1)
                deg = 0
                for i, e in items:
                    vec[self._block_pos[i]] = e
                    deg += e * self.gens[i].degree
                parts.append((-deg, *vec))
            k = tuple(parts)
            self._key[m] = k
        return k

    def leading(self, monos) -> Mono:
        return min(monos, key=self.key)

    def mul(self, a: Mono, b: Mono):
        """(sign, a*b), or None when an odd class would be squared."""
        if not a:
            return (1, b)
        if not b:
            return (1, a)
        r = self._mul.get((a, b), False)
        if r is not False:
            return r
        exps = dict(a)
        for i, e in b:
            exps[i] = exps.get(i, 0) + e
        gens = self.gens
        result = None
        if not any(e > 1 and gens[i].degree % 2 for i, e in exps.items()):
            odd_a = [i for i, _ in a if gens[i].degree % 2]
            inversions = sum(1 for j, _ in b if gens[j].degree % 2 for i in odd_a if i > j)
            result = (-1 if inversions % 2 else 1, tuple(sorted(exps.items())))
        self._mul[(a, b)] = result
        return result

    @staticmethod
    def div(m: Mono, d: Mono):
        """m / d as a monomial, or None if d does not divide m."""
        em = dict(m)
        for i, e in d:
            if em.get(i, 0) < e:
                return None
            em[i] -= e
        return tuple(sorted((i, e) for i, e in em.items() if e))

    @staticmethod
    def lcm(a: Mono, b: Mono) -> Mono:
        em = dict(a)
        for i, e in b:
            em[i] = max(em.get(i, 0), e)
        return tuple(sorted(em.items()))

    def factor_order(self, m: Mono) -> list[tuple[int, int]]:
        """The factors as printed: base classes last, like the block order."""
        return sorted(m, key=lambda ie: (self.group_rank[self.gens[ie[0]].group], ie[0]))

    def pairs(self, m: Mono) -> tuple:
        """The monomial as ((generator key, exponent), ...) in printing order."""
        return tuple((self.gens[i].key, e) for i, e in self.factor_order(m))

    def text(self, m: Mono) -> str:
        parts = []
        for i, e in self.factor_order(m):
            t = self.gens[i].key
            parts.append(t if e == 1 else f"{t}^{e}")
        return "*".join(parts) if parts else "1"
