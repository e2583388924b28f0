"""What a stranger's document may put into LaTeX: one whitelist, shared.

The appendix is typeset by the reader's TeX, which can read and write files
(``\\input``, ``\\openout``, ``\\write``) and redefine anything (``\\def``,
``\\catcode``, ``\\csname``).  So math from prose and front matter is checked
against the whitelist below when the document is read (a located error
otherwise), and the MathML side refuses the same commands; every other text
reaching the ``.tex`` is escaped here.  Characters are either mapped to
commands of plain LaTeX with amsmath and amssymb or refused, so a ``.tex``
anomark writes always typesets.  The lists are anomark's own choice (common
practice, no source).
"""
from __future__ import annotations

import re
import unicodedata
from typing import Optional

# ------------------------------------------------------------ math whitelist

_GREEK = ("alpha beta gamma delta epsilon varepsilon zeta eta theta vartheta iota kappa "
          "lambda mu nu xi pi varpi rho varrho sigma varsigma tau upsilon phi varphi chi psi "
          "omega Gamma Delta Theta Lambda Xi Pi Sigma Upsilon Phi Psi Omega").split()
#: Control words allowed in math: symbols, operators, fonts, accents, layout;
#: all defined by LaTeX, amsmath or amssymb, and none reads, writes or defines.
MATH_COMMANDS = frozenset(_GREEK + """
    times cdot cdots ldots dots vdots ddots pm mp div ast star circ bullet otimes oplus
    ominus odot wedge vee cap cup bigcap bigcup bigoplus bigotimes bigwedge setminus
    leq geq le ge neq ne ll gg approx sim simeq equiv cong propto asymp doteq
    in notin ni subset subseteq supset supseteq mid nmid parallel perp
    to rightarrow leftarrow leftrightarrow Rightarrow Leftarrow Leftrightarrow mapsto
    longrightarrow longmapsto hookrightarrow uparrow downarrow iff implies
    forall exists nexists neg lnot emptyset varnothing infty partial nabla hbar ell
    Re Im aleph wp prime dagger ddagger angle triangle square Box
    sum prod coprod int iint iiint oint lim limsup liminf sup inf max min det exp log ln
    sin cos tan cot sec csc sinh cosh tanh coth arcsin arccos arctan dim ker deg gcd
    hom arg Pr
    frac dfrac tfrac binom dbinom tbinom sqrt left right middle big Big bigg Bigg
    bigl bigr Bigl Bigr biggl biggr Biggl Biggr langle rangle lfloor rfloor lceil rceil
    lvert rvert lVert rVert vert Vert backslash surd
    mathrm mathit mathbf mathsf mathtt mathcal mathbb mathfrak boldsymbol operatorname
    text textrm textit textbf texttt mbox
    hat widehat tilde widetilde bar overline underline vec dot ddot check breve acute
    grave overbrace underbrace overset underset stackrel
    quad qquad displaystyle textstyle scriptstyle limits nolimits
    begin end
    """.split())
#: Environments allowed after ``\\begin``; all are amsmath's math environments.
MATH_ENVIRONMENTS = frozenset("matrix pmatrix bmatrix Bmatrix vmatrix Vmatrix smallmatrix "
                              "cases aligned gathered split array".split())
#: Commands that take an argument: TeX fails when none follows.
_TAKES_ARGUMENT = frozenset("""frac dfrac tfrac binom dbinom tbinom sqrt mathrm mathit mathbf mathsf
    mathtt mathcal mathbb mathfrak boldsymbol operatorname text textrm textit textbf texttt mbox hat
    widehat tilde widetilde bar overline underline vec dot ddot check breve acute grave overbrace
    underbrace overset underset stackrel""".split())
_DELIMITER_WORDS = frozenset("langle rangle lfloor rfloor lceil rceil lvert rvert lVert rVert vert "
                             "Vert uparrow downarrow backslash".split())
_NO_ARGUMENT = "}&^_"
#: Backslash followed by one of these is a harmless control symbol (spacing, escaped specials).
_CONTROL_SYMBOLS = frozenset(",;:! {}|\\#%&_$")
_CONTROL_WORD = re.compile(r"\\([A-Za-z]+)")
_ENVIRONMENT = re.compile(r"\s*\{([A-Za-z*]*)\}")
_ENVIRONMENT_COMMANDS = ("begin", "end")

