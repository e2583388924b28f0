"""Names as plot text: runs of plain Unicode, italic or upright, raised or lowered.

A plot cannot hold MathML, so a name's presentation tree (the one rule of
``compiler.render.notation``, the same as the report's math) is printed as
runs: italic letters, Greek as Unicode, subscripts and superscripts as
smaller runs off the baseline, accents as a mark over a run.  An author's
``notation`` override is LaTeX of the checked subset, read here token by
token into the same runs; nothing is evaluated.  The SVG draws runs; the
LaTeX appendix typesets a label's parts itself (``texlabels``).
"""
from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass

from compiler.render.notation import GREEK, name_tree


@dataclass(frozen=True)
class Run:
    """A stretch of label text in one style."""

    text: str
    italic: bool = False
    rise: float = 0.0  # baseline shift in units of the base font size, up positive
    scale: float = 1.0  # size relative to the base font size
    accent: str = ""  # a mark over the whole run: "hat", "bar", "tilde", "dot", "ddot", "vec", "check"


@dataclass(frozen=True)
class At:
    """Where runs go: baseline shift and size, lowered and shrunk for scripts."""

    rise: float = 0.0
    scale: float = 1.0

    def sub(self) -> At:
        return At(self.rise - 0.22 * self.scale, self.scale * 0.72)

    def sup(self) -> At:
        return At(self.rise + 0.38 * self.scale, self.scale * 0.72)

    def run(self, text: str, italic: bool = False) -> Run:
        return Run(text, italic, self.rise, self.scale)


Label = tuple[Run, ...]
#: Operators as typeset in mathematics.
_SIGNS = {"-": "−", "*": "∗", "'": "′"}


def _sign(text: str) -> str:
    return "".join(_SIGNS.get(c, c) for c in text)


def _greek_italic(letter: str) -> bool:
    """Lower-case Greek slants as in TeX; capitals stand upright."""
    return letter.islower()


# ------------------------------------------------------------ name trees

def _mi(node: list, at: At) -> Label:
    text, style = node[1], node[2]
    if style == "greek":
        letter = GREEK[text]
        return (at.run(letter, _greek_italic(letter)),)
    return (at.run(text, style == "it"),)


def _sup(node: list, at: At) -> Label:
    if node[2] == ["mo", "′"]:  # a prime is already raised
        return runs(node[1], at) + (at.run("′"),)
    return runs(node[1], at) + runs(node[2], at.sup())


def _accent(node: list, at: At) -> Label:
    return tuple(dataclasses.replace(r, accent=node[1]) for r in runs(node[2], at))


_KINDS = {
    "mi": _mi,
    "mn": lambda node, at: (at.run(node[1]),),
    "mo": lambda node, at: (at.run(_sign(node[1])),),
    "sub": lambda node, at: runs(node[1], at) + runs(node[2], at.sub()),
    "sup": _sup,
    "row": lambda node, at: tuple(r for item in node[1:] for r in runs(item, at)),
    "accent": _accent,
    "apply": lambda node, at: runs(node[1], at) + (at.run("("),) + runs(node[2], at) + (at.run(")"),),
    "tex": lambda node, at: tex_runs(node[1], at),
}


def runs(tree: list, at: At = At()) -> Label:
    """A name's presentation tree as runs."""
    return _KINDS[tree[0]](tree, at)


def name_label(name: str, notation: dict[str, str]) -> Label:
    """``name`` as plot text, by the report's notation rule."""
    return runs(name_tree(name, notation))


def plain(text: str, at: At = At()) -> Label:
    """Text that is not a name (a value, an unnamed curve): upright, signs as in mathematics."""
    return (at.run(_sign(text)),)


# ------------------------------------------------------- what a label says

