"""Vector bundles, their characteristic classes, and Whitney-sum splits.

Each declared bundle registers its class generators in the Ring at once, in
declaration order, so the monomial order follows the document (later
declared classes are larger).  After ``split`` the classes of the split
bundle are always computed from its parts; its own generators never appear
again.  Conventions (spec, "Classes, normal form, truncation"):

* real rank 2n >= 4: generators p1..pn and e, with e^2 rewritten as p_n;
* real rank 2 (an oriented plane): only e, and p1 = e^2;
* real rank 2n+1: p1..pn, no Euler class (it is 2-torsion, zero rationally);
* complex rank n: c1..cn; p and e are those of the underlying real bundle,
  sum (-1)^k p_k = c(V) c(dual V) and e = c_n (Milnor–Stasheff, Cor. 15.5);
* rank a declared integer symbol N: generators are the ch_k and every class
  comes from them (``symbolic_rank``); what needs a numeric rank is refused.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Sequence, Union

from . import symbolic_rank
from .graded import AlgebraError, Element, Ring

REAL, COMPLEX = "real", "complex"


@dataclass(frozen=True)
class Trivial:
    """A trivial summand of the given rank in a split."""

    rank: int


Part = Union[str, Trivial]


@dataclass
class Bundle:
    """A declared vector bundle: its name, kind and rank."""

    name: str
    kind: str          # REAL or COMPLEX
    rank: int          # real rank for REAL, complex rank for COMPLEX
    group: int
    line: bool = False
    parts: tuple | None = None
    used: bool = False
    keys: tuple[str, ...] = field(default=())
    symbolic: symbolic_rank.SymbolicRank | None = None   # set when the rank is a symbol

    @property
    def real_rank(self) -> int:
        if self.symbolic is not None:
            raise symbolic_rank.refuse(self.symbolic, f"the real rank of {self.name}")
        return self.rank if self.kind == REAL else 2 * self.rank


class BundleTable:
    """All bundles of a document over one Ring."""

    def __init__(self, ring: Ring):
        self.ring = ring
        self._bundles: dict[str, Bundle] = {}

    # --------------------------------------------------------- declaration
    def declare(self, name: str, kind: str, rank: int | None = None, *, group: int = 0) -> Bundle:
        """Declare a bundle; kind is 'real', 'complex' or 'line' (complex rank 1)."""
        if name in self._bundles:
            raise AlgebraError(f"bundle {name} is already declared")
        line = kind == "line"
        if line:
            if rank not in (None, 1):
                raise AlgebraError(f"a line bundle has rank 1, not {rank}")
            kind, rank = COMPLEX, 1
        if kind not in (REAL, COMPLEX):
            raise AlgebraError(f"unknown bundle kind {kind!r} (expected real, complex or line)")
        if isinstance(rank, bool) or not isinstance(rank, int) or rank < 1:
            raise AlgebraError(f"bundle {name} needs a positive integer rank, got {rank!r}")
        b = Bundle(name, kind, rank, group, line)
        self._bundles[name] = b
        b.keys = tuple(self._register(b))
        return b

    def declare_symbolic(self, name: str, kind: str, symbol, *, group: int = 0) -> Bundle:
        """Declare a real or complex bundle whose rank is the declared integer symbol."""
        if name in self._bundles:
            raise AlgebraError(f"bundle {name} is already declared")
        if kind not in (REAL, COMPLEX):
            raise AlgebraError(f"a bundle of symbolic rank is real or complex, not {kind}")
        b = Bundle(name, kind, 0, group, symbolic=symbolic_rank.SymbolicRank(name, kind == REAL, symbol))
        self._bundles[name] = b
        b.keys = tuple(symbolic_rank.register(self.ring, b.symbolic, group))
        return b

    def character(self, name: str) -> Element:
        """ch of a bundle of symbolic rank (of its complexification if real)."""
        b = self.get(name)
        self._touch(b)
        return symbolic_rank.character(self.ring, b.symbolic, b.keys)

    def is_symbolic(self, name: str) -> bool:
        return self.get(name).symbolic is not None

    def _register(self, b: Bundle) -> list[str]:
        ring, n = self.ring, b.name
        keys = []

        def gen(prefix: str, idx: int | None, degree: int) -> Element:
            key = f"{prefix}{idx or ''}({n})"
            keys.append(key)
            return ring.generator(key, degree, group=b.group)

        if b.kind == COMPLEX:
            for k in range(1, b.rank + 1):
                gen("c", k, 2 * k)
        elif b.rank == 2:
            gen("e", None, 2)
        else:
            half = b.rank // 2
            top = None
            for k in range(1, half + 1):
                top = gen("p", k, 4 * k)
            if b.rank % 2 == 0:
                e = gen("e", None, b.rank)
                if 2 * b.rank <= ring.truncate:   # otherwise e^2 is truncated away anyway
                    ring.add_rule(e * e, top)
        return keys

    def split(self, name: str, parts: Sequence[Part]) -> None:
        """Declare name = sum of parts (Whitney sum); later classes of name come from the parts."""
        b = self.get(name)
        if b.parts is not None:
            raise AlgebraError(f"{name} is already split")
        for whole in [b] + [self.get(p) for p in parts if isinstance(p, str)]:
            if whole.symbolic is not None:
                raise symbolic_rank.refuse(whole.symbolic, "a split")
        if b.used:
            raise AlgebraError(f"{name} cannot be split: its classes are already in use")
        if not parts:
            raise AlgebraError("a split needs at least one part")
        total = 0
        for p in parts:
            if isinstance(p, Trivial):
                if isinstance(p.rank, bool) or not isinstance(p.rank, int) or p.rank < 1:
                    raise AlgebraError(f"trivial({p.rank}) needs a positive integer rank")
                total += p.rank
                continue
            part = self.get(p)
            if p == name or name in self._expansion(p):
                raise AlgebraError(f"{name} cannot be split into {p}: {p} is built from {name}")
            if b.kind == COMPLEX:
                if part.kind != COMPLEX:
                    raise AlgebraError(f"complex bundle {name} can only split into complex bundles, "
                                       f"but {p} is real")
                total += part.rank
            else:
                total += part.real_rank
        unit = "complex rank" if b.kind == COMPLEX else "real rank"
        if total != b.rank:
            raise AlgebraError(f"ranks do not add up: {name} has {unit} {b.rank}, "
                               f"the parts add up to {total}")
        b.parts = tuple(parts)

    def _expansion(self, name: str) -> set[str]:
        seen, todo = set(), [name]
        while todo:
            b = self.get(todo.pop())
            for p in b.parts or ():
                if isinstance(p, str) and p not in seen:
                    seen.add(p)
                    todo.append(p)
        return seen

    # -------------------------------------------------------------- queries
    def get(self, name: str) -> Bundle:
        try:
            return self._bundles[name]
        except KeyError:
            raise AlgebraError(f"unknown bundle {name}") from None

    def __contains__(self, name: str) -> bool:
        return name in self._bundles

    def kind(self, name: str) -> str:
        return self.get(name).kind

    def rank(self, name: str) -> int:
        """Rank in the bundle's own kind (complex rank for complex bundles)."""
        b = self.get(name)
        if b.symbolic is not None:
            raise symbolic_rank.refuse(b.symbolic, "this step")
        return b.rank

    def real_rank(self, name: str) -> int:
        return self.get(name).real_rank

    def parts(self, name: str) -> tuple[Part, ...] | None:
        return self.get(name).parts

    def _gen(self, key: str) -> Element:
        return self.ring.gen(key)

    def _touch(self, b: Bundle) -> None:
        b.used = True

    # -------------------------------------------------------------- classes
    def pontryagin(self, name: str, i: int) -> Element:
        b = self.get(name)
        if isinstance(i, bool) or not isinstance(i, int) or i < 1:
            raise AlgebraError(f"Pontryagin classes are numbered from 1, got p{i}({name})")
        if b.symbolic is not None:   # every p_i exists as a polynomial in the ch (module docstring)
            return self.total_pontryagin(name).part(4 * i)
        m = b.real_rank // 2
        if i > m:
            what = f"real rank {b.rank}" if b.kind == REAL else f"complex rank {b.rank}"
            have = f"its Pontryagin classes are p1..p{m}" if m else "it has no Pontryagin classes"
            raise AlgebraError(f"p{i}({name}) does not exist: {name} has {what}, so {have}")
        return self.total_pontryagin(name).part(4 * i)

    def total_pontryagin(self, name: str) -> Element:
        b = self.get(name)
        ring = self.ring
        if b.symbolic is not None:
            return symbolic_rank.total_pontryagin(self.character(name), b.kind == REAL)
        if b.kind == COMPLEX:
            c = self.total_chern(name)
            cbar = self._conjugate(c)
            prod = c * cbar
            return ring.one() + sum((prod.part(4 * k) * (-1) ** k for k in range(1, b.rank + 1)),
                                    ring.zero())
        if b.parts is not None:
            return self._over_parts(b, self.total_pontryagin)
        self._touch(b)
        if b.rank == 2:
            e = self._gen(f"e({name})")
            return ring.one() + e * e
        total = ring.one()
        for k in range(1, b.rank // 2 + 1):
            total = total + self._gen(f"p{k}({name})")
        return total

    def pontryagin_classes(self, name: str) -> list[Element]:
        """[p1, ..., pm] with m = real rank // 2 (for genera)."""
        total = self.total_pontryagin(name)
        return [total.part(4 * k) for k in range(1, self.get(name).real_rank // 2 + 1)]

    def euler(self, name: str) -> Element:
        b = self.get(name)
        if b.symbolic is not None:
            raise symbolic_rank.refuse(b.symbolic, f"e({name}), the top class,")
        if b.kind == COMPLEX:
            return self.chern(name, b.rank)
        if b.rank % 2:
            raise AlgebraError(f"e({name}) does not exist: {name} has odd rank {b.rank}")
        if b.parts is None:
            self._touch(b)
            return self._gen(f"e({name})")
        result = self.ring.one()
        for p in b.parts:
            if isinstance(p, Trivial) or self.get(p).real_rank % 2:
                # A trivial summand has a nowhere-zero section; an odd part has e = 0 rationally.
                for q in b.parts:   # still mark the parts as used: the value depends on them
                    if isinstance(q, str):
                        self._mark_used(q)
                return self.ring.zero()
            result = result * self.euler(p)
        return result

    def _mark_used(self, name: str) -> None:
        b = self.get(name)
        if b.parts is None:
            self._touch(b)
        else:
            for p in b.parts:
                if isinstance(p, str):
                    self._mark_used(p)

    def chern(self, name: str, i: int) -> Element:
        b = self.get(name)
        if b.kind != COMPLEX:
            raise AlgebraError(f"c{i}({name}) does not exist: {name} is a real bundle")
        if isinstance(i, bool) or not isinstance(i, int) or i < 1:
            raise AlgebraError(f"Chern classes are numbered from 1, got c{i}({name})")
        if b.symbolic is None and i > b.rank:
            raise AlgebraError(f"c{i}({name}) does not exist: {name} has complex rank {b.rank}, "
                               f"so its Chern classes are c1..c{b.rank}")
        return self.total_chern(name).part(2 * i)

    def _over_parts(self, b: Bundle, total) -> Element:
        """Whitney product formula: a split bundle's total class is the product
        of its parts' (trivial summands contribute 1)."""
        out = self.ring.one()
        for p in b.parts:
            if isinstance(p, str):
                out = out * total(p)
        return out

    def total_chern(self, name: str) -> Element:
        b = self.get(name)
        if b.kind != COMPLEX:
            raise AlgebraError(f"c({name}) does not exist: {name} is a real bundle")
        ring = self.ring
        if b.symbolic is not None:
            return symbolic_rank.total_chern(self.character(name))
        if b.parts is not None:
            return self._over_parts(b, self.total_chern)
        self._touch(b)
        total = ring.one()
        for k in range(1, b.rank + 1):
            total = total + self._gen(f"c{k}({name})")
        return total

    def chern_classes(self, name: str) -> list[Element]:
        total = self.total_chern(name)
        return [total.part(2 * k) for k in range(1, self.rank(name) + 1)]

    @staticmethod
    def _conjugate(x: Element) -> Element:
        """The classes of the dual: the degree-2k part changes sign for odd k."""
        out = x.ring.zero()
        for d in x.degrees():
            out = out + (x.part(d) if d % 4 == 0 else -x.part(d))
        return out