# -------------------------------------------------------------- characters

_BLACKBOARD = {"\u2124": "Z", "\u211d": "R", "\u2102": "C", "\u211a": "Q", "\u2115": "N",
               "\u2119": "P", "\u210d": "H"}
#: Characters a physicist types that are commands in math mode.
MATH_CHARACTERS = {
    "\u2212": "-", "\u00d7": r"\times", "\u00b7": r"\cdot", "\u22c5": r"\cdot",
    "\u2264": r"\leq", "\u2265": r"\geq", "\u2260": r"\neq", "\u2192": r"\to",
    "\u2190": r"\leftarrow", "\u21a6": r"\mapsto", "\u21d2": r"\Rightarrow",
    "\u21d4": r"\Leftrightarrow", "\u222b": r"\int", "\u221e": r"\infty",
    "\u2248": r"\approx", "\u2261": r"\equiv", "\u2245": r"\cong", "\u223c": r"\sim",
    "\u00b1": r"\pm", "\u2213": r"\mp", "\u2211": r"\sum", "\u220f": r"\prod",
    "\u2202": r"\partial", "\u2207": r"\nabla", "\u2297": r"\otimes", "\u2295": r"\oplus",
    "\u2227": r"\wedge", "\u2228": r"\vee", "\u2229": r"\cap", "\u222a": r"\cup",
    "\u2208": r"\in", "\u2209": r"\notin", "\u2282": r"\subset", "\u2286": r"\subseteq",
    "\u2205": r"\emptyset", "\u2200": r"\forall", "\u2203": r"\exists",
    "\u210f": r"\hbar", "\u2113": r"\ell", "\u221a": r"\surd", "\u2032": "'",
    "\u27e8": r"\langle", "\u27e9": r"\rangle", "\u2218": r"\circ", "\u2020": r"\dagger",
    "\u03b5": r"\varepsilon", "\u03c6": r"\varphi",
    **{ch: rf"\mathbb{{{letter}}}" for ch, letter in _BLACKBOARD.items()},
    **{ch: "{}^{" + s + "}" for ch, s in zip("\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079\u207a\u207b",
                                             "0123456789+-")},
    **{chr(0x2080 + k): "{}_{" + str(k) + "}" for k in range(10)},
}
for _name in _GREEK:
    if _name.startswith("var") or _name == "epsilon":
        continue
    _case = "CAPITAL" if _name[0].isupper() else "SMALL"
    _letter = unicodedata.lookup(f"GREEK {_case} LETTER {_name.upper().replace('LAMBDA', 'LAMDA')}")
    MATH_CHARACTERS.setdefault(_letter, "\\" + _name)
for _latin in "ABEZHIKMNOPTXY":  # capital Greek letters drawn like Latin ones
    MATH_CHARACTERS.setdefault(unicodedata.lookup(
        "GREEK CAPITAL LETTER " + dict(A="ALPHA", B="BETA", E="EPSILON", Z="ZETA", H="ETA",
                                       I="IOTA", K="KAPPA", M="MU", N="NU", O="OMICRON",
                                       P="RHO", T="TAU", X="CHI", Y="UPSILON")[_latin]), _latin)

