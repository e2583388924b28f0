"""Printers for presentation trees: document text, LaTeX and MathML.

One family, as in sympy: ``Printer.doprint`` dispatches on a node's kind to
``_print_<kind>``; each subclass supplies the spelling of every kind.  Value
kinds are described in ``compiler.results``, name kinds in
``compiler.render.notation``.  Each node is printed once, so the cost is
linear in the size of the tree.  ``lines`` cuts a long value at the signs
of its sums for a multi-line display; ``measure`` estimates printed width.
"""
from __future__ import annotations

import re

from markupsafe import escape

from compiler.render.notation import GREEK, name_tree

#: Binding strength of each kind: a child binding more loosely than its
#: parent needs brackets.
_PRECEDENCE = {"add": 1, "neg": 1, "mul": 2, "div": 2, "pow": 3, "root": 3}
_ATOM = 4


def precedence(tree: list) -> int:
    return _PRECEDENCE.get(tree[0], _ATOM)


class Printer:
    """Dispatch by kind, brackets by precedence; subclasses spell the kinds."""

    spaced = True  # terms are separated by spaces (not so in MathML)

    def __init__(self, notation: dict[str, str] | None = None):
        self.notation = notation or {}
        self._names: dict[str, str] = {}  # a name recurs in every term of a long value

    def doprint(self, tree: list) -> str:
        return getattr(self, "_print_" + tree[0])(*tree[1:])

    def wrap(self, tree: list, level: int) -> str:
        """``tree`` printed, in brackets when it binds more loosely than ``level``."""
        out = self.doprint(tree)
        return self.paren(out) if precedence(tree) < level else out

    def terms(self, terms) -> str:
        """A sum: first term with its own sign, the rest joined by `` + ``/`` - ``."""
        out = []
        for i, t in enumerate(terms):
            neg = t[0] == "neg"
            body = self.wrap(t[1], 2) if neg else self.doprint(t)
            out.append((self.minus if neg else "") + body if i == 0 else
                       (f" {self.minus} " if neg else " + ") + body)
        return self.join_terms(out)

    def join_terms(self, parts: list[str]) -> str:
        return "".join(parts)

    def _print_add(self, *terms) -> str:
        return self.terms(terms)

    def _print_neg(self, arg) -> str:
        return self.join_terms([self.minus + self.wrap(arg, 2)])

    def _print_sym(self, name: str) -> str:
        out = self._names.get(name)
        if out is None:
            out = self._names[name] = self.doprint(name_tree(name, self.notation))
        return out

    _print_cls = _print_sym


_TEX_INVISIBLE = re.compile(r"\\(?:left|right|mathrm|mathit|operatorname|frac|Bigl|Bigr)(?![A-Za-z])|[{}^_ ]")
_TEX_COMMAND = re.compile(r"\\[A-Za-z]+")
_TAG = re.compile(r"<[^>]*>")


class TextPrinter(Printer):
    """The document's own expression syntax: what the JSON ``display`` holds."""

    minus, plus_sign, big_brackets = "-", "+", ("(", ")")

    def paren(self, s: str) -> str:
        return f"({s})"

    def _print_int(self, n: int) -> str:
        return str(n)

    def _print_sym(self, name: str) -> str:
        return name

    _print_cls = _print_sym

    def _print_mul(self, *factors) -> str:
        return "*".join(self.wrap(f, 2) for f in factors)

    def _print_div(self, num, den) -> str:
        return f"{self.wrap(num, 2)}/{self.wrap(den, 3)}"

    def _print_pow(self, base, n: int) -> str:
        return f"{self.wrap(base, _ATOM)}^{n}"

    def _print_sqrt(self, arg) -> str:
        return f"sqrt({self.doprint(arg)})"

    def _print_root(self, base, n: int) -> str:
        return f"{self.wrap(base, _ATOM)}^(1/{n})"

    def _print_order(self, degree: int) -> str:
        return f"O(degree >= {degree})"

    measure = staticmethod(len)


