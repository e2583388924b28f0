"""Where the report templates are read from: the one place that finds them.

The templates' source lives in the checkout's top-level ``templates/``;
packaging maps that folder to the package ``compiler.templates`` (see
pyproject.toml), so a wheel, a plain ``pip install .`` and an editable
install all reach them through importlib.resources.  Run straight from a
checkout without any install (``PYTHONPATH=.``), that package does not
exist and the checkout's folder is the only copy there is.

Compiling the report template costs a build more than rendering it, so
the command line may hand the renderers a store of compiled templates
(``keep_compiled``; the command line's store signs each one with the
user's secret and loads only those that verify).
"""
from __future__ import annotations

import contextlib
from importlib import resources
from importlib.abc import Traversable
from pathlib import Path


def template_root() -> Traversable:
    """The folder holding ``report.html.j2`` and its companions."""
    try:
        return resources.files("compiler.templates")
    except ModuleNotFoundError:  # a bare checkout on PYTHONPATH: no install mapped the folder
        return Path(__file__).resolve().parents[2] / "templates"


def loader():
    """A Jinja loader over the template folder, wherever it was installed
    (jinja2 loads only when something is rendered)."""
    import jinja2

    root = template_root()

    def load(name: str) -> str | None:
        entry = root.joinpath(name)
        return entry.read_text(encoding="utf-8") if entry.is_file() else None

    return jinja2.FunctionLoader(load)


#: The compiled-template store the command line set up, or None (compile every time).
_compiled = None


def environment(**options):
    """A Jinja environment over the templates, keeping compiled ones where allowed."""
    import jinja2

    return jinja2.Environment(loader=loader(), bytecode_cache=_compiled, **options)


@contextlib.contextmanager
def keep_compiled(store):
    """While rendering, load and keep compiled templates through ``store``
    (a Jinja bytecode cache; None compiles every time)."""
    global _compiled
    _compiled = store
    try:
        yield
    finally:
        _compiled = None