#: Text-mode specials and punctuation, by LaTeX command (no package needed).
_TEXT_SPECIALS = {
    "\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
    "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}", "<": r"\textless{}", ">": r"\textgreater{}",
    "|": r"\textbar{}", "\u00a0": "~", "\u2026": r"\dots{}", "\u2013": "--", "\u2014": "---",
    "\u2018": "`", "\u2019": "'", "\u201c": "``", "\u201d": "''", "\u00ab": r"\ensuremath{\ll}",
    "\u00bb": r"\ensuremath{\gg}", "\u2022": r"\textbullet{}", "\u00a7": r"\S{}",
    "\u00b6": r"\P{}", "\u00a9": r"\copyright{}", "\u00ae": r"\textregistered{}",
    "\u2122": r"\texttrademark{}", "\u00b0": r"\textdegree{}", "\u00bf": r"\textquestiondown{}",
    "\u00a1": r"\textexclamdown{}", "\u00df": r"\ss{}", "\u00e6": r"\ae{}", "\u00c6": r"\AE{}",
    "\u0153": r"\oe{}", "\u0152": r"\OE{}", "\u00f8": r"\o{}", "\u00d8": r"\O{}",
    "\u0142": r"\l{}", "\u0141": r"\L{}", "\u0131": r"\i{}", "\u00a3": r"\pounds{}",
    "\u2021": r"\ddag{}", "\u2032": "'",
    # Invisible: a zero-width space is a permitted break, the joiners and marks are nothing.
    "\u200b": r"\hspace{0pt}", "\u200c": "", "\u200d": "", "\u2060": "", "\ufeff": "",
    "\u00ad": r"\-", "\u200e": "", "\u200f": "", "\t": " ",
}
_INVISIBLE = frozenset("\u200b\u200c\u200d\u2060\ufeff\u00ad\u200e\u200f")
#: Combining accents → LaTeX accent commands, for letters written with them.
_ACCENTS = {"\u0300": "`", "\u0301": "'", "\u0302": "^", "\u0303": "~", "\u0304": "=",
            "\u0306": "u", "\u0307": ".", "\u0308": '"', "\u030a": "r", "\u030b": "H",
            "\u030c": "v", "\u0327": "c"}
_CODE_SYMBOLS = {ch: f"\\symbol{{{ord(ch)}}}" for ch in "\\{}^~_<>|'`\""}


def _accented(ch: str) -> Optional[str]:
    """``é`` → ``\\'{e}``: a Latin letter with accents LaTeX can put on it."""
    base, *marks = unicodedata.normalize("NFD", ch)
    if not marks or not (base.isascii() and base.isalpha()) or any(m not in _ACCENTS for m in marks):
        return None
    out = {"i": r"\i", "j": r"\j"}.get(base, base) if marks[0] in "\u0300\u0301\u0302\u0308" else base
    for mark in marks:
        out = f"\\{_ACCENTS[mark]}{{{out}}}"
    return "{" + out + "}"


def text_character(ch: str) -> Optional[str]:
    """LaTeX for one character of prose, or None if it cannot be typeset."""
    if ch in _TEXT_SPECIALS:
        return _TEXT_SPECIALS[ch]
    if " " <= ch <= "~":
        return ch
    if ch in MATH_CHARACTERS:
        return f"\\ensuremath{{{MATH_CHARACTERS[ch]}}}"  # not $..$: two in a row would make $$
    return _accented(ch)


def math_character(ch: str) -> Optional[str]:
    """LaTeX for one character inside math, or None if it cannot be typeset."""
    if " " <= ch <= "~" or ch in "\n\t":
        return ch
    if ch in _INVISIBLE:
        return ""
    if ch in MATH_CHARACTERS:
        return "{" + MATH_CHARACTERS[ch] + "}"
    accented = _accented(ch)
    return None if accented is None else r"\text{" + accented + "}"


def character_problem(ch: str) -> str:
    name = unicodedata.name(ch, "unnamed")
    return (f"the character U+{ord(ch):04X} ({name}) cannot be typeset in the LaTeX "
            f"appendix; write it as LaTeX math or leave it out")


def unknown_character(ch: str) -> str:
    """What stands in for a character that cannot be typeset in text the
    document did not write itself (a file name): its code point, visibly."""
    return f"\\texttt{{[U+{ord(ch):04X}]}}"


def escape_text(text: str) -> str:
    """Plain text as LaTeX text: specials escaped, known characters mapped, others by code point."""
    out = []
    for ch in text:
        mapped = text_character(ch)
        out.append(mapped if mapped is not None else unknown_character(ch))
    return "".join(out)


def escape_code(text: str) -> str:
    """Text for the typewriter font: every ASCII special shown as its own glyph."""
    return "".join(_CODE_SYMBOLS.get(ch) or text_character(ch) or unknown_character(ch)
                   for ch in text)