class LatexPrinter(Printer):
    """LaTeX for amsmath; names by the notation rule."""

    minus, plus_sign, big_brackets = "-", "+", (r"\Bigl(", r"\Bigr)")

    def paren(self, s: str) -> str:
        # Sized brackets only around tall content: TeX cannot break a line inside them.
        return rf"\left({s}\right)" if "\\frac" in s else f"({s})"

    def _print_int(self, n: int) -> str:
        return str(n)

    def _print_mul(self, *factors) -> str:
        out = []
        for f in factors:
            s = self.wrap(f, 2)
            if out and (s[:1].isdigit() or (f[0] == "div" and out[-1][-1:].isdigit())):
                out.append(r"\cdot")
            out.append(s)
        return " ".join(out)

    def _print_div(self, num, den) -> str:
        return rf"\frac{{{self.doprint(num)}}}{{{self.doprint(den)}}}"

    def _print_pow(self, base, n: int) -> str:
        inner = self.wrap(base, _ATOM)
        return f"{inner}^{{{n}}}" if base[0] in ("int", "sym") and "_" not in inner else f"{{{inner}}}^{{{n}}}"

    def _print_sqrt(self, arg) -> str:
        return rf"\sqrt{{{self.doprint(arg)}}}"

    def _print_root(self, base, n: int) -> str:
        return rf"\sqrt[{n}]{{{self.doprint(base)}}}"

    def _print_order(self, degree: int) -> str:
        return rf"\mathcal{{O}}(\deg \geq {degree})"

    @staticmethod
    def measure(latex: str) -> int:
        """Rough printed width: markup costs nothing, a symbol command one
        character, a binary sign with its spacing three."""
        signs = latex.count(" + ") + latex.count(" - ")
        return len(_TEX_COMMAND.sub("x", _TEX_INVISIBLE.sub("", latex))) + 2 * signs

    # names
    def _print_mi(self, text: str, style: str) -> str:
        if style == "greek":
            return "\\" + text
        return text if style == "it" else rf"\mathrm{{{text}}}"

    def _print_mn(self, text: str) -> str:
        return text

    def _print_mo(self, text: str) -> str:
        return {"′": r"\prime", "*": "*"}.get(text, text)

    def _print_sub(self, base, sub) -> str:
        return f"{self.doprint(base)}_{{{self.doprint(sub)}}}"

    def _print_sup(self, base, sup) -> str:
        return f"{{{self.doprint(base)}}}^{{{self.doprint(sup)}}}"

    def _print_row(self, *items) -> str:
        return " ".join(self.doprint(i) for i in items)

    def _print_accent(self, accent: str, base) -> str:
        return f"\\{accent}{{{self.doprint(base)}}}"

    def _print_apply(self, head, arg) -> str:
        return f"{self.doprint(head)}({self.doprint(arg)})"

    def _print_tex(self, latex: str, name: str) -> str:
        return "{" + latex + "}"


class MathMLPrinter(Printer):
    """Presentation MathML, written directly (no LaTeX in between)."""

    minus, plus_sign = "<mo>\u2212</mo>", "<mo>+</mo>"
    big_brackets = ('<mo form="prefix" stretchy="false">(</mo>', '<mo form="postfix" stretchy="false">)</mo>')
    spaced = False

    def paren(self, s: str) -> str:
        # Stretchy brackets get operator spacing in browsers: c ( L ) instead of c(L).
        return f'<mrow><mo stretchy="false">(</mo>{s}<mo stretchy="false">)</mo></mrow>'

    def join_terms(self, parts: list[str]) -> str:
        return "<mrow>" + "".join(parts) + "</mrow>"

    def terms(self, terms) -> str:
        out = []
        for i, t in enumerate(terms):
            neg = t[0] == "neg"
            body = self.wrap(t[1], 2) if neg else self.doprint(t)
            out.append((self.minus if neg else "" if i == 0 else "<mo>+</mo>") + body)
        return self.join_terms(out)

    def _print_int(self, n: int) -> str:
        return f"<mn>{n}</mn>"

    def _print_mul(self, *factors) -> str:
        out = []
        for f in factors:
            s = self.wrap(f, 2)
            if out:
                out.append("<mo>\u22c5</mo>" if s.startswith("<mn>") else "<mo>\u2062</mo>")
            out.append(s)
        return "<mrow>" + "".join(out) + "</mrow>"

    def _print_div(self, num, den) -> str:
        return f"<mfrac>{self.doprint(num)}{self.doprint(den)}</mfrac>"

    def _print_pow(self, base, n: int) -> str:
        return f"<msup>{self.wrap(base, _ATOM)}<mn>{n}</mn></msup>"

    def _print_sqrt(self, arg) -> str:
        return f"<msqrt>{self.doprint(arg)}</msqrt>"

    def _print_root(self, base, n: int) -> str:
        return f"<mroot><mrow>{self.doprint(base)}</mrow><mn>{n}</mn></mroot>"

    def _print_order(self, degree: int) -> str:
        return (f'<mrow><mi>\U0001d4aa</mi><mo stretchy="false">(</mo><mi>deg</mi><mo>\u2265</mo>'
                f'<mn>{degree}</mn><mo stretchy="false">)</mo></mrow>')

    @staticmethod
    def measure(mathml: str) -> int:
        """Rough printed width: the characters shown (a fraction counts both
        rows), a binary sign with its spacing three."""
        signs = mathml.count("<mo>+</mo>") + mathml.count("<mo>\u2212</mo>")
        return len(_TAG.sub("", mathml.replace("&amp;", "&").replace("&lt;", "<"))) + 2 * signs

    # names
    def _print_mi(self, text: str, style: str) -> str:
        if style == "greek":
            return f"<mi>{GREEK[text]}</mi>"
        if style == "it" and len(text) > 1:  # browsers set only single-letter <mi> in italic
            return "<mrow>" + "".join(f"<mi>{escape(ch)}</mi>" for ch in text) + "</mrow>"
        variant = ' mathvariant="normal"' if style == "up" and len(text) == 1 else ""
        return f"<mi{variant}>{escape(text)}</mi>"

    def _print_mn(self, text: str) -> str:
        return f"<mn>{escape(text)}</mn>"

    def _print_mo(self, text: str) -> str:
        return f"<mo>{escape({'-': chr(0x2212), '*': chr(0x2217)}.get(text, text))}</mo>"

    def _print_sub(self, base, sub) -> str:
        return f"<msub>{self.doprint(base)}{self.doprint(sub)}</msub>"

    def _print_sup(self, base, sup) -> str:
        return f"<msup>{self.doprint(base)}{self.doprint(sup)}</msup>"

    def _print_row(self, *items) -> str:
        return "<mrow>" + "".join(self.doprint(i) for i in items) + "</mrow>"

    def _print_accent(self, accent: str, base) -> str:
        mark = {"hat": "^", "bar": "\u00af", "tilde": "~"}[accent]
        return f'<mover accent="true">{self.doprint(base)}<mo>{mark}</mo></mover>'

    def _print_apply(self, head, arg) -> str:
        return f"<mrow>{self.doprint(head)}{self.paren(self.doprint(arg))}</mrow>"

    def _print_tex(self, latex: str, name: str) -> str:
        from compiler.render.mathml import inner_mathml

        return inner_mathml(latex)


