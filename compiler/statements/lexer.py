"""Derive block text → logical lines of tokens with file positions.

Physical lines are tokenized one by one, then joined into logical lines (a
final ``\\`` or an open bracket continues).  Bad characters do not stop the
lexer: they become ``error`` tokens, so bracket balance and continuation are
still known and the parser can report one clean problem per statement.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction

from compiler.statements.words import STATEMENT_WORDS

#: Longer operators first, so ``**`` is not read as two ``*``.
OPERATORS = (
    "**", "..", "->", "==", "!=", "<=", ">=",
    "(", ")", "[", "]", ",", ":", "=", "<", ">", "+", "-", "*", "/", "^", "!",
)
OPENERS = {"(": ")", "[": "]"}
CLOSERS = {")", "]"}

#: Python's int() refuses longer digit strings; no derivation needs them.
MAX_DIGITS = 4000

_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_DIGITS = re.compile(r"[0-9]+")
_DECIMAL = re.compile(r"[0-9]*\.[0-9]+|[0-9]+\.(?!\.)[0-9]*")
#: A double-quoted string (only ``use`` reads one): no escapes, one line.
_STRING = re.compile(r'"([^"\\]*)"')
MAX_STRING = 500
_SPECIAL = {
    "'": "strings are not allowed",
    '"': "strings are not allowed (a string is closed on its line, without backslashes)",
    ";": "';' is not allowed: write one statement per line",
    ".": "'.' is not allowed here (no attribute access; ranges are written a..b)",
}


@dataclass(frozen=True)
class Token:
    """``kind`` is ``name``, ``int``, ``op``, ``string``, ``error`` or ``end``.

    For ``error`` tokens ``text`` is the message; for ``string`` tokens the
    text between the quotes.  ``end_column`` is the
    column just past the token, so "expected ..." can point after it.
    """

    kind: str
    text: str
    line: int
    column: int
    end_column: int

    @property
    def value(self) -> int:
        return int(self.text)


@dataclass
class LogicalLine:
    """One statement's tokens, joined across physical lines.

    ``blank`` marks an empty physical line (it ends a fiber body);
    ``indented`` says whether the first physical line starts with blanks.
    """

    tokens: list[Token] = field(default_factory=list)
    line: int = 0
    end_line: int = 0
    indented: bool = False
    pieces: list[str] = field(default_factory=list)
    blank: bool = False

    @property
    def source(self) -> str:
        return " ".join(self.pieces)


def decimal_hint(text: str) -> str:
    """``0.5`` → ``1/2``: the exact fraction the author probably meant."""
    if len(text) > 40:
        return "a fraction"
    value = Fraction(text if text[-1] != "." else text + "0")
    return str(value)


def _glued_message(digits: str, word: str) -> str:
    if re.fullmatch(r"[eE][0-9]*", word):
        return "scientific notation is not allowed: write an exact integer or fraction"
    return (f"a number runs into a name: '{digits}{word}' (there is no implicit "
            f"multiplication; write {digits}*{word})")


def tokenize_line(text: str, line: int, offset: int = 0) -> tuple[list[Token], bool, str]:
    """Tokens of one physical line, whether it ends in ``\\``, and its code text.

    The code text is the line without its comment and continuation mark, as
    quoted in a statement's ``source``.
    """
    code = text.split("#", 1)[0]
    tokens: list[Token] = []
    continues = False
    pos = 0
    while pos < len(code):
        ch = code[pos]
        col = pos + 1 + offset
        if ch in " \t\f\v":
            pos += 1
            continue
        if ch == "\\":
            if code[pos + 1:].strip():
                tokens.append(Token("error", "'\\' continues a line only at its very end",
                                    line, col, col + 1))
                pos += 1
                continue
            continues = True
            code = code[:pos]
            break
        match = _NAME.match(code, pos)
        if match:
            word = match.group()
            if word.startswith("_"):
                tokens.append(Token("error", f"names must start with a letter: '{word}'",
                                    line, col, match.end() + 1))
            else:
                tokens.append(Token("name", word, line, col, match.end() + 1))
            pos = match.end()
            continue
        match = _DECIMAL.match(code, pos)
        if match:
            tokens.append(Token("error", "decimals are not allowed: write "
                                + decimal_hint(match.group()), line, col, match.end() + 1))
            pos = match.end()
            continue
        match = _DIGITS.match(code, pos)
        if match:
            digits, end = match.group(), match.end()
            glued = _NAME.match(code, end)
            if glued:
                tokens.append(Token("error", _glued_message(digits, glued.group()),
                                    line, col, glued.end() + 1))
                pos = glued.end()
                continue
            if len(digits) > MAX_DIGITS:
                tokens.append(Token("error", f"number too long (more than {MAX_DIGITS} digits)",
                                    line, col, end + 1))
            else:
                tokens.append(Token("int", digits, line, col, end + 1))
            pos = end
            continue
        match = _STRING.match(code, pos)
        if match:
            if len(match.group(1)) > MAX_STRING:
                tokens.append(Token("error", f"string too long (more than {MAX_STRING} characters)",
                                    line, col, match.end() + 1))
            else:
                tokens.append(Token("string", match.group(1), line, col, match.end() + 1))
            pos = match.end()
            continue
        op = next((op for op in OPERATORS if code.startswith(op, pos)), None)
        if op is not None:
            tokens.append(Token("op", op, line, col, col + len(op)))
            pos += len(op)
            continue
        message = _SPECIAL.get(ch, f"unexpected character {ch!r}")
        tokens.append(Token("error", message, line, col, col + 1))
        pos += 1
    return tokens, continues, code.strip()


def logical_lines(text: str, first_line: int, offsets: tuple[int, ...] = ()) -> list[LogicalLine]:
    """Join physical lines; ``first_line`` is the file line of ``text``'s first line.

    Comment-only lines vanish; blank lines become ``blank`` markers.  A
    bracket left open (at the end of the block, or before a line starting
    with a statement word) is reported by an ``error`` token at the bracket.
    """
    result: list[LogicalLine] = []
    current: LogicalLine | None = None
    open_brackets: list[Token] = []
    after_backslash = False
    for index, raw in enumerate(text.split("\n")):
        line = first_line + index
        offset = offsets[index] if index < len(offsets) else 0
        tokens, continues, code = tokenize_line(raw, line, offset)
        if current is None:
            if not tokens:
                if not raw.strip():
                    result.append(LogicalLine(line=line, end_line=line, blank=True))
                continue
            current = LogicalLine(line=line, indented=raw[:1] in (" ", "\t"))
        elif after_backslash and not open_brackets and not raw.strip():
            result.append(_finish(current, open_brackets))
            result.append(LogicalLine(line=line, end_line=line, blank=True))
            current = None
            continue
        elif open_brackets and tokens and tokens[0].kind == "name" \
                and tokens[0].text in STATEMENT_WORDS:
            # A statement word cannot occur inside an expression: the
            # bracket was left open, and this line starts afresh.
            result.append(_finish(current, open_brackets))
            current = LogicalLine(line=line, indented=raw[:1] in (" ", "\t"))
        current.tokens.extend(tokens)
        if code:
            current.pieces.append(code)
        if tokens:
            current.end_line = line
        for token in tokens:
            if token.kind != "op":
                continue
            if token.text in OPENERS:
                open_brackets.append(token)
            elif token.text in CLOSERS and open_brackets:
                open_brackets.pop()
        after_backslash = continues
        if not continues and not open_brackets:
            result.append(_finish(current, open_brackets))
            current = None
    if current is not None:
        result.append(_finish(current, open_brackets))
    return result


def _finish(current: LogicalLine, open_brackets: list[Token]) -> LogicalLine:
    if open_brackets:
        bracket = open_brackets[0]
        current.tokens.append(Token("error", f"'{bracket.text}' is never closed",
                                       bracket.line, bracket.column, bracket.end_column))
        open_brackets.clear()
    return current