def file_name(name: str) -> str:
    """A file name TeX reads back as written (``\\includegraphics``): letters,
    digits, ``-``, ``_`` and ``.`` kept, anything else as ``_``."""
    return re.sub(r"[^A-Za-z0-9._-]", "_", name)


# ------------------------------------------------------------------- math

def math_problem(latex: str) -> Optional[tuple[int, str]]:
    """The first thing in ``latex`` (math as the author wrote it) that may not
    reach TeX, as (offset, message); None when all of it is allowed."""
    depth, environments, fences, i = 0, [], 0, 0
    while i < len(latex):
        ch = latex[i]
        if ch == "\\":
            word = _CONTROL_WORD.match(latex, i)
            if word is None:
                if latex[i + 1:i + 2] not in _CONTROL_SYMBOLS:
                    return i, f"'{latex[i:i + 2]}' is not allowed in math"
                i += 2
                continue
            name = word.group(1)
            if name not in MATH_COMMANDS:
                return i, f"'\\{name}' is not an allowed math command"
            i = word.end()
            problem = _argument_problem(latex, i, name)
            if problem is not None:
                return word.start(), problem
            if name in ("left", "right"):
                fences += 1 if name == "left" else -1
                if fences < 0:
                    return word.start(), "'\\right' without a '\\left' before it"
            if name in _ENVIRONMENT_COMMANDS:
                env = _ENVIRONMENT.match(latex, i)
                if env is None or env.group(1) not in MATH_ENVIRONMENTS:
                    return word.start(), (f"'\\{name}' needs an allowed environment: "
                                          f"{', '.join(sorted(MATH_ENVIRONMENTS))}")
                if name == "begin":
                    environments.append(env.group(1))
                elif not environments or environments.pop() != env.group(1):
                    return word.start(), f"'\\end{{{env.group(1)}}}' does not close an open environment"
                i = env.end()
            continue
        problem = _math_char_problem(latex, i, depth, environments)
        if problem is not None:
            return i, problem
        depth += {"{": 1, "}": -1}.get(ch, 0)
        if depth < 0:
            return i, "'}' closes a brace that was never opened"
        i += 1
    if environments:
        return len(latex), f"'\\begin{{{environments[-1]}}}' is never closed"
    if fences:
        return len(latex), "a '\\left' has no '\\right'"
    if depth:
        return len(latex), "a '{' is never closed"
    return None


def _argument_problem(latex: str, i: int, name: str) -> Optional[str]:
    """Why what follows ``\\name`` (from ``latex[i]``) cannot be its argument or delimiter."""
    rest = latex[i:].lstrip()
    if name in ("left", "right"):
        word = _CONTROL_WORD.match(rest)
        if rest[:1] in tuple("()[]|./") or rest[:2] in ("\\{", "\\}", "\\|") or (
                word is not None and word.group(1) in _DELIMITER_WORDS):
            return None
        return f"'\\{name}' needs a delimiter such as ( or ."
    if name in _TAKES_ARGUMENT and (not rest or rest[0] in _NO_ARGUMENT):
        return f"'\\{name}' needs an argument"
    return None


def _math_char_problem(latex: str, i: int, depth: int, environments: list) -> Optional[str]:
    ch = latex[i]
    if ch == "^" and latex[i + 1:i + 2] == "^":
        return "'^^' (a character code) is not allowed in math"
    if ch in "^_" and (not latex[i + 1:].lstrip() or latex[i + 1:].lstrip()[0] in _NO_ARGUMENT):
        return f"'{ch}' needs something to raise or lower"
    if ch == "%":
        return "'%' would start a TeX comment; write '\\%'"
    if ch == "#":
        return "'#' is not allowed in math; write '\\#'"
    if ch == "&" and not environments:
        return "'&' belongs inside an environment such as aligned; write '\\&'"
    if math_character(ch) is None:
        return character_problem(ch)
    return None


def math_tex(latex: str) -> str:
    """Allowed math (see ``math_problem``) with its Unicode characters as commands."""
    return "".join(ch if ch.isascii() else (math_character(ch) or unknown_character(ch))
                   for ch in latex)
