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
