"""Display trees of factored rational functions, spelled as sympy spells them, from FLINT data.

The display form shows a coefficient as ``sympy.factor`` writes it: terms of
a sum in sympy's order, factors in sympy's order, a sum with more minus
signs written as the negative of its opposite.  Those conventions are
reproduced here on plain data (polynomials as ``(exponents, Fraction)``
terms over named symbols), so showing a value needs no sympy: the sort keys
below are sympy's ``sort_key`` tuples for sums of monomials with rational
coefficients, and ``test_spelling.py`` checks every tree against sympy.
"""
from __future__ import annotations

import re
from fractions import Fraction

# sympy's class keys (``Basic.class_key``) of the kinds that occur.
_NUMBER, _SYMBOL, _MUL, _ADD = (1, 0, "Number"), (2, 0, "Symbol"), (3, 0, "Mul"), (3, 1, "Add")
# ``polys.polyutils``: the rank of one-letter symbol names when sympy orders generators.
_LETTER_RANK = {**{c: 301 + i for i, c in enumerate("abcdefghijklmno")},
                **{c: 216 + i for i, c in enumerate("pqrstuvw")}, "x": 124, "y": 125, "z": 126}
_NAME = re.compile(r"^(.*?)(\d*)$")


def _number_key(q) -> tuple:
    return (_NUMBER, (0, ()), (), q)


_ONE = _number_key(1)


def rational_tree(value: Fraction) -> list:
    """A rational number."""
    tree = ["int", abs(value.numerator)]
    if value.denominator != 1:
        tree = ["div", tree, ["int", value.denominator]]
    return ["neg", tree] if value < 0 else tree


def product(factors: list) -> list:
    return factors[0] if len(factors) == 1 else ["mul", *factors]


def opposite(terms: list) -> list:
    return [t[1] if t[0] == "neg" else ["neg", t] for t in terms]


def shorter_negated(negatives: list) -> bool:
    """Whether ``-(...)`` of the opposite terms needs fewer minus signs
    (``negatives``: which terms show one)."""
    negative = sum(negatives)
    return len(negatives) - negative + 1 < negative


class Spelling:
    """The conventions for one ring's symbols (``names`` in the ring's order)."""

    def __init__(self, names):
        self.names = list(names)
        self._by_name = sorted(range(len(self.names)), key=self.names.__getitem__)
        self._lex = sorted(range(len(self.names)), key=lambda i: _generator_rank(self.names[i]))

    # -- polynomials: lists of (exponents, Fraction) ----------------------------

    def leading(self, terms) -> Fraction:
        """The leading coefficient in the lexicographic order of sympy's
        generators, the one ``sympy.factor`` makes positive."""
        return max(terms, key=lambda t: tuple(t[0][i] for i in self._lex))[1]

    def _factors(self, exps) -> list:
        return [(i, exps[i]) for i in self._by_name if exps[i]]

    def _term_key(self, exps, c) -> tuple:
        factors = self._factors(exps)
        if not factors:
            return _number_key(c)
        keys = [(_SYMBOL, (1, (self.names[i],)), _ONE if e == 1 else _number_key(e), 1) for i, e in factors]
        if len(keys) == 1:
            return keys[0][:3] + (c,)
        return (_MUL, (len(keys), tuple(keys)), _ONE, c)

    def ordered(self, terms) -> list:
        """A sum's terms in the order ``as_ordered_terms`` gives."""
        if len(terms) == 2:
            const = [t for t in terms if not any(t[0])]
            other = [t for t in terms if any(t[0])]
            if const and const[0][1] > 0 and other[0][1] < 0 and len(self._factors(other[0][0])) == 1:
                return const + other   # 1 - x stays number first
        return sorted(terms, key=lambda t: tuple(-t[0][i] for i in self._by_name))

    def _sum_key(self, terms) -> tuple:
        keys = tuple(self._term_key(*t) for t in self.ordered(terms))
        return (_ADD, (len(keys), keys), _ONE, 1)

    def negative(self, terms) -> bool:
        """``could_extract_minus_sign`` of the polynomial as sympy builds it."""
        if len(terms) == 1:
            return terms[0][1] < 0
        negative = sum(c < 0 for _, c in terms)
        if 2 * negative != len(terms):
            return 2 * negative > len(terms)
        return self._sum_key(terms) < self._sum_key([(e, -c) for e, c in terms])

    def _base_key(self, terms) -> tuple:
        return self._term_key(*terms[0]) if len(terms) == 1 else self._sum_key(terms)

    # -- trees ------------------------------------------------------------------

    def _term_tree(self, exps, c) -> list:
        factors = self._factors(exps)
        if not factors:
            return rational_tree(c)
        trees = [["sym", self.names[i]] if e == 1 else ["pow", ["sym", self.names[i]], e] for i, e in factors]
        if c == 1 and len(trees) == 1:
            return trees[0]
        return self._product_tree(c, [(t, 1, None) for t in trees])

    def _sum_tree(self, terms) -> list:
        trees = [self._term_tree(*t) for t in self.ordered(terms)]
        if shorter_negated([t[0] == "neg" for t in trees]):
            return ["neg", ["add", *opposite(trees)]]
        return ["add", *trees]

    def poly_tree(self, terms) -> list:
        return self._term_tree(*terms[0]) if len(terms) == 1 else self._sum_tree(terms)

    def _product_tree(self, c: Fraction, factors) -> list:
        """``c`` times ``factors`` as ``(tree, exponent, sum terms or None)``,
        in order: the number first, a negative one's sign out front, a sum with
        more minus signs written with its sign outside."""
        sign, num, den = c < 0, [], []
        for tree, e, terms in factors:
            target = den if e < 0 else num
            e = abs(e)
            if terms is not None and self.negative(terms):
                tree = ["add", *opposite(tree[1:])] if tree[0] == "add" else tree[1]
                sign ^= bool(e % 2)
            target.append(tree if e == 1 else ["pow", tree, e])
        c = abs(c)
        if c.numerator != 1 or not num:
            num.insert(0, ["int", c.numerator])
        if c.denominator != 1:
            den.insert(0, ["int", c.denominator])
        tree = product(num)
        if den:
            tree = ["div", tree, product(den)]
        return ["neg", tree] if sign else tree

    def factored_tree(self, c: Fraction, factors) -> list:
        """``c`` times the product of ``factors`` (primitive irreducible
        polynomials as term lists, with nonzero integer exponents), as
        ``_keep_coeff(c, Mul(...))`` is shown."""
        if not factors:
            return rational_tree(c)
        if len(factors) == 1 and factors[0][1] == 1 and len(factors[0][0]) > 1 and c in (1, -1):
            terms = factors[0][0]   # a lone sum: -1 is distributed over its terms
            return self._sum_tree(terms if c == 1 else [(e, -x) for e, x in terms])
        if c == 1 and len(factors) == 1 and factors[0][1] > 0:
            terms, e = factors[0]
            return self.poly_tree(terms) if e == 1 else ["pow", self.poly_tree(terms), e]
        ordered = sorted(factors, key=lambda f: self._base_key(f[0]))
        return self._product_tree(c, [(self.poly_tree(terms), e, terms if len(terms) > 1 else None)
                                      for terms, e in ordered])


def _generator_rank(name: str) -> tuple:
    """``polys.polyutils._sort_gens``'s key for a symbol name."""
    stem, index = _NAME.match(name).groups()
    return (_LETTER_RANK.get(stem, 1000), stem, int(index) if index else 0)
