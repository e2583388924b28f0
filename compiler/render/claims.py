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
    lines, current = [], []
    for piece in _Reader(text, printer).read():
        if piece in _BREAK_BEFORE and current and printer.measure(" ".join(current)) > width:
            lines.append(" ".join(current))
            current = []
        current.append(piece)
    return lines + [" ".join(current)]
