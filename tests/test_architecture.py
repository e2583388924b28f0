"""The import directions of compiler/ (DEVELOPERS.md, the architecture
sketch, issue 8), read from the source with ``ast`` so nothing is imported:

- the algebra never reaches the engine, the renderers or the command line;
- the statement syntax needs no sympy, and no algebra, engine or renderer;
- the renderers read only the results model, errors, the Markdown setup and
  the TeX whitelist ``compiler.texsafe`` (and each other);
- the command line reaches the rest only through the engine (and the Report
  it returns), the renderers, diff, errors and the package's own metadata.

Imports inside functions count too (some modules import lazily).
Directions not reached yet are strict xfails: they fail the moment they hold,
so the marker is removed then and the rule kept.
"""
from __future__ import annotations

import ast
from pathlib import Path

import pytest

from support import ROOT

PACKAGE = ROOT / "compiler"
MAX_LINES = 450


def module_name(path: Path) -> str:
    parts = path.relative_to(ROOT).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def is_module(dotted: str) -> bool:
    base = ROOT.joinpath(*dotted.split("."))
    return base.with_suffix(".py").is_file() or (base / "__init__.py").is_file()


def imports_of(path: Path) -> set[str]:
    """Every module ``path`` imports, as an absolute dotted name; ``from X
    import Y`` counts as X.Y when Y is a module of the project, else as X."""
    name = module_name(path)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"), str(path))):
        if isinstance(node, ast.Import):
            found.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")[: len(package.split(".")) - node.level + 1]
                source = ".".join(base + ([node.module] if node.module else []))
            else:
                source = node.module
            for alias in node.names:
                whole = f"{source}.{alias.name}"
                found.add(whole if is_module(whole) else source)
    return found - {"__future__"}


MODULES = {module_name(p): imports_of(p) for p in sorted(PACKAGE.rglob("*.py"))}


def within(name: str, *packages: str) -> bool:
    """``name`` is one of ``packages`` or inside one of them."""
    return any(name == p or name.startswith(p + ".") for p in packages)


def offending(owner: str, allowed=None, forbidden=()) -> dict[str, list[str]]:
    """Imports of the modules in ``owner`` that break its rule: those in
    ``forbidden``, and, when ``allowed`` is given, project imports outside it.
    The package itself (``from compiler import __version__``) is metadata,
    open to every module."""
    bad = {}
    for module, imported in MODULES.items():
        if not within(module, owner):
            continue
        project = {i for i in imported if within(i, "compiler") and i != "compiler"}
        wrong = sorted(i for i in imported
                       if within(i, *forbidden) or (allowed is not None and i in project and not within(i, *allowed)))
        if wrong:
            bad[module] = wrong
    return bad


def test_the_reader_sees_the_imports():
    # the rules below would pass vacuously on a reader that found nothing
    assert {"compiler.engine", "compiler.diff", "compiler.render.html", "compiler"} <= MODULES["compiler.cli"]
    assert "sympy" in MODULES["compiler.algebra.lazysympy"]  # the one module that imports it
    assert "compiler.statements.nodes" in MODULES["compiler.statements.parser"]


def test_the_algebra_never_reaches_engine_renderers_or_command_line():
    assert offending("compiler.algebra", forbidden=("compiler.engine", "compiler.render", "compiler.cli")) == {}


def test_the_algebra_carries_no_notation():
    assert offending("compiler.algebra", forbidden=("compiler.notation",)) == {}


def test_the_statement_syntax_needs_no_sympy_and_no_algebra():
    forbidden = ("sympy", "compiler.algebra", "compiler.engine", "compiler.render", "compiler.cli")
    assert offending("compiler.statements", forbidden=forbidden) == {}


def test_the_renderers_read_only_results_errors_and_markdown():
    allowed = ("compiler.results", "compiler.errors", "compiler.markdown", "compiler.texsafe", "compiler.render")
    assert offending("compiler.render", allowed=allowed) == {}


def test_the_renderers_reach_no_algebra_engine_or_command_line():
    # what holds while the notation step moves: the one project import of the
    # renderers beyond the rule above is compiler.notation
    allowed = ("compiler.results", "compiler.errors", "compiler.markdown", "compiler.texsafe", "compiler.render",
               "compiler.notation")
    assert offending("compiler.render", allowed=allowed) == {}


#: The command line's own modules: the argument wiring, its help texts, the watch server.
COMMAND_LINE = ("compiler.cli", "compiler.usage", "compiler.watch", "compiler.outputs")


def test_the_command_line_reaches_the_rest_through_engine_renderers_and_diff():
    # compiler.results is the Report the engine hands back
    allowed = ("compiler.engine", "compiler.render", "compiler.diff", "compiler.errors", "compiler.results",
               *COMMAND_LINE)
    assert {m: i for owner in COMMAND_LINE for m, i in offending(owner, allowed=allowed).items()} == {}


def test_no_module_is_over_450_lines():
    sizes = {module_name(p): len(p.read_text(encoding="utf-8").splitlines()) for p in PACKAGE.rglob("*.py")}
    assert {m: n for m, n in sizes.items() if n > MAX_LINES} == {}