# ------------------------------------------------------------ line breaking


def _product(factors: list) -> list | None:
    return None if not factors else factors[0] if len(factors) == 1 else ["mul", *factors]


def _split(tree: list):
    """(factor before, terms, factor after) of the widest sum inside a product
    or a numerator, or of a sum itself; None when there is none."""
    kind = tree[0]
    if kind == "add":
        return None, list(tree[1:]), None
    if kind == "div":
        inner = _split(tree[1])
        if inner is None:
            return None
        before, terms, after = inner
        return ["div", _product([f for f in (before, after) if f not in (None, ["int", 1])]) or ["int", 1],
                tree[2]], terms, None
    if kind != "mul":
        return None
    factors = tree[1:]
    inner = {i: _split(f) for i, f in enumerate(factors) if f[0] in ("add", "div")}
    inner = {i: parts for i, parts in inner.items() if parts is not None}
    if not inner:
        return None
    at = max(inner, key=lambda i: len(TextPrinter().doprint(factors[i])))
    before, terms, after = inner[at]
    head = [f for f in (*factors[:at], before) if f not in (None, ["int", 1])]
    tail = [f for f in (after, *factors[at + 1:]) if f is not None]
    return _product(head) or ["int", 1], terms, _product(tail)


def _fragments(printer, tree: list, sign: str, width: int, measure) -> list[str]:
    """``sign tree`` as pieces between which a line may end."""
    if tree[0] == "neg":
        flipped = {"": printer.minus, printer.minus: printer.plus_sign}.get(sign, printer.minus)
        return _fragments(printer, tree[1], flipped, width, measure)
    whole = printer.wrap(tree, 2) if sign == printer.minus else printer.doprint(tree)
    if measure(whole) <= width or (parts := _split(tree)) is None:
        return [f"{sign} {whole}".strip() if printer.spaced else sign + whole]
    before, terms, after = parts
    out = []
    for i, t in enumerate(terms):
        neg = t[0] == "neg"
        term_sign = printer.minus if neg else ("" if i == 0 else printer.plus_sign)
        out += _fragments(printer, t[1] if neg else t, term_sign, width, measure)
    if before is not None:
        open_, close = printer.big_brackets
        lead = "" if before == ["int", 1] else printer.wrap(before, 2)
        out[0] = f"{sign} {lead} {open_} {out[0]}"
        out[-1] = f"{out[-1]} {close} {printer.wrap(after, 2) if after else ''}".rstrip()
    elif sign:
        out[0] = f"{sign} {out[0]}"
    return out


def lines(printer: Printer, tree: list, width: int) -> list[str]:
    """``tree`` printed as display lines of about ``width`` visible characters
    (as the printer measures them), cut only at the signs of its sums."""
    measure = printer.measure
    out, current = [], ""
    for piece in _fragments(printer, tree, "", width, measure):
        if current and measure(current) + measure(piece) > width:
            out.append(current)
            current = ""
        current = f"{current} {piece}".strip()
    return out + [current]


def degrees_text(v) -> str:
    """``degree 8`` / ``degrees 4, 8``; nothing for zero, which has no degree."""
    if not v.degrees:
        return ""
    word = "degree" if len(v.degrees) == 1 else "degrees"
    return f"{word} {', '.join(str(d) for d in v.degrees)}"
