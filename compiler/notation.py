"""How the author's identifiers look in mathematics.

One table for every place that typesets a name: symbols inside computed
values, the names of values in the report, table headings.  ``eps`` is
ε, ``I8_free`` is I₈ with "free" beside it, ``a_star`` is a with a star,
multi-letter names stay upright words.  Only display changes; the JSON text
keeps the author's spelling.
"""
from __future__ import annotations

import re

import sympy

_GREEK = frozenset(
    "alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi pi rho "
    "sigma tau upsilon phi chi psi omega Gamma Delta Theta Lambda Xi Pi Sigma Upsilon "
    "Phi Psi Omega".split())
_SHORT = {"eps": r"\epsilon", "vareps": r"\varepsilon", "lam": r"\lambda"}
_MARKS = {"star": "*", "prime": "\\prime"}
_TRAILING_DIGITS = re.compile(r"([A-Za-z]+?)(\d+)")


def _word(word: str) -> str:
    if word in _SHORT:
        return _SHORT[word]
    if word in _GREEK:
        return "\\" + word
    if word.isdigit() or len(word) <= 1:
        return word
    return rf"\mathrm{{{word}}}"


def name_latex(name: str) -> str:
    """An identifier as LaTeX: ``I8`` → ``I_{8}``, ``eps_star`` → ``\\epsilon_{*}``,
    ``I8_free`` → ``I_{8,\\mathrm{free}}``, ``kRRR`` → ``\\mathrm{kRRR}``."""
    head, *subs = name.split("_")
    m = _TRAILING_DIGITS.fullmatch(head)
    if m and not head.isdigit():
        head, subs = m.group(1), [m.group(2), *subs]
    subs = [_MARKS.get(s, _word(s)) for s in subs if s]
    return _word(head) + (f"_{{{','.join(subs)}}}" if subs else "")


def latex(expr: sympy.Expr) -> str:
    """sympy's LaTeX of a value, with our names for its symbols."""
    names = {s: name_latex(s.name) for s in getattr(expr, "free_symbols", ())}
    return sympy.latex(expr, symbol_names=names)


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


def text(expr: sympy.Expr) -> str:
    """A class-free value in the document's own expression syntax."""
    return _TextPrinter({"order": None}).doprint(expr)