#: One piece of a label as (kind, text), kept beside its runs so that a
#: backend that typesets (LaTeX) prints the same thing its own way.  Kinds:
#: ``name`` a document name, ``number`` a number, ``equals`` `` = number``,
#: ``power`` the unit ``×10^text``, ``text`` upright words and punctuation,
#: ``gap`` a wide space.
Part = tuple[str, str]
_SPELLING = {
    "name": name_label,
    "number": lambda text, notation: plain(text),
    "equals": lambda text, notation: plain(f" = {text}"),
    "power": lambda text, notation: plain("×10") + plain(text, At().sup()),
    "text": lambda text, notation: plain(text),
    "gap": lambda text, notation: plain("    "),
}


def spell(parts: tuple[Part, ...], notation: dict[str, str]) -> Label:
    """A label's parts as runs, names by the report's notation rule."""
    return tuple(r for kind, text in parts for r in _SPELLING[kind](text, notation))


# ------------------------------------------- the author's LaTeX subset

_TOKEN = re.compile(r"\\([A-Za-z]+)|\\(.)|(.)", re.S)
#: Font commands and the mode of their argument: "math" slants letters, "it"
#: slants everything, "up" nothing, and "text" keeps spaces and hyphens too.
_MODES = {"mathrm": "up", "mathbf": "up", "mathsf": "up", "mathcal": "up", "mathbb": "up", "mathit": "it",
          "text": "text"}
_ACCENTS = {"hat": "hat", "widehat": "hat", "bar": "bar", "overline": "bar", "tilde": "tilde",
            "widetilde": "tilde", "dot": "dot", "ddot": "ddot", "vec": "vec", "check": "check"}
_COMMAND_SIGNS = {"prime": "′", "ast": "∗", "star": "⋆", "dagger": "†", "ell": "ℓ", "partial": "∂",
                  "nabla": "∇", "infty": "∞", "pm": "±", "mp": "∓", "cdot": "·", "times": "×",
                  "otimes": "⊗", "oplus": "⊕"}
_SPACES = {",": "\u2009", ";": " ", " ": " ", "!": ""}


class _TexReader:
    """Reads checked notation LaTeX (``check_tex`` let it through) into runs."""

    def __init__(self, latex: str):
        self.tokens = [m.groups() for m in _TOKEN.finditer(latex)]
        self.i = 0

    def group(self, at: At, mode: str) -> Label:
        """Atoms up to the closing brace (or the end)."""
        out: Label = ()
        while self.i < len(self.tokens) and self.tokens[self.i][2] != "}":
            out += self.atom(at, mode)
        self.i += 1  # the closing brace
        return out

    def atom(self, at: At, mode: str) -> Label:
        """One token's runs (a group is one atom, as the argument of a command)."""
        if self.i >= len(self.tokens):
            return ()
        command, escaped, char = self.tokens[self.i]
        self.i += 1
        if char == "{":
            return self.group(at, mode)
        if char in ("_", "^"):
            return self.atom(at.sub() if char == "_" else at.sup(), mode)
        if escaped is not None:
            return (at.run(_SPACES.get(escaped, escaped)),)
        if command is not None:
            return self.command(command, at, mode)
        if mode == "text":
            return (at.run(char),)
        if char == " ":
            return ()
        return (at.run(_sign(char), char.isalpha() if mode == "math" else mode == "it"),)

    def command(self, command: str, at: At, mode: str) -> Label:
        if command in GREEK:
            letter = GREEK[command]
            return (at.run(letter, _greek_italic(letter) if mode == "math" else mode == "it"),)
        if command in _MODES:
            return self.atom(at, _MODES[command])
        if command in _ACCENTS:
            return tuple(dataclasses.replace(r, accent=_ACCENTS[command]) for r in self.atom(at, mode))
        return (at.run(_COMMAND_SIGNS.get(command, command)),)


def tex_runs(latex: str, at: At = At()) -> Label:
    """An author's notation override as runs."""
    reader = _TexReader(latex)
    out: Label = ()
    while reader.i < len(reader.tokens):
        out += reader.atom(at, "math")
    return out
