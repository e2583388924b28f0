"""The report templates travel with the package however it is installed.

The full proof is in .ci/run: a wheel installed into a second venv builds the
demo document from outside the checkout.  These quick checks catch the usual
way that breaks: a template file the packaging rules do not pick up.
"""
from __future__ import annotations

import fnmatch
from pathlib import Path

import jinja2
import pytest

from compiler.render.templates import loader, template_root

tomllib = pytest.importorskip("tomllib")  # Python 3.11+

ROOT = Path(__file__).resolve().parent.parent


def _setuptools() -> dict:
    return tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["tool"]["setuptools"]


def test_the_templates_folder_is_installed_as_a_package():
    config = _setuptools()
    assert "compiler.templates" in config["packages"]
    assert config["package-dir"]["compiler.templates"] == "templates"
    assert (ROOT / "templates" / "__init__.py").is_file()  # a regular package: editable installs find it


def test_every_template_file_is_package_data():
    patterns = _setuptools()["package-data"]["compiler.templates"]
    files = [p.name for p in (ROOT / "templates").iterdir() if p.is_file() and p.suffix != ".py"]
    assert files
    missing = [name for name in files if not any(fnmatch.fnmatch(name, pattern) for pattern in patterns)]
    assert not missing, f"not packaged: {missing}"


def test_the_renderers_read_every_template_through_the_one_loader():
    root = template_root()
    for name in ("report.html.j2", "report.css", "appendix.tex.j2", "standalone.tex.j2"):
        assert root.joinpath(name).is_file(), name
        source, _, _ = loader().get_source(None, name)
        assert source == (ROOT / "templates" / name).read_text(encoding="utf-8")
    with pytest.raises(jinja2.TemplateNotFound):
        loader().get_source(None, "missing.j2")
