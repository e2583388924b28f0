"""The two kinds of failure: problems in a document, and bugs in anomark.

A document problem always carries the place in the Markdown file where it
was found, so the command line can print ``FILE:LINE:COL: message`` and the
author can jump to it.  Anything else that escapes is an ``InternalError``:
the command line says plainly that it is our bug, not the author's.
"""
from __future__ import annotations

from dataclasses import dataclass


def shown(text: str) -> str:
    """``text`` with control and other unprintable characters escaped, so that
    a file name or a quoted piece of a document cannot drive the reader's
    terminal (retitle it, clear it, move the cursor)."""
    return "".join(ch if ch.isprintable() else ch.encode("unicode_escape").decode("ascii")
                   for ch in text)


@dataclass(frozen=True)
class Location:
    """A 1-based position in a Markdown file."""

    path: str
    line: int
    column: int = 1

    def __str__(self) -> str:
        return f"{shown(self.path)}:{self.line}:{self.column}"


@dataclass(frozen=True)
class Problem:
    """One located message; a DocumentError carries one or more."""

    location: Location
    message: str

    def __str__(self) -> str:
        return f"{self.location}: {shown(self.message)}"


class DocumentError(Exception):
    """One or more problems in a document; each has a location.

    Raised with one problem (``DocumentError(loc, "msg")``) or as a bundle of
    several (``DocumentError.of(problems)``) so that a parse reports every
    bad line at once.
    """

    def __init__(self, location: Location, message: str):
        self.problems: tuple[Problem, ...] = (Problem(location, message),)
        super().__init__(str(self))

    @classmethod
    def of(cls, problems) -> "DocumentError":
        problems = tuple(problems)
        if not problems:
            raise InternalError("DocumentError.of() needs at least one problem")
        err = cls(problems[0].location, problems[0].message)
        err.problems = problems
        err.args = (str(err),)
        return err

    @property
    def location(self) -> Location:
        return self.problems[0].location

    @property
    def message(self) -> str:
        return self.problems[0].message

    def __str__(self) -> str:
        return "\n".join(str(p) for p in self.problems)


class InternalError(Exception):
    """A bug in anomark itself, never the author's fault."""
