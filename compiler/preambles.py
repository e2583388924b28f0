"""``use``: load the documents a document uses, before its names are checked.

A document may use a document in its own folder or below it
(``use "common.md"``) or one of the bundled library
(``use library "anomalies-4d.md"``, shipped as package data in
``compiler/library``).  Each used document is parsed and name-checked on its
own, once per build however often it is used; the ``use`` statement then
carries it as a ``Module`` whose declarations the name pass brings in and
whose statements the engine runs (once) in the using document's ring.

Refused, at the ``use`` line: absolute paths, ``..``, a path that leaves the
folder through a symbolic link, a missing document, a cycle, and problems
inside the used document (quoted with their own location).
"""
from __future__ import annotations

import dataclasses
import os
import re
from importlib import resources
from pathlib import Path, PurePosixPath
from typing import Callable, Iterator

from . import names as names_pass
from .document import MAX_DOCUMENT_SIZE
from .errors import DocumentError, Location, Problem
from .statements import nodes as n
from .statements.core import did_you_mean

LIBRARY = "library"
#: Documents one build may use, and how deep uses may nest.
MAX_USED_DOCUMENTS = 100
MAX_USE_DEPTH = 16
_LIBRARY_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9_-]*\.md")


class Module:
    """A loaded document: where it is shown from (``display``), its identity
    (``key``), its statements (uses resolved) and what it declares."""

    __slots__ = ("display", "key", "statements", "exports")

    def __init__(self, display: str, key: str, statements: tuple, exports: tuple):
        object.__setattr__(self, "display", display)
        object.__setattr__(self, "key", key)
        object.__setattr__(self, "statements", statements)
        object.__setattr__(self, "exports", exports)

    def __setattr__(self, name, value):
        raise AttributeError("a Module is immutable")


def library_root():
    return resources.files("compiler").joinpath(LIBRARY)


def load(path: str, statements: list, parse: Callable) -> list:
    """``statements`` of the document at ``path`` with every ``use`` loaded.

    ``parse(path, text)`` returns ``(document, statements_by_block)``.
    """
    top = os.path.realpath(path)
    return _Loader(parse).resolve(path, Path(path).parent, False, statements, ((top, path),))


def flatten(statements) -> Iterator:
    """Every statement in the order the engine runs them: a used document's
    statements at its first ``use``, each document once."""
    seen: set[str] = set()

    def visit(items):
        for s in items:
            if isinstance(s, n.UseDecl) and s.module is not None:
                if s.module.key not in seen:
                    seen.add(s.module.key)
                    yield from visit(s.module.statements)
            yield s
    yield from visit(statements)


class _Loader:
    def __init__(self, parse: Callable):
        self.parse = parse
        self.modules: dict[str, Module] = {}

    def resolve(self, display: str, folder, in_library: bool, statements, stack) -> list:
        resolved, problems = [], []
        for s in statements:
            if isinstance(s, n.UseDecl):
                try:
                    s = dataclasses.replace(s, module=self.module(display, folder, in_library, s, stack))
                except DocumentError as err:
                    problems.extend(err.problems)
            resolved.append(s)
        if problems:
            raise DocumentError.of(problems)
        return resolved

    def module(self, display: str, folder, in_library: bool, s: n.UseDecl, stack) -> Module:
        here = Location(display, s.line, s.column)
        if s.library:
            key, child, text = self._library(here, s.path)
            child_folder, child_in_library = None, True
        elif in_library:
            raise DocumentError(here, "a library document uses others with 'use library'")
        else:
            key, child, text = self._file(here, folder, s.path)
            child_folder, child_in_library = Path(child).parent, False
        chain = [d for _, d in stack]
        if key in [k for k, _ in stack]:
            cycle = " uses ".join(chain[[k for k, _ in stack].index(key):] + [child])
            raise DocumentError(here, f"the documents use each other in a cycle: {cycle}")
        if key in self.modules:
            return self.modules[key]
        if len(stack) > MAX_USE_DEPTH:
            raise DocumentError(here, f"uses nest more than {MAX_USE_DEPTH} documents deep")
        if len(self.modules) >= MAX_USED_DOCUMENTS:
            raise DocumentError(here, f"a build uses at most {MAX_USED_DOCUMENTS} documents")
        try:
            document, blocks = self.parse(child, text)
            if document.front.conventions:
                first = document.front.conventions[0]
                raise DocumentError(Location(child, first.line, first.column),
                                    "a used document declares its conventions with 'convention' "
                                    "statements, not in its front matter")
            statements = [x for i in sorted(blocks) for x in blocks[i]]
            statements = self.resolve(child, child_folder, child_in_library, statements,
                                      stack + ((key, child),))
            table = names_pass.resolve(child, statements, [], [])
        except DocumentError as err:
            raise DocumentError.of([Problem(here, f"in the used document: {p.location}: {p.message}")
                                    for p in err.problems]) from None
        exports = tuple(d if d.origin else dataclasses.replace(d, origin=child)
                        for d in table.values() if d.line)
        module = Module(child, key, tuple(statements), exports)
        self.modules[key] = module
        return module

    @staticmethod
    def _library(here: Location, name: str):
        if not _LIBRARY_NAME.fullmatch(name):
            raise DocumentError(here, f"a library document is named by its file name, such as "
                                      f"'anomalies-4d.md', not '{name}'")
        root = library_root()
        resource = root.joinpath(name)
        if not resource.is_file():
            names = sorted(r.name for r in root.iterdir() if r.name.endswith(".md"))
            raise DocumentError(here, f"the bundled library has no document '{name}' (it has "
                                      f"{', '.join(names)})" + did_you_mean(name, names))
        return f"{LIBRARY}/{name}", f"{LIBRARY}/{name}", resource.read_text(encoding="utf-8")

    @staticmethod
    def _file(here: Location, folder: Path, written: str):
        path = PurePosixPath(written)
        if path.is_absolute() or "\\" in written or re.match(r"[A-Za-z]:", written):
            raise DocumentError(here, f"'{written}' is an absolute path: give a path relative "
                                      "to this document's folder")
        if ".." in path.parts:
            raise DocumentError(here, f"'{written}' leaves this document's folder: a document "
                                      "uses only documents in its folder or below it")
        target = folder / path
        real = Path(os.path.realpath(target))
        if not real.is_relative_to(Path(os.path.realpath(folder))):
            raise DocumentError(here, f"'{written}' leads outside this document's folder "
                                      "(through a symbolic link)")
        if not real.is_file():
            raise DocumentError(here, f"there is no document '{written}' in this document's folder")
        if real.stat().st_size > 4 * MAX_DOCUMENT_SIZE:
            raise DocumentError(here, f"'{written}' is too large to be a derivation document")
        try:
            text = real.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as exc:
            raise DocumentError(here, f"cannot read '{written}': {exc}") from None
        return str(real), str(target), text
