"""The document-syntax text of class-free sympy values (the JSON ``text``).

How names look in mathematics is the renderers' business
(``compiler.render.notation``); this module only writes values back in the
syntax the parser reads.
"""
from __future__ import annotations

from functools import lru_cache

from .algebra.lazysympy import sympy


@lru_cache(maxsize=None)
def _printer():
    """The printer class, defined on first use (it subclasses a sympy printer)."""

    class _TextPrinter(sympy.printing.str.StrPrinter):
        """sympy's plain printer, adjusted to the document syntax: ``^`` for
        powers, and half-integer powers as ``sqrt(...)`` since the syntax allows
        only integer exponents."""

        def _print_Pow(self, expr, rational=False):
            base, exp = expr.args
            if isinstance(exp, sympy.Rational) and exp.q == 2 and exp.p not in (1, -1):
                root = f"sqrt({self._print(base)})"
                power = f"{root}^{abs(exp.p)}"
                return power if exp.p > 0 else f"1/{power}"
            if exp == sympy.Rational(1, 2):
                return f"sqrt({self._print(base)})"
            if exp == sympy.Rational(-1, 2):
                return f"1/sqrt({self._print(base)})"
            return super()._print_Pow(expr, rational).replace("**", "^")


        def _print_Abs(self, expr):
            # |x| has no spelling of its own in the document syntax.
            return f"sqrt(({self._print(expr.args[0])})^2)"

    return _TextPrinter


def text(expr: sympy.Expr) -> str:
    """A class-free value in the document's own expression syntax."""
    return _printer()({"order": None}).doprint(expr)
