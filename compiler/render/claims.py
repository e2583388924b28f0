"""A ``check`` statement's claim set as an equation, for the appendix.

The results model keeps a check's source as written; this turns that text
into LaTeX token by token (names by the notation rule, ``^`` as a
superscript, ``sqrt(x)`` as a root, ``==`` as ``=``).  It only re-spells
the author's symbols and evaluates nothing; a token it does not know is set
as escaped text, so nothing the author wrote reaches TeX unescaped.
"""
from __future__ import annotations

import re

from compiler.render.notation import name_tree
from compiler.render.printers import LatexPrinter
from compiler.render.texprose import escape_tex

_TOKEN = re.compile(r"\s*(?:(\d+)|([A-Za-z_]\w*)|(==|!=|<=|>=|\.\.|[-+*/^(),<>=])|(\S))")
_OPERATORS = {"==": "=", "!=": r"\neq", "<=": r"\leq", ">=": r"\geq", "*": r"\,", "..": r"\ldots",
              ",": r",\ ", "=": "=", "<": "<", ">": ">", "+": "+", "-": "-", "/": "/"}
_WORDS = {"for": r"\quad\text{for }", "in": r"\in"}


class _Reader:
    def __init__(self, text: str, printer: LatexPrinter):
        self.tokens = [m.groups() for m in _TOKEN.finditer(text)]
        self.i = 0
        self.printer = printer

    def name(self, name: str) -> str:
        return self.printer.doprint(name_tree(name, self.printer.notation))

    def group(self) -> str:
        """Tokens up to the matching ``)`` (already past the ``(``)."""
        out = []
        while self.i < len(self.tokens):
            number, word, op, other = self.tokens[self.i]
            self.i += 1
            if op == ")":
                break
            out.append(self.token(number, word, op, other))
        return " ".join(out)

    def peek_open(self) -> bool:
        return self.i < len(self.tokens) and self.tokens[self.i][2] == "("

    def token(self, number, word, op, other) -> str:
        if number:
            return number
        if word and self.peek_open():
            self.i += 1
            start = self.i
            args = self.group()
            simple = self.i - start == 2 and self.tokens[start][1]
            if word == "sqrt":
                return rf"\sqrt{{{args}}}"
            if simple and re.fullmatch(r"[A-Za-z]+\d*", word):
                return self.name(f"{word}({self.tokens[start][1]})")
            self.i = start  # a longer call stays flat, so a line may break inside it
            return self.name(word) + "("
        if word:
            return _WORDS.get(word) or self.name(word)
        if op in ("(", ")"):
            return op
        if op == "^" and self.i < len(self.tokens):
            nxt = self.tokens[self.i]
            self.i += 1
            if nxt[2] == "(":
                return f"^{{{self.group()}}}"
            return f"^{{{self.token(*nxt)}}}"
        if op:
            return _OPERATORS.get(op, "")
        return rf"\text{{{escape_tex(other)}}}"

    def read(self) -> list[str]:
        """The claim's pieces: a line may end before a sign or relation (brackets
        are plain, so a line may also end inside one)."""
        out = []
        while self.i < len(self.tokens):
            tok = self.tokens[self.i]
            self.i += 1
            out.append(self.token(*tok))
        return out


_BREAK_BEFORE = frozenset({"+", "-", "=", r"\neq", r"\leq", r"\geq", "<", ">", r"\quad\text{for }"})


def claim_latex(source: str, printer: LatexPrinter, width: int) -> list[str]:
    """``check A == B for ...`` as lines of LaTeX (``A = B \\quad for ...``),
    cut before a top-level sign or relation when longer than ``width``."""
    text = " ".join(line.split("#", 1)[0] for line in source.split("\n")).strip()
    if text.startswith("check"):
        text = text[len("check"):]
    return _broken(_Reader(text, printer).read(), printer, width)


def _broken(pieces: list[str], printer: LatexPrinter, width: int) -> list[str]:
    lines, current = [], []
    for piece in pieces:
        if piece in _BREAK_BEFORE and current and printer.measure(" ".join(current)) > width:
            lines.append(" ".join(current))
            current = []
        current.append(piece)
    return lines + [" ".join(current)]


_EXTREMUM = re.compile(r"critical points (?P<points>.*?); kept (?P<kept>.*?): (?P<test>.*)", re.S)
_SECOND = re.compile(r"d²(\w+)/d(\w+)²")


def _test(text: str, printer: LatexPrinter, width: int) -> list[str]:
    """The second-order test: a derivative's sign as math, words as text."""
    if not _SECOND.match(text):
        return [rf"\text{{{escape_tex(text)}}}"]
    formula, _, where = text.partition(" at ")
    lines = _expression(formula, printer, width)
    return lines + ([rf"\text{{at {escape_tex(where)}}}"] if where else [])


def _expression(text: str, printer: LatexPrinter, width: int) -> list[str]:
    second = _SECOND.match(text)
    head = []
    if second:
        head = [rf"\frac{{\partial^2 {printer.doprint(name_tree(second.group(1), printer.notation))}}}"
                rf"{{\partial {printer.doprint(name_tree(second.group(2), printer.notation))}^2}}"]
        text = text[second.end():]
    return _broken(head + _Reader(text, printer).read(), printer, width)


def extremum_rows(detail: str, printer: LatexPrinter, width: int) -> list[tuple[str, list[str]]] | None:
    """An extremization's account (critical points; the kept one: the
    second-order test) as (label, LaTeX lines) rows; None if it is not one."""
    m = _EXTREMUM.fullmatch(detail.strip())
    if m is None:
        return None
    points = [_expression(p, printer, width) for p in m.group("points").split("; ")]
    return ([("critical point", p) for p in points]
            + [("kept", _expression(m.group("kept"), printer, width)),
               ("second-order test", _test(m.group("test"), printer, width))])
