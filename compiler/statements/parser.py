"""Derive block text → statement nodes, through the rule tables.

Each logical line is read by the rule its first word selects
(``rules.RULES``); indented lines belong to the fiber above them, read by
the body rules its header names (``fibers.Header``).  A bad statement yields
exactly one problem (at the offending token) and parsing goes on with the
next line, so the author sees every bad line at once.  Nothing here evaluates anything: document text only
ever becomes the frozen dataclasses of ``nodes``.
"""
from __future__ import annotations

from typing import Optional

from compiler.errors import DocumentError, Location, Problem
from compiler.statements import nodes as n, words
from compiler.statements.core import Cursor, did_you_mean
from compiler.statements.fibers import BODY_WORDS, FiberBody, Header, body_line
from compiler.statements.lexer import Token, logical_lines
from compiler.statements.rules import RULES


def parse_block(text: str, first_line: int, path: str,
                offsets: tuple[int, ...] = ()) -> list[n.Statement]:
    """Parse one derive block whose first line is line ``first_line`` of ``path``.

    ``offsets[i]`` is how many characters the Markdown container (a list
    item, a block quote) cut from the front of the block's line ``i``, so
    columns stay file columns.

    Raises ``DocumentError`` listing one problem per bad statement.
    """
    statements: list[n.Statement] = []
    problems: list[Problem] = []
    body: Optional[FiberBody] = None

    def close_body():
        nonlocal body
        if body is not None and body.header is not None:
            statements.append(body.build())
        body = None

    for logical in logical_lines(text, first_line, offsets):
        if logical.blank:
            close_body()
            continue
        cursor = Cursor(logical, path)
        if logical.indented:
            first = logical.tokens[0]
            if body is None:
                problems.append(Problem(Location(path, first.line, first.column),
                                        "unexpected indentation: only the body lines of a "
                                        "fiber ('dimension n', 'fixed points' or "
                                        "'spindle') or of 'matter' are indented"))
            elif body.header is not None:
                try:
                    body.add(body_line(cursor, body.header.rules), logical)
                except DocumentError as exc:
                    problems.append(exc.problems[0])
            continue
        close_body()
        try:
            result = statement(cursor)
        except DocumentError as exc:
            problems.append(exc.problems[0])
            first = logical.tokens[0]
            if first.kind == "name" and first.text in ("fiber", "matter"):
                body = FiberBody(None)  # its body lines belong to the failed header
            continue
        if isinstance(result, Header):
            body = FiberBody(result)
        else:
            statements.append(result)
    close_body()
    if problems:
        raise DocumentError.of(problems)
    return statements


def statement(c: Cursor):
    """One logical line through the rule its first word selects."""
    c.lexing_problems()
    word = c.peek()
    if word.kind != "name":
        c.fail(word, f"a statement starts with a word such as 'let' or 'check', "
                     f"found {c.describe(word)}")
    rule = RULES.get(word.text)
    if rule is None:
        c.fail(word, _unknown_statement(word.text, c.peek(1)))
    c.next()
    result = rule(c)
    c.expect_end()
    return result


def _unknown_statement(word: str, after: Token) -> str:
    if word in BODY_WORDS:
        return f"'{word}' belongs in the indented body of a fiber"
    message = f"unknown statement '{word}'"
    if after.kind == "op" and after.text == "=":
        return message + f"; did you mean 'let {word} = ...'?"
    return message + did_you_mean(word, words.STATEMENT_WORDS)
