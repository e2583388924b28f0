"""The one rule that turns an author's identifier into mathematics.

Every place that shows a name (a value's left-hand side, a symbol inside a
value, a fiber class, a table heading, a plot axis) asks ``name_tree`` and
prints the answer with the same printer, so a name looks the same in HTML,
LaTeX and plots.  The rule, in order:

* ``_`` separates a head from subscripts, joined by commas: ``I8_free`` is
  I₈,free; ``star`` becomes ``*`` and ``prime`` a prime on the head;
* a part ``minus``/``plus`` between two names is that sign: ``nv_minus_nh``
  is nv − nh;
* Greek names (and ``eps``, ``lam``) are Greek letters;
* trailing digits are a subscript, and letters after them join it:
  ``I8`` is I₈, ``I8tw`` is I₈,tw;
* one lower-case letter followed by capitals takes them as a subscript:
  ``kRRR`` is k_RRR;
* ``Ahat``/``Abar``/``Atilde`` put the accent on the letter;
* one letter is italic, a longer word upright; a subscript of at most three
  capitals or digits stays italic (``c_RRR``, ``a_N2``), a word is upright.

A class is ``name(bundle)`` with both parts under the same rule.  An author
overrides any name in the front matter (``notation: {kRRR: "k_{RRR}"}``);
the override is LaTeX checked by ``compiler.render.mathml.check_author_latex``.
Trees are the plain lists of ``compiler.results`` (kinds ``mi``, ``mn``,
``mo``, ``sub``, ``sup``, ``row``, ``accent``, ``apply``, ``tex``).
"""
from __future__ import annotations

import re

from compiler.texsafe import math_problem

GREEK = {
    "alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ϵ", "varepsilon": "ε",
    "zeta": "ζ", "eta": "η", "theta": "θ", "iota": "ι", "kappa": "κ", "lambda": "λ", "mu": "μ",
    "nu": "ν", "xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ", "tau": "τ", "upsilon": "υ",
    "phi": "ϕ", "varphi": "φ", "chi": "χ", "psi": "ψ", "omega": "ω", "Gamma": "Γ", "Delta": "Δ",
    "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ", "Pi": "Π", "Sigma": "Σ", "Upsilon": "Υ", "Phi": "Φ",
    "Psi": "Ψ", "Omega": "Ω",
}
_ALIASES = {"eps": "epsilon", "vareps": "varepsilon", "lam": "lambda"}
_ACCENTS = ("hat", "bar", "tilde")
_SIGNS = {"minus": "-", "plus": "+"}
_DIGITS = re.compile(r"([A-Za-z]+?)(\d+)([A-Za-z]*)")
_CAPITALS = re.compile(r"([a-z])([A-Z]+)")
_CLASS = re.compile(r"([A-Za-z]\w*)\((\w+)\)")


def _letters(word: str, short_italic: bool = False) -> list:
    """A bare word: Greek letter, italic letter, or upright word."""
    word = _ALIASES.get(word, word)
    if word in GREEK:
        return ["mi", word, "greek"]
    if word.isdigit():
        return ["mn", word]
    for accent in _ACCENTS:
        if len(word) == len(accent) + 1 and word.endswith(accent):
            return ["accent", accent, ["mi", word[0], "it"]]
    italic = len(word) == 1 or (short_italic and len(word) <= 3 and not any(c.islower() for c in word))
    return ["mi", word, "it" if italic else "up"]


def _head(word: str) -> tuple[list, list]:
    """The head of a name and the subscripts it carries itself."""
    m = _DIGITS.fullmatch(word)
    if m:
        subs = [["mn", m.group(2)]] + ([_letters(m.group(3), True)] if m.group(3) else [])
        return _letters(m.group(1)), subs
    m = _CAPITALS.fullmatch(word)
    if m and _ALIASES.get(word, word) not in GREEK:
        return _letters(m.group(1)), [["mi", m.group(2), "it" if len(m.group(2)) <= 3 else "up"]]
    return _letters(word), []


def _simple(parts: list[str]) -> list:
    head, subs = _head(parts[0])
    prime = False
    for part in parts[1:]:
        if part == "star":
            subs.append(["mo", "*"])
        elif part == "prime":
            prime = True
        elif part:
            subs.append(_letters(part, True))
    node = head
    if subs:
        row = [subs[0]]
        for s in subs[1:]:
            row += [["mo", ","], s]
        node = ["sub", head, row[0] if len(row) == 1 else ["row", *row]]
    return ["sup", node, ["mo", "′"]] if prime else node


def name_tree(name: str, overrides: dict[str, str] | None = None) -> list:
    """``name`` as a presentation tree; an author's override wins."""
    if overrides and name in overrides:
        return ["tex", overrides[name], name]
    m = _CLASS.fullmatch(name)
    if m:
        return ["apply", name_tree(m.group(1), overrides), name_tree(m.group(2), overrides)]
    parts = name.split("_")
    out, run = [], []
    for part in parts:
        if part in _SIGNS and run:
            out += [_simple(run), ["mo", _SIGNS[part]]]
            run = []
        elif part in _SIGNS and not out:
            out.append(["mo", _SIGNS[part]])
        else:
            run.append(part)
    if run:
        out.append(_simple(run))
    return out[0] if len(out) == 1 else ["row", *out]


# ------------------------------------------------- the author's LaTeX subset

#: Commands an author may use in a ``notation`` override: letters, accents
#: and fonts, all of which the MathML converter renders and TeX knows.
TEX_COMMANDS = frozenset(
    [*GREEK, "mathrm", "mathit", "mathbf", "mathsf", "mathcal", "mathbb", "hat", "bar", "tilde",
     "widetilde", "widehat", "overline", "vec", "dot", "ddot", "check", "prime", "ast", "star",
     "dagger", "ell", "partial", "nabla", "infty", "pm", "mp", "cdot", "times", "otimes", "oplus",
     "text"])
_TEX_TOKEN = re.compile(r"\\([A-Za-z]+)|\\(.)|([A-Za-z0-9_^{}()\[\],.+\-*/'= |:;!<>])|(.)", re.S)


def check_tex(latex: str) -> str | None:
    """Why ``latex`` is outside the subset, or None when it is inside.

    Braces must balance, so an override cannot close a group it did not open;
    what passes goes through the one math whitelist too (``texsafe``), of
    which the subset is a part, so it also typesets.
    """
    depth = 0
    for m in _TEX_TOKEN.finditer(latex):
        command, escaped, plain, other = m.groups()
        if command is not None and command not in TEX_COMMANDS:
            return f"\\{command} is not allowed in notation (use letters, Greek, accents, fonts)"
        if escaped is not None and escaped not in ",;! ":
            return f"\\{escaped} is not allowed in notation"
        if other is not None:
            return f"character {other!r} is not allowed in notation; write it as a LaTeX command"
        depth += {"{": 1, "}": -1}.get(plain, 0)
        if depth < 0:
            return "unbalanced braces in notation"
    if depth:
        return "unbalanced braces in notation"
    found = math_problem(latex)
    return None if found is None else found[1]
